//! Fuzz targets: what must hold for any input to the quantity parser and the site-file
//! reader. Each panics on a broken property. `fuzz/` runs them under cargo-fuzz, and
//! `tests/fuzz.rs` runs them as a deterministic randomised harness from the committed corpus
//! in `fuzz/corpus/`.

use crate::record;
use crate::site::{self, Equipment};
use crate::source::Source;
use crate::units;

/// The quantity parsers on any text: no panic; a value is finite (and a temperature above
/// absolute zero); a refusal says what is accepted.
pub fn quantity(data: &[u8]) {
    let text = String::from_utf8_lossy(data);
    let text = text.as_ref();
    fn refused(what: &str, text: &str, e: &str) {
        assert!(
            e.contains("accepted"),
            "{what} '{text}': refusal without what is accepted: {e}"
        );
    }
    macro_rules! finite {
        ($what:literal, $parse:expr, $($get:tt)*) => {
            match $parse(text) {
                Ok(q) => {
                    let v: f64 = ($($get)*)(q);
                    assert!(v.is_finite(), "{} '{text}' gave {v}", $what);
                }
                Err(e) => refused($what, text, &e),
            }
        };
    }
    use uom::si::{
        available_energy::joule_per_kilogram, energy::joule, length::meter, mass::kilogram,
        pressure::pascal, thermodynamic_temperature::kelvin, time::second, volume::cubic_meter,
    };
    finite!(
        "pressure",
        units::parse_pressure,
        |r: units::PressureReading| match r {
            units::PressureReading::Gauge(p) | units::PressureReading::Absolute(p) =>
                p.get::<pascal>(),
        }
    );
    finite!(
        "overpressure",
        units::parse_overpressure,
        |p: uom::si::f64::Pressure| p.get::<pascal>()
    );
    finite!("volume", units::parse_volume, |q: uom::si::f64::Volume| {
        q.get::<cubic_meter>()
    });
    finite!("length", units::parse_length, |q: uom::si::f64::Length| {
        q.get::<meter>()
    });
    finite!("energy", units::parse_energy, |q: uom::si::f64::Energy| {
        q.get::<joule>()
    });
    finite!(
        "energy per mass",
        units::parse_specific_energy,
        |q: uom::si::f64::AvailableEnergy| q.get::<joule_per_kilogram>()
    );
    finite!("mass", units::parse_mass, |q: uom::si::f64::Mass| q
        .get::<kilogram>());
    finite!("time", units::parse_time, |q: uom::si::f64::Time| q
        .get::<second>());
    finite!("rate", units::parse_rate, |r: units::RateReading| match r {
        units::RateReading::Pressure(p) => p.per_second.get::<pascal>(),
        units::RateReading::Mass(m) => m.get::<uom::si::mass_rate::kilogram_per_second>(),
    });
    finite!("coefficient", units::parse_heat_coefficient, |h: f64| h);
    match units::parse_temperature(text) {
        Ok(t) => {
            let k = t.get::<kelvin>();
            assert!(k.is_finite() && k > 0.0, "temperature '{text}' gave {k} K");
        }
        Err(e) => refused("temperature", text, &e),
    }
}

/// The site-file reader on any text: no panic; a refusal is located in the file and names
/// a problem; a site it accepts has finite, positive quantities and names that make file
/// names within the limits.
pub fn site_file(data: &[u8]) {
    let src = Source {
        path: "fuzz.toml".into(),
        text: String::from_utf8_lossy(data).into_owned(),
    };
    let lines = src.text.matches('\n').count() + 1;
    match site::from_source(src) {
        Err(e) => {
            assert!(!e.problem.trim().is_empty(), "an empty refusal: {e:?}");
            assert!(e.line <= lines, "line {} of {lines}: {e}", e.line);
        }
        Ok(site) => {
            assert!(record::check_name(&site.name).is_ok(), "{:?}", site.name);
            let ambient = site.ambient.get::<uom::si::pressure::pascal>();
            assert!(ambient.is_finite() && ambient > 0.0, "ambient {ambient}");
            for item in &site.equipment {
                assert!(record::check_name(item.tag()).is_ok(), "{:?}", item.tag());
                let stem = record::stem(
                    &site.name,
                    item.tag(),
                    "pre-maintenance",
                    None,
                    "2026-01-01",
                );
                assert!(
                    stem.len() + 5 <= 255,
                    "a file name of {} bytes",
                    stem.len() + 5
                );
                let json = match item {
                    Equipment::Vessel(v) => crate::report::to_json(v),
                    Equipment::Cylinder(c) => crate::report::to_json(c),
                };
                assert!(json.is_ok(), "{}: {json:?}", item.tag());
            }
        }
    }
}
