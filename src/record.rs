//! Keeping records: file names that say what a worksheet is, and writes that never
//! overwrite a record by accident and never leave half a file or half a batch behind.
//!
//! A batch is written in three steps, under a lock on its folder: every file is staged in
//! full (a hidden temporary file, synced), then each is linked in under its name, then the
//! temporaries go. A failure removes what this run linked in. A run that is killed leaves
//! hidden temporaries and perhaps some of its records: the next write in that folder removes
//! the temporaries (and says so), and a record already there with the same bytes counts as
//! written, so rerunning the interrupted command finishes its batch.

use std::fs::{self, File};
use std::io::Write;
use std::path::{Path, PathBuf};

/// Why a record could not be written.
#[derive(Debug, thiserror::Error)]
pub enum RecordError {
    /// A different file of that name is already there; records are never overwritten
    /// silently.
    #[error("{} already exists and holds a different record; records are never overwritten: pass --force to replace it, or give another --work-order, --date or --out (to finish an interrupted run, repeat it with the same --date)", .0.display())]
    Exists(PathBuf),
    /// The file system refused.
    #[error("cannot write {}: {source}; nothing of this run was left behind", path.display())]
    Io {
        /// The file being written.
        path: PathBuf,
        /// The underlying error.
        source: std::io::Error,
    },
}

/// Longest file-name part a name may give, in characters. Five parts, the separators and
/// the extension stay inside the 255 bytes most file systems allow for a name.
pub const MAX_PART: usize = 48;

/// Longest name accepted, in characters, before its file-name part is even considered.
pub const MAX_NAME: usize = 200;

/// Refuses text a person would not read as a name: empty, holding a control or other
/// unprintable character, or longer than `max` characters. The error is the problem and
/// what is accepted.
pub fn check_text(text: &str, max: usize) -> Result<(), String> {
    if text.trim().is_empty() {
        return Err("is empty; accepted: a name with at least one letter or digit".into());
    }
    if let Some(c) = text.chars().find(|c| unprintable(*c)) {
        return Err(format!(
            "holds the unprintable character U+{:04X}; accepted: letters, digits, spaces and punctuation",
            c as u32
        ));
    }
    let n = text.chars().count();
    if n > max {
        return Err(format!(
            "is {n} characters long; accepted: at most {max} characters"
        ));
    }
    Ok(())
}

/// Refuses a name that cannot become a file-name part: as [`check_text`], and one with no
/// letter or digit, or whose part would be longer than [`MAX_PART`].
pub fn check_name(text: &str) -> Result<(), String> {
    check_text(text, MAX_NAME)?;
    let part = slug(text);
    if part.is_empty() {
        return Err(
            "has no letter or digit, so it cannot name a record's file; accepted: a name with at least one letter or digit".into(),
        );
    }
    let n = part.chars().count();
    if n > MAX_PART {
        return Err(format!(
            "would make a file-name part of {n} characters ('{}…'); accepted: a name whose file-name part is at most {MAX_PART} characters (a letter outside Latin-1 takes 5)",
            part.chars().take(24).collect::<String>()
        ));
    }
    Ok(())
}

fn unprintable(c: char) -> bool {
    // Control characters, the replacement character (left by a bad encoding), private-use
    // code points and the bidirectional overrides that reorder what a reader sees.
    c.is_control()
        || c == '\u{FFFD}'
        || ('\u{E000}'..='\u{F8FF}').contains(&c)
        || ('\u{202A}'..='\u{202E}').contains(&c)
        || ('\u{2066}'..='\u{2069}').contains(&c)
}

/// Latin-1 letters (U+00C0 to U+00FF) by their base letter, `_` where none fits.
const LATIN1_BASE: &str = "aaaaaaaceeeeiiiidnooooo_ouuuuytsaaaaaaaceeeeiiiidnooooo_ouuuuyty";

