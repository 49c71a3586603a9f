//! The input size limit (`--max-bytes`), through the real binary: a file over the limit is
//! refused with a clear error (exit 2, code `too-large`, the file's size and the limit
//! named) while the other files of the run are still checked; standard input too; a file of
//! exactly the limit is read.

use std::io::Write;
use std::path::{Path, PathBuf};
use std::process::{Command, Output, Stdio};

/// A folder removed when the test ends.
struct Scratch(PathBuf);

impl Scratch {
    fn new(tag: &str) -> Scratch {
        let nanos = std::time::SystemTime::now()
            .duration_since(std::time::UNIX_EPOCH)
            .map_or(0, |d| d.subsec_nanos());
        let d = std::env::temp_dir().join(format!(
            "netmargin-limits-{tag}-{}-{nanos}",
            std::process::id()
        ));
        let _ = std::fs::remove_dir_all(&d);
        std::fs::create_dir_all(&d).expect("scratch folder");
        Scratch(d)
    }
    fn put(&self, name: &str, text: &str) -> PathBuf {
        let p = self.0.join(name);
        std::fs::write(&p, text).expect("scratch file");
        p
    }
}

impl Drop for Scratch {
    fn drop(&mut self) {
        let _ = std::fs::remove_dir_all(&self.0);
    }
}

fn netmargin(dir: &Path, args: &[&str], stdin: Option<&[u8]>) -> Output {
    let mut child = Command::new(env!("CARGO_BIN_EXE_netmargin"))
        .args(args)
        .current_dir(dir)
        .stdin(if stdin.is_some() {
            Stdio::piped()
        } else {
            Stdio::null()
        })
        .stdout(Stdio::piped())
        .stderr(Stdio::piped())
        .spawn()
        .expect("the binary runs");
    if let Some(bytes) = stdin {
        let mut pipe = child.stdin.take().expect("piped");
        // the binary stops reading at the limit: a broken pipe here is expected
        let _ = pipe.write_all(bytes);
    }
    let o = child.wait_with_output().expect("the binary finishes");
    let err = String::from_utf8_lossy(&o.stderr);
    assert!(!err.contains("panicked"), "{args:?} panicked:\n{err}");
    o
}

fn json(o: &Output) -> serde_json::Value {
    serde_json::from_slice(&o.stdout).unwrap_or_else(|e| {
        panic!(
            "not JSON ({e}):\n{}\n{}",
            String::from_utf8_lossy(&o.stdout),
            String::from_utf8_lossy(&o.stderr)
        )
    })
}

/// The entry for `path` in a JSON report.
fn file<'a>(report: &'a serde_json::Value, path: &str) -> &'a serde_json::Value {
    report["files"]
        .as_array()
        .expect("files")
        .iter()
        .find(|f| f["path"] == path)
        .unwrap_or_else(|| panic!("no entry for {path} in {report}"))
}

#[test]
fn a_file_over_the_limit_is_refused_by_name_and_the_others_are_checked() {
    let s = Scratch::new("files");
    let small = netmargin::synth::netlist(10_000);
    let big = netmargin::synth::netlist(60_000);
    s.put("a-small.net", &small);
    s.put("b-big.net", &big);
    s.put("c-small.net", &small);
    assert!(small.len() < 20_000 && big.len() > 40_000);
    let limit = "30000";
    let o = netmargin(
        &s.0,
        &[
            "check",
            "--no-config",
            "--format",
            "json",
            "--max-bytes",
            limit,
            "a-small.net",
            "b-big.net",
            "c-small.net",
        ],
        None,
    );
    assert_eq!(
        o.status.code(),
        Some(2),
        "a refused file makes the run exit 2"
    );
    let r = json(&o);
    let b = file(&r, "b-big.net");
    assert_eq!(b["checked"], false);
    assert_eq!(b["error"]["check"], "too-large");
    assert_eq!(b["error"]["severity"], "error");
    let msg = b["error"]["message"].as_str().expect("a message");
    assert!(
        msg.contains(&format!("{} bytes", big.len())) && msg.contains(&format!("{limit} bytes")),
        "the message names the file's size ({}) and the limit ({limit}): {msg}",
        big.len()
    );
    assert!(
        b["error"]["help"]
            .as_str()
            .is_some_and(|h| h.contains("--max-bytes")),
        "the help names the option: {b}"
    );
    // the small files around it were read and checked in full: 4 parts and 32 pins a cell
    // (the generator's board)
    let cells = (10_000 / 2600) as u64;
    for name in ["a-small.net", "c-small.net"] {
        let f = file(&r, name);
        assert_eq!(f["checked"], true, "{name}: {f}");
        assert!(f["error"].is_null(), "{name}: {f}");
        assert_eq!(f["summary"]["parts"], 4 * cells, "{name}: {f}");
        assert_eq!(f["summary"]["pins"], 32 * cells, "{name}: {f}");
    }
    assert_eq!(r["totals"]["files"], 3);
    assert_eq!(r["totals"]["checked"], 2);
    assert_eq!(r["totals"]["not_checked"], 1);

    // the human report says the same on standard error
    let o = netmargin(
        &s.0,
        &["check", "--no-config", "--max-bytes", limit, "b-big.net"],
        None,
    );
    assert_eq!(o.status.code(), Some(2));
    let text = format!(
        "{}{}",
        String::from_utf8_lossy(&o.stdout),
        String::from_utf8_lossy(&o.stderr)
    );
    assert!(text.contains("too-large"), "{text}");
    assert!(
        text.contains(&format!(
            "the file is {} bytes, above the limit of {limit} bytes",
            big.len()
        )),
        "{text}"
    );
}

