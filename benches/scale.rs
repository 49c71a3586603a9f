//! Scale benchmark: the whole pipeline (read, model, classify, check, JSON out) through the
//! release binary on synthetic netlists of growing size, and on a folder of many small
//! netlists with 1, 2 and all cores, and on synthetic one-sheet schematics, each against a
//! floor measured in the same run (`cat` of the same bytes).
//!
//! `cargo build --release && cargo bench --bench scale -- [SIZES_MB] [RUNS] [FILES]`, e.g.
//! `-- 5,50,500 3 2000` (defaults `5,50`, 3 and 2000; the 500 MB file only when asked).
//! The files are written under `<target>/bench-scale/`. Peak memory is GNU time's "Maximum
//! resident set size" (`/usr/bin/time -v`); without GNU time it is shown as n/a.

use std::path::{Path, PathBuf};
use std::process::{Command, Stdio};
use std::time::Instant;

fn median(mut v: Vec<f64>) -> f64 {
    v.sort_by(|a, b| a.total_cmp(b));
    v[v.len() / 2]
}

const GNU_TIME: &str = "/usr/bin/time";

/// Whether `/usr/bin/time` is GNU time (it understands `-v`).
fn gnu_time() -> bool {
    Command::new(GNU_TIME)
        .args(["-v", "true"])
        .stdout(Stdio::null())
        .output()
        .map(|o| String::from_utf8_lossy(&o.stderr).contains("Maximum resident set size"))
        .unwrap_or(false)
}

/// One timed run: wall seconds, CPU seconds (user + system) and peak resident memory in kB
/// when GNU time measured them, and the exit code.
struct Timed {
    secs: f64,
    cpu: Option<f64>,
    peak_kb: Option<u64>,
    code: Option<i32>,
}

/// The system's load averages (1, 5 minutes), from `/proc/loadavg`, as text.
fn load() -> String {
    std::fs::read_to_string("/proc/loadavg")
        .ok()
        .map(|s| s.split_whitespace().take(2).collect::<Vec<_>>().join(", "))
        .unwrap_or_else(|| "n/a".to_string())
}

/// Runs `program args` with standard output thrown away (and `envs` set), under GNU time
/// when `measure_memory`.
fn run(
    program: &Path,
    args: &[&std::ffi::OsStr],
    envs: &[(&str, Option<&str>)],
    measure_memory: bool,
) -> Timed {
    let mut cmd = if measure_memory {
        let mut c = Command::new(GNU_TIME);
        c.arg("-v").arg(program);
        c
    } else {
        Command::new(program)
    };
    cmd.args(args).stdout(Stdio::null()).stderr(Stdio::piped());
    for (k, v) in envs {
        match v {
            Some(v) => cmd.env(k, v),
            None => cmd.env_remove(k),
        };
    }
    let t = Instant::now();
    let out = cmd.output().expect("the command runs");
    let secs = t.elapsed().as_secs_f64();
    let err = String::from_utf8_lossy(&out.stderr);
    let field = |name: &str| -> Option<f64> {
        if !measure_memory {
            return None;
        }
        err.lines()
            .find_map(|l| l.trim().strip_prefix(name))
            .and_then(|v| v.trim().parse().ok())
    };
    let cpu = match (
        field("User time (seconds):"),
        field("System time (seconds):"),
    ) {
        (Some(u), Some(s)) => Some(u + s),
        _ => None,
    };
    Timed {
        secs,
        cpu,
        peak_kb: field("Maximum resident set size (kbytes):").map(|k| k as u64),
        code: out.status.code(),
    }
}

/// The synthetic netlist of about `mb` megabytes, written once and kept.
fn big_file(dir: &Path, mb: usize) -> (PathBuf, u64) {
    let path = dir.join(format!("synthetic-{mb}MB.net"));
    if !path.exists() {
        let text = netmargin::synth::netlist(mb * 1_000_000);
        std::fs::write(&path, &text).expect("bench file");
    }
    let len = std::fs::metadata(&path).expect("bench file").len();
    (path, len)
}

/// `n` small netlists (about 20 kB each), each with its references renamed so no two files
/// are the same text.
fn small_files(dir: &Path, n: usize) -> (Vec<PathBuf>, u64) {
    let _ = std::fs::remove_dir_all(dir);
    std::fs::create_dir_all(dir).expect("bench folder");
    let base = netmargin::synth::netlist(20_000);
    let mut files = Vec::with_capacity(n);
    let mut bytes = 0;
    for i in 0..n {
        let text = netmargin::synth::variant(&base, i);
        let path = dir.join(format!("board-{i:04}.net"));
        std::fs::write(&path, &text).expect("bench file");
        bytes += text.len() as u64;
        files.push(path);
    }
    (files, bytes)
}

