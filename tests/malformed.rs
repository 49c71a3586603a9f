//! Hostile and malformed input through the real binary (`netmargin check --color never`).
//!
//! * `fixtures/malformed-corpus/`: the corpus written by its `gen.py`, with the expected exit
//!   code, diagnostic code, place and message fragment of each file in `cases.tsv`. The places
//!   there are computed by the generator from where it put each fault, not taken from
//!   netmargin's output.
//! * `fixtures/malformed/`: one file per error class, places from its README table.
//! * Big inputs (a 10 MB atom, a net with 1 000 000 nodes, 1 000 000 nested lists) are made
//!   here at run time and piped through standard input.
//! * Inputs the fuzzers found, each as it was found.
//!
//! Exit codes: 2 for a file that cannot be read as a netlist, 1 for a netlist with an error
//! diagnostic, 0 otherwise. No run may panic.

use std::io::Write;
use std::path::{Path, PathBuf};
use std::process::{Command, Output, Stdio};
use std::time::{Duration, Instant};

fn root() -> &'static Path {
    Path::new(env!("CARGO_MANIFEST_DIR"))
}

struct Run {
    code: i32,
    stdout: String,
    stderr: String,
    elapsed: Duration,
}

impl Run {
    fn all(&self) -> String {
        format!("{}{}", self.stdout, self.stderr)
    }
}

fn finish(out: Output, elapsed: Duration) -> Run {
    let run = Run {
        code: out.status.code().unwrap_or(-1),
        stdout: String::from_utf8_lossy(&out.stdout).into_owned(),
        stderr: String::from_utf8_lossy(&out.stderr).into_owned(),
        elapsed,
    };
    assert!(!run.stderr.contains("panicked"), "panic:\n{}", run.stderr);
    assert!(
        !run.stderr.contains("RUST_BACKTRACE"),
        "panic:\n{}",
        run.stderr
    );
    run
}

/// Runs `netmargin check --color never <path>` with extra arguments first.
fn check_file(path: &Path, extra: &[&str]) -> Run {
    let t = Instant::now();
    let out = Command::new(env!("CARGO_BIN_EXE_netmargin"))
        .arg("check")
        .args(["--color", "never"])
        .args(extra)
        .arg(path)
        .env_remove("NO_COLOR")
        .output()
        .expect("the binary runs");
    finish(out, t.elapsed())
}

/// Runs `netmargin check --color never -` with `bytes` on standard input.
fn check_stdin(bytes: &[u8], extra: &[&str]) -> Run {
    let t = Instant::now();
    let mut child = Command::new(env!("CARGO_BIN_EXE_netmargin"))
        .arg("check")
        .args(["--color", "never"])
        .args(extra)
        .arg("-")
        .stdin(Stdio::piped())
        .stdout(Stdio::piped())
        .stderr(Stdio::piped())
        .spawn()
        .expect("the binary runs");
    let mut stdin = child.stdin.take().expect("stdin is piped");
    let data = bytes.to_vec();
    let writer = std::thread::spawn(move || {
        // the reader may stop early (a size limit), which closes the pipe
        let _ = stdin.write_all(&data);
    });
    let out = child.wait_with_output().expect("the binary finishes");
    writer.join().expect("the writer thread ends");
    finish(out, t.elapsed())
}

/// What one input must give.
#[derive(Debug)]
struct Expect<'a> {
    exit: i32,
    /// `None`: no diagnostic at all.
    code: Option<&'a str>,
    /// Line and byte column shown in the report header `[name:line:column]`; `None`: the
    /// diagnostic shows no place.
    place: Option<(usize, usize)>,
    fragment: &'a str,
}

/// The `[name:line:column]` header that follows byte `from` in `out`.
fn header_after(out: &str, name: &str, from: usize) -> Option<(usize, usize)> {
    let key = format!("[{name}:");
    let at = out[from..].find(&key)? + from + key.len();
    let end = out[at..].find(']')? + at;
    let (l, c) = out[at..end].split_once(':')?;
    Some((l.parse().ok()?, c.parse().ok()?))
}

