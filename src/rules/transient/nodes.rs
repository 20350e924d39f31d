//! The wall's temperature nodes: metal layers as one node, insulating ones cut into slices.

use super::*;

/// Where the wall's temperature nodes sit in the integrated state: the innermost node, and
/// any further ones after the two audit totals.
pub(super) const INNER: usize = 2;
const FURTHER: usize = 5;

/// An insulating layer thinner than this, m, is lumped with its neighbour: ρ·c·t²/(2k) is
/// then about a second, and a node of its own would only make the integration stiff.
const MIN_SLICED_THICKNESS: f64 = 1e-3;

/// How an insulating layer is cut into slices: the innermost this fraction of the depth
/// heat reaches over the run, √(α·duration), and each one outwards this many times
/// thicker. The slices are finest where the heat goes, and no finer than the run needs: a
/// thinner slice only shortens the integrator's steps. The tests hold the peak gas
/// temperature within 0.1 K of a grid twice as fine; a coarser grid errs hot.
pub(super) const SLICE_GRID: (f64, f64) = (0.1, 1.08);

/// A wall node is massless below this share of the gas's heat capacity and this fraction
/// of the run for its time constant (see [`Nodes::massless_below`]): the heat it leaves out
/// moves the gas by under a hundredth of its rise, and towards the hazard (a fill runs
/// hotter, a vent colder, without the heat the node would have taken or given). The tests
/// hold a 1 g and a 5 g wall within 0.1 K of the same wall stored.
pub(super) const MASSLESS: (f64, f64) = (1e-2, 1e-3);

/// The thinnest innermost slice, m. There is no upper bound: over a long run the slices
/// grow with the depth heat reaches, and thick ones settle in step with it.
const MIN_SLICE: f64 = 2e-5;

/// The wall's nodes in SI, a chain from the gas outwards: heat capacities (J/K) and
/// conduction resistances (K/W).
///
/// A metal layer is one node. An insulating one (a composite wrap, a plastic liner) is cut
/// through its thickness into slices, each lumped at its mid-thickness: conduction through
/// a few millimetres of it takes minutes, as long as a fill, so one lumped node would put
/// The conductance, W/K, of a convective film of coefficient `h` (W/(m²·K)) over `area`
/// (m²) in series with a conduction resistance `r` (K/W), half a layer.
pub(super) fn film_conductance(h: f64, area: f64, r: f64) -> f64 {
    let ha = h * area;
    ha / (1.0 + ha * r)
}

