//! The user's files survive a netmargin killed in the middle of writing: `baseline`,
//! `init --force` and `audit -o` are killed (SIGKILL) after the new file's bytes are written
//! and before they replace the old file; the old file must be byte-identical afterwards, a
//! later run must not trip on what the killed one left, and the files netmargin reads must
//! never change, whatever the command.
//!
//! `baseline` and `init` write through `netmargin::atomic`, whose test-only pause
//! (`NETMARGIN_TEST_PAUSE_BEFORE_RENAME_MS`) holds the process between writing the temporary
//! file and renaming it, so the kill lands there every time. `audit -o` is killed the moment
//! its temporary file appears, on a board large enough that writing its report takes a
//! measurable time.

use std::collections::BTreeMap;
use std::os::unix::process::ExitStatusExt;
use std::path::{Path, PathBuf};
use std::process::{Child, Command, Output, Stdio};
use std::time::{Duration, Instant, SystemTime};

const PAUSE_ENV: &str = "NETMARGIN_TEST_PAUSE_BEFORE_RENAME_MS";

/// A folder removed when the test ends.
struct Scratch(PathBuf);

impl Scratch {
    fn new(tag: &str) -> Scratch {
        let nanos = SystemTime::now()
            .duration_since(SystemTime::UNIX_EPOCH)
            .map_or(0, |d| d.subsec_nanos());
        let d = std::env::temp_dir().join(format!(
            "netmargin-kill-{tag}-{}-{nanos}",
            std::process::id()
        ));
        let _ = std::fs::remove_dir_all(&d);
        std::fs::create_dir_all(&d).expect("scratch folder");
        Scratch(d)
    }
    fn path(&self, p: &str) -> PathBuf {
        self.0.join(p)
    }
    fn put(&self, p: &str, text: &str) {
        let path = self.path(p);
        std::fs::create_dir_all(path.parent().expect("a parent")).expect("scratch folder");
        std::fs::write(path, text).expect("scratch file");
    }
    fn read(&self, p: &str) -> Vec<u8> {
        std::fs::read(self.path(p)).unwrap_or_else(|e| panic!("cannot read {p}: {e}"))
    }
}

impl Drop for Scratch {
    fn drop(&mut self) {
        let _ = std::fs::remove_dir_all(&self.0);
    }
}

fn command(dir: &Path, args: &[&str]) -> Command {
    let mut c = Command::new(env!("CARGO_BIN_EXE_netmargin"));
    c.args(args)
        .current_dir(dir)
        .env_remove(PAUSE_ENV)
        .stdin(Stdio::null());
    c
}

fn run(dir: &Path, args: &[&str]) -> Output {
    let o = command(dir, args).output().expect("the binary runs");
    let err = String::from_utf8_lossy(&o.stderr);
    assert!(!err.contains("panicked"), "{args:?} panicked:\n{err}");
    o
}

fn run_ok(dir: &Path, args: &[&str]) -> Output {
    let o = run(dir, args);
    assert_eq!(
        o.status.code(),
        Some(0),
        "{args:?}:\n{}",
        String::from_utf8_lossy(&o.stderr)
    );
    o
}

/// A board of the synthetic generator with its references renamed, so boards differ.
fn board(bytes: usize, tag: &str) -> String {
    let mut text = netmargin::synth::netlist(bytes);
    for p in ["U", "V", "R", "C"] {
        text = text.replace(&format!("(ref \"{p}"), &format!("(ref \"{p}{tag}_"));
    }
    text
}

/// Every file below `dir` (relative path), with its bytes, modification time and mode, except
/// those `skip` names and temporary files (`.*.tmp`, checked on their own).
fn snapshot(dir: &Path, skip: &[&str]) -> BTreeMap<String, (Vec<u8>, SystemTime, u32)> {
    use std::os::unix::fs::PermissionsExt;
    let mut out = BTreeMap::new();
    let mut todo = vec![dir.to_path_buf()];
    while let Some(d) = todo.pop() {
        for e in std::fs::read_dir(&d).expect("read folder").flatten() {
            let p = e.path();
            let rel = p
                .strip_prefix(dir)
                .expect("below")
                .to_string_lossy()
                .into_owned();
            if skip
                .iter()
                .any(|s| rel == *s || rel.starts_with(&format!("{s}/")))
            {
                continue;
            }
            let name = e.file_name().to_string_lossy().into_owned();
            if name.starts_with('.') && name.ends_with(".tmp") {
                continue;
            }
            let meta = e.metadata().expect("metadata");
            if meta.is_dir() {
                todo.push(p);
            } else {
                let bytes = std::fs::read(&p).expect("read file");
                let mtime = meta.modified().expect("modification time");
                out.insert(rel, (bytes, mtime, meta.permissions().mode()));
            }
        }
    }
    out
}

