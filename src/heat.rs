//! Heat transfer between a vessel's gas, its wall and the surroundings: wall materials, wall
//! estimates, geometry and the convection correlations the transient models use.

use serde::{Deserialize, Serialize};

/// Wall materials, with the names used everywhere (site files, command line).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Deserialize, Serialize, clap::ValueEnum)]
#[serde(rename_all = "kebab-case")]
pub enum Material {
    /// Carbon steel.
    CarbonSteel,
    /// Austenitic stainless steel.
    StainlessSteel,
    /// Aluminium alloy.
    #[value(alias = "aluminum")]
    Aluminium,
    /// Fibre-reinforced composite.
    Composite,
    /// A composite cylinder's plastic liner; not offered as a vessel's shell.
    #[value(skip)]
    Plastic,
}

/// A composite cylinder's liner.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Deserialize, Serialize, clap::ValueEnum)]
#[serde(rename_all = "kebab-case")]
pub enum Liner {
    /// Aluminium alloy: a metal-lined composite cylinder.
    #[value(alias = "aluminum")]
    Aluminium,
    /// Plastic (polyethylene or polyamide): a plastic-lined composite cylinder.
    Plastic,
}

impl Liner {
    /// The liner's wall material.
    pub fn material(self) -> Material {
        match self {
            Liner::Aluminium => Material::Aluminium,
            Liner::Plastic => Material::Plastic,
        }
    }
}

/// Cylinder construction.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Deserialize, Serialize, clap::ValueEnum)]
#[serde(rename_all = "kebab-case")]
pub enum Construction {
    /// Seamless steel (carbon steel).
    Steel,
    /// Seamless aluminium alloy.
    #[value(alias = "aluminum")]
    Aluminium,
    /// Composite-wrapped, with a metal or plastic liner.
    Composite,
}

/// Standard gravity, m/s².
const G: f64 = 9.806_65;

/// Mass of a composite wall per 2·p·V (gauge pressure times volume), kg/(Pa·m³): common
/// practice, no source; it puts a 6.8 L, 300 bar cylinder at about 4 kg.
const COMPOSITE_MASS_PER_PV: f64 = 1.0e-5;

/// The share of a composite cylinder's estimated mass in its aluminium liner (common
/// practice, no source); the wrap is the rest.
const ALUMINIUM_LINER_SHARE: f64 = 1.0 / 3.0;

impl Material {
    /// Specific heat capacity near room temperature, J/(kg·K).
    ///
    /// source: Incropera & DeWitt, Fundamentals of Heat and Mass Transfer, table A.1 at
    /// 300 K: plain carbon steel 434, AISI 304 477, aluminium alloy 2024-T6 875; carbon-fibre
    /// epoxy composite about 1000 (from memory, manufacturers' data sheets 800–1200); a
    /// plastic liner 1800, the low end of high-density polyethylene's 1800–2300 (from
    /// memory).
    pub fn specific_heat(self) -> f64 {
        match self {
            Material::CarbonSteel => 434.0,
            Material::StainlessSteel => 477.0,
            Material::Aluminium => 875.0,
            Material::Composite => 1000.0,
            Material::Plastic => 1800.0,
        }
    }

    /// Density, kg/m³: with the mass it gives the wall's thickness.
    ///
    /// source: Incropera & DeWitt, table A.1 (7854, 7900, 2770); carbon-fibre epoxy about
    /// 1550 (from memory, laminates 1500–1600); high-density polyethylene 950 (from memory).
    pub fn density(self) -> f64 {
        match self {
            Material::CarbonSteel => 7854.0,
            Material::StainlessSteel => 7900.0,
            Material::Aluminium => 2770.0,
            Material::Composite => 1550.0,
            Material::Plastic => 950.0,
        }
    }

    /// Thermal conductivity through the wall, W/(m·K): the resistance of half the wall
    /// lies between a node and each of its faces.
    ///
    /// source: Incropera & DeWitt, table A.1 at 300 K (60.5, 14.9, 177); carbon-fibre epoxy
    /// across the fibres 0.5, the low end of published laminates' 0.5–0.8 (from memory), so
    /// that a wrap takes up heat no faster than a real one (conservative for a fill); a
    /// plastic liner 0.35, between polyamide's 0.25 and high-density polyethylene's
    /// 0.4–0.5 (from memory).
    pub fn conductivity(self) -> f64 {
        match self {
            Material::CarbonSteel => 60.5,
            Material::StainlessSteel => 14.9,
            Material::Aluminium => 177.0,
            Material::Composite => 0.5,
            Material::Plastic => 0.35,
        }
    }

