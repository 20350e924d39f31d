//! Reading a site file: each value parsed where it stands, so that a problem names its
//! file, line and key.

use std::collections::HashMap;
use std::path::Path;

use chrono::FixedOffset;
use uom::si::f64::{Pressure, ThermodynamicTemperature, Volume};
use uom::si::pressure::pascal;

use super::raw::{RawCylinder, RawFile, RawVessel};
use super::*;
use crate::atmosphere;
use crate::source::{located, FileError};
use crate::units;

/// Reads and checks a site file.
pub fn load(path: &Path) -> Result<Site, FileError> {
    from_source(Source::read(path)?)
}

/// Checks a site file's text, read already.
pub fn from_source(src: Source) -> Result<Site, FileError> {
    let path = src.path.clone();
    let path = path.as_path();
    let raw: RawFile = src.parse()?;
    let s = &raw.site;
    let ambient = match (&s.ambient_pressure, &s.elevation) {
        (Some(p), None) => {
            let reading = located(&src, "site.ambient_pressure", p, units::parse_pressure)?;
            match reading {
                PressureReading::Absolute(x) if !(1.0e3..=2.0e5).contains(&x.get::<pascal>()) => {
                    return Err(src.error(
                        p.span().start,
                        "site.ambient_pressure",
                        format!("'{}' is outside the range of atmospheres on the ground; accepted: 1 kPa(a) to 200 kPa(a)", p.get_ref()),
                    ))
                }
                PressureReading::Absolute(p) => (p, "given on the site file".to_string()),
                PressureReading::Gauge(_) => {
                    return Err(src.error(
                        p.span().start,
                        "site.ambient_pressure",
                        format!("'{}': the ambient pressure is what gauge readings are measured from, so it must be absolute, e.g. '101.3 kPa(a)'", p.get_ref()),
                    ))
                }
            }
        }
        (None, Some(z)) => {
            let elevation = located(&src, "site.elevation", z, units::parse_length)?;
            let p = atmosphere::pressure_at(elevation).map_err(|e| {
                src.error(
                    z.span().start,
                    "site.elevation",
                    format!("'{}': {}", crate::as_typed(z.get_ref()), e.problem),
                )
            })?;
            (
                p,
                format!("standard atmosphere at elevation {}", z.get_ref()),
            )
        }
        (None, None) => (
            Pressure::new::<pascal>(atmosphere::SEA_LEVEL_PRESSURE_PA),
            "standard sea-level atmosphere (neither ambient_pressure nor elevation given)"
                .to_string(),
        ),
        (Some(p), Some(_)) => {
            return Err(src.error(
                p.span().start,
                "site.ambient_pressure",
                "give either ambient_pressure or elevation, not both",
            ))
        }
    };
    let (ambient, ambient_basis) = ambient;
    let temperature =
        |key: &str, v: &Spanned<String>| located(&src, key, v, units::parse_temperature);
    let ambient_temperature = temperature("site.ambient_temperature", &s.ambient_temperature)?;
    let winter_minimum = s
        .winter_minimum_temperature
        .as_ref()
        .map(|v| temperature("site.winter_minimum_temperature", v))
        .transpose()?;
    let units = match &s.units {
        None => UnitSystem::Si,
        Some(u) => match u.get_ref().to_lowercase().as_str() {
            "si" => UnitSystem::Si,
            "us" => UnitSystem::Us,
            other => {
                return Err(src.error(
                    u.span().start,
                    "site.units",
                    format!("'{other}' is not a unit system; accepted: si, us"),
                ))
            }
        },
    };
    let time_zone = match &s.time_zone {
        None => chrono::Offset::fix(&chrono::Utc),
        Some(z) => located(&src, "site.time_zone", z, parse_offset)?,
    };
    let clearance = s
        .clearance
        .as_ref()
        .map(|v| located(&src, "site.clearance", v, positive(units::parse_length)))
        .transpose()?;
    let governing = s
        .governing
        .as_ref()
        .map(|g| located(&src, "site.governing", g, parse_governing))
        .transpose()?;
    let room = match (&s.room_volume, &s.room_ventilation) {
        (None, None) => None,
        (None, Some(v)) => {
            return Err(src.error(
                v.span().start,
                "site.room_ventilation".to_string(),
                "a room's ventilation without its volume; accepted: give site.room_volume too (e.g. '60 m3')".to_string(),
            ))
        }
        (Some(v), vent) => Some(SiteRoom {
            volume: located(&src, "site.room_volume", v, |t| {
                let q = units::parse_volume(t)?;
                crate::limits::volume(q)?;
                Ok(q)
            })?,
            ventilation: vent
                .as_ref()
                .map(|x| located(&src, "site.room_ventilation", x, units::parse_ventilation))
                .transpose()?
                .unwrap_or(Ventilation::AirChanges(0.0)),
        }),
    };

    let ctx = Context {
        src: &src,
        ambient,
        ambient_temperature,
        has_room: room.is_some(),
    };
    let mut equipment = Vec::new();
    for (i, v) in raw.vessel.iter().enumerate() {
        equipment.push(Equipment::Vessel(ctx.vessel(i, v)?));
    }
    for (i, c) in raw.cylinder.iter().enumerate() {
        equipment.push(Equipment::Cylinder(ctx.cylinder(i, c)?));
    }
    let mut seen: HashMap<String, usize> = HashMap::new();
    let tags = raw
        .vessel
        .iter()
        .enumerate()
        .map(|(i, v)| (&v.tag, format!("vessel[{}]", i + 1)))
        .chain(
            raw.cylinder
                .iter()
                .enumerate()
                .map(|(i, c)| (&c.tag, format!("cylinder[{}]", i + 1))),
        );
    located(&src, "site.name", &s.name, crate::record::check_name)?;
    for (tag, kind) in tags {
        located(&src, &format!("{kind}.tag"), tag, crate::record::check_name)?;
        let line = src.line_of(tag.span().start);
        // Tags that differ only in case or punctuation would share a record's file name.
        if let Some(first) = seen.insert(crate::record::slug(tag.get_ref()), line) {
            return Err(src.error(
                tag.span().start,
                format!("{kind}.tag"),
                format!(
                    "tag '{}' is used twice (first on line {first}); every item needs its own tag",
                    tag.get_ref()
                ),
            ));
        }
    }
    let mut origin = Origin {
        prefix: "site".to_string(),
        line: 1,
        ..Origin::default()
    };
    origin.note(&src, "ambient_temperature", &s.ambient_temperature);
    origin.note_opt(&src, "ambient_pressure", &s.ambient_pressure);
    origin.note_opt(&src, "elevation", &s.elevation);
    origin.note_opt(&src, "clearance", &s.clearance);
    Ok(Site {
        origin,
        path: path.to_path_buf(),
        name: s.name.get_ref().clone(),
        location: located(&src, "site.location", &s.location, text)?,
        ambient,
        ambient_basis,
        ambient_temperature,
        winter_minimum,
        units,
        time_zone,
        clearance,
        governing,
        room,
        equipment,
    })
}

