//! The command-line definition (clap derive). Help, man page and completions all come from
//! these types.

use std::path::PathBuf;

use clap::{Args, Parser, Subcommand, ValueEnum};

use crate::report::{Format, ReportOptions};

#[derive(Debug, Parser)]
#[command(
    name = "netmargin",
    version,
    about = "Checks KiCad netlists and schematics for logic-family interface mistakes",
    long_about = "Reads KiCad S-expression netlists (.net) or KiCad 6-9 schematics (.kicad_sch) and checks every net against the DC data of the \
logic families on it: floating CMOS inputs, fan-out, TTL highs into CMOS inputs, open-collector pull-ups and more.",
    after_help = "Examples:\n  netmargin check board.net\n  netmargin check board.kicad_sch\n  netmargin check --format short hardware/\n  kicad-cli sch export netlist -o - board.kicad_sch | netmargin check -\n  netmargin baseline hardware/ && netmargin check --baseline netmargin-baseline.json hardware/\n  netmargin init hardware/board.net\n  netmargin config --show hardware/board.net\n  netmargin completions bash > ~/.local/share/bash-completion/completions/netmargin"
)]
pub struct Cli {
    #[command(subcommand)]
    pub command: Command,
    #[command(flatten)]
    pub global: Global,
}

#[derive(Debug, Args)]
pub struct Global {
    /// When to colour the output
    #[arg(long, value_enum, default_value_t = ColorChoice::Auto, global = true)]
    pub color: ColorChoice,
    /// Refuse input files larger than this many bytes
    #[arg(long, default_value_t = crate::input::DEFAULT_MAX_BYTES, global = true, value_name = "BYTES")]
    pub max_bytes: u64,
}

#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum ColorChoice {
    Auto,
    Always,
    Never,
}

#[derive(Debug, Subcommand)]
pub enum Command {
    /// Read netlists and report what was found in them
    Check(CheckArgs),
    /// List every component with its family, function and how it was classified
    Parts(PartsArgs),
    /// List the logic families and their key figures at a chosen supply
    Families(FamiliesArgs),
    /// Explain a check (what it finds, why it matters, an example, the fix), or list them all
    Explain(ExplainArgs),
    /// Show the whole DC budget of one net: drivers, loads, pull resistors, levels and margins
    Net(NetArgs),
    /// Write a report of a whole board (HTML with level charts, or Markdown)
    Audit(AuditArgs),
    /// List every net with its name and pins, from a netlist or a schematic
    #[command(
        after_help = "Examples:\n  netmargin nets board.kicad_sch\n  netmargin nets --format json board.net > board-nets.json"
    )]
    Nets(NetsArgs),
    /// Compare two captures of a board (netlists or schematics) pin by pin
    #[command(
        after_help = "Exit codes: 0 when every pin connects alike and the parts match, 1 when they differ, 2 when an input cannot be read.\n\nExamples:\n  netmargin compare board.kicad_sch board.net\n  netmargin compare capture-1.kicad_sch capture-2.kicad_sch"
    )]
    Compare(CompareArgs),
    /// Record the findings netlists have now, so `check --baseline` reports only new ones
    #[command(
        after_help = "Examples:\n  netmargin baseline hardware/\n  netmargin baseline -o ci/netmargin-baseline.json hardware/*.net\n  netmargin check --baseline ci/netmargin-baseline.json hardware/"
    )]
    Baseline(BaselineArgs),
    /// Show the configuration a netlist is checked with, and where each value comes from
    #[command(
        after_help = "Examples:\n  netmargin config --show\n  netmargin config --show hardware/board.net\n  netmargin config --show --rail VCC=5 hardware/"
    )]
    Config(ConfigArgs),
    /// Write a commented starter netmargin.toml from a netlist's rails and connectors
    #[command(
        after_help = "Examples:\n  netmargin init hardware/board.net\n  netmargin init -o hardware/netmargin.toml hardware/board.net\n  netmargin init --force"
    )]
    Init(InitArgs),
    /// Print a shell completion script
    #[command(
        after_help = "Examples:\n  netmargin completions bash > ~/.local/share/bash-completion/completions/netmargin\n  netmargin completions zsh > ~/.zfunc/_netmargin\n  netmargin completions fish > ~/.config/fish/completions/netmargin.fish"
    )]
    Completions(CompletionsArgs),
    /// Print the man page (roff)
    #[command(after_help = "Example:\n  netmargin man > netmargin.1 && man ./netmargin.1")]
    Man,
}