    /// Whether heat crosses the material so slowly that a layer of it is cut into slices
    /// through its thickness (the composites and plastics, below 1 W/(m·K)); a metal wall
    /// is one temperature through its thickness.
    pub fn insulating(self) -> bool {
        self.conductivity() < 1.0
    }

    /// Estimated shell mass of a vessel, kg, from its volume (m³) and design pressure (Pa
    /// gauge): the membrane-stress mass 2·p·V·ρ/S with the allowable stress S of a typical
    /// plate (carbon steel SA-516-70 138 MPa, stainless 304 138 MPa, aluminium 5083 60 MPa,
    /// composite 1.0e-5 kg/(Pa·m³) as for cylinders), plus a minimum thickness for
    /// low-pressure vessels of 6 mm over the inner area. Common practice, no source; real
    /// vessels are heavier (nozzles, supports, corrosion allowance), so the estimate errs
    /// towards a colder wall.
    pub fn estimated_vessel_wall_mass(self, volume_m3: f64, design_gauge_pa: f64) -> f64 {
        let (density, stress) = match self {
            Material::CarbonSteel => (7850.0, 138.0e6),
            Material::StainlessSteel => (8000.0, 138.0e6),
            Material::Aluminium => (2700.0, 60.0e6),
            Material::Composite | Material::Plastic => {
                return 2.0 * design_gauge_pa.max(0.0) * volume_m3 * COMPOSITE_MASS_PER_PV
            }
        };
        let membrane = 2.0 * design_gauge_pa.max(0.0) * volume_m3 * density / stress;
        let (_, area) = geometry(volume_m3, VESSEL_ASPECT);
        membrane.max(area * 0.006 * density)
    }

    /// The name used on the command line and in files.
    pub fn name(self) -> &'static str {
        match self {
            Material::CarbonSteel => "carbon-steel",
            Material::StainlessSteel => "stainless-steel",
            Material::Aluminium => "aluminium",
            Material::Composite => "composite",
            Material::Plastic => "plastic",
        }
    }
}

impl Construction {
    /// The material of the wall's inner layer: the metal of a steel or aluminium cylinder,
    /// the liner of a composite one (its wrap is a second layer, see
    /// [`Construction::estimated_wrap_mass`]).
    pub fn inner_material(self, liner: Liner) -> Material {
        match self {
            Construction::Steel => Material::CarbonSteel,
            Construction::Aluminium => Material::Aluminium,
            Construction::Composite => liner.material(),
        }
    }

    /// Estimated mass of the wall's inner layer, kg, from the liner (a composite's; metal
    /// cylinders ignore it), the water capacity (m³) and the service pressure (Pa gauge): m = 2·p·V·ρ/σ, the membrane-stress mass of a long
    /// cylinder with an effective allowable stress σ per construction (steel 7850 kg/m³ at
    /// 300 MPa, aluminium 2700 kg/m³ at 90 MPa, an aluminium liner as a third of a 1.0e-5
    /// kg/(Pa·m³) cylinder), and a plastic liner 5 mm thick over the inner area. Common
    /// practice, no source: it reproduces typical catalogue masses of 50 L steel, 11 L
    /// aluminium and 7 L composite cylinders within about 20 %.
    pub fn estimated_wall_mass(
        self,
        liner: Liner,
        water_capacity_m3: f64,
        service_gauge_pa: f64,
    ) -> f64 {
        let pv = 2.0 * service_gauge_pa.max(0.0) * water_capacity_m3;
        match (self, liner) {
            (Construction::Steel, _) => pv * 7850.0 / 300.0e6,
            (Construction::Aluminium, _) => pv * 2700.0 / 90.0e6,
            (Construction::Composite, Liner::Aluminium) => {
                pv * COMPOSITE_MASS_PER_PV * ALUMINIUM_LINER_SHARE
            }
            (Construction::Composite, Liner::Plastic) => {
                let (_, area) = geometry(water_capacity_m3, CYLINDER_ASPECT);
                area * 0.005 * Material::Plastic.density()
            }
        }
    }

    /// Estimated mass of a composite cylinder's wrap, kg: the other two thirds of the
    /// 1.0e-5 kg/(Pa·m³) cylinder of [`Construction::estimated_wall_mass`] (common practice,
    /// no source). `None` for metal cylinders, which have no wrap.
    pub fn estimated_wrap_mass(self, water_capacity_m3: f64, service_gauge_pa: f64) -> Option<f64> {
        let pv = 2.0 * service_gauge_pa.max(0.0) * water_capacity_m3;
        (self == Construction::Composite)
            .then_some(pv * COMPOSITE_MASS_PER_PV * (1.0 - ALUMINIUM_LINER_SHARE))
    }
}

