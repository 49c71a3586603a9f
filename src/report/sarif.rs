//! SARIF 2.1.0 (the OASIS Static Analysis Results Interchange Format): one log, one run.
//!
//! - `tool.driver.rules`: every check of [`crate::checks::REGISTRY`], then every reader and
//!   model code of [`crate::diag::INPUT_CODES`]; results point at them by `ruleIndex`.
//! - Each finding is a result at its primary span; its other labels are `relatedLocations`.
//!   A file that could not be checked gives one result for its fatal error.
//! - Paths are URIs relative to the root (`uriBaseId` `%SRCROOT%`, whose absolute `file:`
//!   URI is in `originalUriBaseIds`), `/`-separated and percent-encoded; a file outside the
//!   root gets an absolute `file:` URI.
//! - Columns count Unicode code points (`columnKind`), as the other formats do; regions also
//!   carry byte offsets and lengths.
//! - `partialFingerprints` hold [`super::fingerprints`], built from the check, net and pins,
//!   never from positions, so a finding keeps its identity when unrelated lines move.
//!
//! Only the subset of SARIF we emit is modelled, as plain serde structs.

use std::collections::BTreeMap;
use std::io::{self, Write};

use serde::Serialize;

use serde::ser::SerializeMap;

use super::{
    fingerprint_hashes, fingerprint_key, fnv1a64, primary_label, related_labels, rooted_path,
    Place, ReportOptions, RootedPath, TOOL_NAME, TOOL_VERSION,
};
use crate::checks::REGISTRY;
use crate::diag::{Diag, Severity, INPUT_CODES};
use crate::pipeline::FileOutcome;
use crate::source::{LineCursor, SourceFile};

/// The OASIS schema of SARIF 2.1.0 (with its errata), named in `$schema`.
pub const SCHEMA_URI: &str =
    "https://docs.oasis-open.org/sarif/sarif/v2.1.0/errata01/os/schemas/sarif-schema-2.1.0.json";
/// The base id the result URIs are relative to.
pub const SRCROOT: &str = "%SRCROOT%";
/// The key of our fingerprint in `partialFingerprints`.
pub const FINGERPRINT_KEY: &str = "netmarginFinding/v1";

#[derive(Serialize)]
struct Log<'a> {
    #[serde(rename = "$schema")]
    schema: &'static str,
    version: &'static str,
    runs: Vec<Run<'a>>,
}

#[derive(Serialize)]
#[serde(rename_all = "camelCase")]
struct Run<'a> {
    tool: Tool,
    original_uri_base_ids: BTreeMap<&'static str, ArtifactLocation>,
    column_kind: &'static str,
    invocations: Vec<Invocation>,
    results: Results<'a>,
}

/// Every file's results, each made into its [`SarifResult`] as it is written (never all at
/// once: a board can have hundreds of thousands).
struct Results<'a> {
    files: &'a [FileOutcome],
    /// Per file: the input's location, then one per sheet of a schematic project.
    artifacts: Vec<Vec<ArtifactLocation>>,
    index: BTreeMap<&'static str, usize>,
}

impl Serialize for Results<'_> {
    fn serialize<S: serde::Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        let index = &self.index;
        s.collect_seq(
            self.files
                .iter()
                .zip(&self.artifacts)
                .flat_map(|(f, arts)| {
                    let src = f.source.as_ref();
                    // a schematic's findings point into the sheet file where the item is drawn
                    let art_of = move |d: &Diag| {
                        let sheet = primary_label(d)
                            .and_then(|l| src?.part_index_at(l.span.start as usize));
                        &arts[sheet.map_or(0, |i| i + 1)]
                    };
                    // findings of one part come together: their lines are looked up near each other
                    let mut lines = src.map(SourceFile::cursor);
                    let fatal = f
                        .fatal
                        .as_ref()
                        .map(|d| (d, fnv1a64(fingerprint_key(d, src).as_bytes())));
                    fatal
                        .into_iter()
                        .chain(f.diags.iter().zip(fingerprint_hashes(f)))
                        .map(move |(d, fp)| result(d, lines.as_mut(), art_of(d), index, fp))
                }),
        )
    }
}

#[derive(Serialize)]
#[serde(rename_all = "camelCase")]
struct Invocation {
    execution_successful: bool,
}

#[derive(Serialize)]
struct Tool {
    driver: Driver,
}

#[derive(Serialize)]
#[serde(rename_all = "camelCase")]
struct Driver {
    name: &'static str,
    version: &'static str,
    semantic_version: &'static str,
    #[serde(skip_serializing_if = "Option::is_none")]
    information_uri: Option<&'static str>,
    rules: Vec<Rule>,
}