fn mb(kb: Option<u64>) -> String {
    kb.map_or("n/a".to_string(), |k| {
        format!("{:.0} MB", k as f64 / 1024.0)
    })
}

fn main() {
    let args: Vec<String> = std::env::args()
        .skip(1)
        .filter(|a| !a.starts_with("--"))
        .collect();
    let sizes: Vec<usize> = args
        .first()
        .map(|a| a.split(',').filter_map(|s| s.trim().parse().ok()).collect())
        .filter(|v: &Vec<usize>| !v.is_empty())
        .unwrap_or_else(|| vec![5, 50]);
    let runs: usize = args.get(1).and_then(|a| a.parse().ok()).unwrap_or(3).max(1);
    let n_files: usize = args
        .get(2)
        .and_then(|a| a.parse().ok())
        .unwrap_or(2000)
        .max(1);

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
    let dir = target.join("bench-scale");
    std::fs::create_dir_all(&dir).expect("bench folder");
    let memory = gnu_time();
    let cores = std::thread::available_parallelism().map_or(0, |n| n.get());
    let cat = PathBuf::from("cat");
    println!(
        "{cores} cores; {runs} interleaved runs, medians; CPU time and peak memory by {}; load average (1, 5 min) at the start: {}",
        if memory {
            "GNU time (user + system, maximum resident set size)"
        } else {
            "nothing (GNU time not found: n/a)"
        },
        load()
    );

    // one file, growing size
    println!();
    println!(
        "| file | netmargin check --format json | MB/s | CPU time | MB per CPU s | cat (floor) | MB/s | check / cat | peak memory | peak / file |"
    );
    println!("| ---: | ---: | ---: | ---: | ---: | ---: | ---: | ---: | ---: | ---: |");
    let mut rates = Vec::new();
    for &size in &sizes {
        let (path, len) = big_file(&dir, size);
        let check_args = [
            "check".as_ref(),
            "--format".as_ref(),
            "json".as_ref(),
            "--no-config".as_ref(),
            path.as_os_str(),
        ];
        // warm-up: the page cache holds the file, and the run must succeed
        let first = run(&bin, &check_args, &[], memory);
        assert!(
            matches!(first.code, Some(0 | 1)),
            "netmargin check exited with {:?} on {}",
            first.code,
            path.display()
        );
        let _ = run(&cat, &[path.as_os_str()], &[], false);
        let (mut t_check, mut t_cat, mut peak) = (Vec::new(), Vec::new(), first.peak_kb);
        let mut t_cpu = Vec::new();
        for _ in 0..runs {
            let c = run(&bin, &check_args, &[], memory);
            peak = peak.max(c.peak_kb);
            t_check.push(c.secs);
            t_cpu.extend(c.cpu);
            t_cat.push(run(&cat, &[path.as_os_str()], &[], false).secs);
        }
        let (c, f) = (median(t_check), median(t_cat));
        let cpu = (!t_cpu.is_empty()).then(|| median(t_cpu));
        let mbytes = len as f64 / 1e6;
        rates.push((size, mbytes / c, cpu.map(|t| mbytes / t)));
        println!(
            "| {:.1} MB | {:.3} s | {:.1} | {} | {} | {:.3} s | {:.0} | {:.1} x | {} | {} |",
            mbytes,
            c,
            mbytes / c,
            cpu.map_or("n/a".to_string(), |t| format!("{t:.2} s")),
            cpu.map_or("n/a".to_string(), |t| format!("{:.1}", mbytes / t)),
            f,
            mbytes / f,
            c / f,
            mb(peak),
            peak.map_or("n/a".to_string(), |k| format!(
                "{:.2} x",
                k as f64 * 1024.0 / len as f64
            )),
        );
    }
    if let (Some(a), Some(b)) = (rates.first(), rates.last()) {
        if rates.len() > 1 {
            println!();
            println!(
                "throughput at {} MB / at {} MB: wall {:.2}, CPU {} (1.00 = linear; below 1 = cost grows faster than the size)",
                b.0,
                a.0,
                b.1 / a.1,
                match (a.2, b.2) {
                    (Some(x), Some(y)) => format!("{:.2}", y / x),
                    _ => "n/a".to_string(),
                }
            );
        }
    }

    // many small files, 1, 2 and all cores
    let folder = dir.join("many");
    let (files, bytes) = small_files(&folder, n_files);
    let check_args = [
        "check".as_ref(),
        "--format".as_ref(),
        "json".as_ref(),
        "--no-config".as_ref(),
        folder.as_os_str(),
    ];
    let cat_args: Vec<&std::ffi::OsStr> = files.iter().map(|p| p.as_os_str()).collect();
    let settings: [(&str, Option<&str>); 3] = [
        ("1 core", Some("1")),
        ("2 cores", Some("2")),
        ("all cores", None),
    ];
    let first = run(&bin, &check_args, &[], false);
    assert!(
        matches!(first.code, Some(0 | 1)),
        "netmargin check exited with {:?} on the folder",
        first.code
    );
    let _ = run(&cat, &cat_args, &[], false);
    let mut times: Vec<Vec<f64>> = vec![Vec::new(); settings.len()];
    let mut peaks: Vec<Option<u64>> = vec![None; settings.len()];
    let mut cpus: Vec<Vec<f64>> = vec![Vec::new(); settings.len()];
    let mut t_cat = Vec::new();
    for _ in 0..runs {
        for (i, (_, threads)) in settings.iter().enumerate() {
            let r = run(
                &bin,
                &check_args,
                &[("RAYON_NUM_THREADS", *threads)],
                memory,
            );
            peaks[i] = peaks[i].max(r.peak_kb);
            times[i].push(r.secs);
            cpus[i].extend(r.cpu);
        }
        t_cat.push(run(&cat, &cat_args, &[], false).secs);
    }
    let f = median(t_cat);
    let one = median(times[0].clone());
    println!();
    println!(
        "{n_files} netlists in one folder ({:.1} MB, {:.1} kB each)",
        bytes as f64 / 1e6,
        bytes as f64 / 1e3 / n_files as f64
    );
    println!();
    println!(
        "| run | wall time | files/s | MB/s | / cat | speed-up over 1 core | CPU time | peak memory |"
    );
    println!("| --- | ---: | ---: | ---: | ---: | ---: | ---: | ---: |");
    for (i, (label, _)) in settings.iter().enumerate() {
        let t = median(times[i].clone());
        println!(
            "| check, {label} | {:.3} s | {:.0} | {:.1} | {:.1} x | {:.2} x | {} | {} |",
            t,
            n_files as f64 / t,
            bytes as f64 / 1e6 / t,
            t / f,
            one / t,
            if cpus[i].is_empty() {
                "n/a".to_string()
            } else {
                format!("{:.2} s", median(cpus[i].clone()))
            },
            mb(peaks[i]),
        );
    }
    println!(
        "| cat (floor) | {:.3} s | {:.0} | {:.0} | 1.0 x | | | |",
        f,
        n_files as f64 / f,
        bytes as f64 / 1e6 / f
    );
    schematics(&bin, &dir, &sizes, runs, memory);
    println!();
    println!("load average (1, 5 min) at the end: {}", load());
}

