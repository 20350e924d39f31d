//! Fill and vent as time histories with heat exchanged between the gas, a lumped wall and
//! the surroundings. The adiabatic fill and the isentropic vent are the bounds; these give
//! what the gas and the metal actually reach.
//!
//! States integrated (SI): gas mass m, gas internal energy U, wall temperature T_w, and two
//! running totals for the energy audit — enthalpy carried in or out, and heat to ambient.
//! The gas state comes from the gas model at (ρ = m/V, u = U/m), so any model serves.

use serde::Serialize;
use uom::si::f64::{
    AvailableEnergy, Length, Mass, MassDensity, MassRate, Pressure, ThermodynamicTemperature, Time,
    Volume,
};
use uom::si::{
    available_energy::joule_per_kilogram, length::meter, mass::kilogram,
    mass_density::kilogram_per_cubic_meter, mass_flux::kilogram_per_square_meter_second,
    mass_rate::kilogram_per_second, pressure::pascal, thermodynamic_temperature::kelvin,
    time::second, volume::cubic_meter,
};

use super::fill::FillInput;
use super::gas_error;
use super::vent::VentInput;
use crate::caution::{Assessed, Caution, Level, Note, Part};
use crate::gas::{GasModel, State};
use crate::heat::{self, Film, InnerBasis};
use crate::site::{Construction, Liner, Material};
use crate::solve::ode::{self, Options};
use crate::units::PressureRate;
use crate::units::Value;
use crate::InputError;

/// Whether heat passes between the gas and the wall.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, clap::ValueEnum)]
#[serde(rename_all = "lowercase")]
pub enum HeatTransfer {
    /// No heat exchanged: the adiabatic fill and the isentropic vent.
    None,
    /// Lumped gas and wall nodes with convection inside and out.
    Lumped,
}

impl HeatTransfer {
    /// The method, in words, for the output.
    pub fn method(self) -> &'static str {
        match self {
            HeatTransfer::None => "first law, no heat to the wall, adaptive integration",
            HeatTransfer::Lumped => "lumped gas and wall, first law, adaptive integration",
        }
    }
}

/// The wall that exchanges heat with the gas: one node, or for a composite cylinder a
/// liner node and the wrap over it.
///
/// Each node is lumped at its mid-thickness, the thickness taken from its mass, density and
/// the inner area; half of each node's conduction resistance lies between it and each of its
/// faces. For metals that resistance is small beside the convection; insulating layers
/// (the carbon-fibre wrap at 0.5 W/(m·K), a plastic liner) conduct so slowly that they are
/// cut into slices through their thickness (see `Nodes`).
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Wall {
    /// The inner node's mass (a composite cylinder's liner).
    #[serde(rename = "mass_kg")]
    pub mass: Mass,
    /// The inner node's material.
    pub material: Material,
    /// Whether the mass was estimated (no wall mass given).
    pub estimated: bool,
    /// A composite cylinder's wrap, the outer node.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub wrap: Option<Wrap>,
}

/// The carbon-fibre wrap of a composite cylinder, of [`Material::Composite`].
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Wrap {
    /// Its mass.
    #[serde(rename = "mass_kg")]
    pub mass: Mass,
    /// Whether the mass was estimated (no wrap mass given).
    pub estimated: bool,
    /// Whether the liner was not named and is taken as aluminium.
    pub liner_assumed: bool,
    /// Whether liner and wrap were split from the cylinder's empty mass.
    pub split_from_empty: bool,
}

/// What is known of a cylinder's wall mass.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum CylinderMass {
    /// The layers' masses (a composite's liner, then its wrap), each estimated when not
    /// given.
    Layers(Option<Mass>, Option<Mass>),
    /// The empty cylinder's mass without its valve (the tare weight stamped on it): a
    /// composite's is split between liner and wrap in the proportions of their estimates.
    Empty(Mass),
}

impl Wall {
    /// A cylinder's wall from what is known of its mass, with estimates from the
    /// construction (and a composite's liner, aluminium unless named), the water capacity
    /// and the service gauge pressure where needed; a composite's liner and wrap apart.
    pub fn cylinder(
        (construction, liner): (Construction, Option<Liner>),
        water_capacity: Volume,
        service_gauge: Pressure,
        known: CylinderMass,
    ) -> Wall {
        let (v, p) = (
            water_capacity.get::<cubic_meter>(),
            service_gauge.get::<pascal>(),
        );
        let lining = liner.unwrap_or(Liner::Aluminium);
        let estimate = (
            construction.estimated_wall_mass(lining, v, p),
            construction.estimated_wrap_mass(v, p),
        );
        let (wall_mass, wrap_mass, split) = match known {
            CylinderMass::Layers(wall, wrap) => (wall, wrap, false),
            CylinderMass::Empty(total) => {
                let liner_share = match estimate {
                    (l, Some(w)) if l + w > 0.0 => l / (l + w),
                    _ => 1.0,
                };
                (
                    Some(total * liner_share),
                    Some(total * (1.0 - liner_share)),
                    true,
                )
            }
        };
        let kg = Mass::new::<kilogram>;
        Wall {
            mass: wall_mass.unwrap_or_else(|| kg(estimate.0)),
            material: construction.inner_material(lining),
            estimated: wall_mass.is_none(),
            wrap: estimate.1.map(|m| Wrap {
                mass: wrap_mass.unwrap_or_else(|| kg(m)),
                estimated: wrap_mass.is_none(),
                liner_assumed: liner.is_none(),
                split_from_empty: split,
            }),
        }
    }

    /// A vessel's shell, one node: the given mass, or an estimate from the material, the
    /// volume and the design gauge pressure.
    pub fn vessel(
        material: Material,
        volume: Volume,
        design_gauge: Pressure,
        mass: Option<Mass>,
    ) -> Wall {
        Wall {
            mass: mass.unwrap_or_else(|| {
                Mass::new::<kilogram>(material.estimated_vessel_wall_mass(
                    volume.get::<cubic_meter>(),
                    design_gauge.get::<pascal>(),
                ))
            }),
            material,
            estimated: mass.is_none(),
            wrap: None,
        }
    }

    /// Whether any part of the wall's mass was estimated.
    pub fn any_estimated(&self) -> bool {
        self.estimated || self.wrap.is_some_and(|w| w.estimated)
    }
}

/// How the fill is driven.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum FillRate {
    /// A steady pressure rise.
    Ramp(PressureRate),
    /// A steady mass flow.
    MassFlow(MassRate),
}

/// Heat-transfer settings shared by fill and vent.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Exchange {
    /// Lumped or none.
    pub mode: HeatTransfer,
    /// The wall node.
    pub wall: Wall,
    /// An inner coefficient to use instead of the correlations, W/(m²·K).
    pub inner_coefficient: Option<f64>,
    /// Ambient temperature outside the wall.
    pub ambient_temperature: ThermodynamicTemperature,
    /// Length over diameter of the vessel, for its inner area and diameter.
    pub aspect: f64,
}

/// One moment of a transient.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Sample {
    /// Time from the start.
    #[serde(rename = "time_s")]
    pub time: Time,
    /// Absolute pressure.
    #[serde(rename = "pressure_pa")]
    pub pressure: Pressure,
    /// Gas temperature.
    #[serde(rename = "gas_temperature_k")]
    pub gas_temperature: ThermodynamicTemperature,
    /// Wall temperature at its inner face (a composite cylinder's liner).
    #[serde(rename = "wall_temperature_k")]
    pub wall_temperature: ThermodynamicTemperature,
    /// A composite cylinder's wrap temperature next to the liner (its innermost slice).
    #[serde(rename = "wrap_temperature_k", skip_serializing_if = "Option::is_none")]
    pub wrap_temperature: Option<ThermodynamicTemperature>,
}

/// A transient run's outcome.
#[derive(Debug, Clone, PartialEq)]
pub struct Run {
    /// The time series, every accepted step.
    pub samples: Vec<Sample>,
    /// The gas state at the end.
    pub end: State,
    /// Energy not accounted for, relative to the energy moved (the audit).
    pub energy_residual: f64,
    /// How the inner coefficient was found.
    pub basis: InnerBasis,
}