/// What each item's parsing needs from the site.
struct Context<'a> {
    src: &'a Source,
    ambient: Pressure,
    ambient_temperature: ThermodynamicTemperature,
    /// Whether the site names a room, for a drain's `to = "room"`.
    has_room: bool,
}

impl Context<'_> {
    fn pressure(&self, key: &str, v: &Spanned<String>) -> Result<Pressure, FileError> {
        let reading = located(self.src, key, v, units::parse_pressure)?;
        let p = reading.to_absolute(self.ambient);
        if p.get::<pascal>() <= 0.0 {
            return Err(self.src.error(
                v.span().start,
                key,
                format!(
                    "'{}' is below a perfect vacuum; accepted: a pressure above vacuum",
                    v.get_ref()
                ),
            ));
        }
        Ok(p)
    }

    fn gas(&self, key: &str, v: &Spanned<String>) -> Result<&'static Gas, FileError> {
        located(self.src, key, v, |s| {
            Gas::find(s).ok_or_else(|| format!("unknown gas; accepted: {}", Gas::accepted_names()))
        })
    }

    fn vessel(&self, i: usize, v: &RawVessel) -> Result<Vessel, FileError> {
        let src = self.src;
        let key = |k: &str| format!("vessel[{}].{k}", i + 1);
        let temp =
            |k: &str, x: &Spanned<String>| located(src, &key(k), x, units::parse_temperature);
        let opt_pressure = |k: &str, x: &Option<Spanned<String>>| {
            x.as_ref().map(|x| self.pressure(&key(k), x)).transpose()
        };
        let drain = v
            .drain
            .as_ref()
            .map(|d| -> Result<Drain, FileError> {
                let orifice = located(
                    src,
                    &key("drain.orifice"),
                    &d.orifice,
                    positive(units::parse_length),
                )?;
                let cd = match &d.cd {
                    None => crate::rules::vent::SHARP_EDGED_CD,
                    Some(cd) => {
                        let x = *cd.get_ref();
                        if let Err(problem) = crate::limits::cd(x) {
                            let typed = src.text.get(cd.span()).unwrap_or_default();
                            return Err(src.error(
                                cd.span().start,
                                key("drain.cd"),
                                format!("'{typed}': {problem}"),
                            ));
                        }
                        x
                    }
                };
                let to = d
                    .to
                    .as_ref()
                    .map(|t| {
                        located(src, &key("drain.to"), t, |s| match s.trim() {
                            "room" => Ok(VentTo::Room),
                            "outdoors" => Ok(VentTo::Outdoors),
                            _ => Err(format!(
                                "'{s}' is not a place to vent to; accepted: \"room\" (the site's room_volume) or \"outdoors\""
                            )),
                        })
                    })
                    .transpose()?;
                if to == Some(VentTo::Room) && !self.has_room {
                    let t = d.to.as_ref().map_or(0, |t| t.span().start);
                    return Err(src.error(
                        t,
                        key("drain.to"),
                        "'room': the site names no room; accepted: give site.room_volume (and room_ventilation), or to = \"outdoors\"".to_string(),
                    ));
                }
                Ok(Drain {
                    description: match &d.description {
                        Some(t) => located(src, &key("drain.description"), t, text)?,
                        None => "vent or drain".to_string(),
                    },
                    orifice,
                    cd,
                    to,
                })
            })
            .transpose()?;
        let mut origin = Origin {
            prefix: format!("vessel[{}]", i + 1),
            line: src.line_of(v.tag.span().start),
            ..Origin::default()
        };
        for (k, x) in [
            ("gas", &v.gas),
            ("volume", &v.volume),
            ("mawp", &v.mawp),
            ("operating_pressure", &v.operating_pressure),
        ] {
            origin.note(src, k, x);
        }
        for (k, x) in [
            ("relief_set_pressure", &v.relief_set_pressure),
            ("mdmt", &v.mdmt),
            ("temperature", &v.temperature),
            ("test_pressure", &v.test_pressure),
        ] {
            origin.note_opt(src, k, x);
        }
        if let Some(d) = &v.drain {
            origin.note(src, "drain.orifice", &d.orifice);
        }
        Ok(Vessel {
            origin,
            tag: v.tag.get_ref().clone(),
            description: located(src, &key("description"), &v.description, text)?,
            gas: self.gas(&key("gas"), &v.gas)?,
            volume: located(src, &key("volume"), &v.volume, parse_vessel_volume)?,
            mawp: self.pressure(&key("mawp"), &v.mawp)?,
            operating_pressure: self.pressure(&key("operating_pressure"), &v.operating_pressure)?,
            relief_set_pressure: opt_pressure("relief_set_pressure", &v.relief_set_pressure)?,
            mdmt: v.mdmt.as_ref().map(|x| temp("mdmt", x)).transpose()?,
            material: v
                .material
                .as_ref()
                .map(|m| located(src, &key("material"), m, parse_material))
                .transpose()?,
            wall_thickness: v
                .wall_thickness
                .as_ref()
                .map(|x| {
                    located(
                        src,
                        &key("wall_thickness"),
                        x,
                        positive(units::parse_length),
                    )
                })
                .transpose()?,
            empty_mass: v
                .empty_mass
                .as_ref()
                .map(|x| located(src, &key("empty_mass"), x, positive(units::parse_mass)))
                .transpose()?,
            temperature: v
                .temperature
                .as_ref()
                .map(|x| temp("temperature", x))
                .transpose()?
                .unwrap_or(self.ambient_temperature),
            drain,
            test_pressure: opt_pressure("test_pressure", &v.test_pressure)?,
        })
    }

    fn cylinder(&self, i: usize, c: &RawCylinder) -> Result<Cylinder, FileError> {
        let src = self.src;
        let key = |k: &str| format!("cylinder[{}].{k}", i + 1);
        let temp =
            |k: &str, x: &Spanned<String>| located(src, &key(k), x, units::parse_temperature);
        let mut origin = Origin {
            prefix: format!("cylinder[{}]", i + 1),
            line: src.line_of(c.tag.span().start),
            ..Origin::default()
        };
        for (k, x) in [
            ("gas", &c.gas),
            ("water_capacity", &c.water_capacity),
            ("service_pressure", &c.service_pressure),
            ("rated_temperature", &c.rated_temperature),
        ] {
            origin.note(src, k, x);
        }
        for (k, x) in [
            ("supply_temperature", &c.supply_temperature),
            ("residual_pressure", &c.residual_pressure),
            ("fill_rate", &c.fill_rate),
            ("empty_mass", &c.empty_mass),
        ] {
            origin.note_opt(src, k, x);
        }
        let construction = located(
            src,
            &key("construction"),
            &c.construction,
            parse_construction,
        )?;
        Ok(Cylinder {
            origin,
            tag: c.tag.get_ref().clone(),
            description: located(src, &key("description"), &c.description, text)?,
            gas: self.gas(&key("gas"), &c.gas)?,
            water_capacity: located(
                src,
                &key("water_capacity"),
                &c.water_capacity,
                parse_vessel_volume,
            )?,
            service_pressure: self.pressure(&key("service_pressure"), &c.service_pressure)?,
            rated_temperature: temp("rated_temperature", &c.rated_temperature)?,
            construction,
            liner: c
                .liner
                .as_ref()
                .map(|x| {
                    located(src, &key("liner"), x, |s| {
                        if construction != Construction::Composite {
                            return Err(
                                "only a composite cylinder has a liner; accepted: a liner with construction = \"composite\"".to_string(),
                            );
                        }
                        parse_liner(s)
                    })
                })
                .transpose()?,
            empty_mass: c
                .empty_mass
                .as_ref()
                .map(|x| located(src, &key("empty_mass"), x, positive(units::parse_mass)))
                .transpose()?,
            supply_temperature: c
                .supply_temperature
                .as_ref()
                .map(|x| temp("supply_temperature", x))
                .transpose()?
                .unwrap_or(self.ambient_temperature),
            fill_rate: c
                .fill_rate
                .as_ref()
                .map(|x| {
                    located(src, &key("fill_rate"), x, |s| {
                        let r = units::parse_pressure_rate(s)?;
                        crate::limits::ramp(r)?;
                        Ok(r)
                    })
                })
                .transpose()?,
            residual_pressure: c
                .residual_pressure
                .as_ref()
                .map(|x| self.pressure(&key("residual_pressure"), x))
                .transpose()?
                .unwrap_or(self.ambient),
        })
    }
}

