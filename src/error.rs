//! The one error a user can cause: a bad input, named by field, value and what is accepted.

use std::fmt;

/// A value the user gave that pvhazard cannot use.
///
/// Every message names the field (an option on the command line, a key in a file), the value
/// as given, and what would have been accepted, because "invalid input" alone does not help a
/// crew standing at a vessel.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct InputError {
    /// The field, spelled as the user spells it (`--pressure`, or a key in a site file).
    pub field: String,
    /// The value as given, or a short description of it for derived checks.
    pub value: String,
    /// What is wrong and what is accepted instead.
    pub problem: String,
}

impl InputError {
    /// An error for `field` (given without the leading dashes) with `value` and `problem`.
    pub fn new(field: &str, value: impl Into<String>, problem: impl Into<String>) -> InputError {
        InputError {
            field: field.to_string(),
            value: value.into(),
            problem: problem.into(),
        }
    }

    /// The same error with the field renamed, as when the command line maps a rule's field to
    /// its option name.
    pub fn with_field(mut self, field: impl Into<String>) -> InputError {
        self.field = field.into();
        self
    }
}

impl fmt::Display for InputError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "{} = '{}': {}", self.field, self.value, self.problem)
    }
}

impl std::error::Error for InputError {}

/// A value as typed, for an error message: in full if short, else its start and its length;
/// a control character shown as its escape (`\u{7}`), so that the message cannot ring, erase
/// or reorder what the terminal shows.
pub fn as_typed(text: &str) -> String {
    let visible = |s: &mut dyn Iterator<Item = char>| -> String {
        s.map(|c| {
            if c.is_control()
                || ('\u{202A}'..='\u{202E}').contains(&c)
                || ('\u{2066}'..='\u{2069}').contains(&c)
            {
                c.escape_unicode().to_string()
            } else {
                c.to_string()
            }
        })
        .collect()
    };
    let n = text.chars().count();
    if n <= 60 {
        visible(&mut text.chars())
    } else {
        format!("{}… ({n} characters)", visible(&mut text.chars().take(40)))
    }
}
