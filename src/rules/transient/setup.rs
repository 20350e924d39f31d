//! One run's fixed numbers and the integrated state's derivatives: gas state, wall flows,
//! start and finish.

use super::*;

/// The fixed numbers of a run, in SI.
pub(super) struct Setup<'a> {
    pub(super) model: &'a dyn GasModel,
    pub(super) volume: f64,
    pub(super) diameter: f64,
    pub(super) area: f64,
    /// How insulating wall layers are sliced (see [`SLICE_GRID`]).
    pub(super) grid: (f64, f64),
    pub(super) ambient: f64,
    pub(super) exchange: &'a Exchange,
    /// Relative tolerance per step of the integration.
    pub(super) rtol: f64,
    /// The factor on a correlation's inner coefficient: 1 for the central result, 1 ∓
    /// [`heat::CORRELATION_SCATTER`] for its conservative edges.
    pub(super) edge: f64,
    /// Whether wall nodes too light to matter are made massless, and nodes that settle with
    /// their neighbour far within the run lumped with it (see [`Setup::nodes`]); the tests
    /// compare with them stored apart.
    pub(super) massless: bool,
    /// The gas temperature last found, where the next state search starts.
    pub(super) last_temperature: std::cell::Cell<ThermodynamicTemperature>,
    /// The last state found, by its mass and internal energy.
    pub(super) last_state: std::cell::Cell<Option<((f64, f64), State)>>,
}

/// The integration's relative tolerance per step: results change by less than 1e-6 when it
/// is tightened a hundredfold (see the tests).
pub(super) const RTOL: f64 = 1e-7;

/// The wall's temperatures a sample reports, K: its inner face, and a composite's wrap next
/// to the liner.
pub(super) type Faces = (f64, Option<f64>);

/// The wall's heat flows at one moment.
pub(super) struct Flows {
    /// From the gas into the wall, W.
    pub(super) into_wall: f64,
    /// From the wall to the surroundings, W.
    pub(super) to_ambient: f64,
    /// Rates of change of the nodes' temperatures, K/s, innermost first.
    pub(super) rates: Vec<f64>,
    /// Temperature of the wall's inner face, K.
    pub(super) face: f64,
    /// Temperature of a composite's wrap next to the liner, K.
    pub(super) wrap: Option<f64>,
}

