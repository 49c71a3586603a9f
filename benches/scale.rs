//! Scale benchmark: the whole pipeline (read, model, classify, check, JSON out) through the
//! release binary on synthetic netlists of growing size, and on a folder of many small
//! netlists with 1, 2 and all cores, and on synthetic one-sheet schematics, each against a
//! floor measured in the same run (`cat` of the same bytes).
//!
//! `cargo build --release && cargo bench --bench scale -- [SIZES_MB] [RUNS] [FILES] [SHAPES]`,
//! e.g. `-- 5,50,500 3 2000` (defaults `5,50`, 3, 2000 and every shape of
//! `netmargin::synth::SHAPES`; the 500 MB files only when asked; 0 files skips the folder).
//! Each shape is checked at each size against a floor measured in the same run: the bench
//! itself, in a child process, reading the same file as the check reads it (a large one
//! mapped, `input::file_bytes`) and modelling it (`netlist::read`). The
//! column "time x for 10 x data" is the check's time over that of the size ten times smaller.
//! Start-up is a small netlist and `--version` against spawning `true`, 200 runs each (wall
//! time and CPU time per run). With
//! `NETMARGIN_BENCH_BASELINE=<another netmargin binary>` that binary (an earlier build) runs
//! on the same files in the same run, for before-and-after columns.
//! The files are written under `<target>/bench-scale/`, each by a child of the bench (so that
//! the bench's own peak memory, which Linux counts into every later child's, stays small).
//! CPU time (user + system) and peak memory (maximum resident set size) are each child's own,
//! from `wait4` (microsecond CPU times, so even the 0.05 s runs of the smallest files
//! compare); where the system has no `wait4` they are shown as n/a. A second table splits
//! each check's CPU time into user and system time and sets beside it what this machine
//! takes to give a process that does nothing else the check's peak of fresh memory
//! (`NETMARGIN_BENCH_TOUCH`: the bench, as a child of itself, takes that many bytes and touches
//! each page once), so the part of a time ratio that is the system's page faults shows apart
//! from the check's own work.

use std::path::{Path, PathBuf};
use std::process::{Command, Stdio};
use std::time::Instant;

fn median(mut v: Vec<f64>) -> f64 {
    v.sort_by(|a, b| a.total_cmp(b));
    v[v.len() / 2]
}

