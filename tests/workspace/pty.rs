//! End-to-end runs of the real `gelu` binary in a pseudo-terminal: keys are
//! typed, the parsed screen (vt100) is read, and on exit the terminal must be
//! restored (main screen back, cursor shown).

use std::io::{Read, Write};
use std::sync::{Arc, Mutex};
use std::time::{Duration, Instant};

use portable_pty::{CommandBuilder, PtySize, native_pty_system};

/// Longest wait for the screen to show something (generous: machines are shared).
const PATIENCE: Duration = Duration::from_secs(30);

struct Session {
    parser: Arc<Mutex<vt100::Parser>>,
    writer: Box<dyn Write + Send>,
    child: Box<dyn portable_pty::Child + Send + Sync>,
    _master: Box<dyn portable_pty::MasterPty + Send>,
}

impl Session {
    fn start(db: &std::path::Path, cols: u16, rows: u16) -> Session {
        Session::start_with(db, &[], cols, rows, true)
    }

    fn start_with(
        db: &std::path::Path,
        args: &[&std::path::Path],
        cols: u16,
        rows: u16,
        no_color: bool,
    ) -> Session {
        let pty = native_pty_system();
        let pair = match pty.openpty(PtySize {
            rows,
            cols,
            pixel_width: 0,
            pixel_height: 0,
        }) {
            Ok(p) => p,
            Err(e) => panic!("openpty: {e}"),
        };
        let mut cmd = CommandBuilder::new(env!("CARGO_BIN_EXE_gelu"));
        cmd.arg("--db");
        cmd.arg(db);
        for a in args {
            cmd.arg(a);
        }
        cmd.env("TERM", "xterm-256color");
        if no_color {
            cmd.env("NO_COLOR", "1");
        } else {
            cmd.env_remove("NO_COLOR");
        }
        cmd.env_remove("GELU_DB");
        let child = match pair.slave.spawn_command(cmd) {
            Ok(c) => c,
            Err(e) => panic!("spawn: {e}"),
        };
        drop(pair.slave);
        let mut reader = match pair.master.try_clone_reader() {
            Ok(r) => r,
            Err(e) => panic!("reader: {e}"),
        };
        let writer = match pair.master.take_writer() {
            Ok(w) => w,
            Err(e) => panic!("writer: {e}"),
        };
        let parser = Arc::new(Mutex::new(vt100::Parser::new(rows, cols, 0)));
        let sink = Arc::clone(&parser);
        std::thread::spawn(move || {
            let mut buf = [0u8; 8192];
            while let Ok(n) = reader.read(&mut buf) {
                if n == 0 {
                    break;
                }
                if let Ok(mut p) = sink.lock() {
                    p.process(&buf[..n]);
                }
            }
        });
        Session {
            parser,
            writer,
            child,
            _master: pair.master,
        }
    }

    fn screen(&self) -> String {
        match self.parser.lock() {
            Ok(p) => p.screen().contents(),
            Err(e) => panic!("parser lock: {e}"),
        }
    }

    fn keys(&mut self, bytes: &str) {
        if let Err(e) = self.writer.write_all(bytes.as_bytes()) {
            panic!("write keys: {e}");
        }
        let _ = self.writer.flush();
        // One key at a time lets the workspace redraw between them, as a person would.
        std::thread::sleep(Duration::from_millis(30));
    }

    fn type_slowly(&mut self, text: &str) {
        for c in text.chars() {
            self.keys(&c.to_string());
        }
    }

    fn wait_for(&self, what: impl Fn(&str) -> bool, label: &str) -> String {
        let start = Instant::now();
        loop {
            let screen = self.screen();
            if what(&screen) {
                return screen;
            }
            if start.elapsed() > PATIENCE {
                panic!("waited for {label}; the screen shows:\n{screen}");
            }
            std::thread::sleep(Duration::from_millis(50));
        }
    }

    fn wait_exit(&mut self) {
        let start = Instant::now();
        loop {
            match self.child.try_wait() {
                Ok(Some(status)) => {
                    assert!(status.success(), "gelu exited with {status:?}");
                    return;
                }
                Ok(None) if start.elapsed() < PATIENCE => {
                    std::thread::sleep(Duration::from_millis(50))
                }
                Ok(None) => panic!("gelu did not exit; screen:\n{}", self.screen()),
                Err(e) => panic!("wait: {e}"),
            }
        }
    }

