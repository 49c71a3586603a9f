//! One file through the layers: bytes -> source -> syntax tree -> netlist model, and later
//! classification and checks. Everything a reporter needs comes back owned, so files can be
//! processed in parallel and printed in a stable order.

use std::io::Read;
use std::path::Path;

use crate::analysis::{Analysis, Settings};
pub use crate::analysis::{RunOptions, UsedRules};
use crate::classify::classifier::Rules;
use crate::diag::{Diag, DiagList, Severity};
use crate::input;
pub use crate::input::ReadOptions;
use crate::netlist::Summary;
use crate::sexpr;
use crate::source::SourceFile;

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
    pub diags: DiagList,
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
            .chain(self.diags.iter().map(|d| d.severity()))
            .max()
    }
}

/// Reads the bytes of `path` (`-` is standard input); a large file is mapped
/// ([`input::file_bytes`]).
pub fn read_bytes(path: &str, opts: &ReadOptions) -> Result<input::Bytes, Diag> {
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
        return Ok(buf.into());
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
    std::fs::File::open(p)
        .and_then(|f| input::file_bytes(f, meta.len()))
        .map_err(|e| io_diag(path, &e))
}

fn io_diag(path: &str, e: &std::io::Error) -> Diag {
    let what = match e.kind() {
        std::io::ErrorKind::NotFound => "no such file".to_string(),
        std::io::ErrorKind::PermissionDenied => "permission denied".to_string(),
        _ => e.to_string(),
    };
    Diag::error("unreadable", format!("cannot read `{path}`: {what}"))
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
            diags: DiagList::new(),
            summary: Summary::default(),
            coverage: None,
            waived: 0,
        })
    };
    let bytes = read_bytes(path, opts).map_err(|d| fail(d, None))?;
    let source = input::load(&name, bytes).map_err(|e| fail(e.diag, Some(e.source)))?;
    if crate::schematic::is_sheet(source.text()) {
        // a KiCad 6-9 schematic: the root sheet and every sheet below it, joined into one
        // source whose spans point into each sheet
        return open_schematic(path, source, opts.max_bytes).map_err(|f| fail(f.diag, f.source));
    }
    if let Some(d) = sexpr::sniff(source.text()) {
        return Err(fail(d, Some(source)));
    }
    Ok(source)
}

/// The project `path` belongs to (`path` is its root sheet or any sheet of it), as one
/// source made of its sheet files, read from the disk (`loaded` is `path`'s text, already
/// read). Standard input is a project of one
/// sheet: its sub-sheets would be found beside its file.
pub fn open_schematic(
    path: &str,
    loaded: SourceFile,
    max_bytes: u64,
) -> Result<SourceFile, Box<crate::schematic::load::Failed>> {
    if path == "-" {
        return crate::schematic::load::single(loaded.name(), loaded.text().to_string())
            .map(|f| f.source);
    }
    // a sheet stands for its project: read from the project's root sheet
    let root = crate::schematic::load::project_root(std::path::Path::new(path));
    let root = root.to_str().unwrap_or(path);
    // the root's text is not read a second time (nor held twice) when `path` is the root
    let text = (root == path).then(|| loaded.into_text());
    crate::schematic::load::read_files_from(root, text, max_bytes).map(|f| f.source)
}

