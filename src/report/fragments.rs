//! If the vessel bursts: the fragments' velocity and range, as results.

use super::{result, Entry};
use crate::rules::fragments::Fragments;
use crate::units::Value;

/// The fragments' results, with methods.
pub(super) fn entries(f: &Fragments) -> Vec<Entry> {
    vec![
        result(
            "Fragment velocity",
            Value::Speed(f.velocity),
            "Moore (1967): v = 1.092·√(E·G/M), G = 1/(1 + C/(2M)), E the isentropic energy",
        ),
        result(
            "Fragment range without drag",
            Value::Distance(f.max_range),
            "v²/g at 45°: an upper bound",
        ),
        result(
            "End cap range with drag",
            Value::Distance(f.drag_range),
            "its share of the mass by area, Cd 0.47 on its face, best launch angle, lift ignored",
        ),
        result(
            "End cap mass",
            Value::Mass(f.fragment_mass),
            "the wall's mass in proportion to the cap's area",
        ),
    ]
}
