//! Runs the real binary on fixture files and compares its whole output (exit code, stdout,
//! stderr) with reviewed snapshots. Check fixtures (`fixtures/checks/<id>.net`) run with only
//! that check enabled, and their snapshots sit beside them; boards, the demo, quirks, model
//! errors and malformed files run with every check. Paths are relative to the crate root, so
//! nothing machine-specific lands in a snapshot.

use std::path::{Path, PathBuf};
use std::process::Command;

fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

fn run(args: &[&str]) -> String {
    let out = Command::new(env!("CARGO_BIN_EXE_netmargin"))
        .args(args)
        .current_dir(root())
        .env_remove("NO_COLOR")
        .env("COLUMNS", "100")
        .output()
        .expect("the binary runs");
    let stdout = String::from_utf8_lossy(&out.stdout);
    let stderr = String::from_utf8_lossy(&out.stderr);
    assert!(
        !stderr.contains("panicked"),
        "the binary panicked on {args:?}:\n{stderr}"
    );
    format!(
        "exit: {}\n--- stdout\n{stdout}--- stderr\n{stderr}",
        out.status.code().unwrap_or(-1)
    )
}

fn files(dir: &str, ext: &[&str]) -> Vec<String> {
    let mut v: Vec<String> = std::fs::read_dir(root().join(dir))
        .unwrap_or_else(|e| panic!("{dir}: {e}"))
        .flatten()
        .map(|e| e.path())
        .filter(|p| p.extension().is_some_and(|x| ext.iter().any(|e| x == *e)))
        .map(|p| format!("{dir}/{}", p.file_name().unwrap().to_string_lossy()))
        .collect();
    v.sort();
    v
}

fn snapshot_in(dir: &str, name: &str, content: &str) {
    let mut settings = insta::Settings::clone_current();
    settings.set_snapshot_path(root().join(dir));
    settings.set_prepend_module_to_snapshot(false);
    settings.bind(|| insta::assert_snapshot!(name.to_string(), content));
}

#[test]
fn each_check_on_its_fixture() {
    let fx = files("fixtures/checks", &["net"]);
    for f in &fx {
        let id = Path::new(f)
            .file_stem()
            .unwrap()
            .to_string_lossy()
            .to_string();
        // a fixture may hold variants: `<id>--<variant>.net`
        let check = id.split("--").next().unwrap().to_string();
        assert!(
            netmargin::checks::info(&check).is_some(),
            "{f}: no check `{check}`"
        );
        let out = run(&[
            "check",
            "--color",
            "never",
            "--fail-on",
            "info",
            "--only",
            &check,
            f,
        ]);
        snapshot_in("fixtures/checks", &id, &out);
    }
}

#[test]
fn every_registered_check_has_a_fixture() {
    let fx = files("fixtures/checks", &["net"]);
    let missing: Vec<&str> = netmargin::checks::REGISTRY
        .iter()
        .map(|c| c.id)
        .filter(|id| {
            !fx.iter().any(|f| {
                Path::new(f)
                    .file_stem()
                    .unwrap()
                    .to_string_lossy()
                    .split("--")
                    .next()
                    == Some(id)
            })
        })
        .collect();
    assert!(
        missing.is_empty(),
        "checks without a fixture in fixtures/checks: {missing:?}"
    );
}

#[test]
fn boards_and_demo() {
    for dir in ["fixtures/boards", "fixtures/demo"] {
        for f in files(dir, &["net"]) {
            let out = run(&["check", "--color", "never", &f]);
            let name = f.replace('/', "__");
            insta::assert_snapshot!(name, out);
        }
    }
}

#[test]
fn clean_boards_have_no_findings() {
    for f in [
        "fixtures/boards/clean-k5.net",
        "fixtures/boards/clean-k8.net",
    ] {
        let out = run(&["check", "--color", "never", "--fail-on", "info", f]);
        assert!(
            out.starts_with("exit: 0\n"),
            "{f} is meant to be clean:\n{out}"
        );
    }
}

#[test]
fn quirks_model_errors_and_malformed_files() {
    for dir in [
        "fixtures/quirks",
        "fixtures/model-errors",
        "fixtures/malformed",
    ] {
        for f in files(dir, &["net", "json", "sch", "kicad_sch", "kicad_pcb"]) {
            let out = run(&["check", "--color", "never", &f]);
            let name = f.replace('/', "__");
            insta::assert_snapshot!(name, out);
        }
    }
}

#[test]
fn usage_errors_exit_2() {
    let out = run(&["check"]);
    assert!(out.starts_with("exit: 2\n"), "{out}");
    let out = run(&[
        "check",
        "--only",
        "no-such-check",
        "fixtures/boards/clean-k5.net",
    ]);
    assert!(
        out.starts_with("exit: 2\n") && out.contains("unknown check `no-such-check`"),
        "{out}"
    );
    let out = run(&["check", "fixtures/no-such-file.net"]);
    assert!(
        out.starts_with("exit: 2\n") && out.contains("no such file"),
        "{out}"
    );
}

#[test]
fn one_bad_file_does_not_stop_the_others_and_the_worst_exit_wins() {
    let out = run(&[
        "check",
        "--color",
        "never",
        "fixtures/malformed/empty.net",
        "fixtures/boards/clean-k8.net",
    ]);
    assert!(out.starts_with("exit: 2\n"), "{out}");
    assert!(
        out.contains("fixtures/boards/clean-k8.net: "),
        "the second file was still read:\n{out}"
    );
}

#[test]
fn standard_input() {
    let text = std::fs::read(root().join("fixtures/boards/clean-k8.net")).unwrap();
    let mut child = Command::new(env!("CARGO_BIN_EXE_netmargin"))
        .args(["check", "--color", "never", "-"])
        .stdin(std::process::Stdio::piped())
        .stdout(std::process::Stdio::piped())
        .spawn()
        .unwrap();
    use std::io::Write;
    child.stdin.take().unwrap().write_all(&text).unwrap();
    let out = child.wait_with_output().unwrap();
    assert!(String::from_utf8_lossy(&out.stdout).contains("<stdin>: "));
}

#[test]
fn the_demo_board_holds_an_instance_of_every_check() {
    let out = Command::new(env!("CARGO_BIN_EXE_netmargin"))
        .args([
            "check",
            "--no-config",
            "--format",
            "json",
            "fixtures/demo/counter-timer.net",
        ])
        .current_dir(root())
        .output()
        .unwrap();
    let v: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    let codes: Vec<String> = v["files"][0]["findings"]
        .as_array()
        .unwrap()
        .iter()
        .map(|f| f["check"].as_str().unwrap().to_string())
        .collect();
    let missing: Vec<&str> = netmargin::checks::REGISTRY
        .iter()
        .map(|c| c.id)
        .filter(|id| !codes.iter().any(|c| c == id))
        .collect();
    assert!(
        missing.is_empty(),
        "the demo board lacks an instance of {missing:?}"
    );
}
