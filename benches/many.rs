//! Many-files benchmark: the release binary checking a folder of 200 small netlists (about
//! 20 kB each, as a project of many boards has), against floors measured in the same run:
//! `cat` of the same files (reading them, one process) and the binary's `--version` (its
//! start-up).
//!
//! `cargo build --release && cargo bench --bench many -- [FILES] [RUNS]` (defaults 200 and 5).
//! Reports medians of interleaved runs: wall time, files per second, and the ratios.

use std::path::{Path, PathBuf};
use std::process::{Command, Stdio};
use std::time::Instant;

fn median(mut v: Vec<f64>) -> f64 {
    v.sort_by(|a, b| a.total_cmp(b));
    v[v.len() / 2]
}

/// Wall time of one run of `cmd`, with its output thrown away; the exit code too.
fn time(cmd: &mut Command) -> (f64, Option<i32>) {
    let t = Instant::now();
    let status = cmd
        .stdout(Stdio::null())
        .stderr(Stdio::null())
        .status()
        .expect("the command runs");
    (t.elapsed().as_secs_f64(), status.code())
}

/// The netlists: the synthetic board with each file's references renamed (`U7_0` ...), so
/// no two files are the same text.
fn write_files(dir: &Path, n: usize) -> (Vec<PathBuf>, u64) {
    let _ = std::fs::remove_dir_all(dir);
    std::fs::create_dir_all(dir).expect("bench folder");
    let base = netmargin::synth::netlist(20_000);
    let mut files = Vec::with_capacity(n);
    let mut bytes = 0;
    for i in 0..n {
        let text = netmargin::synth::variant(&base, i);
        let path = dir.join(format!("board-{i:03}.net"));
        std::fs::write(&path, &text).expect("bench file");
        bytes += text.len() as u64;
        files.push(path);
    }
    (files, bytes)
}

fn main() {
    let args: Vec<String> = std::env::args()
        .skip(1)
        .filter(|a| !a.starts_with("--"))
        .collect();
    let n: usize = args.first().and_then(|a| a.parse().ok()).unwrap_or(200);
    let runs: usize = args.get(1).and_then(|a| a.parse().ok()).unwrap_or(5).max(1);
    let exe = std::env::current_exe().expect("the bench's own path");
    // the bench runs from <target>/release/deps/, next to <target>/release/netmargin
    let target = exe
        .parent()
        .and_then(Path::parent)
        .and_then(Path::parent)
        .map(Path::to_path_buf)
        .unwrap_or_else(|| PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("target"));
    let bin = target.join("release").join("netmargin");
    if !bin.exists() {
        println!(
            "build the binary first: `cargo build --release` (looked for {})",
            bin.display()
        );
        return;
    }
    let dir = target.join("bench-many");
    let (files, bytes) = write_files(&dir, n);

    // a warm-up of each, so the page cache holds the files and the binary
    let check = || {
        let mut c = Command::new(&bin);
        c.args(["check", "--format", "short", "--no-config"])
            .arg(&dir);
        c
    };
    let cat = || {
        let mut c = Command::new("cat");
        c.args(&files);
        c
    };
    let version = || {
        let mut c = Command::new(&bin);
        c.arg("--version");
        c
    };
    let (_, code) = time(&mut check());
    assert!(
        matches!(code, Some(0 | 1)),
        "netmargin check exited with {code:?} on the bench files"
    );
    let _ = time(&mut cat());
    let _ = time(&mut version());

    let (mut t_check, mut t_cat, mut t_version) = (Vec::new(), Vec::new(), Vec::new());
    for _ in 0..runs {
        t_check.push(time(&mut check()).0);
        t_cat.push(time(&mut cat()).0);
        t_version.push(time(&mut version()).0);
    }
    let (c, f, v) = (median(t_check), median(t_cat), median(t_version));
    println!(
        "{n} netlists in {} ({:.1} MB, {:.1} kB each), {runs} interleaved runs, medians",
        dir.display(),
        bytes as f64 / 1e6,
        bytes as f64 / 1e3 / n as f64
    );
    println!(
        "netmargin check <folder>:  {:>8.1} ms  {:>8.0} files/s  {:>6.1} MB/s",
        c * 1e3,
        n as f64 / c,
        bytes as f64 / 1e6 / c
    );
    println!(
        "floor: cat <files>:        {:>8.1} ms  {:>8.0} files/s  check takes {:.1} x",
        f * 1e3,
        n as f64 / f,
        c / f
    );
    println!(
        "floor: netmargin --version:{:>8.1} ms  (start-up; check is {:.1} x)",
        v * 1e3,
        c / v
    );
    println!(
        "per file above start-up:   {:>8.2} ms",
        (c - v) * 1e3 / n as f64
    );
}
