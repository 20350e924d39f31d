//! pvhazard: stored energy, safe distances, blow-down times and fill temperatures of
//! compressed-gas vessels, with the cautions a maintenance crew needs.
//!
//! Data flows one way: [`units`] parses what the user typed into SI quantities (pressures
//! absolute), a [`gas::GasModel`] gives the gas's states, the [`rules`] compute results and
//! [`caution::Caution`]s, [`report`] gathers them into a worksheet model, and its renderers
//! print text or JSON. No rule formats output; no renderer computes physics.

pub mod assess;
pub mod atmosphere;
pub mod caution;
pub mod cli;
mod error;
#[doc(hidden)]
pub mod fuzz;
pub mod gas;
pub mod heat;
pub mod limits;
pub mod parallel;
pub mod record;
pub mod report;
pub mod rules;
pub mod serve;
pub mod site;
pub mod solve;
pub mod source;
pub mod template;
pub mod units;
pub mod worksheet;

pub use error::{as_typed, InputError};