    /// How many cells of the screen have a foreground colour of their own.
    fn coloured_cells(&self) -> usize {
        match self.parser.lock() {
            Ok(p) => {
                let screen = p.screen();
                let (rows, cols) = screen.size();
                (0..rows)
                    .flat_map(|r| (0..cols).map(move |c| (r, c)))
                    .filter(|&(r, c)| {
                        screen
                            .cell(r, c)
                            .is_some_and(|cell| cell.fgcolor() != vt100::Color::Default)
                    })
                    .count()
            }
            Err(e) => panic!("parser lock: {e}"),
        }
    }

    /// Saves back to the file (Ctrl-S), waits for the layout to be kept, quits
    /// and returns the file's text.
    fn save_back_and_quit(&mut self, file: &std::path::Path) -> String {
        self.keys("\x13"); // Ctrl-S saves back to the file
        self.wait_for(
            |t| t.contains("comments and layout kept"),
            "the save message",
        );
        self.keys("q");
        self.wait_exit();
        std::fs::read_to_string(file).unwrap_or_default()
    }

    fn restored(&self) -> (bool, bool) {
        // Give the reader thread a moment to take in the last bytes.
        std::thread::sleep(Duration::from_millis(200));
        match self.parser.lock() {
            Ok(p) => (p.screen().alternate_screen(), p.screen().hide_cursor()),
            Err(e) => panic!("parser lock: {e}"),
        }
    }
}

/// The freezing point text on the recipe screen, e.g. "-2.8 °C".
fn freezing_point(screen: &str) -> Option<String> {
    let line = screen.lines().find(|l| l.contains("Freezing point"))?;
    let after = line.split("Freezing point").nth(1)?;
    let value = after.split('│').next()?.trim();
    (!value.is_empty()).then(|| value.to_string())
}

/// `gelu edit` on a new file holding `text`, in a fresh folder with its own
/// batch log, without colour: the folder (kept alive), the file and the session.
fn edit_file(
    name: &str,
    text: &str,
    cols: u16,
    rows: u16,
) -> (tempfile::TempDir, std::path::PathBuf, Session) {
    let dir = match tempfile::tempdir() {
        Ok(d) => d,
        Err(e) => panic!("tempdir: {e}"),
    };
    let file = dir.path().join(name);
    if let Err(e) = std::fs::write(&file, text) {
        panic!("{e}");
    }
    let edit = std::path::Path::new("edit");
    let s = Session::start_with(&dir.path().join("log.db"), &[edit, &file], cols, rows, true);
    (dir, file, s)
}

const ENTER: &str = "\r";
const ESC: &str = "\x1b";
const TAB: &str = "\t";

#[test]
fn adding_sugar_changes_the_freezing_point_and_a_batch_lands_in_the_log() {
    let dir = match tempfile::tempdir() {
        Ok(d) => d,
        Err(e) => panic!("tempdir: {e}"),
    };
    let db = dir.path().join("log.db");
    let mut s = Session::start(&db, 120, 40);
    let first = s.wait_for(|t| freezing_point(t).is_some(), "the recipe screen");
    let before = freezing_point(&first);
    assert!(first.contains("Key figures"));
    assert_eq!(s.coloured_cells(), 0, "NO_COLOR is set: no colour at all");

    s.keys("a");
    s.wait_for(|t| t.contains("Add a line"), "the picker");
    s.type_slowly("sucrose");
    s.keys(ENTER);
    s.wait_for(|t| t.contains("Amount of Sucrose"), "the amount prompt");
    s.type_slowly("250");
    s.keys(ENTER);
    let after = s.wait_for(
        |t| freezing_point(t).is_some() && freezing_point(t) != before,
        "the freezing point to change",
    );
    assert!(
        after.contains("Sucrose"),
        "the new line is on screen:\n{after}"
    );

    // Record a batch of it: size as proposed, an operator, no lots.
    s.keys("b");
    s.wait_for(|t| t.contains("New batch of"), "the batch form");
    s.keys(TAB);
    s.type_slowly("RW");
    s.keys(ENTER);
    let detail = s.wait_for(
        |t| t.contains("Recorded batch B-"),
        "the batch to be recorded",
    );
    let code = detail
        .split("Recorded batch ")
        .nth(1)
        .and_then(|rest| rest.split_whitespace().next())
        .map(str::to_string);
    let Some(code) = code else {
        panic!("no batch code on screen:\n{detail}");
    };
    s.keys(ESC);
    s.wait_for(
        |t| t.contains("Batch log, newest first") && t.contains(&code),
        "the batch in the list",
    );

    // Quit: the recipe has unsaved changes, so gelu asks first.
    s.keys("q");
    s.wait_for(|t| t.contains("unsaved changes"), "the quit question");
    s.keys("y");
    s.wait_exit();
    let (alternate, cursor_hidden) = s.restored();
    assert!(!alternate, "the alternate screen was left");
    assert!(!cursor_hidden, "the cursor is shown again");
}