fn assert_unchanged(
    before: &BTreeMap<String, (Vec<u8>, SystemTime, u32)>,
    after: &BTreeMap<String, (Vec<u8>, SystemTime, u32)>,
    what: &str,
) {
    let names = |m: &BTreeMap<String, _>| m.keys().cloned().collect::<Vec<String>>();
    assert_eq!(names(before), names(after), "{what}: files came or went");
    for (name, (bytes, mtime, mode)) in before {
        let (b, t, m) = &after[name];
        assert!(bytes == b, "{what} changed the bytes of {name}");
        assert_eq!(mtime, t, "{what} touched {name}");
        assert_eq!(mode, m, "{what} changed the permissions of {name}");
    }
}

/// Temporary files for `target` in `dir` (`.{target}.` ... `.tmp`).
fn temps(dir: &Path, target: &str) -> Vec<PathBuf> {
    let prefix = format!(".{target}.");
    let mut v: Vec<PathBuf> = std::fs::read_dir(dir)
        .expect("read folder")
        .flatten()
        .filter(|e| {
            let n = e.file_name().to_string_lossy().into_owned();
            n.starts_with(&prefix) && n.ends_with(".tmp")
        })
        .map(|e| e.path())
        .collect();
    v.sort();
    v
}

/// Any temporary file at all in `dir`.
fn any_temps(dir: &Path) -> Vec<String> {
    std::fs::read_dir(dir)
        .expect("read folder")
        .flatten()
        .map(|e| e.file_name().to_string_lossy().into_owned())
        .filter(|n| n.ends_with(".tmp"))
        .collect()
}

/// Polls `dir` until a temporary file for `target` appears, while `child` runs; `None` when
/// the child ended first or `limit` passed.
fn wait_for_temp(child: &mut Child, dir: &Path, target: &str, limit: Duration) -> Option<PathBuf> {
    let start = Instant::now();
    while start.elapsed() < limit {
        if let Some(t) = temps(dir, target).into_iter().next() {
            return Some(t);
        }
        if child.try_wait().expect("child status").is_some() {
            return temps(dir, target).into_iter().next();
        }
        std::thread::sleep(Duration::from_micros(200));
    }
    None
}

/// SIGKILLs `child` and checks that the signal, not an exit, ended it.
fn kill(mut child: Child) {
    let _ = child.kill();
    let status = child.wait().expect("the child is reaped");
    assert_eq!(
        status.signal(),
        Some(9),
        "the process should have died of SIGKILL, it ended with {status:?}"
    );
}

/// Starts `args` with the pause before the rename, waits for its temporary file for
/// `target` to be written, and kills it there. Returns the temporary file's bytes.
fn kill_in_pause(dir: &Path, args: &[&str], target: &str) -> (PathBuf, Vec<u8>) {
    let mut child = command(dir, args)
        .env(PAUSE_ENV, "30000")
        .stdout(Stdio::null())
        .stderr(Stdio::null())
        .spawn()
        .expect("the binary runs");
    let tmp = wait_for_temp(&mut child, dir, target, Duration::from_secs(60));
    let Some(tmp) = tmp else {
        let _ = child.kill();
        let _ = child.wait();
        panic!("{args:?}: no temporary file for {target} appeared");
    };
    // the bytes are written and synced before the pause; give the write a moment to finish
    std::thread::sleep(Duration::from_millis(300));
    assert!(
        child.try_wait().expect("child status").is_none(),
        "{args:?} ended before it could be killed (is the pause hook there?)"
    );
    let name = tmp
        .file_name()
        .expect("a name")
        .to_string_lossy()
        .into_owned();
    assert!(
        name.contains(&format!(".{}.", child.id())),
        "the temporary file {name} names the writer's process {}",
        child.id()
    );
    let bytes = std::fs::read(&tmp).expect("the temporary file");
    kill(child);
    (tmp, bytes)
}

