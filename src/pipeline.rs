//! One file through the layers: bytes -> source -> syntax tree -> netlist model, and later
//! classification and checks. Everything a reporter needs comes back owned, so files can be
//! processed in parallel and printed in a stable order.

use std::io::Read;
use std::path::Path;

use crate::checks::{self, CheckOptions};
use crate::circuit::{self, ModelOptions};
use crate::classify::classifier::{classify, Rules};
use crate::diag::{Diag, Severity};
use crate::input;
use crate::netlist::{self, Summary};
use crate::sexpr;
use crate::source::SourceFile;

/// Options that shape how a file is read.
#[derive(Debug, Clone)]
pub struct ReadOptions {
    pub max_bytes: u64,
}

impl Default for ReadOptions {
    fn default() -> Self {
        ReadOptions {
            max_bytes: input::DEFAULT_MAX_BYTES,
        }
    }
}

/// What came of one input.
#[derive(Debug)]
pub struct FileOutcome {
    /// The name shown to the user (the path as given, or `<stdin>`).
    pub name: String,
    /// The text, when it could be read (also for most fatal errors, to show the place).
    pub source: Option<SourceFile>,
    /// A problem that stopped this file (unreadable, not a netlist, malformed).
    pub fatal: Option<Diag>,
    /// Diagnostics from reading the model (reading went on).
    pub diags: Vec<Diag>,
    pub summary: Summary,
    /// Classification coverage of IC-like parts: (classified, IC-like), once the
    /// classifier has run.
    pub coverage: Option<(usize, usize)>,
    /// Findings suppressed by waivers.
    pub waived: usize,
}

impl FileOutcome {
    pub fn worst(&self) -> Option<Severity> {
        self.fatal
            .as_ref()
            .map(|d| d.severity)
            .into_iter()
            .chain(self.diags.iter().map(|d| d.severity))
            .max()
    }
}

/// Reads the bytes of `path` (`-` is standard input).
pub fn read_bytes(path: &str, opts: &ReadOptions) -> Result<Vec<u8>, Diag> {
    let too_big = |len: u64| {
        Diag::error(
            "too-large",
            format!(
                "the file is {len} bytes, above the limit of {} bytes",
                opts.max_bytes
            ),
        )
        .with_help("raise the limit with --max-bytes if the machine has the memory for it")
    };
    if path == "-" {
        let mut buf = Vec::new();
        let mut stdin = std::io::stdin().lock().take(opts.max_bytes + 1);
        stdin
            .read_to_end(&mut buf)
            .map_err(|e| Diag::error("unreadable", format!("cannot read standard input: {e}")))?;
        if buf.len() as u64 > opts.max_bytes {
            // only limit + 1 bytes were read: say "more than", not a size that was never counted
            return Err(Diag::error(
                "too-large",
                format!(
                    "standard input holds more than the limit of {} bytes",
                    opts.max_bytes
                ),
            )
            .with_help("raise the limit with --max-bytes if the machine has the memory for it"));
        }
        return Ok(buf);
    }
    let p = Path::new(path);
    let meta = std::fs::metadata(p).map_err(|e| io_diag(path, &e))?;
    if meta.is_dir() {
        return Err(
            Diag::error("unreadable", format!("`{path}` is a folder")).with_help(
                "name the `.net` files, or a folder of them once folder walking is enabled",
            ),
        );
    }
    if meta.len() > opts.max_bytes {
        return Err(too_big(meta.len()));
    }
    std::fs::read(p).map_err(|e| io_diag(path, &e))
}

fn io_diag(path: &str, e: &std::io::Error) -> Diag {
    let what = match e.kind() {
        std::io::ErrorKind::NotFound => "no such file".to_string(),
        std::io::ErrorKind::PermissionDenied => "permission denied".to_string(),
        _ => e.to_string(),
    };
    Diag::error("unreadable", format!("cannot read `{path}`: {what}"))
}

