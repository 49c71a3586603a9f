//! Baselines: the findings a legacy board already has, recorded so that `check --baseline`
//! reports only new ones. Written by `netmargin baseline`, read by `check --baseline FILE`.
//!
//! The file is our own JSON (`netmargin-baseline.json` by default):
//!
//! ```json
//! {
//!   "format_version": 1,
//!   "tool": "netmargin 0.1.0",
//!   "files": {
//!     "boards/sequencer.net": [
//!       {
//!         "fingerprint": "5f0c2a9e81d4b737",
//!         "check": "floating-cmos-input",
//!         "net": "Net-(U20-Pad10)",
//!         "pins": ["U20.10"],
//!         "message": "U20 pin 10 (74HC00 input 3B) is connected to nothing: ..."
//!       }
//!     ]
//!   }
//! }
//! ```
//!
//! - `format_version`: 1. A reader refuses a version it does not know.
//! - `files`: one key per netlist, its path relative to the folder of the baseline file,
//!   `/`-separated, with `..` when the netlist lies beside or above that folder (absolute
//!   only when the two share no folder at all; `<stdin>` for standard input). A netlist
//!   with no findings is listed with an empty array.
//! - each entry: `fingerprint` (16 hex digits, [`crate::report::fingerprints`]: built from
//!   the check id, the net and the pins, never a line number, so unrelated edits keep it),
//!   and for a human reader the `check` id, the `net`, the `pins` and the `message` when
//!   the baseline was made. Only `fingerprint` and `check` are needed to read it back.
//!
//! A finding is suppressed when its file's list holds its fingerprint. Entries that match
//! nothing any more are reported (code `stale-baseline`, severity info) so the file can be
//! tightened; files in the baseline that a run does not check are left alone.

use std::collections::{BTreeMap, HashSet};
use std::path::{Path, PathBuf};

use serde::{Deserialize, Serialize};

use crate::config::ConfigError;
use crate::diag::Diag;
use crate::pipeline::FileOutcome;
use crate::report::{absolute_slashed, fingerprints, rooted_path, RootedPath};
use crate::source::{SourceFile, Span};

/// The default file name.
pub const DEFAULT_FILE: &str = "netmargin-baseline.json";
/// The format version this build writes and reads.
pub const FORMAT_VERSION: u64 = 1;

/// One recorded finding.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Entry {
    pub fingerprint: String,
    pub check: String,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub net: Option<String>,
    #[serde(default)]
    pub pins: Vec<String>,
    #[serde(default)]
    pub message: String,
}

#[derive(Debug, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
struct RawBaseline {
    format_version: u64,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    tool: Option<String>,
    files: BTreeMap<String, Vec<Entry>>,
}

/// A loaded baseline.
#[derive(Debug, Clone)]
pub struct Baseline {
    /// The file, as named.
    pub path: PathBuf,
    /// Absolute folder the file keys are relative to.
    pub base: PathBuf,
    pub source: SourceFile,
    pub files: BTreeMap<String, Vec<Entry>>,
}

/// What applying a baseline did.
#[derive(Debug, Clone, Default, PartialEq, Eq)]
pub struct Applied {
    /// Findings suppressed, over all files.
    pub suppressed: usize,
    /// Entries that matched nothing, over the files checked.
    pub gone: usize,
}

/// The absolute folder of a baseline file named `path` (relative to `cwd`).
pub fn base_dir(path: &Path, cwd: &Path) -> PathBuf {
    let abs = cwd.join(path);
    abs.parent().map(Path::to_path_buf).unwrap_or(abs)
}