/// A file-name part: lower-case letters, digits and hyphens only. Accented Latin letters
/// lose their accent; a letter or digit of another script is written as `u` and its code
/// point in hex, so that a name in any script keeps a part of its own. Empty if the text has
/// no letter or digit.
pub fn slug(text: &str) -> String {
    let mut out = String::new();
    for c in text.chars() {
        let base = match c {
            'À'..='ÿ' => LATIN1_BASE
                .chars()
                .nth(c as usize - 0xC0)
                .filter(|b| *b != '_'),
            _ => None,
        };
        if c.is_ascii_alphanumeric() {
            out.push(c.to_ascii_lowercase());
        } else if let Some(b) = base {
            out.push(b);
        } else if c.is_alphanumeric() {
            out.push_str(&format!(
                "u{:x}",
                c.to_lowercase().next().unwrap_or(c) as u32
            ));
        } else if !out.ends_with('-') && !out.is_empty() {
            out.push('-');
        }
    }
    out.trim_end_matches('-').to_string()
}

/// The file stem of a worksheet: site, tag, template, work order and date, e.g.
/// `harbour-road-works_ar-101_pre-maintenance_wo-2291_2026-03-14`. The names are checked
/// with [`check_name`] where they are read.
pub fn stem(site: &str, tag: &str, template: &str, work_order: Option<&str>, date: &str) -> String {
    format!(
        "{}_{}_{}_{}_{}",
        slug(site),
        slug(tag),
        slug(template),
        work_order.map_or_else(|| "no-wo".to_string(), slug),
        date
    )
}

/// What to do with a file of the same name that is already there.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Mode {
    /// Refuse the write.
    New,
    /// Count it as written if it holds the same bytes (an interrupted run's); refuse it
    /// otherwise.
    Complete,
    /// Replace it.
    Replace,
}

/// The files of one batch: each target path and its bytes, written together.
pub struct Files<'a> {
    /// (target path, contents).
    pub files: Vec<(PathBuf, &'a [u8])>,
}

/// What a write did.
#[derive(Debug, Default)]
pub struct Written {
    /// Files this run put in place.
    pub placed: Vec<PathBuf>,
    /// Files that were already there with the same bytes, counted as written.
    pub kept: Vec<PathBuf>,
    /// Temporary files an interrupted run had left in the folder, removed.
    pub stale: Vec<PathBuf>,
}

/// A file to place: its target, its bytes, whether it replaces one, and its staged copy.
struct Pending<'p> {
    target: &'p Path,
    replaces: bool,
    temp: PathBuf,
}

impl Files<'_> {
    /// Writes every file, or none. Under a lock on each folder (a second run in the same
    /// folder waits), stale temporaries are removed first, then every file is staged in
    /// full and synced, then linked in under its name (a hard link, which never replaces,
    /// or with [`Mode::Replace`] a rename after keeping the old file aside). Any failure
    /// removes what this call linked in and puts back what it replaced.
    pub fn write(&self, mode: Mode) -> Result<Written, RecordError> {
        let mut folders: Vec<&Path> = self.files.iter().map(|(t, _)| folder(t)).collect();
        folders.sort();
        folders.dedup();
        // Held until the end of the write; dropping a file releases its lock.
        let _locks: Vec<Option<File>> = folders.iter().map(|d| lock(d)).collect();
        let mut out = Written::default();
        for d in &folders {
            out.stale.extend(remove_stale(d));
        }
        let mut todo: Vec<(&Path, &[u8], bool)> = Vec::new();
        for (target, bytes) in &self.files {
            match fs::read(target) {
                Ok(old) if old == *bytes && mode != Mode::New => out.kept.push(target.clone()),
                Ok(_) if mode == Mode::Replace => todo.push((target, bytes, true)),
                Ok(_) => return Err(RecordError::Exists(target.clone())),
                Err(e) if e.kind() == std::io::ErrorKind::NotFound => {
                    todo.push((target, bytes, false))
                }
                Err(source) => {
                    return Err(RecordError::Io {
                        path: target.clone(),
                        source,
                    })
                }
            }
        }
        let mut stop = Stop::from_env();
        let mut pending = Vec::new();
        for (target, bytes, replaces) in todo {
            match stage(target, bytes) {
                Ok(temp) => {
                    pending.push(Pending {
                        target,
                        replaces,
                        temp,
                    });
                    stop.step();
                }
                Err(e) => {
                    remove_all(pending.iter().map(|p| p.temp.as_path()));
                    return Err(e);
                }
            }
        }
        let mut done: Vec<(&Pending, Option<PathBuf>)> = Vec::new();
        for p in &pending {
            match place(p) {
                Ok(aside) => {
                    done.push((p, aside));
                    stop.step();
                }
                Err(e) => {
                    undo(&done);
                    remove_all(pending.iter().map(|p| p.temp.as_path()));
                    return Err(e);
                }
            }
        }
        for (p, aside) in &done {
            let _ = fs::remove_file(&p.temp);
            if let Some(a) = aside {
                let _ = fs::remove_file(a);
            }
            stop.step();
            out.placed.push(p.target.to_path_buf());
        }
        for d in &folders {
            // The names are in place once the folder is synced; a folder that cannot be
            // opened for it (some platforms) is left to the file system.
            if let Ok(f) = File::open(d) {
                let _ = f.sync_all();
            }
        }
        Ok(out)
    }
}