#[derive(Serialize)]
#[serde(rename_all = "camelCase")]
struct Rule {
    id: &'static str,
    name: String,
    short_description: Text,
    full_description: Text,
    help: Text,
    default_configuration: Configuration,
}

#[derive(Serialize, Clone)]
struct Text {
    text: String,
    #[serde(skip_serializing_if = "Option::is_none")]
    markdown: Option<String>,
}

impl Text {
    fn plain(s: &str) -> Text {
        Text {
            text: s.to_string(),
            markdown: None,
        }
    }
}

#[derive(Serialize)]
struct Configuration {
    level: &'static str,
}

#[derive(Serialize)]
struct Message<'a> {
    text: &'a str,
}

#[derive(Serialize)]
#[serde(rename_all = "camelCase")]
struct SarifResult<'a> {
    rule_id: &'a str,
    #[serde(skip_serializing_if = "Option::is_none")]
    rule_index: Option<usize>,
    level: &'static str,
    message: Message<'a>,
    locations: [Location<'a>; 1],
    #[serde(skip_serializing_if = "Vec::is_empty")]
    related_locations: Vec<Location<'a>>,
    partial_fingerprints: PartialFingerprints,
    #[serde(skip_serializing_if = "Properties::is_empty")]
    properties: Properties<'a>,
}

#[derive(Serialize)]
struct Properties<'a> {
    #[serde(skip_serializing_if = "Option::is_none")]
    net: Option<&'a str>,
    #[serde(skip_serializing_if = "<[String]>::is_empty")]
    pins: &'a [String],
    #[serde(skip_serializing_if = "Option::is_none")]
    help: Option<&'a str>,
}

impl Properties<'_> {
    fn is_empty(&self) -> bool {
        self.net.is_none() && self.pins.is_empty() && self.help.is_none()
    }
}

#[derive(Serialize)]
#[serde(rename_all = "camelCase")]
struct Location<'a> {
    #[serde(skip_serializing_if = "Option::is_none")]
    id: Option<usize>,
    physical_location: PhysicalLocation<'a>,
    #[serde(skip_serializing_if = "Option::is_none")]
    message: Option<Message<'a>>,
}

/// `partialFingerprints`: our one fingerprint, under [`FINGERPRINT_KEY`].
struct PartialFingerprints(u64);

impl Serialize for PartialFingerprints {
    fn serialize<S: serde::Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        let mut m = s.serialize_map(Some(1))?;
        m.serialize_entry(FINGERPRINT_KEY, &super::json::Fingerprint(self.0))?;
        m.end()
    }
}

#[derive(Serialize)]
#[serde(rename_all = "camelCase")]
struct PhysicalLocation<'a> {
    artifact_location: &'a ArtifactLocation,
    #[serde(skip_serializing_if = "Option::is_none")]
    region: Option<Region>,
}

#[derive(Serialize, Clone)]
#[serde(rename_all = "camelCase")]
struct ArtifactLocation {
    #[serde(skip_serializing_if = "Option::is_none")]
    uri: Option<String>,
    #[serde(skip_serializing_if = "Option::is_none")]
    uri_base_id: Option<&'static str>,
    #[serde(skip_serializing_if = "Option::is_none")]
    description: Option<Text>,
}

#[derive(Serialize)]
#[serde(rename_all = "camelCase")]
struct Region {
    start_line: usize,
    start_column: usize,
    end_line: usize,
    end_column: usize,
    byte_offset: usize,
    byte_length: usize,
}

impl Region {
    fn of(p: Place) -> Region {
        Region {
            start_line: p.line,
            start_column: p.column,
            end_line: p.end_line,
            end_column: p.end_column,
            byte_offset: p.byte_offset,
            byte_length: p.byte_length,
        }
    }
}

/// SARIF's name for a severity.
pub fn level(s: Severity) -> &'static str {
    match s {
        Severity::Error => "error",
        Severity::Warning => "warning",
        Severity::Info => "note",
    }
}

/// The severity the reader and the model give each of their codes.
fn input_code_severity(code: &str) -> Severity {
    match code {
        "missing-field" | "duplicate-net-code" => Severity::Warning,
        "netlist-version" | "missing-libpart" => Severity::Info,
        _ => Severity::Error,
    }
}

/// `floating-cmos-input` -> `FloatingCmosInput`.
fn pascal_case(id: &str) -> String {
    id.split('-')
        .map(|w| {
            let mut c = w.chars();
            match c.next() {
                Some(f) => f.to_uppercase().chain(c).collect::<String>(),
                None => String::new(),
            }
        })
        .collect()
}