impl Run {
    /// The highest gas temperature.
    pub fn peak_gas(&self) -> ThermodynamicTemperature {
        fold(&self.samples, |s| s.gas_temperature, f64::max)
    }
    /// The highest wall temperature.
    pub fn peak_wall(&self) -> ThermodynamicTemperature {
        fold(&self.samples, |s| s.wall_temperature, f64::max)
    }
    /// The lowest gas temperature.
    pub fn min_gas(&self) -> ThermodynamicTemperature {
        fold(&self.samples, |s| s.gas_temperature, f64::min)
    }
    /// The lowest wall temperature.
    pub fn min_wall(&self) -> ThermodynamicTemperature {
        fold(&self.samples, |s| s.wall_temperature, f64::min)
    }
    /// The highest wrap temperature, for a composite cylinder.
    pub fn peak_wrap(&self) -> Option<ThermodynamicTemperature> {
        self.samples.first()?.wrap_temperature?;
        Some(fold(
            &self.samples,
            |s| s.wrap_temperature.unwrap_or(s.wall_temperature),
            f64::max,
        ))
    }
    /// The run's duration.
    pub fn duration(&self) -> Time {
        self.samples
            .last()
            .map_or(Time::new::<second>(0.0), |s| s.time)
    }
}

fn fold(
    samples: &[Sample],
    get: impl Fn(&Sample) -> ThermodynamicTemperature,
    pick: fn(f64, f64) -> f64,
) -> ThermodynamicTemperature {
    let first = samples.first().map_or(0.0, |s| get(s).get::<kelvin>());
    ThermodynamicTemperature::new::<kelvin>(
        samples
            .iter()
            .map(|s| get(s).get::<kelvin>())
            .fold(first, pick),
    )
}

/// The fixed numbers of a run, in SI.
struct Setup<'a> {
    model: &'a dyn GasModel,
    volume: f64,
    diameter: f64,
    area: f64,
    /// How insulating wall layers are sliced (see [`SLICE_GRID`]).
    grid: (f64, f64),
    ambient: f64,
    exchange: &'a Exchange,
    /// Relative tolerance per step of the integration.
    rtol: f64,
    /// The gas temperature last found, where the next state search starts.
    last_temperature: std::cell::Cell<ThermodynamicTemperature>,
    /// The last state found, by its mass and internal energy.
    last_state: std::cell::Cell<Option<((f64, f64), State)>>,
}

/// The integration's relative tolerance per step: results change by less than 1e-6 when it
/// is tightened a hundredfold (see the tests).
const RTOL: f64 = 1e-7;

/// Where the wall's temperature nodes sit in the integrated state: the innermost node, and
/// any further ones after the two audit totals.
const INNER: usize = 2;
const FURTHER: usize = 5;

/// An insulating layer thinner than this, m, is lumped with its neighbour: ρ·c·t²/(2k) is
/// then about a second, and a node of its own would only make the integration stiff.
const MIN_SLICED_THICKNESS: f64 = 1e-3;

/// How an insulating layer is cut into slices: the innermost this fraction of the depth
/// heat reaches over the run, √(α·duration), and each one outwards this many times
/// thicker. The slices are finest where the heat goes, and no finer than the run needs: a
/// thinner slice only shortens the integrator's steps. The tests hold the peak gas
/// temperature within 0.1 K of a grid twice as fine; a coarser grid errs hot.
const SLICE_GRID: (f64, f64) = (0.1, 1.08);

/// Bounds on the innermost slice, m.
const SLICE_BOUNDS: (f64, f64) = (2e-5, 3e-3);

/// The wall's nodes in SI, a chain from the gas outwards: heat capacities (J/K) and
/// conduction resistances (K/W).
///
/// A metal layer is one node. An insulating one (a composite wrap, a plastic liner) is cut
/// through its thickness into slices, each lumped at its mid-thickness: conduction through
/// a few millimetres of it takes minutes, as long as a fill, so one lumped node would put
/// all its heat capacity behind half its thickness.
struct Nodes {
    /// Heat capacities, innermost first.
    capacities: Vec<f64>,
    /// From the inner face to the first node.
    r_inner: f64,
    /// From each node to the next.
    r_links: Vec<f64>,
    /// From the last node to the outer face.
    r_outer: f64,
    /// The composite wrap's innermost node, whose temperature is reported.
    wrap_first: Option<usize>,
}

/// One layer's nodes over a run of `duration` s: (heat capacity, resistance from its
/// mid-thickness to either face).
fn layer(
    mass: f64,
    material: Material,
    area: f64,
    duration: f64,
    (fraction, growth): (f64, f64),
) -> Vec<(f64, f64)> {
    let thickness = mass / (material.density() * area);
    if thickness.is_nan() || thickness <= 0.0 {
        // No wall at all (an estimate at zero gauge pressure): no capacity, no resistance.
        return vec![(0.0, 0.0)];
    }
    let diffusivity = material.conductivity() / (material.density() * material.specific_heat());
    let first = (fraction * (diffusivity * duration).sqrt()).clamp(SLICE_BOUNDS.0, SLICE_BOUNDS.1);
    let node = |width: f64| {
        (
            mass * width / thickness * material.specific_heat(),
            width / 2.0 / (material.conductivity() * area),
        )
    };
    // A metal layer, and an insulating one too thin to slice, is one node.
    if !material.insulating() || thickness <= first.max(MIN_SLICED_THICKNESS) {
        return vec![node(thickness)];
    }
    // The fewest slices, growing geometrically, whose innermost is at most `first`.
    let innermost = |n: i32| thickness * (growth - 1.0) / (growth.powi(n) - 1.0);
    let n = (2..64).find(|&n| innermost(n) <= first).unwrap_or(64);
    (0..n)
        .map(|i| node(innermost(n) * growth.powi(i)))
        .collect()
}

impl Nodes {
    /// The nodes of `wall` over a run of `duration` s, insulating layers cut by `grid`
    /// (see [`SLICE_GRID`]).
    fn new(wall: &Wall, area: f64, duration: f64, grid: (f64, f64)) -> Nodes {
        // (capacity, resistance from the node to its inner face, and to its outer face).
        let nodes_of = |mass: f64, material: Material| -> Vec<(f64, f64, f64)> {
            layer(mass, material, area, duration, grid)
                .into_iter()
                .map(|(c, r)| (c, r, r))
                .collect()
        };
        let thin = |mass: f64, material: Material| {
            material.insulating() && mass / (material.density() * area) < MIN_SLICED_THICKNESS
        };
        let (m, material) = (wall.mass.get::<kilogram>(), wall.material);
        let mut nodes = nodes_of(m, material);
        let mut wrap_first = None;
        if let Some(w) = wall.wrap {
            let mw = w.mass.get::<kilogram>();
            let wrap = nodes_of(mw, Material::Composite);
            // A too-thin insulating layer (one node, see `layer`) is lumped with its
            // neighbour: the capacities add, its whole resistance stays on its side.
            if thin(mw, Material::Composite) {
                let last = nodes.len() - 1;
                nodes[last].0 += wrap[0].0;
                nodes[last].2 += 2.0 * wrap[0].1;
                wrap_first = Some(last);
            } else if thin(m, material) {
                let liner = nodes[0];
                nodes = wrap;
                nodes[0].0 += liner.0;
                nodes[0].1 += 2.0 * liner.1;
                wrap_first = Some(0);
            } else {
                wrap_first = Some(nodes.len());
                nodes.extend(wrap);
            }
        }
        Nodes {
            capacities: nodes.iter().map(|n| n.0).collect(),
            r_inner: nodes[0].1,
            r_links: nodes.windows(2).map(|p| p[0].2 + p[1].1).collect(),
            r_outer: nodes[nodes.len() - 1].2,
            wrap_first,
        }
    }

    /// Where node `i` sits in the integrated state.
    fn index(i: usize) -> usize {
        if i == 0 {
            INNER
        } else {
            FURTHER + i - 1
        }
    }

    /// The heat stored in the wall between two integrated states, J.
    fn stored(&self, first: &[f64], last: &[f64]) -> f64 {
        self.capacities
            .iter()
            .enumerate()
            .map(|(i, c)| c * (last[Nodes::index(i)] - first[Nodes::index(i)]))
            .sum()
    }
}