/// all its heat capacity behind half its thickness.
pub(super) struct Nodes {
    /// Heat capacities, innermost first.
    pub(super) capacities: Vec<f64>,
    /// From the inner face to the first node.
    pub(super) r_inner: f64,
    /// From each node to the next.
    pub(super) r_links: Vec<f64>,
    /// From the last node to the outer face.
    pub(super) r_outer: f64,
    /// The composite wrap's innermost node, whose temperature is reported.
    pub(super) wrap_first: Option<usize>,
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
    let first = (fraction * (diffusivity * duration).sqrt()).max(MIN_SLICE);
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
    pub(super) fn new(wall: &Wall, area: f64, duration: f64, grid: (f64, f64)) -> Nodes {
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

    /// The nodes with those set massless (heat capacity zero) that hold less than
    /// [`MASSLESS`]`.0` of `gas_capacity` (J/K) and follow their neighbours within
    /// [`MASSLESS`]`.1` of the run's `duration` (s), with the inner film at `h_inner`
    /// W/(m²·K).
    ///
    /// Such a node (a wall of a few grams, a liner of a nanogram in a site file, any wall in
    /// a fill over weeks) would make the integration stiff, millions of steps for nothing:
    /// massless, it takes its temperature from its neighbours at each moment (see
    /// [`Nodes::place_massless`]), and the heat it would have held, under a hundredth of
    /// the gas's, is left out.
    pub(super) fn massless_below(
        mut self,
        gas_capacity: f64,
        area: f64,
        h_inner: f64,
        duration: f64,
    ) -> Nodes {
        let film = |h: f64, r: f64| film_conductance(h, area, r);
        let last = self.capacities.len() - 1;
        for i in 0..=last {
            let inward = if i == 0 {
                film(h_inner, self.r_inner)
            } else {
                1.0 / self.r_links[i - 1]
            };
            let outward = if i == last {
                film(heat::OUTSIDE_COEFFICIENT, self.r_outer)
            } else {
                1.0 / self.r_links[i]
            };
            let c = self.capacities[i];
            if c < MASSLESS.0 * gas_capacity && c < MASSLESS.1 * duration * (inward + outward) {
                self.capacities[i] = 0.0;
            }
        }
        self
    }

    /// The nodes with each neighbouring pair lumped into one whose link settles them within
    /// [`MASSLESS`]`.1` of the run's `duration` (s): its time constant R·C₁C₂/(C₁ + C₂)
    /// is that short.
    ///
    /// A metal liner and the wrap's first slice over a fill of hours or days are such a pair:
    /// they settle within a minute, and integrated apart they would hold the integrator's
    /// steps to that minute over the whole run. Lumped, their capacities add, and the link's
    /// resistance moves onto the lumped node's outward path, so the conduction from the gas
    /// to the surroundings is unchanged.
    pub(super) fn lumped_within(mut self, duration: f64) -> Nodes {
        let mut i = 0;
        while i + 1 < self.capacities.len() {
            let (a, b) = (self.capacities[i], self.capacities[i + 1]);
            let settles = self.r_links[i] * a * b / (a + b);
            if a > 0.0 && b > 0.0 && settles < MASSLESS.1 * duration {
                let link = self.r_links.remove(i);
                self.capacities[i] += self.capacities.remove(i + 1);
                match self.r_links.get_mut(i) {
                    Some(next) => *next += link,
                    None => self.r_outer += link,
                }
                self.wrap_first = self.wrap_first.map(|w| if w > i { w - 1 } else { w });
            } else {
                i += 1;
            }
        }
        self
    }

    /// Places the massless nodes of `t` (node temperatures, K, innermost first) between
    /// their neighbours: each gains as much heat as it loses. The chain runs from the gas
    /// (temperature, conductance to the first node) to the surroundings (temperature,
    /// conductance from the last), and the stored nodes hold their temperatures: a
    /// tridiagonal system, solved by the Thomas algorithm.
    pub(super) fn place_massless(
        &self,
        t: &mut [f64],
        (t_gas, g_in): (f64, f64),
        (t_out, g_out): (f64, f64),
    ) {
        if self.capacities.iter().all(|&c| c > 0.0) {
            return;
        }
        let n = t.len();
        let g = |i: usize| -> f64 {
            // Conductance between node i − 1 and node i (i = 0: the gas; i = n: outside).
            match i {
                0 => g_in,
                _ if i == n => g_out,
                _ => 1.0 / self.r_links[i - 1],
            }
        };
        // Row i: −lower·T[i−1] + diag·T[i] − upper·T[i+1] = rhs.
        let (mut upper, mut rhs) = (vec![0.0; n], vec![0.0; n]);
        for i in 0..n {
            let (diag, lower, up, mut b) = if self.capacities[i] > 0.0 {
                (1.0, 0.0, 0.0, t[i])
            } else {
                (g(i) + g(i + 1), g(i), g(i + 1), 0.0)
            };
            let (lower, up) = (
                if i == 0 { 0.0 } else { lower },
                if i == n - 1 { 0.0 } else { up },
            );
            if self.capacities[i] == 0.0 {
                if i == 0 {
                    b += g_in * t_gas;
                }
                if i == n - 1 {
                    b += g_out * t_out;
                }
            }
            // Forward sweep.
            let prev = if i == 0 {
                (0.0, 0.0)
            } else {
                (upper[i - 1], rhs[i - 1])
            };
            let d = diag - lower * prev.0;
            upper[i] = up / d;
            rhs[i] = (b + lower * prev.1) / d;
        }
        t[n - 1] = rhs[n - 1];
        for i in (0..n - 1).rev() {
            t[i] = rhs[i] + upper[i] * t[i + 1];
        }
    }

    /// Where node `i` sits in the integrated state.
    pub(super) fn index(i: usize) -> usize {
        if i == 0 {
            INNER
        } else {
            FURTHER + i - 1
        }
    }

    /// The heat stored in the wall between two integrated states, J.
    pub(super) fn stored(&self, first: &[f64], last: &[f64]) -> f64 {
        self.capacities
            .iter()
            .enumerate()
            .map(|(i, c)| c * (last[Nodes::index(i)] - first[Nodes::index(i)]))
            .sum()
    }
}