impl<'a> Setup<'a> {
    pub(super) fn new(
        model: &'a dyn GasModel,
        volume: Volume,
        exchange: &'a Exchange,
    ) -> Setup<'a> {
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
            edge: 1.0,
            massless: true,
            last_temperature: std::cell::Cell::new(exchange.ambient_temperature),
            last_state: std::cell::Cell::new(None),
        }
    }

    /// The gas state from its mass and internal energy, the search started from the last
    /// state found (the integrator asks for neighbouring states in turn).
    pub(super) fn gas(&self, m: f64, u_total: f64) -> Option<State> {
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

    pub(super) fn film(&self, st: &State) -> Film {
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

    /// The wall's nodes over a run of `duration` s: neighbours that settle far within it
    /// lumped (see [`Nodes::lumped_within`]), and those that neither hold nor delay heat
    /// beside `gas_mass` kg of gas made massless (see [`Nodes::massless_below`]).
    pub(super) fn nodes(&self, duration: f64, gas_mass: f64) -> Nodes {
        let gas = self.model.gas();
        let cv = gas.specific_gas_constant() / (gas.gamma_300k() - 1.0);
        let h_max = match (self.exchange.mode, self.exchange.inner_coefficient) {
            (HeatTransfer::None, _) => 0.0,
            (_, Some(h)) => h,
            (_, None) => heat::FILL_CONSTANT,
        };
        let nodes = Nodes::new(&self.exchange.wall, self.area, duration, self.grid);
        if self.massless {
            nodes
                .lumped_within(duration)
                .massless_below(gas_mass * cv, self.area, h_max, duration)
        } else {
            nodes
        }
    }

    /// The same run with a correlation's inner coefficient scaled by `edge`.
    pub(super) fn scaled(&self, edge: f64) -> Setup<'a> {
        Setup {
            edge,
            last_temperature: self.last_temperature.clone(),
            last_state: self.last_state.clone(),
            ..*self
        }
    }

    /// Where the inner coefficient comes from: for a fill, `inlet` is the inlet bore, m (0
    /// when not given); `None` for a vent.
    pub(super) fn inner_basis(&self, inlet: Option<f64>) -> InnerBasis {
        match (self.exchange.mode, self.exchange.inner_coefficient, inlet) {
            (HeatTransfer::None, _, _) => InnerBasis::None,
            (_, Some(_), _) => InnerBasis::Given,
            (_, None, Some(d)) if d > 0.0 => InnerBasis::JetCorrelation,
            (_, None, Some(_)) => InnerBasis::JetCorrelationAssumedInlet,
            (_, None, None) => InnerBasis::NaturalConvection,
        }
    }

    /// (inner coefficient W/(m²·K), outer coefficient) for the gas at `st` and the wall's
    /// inner node at `wall_t`; `fill_flow` is a fill's (inflow kg/s, inlet bore m).
    pub(super) fn coefficients(
        &self,
        st: &State,
        wall_t: f64,
        fill_flow: Option<(f64, f64)>,
    ) -> (f64, f64) {
        let dt = st.temperature.get::<kelvin>() - wall_t;
        let h = match self.inner_basis(fill_flow.map(|f| f.1)) {
            InnerBasis::None => return (0.0, 0.0),
            InnerBasis::Given => self.exchange.inner_coefficient.unwrap_or(0.0),
            InnerBasis::JetCorrelation | InnerBasis::JetCorrelationAssumedInlet => {
                let (flow, inlet) = fill_flow.unwrap_or((0.0, 0.0));
                let bore = if inlet > 0.0 {
                    inlet
                } else {
                    heat::DEFAULT_INLET_BORE
                };
                self.edge * heat::jet(&self.film(st), flow, bore, dt, self.diameter)
            }
            InnerBasis::NaturalConvection => {
                self.edge * heat::natural(&self.film(st), dt, self.diameter)
            }
        };
        (h, heat::OUTSIDE_COEFFICIENT)
    }

    /// The wall's heat flows with the gas at `t_gas` and the coefficients inside and out.
    pub(super) fn wall_flows(
        &self,
        n: &Nodes,
        (h_inner, h_outer): (f64, f64),
        t_gas: f64,
        y: &[f64],
    ) -> Flows {
        let series = |h: f64, r: f64| nodes::film_conductance(h, self.area, r);
        let (g_in, g_out) = (series(h_inner, n.r_inner), series(h_outer, n.r_outer));
        let mut t: Vec<f64> = (0..n.capacities.len())
            .map(|i| y[Nodes::index(i)])
            .collect();
        n.place_massless(&mut t, (t_gas, g_in), (self.ambient, g_out));
        let into_wall = g_in * (t_gas - t[0]);
        let to_ambient = g_out * (t[t.len() - 1] - self.ambient);
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
            wrap: n.wrap_first.map(|i| t[i]),
        }
    }

    /// The wall's heat flows with the gas at `st`, the inner coefficient taken at the wall's
    /// inner node; `fill_flow` as for [`Setup::coefficients`]. A massless inner node (see
    /// [`Nodes::new`]) has no stored temperature: it is first placed with the coefficient at
    /// the gas's temperature less a kelvin, then the coefficient is taken again at it (one
    /// fixed-point pass).
    pub(super) fn exchange_flows(
        &self,
        n: &Nodes,
        st: &State,
        y: &[f64],
        fill_flow: Option<(f64, f64)>,
    ) -> Flows {
        let t_gas = st.temperature.get::<kelvin>();
        let mut wall_t = y[INNER];
        if n.capacities[0] == 0.0 {
            let first = self.coefficients(st, t_gas - 1.0, fill_flow);
            wall_t = self.wall_flows(n, first, t_gas, y).face;
        }
        self.wall_flows(n, self.coefficients(st, wall_t, fill_flow), t_gas, y)
    }

    /// The integrated state's derivatives for a gas gaining `flow` (kg/s, negative when
    /// venting) of enthalpy `h` (J/kg), with the wall's flows: (derivatives, inner face).
    pub(super) fn derivatives(&self, flow: f64, h: f64, f: &Flows) -> (Vec<f64>, Faces) {
        let mut d = vec![
            flow,
            flow * h - f.into_wall,
            f.rates[0],
            flow * h,
            f.to_ambient,
        ];
        d.extend(&f.rates[1..]);
        (d, (f.face, f.wrap))
    }

    /// The starting state: gas mass and internal energy, the wall at `wall_t0` throughout,
    /// the audit totals at zero.
    pub(super) fn start(&self, n: &Nodes, m0: f64, u0: f64, wall_t0: f64) -> (Vec<f64>, Vec<f64>) {
        let energy = u0.abs().max(1.0);
        let mut y0 = vec![m0, u0, wall_t0, 0.0, 0.0];
        let mut scale = vec![m0.max(1e-6), energy, wall_t0, energy, energy];
        for _ in 1..n.capacities.len() {
            y0.push(wall_t0);
            scale.push(wall_t0);
        }
        (y0, scale)
    }

    pub(super) fn sample(&self, t: f64, y: &[f64], (face, wrap): Faces) -> Option<Sample> {
        let st = self.gas(y[0], y[1])?;
        Some(Sample {
            time: Time::new::<second>(t),
            pressure: st.pressure,
            gas_temperature: st.temperature,
            wall_temperature: ThermodynamicTemperature::new::<kelvin>(face),
            wrap_temperature: wrap.map(ThermodynamicTemperature::new::<kelvin>),
        })
    }

    /// The run from its trajectory; `face` gives the wall's inner-face temperature of a
    /// state.
    pub(super) fn finish(
        &self,
        n: &Nodes,
        run: ode::Trajectory,
        basis: InnerBasis,
        face: impl Fn(&[f64]) -> Option<Faces>,
    ) -> Result<Run, InputError> {
        let samples = run
            .t
            .iter()
            .zip(&run.y)
            .map(|(&t, y)| self.sample(t, y, face(y)?))
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

pub(super) fn model_failure(what: &str) -> InputError {
    InputError::new(
        "heat-transfer",
        "lumped",
        format!("{what}; accepted: inputs that keep the gas within the model's range"),
    )
}

/// An integration that did not finish, in words: not resolved, and why.
pub(super) fn integration_failure(e: ode::OdeError) -> InputError {
    let why = match e {
        ode::OdeError::TooManySteps(n) => format!(
            "not resolved: the run needs more than {n} integration steps, a wall node responding far faster than the run lasts (check the wall's mass and its unit) or a run far longer than a fill or vent takes"
        ),
        other => format!("not resolved: {other}"),
    };
    model_failure(&why)
}

/// The most integration steps a run may take before it is not resolved. A real wall settles
/// far slower than the run's steps; only a wall node far lighter than the gas it holds
/// (grams, or a kilogram or two around tens of cubic metres: a mass typed in the wrong unit)
/// and too heavy to leave massless needs more, and then takes seconds a run.
pub const MAX_STEPS: usize = 100_000;

pub(super) fn options(duration: f64, rtol: f64) -> Options {
    Options {
        rtol,
        atol: rtol,
        max_step: duration / 10.0,
        max_steps: MAX_STEPS,
    }
}
