//! Cautions: the signal words of ISO 3864-2 / ANSI Z535.4 and the deferral every result carries.

use serde::Serialize;
use std::fmt;
use uom::si::f64::Pressure;
use uom::si::pressure::pascal;

use crate::units::{Display, UnitSystem, Value};

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

/// A piece of a caution's message: words, or a quantity each renderer shows in its units.
#[derive(Debug, Clone, PartialEq)]
pub enum Part {
    /// Words.
    Text(String),
    /// A quantity, shown in the reader's units.
    Quantity(Value),
}

impl From<&str> for Part {
    fn from(s: &str) -> Part {
        Part::Text(s.to_string())
    }
}

impl From<String> for Part {
    fn from(s: String) -> Part {
        Part::Text(s)
    }
}

impl From<Value> for Part {
    fn from(v: Value) -> Part {
        Part::Quantity(v)
    }
}

/// One caution: a signal word and what the crew must know.
///
/// Its quantities stay typed until rendered, so a crew reading US units gets psi and feet
/// in the cautions too; JSON carries the SI rendering as `message`.
#[derive(Debug, Clone, PartialEq)]
pub struct Caution {
    /// The signal word.
    pub level: Level,
    /// The message, in parts.
    pub parts: Vec<Part>,
}

/// Builds a caution from a level and any mix of text and [`Value`]s.
#[macro_export]
macro_rules! caution {
    ($level:expr, $($part:expr),+ $(,)?) => {
        $crate::caution::Caution::from_parts($level, vec![$($crate::caution::Part::from($part)),+])
    };
}

impl Caution {
    /// A caution of plain text at `level`.
    pub fn new(level: Level, message: impl Into<String>) -> Caution {
        Caution {
            level,
            parts: vec![Part::Text(message.into())],
        }
    }

    /// A caution from parts.
    pub fn from_parts(level: Level, parts: Vec<Part>) -> Caution {
        Caution { level, parts }
    }

    /// The message in `display`'s units.
    pub fn render(&self, display: &Display) -> String {
        render_parts(&self.parts, display)
    }

    /// The message in SI units, as JSON carries it.
    pub fn message(&self) -> String {
        self.render(&si_display())
    }
}

impl Serialize for Caution {
    fn serialize<S: serde::Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        use serde::ser::SerializeStruct;
        let mut st = s.serialize_struct("Caution", 2)?;
        st.serialize_field("level", &self.level)?;
        st.serialize_field("message", &self.message())?;
        st.end()
    }
}

/// The deferral carried by every output, whatever else it says.
pub fn deferral() -> Caution {
    Caution::new(
        Level::Notice,
        "These results support, and do not replace, the judgment of a competent person. The vessel's rating plate and design documents, the applicable local codes and regulations, and the licensed or authorised inspector govern; where they differ from this output, they prevail.",
    )
}

/// A note on how a result was reached: the method, model, constant or assumption behind
/// it. Notes are the basis of a result, printed after it; they are never banners.
#[derive(Debug, Clone, PartialEq)]
pub struct Note {
    /// What the note is about, a short fixed name ("gas model", "heat transfer").
    pub topic: &'static str,
    /// The note, in parts.
    pub parts: Vec<Part>,
}

/// Builds a basis note from a topic and any mix of text and [`Value`]s.
#[macro_export]
macro_rules! note {
    ($topic:expr, $($part:expr),+ $(,)?) => {
        $crate::caution::Note { topic: $topic, parts: vec![$($crate::caution::Part::from($part)),+] }
    };
}

impl Note {
    /// A note of plain text.
    pub fn new(topic: &'static str, message: impl Into<String>) -> Note {
        Note {
            topic,
            parts: vec![Part::Text(message.into())],
        }
    }

    /// The note in `display`'s units.
    pub fn render(&self, display: &Display) -> String {
        render_parts(&self.parts, display)
    }

    /// The note in SI units, as JSON carries it.
    pub fn message(&self) -> String {
        self.render(&si_display())
    }
}

impl Serialize for Note {
    fn serialize<S: serde::Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        use serde::ser::SerializeStruct;
        let mut st = s.serialize_struct("Note", 2)?;
        st.serialize_field("topic", self.topic)?;
        st.serialize_field("message", &self.message())?;
        st.end()
    }
}

/// Notes without repeats, in the order first given.
pub fn distinct(mut notes: Vec<Note>) -> Vec<Note> {
    let mut seen = std::collections::HashSet::new();
    notes.retain(|n| seen.insert(n.message()));
    notes
}

/// Parts rendered in `display`'s units.
pub fn render_parts(parts: &[Part], display: &Display) -> String {
    parts
        .iter()
        .map(|p| match p {
            Part::Text(t) => t.clone(),
            Part::Quantity(v) => display.short(v),
        })
        .collect()
}

/// The SI display JSON uses.
pub fn si_display() -> Display {
    Display {
        system: UnitSystem::Si,
        ambient: Pressure::new::<pascal>(crate::atmosphere::SEA_LEVEL_PRESSURE_PA),
    }
}

/// A rule's result together with the cautions it raises and the basis of its method.
#[derive(Debug, Clone, PartialEq)]
pub struct Assessed<T> {
    /// The computed result.
    pub value: T,
    /// The cautions the computation raised, in the order raised: limits of a model or a
    /// result not resolved, never a hazard a finding assesses.
    pub cautions: Vec<Caution>,
    /// How the result was reached.
    pub basis: Vec<Note>,
}

/// Cautions ordered for printing: highest level first, the deferral last, no duplicates.
pub fn ordered(mut cautions: Vec<Caution>) -> Vec<Caution> {
    let mut seen = std::collections::HashSet::new();
    let last = deferral();
    cautions.retain(|c| *c != last && seen.insert(c.message()));
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