/// The wall's heat flows at one moment.
struct Flows {
    /// From the gas into the wall, W.
    into_wall: f64,
    /// From the wall to the surroundings, W.
    to_ambient: f64,
    /// Rates of change of the nodes' temperatures, K/s, innermost first.
    rates: Vec<f64>,
    /// Temperature of the wall's inner face, K.
    face: f64,
}

impl<'a> Setup<'a> {
    fn new(model: &'a dyn GasModel, volume: Volume, exchange: &'a Exchange) -> Setup<'a> {
        let v = volume.get::<cubic_meter>();
        let (diameter, area) = heat::geometry(v, exchange.aspect);
        Setup {
            model,
            volume: v,
            diameter,
            area,
            grid: SLICE_GRID,
            ambient: exchange.ambient_temperature.get::<kelvin>(),
            exchange,
            rtol: RTOL,
            last_temperature: std::cell::Cell::new(exchange.ambient_temperature),
            last_state: std::cell::Cell::new(None),
        }
    }

    /// The gas state from its mass and internal energy, the search started from the last
    /// state found (the integrator asks for neighbouring states in turn).
    fn gas(&self, m: f64, u_total: f64) -> Option<State> {
        // The step's end state is asked for again by the stopping test: answer from memory.
        if let Some((key, st)) = self.last_state.get() {
            if key == (m, u_total) {
                return Some(st);
            }
        }
        let st = self
            .model
            .state_rho_u_near(
                MassDensity::new::<kilogram_per_cubic_meter>(m / self.volume),
                AvailableEnergy::new::<joule_per_kilogram>(u_total / m),
                self.last_temperature.get(),
            )
            .ok()?;
        self.last_temperature.set(st.temperature);
        self.last_state.set(Some(((m, u_total), st)));
        Some(st)
    }

    fn film(&self, st: &State) -> Film {
        let (viscosity, conductivity) = self.model.gas().transport(st.temperature, st.density);
        let t = st.temperature.get::<kelvin>();
        let cp = self.model.isobaric_heat_capacity(st).map_or(1000.0, |c| {
            c.get::<uom::si::specific_heat_capacity::joule_per_kilogram_kelvin>()
        });
        Film {
            density: st.density.get::<kilogram_per_cubic_meter>(),
            viscosity,
            conductivity,
            cp,
            temperature: t,
        }
    }

    /// (inner coefficient W/(m²·K), outer coefficient, basis) for the gas at `st`.
    fn coefficients(
        &self,
        st: &State,
        wall_t: f64,
        fill_flow: Option<(f64, f64)>,
    ) -> (f64, f64, InnerBasis) {
        if self.exchange.mode == HeatTransfer::None {
            return (0.0, 0.0, InnerBasis::None);
        }
        let h_out = heat::OUTSIDE_COEFFICIENT;
        if let Some(h) = self.exchange.inner_coefficient {
            return (h, h_out, InnerBasis::Given);
        }
        let dt = st.temperature.get::<kelvin>() - wall_t;
        match fill_flow {
            Some((flow, inlet)) if inlet > 0.0 => (
                heat::jet(&self.film(st), flow, inlet, dt, self.diameter),
                h_out,
                InnerBasis::JetCorrelation,
            ),
            Some(_) => (heat::FILL_CONSTANT, h_out, InnerBasis::FillConstant),
            None => (
                heat::natural(&self.film(st), dt, self.diameter),
                h_out,
                InnerBasis::NaturalConvection,
            ),
        }
    }

    /// The wall's heat flows with the gas at `t_gas` and the coefficients inside and out.
    fn wall_flows(
        &self,
        n: &Nodes,
        (h_inner, h_outer): (f64, f64),
        t_gas: f64,
        y: &[f64],
    ) -> Flows {
        // A convective film in series with half a layer: the conductance between them.
        let series = |h: f64, r: f64| {
            let ha = h * self.area;
            ha / (1.0 + ha * r)
        };
        let t: Vec<f64> = (0..n.capacities.len())
            .map(|i| y[Nodes::index(i)])
            .collect();
        let into_wall = series(h_inner, n.r_inner) * (t_gas - t[0]);
        let to_ambient = series(h_outer, n.r_outer) * (t[t.len() - 1] - self.ambient);
        // Heat into each node from inside, then the heat leaving the last to ambient.
        let inflow: Vec<f64> = std::iter::once(into_wall)
            .chain(t.windows(2).zip(&n.r_links).map(|(p, r)| (p[0] - p[1]) / r))
            .chain(std::iter::once(to_ambient))
            .collect();
        let rates = n
            .capacities
            .iter()
            .zip(inflow.windows(2))
            .map(|(&c, q)| if c > 0.0 { (q[0] - q[1]) / c } else { 0.0 })
            .collect();
        Flows {
            into_wall,
            to_ambient,
            rates,
            face: t[0] + into_wall * n.r_inner,
        }
    }

    /// The integrated state's derivatives for a gas gaining `flow` (kg/s, negative when
    /// venting) of enthalpy `h` (J/kg), with the wall's flows: (derivatives, inner face).
    fn derivatives(&self, flow: f64, h: f64, f: &Flows) -> (Vec<f64>, f64) {
        let mut d = vec![
            flow,
            flow * h - f.into_wall,
            f.rates[0],
            flow * h,
            f.to_ambient,
        ];
        d.extend(&f.rates[1..]);
        (d, f.face)
    }

    /// The starting state: gas mass and internal energy, the wall at `wall_t0` throughout,
    /// the audit totals at zero.
    fn start(&self, n: &Nodes, m0: f64, u0: f64, wall_t0: f64) -> (Vec<f64>, Vec<f64>) {
        let energy = u0.abs().max(1.0);
        let mut y0 = vec![m0, u0, wall_t0, 0.0, 0.0];
        let mut scale = vec![m0.max(1e-6), energy, wall_t0, energy, energy];
        for _ in 1..n.capacities.len() {
            y0.push(wall_t0);
            scale.push(wall_t0);
        }
        (y0, scale)
    }

    fn sample(&self, n: &Nodes, t: f64, y: &[f64], face: f64) -> Option<Sample> {
        let st = self.gas(y[0], y[1])?;
        Some(Sample {
            time: Time::new::<second>(t),
            pressure: st.pressure,
            gas_temperature: st.temperature,
            wall_temperature: ThermodynamicTemperature::new::<kelvin>(face),
            wrap_temperature: n
                .wrap_first
                .map(|i| ThermodynamicTemperature::new::<kelvin>(y[Nodes::index(i)])),
        })
    }

    /// The run from its trajectory; `face` gives the wall's inner-face temperature of a
    /// state.
    fn finish(
        &self,
        n: &Nodes,
        run: ode::Trajectory,
        basis: InnerBasis,
        face: impl Fn(&[f64]) -> Option<f64>,
    ) -> Result<Run, InputError> {
        let samples = run
            .t
            .iter()
            .zip(&run.y)
            .map(|(&t, y)| self.sample(n, t, y, face(y)?))
            .collect::<Option<Vec<_>>>()
            .ok_or_else(|| model_failure("the transient left the gas model's range"))?;
        let (first, last) = (&run.y[0], &run.y[run.y.len() - 1]);
        let end = self
            .gas(last[0], last[1])
            .ok_or_else(|| model_failure("the final state is outside the gas model's range"))?;
        // Energy audit: ΔU_gas + ΔU_wall = enthalpy in (or −out) − heat to ambient.
        let stored = (last[1] - first[1]) + n.stored(first, last);
        let moved = last[3] - last[4];
        let scale = last[3].abs().max(last[4].abs()).max(stored.abs()).max(1e-9);
        Ok(Run {
            samples,
            end,
            energy_residual: (stored - moved).abs() / scale,
            basis,
        })
    }
}

fn model_failure(what: &str) -> InputError {
    InputError::new(
        "heat-transfer",
        "lumped",
        format!("{what}; accepted: inputs that keep the gas within the model's range"),
    )
}