#[derive(Debug, Args)]
pub struct BaselineArgs {
    /// Netlist files or folders (folders are searched for `*.net`, honouring .gitignore)
    #[arg(required = true, value_name = "PATH")]
    pub paths: Vec<String>,
    /// The baseline file to write
    #[arg(long, short = 'o', value_name = "FILE", default_value = crate::baseline::DEFAULT_FILE)]
    pub output: std::path::PathBuf,
    #[command(flatten)]
    pub settings: SettingsArgs,
}

/// The options that shape a check, shared by `check`, `baseline` and `config --show`.
#[derive(Debug, Clone, Default, Args)]
pub struct SettingsArgs {
    /// Run only these checks (repeatable, or a comma-separated list: `--only a,b`)
    #[arg(long, value_name = "CHECK", value_delimiter = ',')]
    pub only: Vec<String>,
    /// Turn these checks off (repeatable, or a comma-separated list)
    #[arg(long, value_name = "CHECK", value_delimiter = ',')]
    pub disable: Vec<String>,
    /// Declare a rail and its voltage: `--rail VCC=5` (repeatable)
    #[arg(long, value_name = "NAME=VOLTS", value_parser = parse_rail)]
    pub rail: Vec<(String, f64)>,
    /// The project configuration [default: the nearest netmargin.toml at or above each netlist]
    #[arg(long, value_name = "FILE")]
    pub config: Option<std::path::PathBuf>,
    /// Ignore any netmargin.toml
    #[arg(long, conflicts_with = "config")]
    pub no_config: bool,
}

impl From<&SettingsArgs> for crate::analysis::Overrides {
    fn from(a: &SettingsArgs) -> Self {
        crate::analysis::Overrides {
            only: a.only.clone(),
            disable: a.disable.clone(),
            rail: a.rail.clone(),
            config: a.config.clone(),
            no_config: a.no_config,
        }
    }
}

#[derive(Debug, Args)]
pub struct ConfigArgs {
    /// Show the merged configuration
    #[arg(long, required = true)]
    pub show: bool,
    /// The netlist or folder whose configuration to show [default: the current folder]
    #[arg(value_name = "PATH")]
    pub path: Option<String>,
    #[command(flatten)]
    pub settings: SettingsArgs,
}

#[derive(Debug, Args)]
pub struct InitArgs {
    /// The netlist to read rails and connectors from [default: the `*.net` files in the
    /// current folder and below]
    #[arg(value_name = "NETLIST")]
    pub netlist: Option<String>,
    /// Where to write it
    #[arg(long, short = 'o', value_name = "FILE", default_value = crate::config::FILE_NAME)]
    pub output: std::path::PathBuf,
    /// Replace an existing file
    #[arg(long)]
    pub force: bool,
}

#[derive(Debug, Args)]
pub struct CompletionsArgs {
    /// The shell
    #[arg(value_enum)]
    pub shell: clap_complete::Shell,
}

#[derive(Debug, Args)]
pub struct ExplainArgs {
    /// The check's id; without it, every check is listed
    #[arg(value_name = "CHECK")]
    pub check: Option<String>,
}

#[derive(Debug, Args)]
pub struct NetArgs {
    /// The netlist (`-` reads standard input)
    #[arg(value_name = "FILE")]
    pub path: String,
    /// The net's name as in the netlist (`/CLK`, `Net-(U5-Pad4)`); a leading `/` may be left off
    #[arg(value_name = "NET")]
    pub net: String,
    #[command(flatten)]
    pub settings: SettingsArgs,
}

#[derive(Debug, Args)]
pub struct NetsArgs {
    /// A netlist (`-` reads standard input) or a schematic's root sheet (`.kicad_sch`)
    #[arg(value_name = "FILE")]
    pub path: String,
    /// Output format
    #[arg(long, value_enum, default_value_t = ListFormat::Text)]
    pub format: ListFormat,
}

#[derive(Debug, Args)]
pub struct CompareArgs {
    /// The first capture: a netlist or a schematic's root sheet
    #[arg(value_name = "A")]
    pub a: String,
    /// The second capture
    #[arg(value_name = "B")]
    pub b: String,
}

#[derive(Debug, Args)]
pub struct PartsArgs {
    /// The netlist (`-` reads standard input)
    #[arg(value_name = "FILE")]
    pub path: String,
    /// Output format
    #[arg(long, value_enum, default_value_t = ListFormat::Text)]
    pub format: ListFormat,
    #[command(flatten)]
    pub settings: SettingsArgs,
}