/// The variable that makes a write stop dead after so many steps (each file staged, each
/// linked in, each temporary removed), as a SIGKILL there would: the tests of the batch
/// promise use it to interrupt a run at every step.
pub const STOP_AFTER_VAR: &str = "PVHAZARD_TEST_STOP_AFTER";

/// Counts a write's steps against [`STOP_AFTER_VAR`].
struct Stop(Option<u64>);

impl Stop {
    fn from_env() -> Stop {
        Stop(
            std::env::var(STOP_AFTER_VAR)
                .ok()
                .and_then(|v| v.trim().parse().ok()),
        )
    }

    fn step(&mut self) {
        let Some(left) = self.0.as_mut() else {
            return;
        };
        *left = left.saturating_sub(1);
        if *left == 0 {
            // No unwinding, no clean-up: the process ends as a killed one does. A
            // SIGKILL from `kill` where there is one, else an abort.
            let pid = std::process::id().to_string();
            let _ = std::process::Command::new("kill")
                .args(["-KILL", &pid])
                .status();
            std::process::abort();
        }
    }
}

fn folder(target: &Path) -> &Path {
    match target.parent() {
        Some(p) if !p.as_os_str().is_empty() => p,
        _ => Path::new("."),
    }
}

/// An exclusive lock on the folder itself, so that no file is left in it. Where a folder
/// cannot be opened or locked, the write goes ahead unlocked.
fn lock(dir: &Path) -> Option<File> {
    let f = File::open(dir).ok()?;
    f.lock().ok()?;
    Some(f)
}

/// Whether `name` is a temporary file this module writes: `.<name>.<pid>.partial` (a
/// staged file) or `.<name>.<pid>.replaced` (an old file kept aside).
fn is_temporary(name: &str) -> bool {
    let Some(rest) = name.strip_prefix('.') else {
        return false;
    };
    let Some(rest) = rest
        .strip_suffix(".partial")
        .or_else(|| rest.strip_suffix(".replaced"))
    else {
        return false;
    };
    rest.rsplit_once('.').is_some_and(|(stem, pid)| {
        !stem.is_empty() && !pid.is_empty() && pid.bytes().all(|b| b.is_ascii_digit())
    })
}

/// Removes the temporaries in `dir`. Called under the folder's lock, so every one of them
/// is a killed run's.
fn remove_stale(dir: &Path) -> Vec<PathBuf> {
    let Ok(entries) = fs::read_dir(dir) else {
        return Vec::new();
    };
    let mut removed = Vec::new();
    for e in entries.flatten() {
        let name = e.file_name();
        if is_temporary(&name.to_string_lossy()) && fs::remove_file(e.path()).is_ok() {
            removed.push(e.path());
        }
    }
    removed.sort();
    removed
}

fn temporary(target: &Path, what: &str) -> PathBuf {
    let name = target
        .file_name()
        .map_or_else(|| "record".into(), |n| n.to_string_lossy().into_owned());
    folder(target).join(format!(".{name}.{}.{what}", std::process::id()))
}