/// A vessel's volume or a cylinder's water capacity, in the range the command line accepts.
fn parse_vessel_volume(s: &str) -> Result<Volume, String> {
    let v = units::parse_volume(s)?;
    crate::limits::volume(v)?;
    Ok(v)
}

/// Longest description or location accepted, in characters: a line or two on the worksheet.
const MAX_TEXT: usize = 200;

/// A description or location, printed on the worksheet: refused where empty, unprintable or
/// longer than [`MAX_TEXT`].
fn text(t: &str) -> Result<String, String> {
    crate::record::check_text(t, MAX_TEXT)?;
    Ok(t.to_string())
}

/// Wraps a quantity parser so that zero and negative values are refused.
fn positive<Q, F>(parse: F) -> impl Fn(&str) -> Result<Q, String>
where
    F: Fn(&str) -> Result<Q, String>,
    Q: PartialOrd + Default,
{
    move |s| {
        let q = parse(s)?;
        if q > Q::default() {
            Ok(q)
        } else {
            Err("must be above zero; accepted: a positive quantity".to_string())
        }
    }
}

fn parse_material(s: &str) -> Result<Material, String> {
    match s.to_lowercase().as_str() {
        "carbon-steel" => Ok(Material::CarbonSteel),
        "stainless-steel" => Ok(Material::StainlessSteel),
        "aluminium" | "aluminum" => Ok(Material::Aluminium),
        "composite" => Ok(Material::Composite),
        _ => Err(
            "unknown material; accepted: carbon-steel, stainless-steel, aluminium, composite"
                .to_string(),
        ),
    }
}