fn options(duration: f64, rtol: f64) -> Options {
    Options {
        rtol,
        atol: rtol,
        max_step: duration / 10.0,
        max_steps: 200_000,
    }
}

/// The fill from `initial` to `to` with enthalpy `h_in` arriving at `rate`, in SI.
#[allow(clippy::too_many_arguments)]
fn fill_run(
    setup: &Setup,
    initial: &State,
    wall_t0: f64,
    h_in: f64,
    to: f64,
    rate: FillRate,
    inlet: f64,
) -> Result<Run, InputError> {
    let m0 = initial.density.get::<kilogram_per_cubic_meter>() * setup.volume;
    let u0 = setup
        .model
        .internal_energy(initial)
        .get::<joule_per_kilogram>()
        * m0;
    let p0 = initial.pressure.get::<pascal>();
    let nominal = match rate {
        FillRate::Ramp(r) => (to - p0) / r.per_second.get::<pascal>(),
        FillRate::MassFlow(f) => {
            // Mass to reach `to` at the supply temperature's density, as a time scale.
            let full = setup
                .model
                .state_pt(Pressure::new::<pascal>(to), initial.temperature)
                .map(|s| s.density.get::<kilogram_per_cubic_meter>() * setup.volume)
                .unwrap_or(m0 * to / p0);
            (full - m0).max(0.0) / f.get::<kilogram_per_second>()
        }
    };
    let nodes = Nodes::new(&setup.exchange.wall, setup.area, nominal, setup.grid);
    let mut basis = InnerBasis::FillConstant;
    let flow_at = |y: &[f64], q: f64| -> Option<f64> {
        match rate {
            FillRate::MassFlow(f) => Some(f.get::<kilogram_per_second>()),
            FillRate::Ramp(r) => {
                // The inflow that keeps dp/dt on the ramp: from p(ρ, u),
                // dp/dt = p_ρ·ṁ/V + p_u·(ṁ·(h_in − u) − Q)/m.
                let (m, u) = (y[0], y[1] / y[0]);
                let (p_rho, p_u) = setup.model.pressure_partials(&setup.gas(m, y[1])?)?;
                let denom = p_rho / setup.volume + p_u * (h_in - u) / m;
                Some((r.per_second.get::<pascal>() + p_u * q / m) / denom)
            }
        }
    };
    let flows = |y: &[f64]| -> Option<(Vec<f64>, f64)> {
        let st = setup.gas(y[0], y[1])?;
        let tg = st.temperature.get::<kelvin>();
        // On a ramp the inflow depends on the heat to the wall, and the jet's coefficient on
        // the inflow: one fixed-point pass from the no-jet coefficient settles both.
        let (h_guess, h_out, _) = setup.coefficients(&st, y[INNER], Some((0.0, inlet)));
        let guess = setup.wall_flows(&nodes, (h_guess, h_out), tg, y);
        let flow_guess = flow_at(y, guess.into_wall)?;
        let (h_inner, h_out, _) = setup.coefficients(&st, y[INNER], Some((flow_guess, inlet)));
        let wall = setup.wall_flows(&nodes, (h_inner, h_out), tg, y);
        let flow = flow_at(y, wall.into_wall)?;
        Some(setup.derivatives(flow, h_in, &wall))
    };
    let rhs = |_: f64, y: &[f64]| flows(y).map(|(d, _)| d);
    if let Some(st) = setup.gas(m0, u0) {
        basis = setup.coefficients(&st, wall_t0, Some((1.0, inlet))).2;
    }
    let (y0, scale) = setup.start(&nodes, m0, u0, wall_t0);
    let event = |_: f64, y: &[f64]| {
        setup
            .gas(y[0], y[1])
            .map_or(-1.0, |s| to - s.pressure.get::<pascal>())
    };
    let run = ode::integrate(
        rhs,
        (0.0, &y0),
        3.0 * nominal.max(1e-3),
        event,
        &scale,
        &options(nominal.max(1e-3), setup.rtol),
    )
    .map_err(|e| model_failure(&e.to_string()))?;
    if !run.stopped_at_event {
        return Err(InputError::new(
            "rate",
            "(given)",
            "the fill does not reach --to within three times its nominal duration; accepted: a rate that fills the cylinder",
        ));
    }
    setup.finish(&nodes, run, basis, |y| flows(y).map(|(_, face)| face))
}

/// A fill with heat exchanged with the wall, and what it means for the cylinder.
#[derive(Debug, Clone, PartialEq)]
pub struct FillTransient {
    /// The run at the planned rate.
    pub run: Run,
    /// Pressure once the gas has cooled to ambient at constant mass.
    pub settled_pressure: Pressure,
    /// Stop pressure at the planned rate that settles at the target, if one is found.
    pub fill_to_pressure: Option<Pressure>,
    /// The highest pressure-ramp rate that keeps the gas at or below the rated temperature,
    /// if a rating was given.
    pub max_rate: Option<MaxRate>,
    /// The wall used.
    pub wall: Wall,
}

/// A fill to run: the cylinder's volume and starting state (the wall starts at the gas's
/// temperature), the supply gas, the stop pressure and the drive.
#[derive(Debug, Clone, Copy)]
pub struct FillCase<'a> {
    /// Internal volume.
    pub volume: Volume,
    /// The gas before the fill.
    pub initial: &'a State,
    /// The gas arriving.
    pub supply: &'a State,
    /// Absolute pressure at which the fill stops.
    pub to: Pressure,
    /// How the fill is driven.
    pub rate: FillRate,
    /// Inlet bore, for the jet correlation.
    pub inlet_diameter: Option<Length>,
}

/// One fill run: the time series alone, without the searches of [`fill`].
pub fn fill_once(
    model: &dyn GasModel,
    case: &FillCase,
    exchange: &Exchange,
) -> Result<Run, InputError> {
    let setup = Setup::new(model, case.volume, exchange);
    fill_run(
        &setup,
        case.initial,
        case.initial.temperature.get::<kelvin>(),
        model.enthalpy(case.supply).get::<joule_per_kilogram>(),
        case.to.get::<pascal>(),
        case.rate,
        case.inlet_diameter.map_or(0.0, |d| d.get::<meter>()),
    )
}

/// The fastest fill that keeps the gas within its rating.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum MaxRate {
    /// This pressure ramp brings the peak gas temperature to the rating.
    Ramp(PressureRate),
    /// Even the adiabatic bound stays within the rating: no rate is too fast.
    Unlimited,
    /// Even a fill over a day exceeds the rating (a supply hotter than the rating).
    NoneSafe,
    /// Even the fastest fill the inlet can pass (this mean ramp, inlet choked from the
    /// supply throughout) stays within the rating.
    InletLimited(PressureRate),
    /// The search failed: a fill it tried did not complete on the model (it left the gas
    /// model's range, or a very light wall, following the gas within milliseconds, ran a
    /// slow fill past the integrator's step budget).
    Unresolved,
}

/// The mean pressure ramp of the fastest fill an inlet of bore `d` can pass, Pa/s: the
/// choked flow from the supply (Cd = 1) throughout, an upper bound, since the flow falls once
/// the cylinder passes the critical pressure ratio. It keeps the search for the highest safe
/// rate among fills the connection can deliver, where the jet correlation is meaningful.
fn fastest_ramp(model: &dyn GasModel, case: &FillCase, d: Length) -> Option<f64> {
    let area = std::f64::consts::PI / 4.0 * d.get::<meter>().powi(2);
    let flow = model
        .nozzle(case.supply, case.initial.pressure)
        .mass_flux
        .get::<kilogram_per_square_meter_second>()
        * area;
    let full = model
        .state_pt(case.to, case.supply.temperature)
        .ok()?
        .density
        .get::<kilogram_per_cubic_meter>();
    let added = (full - case.initial.density.get::<kilogram_per_cubic_meter>())
        * case.volume.get::<cubic_meter>();
    let span = (case.to - case.initial.pressure).get::<pascal>();
    (flow > 0.0 && added > 0.0).then(|| span * flow / added)
}