#[test]
fn the_limit_is_inclusive() {
    let s = Scratch::new("edge");
    let text = netmargin::synth::netlist(10_000);
    s.put("board.net", &text);
    let at = text.len().to_string();
    let below = (text.len() - 1).to_string();
    let ok = netmargin(
        &s.0,
        &[
            "check",
            "--no-config",
            "--format",
            "json",
            "--max-bytes",
            &at,
            "board.net",
        ],
        None,
    );
    assert_ne!(
        ok.status.code(),
        Some(2),
        "a file of exactly the limit is read"
    );
    assert_eq!(file(&json(&ok), "board.net")["checked"], true);
    let refused = netmargin(
        &s.0,
        &[
            "check",
            "--no-config",
            "--format",
            "json",
            "--max-bytes",
            &below,
            "board.net",
        ],
        None,
    );
    assert_eq!(refused.status.code(), Some(2));
    assert_eq!(
        file(&json(&refused), "board.net")["error"]["check"],
        "too-large"
    );
}

#[test]
fn standard_input_over_the_limit_is_refused() {
    let s = Scratch::new("stdin");
    let text = netmargin::synth::netlist(60_000);
    let limit = 30_000;
    let o = netmargin(
        &s.0,
        &[
            "check",
            "--no-config",
            "--format",
            "json",
            "--max-bytes",
            &limit.to_string(),
            "-",
        ],
        Some(text.as_bytes()),
    );
    assert_eq!(o.status.code(), Some(2));
    let r = json(&o);
    let f = file(&r, "<stdin>");
    assert_eq!(f["checked"], false);
    assert_eq!(f["error"]["check"], "too-large");
    let msg = f["error"]["message"].as_str().expect("a message");
    assert!(msg.contains(&format!("limit of {limit} bytes")), "{msg}");

    // standard input of exactly the limit is read in full
    let o = netmargin(
        &s.0,
        &[
            "check",
            "--no-config",
            "--format",
            "json",
            "--max-bytes",
            &text.len().to_string(),
            "-",
        ],
        Some(text.as_bytes()),
    );
    let r = json(&o);
    let f = file(&r, "<stdin>");
    assert_eq!(f["checked"], true, "{f}");
    assert_eq!(f["summary"]["parts"], 4 * (60_000 / 2600) as u64);
}

#[test]
fn the_other_commands_keep_the_limit() {
    let s = Scratch::new("commands");
    let text = netmargin::synth::netlist(60_000);
    s.put("board.net", &text);
    let limit = "30000";
    let size = format!("{} bytes", text.len());
    for args in [
        &["audit", "--no-config", "-o", "report.html", "board.net"][..],
        &["baseline", "--no-config", "-o", "base.json", "board.net"][..],
        &["init", "-o", "netmargin.toml", "board.net"][..],
        &["parts", "board.net"][..],
        &["net", "board.net", "GND"][..],
    ] {
        let mut all = vec!["--max-bytes", limit];
        all.extend_from_slice(args);
        let o = netmargin(&s.0, &all, None);
        let err = String::from_utf8_lossy(&o.stderr);
        assert_eq!(o.status.code(), Some(2), "{args:?}: {err}");
        assert!(
            err.contains("too-large") && err.contains(&size) && err.contains(limit),
            "{args:?} names the code, the size and the limit:\n{err}"
        );
    }
    // nothing was written
    for out in ["report.html", "base.json", "netmargin.toml"] {
        assert!(!s.0.join(out).exists(), "{out} was written");
    }
}
