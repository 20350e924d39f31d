//! The batch promise of `worksheet`: a batch writes every record or none, a killed run
//! leaves only whole records (and hidden temporaries the next run removes), and rerunning
//! the interrupted command finishes it. Interrupted at every step of the write, killed at
//! timed points, run twice at once, and run on a file system that fills up.

use std::collections::BTreeMap;
use std::os::unix::process::ExitStatusExt;
use std::path::{Path, PathBuf};
use std::process::{Command, Output, Stdio};
use std::time::Instant;

const DATE: &str = "2026-03-14T09:30:00+01:00";
const STOP_AFTER: &str = "PVHAZARD_TEST_STOP_AFTER";

fn site() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("sample_sites/larkspur-fabrication.toml")
}

/// `pvhazard worksheet <larkspur> --all --date DATE --out OUT` with `extra`.
fn batch(out: &Path, extra: &[&str]) -> Command {
    let mut cmd = Command::new(env!("CARGO_BIN_EXE_pvhazard"));
    cmd.arg("worksheet")
        .arg(site())
        .args(["--all", "--date", DATE, "--out"])
        .arg(out)
        .args(extra)
        .env_remove("SOURCE_DATE_EPOCH")
        .env_remove(STOP_AFTER);
    cmd
}

fn run(mut cmd: Command) -> Output {
    cmd.output().expect("pvhazard runs")
}

struct Scratch(PathBuf);

impl Scratch {
    fn new(name: &str) -> Scratch {
        let d = std::env::temp_dir().join(format!("pvhazard-batch-{name}-{}", std::process::id()));
        let _ = std::fs::remove_dir_all(&d);
        std::fs::create_dir_all(&d).expect("a scratch folder");
        Scratch(d)
    }

    fn path(&self, name: &str) -> PathBuf {
        self.0.join(name)
    }
}

impl Drop for Scratch {
    fn drop(&mut self) {
        let _ = std::fs::remove_dir_all(&self.0);
    }
}

/// Every file in `dir` (hidden ones too) with its bytes; empty if there is no folder.
fn files(dir: &Path) -> BTreeMap<String, Vec<u8>> {
    let Ok(entries) = std::fs::read_dir(dir) else {
        return BTreeMap::new();
    };
    entries
        .map(|e| {
            let e = e.expect("a folder entry");
            (
                e.file_name().to_string_lossy().into_owned(),
                std::fs::read(e.path()).expect("a readable file"),
            )
        })
        .collect()
}

/// The complete batch, written once without interruption.
fn reference(scratch: &Scratch) -> BTreeMap<String, Vec<u8>> {
    let out = scratch.path("reference");
    let o = run(batch(&out, &[]));
    assert_eq!(o.status.code(), Some(0), "{o:?}");
    let r = files(&out);
    assert_eq!(r.len(), 6, "three records of two files: {:?}", r.keys());
    r
}

/// What an interrupted run may leave: whole files of the batch, and hidden temporaries.
fn only_whole_records(dir: &Path, whole: &BTreeMap<String, Vec<u8>>, when: &str) -> usize {
    let mut temporaries = 0;
    for (name, bytes) in files(dir) {
        if name.starts_with('.') {
            temporaries += 1;
            continue;
        }
        let expected = whole
            .get(&name)
            .unwrap_or_else(|| panic!("{when}: {name} is not a file of the batch"));
        assert!(bytes == *expected, "{when}: {name} is not whole");
    }
    temporaries
}

/// Rerunning the command finishes the batch: exit 0, exactly its files, no temporaries.
fn rerun_finishes(out: &Path, whole: &BTreeMap<String, Vec<u8>>, temporaries: usize, when: &str) {
    let o = run(batch(out, &[]));
    let stderr = String::from_utf8_lossy(&o.stderr);
    assert_eq!(o.status.code(), Some(0), "{when}: rerun: {stderr}");
    if temporaries > 0 {
        assert!(
            stderr.contains(&format!("removed {temporaries} temporary file(s)")),
            "{when}: {stderr}"
        );
    }
    assert!(files(out) == *whole, "{when}: {:?}", files(out).keys());
}