#[test]
fn a_small_terminal_is_told_the_size_needed_and_q_still_quits() {
    let dir = match tempfile::tempdir() {
        Ok(d) => d,
        Err(e) => panic!("tempdir: {e}"),
    };
    let mut s = Session::start(&dir.path().join("small.db"), 60, 20);
    s.wait_for(
        |t| t.contains("at least") && t.contains("80 columns"),
        "the size notice",
    );
    s.keys("q");
    s.wait_exit();
    let (alternate, cursor_hidden) = s.restored();
    assert!(!alternate && !cursor_hidden);
}

#[test]
fn gelu_edit_saves_back_to_the_file_keeping_its_comments() {
    let dir = match tempfile::tempdir() {
        Ok(d) => d,
        Err(e) => panic!("tempdir: {e}"),
    };
    let file = dir.path().join("breakwater-sorbet.toml");
    let text = "# Breakwater kiosk, summer trial\nname = \"Breakwater sorbet\"\nstyle = \"sorbet\"\n\n[[line]]\ningredient = \"water\"\ng = 550 # from the filtered tap\n\n[[line]]\ningredient = \"sucrose\"\ng = 250\n\n[[line]]\ningredient = \"lemon-juice\"\ng = 200\n";
    if let Err(e) = std::fs::write(&file, text) {
        panic!("{e}");
    }
    let edit = std::path::Path::new("edit");
    let mut s = Session::start_with(&dir.path().join("log.db"), &[edit, &file], 100, 30, false);
    s.wait_for(
        |t| t.contains("Breakwater sorbet") && t.contains("Freezing point"),
        "the file in the editor",
    );
    assert!(
        s.coloured_cells() > 0,
        "without NO_COLOR the workspace uses colour"
    );
    s.keys("\r");
    s.wait_for(|t| t.contains("Amount of Water"), "the amount prompt");
    s.keys("\x15"); // Ctrl-U clears the field
    s.type_slowly("600");
    s.keys("\r");
    let saved = s.save_back_and_quit(&file);
    assert!(
        saved.starts_with("# Breakwater kiosk, summer trial"),
        "{saved}"
    );
    assert!(saved.contains("g = 600 # from the filtered tap"), "{saved}");
    let (alternate, cursor_hidden) = s.restored();
    assert!(!alternate && !cursor_hidden);
}

