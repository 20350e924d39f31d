//! Cautions: the signal words of ISO 3864-2 / ANSI Z535.4 and the deferral every result carries.

use serde::Serialize;
use std::fmt;

/// Hazard signal words, lowest to highest, as the open standards define them.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Serialize)]
#[serde(rename_all = "UPPERCASE")]
pub enum Level {
    /// Information on practice or property, not a personal-injury hazard.
    Notice,
    /// A hazardous situation which could result in minor or moderate injury.
    Caution,
    /// A hazardous situation which could result in death or serious injury.
    Warning,
    /// A hazardous situation which will result in death or serious injury.
    Danger,
}

impl Level {
    /// The signal word as printed.
    pub fn word(self) -> &'static str {
        match self {
            Level::Notice => "NOTICE",
            Level::Caution => "CAUTION",
            Level::Warning => "WARNING",
            Level::Danger => "DANGER",
        }
    }
}

impl fmt::Display for Level {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.word())
    }
}

/// One caution: a signal word and what the crew must know.
#[derive(Debug, Clone, PartialEq, Eq, Serialize)]
pub struct Caution {
    /// The signal word.
    pub level: Level,
    /// The message, one or two sentences.
    pub message: String,
}

impl Caution {
    /// A caution at `level`.
    pub fn new(level: Level, message: impl Into<String>) -> Caution {
        Caution {
            level,
            message: message.into(),
        }
    }
}

/// The deferral carried by every output, whatever else it says.
pub fn deferral() -> Caution {
    Caution::new(
        Level::Notice,
        "These results support, and do not replace, the judgment of a competent person. The vessel's rating plate and design documents, the applicable local codes and regulations, and the licensed or authorised inspector govern; where they differ from this output, they prevail.",
    )
}

/// A rule's result together with the cautions it raises.
#[derive(Debug, Clone, PartialEq)]
pub struct Assessed<T> {
    /// The computed result.
    pub value: T,
    /// The cautions the computation raised, in the order raised.
    pub cautions: Vec<Caution>,
}

/// Cautions ordered for printing: highest level first, the deferral last, no duplicates.
pub fn ordered(mut cautions: Vec<Caution>) -> Vec<Caution> {
    let mut seen = std::collections::HashSet::new();
    cautions.retain(|c| seen.insert(c.message.clone()));
    cautions.sort_by_key(|c| std::cmp::Reverse(c.level));
    cautions.push(deferral());
    cautions
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn ordered_puts_danger_first_and_the_deferral_last() {
        let c = ordered(vec![
            Caution::new(Level::Notice, "n"),
            Caution::new(Level::Danger, "d"),
            Caution::new(Level::Warning, "w"),
            Caution::new(Level::Warning, "w"),
        ]);
        let words: Vec<_> = c.iter().map(|c| c.level).collect();
        assert_eq!(
            words,
            [Level::Danger, Level::Warning, Level::Notice, Level::Notice]
        );
        assert_eq!(c.last().unwrap(), &deferral());
    }
}