/// The key of a netlist named `name` (as given on the command line, relative to `cwd`) in a
/// baseline whose folder is `base`.
/// Relative with `..` when the netlist lies beside or above that folder, so a repository's
/// baseline holds no machine's paths.
pub fn file_key(name: &str, base: &Path, cwd: &Path) -> String {
    match rooted_path(name, base, cwd) {
        RootedPath::Relative(s) => s,
        RootedPath::Absolute(s) => {
            let b = absolute_slashed(base, cwd);
            let bs: Vec<&str> = b.split('/').filter(|c| !c.is_empty()).collect();
            let fs: Vec<&str> = s.split('/').filter(|c| !c.is_empty()).collect();
            let common = bs.iter().zip(&fs).take_while(|(a, b)| a == b).count();
            // nothing in common (another drive): the absolute path
            if common == 0 {
                return s;
            }
            let mut parts: Vec<&str> = vec![".."; bs.len() - common];
            parts.extend(&fs[common..]);
            parts.join("/")
        }
        RootedPath::Stdin => "<stdin>".to_string(),
    }
}

/// The entries of one file's findings (in the findings' order).
pub fn entries(f: &FileOutcome) -> Vec<Entry> {
    f.diags
        .iter()
        .zip(fingerprints(f))
        .map(|(d, fp)| Entry {
            fingerprint: fp,
            check: d.code().to_string(),
            net: d.net().map(String::from),
            pins: d.pins().map(String::from).collect(),
            message: d.message().into_owned(),
        })
        .collect()
}

/// The baseline document for the netlist outcomes of a run (files that could not be
/// checked are left out: the caller refuses to write a baseline then). Pretty JSON, with a
/// final line end.
pub fn render(netlists: &[FileOutcome], base: &Path, cwd: &Path) -> String {
    let mut files = BTreeMap::new();
    for f in netlists.iter().filter(|f| f.fatal.is_none()) {
        // a file named twice is recorded once
        files
            .entry(file_key(&f.name, base, cwd))
            .or_insert_with(|| entries(f));
    }
    let raw = RawBaseline {
        format_version: FORMAT_VERSION,
        tool: Some(format!(
            "{} {}",
            crate::report::TOOL_NAME,
            crate::report::TOOL_VERSION
        )),
        files,
    };
    let mut s = serde_json::to_string_pretty(&raw).expect("a baseline serializes");
    s.push('\n');
    s
}

/// Reads a baseline file; `cwd` resolves a relative `path`.
pub fn load(path: &Path, cwd: &Path) -> Result<Baseline, ConfigError> {
    let name = path.display().to_string();
    let text = std::fs::read_to_string(cwd.join(path)).map_err(|e| {
        let what = match e.kind() {
            std::io::ErrorKind::NotFound => "no such file".to_string(),
            std::io::ErrorKind::InvalidData => "it is not UTF-8 text".to_string(),
            _ => e.to_string(),
        };
        ConfigError {
            source: SourceFile::new(name.clone(), ""),
            diags: vec![Diag::error(
                "baseline",
                format!("cannot read the baseline `{name}`: {what}"),
            )
            .with_help("make one with `netmargin baseline <PATH>... -o FILE`")],
        }
    })?;
    let source = SourceFile::new(name, text);
    let files = parse(&source)?;
    Ok(Baseline {
        path: path.to_path_buf(),
        base: base_dir(path, cwd),
        source,
        files,
    })
}

