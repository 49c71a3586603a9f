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

use super::pretty::{PrettyOut, Repeats};
use super::{
    fingerprint_hash_iter, fingerprint_key, fnv1a64, primary_label, related_labels, rooted_path,
    Place, Places, ReportOptions, RootedPath, TOOL_NAME, TOOL_VERSION,
};
use crate::checks::REGISTRY;
use crate::diag::{DiagRef, Severity, INPUT_CODES};
use crate::pipeline::FileOutcome;

/// The OASIS schema of SARIF 2.1.0 (with its errata), named in `$schema`.
pub const SCHEMA_URI: &str =
    "https://docs.oasis-open.org/sarif/sarif/v2.1.0/errata01/os/schemas/sarif-schema-2.1.0.json";
/// The base id the result URIs are relative to.
pub const SRCROOT: &str = "%SRCROOT%";
/// The key of our fingerprint in `partialFingerprints`.
pub const FINGERPRINT_KEY: &str = "netmarginFinding/v1";

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

/// A place in a file, as a SARIF `region`.
fn write_region(w: &mut PrettyOut<'_>, p: Place) {
    w.open_object();
    w.key("startLine").num(p.line);
    w.key("startColumn").num(p.column);
    w.key("endLine").num(p.end_line);
    w.key("endColumn").num(p.end_column);
    w.key("byteOffset").num(p.byte_offset);
    w.key("byteLength").num(p.byte_length);
    w.close_object();
}

/// `{"text": ..}`.
fn write_message(w: &mut PrettyOut<'_>, text: &str) {
    w.open_object();
    w.key("text").str(text);
    w.close_object();
}

impl ArtifactLocation {
    /// The location as its serde form writes it (in every result, so written by hand).
    fn write(&self, w: &mut PrettyOut<'_>) {
        w.open_object();
        if let Some(uri) = &self.uri {
            w.key("uri").str(uri);
        }
        if let Some(base) = self.uri_base_id {
            w.key("uriBaseId").str(base);
        }
        if let Some(d) = &self.description {
            w.key("description").open_object();
            w.key("text").str(&d.text);
            if let Some(m) = &d.markdown {
                w.key("markdown").str(m);
            }
            w.close_object();
        }
        w.close_object();
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

/// One result: the finding at its primary place, its other places as related locations.
fn write_result(
    w: &mut PrettyOut<'_>,
    d: DiagRef<'_>,
    places: &mut Places<'_>,
    kept: &mut Repeats,
    art: &ArtifactLocation,
    index: &BTreeMap<&str, usize>,
    fingerprint: u64,
) {
    let mut location = |w: &mut PrettyOut<'_>,
                        id: Option<usize>,
                        span: Option<crate::source::Span>,
                        text: Option<&str>| {
        w.open_object();
        if let Some(id) = id {
            w.key("id").num(id);
        }
        w.key("physicalLocation").open_object();
        w.key("artifactLocation");
        art.write(w);
        if let Some(span) = span.filter(|_| places.source().is_some()) {
            // a region depends on nothing but its span
            w.repeat(kept, span, |w| {
                w.key("region");
                write_region(w, places.of(span).expect("the text is known"));
            });
        }
        w.close_object();
        if let Some(text) = text {
            w.key("message");
            write_message(w, text);
        }
        w.close_object();
    };
    let primary = primary_label(d);
    w.open_object();
    w.key("ruleId").str(d.code());
    if let Some(&i) = index.get(d.code()) {
        w.key("ruleIndex").num(i);
    }
    w.key("level").word(level(d.severity()));
    w.key("message");
    write_message(w, &d.message());
    w.key("locations").open_array();
    w.item();
    location(
        w,
        None,
        primary.map(|l| l.span),
        primary.filter(|l| !l.text.is_empty()).map(|l| l.text),
    );
    w.close_array();
    let mut related = related_labels(d).enumerate().peekable();
    if related.peek().is_some() {
        w.key("relatedLocations").open_array();
        for (i, l) in related {
            w.item();
            location(w, Some(i + 1), Some(l.span), Some(l.text));
        }
        w.close_array();
    }
    w.key("partialFingerprints").open_object();
    w.key(FINGERPRINT_KEY).hex64(fingerprint);
    w.close_object();
    if d.net().is_some() || d.has_pins() || d.help().is_some() {
        w.key("properties").open_object();
        if let Some(net) = d.net() {
            w.key("net").str(net);
        }
        if d.has_pins() {
            w.key("pins").strs(d.pins());
        }
        if let Some(help) = d.help() {
            w.key("help").str(help);
        }
        w.close_object();
    }
    w.close_object();
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
    let artifacts: Vec<Vec<ArtifactLocation>> = files
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
    let mut w = PrettyOut::new(out);
    w.open_object();
    w.key("$schema").str(SCHEMA_URI);
    w.key("version").str("2.1.0");
    w.key("runs").open_array();
    w.item().open_object();
    w.key("tool").serde(&Tool {
        driver: Driver {
            name: TOOL_NAME,
            version: TOOL_VERSION,
            semantic_version: TOOL_VERSION,
            information_uri: homepage,
            rules,
        },
    })?;
    w.key("originalUriBaseIds").serde(&BTreeMap::from([(
        SRCROOT,
        ArtifactLocation {
            uri: Some(root_uri(opts)),
            uri_base_id: None,
            description: None,
        },
    )]))?;
    w.key("columnKind").str("unicodeCodePoints");
    w.key("invocations").serde(&[Invocation {
        execution_successful: files.iter().all(|f| f.fatal.is_none()),
    }])?;
    w.key("results").open_array();
    for (f, arts) in files.iter().zip(&artifacts) {
        let src = f.source.as_ref();
        // a schematic's findings point into the sheet file where the item is drawn
        let art_of = |d: DiagRef<'_>| {
            let sheet = primary_label(d).and_then(|l| src?.part_index_at(l.span.start as usize));
            &arts[sheet.map_or(0, |i| i + 1)]
        };
        // findings of one part come together: their lines are looked up near each other
        let mut places = Places::new(src);
        let mut kept = Repeats::new();
        let fatal = f
            .fatal
            .as_ref()
            .map(|d| (d.view(), fnv1a64(fingerprint_key(d.view(), src).as_bytes())));
        for (d, fp) in fatal
            .into_iter()
            .chain(f.diags.iter().zip(fingerprint_hash_iter(f)))
        {
            w.item();
            write_result(&mut w, d, &mut places, &mut kept, art_of(d), &index, fp);
            w.flush_some()?;
        }
    }
    w.close_array();
    w.close_object();
    w.close_array();
    w.close_object();
    w.finish()
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