fn rules() -> Vec<Rule> {
    let mut v: Vec<Rule> = REGISTRY
        .iter()
        .map(|c| {
            let doc = c.doc();
            let full = if doc.is_empty() { c.summary } else { doc };
            Rule {
                id: c.id,
                name: pascal_case(c.id),
                short_description: Text::plain(c.summary),
                full_description: Text::plain(full),
                help: Text {
                    text: full.to_string(),
                    markdown: (!doc.is_empty()).then(|| doc.to_string()),
                },
                default_configuration: Configuration {
                    level: level(c.severity),
                },
            }
        })
        .collect();
    v.extend(INPUT_CODES.iter().map(|&(id, summary)| Rule {
        id,
        name: pascal_case(id),
        short_description: Text::plain(summary),
        full_description: Text::plain(summary),
        help: Text::plain(summary),
        default_configuration: Configuration {
            level: level(input_code_severity(id)),
        },
    }));
    v
}

/// Percent-encodes a `/`-separated path for a URI: everything but RFC 3986's unreserved
/// characters and `/` (a `:` too, so a relative reference is never read as a scheme).
pub fn percent_encode_path(path: &str) -> String {
    let mut out = String::with_capacity(path.len());
    for &b in path.as_bytes() {
        if b.is_ascii_alphanumeric() || matches!(b, b'-' | b'.' | b'_' | b'~' | b'/') {
            out.push(b as char);
        } else {
            out.push_str(&format!("%{b:02X}"));
        }
    }
    out
}

/// A `file:` URI for an absolute, `/`-separated path (`/a/b` or `C:/a/b`).
fn file_uri(abs: &str) -> String {
    let abs = abs.strip_prefix('/').unwrap_or(abs);
    // a drive letter keeps its colon
    let (drive, rest) = match abs.as_bytes() {
        [d, b':', ..] if d.is_ascii_alphabetic() => abs.split_at(2),
        _ => ("", abs),
    };
    format!("file:///{drive}{}", percent_encode_path(rest))
}

/// The `file:` URI of the root, ending in `/` as SARIF requires of a base.
fn root_uri(opts: &ReportOptions) -> String {
    let mut u = file_uri(&super::absolute_slashed(&opts.root, &opts.cwd));
    if !u.ends_with('/') {
        u.push('/');
    }
    u
}

fn artifact(name: &str, opts: &ReportOptions) -> ArtifactLocation {
    match rooted_path(name, &opts.root, &opts.cwd) {
        RootedPath::Relative(rel) => ArtifactLocation {
            uri: Some(percent_encode_path(&rel)),
            uri_base_id: Some(SRCROOT),
            description: None,
        },
        RootedPath::Absolute(abs) => ArtifactLocation {
            uri: Some(file_uri(&abs)),
            uri_base_id: None,
            description: None,
        },
        RootedPath::Stdin => ArtifactLocation {
            uri: None,
            uri_base_id: None,
            description: Some(Text::plain("standard input")),
        },
    }
}

fn result<'a>(
    d: &'a Diag,
    mut lines: Option<&mut LineCursor<'_>>,
    art: &'a ArtifactLocation,
    index: &BTreeMap<&str, usize>,
    fingerprint: u64,
) -> SarifResult<'a> {
    let mut place = |span| lines.as_deref_mut().map(|l| Region::of(Place::at(l, span)));
    let primary = primary_label(d);
    let location = Location {
        id: None,
        physical_location: PhysicalLocation {
            artifact_location: art,
            region: primary.and_then(|l| place(l.span)),
        },
        message: primary
            .filter(|l| !l.text.is_empty())
            .map(|l| Message { text: &l.text }),
    };
    let related = related_labels(d)
        .enumerate()
        .map(|(i, l)| Location {
            id: Some(i + 1),
            physical_location: PhysicalLocation {
                artifact_location: art,
                region: place(l.span),
            },
            message: Some(Message { text: &l.text }),
        })
        .collect();
    SarifResult {
        rule_id: &d.code,
        rule_index: index.get(&*d.code).copied(),
        level: level(d.severity),
        message: Message { text: &d.message },
        locations: [location],
        related_locations: related,
        partial_fingerprints: PartialFingerprints(fingerprint),
        properties: Properties {
            net: d.net.as_deref(),
            pins: &d.pins,
            help: d.help.as_deref(),
        },
    }
}