#[test]
fn a_distiller_batches_a_liqueur_in_litres_and_reads_its_freezer_behaviour() {
    let dir = match tempfile::tempdir() {
        Ok(d) => d,
        Err(e) => panic!("tempdir: {e}"),
    };
    let file = dir.path().join("gullrock-blackcurrant.toml");
    let text = "# Gullrock still house\nname = \"Gullrock blackcurrant\"\nstyle = \"liqueur\"\n\n[[line]]\ningredient = \"spirit-96-vol\"\nml = 2600\n\n[[line]]\ningredient = \"sucrose\"\ng = 3000\n\n[[line]]\ningredient = \"water\"\ng = 4600\n";
    if let Err(e) = std::fs::write(&file, text) {
        panic!("{e}");
    }
    let db = dir.path().join("log.db");
    let edit = std::path::Path::new("edit");
    let mut s = Session::start_with(&db, &[edit, &file], 100, 30, true);
    let screen = s.wait_for(
        |t| t.contains("Gullrock blackcurrant") && t.contains("Freezer, -18"),
        "the liqueur's key figures",
    );
    // A drink shows strength, proof, sugar and volume; no serving temperature.
    for shown in ["% vol", "US proof", "g/L", "Volume at 20 °C"] {
        assert!(screen.contains(shown), "{shown}:\n{screen}");
    }
    assert!(!screen.contains("Serve at"), "{screen}");
    let tier = ["no ice", "a few crystals", "slush", "frozen"]
        .into_iter()
        .find(|w| {
            screen
                .lines()
                .any(|l| l.contains("Freezer, -18") && l.contains(w))
        });
    let Some(tier) = tier else {
        panic!("no freezer behaviour on screen:\n{screen}");
    };
    // The same words as the report.
    let report = std::process::Command::new(env!("CARGO_BIN_EXE_gelu"))
        .args(["report", "--json"])
        .arg(&file)
        .output()
        .map(|o| String::from_utf8_lossy(&o.stdout).into_owned())
        .unwrap_or_default();
    let json: serde_json::Value = serde_json::from_str(report.trim()).unwrap_or_default();
    assert_eq!(
        json["freezer_behaviour"]
            .as_str()
            .map(|w| w.replace('-', " ")),
        Some(tier.to_string())
    );

    // Batch 50 L of it: the form offers litres, and litres are taken.
    s.keys("b");
    let form = s.wait_for(|t| t.contains("New batch of"), "the batch form");
    assert!(
        form.contains(" L"),
        "the size is offered in litres:\n{form}"
    );
    s.keys("\x15"); // Ctrl-U clears the field
    s.type_slowly("50 L");
    s.keys(TAB);
    s.type_slowly("Ada");
    s.keys(ENTER);
    s.wait_for(|t| t.contains("Recorded batch"), "the batch to be recorded");
    // Back on the list, the batch is sized by its volume, as it was asked for.
    s.keys(ESC);
    s.wait_for(
        |t| t.lines().any(|l| l.contains("Ada") && l.contains("50 L")),
        "the batch listed in litres",
    );
    // The recipe itself was not changed, so q leaves at once.
    s.keys("q");
    s.wait_exit();
    let shown = std::process::Command::new(env!("CARGO_BIN_EXE_gelu"))
        .arg("--db")
        .arg(&db)
        .args(["batch", "list", "--json"])
        .env_remove("GELU_DB")
        .output()
        .map(|o| String::from_utf8_lossy(&o.stdout).into_owned())
        .unwrap_or_default();
    let batch: serde_json::Value =
        serde_json::from_str(shown.lines().next().unwrap_or("{}")).unwrap_or_default();
    let volume = batch["prediction"]["volume_ml"].as_f64().unwrap_or(0.0);
    assert!((volume - 50_000.0).abs() < 1.0, "{volume} mL\n{shown}");
    let text = std::process::Command::new(env!("CARGO_BIN_EXE_gelu"))
        .arg("--db")
        .arg(&db)
        .args(["batch", "list"])
        .env_remove("GELU_DB")
        .output()
        .map(|o| String::from_utf8_lossy(&o.stdout).into_owned())
        .unwrap_or_default();
    assert!(text.contains(" 50 L "), "{text}");
}

#[test]
fn a_gelato_is_balanced_at_80x24_and_saved_back_with_its_targets() {
    let text = "# The Quay Kitchen: pier gelato for the -12 °C cabinet\nname = \"Pier milk gelato\"\nstyle = \"gelato\"\n\n[[line]]\ningredient = \"whole-milk\"\ng = 650 # the morning milk\n\n[[line]]\ningredient = \"heavy-cream\"\ng = 120\n\n[[line]]\ningredient = \"skim-milk-powder\"\ng = 40\n\n[[line]]\ningredient = \"sucrose\"\ng = 160\n\n[[line]]\ningredient = \"dextrose-monohydrate\"\ng = 25\n";
    let (_dir, file, mut s) = edit_file("pier-gelato.toml", text, 80, 24);
    s.wait_for(
        |t| t.contains("Pier milk gelato") && t.contains("Freezing point"),
        "the file in the editor",
    );
    s.keys("B");
    let panel = s.wait_for(
        |t| t.contains("Balance: Pier milk gelato") && t.contains("Balanced"),
        "the balance panel with its answer",
    );
    for shown in ["frozen_at.-13", "fat_pct", "balanced", "a accept"] {
        assert!(panel.contains(shown), "{shown}:\n{panel}");
    }
    s.keys("a");
    s.wait_for(
        |t| t.contains("new amounts and the targets are in the recipe"),
        "the answer accepted",
    );
    let saved = s.save_back_and_quit(&file);
    assert!(
        saved.starts_with("# The Quay Kitchen: pier gelato for the -12 °C cabinet"),
        "{saved}"
    );
    assert!(saved.contains("# the morning milk"), "{saved}");
    assert!(
        !saved.contains("g = 650 #"),
        "the milk was balanced:\n{saved}"
    );
    assert!(
        saved.contains("[balance]") && saved.contains("frozen_at = [{ temp_c = -13"),
        "{saved}"
    );
    let (alternate, cursor_hidden) = s.restored();
    assert!(!alternate && !cursor_hidden);
}
