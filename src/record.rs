//! Keeping records: file names that say what a worksheet is, and writes that never
//! overwrite a record by accident and never leave half a file or half a batch behind.
//!
//! A batch is written in three steps, under a lock on its folder: every file is staged in
//! full (a hidden temporary file), all of them synced, then each is linked in under its
//! name, then the temporaries go. A failure removes what this run linked in. A run that is killed leaves
//! hidden temporaries and perhaps some of its records: the next write in that folder removes
//! the temporaries (and says so), and a record already there with the same bytes counts as
//! written, so rerunning the interrupted command finishes its batch.

use std::fs::{self, File};
use std::io::Write;
use std::path::{Path, PathBuf};
use std::sync::Mutex;

/// Why a record could not be written.
#[derive(Debug, thiserror::Error)]
pub enum RecordError {
    /// A different file of that name is already there; records are never overwritten
    /// silently.
    #[error("{} already exists and holds a different record; records are never overwritten: pass --force to replace it, or give another --work-order, --date or --out (to finish an interrupted run, repeat it with the same --date)", .0.display())]
    Exists(PathBuf),
    /// The folder could not be made.
    #[error("cannot create the folder {}: {source}", path.display())]
    Folder {
        /// The folder.
        path: PathBuf,
        /// The underlying error.
        source: std::io::Error,
    },
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

/// A staged file: its target, its order in the batch, whether it replaces one, and its
/// staged copy.
struct Pending {
    target: PathBuf,
    order: usize,
    replaces: bool,
    temp: PathBuf,
}

/// One batch of files written into one folder together: every file or none.
///
/// [`Batch::open`] takes a lock on the folder (a second run in the same folder waits) and
/// removes the temporaries a killed run left there. [`Batch::add`] stages a file in full
/// as a hidden temporary; it may be called from several threads at once, so that nothing
/// but the files themselves is held while a long batch is computed. [`Batch::commit`] syncs
/// every staged file, then links each in under its name (a hard link, which never replaces, or with
/// [`Mode::Replace`] a rename after keeping the old file aside), in the order of the batch.
/// Any failure takes back what the commit linked in and puts back what it replaced; a batch
/// dropped without a commit removes its temporaries, and the folder if it made it and it is
/// empty.
pub struct Batch {
    dir: PathBuf,
    mode: Mode,
    made_dir: bool,
    // Held until the batch ends; dropping the file releases its lock.
    _lock: Option<File>,
    state: Mutex<State>,
}

struct State {
    pending: Vec<Pending>,
    written: Written,
    stop: Stop,
}

impl Batch {
    /// Opens a batch in `dir`, creating the folder if it is missing.
    pub fn open(dir: &Path, mode: Mode) -> Result<Batch, RecordError> {
        let made_dir = !dir.is_dir();
        fs::create_dir_all(dir).map_err(|source| RecordError::Folder {
            path: dir.to_path_buf(),
            source,
        })?;
        let lock = lock(dir);
        let written = Written {
            stale: remove_stale(dir),
            ..Written::default()
        };
        Ok(Batch {
            dir: dir.to_path_buf(),
            mode,
            made_dir,
            _lock: lock,
            state: Mutex::new(State {
                pending: Vec::new(),
                written,
                stop: Stop::from_env(),
            }),
        })
    }

    /// The folder the batch writes into.
    pub fn dir(&self) -> &Path {
        &self.dir
    }

    /// Stages `bytes` as the file `name` in the batch's folder, `order` placing it among
    /// the batch's files when they are linked in. A file already there is refused, or with
    /// [`Mode::Complete`] counted as written if it holds the same bytes.
    pub fn add(&self, name: &str, order: usize, bytes: &[u8]) -> Result<(), RecordError> {
        let target = self.dir.join(name);
        let replaces = match fs::read(&target) {
            Ok(old) if old == bytes && self.mode != Mode::New => {
                self.state().written.kept.push(target);
                return Ok(());
            }
            Ok(_) if self.mode == Mode::Replace => true,
            Ok(_) => return Err(RecordError::Exists(target)),
            Err(e) if e.kind() == std::io::ErrorKind::NotFound => false,
            Err(source) => {
                return Err(RecordError::Io {
                    path: target,
                    source,
                })
            }
        };
        let temp = stage(&target, bytes)?;
        let mut state = self.state();
        state.pending.push(Pending {
            target,
            order,
            replaces,
            temp,
        });
        state.stop.step();
        Ok(())
    }