fn assert_outcome(label: &str, name: &str, run: &Run, e: &Expect<'_>) {
    // a message wrapped at the report width is joined again
    let all = run.all().replace("\n  │ ", " ");
    assert_eq!(run.code, e.exit, "{label}: exit code\n{all}");
    let Some(at) = all.find(e.fragment) else {
        panic!("{label}: `{}` not in the output\n{all}", e.fragment);
    };
    match e.code {
        None => {
            // no diagnostic block (miette marks each with its severity sign), nothing on stderr
            let marked = all
                .lines()
                .find(|l| ["  × ", "  ⚠ ", "  ☞ "].iter().any(|m| l.starts_with(m)));
            assert_eq!(marked, None, "{label}: expected no diagnostic\n{all}");
            assert!(
                run.stderr.is_empty(),
                "{label}: nothing on stderr\n{}",
                run.stderr
            );
        }
        Some(code) => {
            // miette writes the code on its own line above the message
            let before = &all[..at];
            assert!(
                before.lines().any(|l| l.trim() == code),
                "{label}: no diagnostic `{code}` before `{}`\n{all}",
                e.fragment
            );
            let block_start = before.rfind(&format!("\n{code}\n")).map_or(0, |p| p + 1);
            let block_end = all[at..].find("\n\n").map_or(all.len(), |p| at + p);
            match e.place {
                Some(place) => {
                    let got = header_after(&all, name, at);
                    assert_eq!(got, Some(place), "{label}: place of `{code}`\n{all}");
                }
                None => {
                    let block = &all[block_start..block_end];
                    assert!(
                        !block.contains(&format!("─[{name}:")),
                        "{label}: expected no place\n{block}"
                    );
                }
            }
        }
    }
    if e.exit == 2 {
        assert!(
            all.contains(": not checked: "),
            "{label}: the file is reported as not checked\n{all}"
        );
    }
}

fn corpus_dir() -> PathBuf {
    root().join("fixtures/malformed-corpus")
}

#[test]
fn corpus_cases_give_their_exit_code_diagnostic_and_place() {
    let table = std::fs::read_to_string(corpus_dir().join("cases.tsv")).expect("cases.tsv");
    let mut n = 0;
    let mut failures = Vec::new();
    for line in table
        .lines()
        .filter(|l| !l.starts_with('#') && !l.is_empty())
    {
        let f: Vec<&str> = line.split('\t').collect();
        assert_eq!(f.len(), 5, "bad row: {line}");
        let exit: i32 = f[1].parse().expect("exit code");
        let code = (f[2] != "-").then_some(f[2]);
        let place = (f[3] != "-").then(|| {
            let (l, c) = f[3].split_once(':').expect("line:column");
            (l.parse().expect("line"), c.parse().expect("column"))
        });
        let e = Expect {
            exit,
            code,
            place,
            fragment: f[4],
        };
        let path = corpus_dir().join(f[0]);
        let name = path.to_str().expect("a UTF-8 path").to_string();
        let run = check_file(&path, &[]);
        let r = std::panic::catch_unwind(|| assert_outcome(f[0], &name, &run, &e));
        if let Err(p) = r {
            let msg = p.downcast_ref::<String>().cloned().unwrap_or_default();
            failures.push(format!("{}: {}", f[0], msg.lines().next().unwrap_or("")));
        }
        n += 1;
    }
    assert!(
        failures.is_empty(),
        "{} of {n} cases failed:\n{}",
        failures.len(),
        failures.join("\n")
    );
    assert!(n >= 60, "only {n} cases");
    // every file in the folder is in the table
    let listed: Vec<String> = table
        .lines()
        .filter(|l| !l.starts_with('#'))
        .filter_map(|l| l.split('\t').next())
        .map(String::from)
        .collect();
    for e in std::fs::read_dir(corpus_dir())
        .expect("corpus folder")
        .flatten()
    {
        let file = e.file_name().to_string_lossy().into_owned();
        if file != "cases.tsv" && file != "gen.py" {
            assert!(listed.contains(&file), "{file} has no row in cases.tsv");
        }
    }
}