/// The vessel's inner surface, as a cylinder with hemispherical-ish ends of length `ratio`
/// diameters: returns (inner diameter, inner area), both SI.
pub fn geometry(volume_m3: f64, length_over_diameter: f64) -> (f64, f64) {
    // V = π D² L / 4 with L = r·D; A = π D L + π D² / 2 (flat ends, a close upper bound).
    let d = (4.0 * volume_m3 / (std::f64::consts::PI * length_over_diameter)).cbrt();
    let area = std::f64::consts::PI * d * d * (length_over_diameter + 0.5);
    (d, area)
}

/// Length over diameter assumed for gas cylinders and for vessels (common practice, no
/// source: cylinders are long and slim, receivers squatter).
pub const CYLINDER_ASPECT: f64 = 4.0;
/// See [`CYLINDER_ASPECT`].
pub const VESSEL_ASPECT: f64 = 3.0;

/// Outside coefficient to still air, W/(m²·K).
///
/// source: Woodfield, Monde & Takano (2008), J. Thermal Sci. Tech. 3(2): 241, who fitted
/// 4.5 W/(m²·K) to cylinders cooling in a laboratory (from memory).
pub const OUTSIDE_COEFFICIENT: f64 = 4.5;

/// How the inner coefficient was found, for the record.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum InnerBasis {
    /// No heat transfer asked for.
    None,
    /// A coefficient the user gave.
    Given,
    /// Jet-driven forced plus natural convection, with the inlet bore given.
    JetCorrelation,
    /// Jet-driven forced plus natural convection, with the inlet bore taken as
    /// [`DEFAULT_INLET_BORE`] (none given).
    JetCorrelationAssumedInlet,
    /// Natural convection in the enclosure (vent).
    NaturalConvection,
}

/// The inlet bore the jet correlation takes when none is given, m.
///
/// Cylinder valves and fill connections pass gas through bores of about 2–8 mm (common
/// practice, no source). The forced term falls as the bore widens (Re_d = 4ṁ/(π·d·μ)), so
/// the widest end of that range gives the lowest coefficient and the hottest fill.
pub const DEFAULT_INLET_BORE: f64 = 8.0e-3;

/// The relative scatter taken on a correlation's coefficient for the conservative edge of a
/// result: the edge runs with the coefficient scaled by 1 ∓ this.
///
/// Convection correlations of this kind carry errors of up to about 25 % (Incropera &
/// DeWitt, Fundamentals of Heat and Mass Transfer, ch. 7–9, from memory); the fill
/// correlation was fitted to hydrogen tanks alone, so the edge takes a wider 30 % (a
/// conservative choice, no source).
pub const CORRELATION_SCATTER: f64 = 0.3;

/// The inner coefficient measured while filling, W/(m²·K): the cap on the jet correlation.
///
/// source: Woodfield, Monde & Takano (2008): about 500 W/(m²·K) during the fill of 39–205 L
/// hydrogen tanks at 35 and 70 MPa (from memory).
pub const FILL_CONSTANT: f64 = 500.0;

/// Gas properties a correlation needs at the film.
#[derive(Debug, Clone, Copy)]
pub struct Film {
    /// Density, kg/m³.
    pub density: f64,
    /// Viscosity, Pa·s.
    pub viscosity: f64,
    /// Thermal conductivity, W/(m·K).
    pub conductivity: f64,
    /// Isobaric heat capacity, J/(kg·K).
    pub cp: f64,
    /// Gas temperature, K (the film's expansion coefficient is taken as 1/T).
    pub temperature: f64,
}

/// Natural convection inside a closed vessel: Nu_D = 0.104·Ra_D^0.352 on the diameter.
///
/// source: Woodfield, Monde & Takano (2008), the natural-convection term of their fill
/// correlation, fitted for Ra up to about 1e13 (from memory).
pub fn natural(film: &Film, delta_t: f64, diameter: f64) -> f64 {
    let nu = film.viscosity / film.density;
    let alpha = film.conductivity / (film.density * film.cp);
    let ra = G * delta_t.abs() / film.temperature * diameter.powi(3) / (nu * alpha);
    0.104 * ra.powf(0.352) * film.conductivity / diameter
}