/// The fill of `case` with heat exchanged as `exchange` says: the run, the settled and
/// fill-to pressures, and (given a rating) the highest safe pressure ramp.
pub fn fill(
    model: &dyn GasModel,
    case: &FillCase,
    rated: Option<ThermodynamicTemperature>,
    exchange: &Exchange,
) -> Result<Assessed<FillTransient>, InputError> {
    let FillCase {
        volume,
        initial,
        supply,
        to,
        rate,
        inlet_diameter,
    } = *case;
    let setup = Setup::new(model, volume, exchange);
    let h_in = model.enthalpy(supply).get::<joule_per_kilogram>();
    let inlet = inlet_diameter.map_or(0.0, |d| d.get::<meter>());
    let wall_t0 = initial.temperature.get::<kelvin>();
    let to_pa = to.get::<pascal>();
    let run = fill_run(&setup, initial, wall_t0, h_in, to_pa, rate, inlet)?;
    let settled = model
        .state_rho_t(run.end.density, exchange.ambient_temperature)
        .map_err(|e| model_failure(&e.to_string()))?
        .pressure;
    // Without heat transfer the peak does not depend on the rate: no rate to solve for.
    let max_rate = rated
        .filter(|_| exchange.mode == HeatTransfer::Lumped)
        .map(|rated| {
            let excess = |rate_pa_s: f64| {
                let r = FillRate::Ramp(PressureRate {
                    per_second: Pressure::new::<pascal>(rate_pa_s),
                });
                fill_run(&setup, initial, wall_t0, h_in, to_pa, r, inlet)
                    .map(|run| run.peak_gas().get::<kelvin>() - rated.get::<kelvin>())
                    .unwrap_or(f64::NAN)
            };
            // Between a fill over a day and one over a second, or, with the inlet's bore
            // known, the fastest fill it can pass: the peak rises with the rate.
            let span = to_pa - initial.pressure.get::<pascal>();
            let inlet_limit = inlet_diameter
                .and_then(|d| fastest_ramp(model, case, d))
                .filter(|r| *r < span);
            let (slow, fast) = (span / 86_400.0, inlet_limit.unwrap_or(span));
            let at_fast = excess(fast);
            if at_fast.is_nan() {
                return MaxRate::Unresolved;
            }
            if at_fast <= 0.0 {
                return match inlet_limit {
                    Some(r) => MaxRate::InletLimited(PressureRate {
                        per_second: Pressure::new::<pascal>(r),
                    }),
                    None => MaxRate::Unlimited,
                };
            }
            // A run that fails is no answer: never read it as "no rate is safe".
            match excess(slow) {
                e if e.is_nan() => MaxRate::Unresolved,
                e if e > 0.0 => MaxRate::NoneSafe,
                _ => crate::solve::root(|ln_r| excess(ln_r.exp()), slow.ln(), fast.ln(), 1e-7)
                    .map_or(MaxRate::Unresolved, |ln_r| {
                        MaxRate::Ramp(PressureRate {
                            per_second: Pressure::new::<pascal>(ln_r.exp()),
                        })
                    }),
            }
        });
    // The stop pressure whose mass, cooled to ambient, settles at the target.
    let target_density = model
        .state_pt(to, exchange.ambient_temperature)
        .map_err(|e| model_failure(&e.to_string()))?
        .density
        .get::<kilogram_per_cubic_meter>();
    let gap = |p_stop: f64| {
        fill_run(&setup, initial, wall_t0, h_in, p_stop, rate, inlet)
            .map(|r| r.end.density.get::<kilogram_per_cubic_meter>() / target_density - 1.0)
            .unwrap_or(f64::NAN)
    };
    let fill_to_pressure = crate::solve::root(gap, to_pa * 0.8, to_pa * 1.6, to_pa * 1e-9)
        .ok()
        .map(Pressure::new::<pascal>);
    let result = FillTransient {
        run,
        settled_pressure: settled,
        fill_to_pressure,
        max_rate,
        wall: exchange.wall,
    };
    let (cautions, basis) = fill_cautions(&result, exchange);
    Ok(Assessed {
        value: result,
        cautions,
        basis,
    })
}

/// A depressuring check in the spirit of API 521: reach a pressure within a time.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Depressuring {
    /// The pressure to reach, absolute: the lower of a fraction of the design gauge
    /// pressure and a cap (50 % and 690 kPa(g) by default).
    #[serde(rename = "target_pressure_pa")]
    pub target: Pressure,
    /// The time allowed (15 min by default).
    #[serde(rename = "limit_s")]
    pub limit: Time,
}

/// The fill a [`FillInput`] describes, at `rate`, with heat exchanged as `exchange` says.
pub fn fill_from(
    model: &dyn GasModel,
    input: &FillInput,
    rate: FillRate,
    inlet_diameter: Option<Length>,
    exchange: &Exchange,
) -> Result<Assessed<FillTransient>, InputError> {
    let initial = model
        .state_pt(input.from, input.initial_temperature)
        .map_err(gas_error("from"))?;
    let supply = model
        .state_pt(
            input.supply_pressure.unwrap_or(input.to),
            input.supply_temperature,
        )
        .map_err(gas_error("supply-temperature"))?;
    let case = FillCase {
        volume: input.volume,
        initial: &initial,
        supply: &supply,
        to: input.to,
        rate,
        inlet_diameter,
    };
    fill(model, &case, input.rated_temperature, exchange)
}

/// The vent a [`VentInput`] describes (its orifice is required), with heat exchanged as
/// `exchange` says and an optional depressuring check.
pub fn vent_from(
    model: &dyn GasModel,
    input: &VentInput,
    check: Option<Depressuring>,
    exchange: &Exchange,
) -> Result<Assessed<VentTransient>, InputError> {
    let Some(orifice) = input.orifice else {
        return Err(InputError::new(
            "orifice",
            "(none)",
            "the vent with wall heat transfer and the depressuring check need the orifice diameter; accepted: give --orifice (with or without --within)",
        ));
    };
    let start = model
        .state_pt(input.pressure, input.temperature)
        .map_err(gas_error("pressure"))?;
    let area = input.cd * std::f64::consts::PI / 4.0 * orifice.get::<meter>().powi(2);
    vent(
        model,
        input.volume,
        &start,
        area,
        input.ambient,
        input.down_to,
        check,
        exchange,
    )
}

/// A vent with heat from the wall.
#[derive(Debug, Clone, PartialEq)]
pub struct VentTransient {
    /// The run to the target.
    pub run: Run,
    /// Time to reach the depressuring check's pressure, if asked and reached.
    pub depressuring_time: Option<Time>,
    /// The wall used.
    pub wall: Wall,
}

