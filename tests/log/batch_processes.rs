//! Real processes on one file: a writer killed with SIGKILL at random moments (every
//! batch whose command reported success must be there, and the file must pass
//! `gelu db check`), and four processes adding batches at once (none may see
//! "database is locked", and every batch must be there).

use std::path::Path;
use std::process::{Command, Stdio};
use std::time::{Duration, Instant};

use crate::batch_common::{VANILLA, gelu};

fn new_batch(db: &Path, note: &str) -> Command {
    let mut cmd = gelu(db);
    cmd.args([
        "batch",
        "new",
        VANILLA,
        "--size",
        "2kg",
        "--lot",
        "sucrose=S-1",
        "--note",
        note,
    ]);
    cmd
}

/// Codes of every batch in the file, via the command line.
fn codes_in(db: &Path) -> Vec<String> {
    let out = gelu(db)
        .args(["batch", "list", "--limit", "0"])
        .output()
        .unwrap();
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    String::from_utf8(out.stdout)
        .unwrap()
        .lines()
        .filter_map(|l| l.split_whitespace().next().map(str::to_owned))
        .collect()
}

/// A small deterministic random sequence (xorshift), seeded from the clock.
struct Random(u64);

impl Random {
    fn next(&mut self) -> u64 {
        self.0 ^= self.0 << 13;
        self.0 ^= self.0 >> 7;
        self.0 ^= self.0 << 17;
        self.0
    }
}

#[test]
fn a_writer_killed_at_random_moments_loses_nothing_it_reported() {
    let dir = tempfile::tempdir().unwrap();
    let db = dir.path().join("crash.db");
    // One clean run creates the file; a second shows how long a write takes.
    assert!(new_batch(&db, "warm-up").status().unwrap().success());
    let started = Instant::now();
    assert!(new_batch(&db, "timing").status().unwrap().success());
    let typical = started.elapsed().max(Duration::from_millis(5));

    let seed = std::time::SystemTime::now()
        .duration_since(std::time::UNIX_EPOCH)
        .unwrap()
        .as_nanos() as u64
        | 1;
    eprintln!("random seed {seed}, typical write {typical:?}");
    let mut random = Random(seed);
    let mut reported = vec![];
    let (mut killed, mut finished) = (0, 0);
    let budget = Instant::now();
    while budget.elapsed() < Duration::from_secs(4) {
        let mut child = new_batch(&db, "crash test")
            .stdout(Stdio::piped())
            .stderr(Stdio::null())
            .spawn()
            .unwrap();
        let delay_us = random.next() % (typical.as_micros() as u64 + 1);
        std::thread::sleep(Duration::from_micros(delay_us));
        let _ = child.kill(); // SIGKILL on Unix; harmless if it already exited
        let out = child.wait_with_output().unwrap();
        if out.status.success() {
            finished += 1;
            reported.push(String::from_utf8(out.stdout).unwrap().trim().to_owned());
        } else {
            killed += 1;
        }
    }
    eprintln!("{killed} writers killed, {finished} reported success");
    assert!(killed > 0, "some writers must have been killed mid-way");

    let present = codes_in(&db);
    for code in &reported {
        assert!(present.contains(code), "{code} was reported but is missing");
    }
    let check = gelu(&db).args(["db", "check"]).output().unwrap();
    assert!(
        check.status.success(),
        "{}",
        String::from_utf8_lossy(&check.stdout)
    );
    // And the file still takes writes.
    assert!(
        new_batch(&db, "after the crashes")
            .status()
            .unwrap()
            .success()
    );
}

#[test]
fn four_processes_adding_batches_at_once_all_get_through() {
    let dir = tempfile::tempdir().unwrap();
    // A file that does not exist yet: the four also race to create and migrate it.
    let db = dir.path().join("shared.db");
    const EACH: usize = 6;
    let workers: Vec<_> = (0..4)
        .map(|w| {
            let db = db.clone();
            std::thread::spawn(move || {
                let mut codes = Vec::new();
                for i in 0..EACH {
                    let out = new_batch(&db, &format!("worker {w} batch {i}"))
                        .output()
                        .unwrap();
                    let stderr = String::from_utf8_lossy(&out.stderr).to_lowercase();
                    assert!(
                        !stderr.contains("locked") && !stderr.contains("busy"),
                        "{stderr}"
                    );
                    assert!(out.status.success(), "worker {w}: {stderr}");
                    codes.push(String::from_utf8(out.stdout).unwrap().trim().to_owned());
                }
                codes
            })
        })
        .collect();
    let mut reported: Vec<String> = workers
        .into_iter()
        .flat_map(|h| h.join().unwrap())
        .collect();
    reported.sort();
    let before = reported.len();
    reported.dedup();
    assert_eq!(before, reported.len(), "codes are unique");
    assert_eq!(reported.len(), 4 * EACH);
    let mut present = codes_in(&db);
    present.sort();
    assert_eq!(present, reported);
    let check = gelu(&db).args(["db", "check"]).output().unwrap();
    assert!(check.status.success());
}

#[test]
fn a_backup_taken_while_another_process_writes_is_whole() {
    let dir = tempfile::tempdir().unwrap();
    let db = dir.path().join("busy.db");
    assert!(new_batch(&db, "before").status().unwrap().success());
    let writer = {
        let db = db.clone();
        std::thread::spawn(move || {
            (0..8).all(|i| {
                new_batch(&db, &format!("during {i}"))
                    .status()
                    .unwrap()
                    .success()
            })
        })
    };
    std::thread::sleep(Duration::from_millis(150));
    let copy = dir.path().join("copy.db");
    let out = gelu(&db)
        .args(["db", "backup"])
        .arg(&copy)
        .output()
        .unwrap();
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    assert!(writer.join().unwrap(), "the writer was not disturbed");
    let check = gelu(&copy).args(["db", "check"]).output().unwrap();
    assert!(
        check.status.success(),
        "{}",
        String::from_utf8_lossy(&check.stdout)
    );
    let in_copy = codes_in(&copy);
    assert!(!in_copy.is_empty());
    let in_original = codes_in(&db);
    assert_eq!(in_original.len(), 9);
    assert!(in_copy.iter().all(|c| in_original.contains(c)));
}