#[derive(Debug, Args)]
pub struct FamiliesArgs {
    /// Supply voltage at which to show the figures (default: each family's nominal)
    #[arg(long, value_name = "VOLTS")]
    pub supply: Option<f64>,
    /// Output format
    #[arg(long, value_enum, default_value_t = ListFormat::Text)]
    pub format: ListFormat,
}

#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum ListFormat {
    Text,
    Json,
}

#[derive(Debug, Args)]
pub struct CheckArgs {
    /// Netlists, KiCad 6-9 schematics (a sheet stands for its project's root sheet) or folders
    /// (searched for `*.net` and `*.kicad_sch`, each project's root sheet once, honouring
    /// .gitignore); `-` reads a netlist from standard input
    #[arg(required = true, value_name = "PATH")]
    pub paths: Vec<String>,
    /// Exit with 1 when a finding at or above this severity is reported
    #[arg(long, value_enum, default_value_t = FailOn::Error)]
    pub fail_on: FailOn,
    #[command(flatten)]
    pub settings: SettingsArgs,
    /// Report only findings not in this baseline (made with `netmargin baseline`)
    #[arg(long, value_name = "FILE")]
    pub baseline: Option<std::path::PathBuf>,
    /// List each baseline entry that matches no finding any more (default: a count per file)
    #[arg(long, short = 'v')]
    pub verbose: bool,
    /// Exit with 2 when the paths hold no netlist (for CI: a moved folder checks nothing)
    #[arg(long)]
    pub require_files: bool,
    #[command(flatten)]
    pub report: ReportArgs,
}

pub(crate) fn parse_rail(s: &str) -> Result<(String, f64), String> {
    let (n, v) = s
        .split_once('=')
        .ok_or_else(|| format!("expected NAME=VOLTS, found `{s}`"))?;
    let v: f64 = v
        .trim()
        .trim_end_matches(['V', 'v'])
        .parse()
        .map_err(|_| format!("`{v}` is not a voltage"))?;
    if n.trim().is_empty() || !v.is_finite() {
        return Err(format!("expected NAME=VOLTS, found `{s}`"));
    }
    Ok((n.trim().to_string(), v))
}

#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum FailOn {
    Error,
    Warning,
    Info,
}

impl FailOn {
    pub fn severity(self) -> crate::diag::Severity {
        match self {
            FailOn::Error => crate::diag::Severity::Error,
            FailOn::Warning => crate::diag::Severity::Warning,
            FailOn::Info => crate::diag::Severity::Info,
        }
    }
}

/// The command-line options of the reporters (flattened into `check`).
#[derive(Debug, Clone, Args)]
pub struct ReportArgs {
    /// Output format
    #[arg(long, value_enum, default_value_t = Format::Human)]
    pub format: Format,
    /// Print the findings only: no per-file or summary lines
    #[arg(long, short = 'q')]
    pub quiet: bool,
    /// Directory that SARIF and annotation paths are relative to [default: the current directory]
    #[arg(long, value_name = "DIR")]
    pub root: Option<PathBuf>,
}

impl ReportArgs {
    /// The options for [`write_report`]; `color` and `width` only shape the human format.
    pub fn options(&self, color: bool, width: usize) -> std::io::Result<ReportOptions> {
        let cwd = std::env::current_dir()?;
        let root = match &self.root {
            Some(r) => cwd.join(r),
            None => cwd.clone(),
        };
        Ok(ReportOptions {
            format: self.format,
            quiet: self.quiet,
            color,
            width,
            root,
            cwd,
            netlists: None,
        })
    }
}

/// Report format.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum AuditFormat {
    Html,
    Markdown,
}

/// `netmargin audit`.
#[derive(Debug, Args)]
pub struct AuditArgs {
    /// The netlist (`-` reads standard input)
    #[arg(value_name = "FILE")]
    pub path: String,
    /// Write the report here (atomically); without it the report goes to standard output
    #[arg(short, long, value_name = "FILE")]
    pub output: Option<PathBuf>,
    /// Report format
    #[arg(long, value_enum, default_value_t = AuditFormat::Html)]
    pub format: AuditFormat,
    /// Also chart this net, with or without a finding (repeatable)
    #[arg(long, value_name = "NAME")]
    pub net: Vec<String>,
    /// Write every chart as an SVG file into this folder as well
    #[arg(long, value_name = "DIR")]
    pub chart_out: Option<PathBuf>,
    #[command(flatten)]
    pub settings: SettingsArgs,
}