/// The vent of `volume` from `start` (wall at its temperature) through an effective area
/// Cd·A to `ambient`, until `down_to`; `check` is the depressuring check's pressure.
#[allow(clippy::too_many_arguments)]
pub fn vent(
    model: &dyn GasModel,
    volume: Volume,
    start: &State,
    effective_area_m2: f64,
    ambient: Pressure,
    down_to: Pressure,
    check: Option<Depressuring>,
    exchange: &Exchange,
) -> Result<Assessed<VentTransient>, InputError> {
    let setup = Setup::new(model, volume, exchange);
    let m0 = start.density.get::<kilogram_per_cubic_meter>() * setup.volume;
    let u0 = model.internal_energy(start).get::<joule_per_kilogram>() * m0;
    let wall_t0 = start.temperature.get::<kelvin>();
    // Time scale: the isothermal choked time constant V/(Cd·A·√(R·T)) times a few.
    let flux0 = model
        .nozzle(start, ambient)
        .mass_flux
        .get::<kilogram_per_square_meter_second>();
    let tau = m0 / (flux0 * effective_area_m2).max(1e-30);
    let horizon = 50.0 * tau.max(1e-3);
    let nodes = Nodes::new(&exchange.wall, setup.area, tau.max(1e-3), setup.grid);
    let flows = |y: &[f64]| -> Option<(Vec<f64>, f64)> {
        let st = setup.gas(y[0], y[1])?;
        let flow = model
            .nozzle(&st, ambient)
            .mass_flux
            .get::<kilogram_per_square_meter_second>()
            * effective_area_m2;
        let h = model.enthalpy(&st).get::<joule_per_kilogram>();
        let (h_i, h_o, _) = setup.coefficients(&st, y[INNER], None);
        let wall = setup.wall_flows(&nodes, (h_i, h_o), st.temperature.get::<kelvin>(), y);
        Some(setup.derivatives(-flow, h, &wall))
    };
    let rhs = |_: f64, y: &[f64]| flows(y).map(|(d, _)| d);
    let basis = setup.coefficients(start, wall_t0, None).2;
    let (y0, scale) = setup.start(&nodes, m0, u0, wall_t0);
    let setup = &setup;
    let until = |p_end: f64| {
        move |_: f64, y: &[f64]| {
            setup
                .gas(y[0], y[1])
                .map_or(-1.0, |s| s.pressure.get::<pascal>() - p_end)
        }
    };
    let opts = options(tau.max(1e-3), setup.rtol);
    let run = ode::integrate(
        rhs,
        (0.0, &y0),
        horizon,
        until(down_to.get::<pascal>()),
        &scale,
        &opts,
    )
    .map_err(|e| model_failure(&e.to_string()))?;
    if !run.stopped_at_event {
        return Err(InputError::new(
            "down-to",
            "(given)",
            "the vent does not reach the target in a reasonable time; accepted: a target above ambient",
        ));
    }
    let depressuring_time = match check.map(|c| c.target) {
        Some(p) if p < start.pressure => ode::integrate(
            rhs,
            (0.0, &y0),
            horizon,
            until(p.get::<pascal>()),
            &scale,
            &opts,
        )
        .ok()
        .filter(|r| r.stopped_at_event)
        .and_then(|r| r.t.last().copied())
        .map(Time::new::<second>),
        Some(_) => Some(Time::new::<second>(0.0)),
        None => None,
    };
    let result = VentTransient {
        run: setup.finish(&nodes, run, basis, |y| flows(y).map(|(_, face)| face))?,
        depressuring_time,
        wall: exchange.wall,
    };
    Ok(Assessed {
        value: result,
        cautions: Vec::new(),
        basis: model_basis(basis, exchange),
    })
}

/// Where the inner coefficient came from, and the wall, in words for the basis.
fn model_basis(basis: InnerBasis, exchange: &Exchange) -> Vec<Note> {
    if exchange.mode == HeatTransfer::None {
        return vec![Note::new(
            "heat transfer",
            "None: the gas exchanges no heat with the wall (the adiabatic bound).",
        )];
    }
    let inner = match basis {
        InnerBasis::Given => "a coefficient given by the user",
        InnerBasis::None => "no heat transfer",
        InnerBasis::JetCorrelation => "the inlet jet and natural convection, Nu = 0.56·Re_d^0.67 + 0.104·Ra^0.352 (Woodfield, Monde & Takano 2008), capped at the 500 W/(m²·K) measured in fills so that it is not extrapolated to faster ones (a conservative choice, no source)",
        InnerBasis::FillConstant => "500 W/(m²·K) while filling, as measured in fill experiments (Woodfield, Monde & Takano 2008); give --inlet-diameter for the jet correlation",
        InnerBasis::NaturalConvection => "natural convection in the vessel, Nu = 0.104·Ra^0.352 (Woodfield, Monde & Takano 2008)",
    };
    let wall = &exchange.wall;
    let mut parts = vec![
        Part::from("Lumped gas and wall ("),
        Part::from(Value::Mass(wall.mass)),
        Part::from(format!(" of {}", wall.material.name())),
    ];
    if let Some(wrap) = wall.wrap {
        parts.push(Part::from(" liner, and a "));
        parts.push(Part::from(Value::Mass(wrap.mass)));
        parts.push(Part::from(format!(
            " carbon-fibre wrap conducting {} W/(m·K)",
            Material::Composite.conductivity()
        )));
    }
    if wall.material.insulating() || wall.wrap.is_some() {
        parts.push(Part::from(
            "; insulating layers are cut into slices through their thickness, the innermost a tenth of the depth heat reaches over the run",
        ));
    }
    parts.push(Part::from(format!(
        "); inside, {inner}; outside, 4.5 W/(m²·K) to still air. Integrated with an adaptive Dormand–Prince 5(4) scheme; results hold to 1e-6 when the tolerance is tightened."
    )));
    let mut out = vec![Note {
        topic: "heat transfer",
        parts,
    }];
    if wall.any_estimated() {
        out.push(Note::new(
            "wall mass",
            "The wall mass was not given and is estimated from the volume, pressure rating and material by a membrane-stress rule (common practice, no source). Give the real mass from the nameplate or data sheet for a better result.",
        ));
    }
    if let Some(w) = wall.wrap.filter(|w| w.split_from_empty) {
        out.push(crate::note!(
            "wall mass",
            "The cylinder's empty mass is split between liner (",
            Value::Mass(wall.mass),
            ") and wrap (",
            Value::Mass(w.mass),
            ") in the proportions of their estimates (common practice, no source). A valve counted in the empty mass makes the wall heavier than it is, which errs towards a cooler gas.",
        ));
    }
    if wall.wrap.is_some_and(|w| w.liner_assumed) {
        out.push(Note::new(
            "liner",
            "The composite cylinder's liner was not given and is taken as aluminium (assumed). A plastic-lined cylinder keeps more of the heat in the gas and runs hotter than this: give --liner plastic (liner = \"plastic\" in a site file) for one, and check the label or data sheet.",
        ));
    }
    out
}