#[test]
fn a_run_stopped_dead_at_any_step_of_the_write_leaves_whole_records_and_a_rerun_finishes_it() {
    let scratch = Scratch::new("steps");
    let whole = reference(&scratch);
    // Six files: each staged, linked in, and its temporary removed.
    for step in 1..=18 {
        let out = scratch.path(&format!("step-{step}"));
        let mut cmd = batch(&out, &[]);
        cmd.env(STOP_AFTER, step.to_string());
        let o = run(cmd);
        // SIGKILL, or SIGABRT where there is no `kill` to send it.
        assert!(
            matches!(o.status.signal(), Some(9) | Some(6)),
            "step {step}: {o:?}"
        );
        let when = format!("killed after step {step}");
        let temporaries = only_whole_records(&out, &whole, &when);
        // Every step but the last leaves a temporary for the rerun to remove.
        assert_eq!(
            temporaries > 0,
            step < 18,
            "{when}: {temporaries} temporaries"
        );
        rerun_finishes(&out, &whole, temporaries, &when);
    }
}

#[test]
fn a_run_killed_at_timed_points_leaves_whole_records_and_a_rerun_finishes_it() {
    let scratch = Scratch::new("sigkill");
    let whole = reference(&scratch);
    let start = Instant::now();
    run(batch(&scratch.path("timing"), &[]));
    let took = start.elapsed();
    for i in 0..10u32 {
        let out = scratch.path(&format!("kill-{i}"));
        let mut child = batch(&out, &[])
            .stdout(Stdio::null())
            .stderr(Stdio::null())
            .spawn()
            .expect("pvhazard starts");
        std::thread::sleep(took * i / 8);
        let _ = child.kill();
        let status = child.wait().expect("pvhazard ends");
        let when = format!("SIGKILL at {} ms ({status:?})", (took * i / 8).as_millis());
        let temporaries = only_whole_records(&out, &whole, &when);
        rerun_finishes(&out, &whole, temporaries, &when);
    }
}

#[test]
fn two_runs_at_once_in_one_folder_write_one_whole_batch() {
    let scratch = Scratch::new("overlap");
    let whole = reference(&scratch);
    for i in 0..3 {
        // The same command twice: both succeed, one of them finding the other's records.
        let out = scratch.path(&format!("same-{i}"));
        let [a, b] = [0, 1].map(|_| {
            batch(&out, &[])
                .stdout(Stdio::piped())
                .stderr(Stdio::piped())
                .spawn()
                .expect("pvhazard starts")
        });
        let (a, b) = (a.wait_with_output(), b.wait_with_output());
        let (a, b) = (a.expect("pvhazard ends"), b.expect("pvhazard ends"));
        assert_eq!((a.status.code(), b.status.code()), (Some(0), Some(0)));
        assert!(files(&out) == whole);
    }
    for i in 0..3 {
        // Different records of the same names: one batch is written whole, the other is
        // refused and leaves nothing.
        let out = scratch.path(&format!("differ-{i}"));
        let mut other = batch(&out, &["--prepared-by", "B. Other"]);
        let b = other
            .stdout(Stdio::piped())
            .stderr(Stdio::piped())
            .spawn()
            .expect("pvhazard starts");
        let a = run(batch(&out, &[]));
        let b = b.wait_with_output().expect("pvhazard ends");
        let mut codes = [a.status.code(), b.status.code()];
        codes.sort();
        assert_eq!(codes, [Some(0), Some(2)], "{a:?} {b:?}");
        let refused = if a.status.code() == Some(2) { &a } else { &b };
        assert!(String::from_utf8_lossy(&refused.stderr).contains("already exists"));
        let left = files(&out);
        assert_eq!(left.len(), 6, "{:?}", left.keys());
        assert!(left.keys().all(|n| !n.starts_with('.')));
        if a.status.code() == Some(0) {
            assert!(left == whole);
        }
    }
}