#[test]
fn a_baseline_killed_mid_write_leaves_the_old_baseline() {
    let s = Scratch::new("baseline");
    s.put("hw/a.net", &board(30_000, "a"));
    s.put("hw/b.net", &board(50_000, "b"));
    run_ok(&s.0, &["baseline", "--no-config", "-o", "base.json", "hw"]);
    let old = s.read("base.json");
    assert!(!old.is_empty());

    // a new board: the baseline that would be written now differs from the old one
    s.put("hw/c.net", &board(40_000, "c"));
    let inputs = snapshot(&s.0, &["base.json"]);
    let args = ["baseline", "--no-config", "-o", "base.json", "hw"];
    let (tmp, written) = kill_in_pause(&s.0, &args, "base.json");

    assert!(
        s.read("base.json") == old,
        "the baseline changed when the write was killed"
    );
    let text = String::from_utf8_lossy(&written);
    assert!(
        text.contains("c.net") && !String::from_utf8_lossy(&old).contains("c.net"),
        "the killed run had written the new baseline (with c.net) to its temporary file"
    );
    assert!(
        tmp.exists(),
        "a SIGKILLed process cannot remove its temporary file"
    );

    // a later check reads the old baseline and is not confused by the leftover
    let o = run(
        &s.0,
        &["check", "--no-config", "--baseline", "base.json", "hw"],
    );
    assert!(
        matches!(o.status.code(), Some(0 | 1)),
        "check --baseline after the kill: {}",
        String::from_utf8_lossy(&o.stderr)
    );
    // the next baseline run writes the new file and removes the dead writer's leftover
    run_ok(&s.0, &args);
    let new = s.read("base.json");
    assert!(new != old && String::from_utf8_lossy(&new).contains("c.net"));
    assert!(
        any_temps(&s.0).is_empty(),
        "left over: {:?}",
        any_temps(&s.0)
    );
    assert_unchanged(&inputs, &snapshot(&s.0, &["base.json"]), "baseline");
}

#[test]
fn init_force_killed_mid_write_leaves_the_edited_configuration() {
    let s = Scratch::new("init");
    s.put("board.net", &board(20_000, "a"));
    run_ok(&s.0, &["init", "-o", "netmargin.toml", "board.net"]);
    // the user's own edits, which a replacement would lose
    let mut edited = s.read("netmargin.toml");
    edited.extend_from_slice(b"\n# checked by hand against the schematic, rev B\n");
    std::fs::write(s.path("netmargin.toml"), &edited).expect("edit");
    let inputs = snapshot(&s.0, &["netmargin.toml"]);

    let args = ["init", "--force", "-o", "netmargin.toml", "board.net"];
    let (tmp, written) = kill_in_pause(&s.0, &args, "netmargin.toml");
    assert!(
        s.read("netmargin.toml") == edited,
        "the configuration changed when the write was killed"
    );
    assert!(
        !written.is_empty() && written != edited,
        "the killed run had written a new starter file to its temporary file"
    );
    assert!(tmp.exists());

    // init without --force still refuses the existing file, leftover or not
    let o = run(&s.0, &["init", "-o", "netmargin.toml", "board.net"]);
    assert_eq!(o.status.code(), Some(2));
    assert!(s.read("netmargin.toml") == edited);

    run_ok(&s.0, &args);
    let now = s.read("netmargin.toml");
    assert!(now != edited && !String::from_utf8_lossy(&now).contains("rev B"));
    assert!(
        any_temps(&s.0).is_empty(),
        "left over: {:?}",
        any_temps(&s.0)
    );
    assert_unchanged(&inputs, &snapshot(&s.0, &["netmargin.toml"]), "init");
}

#[test]
fn init_killed_before_its_first_write_leaves_no_file() {
    let s = Scratch::new("init-new");
    s.put("board.net", &board(20_000, "a"));
    let args = ["init", "-o", "netmargin.toml", "board.net"];
    let (tmp, _) = kill_in_pause(&s.0, &args, "netmargin.toml");
    assert!(
        !s.path("netmargin.toml").exists(),
        "a half-made configuration appeared"
    );
    assert!(tmp.exists());
    run_ok(&s.0, &args);
    assert!(s.path("netmargin.toml").exists());
    assert!(
        any_temps(&s.0).is_empty(),
        "left over: {:?}",
        any_temps(&s.0)
    );
}

