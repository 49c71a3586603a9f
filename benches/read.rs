//! Reader benchmark: read + parse + model of a synthetic netlist, against a floor measured in
//! the same run (read the file and count `(` bytes with memchr).
//!
//! `cargo bench --bench read -- [MEGABYTES] [RUNS]` (defaults 50 and 5). Reports medians of
//! interleaved runs, MB/s, the ratio to the floor, peak memory of a child process that only
//! reads and models the file (each reader), and start-up plus a 50 kB netlist through the real binary.

use std::path::{Path, PathBuf};
use std::time::Instant;

fn median(mut v: Vec<f64>) -> f64 {
    v.sort_by(|a, b| a.partial_cmp(b).unwrap());
    v[v.len() / 2]
}

fn peak_rss_kb() -> u64 {
    std::fs::read_to_string("/proc/self/status")
        .ok()
        .and_then(|s| {
            s.lines().find(|l| l.starts_with("VmHWM:")).map(|l| {
                l.split_whitespace()
                    .nth(1)
                    .unwrap_or("0")
                    .parse()
                    .unwrap_or(0)
            })
        })
        .unwrap_or(0)
}

fn floor(path: &Path) -> usize {
    let bytes = std::fs::read(path).unwrap();
    memchr::memchr_iter(b'(', &bytes).count()
}

fn parse_only(path: &Path) -> usize {
    let bytes = std::fs::read(path).unwrap();
    let src = netmargin::input::load("bench", bytes).unwrap();
    let tree = netmargin::sexpr::parse(src.text()).unwrap();
    tree.len()
}

fn model(path: &Path) -> usize {
    let bytes = std::fs::read(path).unwrap();
    let src = netmargin::input::load("bench", bytes).unwrap();
    let tree = netmargin::sexpr::parse(src.text()).unwrap();
    let nl = netmargin::netlist::build(&tree).unwrap();
    nl.summary().pins
}

fn stream_model(path: &Path) -> usize {
    let bytes = std::fs::read(path).unwrap();
    let src = netmargin::input::load("bench", bytes).unwrap();
    let nl = netmargin::netlist::read(src.text()).unwrap();
    nl.summary().pins
}

fn main() {
    let args: Vec<String> = std::env::args()
        .skip(1)
        .filter(|a| !a.starts_with("--"))
        .collect();
    if args.first().map(String::as_str) == Some("child-model") {
        let n = model(Path::new(&args[1]));
        println!("{n} {}", peak_rss_kb());
        return;
    }
    if args.first().map(String::as_str) == Some("child-stream") {
        let n = stream_model(Path::new(&args[1]));
        println!("{n} {}", peak_rss_kb());
        return;
    }
    let mb: usize = args.first().and_then(|a| a.parse().ok()).unwrap_or(50);
    let runs: usize = args.get(1).and_then(|a| a.parse().ok()).unwrap_or(5);
    let dir = PathBuf::from(env!("CARGO_MANIFEST_DIR"))
        .join("target")
        .join("bench-data");
    std::fs::create_dir_all(&dir).unwrap();
    let path = dir.join(format!("synthetic-{mb}MB.net"));
    if !path.exists() {
        std::fs::write(&path, netmargin::synth::netlist(mb * 1_000_000)).unwrap();
    }
    let size = std::fs::metadata(&path).unwrap().len() as f64;
    let (mut f, mut p, mut m, mut r) = (Vec::new(), Vec::new(), Vec::new(), Vec::new());
    for _ in 0..runs {
        let t = Instant::now();
        std::hint::black_box(floor(&path));
        f.push(t.elapsed().as_secs_f64());
        let t = Instant::now();
        std::hint::black_box(parse_only(&path));
        p.push(t.elapsed().as_secs_f64());
        let t = Instant::now();
        std::hint::black_box(model(&path));
        m.push(t.elapsed().as_secs_f64());
        let t = Instant::now();
        std::hint::black_box(stream_model(&path));
        r.push(t.elapsed().as_secs_f64());
    }
    let (f, p, m, r) = (median(f), median(p), median(m), median(r));
    let mbs = |s: f64| size / 1e6 / s;
    println!(
        "file: {} ({:.1} MB), {runs} interleaved runs, medians",
        path.display(),
        size / 1e6
    );
    println!(
        "floor (read + count '(' with memchr): {:>8.3} s {:>8.0} MB/s  ratio 1.00",
        f,
        mbs(f)
    );
    println!(
        "read + parse (syntax tree):           {:>8.3} s {:>8.0} MB/s  ratio {:.2}",
        p,
        mbs(p),
        f / p
    );
    println!(
        "read + parse + netlist model:         {:>8.3} s {:>8.0} MB/s  ratio {:.2}",
        m,
        mbs(m),
        f / m
    );
    println!(
        "read + model (stream):                {:>8.3} s {:>8.0} MB/s  ratio {:.2}",
        r,
        mbs(r),
        f / r
    );
    let exe = std::env::current_exe().unwrap();
    for (arg, what) in [
        ("child-model", "read + parse + model:"),
        ("child-stream", "read + model (stream):"),
    ] {
        let Ok(out) = std::process::Command::new(&exe)
            .arg(arg)
            .arg(&path)
            .output()
        else {
            continue;
        };
        let s = String::from_utf8_lossy(&out.stdout);
        if let Some(kb) = s
            .split_whitespace()
            .nth(1)
            .and_then(|k| k.parse::<f64>().ok())
        {
            println!(
                "peak memory, {what:<24}{:>8.0} MB  = {:.2} x file size",
                kb / 1024.0,
                kb * 1024.0 / size
            );
        }
    }
    // start-up plus a 50 kB netlist through the real binary
    let small = dir.join("synthetic-50kB.net");
    std::fs::write(&small, netmargin::synth::netlist(50_000)).unwrap();
    // the bench runs from <target>/release/deps/, next to <target>/release/netmargin
    let bin = exe
        .parent()
        .and_then(Path::parent)
        .map(|d| d.join("netmargin"))
        .filter(|p| p.exists())
        .unwrap_or_else(|| {
            PathBuf::from(env!("CARGO_MANIFEST_DIR"))
                .join("target")
                .join("release")
                .join("netmargin")
        });
    if bin.exists() {
        let mut t = Vec::new();
        for _ in 0..21 {
            let s = Instant::now();
            let _ = std::process::Command::new(&bin)
                .arg("check")
                .arg(&small)
                .output();
            t.push(s.elapsed().as_secs_f64());
        }
        let mut v = Vec::new();
        for _ in 0..21 {
            let s = Instant::now();
            let _ = std::process::Command::new("true").output();
            v.push(s.elapsed().as_secs_f64());
        }
        println!(
            "binary: start-up + 50 kB netlist:     {:>8.2} ms (spawning `true`: {:.2} ms)",
            median(t) * 1e3,
            median(v) * 1e3
        );
    } else {
        println!(
            "binary: build it first (`cargo build --release`) to time start-up + a 50 kB netlist"
        );
    }
}