/// A fatal outcome for `source` (a netlist that could not be modelled).
pub fn fatal_outcome(source: &SourceFile, fatal: Diag) -> FileOutcome {
    FileOutcome {
        name: source.name().to_string(),
        source: Some(source.clone()),
        fatal: Some(fatal),
        diags: DiagList::new(),
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

/// [`check_file`], also saying which mapping entries the file used.
pub fn check_file_with_usage(
    path: &str,
    rules: &Rules,
    opts: &RunOptions,
) -> (FileOutcome, UsedRules) {
    let settings = Settings::with(rules.clone(), opts.clone());
    let (o, u) = check_file_with(path, &settings);
    (o, u.rules)
}

/// What analysing one file for `check` produced, besides its outcome: which project mapping
/// entries and which waivers it used (so those used by no file can be reported).
#[derive(Debug, Clone, Default)]
pub struct Usage {
    pub rules: UsedRules,
    /// One per waiver of the settings.
    pub waivers: Vec<bool>,
}

/// Reads and analyses the file at `path` with resolved settings: the outcome (findings with
/// the waivers applied) and what it used.
pub fn check_file_with(path: &str, settings: &Settings) -> (FileOutcome, Usage) {
    check_file_leaving(path, settings, Model::Free)
}

/// What becomes of a file's model and circuit once its findings are out.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Model {
    /// Freed at once, before the next file is read.
    Free,
    /// Left to the end of the process: for a command that checks one file and then only
    /// reports and exits. A model is some hundreds of thousands of allocations on a big
    /// board; the system takes the memory back at exit in one go.
    LeftToExit,
}

/// [`check_file_with`], saying what becomes of the model.
pub fn check_file_leaving(path: &str, settings: &Settings, model: Model) -> (FileOutcome, Usage) {
    let source = match open_source(path, &settings.run.read) {
        Ok(s) => s,
        Err(f) => return (*f, Usage::default()),
    };
    outcome_leaving(source, settings, model)
}

/// The outcome of analysing `source` with `settings`.
pub fn outcome_of(source: SourceFile, settings: &Settings) -> (FileOutcome, Usage) {
    outcome_leaving(source, settings, Model::Free)
}

/// [`outcome_of`], saying what becomes of the model.
pub fn outcome_leaving(
    source: SourceFile,
    settings: &Settings,
    model: Model,
) -> (FileOutcome, Usage) {
    let result = Analysis::new(&source, settings).map(|a| {
        // the findings are moved out; the circuit and its budgets are dropped before the
        // next stage, or, like the model, left to the exit
        let mut board = a.circuit();
        let f = board.take_findings();
        if model == Model::LeftToExit {
            std::mem::forget(board);
        } else {
            drop(board);
        }
        let usage = Usage {
            rules: a.used(),
            waivers: f.waivers_used,
        };
        let out = (
            f.diags,
            f.waived.len(),
            a.nl.summary(),
            a.cl.coverage,
            usage,
        );
        if model == Model::LeftToExit {
            std::mem::forget(a);
        }
        out
    });
    match result {
        Ok((diags, waived, summary, coverage, usage)) => (
            FileOutcome {
                name: source.name().to_string(),
                source: Some(source),
                fatal: None,
                diags,
                summary,
                coverage: Some(coverage),
                waived,
            },
            usage,
        ),
        Err(d) => (fatal_outcome(&source, d), Usage::default()),
    }
}

/// What checking one text produced.
#[derive(Debug, Clone)]
pub struct Checked {
    /// The model's diagnostics, then the checks' findings, in file order.
    pub diags: DiagList,
    pub summary: Summary,
    pub coverage: (usize, usize),
    pub used: UsedRules,
}

/// Parses, models, classifies and checks a text (no configuration, no waivers).
pub fn check_source(
    source: &SourceFile,
    rules: &Rules,
    opts: &RunOptions,
) -> Result<Checked, Diag> {
    let settings = Settings::with(rules.clone(), opts.clone());
    let a = Analysis::new(source, &settings)?;
    let board = a.circuit();
    Ok(Checked {
        diags: board.findings().diags.clone(),
        summary: a.nl.summary(),
        coverage: a.cl.coverage,
        used: a.used(),
    })
}

/// Parses and models a text, returning the model's diagnostics and counts.
pub fn model_text(source: &SourceFile) -> Result<(Vec<Diag>, Summary), Diag> {
    if let Some(d) = sexpr::sniff(source.text()) {
        return Err(d);
    }
    let nl = crate::netlist::read(source.text())?;
    Ok((nl.diagnostics.clone(), nl.summary()))
}