#[test]
fn an_audit_killed_while_writing_its_report_leaves_the_old_report() {
    let s = Scratch::new("audit");
    s.put("small.net", &board(20_000, "s"));
    // large enough that writing the report (several MB) takes a measurable time
    s.put("big.net", &board(3_000_000, "b"));
    run_ok(
        &s.0,
        &["audit", "--no-config", "-o", "report.html", "small.net"],
    );
    let old = s.read("report.html");
    let full = run_ok(&s.0, &["audit", "--no-config", "big.net"]).stdout;
    assert!(full.len() > 1_000_000 && full != old);
    let inputs = snapshot(&s.0, &["report.html"]);

    let args = ["audit", "--no-config", "-o", "report.html", "big.net"];
    let mut caught = 0;
    for _ in 0..8 {
        let mut child = command(&s.0, &args)
            .stdout(Stdio::null())
            .stderr(Stdio::null())
            .spawn()
            .expect("the binary runs");
        let seen = wait_for_temp(&mut child, &s.0, "report.html", Duration::from_secs(120));
        kill_or_reap(child);
        let now = s.read("report.html");
        // each kill leaves either the old report or the whole new one, never a mix
        assert!(
            now == old || now == full,
            "the report is neither the old nor the new one ({} bytes)",
            now.len()
        );
        let left = seen.filter(|t| t.exists());
        if left.is_some() {
            // killed before the rename: the old report stands
            assert!(
                now == old,
                "killed before the rename, yet the report changed"
            );
            caught += 1;
            if caught >= 2 {
                break;
            }
        } else if now == full {
            // the rename won the race: put the old report back and try again
            std::fs::write(s.path("report.html"), &old).expect("restore");
        }
    }
    assert!(
        caught > 0,
        "no kill landed while the report was being written"
    );
    // a later run is not confused by what the killed ones left
    run_ok(&s.0, &args);
    assert!(s.read("report.html") == full);
    assert_unchanged(&inputs, &snapshot(&s.0, &["report.html"]), "audit");
    // the leftovers are the killed writers' (audit's own writer names them by process)
    for t in temps(&s.0, "report.html") {
        let n = t
            .file_name()
            .expect("a name")
            .to_string_lossy()
            .into_owned();
        assert!(n.starts_with(".report.html.") && n.ends_with(".tmp"), "{n}");
    }
}

/// Kills `child` if it still runs (else just reaps it).
fn kill_or_reap(mut child: Child) {
    match child.try_wait().expect("child status") {
        Some(_) => {}
        None => kill(child),
    }
}

#[test]
fn no_command_changes_the_files_it_reads() {
    let s = Scratch::new("inputs");
    s.put("hw/a.net", &board(30_000, "a"));
    s.put("hw/sub/b.net", &board(20_000, "b"));
    run_ok(&s.0, &["init", "-o", "hw/netmargin.toml", "hw/a.net"]);
    run_ok(&s.0, &["baseline", "-o", "base.json", "hw"]);
    // from here on the netlists, the configuration and the baseline are all inputs
    let outputs = ["out"];
    std::fs::create_dir_all(s.path("out")).expect("out folder");
    let before = snapshot(&s.0, &outputs);
    assert_eq!(before.len(), 4, "{:?}", before.keys());
    let runs: &[&[&str]] = &[
        &["check", "hw"],
        &["check", "--format", "json", "hw"],
        &["check", "--format", "sarif", "hw"],
        &["check", "--format", "short", "hw/a.net"],
        &["check", "--format", "github", "hw"],
        &["check", "--baseline", "base.json", "-v", "hw"],
        &["baseline", "-o", "out/base.json", "hw"],
        &[
            "audit",
            "-o",
            "out/report.html",
            "--chart-out",
            "out/charts",
            "hw/a.net",
        ],
        &[
            "audit",
            "--format",
            "markdown",
            "-o",
            "out/report.md",
            "hw/sub/b.net",
        ],
        &["init", "-o", "out/netmargin.toml", "hw/a.net"],
        &["config", "--show", "hw/a.net"],
        &["parts", "hw/a.net"],
        &["net", "hw/a.net", "GND"],
    ];
    for args in runs {
        let o = run(&s.0, args);
        assert!(
            matches!(o.status.code(), Some(0 | 1)),
            "{args:?}: {}",
            String::from_utf8_lossy(&o.stderr)
        );
        assert_unchanged(&before, &snapshot(&s.0, &outputs), &format!("{args:?}"));
    }
    // standard input is an input too: a file piped in stays as it was
    let piped = std::fs::File::open(s.path("hw/a.net")).expect("open");
    let o = command(&s.0, &["check", "-"])
        .stdin(piped)
        .output()
        .expect("the binary runs");
    assert!(matches!(o.status.code(), Some(0 | 1)));
    assert_unchanged(&before, &snapshot(&s.0, &outputs), "check -");
    assert!(any_temps(&s.0).is_empty() && any_temps(&s.path("out")).is_empty());
}