/// Parses and validates a baseline text.
pub fn parse(source: &SourceFile) -> Result<BTreeMap<String, Vec<Entry>>, ConfigError> {
    let text = source.text();
    let err = |d: Diag| ConfigError {
        source: source.clone(),
        diags: vec![d],
    };
    let raw: RawBaseline = serde_json::from_str(text).map_err(|e| {
        let at = offset_of(text, e.line(), e.column());
        let msg = e.to_string();
        // serde_json appends " at line L column C"; the label shows the place instead
        let msg = msg.split(" at line ").next().unwrap_or(&msg).to_string();
        let msg = crate::classify::in_our_words(&msg);
        err(Diag::error("baseline", format!("in the baseline: {msg}"))
            .at(Span::new(at, (at + 1).min(text.len()).max(at)), "here")
            .with_help("a baseline is the JSON that `netmargin baseline` writes; make it again if it was edited by hand"))
    })?;
    if raw.format_version != FORMAT_VERSION {
        let at = text.find("\"format_version\"").unwrap_or(0);
        return Err(err(Diag::error("baseline", format!("baseline format_version {} is not one this netmargin reads (it reads {FORMAT_VERSION})", raw.format_version))
            .at(Span::new(at, at + "\"format_version\"".len().min(text.len() - at)), "here")
            .with_help("make the baseline again with this netmargin")));
    }
    let mut diags = Vec::new();
    for entries in raw.files.values() {
        for e in entries {
            if e.fingerprint.len() != 16 || !e.fingerprint.bytes().all(|b| b.is_ascii_hexdigit()) {
                let span = find_quoted(text, &e.fingerprint).unwrap_or(Span::new(0, 0));
                diags.push(
                    Diag::error(
                        "baseline",
                        format!(
                            "`{}` is not a fingerprint: expected 16 hex digits",
                            e.fingerprint
                        ),
                    )
                    .at(span, "here"),
                );
            }
        }
    }
    if diags.is_empty() {
        Ok(raw.files)
    } else {
        Err(ConfigError {
            source: source.clone(),
            diags,
        })
    }
}

/// The byte offset of a 1-based line and column (serde_json counts the column in bytes, 0
/// at the very end of a line).
fn offset_of(text: &str, line: usize, column: usize) -> usize {
    let starts = crate::source::line_starts(text.as_bytes());
    let start = starts
        .get(line.saturating_sub(1))
        .map_or(text.len(), |&s| s as usize);
    let mut at = (start + column.saturating_sub(1)).min(text.len());
    while !text.is_char_boundary(at) {
        at -= 1;
    }
    at
}

/// The span of the first `"s"` in the text.
fn find_quoted(text: &str, s: &str) -> Option<Span> {
    let quoted = serde_json::to_string(s).ok()?;
    text.find(&quoted)
        .map(|at| Span::new(at, at + quoted.len()))
}

