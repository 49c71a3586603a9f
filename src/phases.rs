//! Phase timers for measuring: with `NETMARGIN_PHASES` set in the environment, each stage of
//! a file's analysis and the report print to standard error how long they took (wall time,
//! and CPU time of the thread that ran them) and the
//! process's resident and peak memory when they ended (from `/proc/self/status`, where there
//! is one). Unset, a phase costs one check of a flag read once.

use std::sync::OnceLock;
use std::time::Instant;

/// The environment variable that turns the timers on.
pub const ENV: &str = "NETMARGIN_PHASES";

fn on() -> bool {
    static ON: OnceLock<bool> = OnceLock::new();
    *ON.get_or_init(|| std::env::var_os(ENV).is_some())
}

/// A running phase; it reports when dropped.
pub struct Phase(Option<(&'static str, Instant, Option<u64>)>);

/// Starts timing the phase `name`.
pub fn start(name: &'static str) -> Phase {
    Phase(on().then(|| (name, Instant::now(), thread_cpu_ns())))
}

/// The CPU time the calling thread has run, in ns (`/proc/thread-self/schedstat`), so a
/// phase's cost can be told on a loaded machine where wall time is not.
fn thread_cpu_ns() -> Option<u64> {
    std::fs::read_to_string("/proc/thread-self/schedstat")
        .ok()?
        .split_whitespace()
        .next()?
        .parse()
        .ok()
}

/// Resident and peak resident memory in kB, from `/proc/self/status`.
fn memory_kb() -> Option<(u64, u64)> {
    let status = std::fs::read_to_string("/proc/self/status").ok()?;
    let field = |key: &str| {
        status
            .lines()
            .find_map(|l| l.strip_prefix(key))
            .and_then(|v| v.trim().trim_end_matches("kB").trim().parse::<u64>().ok())
    };
    Some((field("VmRSS:")?, field("VmHWM:")?))
}

impl Drop for Phase {
    fn drop(&mut self) {
        if let Some((name, t, cpu)) = self.0.take() {
            let ms = t.elapsed().as_secs_f64() * 1e3;
            let cpu = cpu.zip(thread_cpu_ns()).map_or(String::new(), |(a, b)| {
                format!("  cpu {:>8.1} ms", b.saturating_sub(a) as f64 / 1e6)
            });
            let mem = memory_kb().map_or(String::new(), |(rss, peak)| {
                format!("  rss {} MB  peak {} MB", rss / 1024, peak / 1024)
            });
            eprintln!("phase {name:<10} wall {ms:>8.1} ms{cpu}{mem}");
        }
    }
}