/// Everything that shapes a run.
#[derive(Debug, Clone, Default)]
pub struct RunOptions {
    pub read: ReadOptions,
    pub model: ModelOptions,
    pub checks: CheckOptions,
}

/// Reads a file as far as a source that looks like a netlist (size limit, UTF-8, the usual
/// wrong formats), for commands that model it themselves (`parts`, `net`). `Err` is an
/// outcome carrying the fatal diagnostic, to be shown like `check` shows it.
pub fn open_source(path: &str, opts: &ReadOptions) -> Result<SourceFile, Box<FileOutcome>> {
    let name = if path == "-" {
        "<stdin>".to_string()
    } else {
        path.to_string()
    };
    let fail = |fatal: Diag, source: Option<SourceFile>| {
        Box::new(FileOutcome {
            name: name.clone(),
            source,
            fatal: Some(fatal),
            diags: Vec::new(),
            summary: Summary::default(),
            coverage: None,
            waived: 0,
        })
    };
    let bytes = read_bytes(path, opts).map_err(|d| fail(d, None))?;
    let source = input::load(&name, bytes).map_err(|e| fail(e.diag, Some(e.source)))?;
    if let Some(d) = sexpr::sniff(source.text()) {
        return Err(fail(d, Some(source)));
    }
    Ok(source)
}

/// A fatal outcome for `source` (a netlist that could not be modelled).
pub fn fatal_outcome(source: &SourceFile, fatal: Diag) -> FileOutcome {
    FileOutcome {
        name: source.name().to_string(),
        source: Some(source.clone()),
        fatal: Some(fatal),
        diags: Vec::new(),
        summary: Summary::default(),
        coverage: None,
        waived: 0,
    }
}

/// Reads and checks one file with the shipped rules and default options.
pub fn read_file(path: &str, opts: &ReadOptions) -> FileOutcome {
    let rules = Rules::builtin();
    check_file(
        path,
        &rules,
        &RunOptions {
            read: opts.clone(),
            ..Default::default()
        },
    )
}

/// Reads, models, classifies and checks one file.
pub fn check_file(path: &str, rules: &Rules, opts: &RunOptions) -> FileOutcome {
    check_file_with_usage(path, rules, opts).0
}

/// Which project mapping entries a file used (so entries that matched nothing in a run can
/// be reported).
#[derive(Debug, Clone, Default)]
pub struct UsedRules {
    /// Indices into `Rules::parts.entries`.
    pub entries: Vec<usize>,
    /// Family ids the classified parts use.
    pub families: Vec<String>,
    /// (series, function id) the classified parts use.
    pub functions: Vec<(crate::classify::function::Series, String)>,
}

/// [`check_file`], also saying which mapping entries the file used.
pub fn check_file_with_usage(
    path: &str,
    rules: &Rules,
    opts: &RunOptions,
) -> (FileOutcome, UsedRules) {
    let mut used = UsedRules::default();
    let name = if path == "-" {
        "<stdin>".to_string()
    } else {
        path.to_string()
    };
    let mut out = FileOutcome {
        name: name.clone(),
        source: None,
        fatal: None,
        diags: Vec::new(),
        summary: Summary::default(),
        coverage: None,
        waived: 0,
    };
    let bytes = match read_bytes(path, &opts.read) {
        Ok(b) => b,
        Err(d) => {
            out.fatal = Some(d);
            return (out, used);
        }
    };
    let source = match input::load(&name, bytes) {
        Ok(s) => s,
        Err(e) => {
            out.fatal = Some(e.diag);
            out.source = Some(e.source);
            return (out, used);
        }
    };
    if crate::schematic::is_sheet(source.text()) {
        // a KiCad 6-9 schematic: the root sheet and every sheet below it
        let (source, result) = check_schematic(path, rules, opts);
        out.source = source;
        match result {
            Ok(c) => {
                out.diags = c.diags;
                out.summary = c.summary;
                out.coverage = Some(c.coverage);
                used = c.used;
            }
            Err(d) => out.fatal = Some(d),
        }
        return (out, used);
    }
    let result = check_source(&source, rules, opts);
    out.source = Some(source);
    match result {
        Ok(c) => {
            out.diags = c.diags;
            out.summary = c.summary;
            out.coverage = Some(c.coverage);
            used = c.used;
        }
        Err(d) => out.fatal = Some(d),
    }
    (out, used)
}

