//! Errors in the files a user writes (site files, templates): file, line, key and problem.

use std::fmt;
use std::path::{Path, PathBuf};

/// A problem in a user's file, located by line and key so it can be fixed in an editor.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct FileError {
    /// The file.
    pub file: PathBuf,
    /// The 1-based line, or 0 when the problem is with the file as a whole.
    pub line: usize,
    /// The key (dotted path, e.g. `vessel[2].volume`), or empty for the file as a whole.
    pub key: String,
    /// What is wrong and what is accepted.
    pub problem: String,
}

impl fmt::Display for FileError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "{}", self.file.display())?;
        if self.line > 0 {
            write!(f, ":{}", self.line)?;
        }
        if !self.key.is_empty() {
            write!(f, ": {}", self.key)?;
        }
        write!(f, ": {}", self.problem)
    }
}

impl std::error::Error for FileError {}

/// A file's text, kept to turn byte offsets into line numbers.
#[derive(Debug, Clone)]
pub struct Source {
    /// Where it came from.
    pub path: PathBuf,
    /// Its text.
    pub text: String,
}

impl Source {
    /// Reads `path`, refusing a missing or unreadable file with a message.
    pub fn read(path: &Path) -> Result<Source, FileError> {
        let text = std::fs::read_to_string(path).map_err(|e| FileError {
            file: path.to_path_buf(),
            line: 0,
            key: String::new(),
            problem: format!("cannot read the file: {e}"),
        })?;
        Ok(Source {
            path: path.to_path_buf(),
            text,
        })
    }

    /// The 1-based line of byte offset `at`.
    pub fn line_of(&self, at: usize) -> usize {
        self.text[..at.min(self.text.len())].matches('\n').count() + 1
    }

    /// An error at byte offset `at` on `key`.
    pub fn error(
        &self,
        at: usize,
        key: impl Into<String>,
        problem: impl Into<String>,
    ) -> FileError {
        FileError {
            file: self.path.clone(),
            line: self.line_of(at),
            key: key.into(),
            problem: problem.into(),
        }
    }

    /// Parses the text as TOML into `T`, turning a syntax or schema error into a located one.
    pub fn parse<T: serde::de::DeserializeOwned>(&self) -> Result<T, FileError> {
        toml::from_str(&self.text).map_err(|e| {
            let line = e.span().map_or(0, |s| self.line_of(s.start));
            // toml's message is the problem itself ("missing field `volume`", "invalid
            // type"); its own rendering repeats the line we already give.
            FileError {
                file: self.path.clone(),
                line,
                key: String::new(),
                problem: format!("{} (TOML)", e.message().trim()),
            }
        })
    }
}

/// A value from a file with where it stood, so checks after parsing can point at it.
pub type Spanned<T> = toml::Spanned<T>;

/// Parses a spanned text value with `parse`, locating any problem at the value.
pub fn located<T>(
    src: &Source,
    key: &str,
    value: &Spanned<String>,
    parse: impl Fn(&str) -> Result<T, String>,
) -> Result<T, FileError> {
    parse(value.get_ref()).map_err(|problem| {
        src.error(
            value.span().start,
            key,
            format!("'{}': {problem}", value.get_ref()),
        )
    })
}