    /// Links every staged file in, in the batch's order; every one or none.
    pub fn commit(self) -> Result<Written, RecordError> {
        let mut state = self.state();
        let State {
            pending,
            written,
            stop,
        } = &mut *state;
        pending.sort_by_key(|p| p.order);
        written.kept.sort();
        sync_staged(pending)?;
        let mut done: Vec<(&Pending, Option<PathBuf>)> = Vec::new();
        for p in pending.iter() {
            match place(p) {
                Ok(aside) => {
                    done.push((p, aside));
                    stop.step();
                }
                Err(e) => {
                    undo(&done);
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
            written.placed.push(p.target.clone());
        }
        pending.clear();
        // The names are in place once the folder is synced; a folder that cannot be opened
        // for it (some platforms) is left to the file system.
        if let Ok(f) = File::open(&self.dir) {
            let _ = f.sync_all();
        }
        Ok(std::mem::take(written))
    }

    fn state(&self) -> std::sync::MutexGuard<'_, State> {
        // A thread that panicked while holding the lock leaves the list whole: each push is
        // one step.
        self.state.lock().unwrap_or_else(|e| e.into_inner())
    }
}

impl Drop for Batch {
    fn drop(&mut self) {
        let state = self.state.get_mut().unwrap_or_else(|e| e.into_inner());
        remove_all(state.pending.iter().map(|p| p.temp.as_path()));
        if self.made_dir {
            // Only an empty folder goes: what is left in it is not this run's to remove.
            let _ = fs::remove_dir(&self.dir);
        }
    }
}

/// Writes one file as a batch of its own in its folder.
pub fn write_one(target: &Path, bytes: &[u8], mode: Mode) -> Result<Written, RecordError> {
    let name = target
        .file_name()
        .map(|n| n.to_string_lossy().into_owned())
        .ok_or_else(|| RecordError::Io {
            path: target.to_path_buf(),
            source: std::io::Error::new(std::io::ErrorKind::InvalidInput, "not a file name"),
        })?;
    let batch = Batch::open(folder(target), mode)?;
    batch.add(&name, 0, bytes)?;
    batch.commit()
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

/// Writes `bytes` in full to a new temporary file beside `target`. It is synced with the
/// rest of the batch at the commit ([`sync_staged`]).
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
    if let Err(e) = f.write_all(bytes) {
        let _ = fs::remove_file(&temp);
        return Err(io(e));
    }
    Ok(temp)
}

/// Syncs every staged file before any is linked in, so that a name never points at a file
/// the disk does not hold in full. The syncs run on several threads at once: the file
/// system commits them together, where one after another each would wait for the disk.
fn sync_staged(pending: &[Pending]) -> Result<(), RecordError> {
    const AT_ONCE: usize = 16;
    let sync = |p: &Pending| {
        File::options()
            .write(true)
            .open(&p.temp)
            .and_then(|f| f.sync_all())
            .map_err(|source| RecordError::Io {
                path: p.target.clone(),
                source,
            })
    };
    let per_thread = pending.len().div_ceil(AT_ONCE).max(1);
    std::thread::scope(|s| {
        let threads: Vec<_> = pending
            .chunks(per_thread)
            .map(|chunk| s.spawn(move || chunk.iter().try_for_each(sync)))
            .collect();
        threads.into_iter().try_for_each(|t| {
            t.join().unwrap_or_else(|_| {
                Err(RecordError::Io {
                    path: PathBuf::from("(a staged file)"),
                    source: std::io::Error::other("a sync thread failed"),
                })
            })
        })
    })
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
        let aside = temporary(&p.target, "replaced");
        fs::hard_link(&p.target, &aside).map_err(io)?;
        if let Err(e) = fs::rename(&p.temp, &p.target) {
            let _ = fs::remove_file(&aside);
            return Err(io(e));
        }
        Ok(Some(aside))
    } else {
        // A hard link fails if the target exists, so a file that appeared since the check
        // is still not overwritten.
        fs::hard_link(&p.temp, &p.target).map_err(io)?;
        Ok(None)
    }
}

/// Takes back what `done` placed: new files removed, replaced ones restored.
fn undo(done: &[(&Pending, Option<PathBuf>)]) {
    for (p, aside) in done.iter().rev() {
        // Clean-up after a failure: the failure itself is what is reported.
        match aside {
            Some(a) => {
                let _ = fs::rename(a, &p.target);
            }
            None => {
                let _ = fs::remove_file(&p.target);
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
        assert_eq!(crate::as_typed("a\u{7}b\u{202E}"), "a\\u{7}b\\u{202e}");
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

    /// Writes `files` (name, bytes) as one batch in `d`.
    fn write(d: &Path, files: &[(&str, &[u8])], mode: Mode) -> Result<Written, RecordError> {
        let batch = Batch::open(d, mode)?;
        for (order, (name, bytes)) in files.iter().enumerate() {
            batch.add(name, order, bytes)?;
        }
        batch.commit()
    }

    #[test]
    fn never_overwrites_without_replace_and_leaves_no_temporary_files() {
        let d = scratch("clobber");
        let first: &[(&str, &[u8])] = &[("a.pdf", b"one"), ("a.json", b"{}")];
        let second: &[(&str, &[u8])] = &[("a.pdf", b"two"), ("a.json", b"{}")];
        write(&d, first, Mode::Complete).unwrap();
        assert!(matches!(
            write(&d, second, Mode::Complete),
            Err(RecordError::Exists(_))
        ));
        assert!(matches!(
            write(&d, first, Mode::New),
            Err(RecordError::Exists(_))
        ));
        assert_eq!(fs::read(d.join("a.pdf")).unwrap(), b"one");
        let w = write(&d, second, Mode::Replace).unwrap();
        assert_eq!(w.placed, vec![d.join("a.pdf")]);
        assert_eq!(w.kept, vec![d.join("a.json")]);
        assert_eq!(fs::read(d.join("a.pdf")).unwrap(), b"two");
        assert_eq!(listing(&d), ["a.json", "a.pdf"]);
        fs::remove_dir_all(&d).unwrap();
    }

    #[test]
    fn a_rerun_removes_stale_temporaries_and_completes_an_interrupted_batch() {
        let d = scratch("complete");
        let files: &[(&str, &[u8])] = &[
            ("r1.json", b"{1}"),
            ("r1.pdf", b"pdf 1"),
            ("r2.json", b"{2}"),
            ("r2.pdf", b"pdf 2"),
        ];
        // What a killed run leaves: one record's JSON linked in, staged copies of the rest.
        fs::write(d.join(files[0].0), files[0].1).unwrap();
        fs::write(d.join(".r1.json.4242.partial"), b"{1}").unwrap();
        fs::write(d.join(".r2.pdf.4242.partial"), b"pdf").unwrap();
        fs::write(d.join(".r1.pdf.4242.replaced"), b"old").unwrap();
        let w = write(&d, files, Mode::Complete).unwrap();
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
        let r = write(&d, &[("a.json", b"{}"), ("b.pdf", b"pdf")], Mode::Complete);
        assert!(matches!(r, Err(RecordError::Exists(_))), "{r:?}");
        assert_eq!(listing(&d), ["b.pdf"]);
        // A replacement that fails part-way puts the old file back.
        fs::write(d.join("a.json"), b"old").unwrap();
        let r = write(&d, &[("a.json", b"new"), ("b.pdf", b"pdf")], Mode::Replace);
        assert!(r.is_err());
        assert_eq!(fs::read(d.join("a.json")).unwrap(), b"old");
        assert_eq!(listing(&d), ["a.json", "b.pdf"]);
        fs::remove_dir_all(&d).unwrap();
    }

    #[test]
    fn files_staged_from_several_threads_are_linked_in_the_batch_order() {
        let d = scratch("threads");
        let out = d.join("made");
        let batch = Batch::open(&out, Mode::New).unwrap();
        std::thread::scope(|s| {
            for t in 0..4 {
                let batch = &batch;
                s.spawn(move || {
                    for i in (t..40).step_by(4) {
                        batch.add(&format!("r{i:02}"), 39 - i, b"x").unwrap();
                    }
                });
            }
        });
        let w = batch.commit().unwrap();
        let names: Vec<String> = w
            .placed
            .iter()
            .map(|p| p.file_name().unwrap().to_string_lossy().into_owned())
            .collect();
        let expected: Vec<String> = (0..40).rev().map(|i| format!("r{i:02}")).collect();
        assert_eq!(names, expected);
        assert_eq!(listing(&out).len(), 40);
        fs::remove_dir_all(&d).unwrap();
    }

    #[test]
    fn a_batch_dropped_without_a_commit_leaves_nothing_not_even_its_folder() {
        let d = scratch("dropped");
        let out = d.join("made");
        let batch = Batch::open(&out, Mode::New).unwrap();
        batch.add("a.pdf", 0, b"pdf").unwrap();
        assert_eq!(listing(&out).len(), 1, "the staged temporary");
        drop(batch);
        assert!(!out.exists());
        // A folder that was there stays, with what was in it.
        fs::create_dir_all(&out).unwrap();
        fs::write(out.join("keep.txt"), b"k").unwrap();
        let batch = Batch::open(&out, Mode::New).unwrap();
        batch.add("b.pdf", 0, b"pdf").unwrap();
        drop(batch);
        assert_eq!(listing(&out), ["keep.txt"]);
        fs::remove_dir_all(&d).unwrap();
    }
}