fn parse_liner(s: &str) -> Result<Liner, String> {
    match s.to_lowercase().as_str() {
        "aluminium" | "aluminum" => Ok(Liner::Aluminium),
        "plastic" => Ok(Liner::Plastic),
        _ => Err("unknown liner; accepted: aluminium, plastic".to_string()),
    }
}

fn parse_governing(s: &str) -> Result<Governing, String> {
    match s.trim() {
        "model" => Ok(Governing::Model),
        "bound" => Ok(Governing::Bound),
        _ => Err("unknown value; accepted: model, bound".to_string()),
    }
}

fn parse_construction(s: &str) -> Result<Construction, String> {
    match s.to_lowercase().as_str() {
        "steel" => Ok(Construction::Steel),
        "aluminium" | "aluminum" => Ok(Construction::Aluminium),
        "composite" => Ok(Construction::Composite),
        _ => Err("unknown construction; accepted: steel, aluminium, composite".to_string()),
    }
}

/// Parses a fixed UTC offset: `UTC`, `Z`, `+01:00`, `UTC-05:00`, `+0530`.
pub fn parse_offset(s: &str) -> Result<FixedOffset, String> {
    const ACCEPTED: &str = "accepted: a UTC offset such as 'UTC', '+01:00', 'UTC-05:00'";
    let t = s.trim();
    let t = t
        .strip_prefix("UTC")
        .or_else(|| t.strip_prefix("utc"))
        .unwrap_or(t);
    if t.is_empty() || t == "Z" {
        return Ok(chrono::Offset::fix(&chrono::Utc));
    }
    if !t.is_ascii() {
        return Err(format!("'{s}' is not a UTC offset; {ACCEPTED}"));
    }
    let (sign, rest) = match t.as_bytes()[0] {
        b'+' => (1, &t[1..]),
        b'-' => (-1, &t[1..]),
        _ => return Err(format!("'{s}' is not a UTC offset; {ACCEPTED}")),
    };
    let digits: String = rest.chars().filter(|c| *c != ':').collect();
    let (h, m) = match digits.len() {
        1 | 2 => (digits.parse::<i32>().ok(), Some(0)),
        4 => (
            digits[..2].parse::<i32>().ok(),
            digits[2..].parse::<i32>().ok(),
        ),
        _ => (None, None),
    };
    match (h, m) {
        (Some(h), Some(m)) if h <= 14 && m < 60 => {
            FixedOffset::east_opt(sign * (h * 3600 + m * 60))
                .ok_or_else(|| format!("'{s}' is out of range; {ACCEPTED}"))
        }
        _ => Err(format!("'{s}' is not a UTC offset; {ACCEPTED}")),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn offsets() {
        assert_eq!(parse_offset("UTC").unwrap().local_minus_utc(), 0);
        assert_eq!(parse_offset("+01:00").unwrap().local_minus_utc(), 3600);
        assert_eq!(parse_offset("UTC-05:30").unwrap().local_minus_utc(), -19800);
        assert!(parse_offset("Europe/Paris").is_err());
    }
}