/// One timed run: wall seconds, CPU seconds (user + system) and peak resident memory in kB
/// of the child itself (where the system reports them), and the exit code.
struct Timed {
    secs: f64,
    cpu: Option<f64>,
    /// The CPU time's two parts: in the program itself, and in the kernel for it (mostly
    /// giving it memory: a page's first touch).
    user: Option<f64>,
    sys: Option<f64>,
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

/// Whether this system reports a child's own CPU time and peak memory (`wait4`).
const MEASURED: bool = cfg!(unix);

/// Runs `program args` with its output thrown away (and `envs` set): the wall time, and, on
/// Unix, the child's own CPU time (user + system, in microseconds as the kernel accounts it)
/// and its maximum resident set size, from `wait4` on that child alone. No wrapper process
/// runs between the bench and the child, so nothing else is counted.
fn run(program: &Path, args: &[&std::ffi::OsStr], envs: &[(&str, Option<&str>)]) -> Timed {
    let mut cmd = Command::new(program);
    cmd.args(args).stdout(Stdio::null()).stderr(Stdio::null());
    for (k, v) in envs {
        match v {
            Some(v) => cmd.env(k, v),
            None => cmd.env_remove(k),
        };
    }
    let t = Instant::now();
    let child = cmd.spawn().expect("the command runs");
    #[cfg(unix)]
    {
        use std::os::unix::process::ExitStatusExt;
        let mut status: libc::c_int = 0;
        // SAFETY: an all-zero `rusage` is a valid value of the plain C struct
        let mut usage: libc::rusage = unsafe { std::mem::zeroed() };
        // SAFETY: `child.id()` is our own child, not yet waited for; both pointers are valid
        let pid = unsafe { libc::wait4(child.id() as libc::pid_t, &mut status, 0, &mut usage) };
        let secs = t.elapsed().as_secs_f64();
        assert_eq!(pid, child.id() as libc::pid_t, "wait4 on the child");
        let tv = |t: libc::timeval| t.tv_sec as f64 + t.tv_usec as f64 / 1e6;
        Timed {
            secs,
            cpu: Some(tv(usage.ru_utime) + tv(usage.ru_stime)),
            user: Some(tv(usage.ru_utime)),
            sys: Some(tv(usage.ru_stime)),
            // Linux reports kilobytes
            peak_kb: Some(usage.ru_maxrss as u64),
            code: std::process::ExitStatus::from_raw(status).code(),
        }
    }
    #[cfg(not(unix))]
    {
        let mut child = child;
        let status = child.wait().expect("the command ends");
        Timed {
            secs: t.elapsed().as_secs_f64(),
            cpu: None,
            user: None,
            sys: None,
            peak_kb: None,
            code: status.code(),
        }
    }
}

/// The synthetic netlist of shape `shape` and about `mb` megabytes, written once and kept.
fn big_file(dir: &Path, shape: &str, mb: usize) -> (PathBuf, u64) {
    let path = dir.join(format!("{shape}-{mb}MB.net"));
    if !path.exists() {
        let bytes = (mb * 1_000_000).to_string();
        generate(&["shape", shape, &bytes, &path.to_string_lossy()]);
    }
    let len = std::fs::metadata(&path).expect("bench file").len();
    (path, len)
}

/// The environment variable that makes the bench, run as a child of itself, write one
/// generated input (its fields separated by tabs, see [`write_generated`]) and print what the
/// parent needs to know of it.
const GENERATE: &str = "NETMARGIN_BENCH_GENERATE";

/// Writes a generated input in a child process and returns what it printed. A child does it
/// so that the bench's own memory stays small: on Linux a child's peak memory (`wait4`'s
/// maximum resident set size) is never less than its parent's peak when it was started, so a
/// bench that had held a 500 MB text would report at least that for every later run.
fn generate(fields: &[&str]) -> String {
    let exe = std::env::current_exe().expect("the bench's own path");
    let out = Command::new(exe)
        .env(GENERATE, fields.join("\t"))
        .stderr(Stdio::inherit())
        .output()
        .expect("the bench runs itself");
    assert!(out.status.success(), "writing {fields:?} failed");
    String::from_utf8(out.stdout).expect("the child's answer")
}

/// The child's side of [`generate`]: `shape<TAB>name<TAB>bytes<TAB>path` writes one netlist
/// of a shape; `schematic<TAB>bytes<TAB>path` one sheet and prints its net count;
/// `hierarchy<TAB>bytes<TAB>folder` a project and prints its net count, then each file's path
/// (the root first), one a line.
fn write_generated(spec: &str) {
    let f: Vec<&str> = spec.split('\t').collect();
    let bytes = |s: &str| s.parse::<usize>().expect("a size in bytes");
    match f.as_slice() {
        ["shape", shape, size, path] => {
            let text = netmargin::synth::shape(shape, bytes(size)).expect("a known shape");
            std::fs::write(path, &text).expect("bench file");
        }
        ["schematic", size, path] => {
            let (text, nets) = netmargin::synth::schematic(bytes(size));
            std::fs::write(path, &text).expect("bench file");
            println!("{nets}");
        }
        ["hierarchy", size, folder] => {
            let folder = Path::new(folder);
            std::fs::create_dir_all(folder).expect("bench folder");
            let (texts, nets) = netmargin::synth::hierarchy(bytes(size));
            println!("{nets}");
            for (name, text) in &texts {
                let p = folder.join(name);
                std::fs::write(&p, text).expect("bench file");
                println!("{}", p.display());
            }
        }
        _ => panic!("unknown {GENERATE} request: {spec:?}"),
    }
}

/// The environment variable that makes the bench, run as a child of itself, only read and
/// model the file it names (the floor of the whole check, in a process of its own so its peak
/// memory is its own).
const READ_ONLY: &str = "NETMARGIN_BENCH_READ_AND_MODEL";

/// The environment variable naming another netmargin binary (an earlier build) to run on the
/// same files in the same run, for before-and-after figures.
const BASELINE: &str = "NETMARGIN_BENCH_BASELINE";

/// The environment variable that makes the bench, run as a child of itself, only take the
/// number of bytes it gives from the system and touch each page once: what giving a process
/// that much fresh memory costs on this machine, the check's work left out.
const TOUCH: &str = "NETMARGIN_BENCH_TOUCH";

fn touch(bytes: usize) {
    // zeroed: the allocator maps fresh pages and writes none of them
    let mut v = vec![0u8; bytes];
    for i in (0..bytes).step_by(4096) {
        v[i] = 1;
    }
    std::hint::black_box(&v);
}

fn read_and_model(path: &str) {
    // read as the check reads it (a large file mapped, `input::file_bytes`)
    let bytes = netmargin::pipeline::read_bytes(path, &Default::default()).expect("bench file");
    let source = netmargin::input::load(path, bytes).expect("a text file");
    let nl = netmargin::netlist::read(source.text()).expect("a netlist");
    std::hint::black_box(&nl);
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
    if let Ok(path) = std::env::var(READ_ONLY) {
        read_and_model(&path);
        return;
    }
    if let Some(bytes) = std::env::var(TOUCH).ok().and_then(|b| b.parse().ok()) {
        touch(bytes);
        return;
    }
    if let Ok(spec) = std::env::var(GENERATE) {
        write_generated(&spec);
        return;
    }
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
    let n_files: usize = args.get(2).and_then(|a| a.parse().ok()).unwrap_or(2000);
    let shapes: Vec<String> = args
        .get(3)
        .map(|a| a.split(',').map(str::to_string).collect())
        .unwrap_or_else(|| {
            netmargin::synth::SHAPES
                .iter()
                .map(|s| s.to_string())
                .collect()
        });

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
    let cores = std::thread::available_parallelism().map_or(0, |n| n.get());
    let cat = PathBuf::from("cat");
    println!(
        "{cores} cores; {runs} interleaved runs, medians; CPU time and peak memory by {}; load average (1, 5 min) at the start: {}",
        if MEASURED {
            "wait4 on each child (user + system, maximum resident set size)"
        } else {
            "nothing (no wait4 on this system: n/a)"
        },
        load()
    );

    // one file, growing size, each shape
    println!();
    // another build of netmargin to compare with, run on the same files in the same run
    let baseline = std::env::var_os(BASELINE).map(PathBuf::from);
    if let Some(b) = &baseline {
        println!("baseline ({BASELINE}): {}", b.display());
    }
    let (bh, bs) = if baseline.is_some() {
        (
            " baseline CPU | baseline CPU x for 10 x data | baseline peak / file | baseline CPU / CPU |",
            " ---: | ---: | ---: | ---: |",
        )
    } else {
        ("", "")
    };
    println!(
        "| shape | file | check --format json | MB/s | CPU time | read + model (floor) | floor CPU | check / floor (CPU) | CPU time x for 10 x data | peak memory | peak / file | floor peak / file |{bh}"
    );
    println!(
        "| --- | ---: | ---: | ---: | ---: | ---: | ---: | ---: | ---: | ---: | ---: | ---: |{bs}"
    );
    // where the check's CPU time goes, a row per file, printed after the main table
    let mut split_rows: Vec<String> = Vec::new();
    for shape in &shapes {
        let mut prev: Option<(usize, f64)> = None;
        let mut prev_split: Option<(usize, [f64; 4])> = None;
        let mut prev_base: Option<(usize, f64)> = None;
        for &size in &sizes {
            let (path, len) = big_file(&dir, shape, size);
            let check_args = [
                "check".as_ref(),
                "--format".as_ref(),
                "json".as_ref(),
                "--no-config".as_ref(),
                path.as_os_str(),
            ];
            let path_str = path.to_string_lossy().into_owned();
            let floor_env = [(READ_ONLY, Some(path_str.as_str()))];
            // warm-up: the page cache holds the file, and the run must succeed
            let first = run(&bin, &check_args, &[]);
            assert!(
                matches!(first.code, Some(0 | 1)),
                "netmargin check exited with {:?} on {}",
                first.code,
                path.display()
            );
            let floor_first = run(&exe, &[], &floor_env);
            assert_eq!(
                floor_first.code,
                Some(0),
                "read and model {}",
                path.display()
            );
            let (mut t_check, mut t_floor, mut peak) = (Vec::new(), Vec::new(), first.peak_kb);
            let mut floor_peak = floor_first.peak_kb;
            let (mut t_cpu, mut f_cpu) = (Vec::new(), Vec::new());
            let (mut t_user, mut t_sys, mut t_touch) = (Vec::new(), Vec::new(), Vec::new());
            // the fresh memory of the check's peak, taken and touched by a process that does
            // nothing else
            let touch_bytes = (first.peak_kb.unwrap_or(0) * 1024).to_string();
            let touch_env = [(TOUCH, Some(touch_bytes.as_str()))];
            let (mut b_cost, mut b_peak) = (Vec::new(), None);
            // the smallest files run in well under a second: more runs steady their medians
            let n_runs = if size <= 5 { runs.max(5) } else { runs };
            for _ in 0..n_runs {
                if let Some(b) = &baseline {
                    let r = run(b, &check_args, &[]);
                    b_peak = b_peak.max(r.peak_kb);
                    b_cost.push(r.cpu.unwrap_or(r.secs));
                }
                let c = run(&bin, &check_args, &[]);
                peak = peak.max(c.peak_kb);
                t_check.push(c.secs);
                t_cpu.extend(c.cpu);
                t_user.extend(c.user);
                t_sys.extend(c.sys);
                if MEASURED {
                    t_touch.extend(run(&exe, &[], &touch_env).cpu);
                }
                let f = run(&exe, &[], &floor_env);
                floor_peak = floor_peak.max(f.peak_kb);
                f_cpu.extend(f.cpu);
                t_floor.push(f.secs);
            }
            let (c, f) = (median(t_check), median(t_floor));
            let cpu = (!t_cpu.is_empty()).then(|| median(t_cpu));
            let fcpu = (!f_cpu.is_empty()).then(|| median(f_cpu));
            let mbytes = len as f64 / 1e6;
            // CPU time when measured: wall time on a shared machine swings with its load
            let cost = cpu.unwrap_or(c);
            let growth = match prev {
                Some((s0, t0)) if size == s0 * 10 => format!("{:.1}", cost / t0),
                _ => String::new(),
            };
            prev = Some((size, cost));
            let base_cols = if baseline.is_some() {
                let bc = median(b_cost);
                let g = match prev_base {
                    Some((s0, t0)) if size == s0 * 10 => format!("{:.1}", bc / t0),
                    _ => String::new(),
                };
                prev_base = Some((size, bc));
                format!(
                    " {bc:.3} s | {g} | {} | {:.2} x |",
                    b_peak.map_or("n/a".to_string(), |k| format!(
                        "{:.2} x",
                        k as f64 * 1024.0 / len as f64
                    )),
                    bc / cost
                )
            } else {
                String::new()
            };
            if let (Some(cpu), false, false, false) =
                (cpu, t_user.is_empty(), t_sys.is_empty(), t_touch.is_empty())
            {
                let now = [
                    median(t_user.clone()),
                    median(t_sys.clone()),
                    median(t_touch.clone()),
                    (cpu - median(t_touch.clone())).max(0.0),
                ];
                let x = |i: usize| match prev_split {
                    Some((s0, t0)) if size == s0 * 10 && t0[i] > 0.0 => {
                        format!("{:.1}", now[i] / t0[i])
                    }
                    _ => String::new(),
                };
                split_rows.push(format!(
                    "| {shape} | {:.1} MB | {:.3} s | {:.3} s | {} | {} | {:.3} s | {} | {:.3} s | {} |",
                    len as f64 / 1e6,
                    now[0],
                    now[1],
                    x(0),
                    x(1),
                    now[2],
                    x(2),
                    now[3],
                    x(3),
                ));
                prev_split = Some((size, now));
            }
            let per_file = |k: Option<u64>| {
                k.map_or("n/a".to_string(), |k| {
                    format!("{:.2} x", k as f64 * 1024.0 / len as f64)
                })
            };
            println!(
                "| {shape} | {:.1} MB | {:.3} s | {:.1} | {} | {:.3} s | {} | {:.2} x | {growth} | {} | {} | {} |{base_cols}",
                mbytes,
                c,
                mbytes / c,
                cpu.map_or("n/a".to_string(), |t| format!("{t:.3} s")),
                f,
                fcpu.map_or("n/a".to_string(), |t| format!("{t:.3} s")),
                match (cpu, fcpu) {
                    (Some(a), Some(b)) if b > 0.0 => a / b,
                    _ => c / f,
                },
                mb(peak),
                per_file(peak),
                per_file(floor_peak),
            );
        }
    }

    if !split_rows.is_empty() {
        println!();
        println!("where the check's CPU time goes: user (the program) and system (the kernel, mostly giving it memory), medians; \"fresh memory\" is a process of the bench taking the check's peak from the system and touching each page once, nothing else; the last two columns are the check's CPU less that");
        println!();
        println!("| shape | file | user | system | user x for 10 x data | system x for 10 x data | fresh memory (CPU) | its x for 10 x data | check less fresh memory | its x for 10 x data |");
        println!("| --- | ---: | ---: | ---: | ---: | ---: | ---: | ---: | ---: | ---: |");
        for row in &split_rows {
            println!("{row}");
        }
    }

    // start-up: a small netlist against spawning a process that does nothing, and `--version`
    let small = dir.join("small.net");
    std::fs::write(&small, netmargin::synth::netlist(5_000)).expect("bench file");
    let small_args = [
        "check".as_ref(),
        "--format".as_ref(),
        "json".as_ref(),
        "--no-config".as_ref(),
        small.as_os_str(),
    ];
    let version: [&std::ffi::OsStr; 1] = ["--version".as_ref()];
    let truth = PathBuf::from("true");
    let mut commands: Vec<(String, PathBuf, Vec<&std::ffi::OsStr>)> = vec![
        ("`true` (spawning a process)".into(), truth, vec![]),
        ("netmargin --version".into(), bin.clone(), version.to_vec()),
        (
            format!(
                "netmargin check, {:.1} kB netlist",
                std::fs::metadata(&small).map_or(0, |m| m.len()) as f64 / 1e3
            ),
            bin.clone(),
            small_args.to_vec(),
        ),
    ];
    if let Some(b) = &baseline {
        commands.push((
            "baseline check, same netlist".into(),
            b.clone(),
            small_args.to_vec(),
        ));
    }
    // each command 200 times, interleaved: the median wall time and the median CPU time of
    // one run (the child's own, from wait4), which a loaded machine inflates less than wall time
    let mut walls: Vec<Vec<f64>> = vec![Vec::new(); commands.len()];
    let mut cpus: Vec<Vec<f64>> = vec![Vec::new(); commands.len()];
    for _ in 0..200 {
        for (i, (_, program, args)) in commands.iter().enumerate() {
            let r = run(program, args, &[]);
            walls[i].push(r.secs);
            cpus[i].extend(r.cpu);
        }
    }
    let cpu_ms = |i: usize| (!cpus[i].is_empty()).then(|| median(cpus[i].clone()) * 1e3);
    let (wall_true, cpu_true) = (median(walls[0].clone()), cpu_ms(0));
    println!();
    println!("| start-up (200 runs each, interleaved) | median wall | above `true` | median CPU | CPU above `true` |");
    println!("| --- | ---: | ---: | ---: | ---: |");
    for (i, (name, _, _)) in commands.iter().enumerate() {
        let w = median(walls[i].clone());
        let fmt = |x: Option<f64>| x.map_or("n/a".to_string(), |x| format!("{x:.2} ms"));
        let above = |x: f64, base: f64| {
            if i == 0 {
                String::new()
            } else {
                format!("{:.2} ms", x - base)
            }
        };
        println!(
            "| {name} | {:.2} ms | {} | {} | {} |",
            w * 1e3,
            above(w * 1e3, wall_true * 1e3),
            fmt(cpu_ms(i)),
            cpu_ms(i)
                .zip(cpu_true)
                .map_or(String::new(), |(c, t)| above(c, t)),
        );
    }
    if n_files == 0 {
        schematics(&bin, &dir, &sizes, runs);
        println!();
        println!("load average (1, 5 min) at the end: {}", load());
        return;
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
    let first = run(&bin, &check_args, &[]);
    assert!(
        matches!(first.code, Some(0 | 1)),
        "netmargin check exited with {:?} on the folder",
        first.code
    );
    let _ = run(&cat, &cat_args, &[]);
    let mut times: Vec<Vec<f64>> = vec![Vec::new(); settings.len()];
    let mut peaks: Vec<Option<u64>> = vec![None; settings.len()];
    let mut cpus: Vec<Vec<f64>> = vec![Vec::new(); settings.len()];
    let mut t_cat = Vec::new();
    for _ in 0..runs {
        for (i, (_, threads)) in settings.iter().enumerate() {
            let r = run(&bin, &check_args, &[("RAYON_NUM_THREADS", *threads)]);
            peaks[i] = peaks[i].max(r.peak_kb);
            times[i].push(r.secs);
            cpus[i].extend(r.cpu);
        }
        t_cat.push(run(&cat, &cat_args, &[]).secs);
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
                format!("{:.3} s", median(cpus[i].clone()))
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
    schematics(&bin, &dir, &sizes, runs);
    println!();
    println!("load average (1, 5 min) at the end: {}", load());
}

/// The whole pipeline on synthetic schematics (a tenth of each netlist size: a schematic
/// carries about ten times the text per pin of its netlist), against `cat` of the same bytes:
/// one sheet of resistor cells, and a hierarchical project (a root placing sheets, each of a
/// few child files used by four sheets, `netmargin::synth::hierarchy`).
fn schematics(bin: &Path, dir: &Path, sizes: &[usize], runs: usize) {
    println!();
    println!("schematics: one sheet of resistor cells, wires and labels; a hierarchy of sheets");
    println!();
    println!("| project | size | files | nets | check (json) | MB/s | / cat | CPU time | CPU time x for 10 x data | peak memory | peak / size |");
    println!("| --- | ---: | ---: | ---: | ---: | ---: | ---: | ---: | ---: | ---: | ---: |");
    let cat = PathBuf::from("cat");
    for kind in ["one sheet", "hierarchy"] {
        let mut prev_cpu: Option<f64> = None;
        for &size in sizes {
            let size_mb = (size / 10).max(1);
            // the files written: the root first
            let size_bytes = (size_mb * 1_000_000).to_string();
            let (files, nets): (Vec<PathBuf>, usize) = if kind == "one sheet" {
                let path = dir.join(format!("synthetic-{size_mb}MB.kicad_sch"));
                let answer = generate(&["schematic", &size_bytes, &path.to_string_lossy()]);
                (vec![path], answer.trim().parse().expect("a net count"))
            } else {
                let folder = dir.join(format!("hierarchy-{size_mb}MB"));
                let answer = generate(&["hierarchy", &size_bytes, &folder.to_string_lossy()]);
                let mut lines = answer.lines();
                let nets = lines
                    .next()
                    .and_then(|l| l.parse().ok())
                    .expect("a net count");
                (lines.map(PathBuf::from).collect(), nets)
            };
            let bytes: u64 = files
                .iter()
                .map(|p| std::fs::metadata(p).map_or(0, |m| m.len()))
                .sum();
            let args: Vec<&std::ffi::OsStr> = vec![
                "check".as_ref(),
                "--format".as_ref(),
                "json".as_ref(),
                "--no-config".as_ref(),
                files[0].as_os_str(),
            ];
            let (mut t, mut cpu) = (Vec::new(), Vec::new());
            let mut peak = None;
            // as for the netlists: the smallest projects (up to 5 MB) run in well under a
            // second, and more runs steady their medians
            let n_runs = if size_mb <= 5 { runs.max(5) } else { runs };
            for _ in 0..n_runs {
                let r = run(bin, &args, &[]);
                assert!(
                    matches!(r.code, Some(0 | 1)),
                    "netmargin check exited with {:?} on {}",
                    r.code,
                    files[0].display()
                );
                peak = r.peak_kb.or(peak);
                t.push(r.secs);
                cpu.extend(r.cpu);
            }
            let cat_args: Vec<&std::ffi::OsStr> = files.iter().map(|p| p.as_os_str()).collect();
            let f = median(
                (0..n_runs)
                    .map(|_| run(&cat, &cat_args, &[]).secs)
                    .collect(),
            );
            let w = median(t);
            let cpu = (!cpu.is_empty()).then(|| median(cpu));
            let growth = match (prev_cpu, cpu) {
                (Some(a), Some(b)) if a > 0.0 => format!("{:.1}", b / a),
                _ => String::new(),
            };
            prev_cpu = cpu;
            let mbytes = bytes as f64 / 1e6;
            println!(
                "| {kind} | {mbytes:.1} MB | {} | {nets} | {w:.3} s | {:.1} | {:.0} x | {} | {growth} | {} | {} |",
                files.len(),
                mbytes / w,
                w / f,
                cpu.map_or("n/a".to_string(), |c| format!("{c:.3} s")),
                mb(peak),
                peak.map_or("n/a".to_string(), |k| format!("{:.2} x", k as f64 * 1024.0 / bytes as f64)),
            );
        }
    }
}