/// Writes `bytes` in full to a new temporary file beside `target`, synced.
fn stage(target: &Path, bytes: &[u8]) -> Result<PathBuf, RecordError> {
    let temp = temporary(target, "partial");
    let io = |source| RecordError::Io {
        path: target.to_path_buf(),
        source,
    };
    let mut f = File::options()
        .write(true)
        .create_new(true)
        .open(&temp)
        .map_err(io)?;
    let written = f.write_all(bytes).and_then(|_| f.sync_all());
    if let Err(e) = written {
        let _ = fs::remove_file(&temp);
        return Err(io(e));
    }
    Ok(temp)
}

/// Puts a staged file in place; returns the old file's copy kept aside, if it replaced one.
fn place(p: &Pending) -> Result<Option<PathBuf>, RecordError> {
    let io = |source: std::io::Error| {
        if source.kind() == std::io::ErrorKind::AlreadyExists {
            RecordError::Exists(p.target.to_path_buf())
        } else {
            RecordError::Io {
                path: p.target.to_path_buf(),
                source,
            }
        }
    };
    if p.replaces {
        let aside = temporary(p.target, "replaced");
        fs::hard_link(p.target, &aside).map_err(io)?;
        if let Err(e) = fs::rename(&p.temp, p.target) {
            let _ = fs::remove_file(&aside);
            return Err(io(e));
        }
        Ok(Some(aside))
    } else {
        // A hard link fails if the target exists, so a file that appeared since the check
        // is still not overwritten.
        fs::hard_link(&p.temp, p.target).map_err(io)?;
        Ok(None)
    }
}

/// Takes back what `done` placed: new files removed, replaced ones restored.
fn undo(done: &[(&Pending, Option<PathBuf>)]) {
    for (p, aside) in done.iter().rev() {
        // Clean-up after a failure: the failure itself is what is reported.
        match aside {
            Some(a) => {
                let _ = fs::rename(a, p.target);
            }
            None => {
                let _ = fs::remove_file(p.target);
            }
        }
    }
}

