//! The command-line definition (clap derive). Help, man page and completions all come from
//! these types.

use clap::{Args, Parser, Subcommand, ValueEnum};

#[derive(Debug, Parser)]
#[command(
    name = "netmargin",
    version,
    about = "Checks KiCad netlists for logic-family interface mistakes",
    long_about = "Reads KiCad S-expression netlists (.net) and checks every net against the DC data of the \
logic families on it: floating CMOS inputs, fan-out, TTL highs into CMOS inputs, open-collector pull-ups and more.",
    after_help = "Examples:\n  netmargin check board.net\n  netmargin check --format short hardware/*.net\n  kicad-cli sch export netlist -o - board.kicad_sch | netmargin check -"
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
    Audit(crate::audit::AuditArgs),
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
    /// Declare a rail and its voltage: `--rail VCC=5` (repeatable)
    #[arg(long, value_name = "NAME=VOLTS", value_parser = parse_rail)]
    pub rail: Vec<(String, f64)>,
}

#[derive(Debug, Args)]
pub struct PartsArgs {
    /// The netlist (`-` reads standard input)
    #[arg(value_name = "FILE")]
    pub path: String,
    /// Output format
    #[arg(long, value_enum, default_value_t = ListFormat::Text)]
    pub format: ListFormat,
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
    /// Netlist files or folders (folders are searched for `*.net`, honouring .gitignore); `-` reads
    /// standard input
    #[arg(required = true, value_name = "PATH")]
    pub paths: Vec<String>,
    /// Exit with 1 when a finding at or above this severity is reported
    #[arg(long, value_enum, default_value_t = FailOn::Error)]
    pub fail_on: FailOn,
    /// Run only this check (repeatable)
    #[arg(long, value_name = "CHECK")]
    pub only: Vec<String>,
    /// Turn this check off (repeatable)
    #[arg(long, value_name = "CHECK")]
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
    #[command(flatten)]
    pub report: crate::report::ReportArgs,
}

pub(crate) fn parse_rail(s: &str) -> Result<(String, f64), String> {
    let (n, v) = s.split_once('=').ok_or_else(|| format!("expected NAME=VOLTS, found `{s}`"))?;
    let v: f64 = v.trim().trim_end_matches(['V', 'v']).parse().map_err(|_| format!("`{v}` is not a voltage"))?;
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