impl Baseline {
    /// Removes from each netlist outcome the findings the baseline holds (counting them in
    /// `waived`) and returns the `stale-baseline` outcome for the baseline file when entries
    /// of the files checked match nothing: one info per file, or one per entry when
    /// `verbose`.
    pub fn apply(
        &self,
        netlists: &mut [FileOutcome],
        cwd: &Path,
        verbose: bool,
    ) -> (Applied, Option<FileOutcome>) {
        let mut applied = Applied::default();
        let mut diags = Vec::new();
        for o in netlists.iter_mut().filter(|o| o.fatal.is_none()) {
            let key = file_key(&o.name, &self.base, cwd);
            let Some(entries) = self.files.get(&key) else {
                continue;
            };
            let known: HashSet<&str> = entries.iter().map(|e| e.fingerprint.as_str()).collect();
            let fps = fingerprints(o);
            let found: HashSet<&str> = fps.iter().map(String::as_str).collect();
            let before = o.diags.len();
            let mut keep = fps.iter().map(|fp| !known.contains(fp.as_str()));
            o.diags.retain(|_| keep.next().unwrap_or(true));
            let n = before - o.diags.len();
            o.waived += n;
            applied.suppressed += n;
            let gone: Vec<&Entry> = entries
                .iter()
                .filter(|e| !found.contains(e.fingerprint.as_str()))
                .collect();
            applied.gone += gone.len();
            if gone.is_empty() {
                continue;
            }
            if verbose {
                for e in gone {
                    let mut what = format!("`{}`", e.check);
                    if !e.pins.is_empty() {
                        what.push_str(&format!(" on {}", e.pins.join(", ")));
                    }
                    if let Some(net) = &e.net {
                        what.push_str(&format!(" (net {net})"));
                    }
                    let span =
                        find_quoted(self.source.text(), &e.fingerprint).unwrap_or(Span::new(0, 0));
                    diags.push(
                        Diag::info(
                            "stale-baseline",
                            format!("{key}: the baseline entry for {what} matches no finding now"),
                        )
                        .at(span, "no longer found")
                        .with_help(
                            "take it out, or make the baseline again with `netmargin baseline`",
                        ),
                    );
                }
            } else {
                let span = find_quoted(self.source.text(), &key).unwrap_or(Span::new(0, 0));
                diags.push(
                    Diag::info("stale-baseline", format!("{key}: {} of its {} baseline entries match no finding now", gone.len(), entries.len()))
                        .at(span, "can be tightened")
                        .with_help("make the baseline again with `netmargin baseline` to drop the fixed findings; `--verbose` lists them"),
                );
            }
        }
        let outcome = (!diags.is_empty()).then(|| FileOutcome {
            name: self.path.display().to_string(),
            source: Some(self.source.clone()),
            fatal: None,
            diags: diags.into(),
            summary: Default::default(),
            coverage: None,
            waived: 0,
        });
        (applied, outcome)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn src(text: &str) -> SourceFile {
        SourceFile::new("netmargin-baseline.json", text)
    }

    fn outcome(name: &str, diags: Vec<Diag>) -> FileOutcome {
        FileOutcome {
            name: name.into(),
            source: Some(SourceFile::new(name, "(export)")),
            fatal: None,
            diags: diags.into(),
            summary: Default::default(),
            coverage: None,
            waived: 0,
        }
    }

    fn finding(code: &str, net: &str, pins: &[&str]) -> Diag {
        Diag::error(code.to_string(), format!("{code} on {net}"))
            .on_net(net)
            .with_pins(pins.iter().copied())
    }

    #[test]
    fn keys_are_relative_to_the_baseline_folder() {
        let base = base_dir(Path::new("ci/netmargin-baseline.json"), Path::new("/repo"));
        assert_eq!(base, Path::new("/repo/ci"));
        assert_eq!(
            file_key("ci/boards/a.net", &base, Path::new("/repo")),
            "boards/a.net"
        );
        assert_eq!(
            file_key("a.net", &base, Path::new("/repo/ci/boards")),
            "boards/a.net"
        );
        assert_eq!(file_key("b.net", &base, Path::new("/repo")), "../b.net");
        assert_eq!(
            file_key("hw/x/b.net", &base, Path::new("/repo")),
            "../hw/x/b.net"
        );
        assert_eq!(
            file_key("/elsewhere/c.net", &base, Path::new("/repo")),
            "/elsewhere/c.net"
        );
        assert_eq!(file_key("<stdin>", &base, Path::new("/repo")), "<stdin>");
    }

    #[test]
    fn written_baselines_read_back_and_suppress_exactly_their_findings() {
        let cwd = Path::new("/repo");
        let a = vec![
            finding("floating-cmos-input", "N1", &["U1.2"]),
            finding("fanout-overrun", "N2", &["U3.6", "U4.1"]),
        ];
        let text = render(&[outcome("a.net", a.clone())], cwd, cwd);
        let files = parse(&src(&text)).unwrap();
        assert_eq!(files["a.net"].len(), 2);
        assert_eq!(files["a.net"][1].pins, vec!["U3.6", "U4.1"]);
        let b = Baseline {
            path: "netmargin-baseline.json".into(),
            base: cwd.into(),
            source: src(&text),
            files,
        };
        // one old finding fixed, one new one added
        let mut now = vec![outcome(
            "a.net",
            vec![
                a[1].clone(),
                finding("floating-cmos-input", "N9", &["U7.1"]),
            ],
        )];
        let (applied, stale) = b.apply(&mut now, cwd, false);
        assert_eq!(
            applied,
            Applied {
                suppressed: 1,
                gone: 1
            }
        );
        assert_eq!(now[0].waived, 1);
        assert_eq!(now[0].diags.len(), 1);
        assert_eq!(now[0].diags.get(0).unwrap().net(), Some("N9"));
        let stale = stale.expect("an entry is gone");
        assert_eq!(stale.diags.len(), 1);
        assert_eq!(
            stale.diags.get(0).unwrap().message(),
            "a.net: 1 of its 2 baseline entries match no finding now"
        );
        // verbose: one line per gone entry, at the entry's fingerprint
        let mut again = vec![outcome("a.net", vec![])];
        let (applied, stale) = b.apply(&mut again, cwd, true);
        assert_eq!(applied.gone, 2);
        let stale = stale.expect("both gone");
        assert_eq!(stale.diags.len(), 2);
        assert!(
            stale
                .diags
                .get(1)
                .unwrap()
                .message()
                .contains("`fanout-overrun` on U3.6, U4.1 (net N2)"),
            "{}",
            stale.diags.get(1).unwrap().message()
        );
        let span = stale.diags.get(0).unwrap().primary_span().unwrap();
        assert_eq!(
            &text[span.range()],
            format!("\"{}\"", b.files["a.net"][0].fingerprint)
        );
        // a file the baseline does not list keeps every finding
        let mut other = vec![outcome("b.net", a.clone())];
        let (applied, stale) = b.apply(&mut other, cwd, false);
        assert_eq!((applied.suppressed, other[0].diags.len()), (0, 2));
        assert!(stale.is_none());
    }

    #[test]
    fn fingerprints_ignore_where_a_finding_sits() {
        // the same finding at another place in a changed file still matches
        let cwd = Path::new("/r");
        let d = finding("missing-pull-up", "/IRQ_N", &["U15.2", "U24.1"]);
        let text = render(
            &[outcome(
                "x.net",
                vec![d.clone().at(Span::new(1, 3), "here")],
            )],
            cwd,
            cwd,
        );
        let b = Baseline {
            path: "b.json".into(),
            base: cwd.into(),
            source: src(&text),
            files: parse(&src(&text)).unwrap(),
        };
        let mut moved = vec![outcome(
            "x.net",
            vec![d.clone().at(Span::new(40, 90), "moved")],
        )];
        assert_eq!(b.apply(&mut moved, cwd, false).0.suppressed, 1);
        // another pin is another finding
        let mut changed = vec![outcome(
            "x.net",
            vec![finding("missing-pull-up", "/IRQ_N", &["U15.2", "U25.1"])],
        )];
        assert_eq!(b.apply(&mut changed, cwd, false).0.suppressed, 0);
    }

    #[test]
    fn malformed_baselines_are_errors_at_their_line() {
        let line_of = |text: &str| {
            let e = parse(&src(text)).unwrap_err();
            let s = e.diags[0].primary_span().expect("a place");
            (
                e.source.line_col(s.start as usize).line,
                e.diags[0].message.to_string(),
            )
        };
        let (line, msg) = line_of("{\n  \"format_version\": 1,\n  \"files\": {\n    \"a.net\": [ { \"fingerprint\": 12 } ]\n  }\n}\n");
        assert_eq!(line, 4, "{msg}");
        assert!(
            msg.starts_with("in the baseline: expected text in quotes, found"),
            "{msg}"
        );
        let (line, msg) = line_of("{\n  \"format_version\": 1,\n  \"files\": {\n    \"a.net\": [\n      { \"fingerprint\": \"0123456789abcdef\", \"check\": \"x\", \"colour\": 1 }\n");
        assert_eq!(line, 5, "{msg}");
        assert!(msg.contains("unknown key `colour`"), "{msg}");
        let (line, msg) = line_of("{\n\n  \"format_version\": 7, \"files\": {} }");
        assert_eq!(line, 3);
        assert_eq!(
            msg,
            "baseline format_version 7 is not one this netmargin reads (it reads 1)"
        );
        let (line, msg) = line_of("{ \"format_version\": 1, \"files\": {\n \"a.net\": [\n{ \"fingerprint\": \"xyz\", \"check\": \"c\" } ] } }");
        assert_eq!(line, 3);
        assert_eq!(msg, "`xyz` is not a fingerprint: expected 16 hex digits");
        let (line, msg) = line_of("{ \"format_version\": 1,\n \"files\": {\n");
        assert_eq!(line, 3, "{msg}");
        let (_, msg) = line_of("");
        assert!(msg.starts_with("in the baseline: EOF"), "{msg}");
    }
}
