//! Keeping records: file names that say what a worksheet is, and writes that never
//! overwrite a record by accident and never leave half a file behind.

use std::fs::{self, File};
use std::io::Write;
use std::path::{Path, PathBuf};

/// Why a record could not be written.
#[derive(Debug, thiserror::Error)]
pub enum RecordError {
    /// A record of that name is already there; records are never overwritten silently.
    #[error("{} already exists; records are never overwritten: pass --force to replace it, or give another --work-order, --date or --out", .0.display())]
    Exists(PathBuf),
    /// The file system refused.
    #[error("cannot write {}: {source}", path.display())]
    Io {
        /// The file being written.
        path: PathBuf,
        /// The underlying error.
        source: std::io::Error,
    },
}

/// A file-name part: lower-case letters, digits and hyphens only.
pub fn slug(text: &str) -> String {
    let mut out = String::new();
    for c in text.chars() {
        if c.is_ascii_alphanumeric() {
            out.push(c.to_ascii_lowercase());
        } else if !out.ends_with('-') && !out.is_empty() {
            out.push('-');
        }
    }
    let trimmed = out.trim_end_matches('-');
    if trimmed.is_empty() {
        "x".to_string()
    } else {
        trimmed.to_string()
    }
}

/// The file stem of a worksheet: site, tag, template, work order and date, e.g.
/// `harbour-road-works_ar-101_pre-maintenance_wo-2291_2026-03-14`.
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

/// The files of one record: each target path and its bytes.
pub struct Files<'a> {
    /// (target path, contents), written together.
    pub files: Vec<(PathBuf, &'a [u8])>,
}

impl Files<'_> {
    /// The targets that already exist.
    pub fn existing(&self) -> Vec<&Path> {
        self.files
            .iter()
            .map(|(p, _)| p.as_path())
            .filter(|p| p.exists())
            .collect()
    }

    /// Writes every file, each first to a temporary file in the same folder and synced, then
    /// moved into place: linked without replacing (refused if the target appeared), or with
    /// `force` renamed over the old one. A failure part-way removes what this call placed.
    pub fn write(&self, force: bool) -> Result<Vec<PathBuf>, RecordError> {
        if !force {
            if let Some(p) = self.existing().first() {
                return Err(RecordError::Exists(p.to_path_buf()));
            }
        }
        let mut temps = Vec::new();
        for (target, bytes) in &self.files {
            match write_temp(target, bytes) {
                Ok(t) => temps.push(t),
                Err(e) => {
                    remove_all(&temps);
                    return Err(e);
                }
            }
        }
        let mut placed: Vec<PathBuf> = Vec::new();
        for ((target, _), temp) in self.files.iter().zip(&temps) {
            let moved = if force {
                fs::rename(temp, target)
            } else {
                // A hard link fails if the target exists, so a record that appeared since
                // the check above is still not overwritten.
                fs::hard_link(temp, target).and_then(|_| fs::remove_file(temp))
            };
            if let Err(source) = moved {
                remove_all(&temps);
                if !force {
                    remove_all(&placed);
                }
                return Err(if source.kind() == std::io::ErrorKind::AlreadyExists {
                    RecordError::Exists(target.clone())
                } else {
                    RecordError::Io {
                        path: target.clone(),
                        source,
                    }
                });
            }
            placed.push(target.clone());
        }
        Ok(placed)
    }
}

fn write_temp(target: &Path, bytes: &[u8]) -> Result<PathBuf, RecordError> {
    let dir = target.parent().unwrap_or(Path::new("."));
    let name = target
        .file_name()
        .map_or_else(|| "record".into(), |n| n.to_string_lossy().into_owned());
    let temp = dir.join(format!(".{name}.{}.partial", std::process::id()));
    let io = |source| RecordError::Io {
        path: temp.clone(),
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

fn remove_all(paths: &[PathBuf]) {
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
    }

    #[test]
    fn never_overwrites_without_force_and_leaves_no_temporary_files() {
        let d = scratch("clobber");
        let a = d.join("a.pdf");
        let b = d.join("a.json");
        let first = Files {
            files: vec![(a.clone(), b"one"), (b.clone(), b"{}")],
        };
        first.write(false).unwrap();
        let second = Files {
            files: vec![(a.clone(), b"two"), (b.clone(), b"{}")],
        };
        assert!(matches!(second.write(false), Err(RecordError::Exists(_))));
        assert_eq!(fs::read(&a).unwrap(), b"one");
        second.write(true).unwrap();
        assert_eq!(fs::read(&a).unwrap(), b"two");
        let left: Vec<_> = fs::read_dir(&d)
            .unwrap()
            .map(|e| e.unwrap().file_name())
            .collect();
        assert_eq!(left.len(), 2, "{left:?}");
        fs::remove_dir_all(&d).unwrap();
    }
}