/// The SARIF log as text, with a final line end.
pub fn to_string(opts: &ReportOptions, files: &[FileOutcome]) -> String {
    let mut out = Vec::new();
    write(opts, files, &mut out).expect("a log of strings and numbers serializes");
    String::from_utf8(out).expect("serde_json writes UTF-8")
}

/// The SARIF log written to `out` as it is serialized, escaped on the way (as the JSON
/// format is), with a final line end.
pub fn write(opts: &ReportOptions, files: &[FileOutcome], out: &mut dyn Write) -> io::Result<()> {
    let rules = rules();
    let index: BTreeMap<&'static str, usize> = rules
        .iter()
        .enumerate()
        .rev()
        .map(|(i, r)| (r.id, i))
        .collect();
    let artifacts = files
        .iter()
        .map(|f| {
            let sheets = f.source.iter().flat_map(|s| s.files()).map(|p| &*p.name);
            std::iter::once(&*f.name)
                .chain(sheets)
                .map(|name| artifact(name, opts))
                .collect()
        })
        .collect();
    let homepage = [env!("CARGO_PKG_HOMEPAGE"), env!("CARGO_PKG_REPOSITORY")]
        .into_iter()
        .find(|s| !s.is_empty());
    let log = Log {
        schema: SCHEMA_URI,
        version: "2.1.0",
        runs: vec![Run {
            tool: Tool {
                driver: Driver {
                    name: TOOL_NAME,
                    version: TOOL_VERSION,
                    semantic_version: TOOL_VERSION,
                    information_uri: homepage,
                    rules,
                },
            },
            original_uri_base_ids: BTreeMap::from([(
                SRCROOT,
                ArtifactLocation {
                    uri: Some(root_uri(opts)),
                    uri_base_id: None,
                    description: None,
                },
            )]),
            column_kind: "unicodeCodePoints",
            invocations: vec![Invocation {
                execution_successful: files.iter().all(|f| f.fatal.is_none()),
            }],
            results: Results {
                files,
                artifacts,
                index,
            },
        }],
    };
    super::json::write_safe_pretty(&log, out)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn uris_are_percent_encoded_with_slashes() {
        // RFC 3986 unreserved characters stay; space, `%`, `#`, `?`, `:` and non-ASCII
        // (as UTF-8 bytes) are encoded
        assert_eq!(
            percent_encode_path("boards/a b/c%#?.net"),
            "boards/a%20b/c%25%23%3F.net"
        );
        assert_eq!(percent_encode_path("x:y/Ω~_-.net"), "x%3Ay/%CE%A9~_-.net");
        assert_eq!(file_uri("/home/a b/x.net"), "file:///home/a%20b/x.net");
        assert_eq!(file_uri("C:/Users/x.net"), "file:///C:/Users/x.net");
    }

    #[test]
    fn input_code_levels_are_those_the_reader_uses() {
        // read the severities off the reader's and the model's own `Diag::<severity>("code"`;
        // a code used at several severities (missing-field) defaults to one of them
        let mut used: BTreeMap<&str, Vec<Severity>> = BTreeMap::new();
        let mut texts = Vec::new();
        for file in [
            "src/input.rs",
            "src/pipeline.rs",
            "src/sexpr/mod.rs",
            "src/netlist/build.rs",
        ] {
            let path = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join(file);
            texts.push(
                std::fs::read_to_string(&path).expect("the reader's sources are in the package"),
            );
        }
        for text in &texts {
            for (sev, needle) in [
                (Severity::Error, "Diag::error("),
                (Severity::Warning, "Diag::warning("),
                (Severity::Info, "Diag::info("),
            ] {
                for (at, _) in text.match_indices(needle) {
                    let Some(rest) = text[at + needle.len()..].trim_start().strip_prefix('"')
                    else {
                        continue;
                    };
                    let code = &rest[..rest.find('"').expect("a closed string literal")];
                    if INPUT_CODES.iter().any(|(c, _)| *c == code) {
                        used.entry(code).or_default().push(sev);
                    }
                }
            }
        }
        assert!(
            used.len() >= 10,
            "found only {} of the input codes in use",
            used.len()
        );
        for (code, sevs) in &used {
            assert!(
                sevs.contains(&input_code_severity(code)),
                "{code} is used as {sevs:?}, defaults to {:?}",
                input_code_severity(code)
            );
        }
        for (code, _) in INPUT_CODES {
            assert!(
                crate::checks::info(code).is_none(),
                "{code} is both a check and an input code"
            );
        }
    }

    #[test]
    fn rule_names_are_pascal_case() {
        assert_eq!(pascal_case("floating-cmos-input"), "FloatingCmosInput");
        assert_eq!(pascal_case("too-large"), "TooLarge");
    }
}