/// The whole pipeline on synthetic one-sheet schematics (a tenth of each netlist size: a
/// schematic carries about ten times the text per pin of its netlist), against `cat`.
fn schematics(bin: &Path, dir: &Path, sizes: &[usize], runs: usize, mem: bool) {
    println!();
    println!("schematics (one sheet of resistor cells, wires and labels)");
    println!();
    println!("| size | nets | check (json) | MB/s | / cat | peak memory |");
    println!("| ---: | ---: | ---: | ---: | ---: | ---: |");
    let cat = PathBuf::from("cat");
    for &size in sizes {
        let size_mb = (size / 10).max(1);
        let path = dir.join(format!("synthetic-{size_mb}MB.kicad_sch"));
        let (text, nets) = netmargin::synth::schematic(size_mb * 1_000_000);
        std::fs::write(&path, &text).expect("bench file");
        let bytes = text.len() as f64;
        drop(text);
        let args: Vec<&std::ffi::OsStr> = vec![
            "check".as_ref(),
            "--format".as_ref(),
            "json".as_ref(),
            "--no-config".as_ref(),
            path.as_os_str(),
        ];
        let mut t = Vec::new();
        let mut peak = None;
        for _ in 0..runs {
            let r = run(bin, &args, &[], mem);
            peak = r.peak_kb.or(peak);
            t.push(r.secs);
        }
        let cat_args: Vec<&std::ffi::OsStr> = vec![path.as_os_str()];
        let f = median(
            (0..runs)
                .map(|_| run(&cat, &cat_args, &[], false).secs)
                .collect(),
        );
        let w = median(t);
        println!(
            "| {:.1} MB | {nets} | {:.3} s | {:.1} | {:.0} x | {} |",
            bytes / 1e6,
            w,
            bytes / 1e6 / w,
            w / f,
            mb(peak)
        );
    }
}