fn remove_all<'p>(paths: impl Iterator<Item = &'p Path>) {
    for p in paths {
        // Clean-up after a failure: a file that cannot be removed is reported by the
        // failure being returned, not by this.
        let _ = fs::remove_file(p);
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn scratch(name: &str) -> PathBuf {
        let d = std::env::temp_dir().join(format!("pvhazard-record-{name}-{}", std::process::id()));
        let _ = fs::remove_dir_all(&d);
        fs::create_dir_all(&d).unwrap();
        d
    }

    fn listing(d: &Path) -> Vec<String> {
        let mut v: Vec<String> = fs::read_dir(d)
            .unwrap()
            .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
            .collect();
        v.sort();
        v
    }

    #[test]
    fn slugs_and_stems() {
        assert_eq!(slug("Harbour Road Works (demo)"), "harbour-road-works-demo");
        assert_eq!(
            stem(
                "Bay 4",
                "AR-101",
                "pre-maintenance",
                Some("WO 2291"),
                "2026-03-14"
            ),
            "bay-4_ar-101_pre-maintenance_wo-2291_2026-03-14"
        );
        assert_eq!(stem("x", "y", "t", None, "d"), "x_y_t_no-wo_d");
        assert_eq!(slug("Überlingen Süd"), "uberlingen-sud");
        assert_eq!(slug("Δ-1"), "u3b4-1");
        assert_eq!(slug("#!?"), "");
    }

    #[test]
    fn names_that_cannot_name_a_file_are_refused() {
        for bad in ["", "   ", "#!?", "a\u{7}b", "a\u{202E}b"] {
            assert!(check_name(bad).is_err(), "{bad:?}");
        }
        assert!(check_name(&"w".repeat(49)).unwrap_err().contains("48"));
        assert!(check_name(&"w".repeat(5000))
            .unwrap_err()
            .contains("5000 characters"));
        assert!(check_name("WO 2291").is_ok());
        assert!(check_name(&"w".repeat(48)).is_ok());
        assert_eq!(crate::as_typed("short"), "short");
        assert!(crate::as_typed(&"w".repeat(5000)).ends_with("(5000 characters)"));
    }

    #[test]
    fn temporary_names_are_recognised() {
        assert!(is_temporary(".a.pdf.123.partial"));
        assert!(is_temporary(".a.json.9.replaced"));
        assert!(!is_temporary("a.pdf"));
        assert!(!is_temporary(".a.pdf.x1.partial"));
        assert!(!is_temporary("..partial"));
    }

    #[test]
    fn never_overwrites_without_replace_and_leaves_no_temporary_files() {
        let d = scratch("clobber");
        let a = d.join("a.pdf");
        let b = d.join("a.json");
        let first = Files {
            files: vec![(a.clone(), b"one"), (b.clone(), b"{}")],
        };
        first.write(Mode::Complete).unwrap();
        let second = Files {
            files: vec![(a.clone(), b"two"), (b.clone(), b"{}")],
        };
        assert!(matches!(
            second.write(Mode::Complete),
            Err(RecordError::Exists(_))
        ));
        assert!(matches!(
            first.write(Mode::New),
            Err(RecordError::Exists(_))
        ));
        assert_eq!(fs::read(&a).unwrap(), b"one");
        let w = second.write(Mode::Replace).unwrap();
        assert_eq!(w.placed, vec![a.clone()]);
        assert_eq!(w.kept, vec![b.clone()]);
        assert_eq!(fs::read(&a).unwrap(), b"two");
        assert_eq!(listing(&d), ["a.json", "a.pdf"]);
        fs::remove_dir_all(&d).unwrap();
    }

    #[test]
    fn a_rerun_removes_stale_temporaries_and_completes_an_interrupted_batch() {
        let d = scratch("complete");
        let files: Vec<(PathBuf, &[u8])> = vec![
            (d.join("r1.json"), b"{1}"),
            (d.join("r1.pdf"), b"pdf 1"),
            (d.join("r2.json"), b"{2}"),
            (d.join("r2.pdf"), b"pdf 2"),
        ];
        // What a killed run leaves: one record's JSON linked in, staged copies of the rest.
        fs::write(&files[0].0, files[0].1).unwrap();
        fs::write(d.join(".r1.json.4242.partial"), b"{1}").unwrap();
        fs::write(d.join(".r2.pdf.4242.partial"), b"pdf").unwrap();
        fs::write(d.join(".r1.pdf.4242.replaced"), b"old").unwrap();
        let w = Files { files }.write(Mode::Complete).unwrap();
        assert_eq!(w.stale.len(), 3, "{:?}", w.stale);
        assert_eq!(w.kept, vec![d.join("r1.json")]);
        assert_eq!(w.placed.len(), 3);
        assert_eq!(listing(&d), ["r1.json", "r1.pdf", "r2.json", "r2.pdf"]);
        assert_eq!(fs::read(d.join("r2.pdf")).unwrap(), b"pdf 2");
        fs::remove_dir_all(&d).unwrap();
    }

    #[cfg(unix)]
    #[test]
    fn a_refused_batch_takes_back_what_it_linked_in() {
        let d = scratch("refused");
        // A dangling link reads as missing but refuses the link: the second file fails
        // after the first is placed, as when another writer gets there first.
        std::os::unix::fs::symlink(d.join("nowhere"), d.join("b.pdf")).unwrap();
        let r = Files {
            files: vec![(d.join("a.json"), b"{}"), (d.join("b.pdf"), b"pdf")],
        }
        .write(Mode::Complete);
        assert!(matches!(r, Err(RecordError::Exists(_))), "{r:?}");
        assert_eq!(listing(&d), ["b.pdf"]);
        // A replacement that fails part-way puts the old file back.
        fs::write(d.join("a.json"), b"old").unwrap();
        let r = Files {
            files: vec![(d.join("a.json"), b"new"), (d.join("b.pdf"), b"pdf")],
        }
        .write(Mode::Replace);
        assert!(r.is_err());
        assert_eq!(fs::read(d.join("a.json")).unwrap(), b"old");
        assert_eq!(listing(&d), ["a.json", "b.pdf"]);
        fs::remove_dir_all(&d).unwrap();
    }
}
