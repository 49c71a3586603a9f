//! Start-up cost: `check` on a netlist with nothing in it against `--version`, which reads no
//! table and checks nothing. Both spawn the same binary, so the ratio of their CPU time is
//! what `check` adds before it reads a byte of the board (the shipped tables, the settings);
//! it holds on a loaded machine, where wall time does not. The limit is generous, twice the
//! ratio measured now in a debug build (1.9 to 2.3), and catches start-up work that grows
//! with the tables: decoding every shipped function at start-up took 7.8 ms of the debug
//! build's CPU, which made the ratio about 5.5.

use std::process::{Command, Stdio};

/// The CPU time (user + system) of this process's children that have been waited for, in
/// clock ticks, from `/proc/self/stat`; `None` where there is no such file.
fn children_ticks() -> Option<u64> {
    let stat = std::fs::read_to_string("/proc/self/stat").ok()?;
    // the fields after the command name, which is in parentheses and may hold spaces
    let rest = &stat[stat.rfind(')')? + 2..];
    let f: Vec<&str> = rest.split_whitespace().collect();
    // cutime and cstime are fields 16 and 17 of the line, 14 and 15 after the name
    Some(f.get(13)?.parse::<u64>().ok()? + f.get(14)?.parse::<u64>().ok()?)
}

/// The children's CPU ticks spent running `args` `n` times.
fn ticks(args: &[&str], n: usize) -> u64 {
    let before = children_ticks().expect("read before");
    for _ in 0..n {
        let status = Command::new(env!("CARGO_BIN_EXE_netmargin"))
            .args(args)
            .stdout(Stdio::null())
            .stderr(Stdio::null())
            .status()
            .expect("netmargin runs");
        assert!(status.code().is_some_and(|c| c <= 1), "{args:?}: {status}");
    }
    children_ticks().expect("read after") - before
}

#[test]
fn check_starts_within_a_few_times_the_cost_of_printing_the_version() {
    if children_ticks().is_none() {
        eprintln!("start-up test skipped: no /proc/self/stat on this system");
        return;
    }
    let dir = std::env::temp_dir().join(format!("netmargin-startup-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let empty = dir.join("empty.net");
    std::fs::write(&empty, "(export (version \"E\")\n (components)\n (nets))\n").unwrap();
    let empty = empty.to_str().unwrap();
    let check = ["check", "--no-config", "--format", "json", empty];
    // interleaved, so a change in the machine's load falls on both alike
    let (mut t_check, mut t_version) = (0, 0);
    for _ in 0..6 {
        t_version += ticks(&["--version"], 25);
        t_check += ticks(&check, 25);
    }
    let _ = std::fs::remove_dir_all(&dir);
    let ratio = t_check as f64 / t_version.max(1) as f64;
    eprintln!(
        "start-up: 150 runs of check on an empty netlist {t_check} ticks, of --version {t_version} ticks: {ratio:.2} x"
    );
    assert!(
        ratio < 4.0,
        "check on an empty netlist costs {ratio:.1} times --version (limit 4): something decodes or builds at start-up what a run does not need"
    );
}