/// `fixtures/malformed/`, places from its README table (the reader's choice among the listed
/// places is noted where there are several).
#[test]
fn one_file_per_error_class() {
    let dir = root().join("fixtures/malformed");
    #[rustfmt::skip]
    let cases: &[(&str, i32, &str, Option<(usize, usize)>, &str)] = &[
        // the innermost list never closed
        ("unclosed-list.net", 2, "unclosed-list", Some((11, 5)), "3 lists still open; the innermost, `(net`"),
        ("stray-close-paren.net", 2, "stray-close", Some((14, 1)), "closes a list that was never opened"),
        // the opening quote
        ("unterminated-string.net", 2, "unterminated-string", Some((7, 14)), "a quoted string is never closed"),
        ("invalid-utf8.net", 2, "invalid-utf8", Some((7, 18)), "(line 7, column 18): byte 0xFF"),
        ("nul-byte.net", 2, "binary-file", None, "(line 7, column 18): this is a binary file"),
        ("list-for-atom.net", 1, "bad-field", Some((6, 16)), "`(ref ...)` holds a list where its value belongs"),
        ("empty.net", 2, "empty-file", None, "the file is empty"),
        ("whitespace-only.net", 2, "empty-file", None, "only white space"),
        ("netlist.json", 2, "wrong-format", Some((1, 1)), "looks like JSON"),
        ("schematic.kicad_sch", 2, "missing-library-symbol", Some((5, 11)), "library symbol is not in the sheet"),
        ("board.kicad_pcb", 2, "wrong-format", Some((1, 2)), "a KiCad board layout"),
        ("legacy-schematic.sch", 2, "wrong-format", Some((1, 1)), "legacy KiCad schematic"),
        // not one of the README's places (`{` at 1:3, `*` at 14:1): the header's first character
        ("legacy-netlist-v1.net", 2, "wrong-format", Some((1, 1)), "older KiCad netlist format"),
        ("not-a-netlist.net", 2, "not-a-netlist", Some((1, 2)), "root list is `(foo ...)`"),
        // a limit of 1000: the 1001st `(`
        ("deep-nesting.net", 2, "too-deep", Some((1, 1001)), "nested more than 1000 levels deep"),
    ];
    for &(file, exit, code, place, fragment) in cases {
        let path = dir.join(file);
        let name = path.to_str().expect("a UTF-8 path").to_string();
        let run = check_file(&path, &[]);
        assert_outcome(
            file,
            &name,
            &run,
            &Expect {
                exit,
                code: Some(code),
                place,
                fragment,
            },
        );
    }
}

// ---------------------------------------------------------------------------------------------
// Big inputs, made at run time.

const HEAD: &str =
    "(export (version \"E\")\n  (components\n    (comp (ref \"J1\") (value \"Conn_01x03\")))\n";

/// Fails when a run took more than `limit_s` seconds of wall time, multiplied by the machine's
/// load (one-minute load average over its cores, 1 to 20) at the end of the run: the
/// limits catch a cost that grows with the square of the input (hours at these sizes), and a
/// debug build sharing two cores with a parallel test run and other builds runs at a third of
/// its speed, which is no such cost.
fn timed(label: &str, run: &Run, limit_s: u64) {
    let cores = std::thread::available_parallelism().map_or(1, |n| n.get()) as f64;
    let load = std::fs::read_to_string("/proc/loadavg")
        .ok()
        .and_then(|s| s.split_whitespace().next()?.parse::<f64>().ok())
        .map_or(1.0, |l| (l / cores).clamp(1.0, 20.0));
    assert!(
        run.elapsed < Duration::from_secs_f64(limit_s as f64 * load),
        "{label} took {:?} (limit {limit_s} s times the load per core, {load:.1})",
        run.elapsed
    );
}

#[test]
fn a_ten_megabyte_atom_and_string_are_read() {
    let big = "A".repeat(10 << 20);
    let text = format!("{HEAD}  (nets (net (code 1) (name {big}) (node (ref J1) (pin 1)))))\n");
    let run = check_stdin(text.as_bytes(), &[]);
    assert_outcome(
        "10 MB atom",
        "<stdin>",
        &run,
        &Expect {
            exit: 0,
            code: None,
            place: None,
            fragment: "1 parts, 1 nets, 1 pins, 1 pins on no net",
        },
    );
    timed("10 MB atom", &run, 20);

    let text = format!("{HEAD}  (nets (net (code 1) (name \"{big}\") (node (ref J1) (pin 1)))))\n");
    let run = check_stdin(text.as_bytes(), &[]);
    assert_outcome(
        "10 MB string",
        "<stdin>",
        &run,
        &Expect {
            exit: 0,
            code: None,
            place: None,
            fragment: "1 parts, 1 nets, 1 pins",
        },
    );
    timed("10 MB string", &run, 20);
}