/// A fill's cautions (a highest rate not resolved) and basis. Its hazards (the peak against
/// the rating, the fill-to pressure) are the assessment's findings.
fn fill_cautions(r: &FillTransient, exchange: &Exchange) -> (Vec<Caution>, Vec<Note>) {
    let mut basis = model_basis(r.run.basis, exchange);
    let mut out = Vec::new();
    if let Some(MaxRate::InletLimited(rate)) = r.max_rate {
        basis.push(crate::note!(
            "highest rate",
            "Even the fastest fill the inlet bore can pass (choked from the supply, about ",
            Value::PressureRate(rate.per_second),
            " on average) keeps the gas within the rated temperature: the connection, not the heating, limits the rate.",
        ));
    }
    if r.max_rate == Some(MaxRate::Unresolved) {
        out.push(Caution::new(
            Level::Caution,
            "The highest fill rate within the rating is not resolved: a fill the search tried did not complete on the model. A very light wall (check the wall's mass as given, and its unit) follows the gas so closely that a slow fill exceeds the integration's step budget. Do not rely on a highest rate; the planned rate's result stands.",
        ));
    }
    (out, basis)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::gas::{Gas, IdealGas};
    use crate::rules::fill::{adiabatic_fill, FillInput};
    use crate::rules::vent::{blow_down, Process, VentInput};
    use approx::assert_relative_eq;

    fn kelvin_of(t: ThermodynamicTemperature) -> f64 {
        t.get::<kelvin>()
    }

    fn k(t: f64) -> ThermodynamicTemperature {
        ThermodynamicTemperature::new::<kelvin>(t)
    }

    fn pa(p: f64) -> Pressure {
        Pressure::new::<pascal>(p)
    }

    fn exchange(mode: HeatTransfer, wall_kg: f64, inner: Option<f64>) -> Exchange {
        Exchange {
            mode,
            wall: Wall {
                mass: Mass::new::<kilogram>(wall_kg),
                material: Material::CarbonSteel,
                estimated: false,
                wrap: None,
            },
            inner_coefficient: inner,
            ambient_temperature: k(293.15),
            aspect: heat::CYLINDER_ASPECT,
        }
    }

    fn air() -> IdealGas {
        IdealGas::new(Gas::find("air").unwrap())
    }

    fn ramp(bar_per_min: f64) -> FillRate {
        FillRate::Ramp(PressureRate {
            per_second: pa(bar_per_min * 1e5 / 60.0),
        })
    }

    /// Air at 20 bar(a) in the cylinder and the 300 bar(a) supply, both at 20 °C, and the
    /// supply's enthalpy, J/kg.
    fn air_fill_states() -> (State, State, f64) {
        let model = air();
        let initial = model.state_pt(pa(20e5), k(293.15)).unwrap();
        let supply = model.state_pt(pa(300e5), k(293.15)).unwrap();
        let h_in = model.enthalpy(&supply).get::<joule_per_kilogram>();
        (initial, supply, h_in)
    }

    /// 50 L of air from 20 to 300 bar(a) at 20 °C, supply at 20 °C.
    fn cylinder_fill(rate: FillRate, ex: &Exchange) -> FillTransient {
        let model = air();
        let (initial, supply, _) = air_fill_states();
        let case = FillCase {
            volume: Volume::new::<cubic_meter>(0.05),
            initial: &initial,
            supply: &supply,
            to: pa(300e5),
            rate,
            inlet_diameter: None,
        };
        fill(&model, &case, Some(k(338.15)), ex).unwrap().value
    }

    #[test]
    fn without_heat_transfer_the_fill_is_the_adiabatic_closed_form() {
        let r = cylinder_fill(ramp(25.0), &exchange(HeatTransfer::None, 60.0, None));
        let closed = adiabatic_fill(
            &air(),
            &FillInput {
                volume: Volume::new::<cubic_meter>(0.05),
                from: pa(20e5),
                to: pa(300e5),
                initial_temperature: k(293.15),
                supply_temperature: k(293.15),
                supply_pressure: None,
                ambient_temperature: k(293.15),
                rated_temperature: None,
            },
        )
        .unwrap()
        .value;
        assert_relative_eq!(
            kelvin_of(r.run.peak_gas()),
            kelvin_of(closed.final_temperature),
            max_relative = 1e-6
        );
        assert_relative_eq!(
            r.run.end.pressure.get::<pascal>(),
            300e5,
            max_relative = 1e-9
        );
        // 280 bar at 25 bar/min: 672 s.
        assert_relative_eq!(r.run.duration().get::<second>(), 672.0, max_relative = 1e-6);
    }

    #[test]
    fn energy_is_conserved_over_a_fill_and_a_vent() {
        let r = cylinder_fill(ramp(25.0), &exchange(HeatTransfer::Lumped, 60.0, None));
        assert!(r.run.energy_residual < 1e-6, "{}", r.run.energy_residual);
        let v = receiver_vent(&exchange(HeatTransfer::Lumped, 500.0, None), 0.01);
        assert!(v.run.energy_residual < 1e-6, "{}", v.run.energy_residual);
    }

    #[test]
    fn results_do_not_depend_on_the_step_size() {
        let model = air();
        let ex = exchange(HeatTransfer::Lumped, 60.0, None);
        let v = Volume::new::<cubic_meter>(0.05);
        let (initial, _, h_in) = air_fill_states();
        let peak = |rtol: f64| {
            let mut setup = Setup::new(&model, v, &ex);
            setup.rtol = rtol;
            kelvin_of(
                fill_run(&setup, &initial, 293.15, h_in, 300e5, ramp(25.0), 0.0)
                    .unwrap()
                    .peak_gas(),
            )
        };
        assert_relative_eq!(peak(1e-7), peak(1e-11), max_relative = 1e-6);
    }

    #[test]
    fn the_wall_lowers_the_peak_and_a_slower_or_heavier_fill_lowers_it_more() {
        let peak = |bar_per_min: f64, mode: HeatTransfer, wall_kg: f64| {
            kelvin_of(
                cylinder_fill(ramp(bar_per_min), &exchange(mode, wall_kg, None))
                    .run
                    .peak_gas(),
            )
        };
        let adiabatic = peak(25.0, HeatTransfer::None, 60.0);
        let fast = peak(100.0, HeatTransfer::Lumped, 60.0);
        let planned = peak(25.0, HeatTransfer::Lumped, 60.0);
        let slow = peak(5.0, HeatTransfer::Lumped, 60.0);
        let heavy = peak(25.0, HeatTransfer::Lumped, 200.0);
        assert!(
            adiabatic > fast && fast > planned && planned > slow,
            "{adiabatic} {fast} {planned} {slow}"
        );
        assert!(heavy < planned, "{heavy} {planned}");
        assert!(slow > 293.15);
    }

    #[test]
    fn a_search_that_fails_on_the_model_is_unresolved_not_none_safe() {
        // A 10 g wall follows the gas within milliseconds: the planned fill completes, but
        // the day-long fill at the slow end of the search runs out of steps. That is no
        // answer, not "no rate is safe".
        let ex = exchange(HeatTransfer::Lumped, 0.01, None);
        let r = cylinder_fill(ramp(100.0), &ex);
        assert_eq!(r.max_rate, Some(MaxRate::Unresolved));
        let (cautions, _) = fill_cautions(&r, &ex);
        assert!(cautions
            .iter()
            .any(|c| c.message().contains("not resolved")));
    }

    #[test]
    fn filling_at_the_maximum_rate_reaches_the_rating() {
        let ex = exchange(HeatTransfer::Lumped, 60.0, None);
        let r = cylinder_fill(ramp(25.0), &ex);
        let Some(MaxRate::Ramp(max)) = r.max_rate else {
            panic!("expected a finite maximum rate, got {:?}", r.max_rate);
        };
        let at_max = cylinder_fill(FillRate::Ramp(max), &ex);
        assert!((kelvin_of(at_max.run.peak_gas()) - 338.15).abs() < 1.0);
    }

    /// A 6.8 L composite cylinder rated for 300 bar: liner and wrap by the estimates, or
    /// the liner alone (`wrap` false).
    fn composite(wrap: bool) -> Exchange {
        lined(Liner::Aluminium, wrap)
    }

    /// The same cylinder with the given liner.
    fn lined(liner: Liner, wrap: bool) -> Exchange {
        let mut wall = Wall::cylinder(
            (Construction::Composite, Some(liner)),
            Volume::new::<cubic_meter>(0.0068),
            pa(300e5),
            CylinderMass::Layers(None, None),
        );
        if !wrap {
            wall.wrap = None;
        }
        Exchange {
            wall,
            ..exchange(HeatTransfer::Lumped, 1.0, None)
        }
    }

    fn composite_fill(ex: &Exchange) -> Run {
        let model = air();
        let (initial, supply, _) = air_fill_states();
        let case = FillCase {
            volume: Volume::new::<cubic_meter>(0.0068),
            initial: &initial,
            supply: &supply,
            to: pa(300e5),
            rate: ramp(100.0),
            inlet_diameter: None,
        };
        fill_once(&model, &case, ex).unwrap()
    }

    #[test]
    fn a_composite_wrap_is_a_second_node_behind_the_liner() {
        let two = composite_fill(&composite(true));
        let liner_only = composite_fill(&composite(false));
        assert!(two.energy_residual < 1e-6, "{}", two.energy_residual);
        // The wrap takes up some heat, so the gas peaks lower than with the liner alone, but
        // it lags the liner throughout the fill.
        let (peak, alone) = (kelvin_of(two.peak_gas()), kelvin_of(liner_only.peak_gas()));
        assert!(peak < alone && peak > 293.15, "{peak} {alone}");
        for s in &two.samples[1..] {
            let wrap = kelvin_of(s.wrap_temperature.unwrap());
            assert!(wrap < kelvin_of(s.wall_temperature) && wrap >= 293.15 - 1e-9);
        }
        assert!(liner_only
            .samples
            .iter()
            .all(|s| s.wrap_temperature.is_none()));
        assert!(two.peak_wrap().unwrap() < two.peak_wall());
    }

    #[test]
    fn a_vanishing_wrap_leaves_the_liner_alone() {
        let mut ex = composite(true);
        ex.wall.wrap = ex.wall.wrap.map(|w| Wrap {
            mass: Mass::new::<kilogram>(1e-6),
            ..w
        });
        // Lumped with the liner, it adds its tiny heat capacity there.
        let (thin, alone) = (composite_fill(&ex), composite_fill(&composite(false)));
        assert!(thin.peak_wrap().is_some());
        assert_relative_eq!(
            kelvin_of(thin.peak_gas()),
            kelvin_of(alone.peak_gas()),
            max_relative = 1e-6
        );
    }

    #[test]
    fn a_plastic_liner_runs_hotter_and_its_heat_is_accounted_for() {
        let plastic = composite_fill(&lined(Liner::Plastic, true));
        let metal = composite_fill(&composite(true));
        assert!(
            plastic.energy_residual < 1e-6,
            "{}",
            plastic.energy_residual
        );
        assert!(kelvin_of(plastic.peak_gas()) > kelvin_of(metal.peak_gas()) + 1.0);
        // The plastic holds the heat at the gas side: the wrap stays cooler behind it.
        assert!(plastic.peak_wrap().unwrap() < metal.peak_wrap().unwrap());
        // Whatever the layers, the inner face lies between the gas and the wrap.
        for s in &plastic.samples[1..] {
            let (g, w) = (kelvin_of(s.gas_temperature), kelvin_of(s.wall_temperature));
            assert!(g > w && w > kelvin_of(s.wrap_temperature.unwrap()));
        }
    }

    #[test]
    fn the_composite_fill_does_not_depend_on_the_step_size() {
        let model = air();
        let ex = composite(true);
        let v = Volume::new::<cubic_meter>(0.0068);
        let (initial, _, h_in) = air_fill_states();
        let peaks = |rtol: f64| {
            let mut setup = Setup::new(&model, v, &ex);
            setup.rtol = rtol;
            let run = fill_run(&setup, &initial, 293.15, h_in, 300e5, ramp(100.0), 0.0).unwrap();
            (
                kelvin_of(run.peak_gas()),
                kelvin_of(run.peak_wrap().unwrap()),
            )
        };
        let (coarse, fine) = (peaks(1e-7), peaks(1e-11));
        assert_relative_eq!(coarse.0, fine.0, max_relative = 1e-6);
        assert_relative_eq!(coarse.1, fine.1, max_relative = 1e-6);
    }

    #[test]
    fn the_wall_nodes_keep_every_layers_heat_capacity_and_resistance() {
        let area = 0.25;
        for liner in [Liner::Aluminium, Liner::Plastic] {
            for wrap_kg in [1e-4, 0.3, 2.7, 20.0] {
                for duration in [0.1, 10.0, 600.0, 86_400.0] {
                    let mut wall = lined(liner, true).wall;
                    wall.wrap = wall.wrap.map(|w| Wrap {
                        mass: Mass::new::<kilogram>(wrap_kg),
                        ..w
                    });
                    // A plastic liner under 1 mm is lumped with the wrap.
                    if liner == Liner::Plastic && wrap_kg > 1.0 {
                        wall.mass = Mass::new::<kilogram>(0.1);
                    }
                    let n = Nodes::new(&wall, area, duration, SLICE_GRID);
                    let (ml, l, c) = (
                        wall.mass.get::<kilogram>(),
                        wall.material,
                        Material::Composite,
                    );
                    let capacity = ml * l.specific_heat() + wrap_kg * c.specific_heat();
                    let resistance = (ml / (l.density() * area) / l.conductivity()
                        + wrap_kg / (c.density() * area) / c.conductivity())
                        / area;
                    let total_r = n.r_inner + n.r_links.iter().sum::<f64>() + n.r_outer;
                    let what = format!("{liner:?} {wrap_kg} kg {duration} s");
                    assert_relative_eq!(
                        n.capacities.iter().sum::<f64>(),
                        capacity,
                        max_relative = 1e-12
                    );
                    assert_relative_eq!(total_r, resistance, max_relative = 1e-12);
                    assert_eq!(n.r_links.len() + 1, n.capacities.len(), "{what}");
                    assert!(
                        n.wrap_first.is_some_and(|i| i < n.capacities.len()),
                        "{what}"
                    );
                }
            }
        }
    }

    #[test]
    fn a_finer_slice_grid_moves_the_peak_by_less_than_a_tenth_of_a_kelvin() {
        let model = air();
        let ex = composite(true);
        let v = Volume::new::<cubic_meter>(0.0068);
        let (initial, _, h_in) = air_fill_states();
        let plastic = lined(Liner::Plastic, true);
        let peak = |ex: &Exchange, grid: (f64, f64), bar_per_min: f64| {
            let mut setup = Setup::new(&model, v, ex);
            setup.grid = grid;
            let r = ramp(bar_per_min);
            kelvin_of(
                fill_run(&setup, &initial, 293.15, h_in, 300e5, r, 0.0)
                    .unwrap()
                    .peak_gas(),
            )
        };
        for bar_per_min in [20.0, 100.0, 500.0] {
            let (used, fine) = (
                peak(&ex, SLICE_GRID, bar_per_min),
                peak(&ex, (0.05, 1.04), bar_per_min),
            );
            assert!((used - fine).abs() < 0.1, "{bar_per_min}: {used} {fine}");
            let (used, fine) = (
                peak(&plastic, SLICE_GRID, bar_per_min),
                peak(&plastic, (0.05, 1.04), bar_per_min),
            );
            assert!(
                (used - fine).abs() < 0.1,
                "plastic {bar_per_min}: {used} {fine}"
            );
        }
    }

    /// 2 m³ of air at 10 barg vented through `d` (Cd 1) to 1.01 atm.
    fn receiver_vent(ex: &Exchange, d: f64) -> VentTransient {
        let model = air();
        let start = model.state_pt(pa(11.01325e5), k(293.15)).unwrap();
        let area = std::f64::consts::PI / 4.0 * d * d;
        vent(
            &model,
            Volume::new::<cubic_meter>(2.0),
            &start,
            area,
            pa(101_325.0),
            pa(1.01 * 101_325.0),
            Some(Depressuring {
                target: pa(5e5),
                limit: Time::new::<second>(900.0),
            }),
            ex,
        )
        .unwrap()
        .value
    }

    fn quasi_steady(process: Process, d: f64) -> (f64, f64) {
        let r = blow_down(
            &air(),
            &VentInput {
                volume: Volume::new::<cubic_meter>(2.0),
                pressure: pa(11.01325e5),
                temperature: k(293.15),
                ambient: pa(101_325.0),
                orifice: Some(Length::new::<meter>(d)),
                cd: 1.0,
                down_to: pa(1.01 * 101_325.0),
                process,
                min_metal_temperature: None,
                within: None,
            },
        )
        .unwrap()
        .value;
        (
            r.time.unwrap().get::<second>(),
            kelvin_of(r.end.temperature),
        )
    }

    #[test]
    fn without_heat_transfer_the_vent_is_isentropic() {
        let r = receiver_vent(&exchange(HeatTransfer::None, 500.0, None), 0.01);
        let (t, end) = quasi_steady(Process::Isentropic, 0.01);
        assert_relative_eq!(r.run.duration().get::<second>(), t, max_relative = 1e-6);
        assert_relative_eq!(kelvin_of(r.run.end.temperature), end, max_relative = 1e-6);
    }

    #[test]
    fn a_huge_coefficient_and_wall_make_the_vent_isothermal() {
        // A heavy wall of a good conductor. The wall's own conduction (half its thickness
        // over k) bounds what any inner coefficient can deliver: a lighter wall cools more,
        // a heavier, thicker one passes its heat more slowly; 3 t of aluminium keeps the gas
        // within 1 K of ambient.
        let mut ex = exchange(HeatTransfer::Lumped, 3.0e3, Some(1.0e5));
        ex.wall.material = Material::Aluminium;
        let r = receiver_vent(&ex, 0.01);
        let (t, _) = quasi_steady(Process::Isothermal, 0.01);
        assert_relative_eq!(r.run.duration().get::<second>(), t, max_relative = 2e-3);
        let min = kelvin_of(r.run.min_gas());
        assert!((min - 293.15).abs() < 1.0, "{min}");
    }

    #[test]
    fn the_coldest_gas_lies_between_the_isentropic_end_and_ambient() {
        let r = receiver_vent(&exchange(HeatTransfer::Lumped, 500.0, None), 0.01);
        let (_, isentropic_end) = quasi_steady(Process::Isentropic, 0.01);
        let min = kelvin_of(r.run.min_gas());
        assert!(
            min > isentropic_end && min < 293.15,
            "{isentropic_end} < {min} < 293.15"
        );
        assert!(kelvin_of(r.run.min_wall()) > min);
        let t = r.depressuring_time.unwrap().get::<second>();
        assert!(t > 0.0 && t < r.run.duration().get::<second>());
    }
}
