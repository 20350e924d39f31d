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

    /// Parses the text as TOML into `T`, turning a syntax or schema error into a located one
    /// that names the key where it can.
    pub fn parse<T: serde::de::DeserializeOwned>(&self) -> Result<T, FileError> {
        toml::from_str(&self.text).map_err(|e| {
            let at = e.span().map(|s| s.start);
            // toml's message is the problem itself ("missing field `volume`", "invalid
            // type"); its own rendering repeats the line we already give.
            let message = e.message().trim();
            let key = at.map(|at| self.key_at(at)).unwrap_or_default();
            let hint = if message.contains("expected a string") {
                "; accepted: a quoted string (a quantity with its unit, e.g. volume = \"2 m3\")"
            } else if message.contains("duplicate key") {
                "; accepted: each key once in its table"
            } else {
                ""
            };
            // The line as written, so the message shows what is wrong without the editor.
            let written = at
                .map(|at| self.line_text(at).trim())
                .filter(|l| !l.is_empty())
                .map(|l| format!("'{}': ", crate::as_typed(l)))
                .unwrap_or_default();
            FileError {
                file: self.path.clone(),
                line: at.map_or(0, |at| self.line_of(at)),
                key,
                problem: format!("{written}{message} (TOML){hint}"),
            }
        })
    }

    /// The text of the line holding byte offset `at`.
    fn line_text(&self, at: usize) -> &str {
        let at = at.min(self.text.len());
        let start = self.text[..at].rfind('\n').map_or(0, |i| i + 1);
        let end = self.text[at..]
            .find('\n')
            .map_or(self.text.len(), |i| at + i);
        &self.text[start..end]
    }

    /// The dotted key of the value or key at byte offset `at`, as the file spells it
    /// (`vessel[2].volume`), or empty where no key can be read there.
    pub fn key_at(&self, at: usize) -> String {
        let at = at.min(self.text.len());
        let Some(before) = self.text.get(..at) else {
            return String::new();
        };
        let line_start = before.rfind('\n').map_or(0, |i| i + 1);
        let line_end = self.text[at..]
            .find('\n')
            .map_or(self.text.len(), |i| at + i);
        let head = &self.text[line_start..at];
        let line = &self.text[line_start..line_end];
        let bare = |k: &str| {
            let k = k.trim().trim_matches('"');
            let ok = !k.is_empty()
                && k.chars()
                    .all(|c| c.is_ascii_alphanumeric() || matches!(c, '_' | '-' | '.'));
            ok.then(|| k.to_string())
        };
        // The key before the last `=` ahead of the value, or the key the offset is on.
        let own = match head.rfind('=') {
            Some(eq) => bare(head[..eq].rsplit([',', '{']).next().unwrap_or("")),
            None => bare(line[head.len()..].split('=').next().unwrap_or("")),
        };
        let Some(own) = own else {
            return String::new();
        };
        // Inside an inline table, the table's own key goes first.
        let inline = head
            .find('{')
            .and_then(|b| head[..b].split('=').next().and_then(bare));
        let mut path: Vec<String> = Vec::new();
        if let Some(table) = self.table_at(line_start) {
            path.push(table);
        }
        path.extend(inline);
        path.push(own);
        path.join(".")
    }

    /// The table header in force at byte offset `at`, with an array of tables numbered as
    /// the error messages number them (`vessel[2]`).
    fn table_at(&self, at: usize) -> Option<String> {
        let mut current = None;
        let mut counts: std::collections::BTreeMap<String, usize> = Default::default();
        let mut offset = 0;
        for line in self.text.split_inclusive('\n') {
            if offset >= at {
                break;
            }
            offset += line.len();
            let t = line.trim();
            if let Some(name) = t.strip_prefix("[[").and_then(|r| r.split("]]").next()) {
                let name = name.trim().to_string();
                let n = counts.entry(name.clone()).or_insert(0);
                *n += 1;
                current = Some(format!("{name}[{n}]"));
            } else if let Some(name) = t.strip_prefix('[').and_then(|r| r.split(']').next()) {
                current = Some(name.trim().to_string());
            }
        }
        current
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
            format!("'{}': {problem}", crate::as_typed(value.get_ref())),
        )
    })
}