#[test]
fn a_ten_megabyte_unterminated_string_points_at_its_quote() {
    let text = format!(
        "{HEAD}  (nets (net (code 1) (name \"{}",
        "A".repeat(10 << 20)
    );
    let run = check_stdin(text.as_bytes(), &[]);
    // line 4: `  (nets (net (code 1) (name "` puts the quote at byte column 29
    assert_outcome(
        "10 MB unterminated",
        "<stdin>",
        &run,
        &Expect {
            exit: 2,
            code: Some("unterminated-string"),
            place: Some((4, 29)),
            fragment: "a quoted string is never closed",
        },
    );
    timed("10 MB unterminated", &run, 20);
}

#[test]
fn a_net_with_a_million_nodes() {
    let mut text = String::from(HEAD);
    text.push_str("  (nets (net (code 1) (name BUS)\n");
    for p in 1..=1_000_000 {
        text.push_str(&format!("   (node (ref J1) (pin {p}))\n"));
    }
    text.push_str(")))\n");
    let run = check_stdin(text.as_bytes(), &[]);
    assert_outcome(
        "1M nodes",
        "<stdin>",
        &run,
        &Expect {
            exit: 0,
            code: None,
            place: None,
            fragment: "1 parts, 1 nets, 1000000 pins, 0 pins on no net",
        },
    );
    // the debug build takes about 10 s alone; the limit is there to catch a cost that grows
    // with the square of the pins (hours at a million), not to time a loaded machine
    timed("1M nodes", &run, 60);
}

#[test]
fn a_million_nested_lists_stop_at_the_depth_limit() {
    let n = 1_000_000;
    let balanced = format!("{}{}", "(".repeat(n), ")".repeat(n));
    let run = check_stdin(balanced.as_bytes(), &[]);
    assert_outcome(
        "1M nested",
        "<stdin>",
        &run,
        &Expect {
            exit: 2,
            code: Some("too-deep"),
            place: Some((1, 1001)),
            fragment: "nested more than 1000 levels deep",
        },
    );
    timed("1M nested", &run, 20);

    let open_only = "(".repeat(n);
    let run = check_stdin(open_only.as_bytes(), &[]);
    assert_outcome(
        "1M open",
        "<stdin>",
        &run,
        &Expect {
            exit: 2,
            code: Some("too-deep"),
            place: Some((1, 1001)),
            fragment: "nested more than 1000 levels deep",
        },
    );
    timed("1M open", &run, 20);

    // a million lists side by side in the root are not deep: they are read
    let wide = format!("(export (version E) (x {}))", "() ".repeat(n));
    let run = check_stdin(wide.as_bytes(), &[]);
    assert_outcome(
        "1M wide",
        "<stdin>",
        &run,
        &Expect {
            exit: 0,
            code: None,
            place: None,
            fragment: "0 parts, 0 nets, 0 pins",
        },
    );
    timed("1M wide", &run, 20);
}

#[test]
fn many_duplicate_references_are_all_reported() {
    let n = 2000;
    let mut text = String::from("(export (version \"E\")\n  (components\n");
    for _ in 0..n {
        text.push_str("    (comp (ref \"J1\") (value \"Conn_01x03\"))\n");
    }
    text.push_str("))\n");
    let run = check_stdin(text.as_bytes(), &[]);
    assert_outcome(
        "duplicates",
        "<stdin>",
        &run,
        &Expect {
            exit: 1,
            code: Some("duplicate-ref"),
            place: Some((4, 16)),
            fragment: "two components share the reference `J1`",
        },
    );
    assert_eq!(
        run.stdout
            .matches("two components share the reference")
            .count(),
        n - 1
    );
    timed("duplicates", &run, 20);
}