/// What checking one text produced.
#[derive(Debug, Clone)]
pub struct Checked {
    /// The model's diagnostics, then the checks' findings, in file order.
    pub diags: Vec<Diag>,
    pub summary: Summary,
    pub coverage: (usize, usize),
    pub used: UsedRules,
}

/// Parses, models, classifies and checks a text.
pub fn check_source(
    source: &SourceFile,
    rules: &Rules,
    opts: &RunOptions,
) -> Result<Checked, Diag> {
    if let Some(d) = sexpr::sniff(source.text()) {
        return Err(d);
    }
    let nl = netlist::read(source.text())?;
    Ok(check_model(&nl, rules, opts))
}

/// Reads a schematic project from its root sheet (`-` cannot be one: its sub-sheets are
/// found beside its file) and checks it. The source returned is the project's sheets joined,
/// the one every span points into.
pub fn check_schematic(
    path: &str,
    rules: &Rules,
    opts: &RunOptions,
) -> (Option<SourceFile>, Result<Checked, Diag>) {
    match open_schematic(path, opts.read.max_bytes) {
        Err(f) => (f.source, Err(f.diag)),
        Ok(files) => {
            let result = crate::schematic::read(&files).map(|nl| check_model(&nl, rules, opts));
            (Some(files.source), result)
        }
    }
}

/// Reads the sheets of the schematic project whose root sheet is `path`.
pub fn open_schematic(
    path: &str,
    max_bytes: u64,
) -> Result<crate::schematic::load::Files, Box<crate::schematic::load::Failed>> {
    if path == "-" {
        return Err(Box::new(crate::schematic::load::Failed {
            diag: Diag::error(
                "schematic-on-stdin",
                "a schematic cannot be read from standard input: its sub-sheets are found beside its file",
            )
            .with_help("name the root `.kicad_sch` file instead"),
            source: None,
        }));
    }
    crate::schematic::open(path, max_bytes)
}

/// Classifies and checks a model, from either reader.
pub fn check_model(nl: &netlist::Netlist<'_>, rules: &Rules, opts: &RunOptions) -> Checked {
    let cl = classify(nl, rules);
    let cx = circuit::build(nl, &cl, rules, opts.model.clone());
    let mut diags = nl.diagnostics.clone();
    diags.extend(checks::run_all(&cx, &opts.checks));
    let mut used = UsedRules::default();
    for p in &cl.parts {
        if let Some(e) = p.entry {
            used.entries.push(e);
        }
        if let Some(f) = &p.family {
            used.families.push(f.clone());
        }
        if let Some(f) = &p.function {
            used.functions.push(f.clone());
        }
    }
    used.entries.sort_unstable();
    used.entries.dedup();
    used.families.sort();
    used.families.dedup();
    used.functions.sort();
    used.functions.dedup();
    Checked {
        diags,
        summary: nl.summary(),
        coverage: cl.coverage,
        used,
    }
}

/// Parses and models a text, returning the model's diagnostics and counts.
pub fn model_text(source: &SourceFile) -> Result<(Vec<Diag>, Summary), Diag> {
    if let Some(d) = sexpr::sniff(source.text()) {
        return Err(d);
    }
    let tree = sexpr::parse(source.text())?;
    let nl = netlist::build(&tree)?;
    drop(tree);
    Ok((nl.diagnostics.clone(), nl.summary()))
}