/// Forced convection by the inlet jet during a fill, plus natural convection:
/// Nu_D = 0.56·Re_d^0.67 + 0.104·Ra_D^0.352, Re_d on the inlet diameter d.
///
/// source: Woodfield, Monde & Takano (2008) (from memory).
///
/// Capped at [`FILL_CONSTANT`], the coefficient measured in fills: at the fast ramps a search
/// for the highest safe rate tries, the correlation would be extrapolated far beyond the
/// fills it was fitted on and promise more cooling than a fill gets. The cap can only make a
/// fill run hotter, never cooler (a conservative choice, no source).
pub fn jet(film: &Film, mass_flow: f64, inlet_diameter: f64, delta_t: f64, diameter: f64) -> f64 {
    let re = 4.0 * mass_flow.abs() / (std::f64::consts::PI * inlet_diameter * film.viscosity);
    let h = 0.56 * re.powf(0.67) * film.conductivity / diameter + natural(film, delta_t, diameter);
    h.min(FILL_CONSTANT.max(natural(film, delta_t, diameter)))
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    #[test]
    fn the_jet_coefficient_never_exceeds_the_fill_constant() {
        let film = Film {
            density: 200.0,
            viscosity: 2.0e-5,
            conductivity: 0.03,
            cp: 1100.0,
            temperature: 330.0,
        };
        // A slow fill through a wide inlet: below the cap; a very fast one: at the cap.
        assert!(jet(&film, 1e-4, 0.01, 30.0, 0.2) < FILL_CONSTANT);
        assert_eq!(jet(&film, 2.0, 0.004, 30.0, 0.2), FILL_CONSTANT);
    }

    /// Properties at 300 K and 1 atm: Incropera & DeWitt, Fundamentals of Heat and Mass
    /// Transfer, table A.4 (from memory): air μ 184.6e-7 Pa·s, k 0.0263 W/(m·K), cp 1007
    /// J/(kg·K); hydrogen μ 89.6e-7, k 0.183, cp 14 310; densities from the ideal gas.
    fn film_at_300_k(gas: &str) -> Film {
        let (density, viscosity, conductivity, cp) = match gas {
            "air" => (1.177, 184.6e-7, 0.0263, 1007.0),
            _ => (0.0819, 89.6e-7, 0.183, 14_310.0),
        };
        Film {
            density,
            viscosity,
            conductivity,
            cp,
            temperature: 300.0,
        }
    }

    #[test]
    fn the_jet_coefficient_follows_the_gas_and_the_flow() {
        let (air, hydrogen) = (film_at_300_k("air"), film_at_300_k("hydrogen"));
        // The same 1 g/s through the default bore into a 0.13 m cylinder, 20 K warmer
        // than its wall: hydrogen, seven times as conductive and half as viscous, takes
        // up heat several times faster than air.
        let h = |f: &Film, flow: f64| jet(f, flow, DEFAULT_INLET_BORE, 20.0, 0.13);
        assert!(h(&hydrogen, 1e-3) > 4.0 * h(&air, 1e-3));
        // A slower fill drives a weaker jet; with no flow, natural convection is left.
        assert!(h(&air, 1e-4) < h(&air, 1e-3));
        assert_relative_eq!(
            h(&air, 0.0),
            natural(&air, 20.0, 0.13),
            max_relative = 1e-12
        );
        // A wider bore slows the jet: the default, the widest usual bore, cools least.
        assert!(jet(&air, 1e-3, 2e-3, 20.0, 0.13) > h(&air, 1e-3));
    }

    #[test]
    fn geometry_encloses_the_volume() {
        let (d, a) = geometry(0.05, 4.0);
        assert_relative_eq!(
            std::f64::consts::PI * d * d / 4.0 * 4.0 * d,
            0.05,
            max_relative = 1e-12
        );
        assert!(
            a > 4.84 * 0.05f64.powf(2.0 / 3.0),
            "more than a sphere's area"
        );
    }

    #[test]
    fn wall_estimates_land_near_catalogue_masses() {
        // Typical catalogue masses (common practice, from memory): 50 L steel at 200 bar
        // about 55 kg, 11.1 L aluminium at 207 bar about 14 kg.
        let steel = Construction::Steel.estimated_wall_mass(Liner::Aluminium, 0.05, 200e5);
        assert!((steel / 55.0 - 1.0).abs() < 0.2, "{steel}");
        let al = Construction::Aluminium.estimated_wall_mass(Liner::Aluminium, 0.0111, 207e5);
        assert!((al / 14.0 - 1.0).abs() < 0.2, "{al}");
    }
}