#[test]
fn a_file_over_the_size_limit_is_refused() {
    let text = format!("{HEAD})\n");
    let run = check_stdin(text.as_bytes(), &["--max-bytes", "64"]);
    let fragment = "standard input holds more than the limit of 64 bytes".to_string();
    // standard input is read up to one byte past the limit
    assert_outcome(
        "too large",
        "<stdin>",
        &run,
        &Expect {
            exit: 2,
            code: Some("too-large"),
            place: None,
            fragment: &fragment,
        },
    );

    let path = root().join("fixtures/demo/counter-timer.net");
    let len = std::fs::metadata(&path).expect("demo board").len();
    let run = check_file(&path, &["--max-bytes", "1000"]);
    let fragment = format!("the file is {len} bytes, above the limit of 1000 bytes");
    let name = path.to_str().expect("a UTF-8 path").to_string();
    assert_outcome(
        "too large file",
        &name,
        &run,
        &Expect {
            exit: 2,
            code: Some("too-large"),
            place: None,
            fragment: &fragment,
        },
    );
}

// ---------------------------------------------------------------------------------------------
// Inputs the fuzzers found.

/// An unclosed list whose head runs past 40 bytes with a multi-byte character across the
/// 40th byte: the message cut the head inside the character.
#[test]
fn fuzz_unclosed_list_head_cut_inside_a_character() {
    let input = b"('(sourcetsta'''''''''''''''''''(date'\x07''\xef\xbb\xbf)\n";
    let run = check_stdin(input, &[]);
    // cut back to the character boundary at byte 41; the BEL is shown escaped
    let fragment = format!(
        "2 lists still open; the innermost, `(sourcetsta{}(date'\\u{{7}}''`, is never closed",
        "'".repeat(19)
    );
    assert_outcome(
        "fuzz read 1",
        "<stdin>",
        &run,
        &Expect {
            exit: 2,
            code: Some("unclosed-list"),
            place: Some((1, 3)),
            fragment: &fragment,
        },
    );
}

/// A diagnostic whose place is more than 65 535 columns along its line: miette pads to the
/// column with a format width and panicked ("Formatting argument out of range"). The place
/// is now named in the help instead of drawn.
#[test]
fn place_far_along_a_long_line_is_named_not_drawn() {
    let text = format!("(export (version E) (components (comp (ref J1))) (nets (net (code 1) (name {}) (node (ref U9) (pin 1)))))", "A".repeat(70_000));
    let at = text.find("U9").expect("U9");
    let run = check_stdin(text.as_bytes(), &[]);
    let fragment = format!(
        "the place, [<stdin>:1:{}], is too far along its line to draw",
        at + 1
    );
    assert_outcome(
        "far place",
        "<stdin>",
        &run,
        &Expect {
            exit: 1,
            code: Some("unknown-component"),
            place: None,
            fragment: &fragment,
        },
    );
    // a place near the start of the same kind of line is still drawn
    let text = format!("(export (version E) (components (comp (ref J1))) (nets (net (code 1) (node (ref U9) (pin 1)) (name {}))))", "A".repeat(70_000));
    let at = text.find("U9").expect("U9");
    let run = check_stdin(text.as_bytes(), &[]);
    assert_outcome(
        "near place",
        "<stdin>",
        &run,
        &Expect {
            exit: 1,
            code: Some("unknown-component"),
            place: Some((1, at + 1)),
            fragment: "which is not among the components",
        },
    );
}

/// A 100 kB net name quoted in the message of each of 200 nodes naming missing parts: the
/// report showed every message whole (20 MB of output from a 105 kB file, and minutes in a
/// debug build at a thousand nodes). A shown message keeps its two ends.
#[test]
fn long_names_in_many_messages_do_not_blow_up_the_report() {
    let mut text = format!(
        "(export (version E) (components) (nets (net (code 1) (name {})\n",
        "N".repeat(100_000)
    );
    for i in 0..200 {
        text.push_str(&format!("(node (ref X{i}) (pin 1))\n"));
    }
    text.push_str(")))\n");
    let run = check_stdin(text.as_bytes(), &[]);
    let fragment = format!(
        "[... {} characters left out ...]",
        "net `".len() + 100_000 + "` names X0, which is not among the components".len() - 1000
    );
    assert_outcome(
        "long names",
        "<stdin>",
        &run,
        &Expect {
            exit: 1,
            code: Some("unknown-component"),
            place: Some((2, 12)),
            fragment: &fragment,
        },
    );
    assert!(run.all().contains("which is not among the components"));
    assert_eq!(run.all().matches("characters left out").count(), 200);
    assert!(
        run.stdout.len() < 2_000_000,
        "{} bytes of output",
        run.stdout.len()
    );
    timed("long names", &run, 20);
}