/// A small tmpfs, unmounted when dropped.
struct Tmpfs(PathBuf);

impl Tmpfs {
    /// Mounts one, or says why not (this test needs root, as CI runs it).
    fn mount(at: PathBuf, size: &str) -> Result<Tmpfs, String> {
        let uid = std::fs::read_to_string("/proc/self/status")
            .ok()
            .and_then(|s| {
                s.lines()
                    .find_map(|l| l.strip_prefix("Uid:"))
                    .and_then(|l| l.split_whitespace().next().map(str::to_string))
            })
            .unwrap_or_default();
        if uid != "0" {
            return Err(format!("not root (uid {uid}), cannot mount a tmpfs"));
        }
        std::fs::create_dir_all(&at).map_err(|e| e.to_string())?;
        let o = Command::new("mount")
            .args(["-t", "tmpfs", "-o", &format!("size={size}"), "tmpfs"])
            .arg(&at)
            .output()
            .map_err(|e| format!("cannot run mount: {e}"))?;
        if !o.status.success() {
            return Err(format!(
                "mount refused: {}",
                String::from_utf8_lossy(&o.stderr).trim()
            ));
        }
        Ok(Tmpfs(at))
    }
}

impl Drop for Tmpfs {
    fn drop(&mut self) {
        let _ = Command::new("umount").arg(&self.0).status();
    }
}

#[test]
fn a_batch_that_fills_the_disk_writes_nothing_and_one_that_fits_is_written() {
    let scratch = Scratch::new("full");
    let whole = reference(&scratch);
    let total: usize = whole.values().map(Vec::len).sum();
    let disk = match Tmpfs::mount(scratch.path("disk"), "120k") {
        Ok(d) => d,
        Err(why) => {
            println!("skipped: {why}");
            return;
        }
    };
    assert!(total > 120 * 1024, "the batch ({total} bytes) must not fit");
    let out = disk.0.join("out");
    let o = run(batch(&out, &[]));
    let stderr = String::from_utf8_lossy(&o.stderr);
    assert_eq!(o.status.code(), Some(1), "{stderr}");
    assert!(stderr.contains("cannot write"), "{stderr}");
    assert!(files(&out).is_empty(), "{:?}", files(&out).keys());
    // One record fits, and is written whole.
    let o = run({
        let mut c = Command::new(env!("CARGO_BIN_EXE_pvhazard"));
        c.arg("worksheet")
            .arg(site())
            .args(["--tag", "AR-101", "--date", DATE, "--out"])
            .arg(&out)
            .env_remove("SOURCE_DATE_EPOCH");
        c
    });
    assert_eq!(o.status.code(), Some(0), "{o:?}");
    let left = files(&out);
    assert_eq!(left.len(), 2, "{:?}", left.keys());
    for (name, bytes) in &left {
        assert!(whole.get(name) == Some(bytes), "{name} is not whole");
    }
    // Unmounted before the scratch folder goes, so that the mount point can be removed.
    drop(disk);
}

/// `command` on `site` with `threads` threads: its exit code, its standard output with the
/// output folder's path taken out, and the files it wrote.
fn with_threads(
    site: &Path,
    command: &[&str],
    out: &Path,
    threads: &str,
) -> (Option<i32>, String, BTreeMap<String, Vec<u8>>) {
    let mut cmd = Command::new(env!("CARGO_BIN_EXE_pvhazard"));
    cmd.arg(command[0])
        .arg(site)
        .args(&command[1..])
        .env("SOURCE_DATE_EPOCH", "1798761600")
        .env("PVHAZARD_THREADS", threads)
        .env_remove(STOP_AFTER);
    if command[0] == "worksheet" {
        cmd.arg("--out").arg(out);
    }
    let o = run(cmd);
    let stdout = String::from_utf8_lossy(&o.stdout).replace(&out.display().to_string(), "OUT");
    (o.status.code(), stdout, files(out))
}

#[test]
fn one_thread_and_several_give_the_same_bytes_and_the_same_order() {
    let scratch = Scratch::new("threads");
    let sites = Path::new(env!("CARGO_MANIFEST_DIR")).join("sample_sites");
    for site in ["larkspur-fabrication.toml", "kestrel-fill-room.toml"] {
        for command in [
            &["worksheet", "--all"][..],
            &["check"][..],
            &["check", "--json"][..],
        ] {
            let runs: Vec<_> = ["1", "2", "5"]
                .iter()
                .map(|t| {
                    let out = scratch.path(&format!("{site}-{}-{t}", command.join("")));
                    with_threads(&sites.join(site), command, &out, t)
                })
                .collect();
            assert!(runs[0].0 == Some(0) || runs[0].0 == Some(3), "{runs:?}");
            assert!(!runs[0].1.is_empty());
            assert_eq!(runs[0].2.is_empty(), command[0] == "check", "{runs:?}");
            for other in &runs[1..] {
                assert!(other == &runs[0], "{site} {command:?}: {other:?}");
            }
        }
    }
}

#[test]
fn like_items_computed_once_give_the_bytes_each_gives_alone() {
    let scratch = Scratch::new("memo");
    // The sample site with a second receiver like AR-101 under another tag and description,
    // and a third like it but for its pressure.
    let text = std::fs::read_to_string(site()).expect("the sample site");
    let first = text
        .split("[[vessel]]")
        .nth(1)
        .expect("the first vessel")
        .to_string();
    let twin = first
        .replace("AR-101", "AR-909")
        .replace("no. 1\"", "no. 9, like no. 1\"");
    let other = first.replace("AR-101", "AR-910").replace(
        "operating_pressure = \"10 barg\"",
        "operating_pressure = \"9 barg\"",
    );
    assert!(twin != first && other.contains("9 barg"));
    let path = scratch.path("site.toml");
    std::fs::write(
        &path,
        format!("{text}\n[[vessel]]{twin}\n[[vessel]]{other}"),
    )
    .unwrap();
    let run_site = |out: &Path, extra: &[&str]| {
        let mut cmd = Command::new(env!("CARGO_BIN_EXE_pvhazard"));
        cmd.arg("worksheet")
            .arg(&path)
            .args(["--date", DATE, "--out"])
            .arg(out)
            .args(extra)
            .env_remove("SOURCE_DATE_EPOCH");
        let o = run(cmd);
        assert_eq!(o.status.code(), Some(0), "{o:?}");
        files(out)
    };
    let batch = run_site(&scratch.path("all"), &["--all"]);
    assert_eq!(batch.len(), 10, "{:?}", batch.keys());
    for tag in ["AR-909", "AR-910"] {
        let alone = run_site(&scratch.path(tag), &["--tag", tag]);
        assert_eq!(alone.len(), 2);
        for (name, bytes) in &alone {
            assert!(
                batch.get(name) == Some(bytes),
                "{name} differs in the batch"
            );
        }
    }
    // The twin's record differs from AR-101's in its tag and description only.
    let record = |tag: &str| -> serde_json::Value {
        let (_, bytes) = batch
            .iter()
            .find(|(n, _)| n.contains(&tag.to_lowercase()) && n.ends_with(".json"))
            .expect("the record");
        serde_json::from_slice(bytes).expect("JSON")
    };
    let (a, b) = (record("AR-101"), record("AR-909"));
    assert_eq!(a["results"], b["results"]);
    assert_eq!(a["verdict"], b["verdict"]);
    assert_ne!(a["fingerprint"], b["fingerprint"]);
    assert_ne!(record("AR-910")["results"], a["results"]);
}
