//! The commit hooks, end to end in scratch git repositories: the plain hook script
//! (`ci/git-hooks/pre-commit`) and the pre-commit framework's manifest
//! (`.pre-commit-hooks.yaml`). A netlist with a floating CMOS input must be refused with the
//! finding shown; a clean one must go in without a word.
//!
//! The framework test needs `pre-commit` (PyPI). Without it the test prints a notice and
//! passes, unless `CI` is set: then it fails, since CI is meant to have installed it.

#[path = "notice/mod.rs"]
mod notice;
use std::path::{Path, PathBuf};
use std::process::{Command, Output};

fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

fn bin() -> PathBuf {
    PathBuf::from(env!("CARGO_BIN_EXE_netmargin"))
}

/// A folder removed when the test ends.
struct Scratch(PathBuf);

impl Scratch {
    fn new(tag: &str) -> Scratch {
        let nanos = std::time::SystemTime::now()
            .duration_since(std::time::UNIX_EPOCH)
            .map_or(0, |d| d.subsec_nanos());
        let d = std::env::temp_dir().join(format!(
            "netmargin-hooks-{tag}-{}-{nanos}",
            std::process::id()
        ));
        let _ = std::fs::remove_dir_all(&d);
        std::fs::create_dir_all(&d).expect("scratch folder");
        Scratch(d)
    }
}

impl Drop for Scratch {
    fn drop(&mut self) {
        let _ = std::fs::remove_dir_all(&self.0);
    }
}

/// A command isolated from the user's git configuration (no global hooks path, signing or
/// templates).
fn isolated(program: impl AsRef<std::ffi::OsStr>, dir: &Path, home: &Path) -> Command {
    let mut c = Command::new(program);
    c.current_dir(dir)
        .env("HOME", home)
        .env("GIT_CONFIG_GLOBAL", "/dev/null")
        .env("GIT_CONFIG_NOSYSTEM", "1")
        .env("GIT_AUTHOR_NAME", "Bench Tester")
        .env("GIT_AUTHOR_EMAIL", "bench@example.invalid")
        .env("GIT_COMMITTER_NAME", "Bench Tester")
        .env("GIT_COMMITTER_EMAIL", "bench@example.invalid")
        .env_remove("GIT_DIR")
        .env_remove("GIT_INDEX_FILE")
        .env_remove("GIT_WORK_TREE");
    c
}

fn git(dir: &Path, home: &Path, args: &[&str]) -> Output {
    isolated("git", dir, home)
        .args(args)
        .output()
        .expect("git runs")
}

fn ok(o: &Output, what: &str) {
    assert!(
        o.status.success(),
        "{what} failed:\n{}{}",
        String::from_utf8_lossy(&o.stdout),
        String::from_utf8_lossy(&o.stderr)
    );
}

fn text(o: &Output) -> String {
    format!(
        "{}{}",
        String::from_utf8_lossy(&o.stdout),
        String::from_utf8_lossy(&o.stderr)
    )
}

fn has_head(dir: &Path, home: &Path) -> bool {
    git(dir, home, &["rev-parse", "--verify", "-q", "HEAD"])
        .status
        .success()
}

fn commits(dir: &Path, home: &Path) -> usize {
    let o = git(dir, home, &["rev-list", "--count", "HEAD"]);
    String::from_utf8_lossy(&o.stdout)
        .trim()
        .parse()
        .unwrap_or(0)
}

/// A netlist with a floating CMOS input (gate D of U2, a 74HC00, pins 12 and 13 unconnected)
/// and a clean one, from the project's fixtures.
fn netlists() -> (String, String) {
    let read =
        |p: &str| std::fs::read_to_string(root().join(p)).unwrap_or_else(|e| panic!("{p}: {e}"));
    (
        read("fixtures/boards/hobby-k8.net"),
        read("fixtures/boards/clean-k8.net"),
    )
}

fn new_repo(dir: &Path, home: &Path) {
    std::fs::create_dir_all(dir).expect("repo folder");
    ok(&git(dir, home, &["init", "-q"]), "git init");
    ok(
        &git(dir, home, &["config", "commit.gpgsign", "false"]),
        "git config",
    );
}

#[test]
fn the_fixture_netlists_are_what_the_hook_tests_need() {
    // the hook tests rest on these two: one with a floating CMOS input, one clean
    let run = |f: &str| {
        Command::new(bin())
            .args(["check", "--format", "short", "--no-config", f])
            .current_dir(root())
            .output()
            .expect("runs")
    };
    let bad = run("fixtures/boards/hobby-k8.net");
    assert_eq!(bad.status.code(), Some(1));
    assert!(String::from_utf8_lossy(&bad.stdout).contains("[floating-cmos-input]"));
    let clean = run("fixtures/boards/clean-k8.net");
    assert_eq!(clean.status.code(), Some(0), "{}", text(&clean));
    assert!(clean.stdout.is_empty(), "{}", text(&clean));
}

#[test]
fn plain_git_hook_refuses_a_floating_cmos_input_and_accepts_a_clean_board() {
    let s = Scratch::new("plain");
    let home = s.0.join("home");
    std::fs::create_dir_all(&home).unwrap();
    let repo = s.0.join("project");
    new_repo(&repo, &home);
    let hook = repo.join(".git/hooks/pre-commit");
    std::fs::copy(root().join("ci/git-hooks/pre-commit"), &hook).expect("install the hook");
    #[cfg(unix)]
    {
        use std::os::unix::fs::PermissionsExt;
        std::fs::set_permissions(&hook, std::fs::Permissions::from_mode(0o755)).unwrap();
    }
    let (bad, clean) = netlists();
    std::fs::create_dir_all(repo.join("hardware")).unwrap();
    let board = repo.join("hardware/sequencer.net");
    let commit = |msg: &str| {
        isolated("git", &repo, &home)
            .env("NETMARGIN", bin())
            .args(["commit", "-q", "-m", msg])
            .output()
            .expect("git commit runs")
    };

    // a floating CMOS input: refused, with the finding at its place in the staged file
    std::fs::write(&board, &bad).unwrap();
    ok(
        &git(&repo, &home, &["add", "hardware/sequencer.net"]),
        "git add",
    );
    let o = commit("add the sequencer board");
    let out = text(&o);
    assert!(!o.status.success(), "the commit went in:\n{out}");
    assert!(out.contains("hardware/sequencer.net:528:7: error: gate D of U2 (74HC00) is unused and its CMOS inputs float"), "{out}");
    assert!(out.contains("[floating-cmos-input]"), "{out}");
    assert!(out.contains("commit refused"), "{out}");
    assert!(!has_head(&repo, &home), "a commit was made");

    // the working tree fixed but the fix not staged: what is committed is still wrong
    std::fs::write(&board, &clean).unwrap();
    let o = commit("add the sequencer board");
    assert!(
        !o.status.success(),
        "the unstaged fix let the commit in:\n{}",
        text(&o)
    );
    assert!(text(&o).contains("[floating-cmos-input]"));

    // the fix staged: accepted, and the hook says nothing
    ok(
        &git(&repo, &home, &["add", "hardware/sequencer.net"]),
        "git add",
    );
    let o = commit("add the sequencer board");
    ok(&o, "the clean commit");
    assert!(
        !text(&o).contains("netmargin"),
        "the hook spoke on a clean board:\n{}",
        text(&o)
    );
    assert_eq!(commits(&repo, &home), 1);

    // the reverse: a broken netlist staged, a clean one in the working tree
    std::fs::write(&board, &bad).unwrap();
    ok(
        &git(&repo, &home, &["add", "hardware/sequencer.net"]),
        "git add",
    );
    std::fs::write(&board, &clean).unwrap();
    let o = commit("break it");
    assert!(
        !o.status.success(),
        "a staged floating input went in:\n{}",
        text(&o)
    );

    // a staged netmargin.toml is honoured: turning the two checks off lets it in
    std::fs::write(repo.join("netmargin.toml"), "[checks]\nseverity = { \"floating-cmos-input\" = \"off\", \"level-mismatch\" = \"off\" }\n").unwrap();
    ok(&git(&repo, &home, &["add", "netmargin.toml"]), "git add");
    let o = commit("accept the spare gate");
    ok(&o, "the commit with the checks turned off");
    assert_eq!(commits(&repo, &home), 2);

    // a commit without a netlist does not run netmargin at all
    std::fs::write(repo.join("notes.txt"), "bring-up notes\n").unwrap();
    ok(&git(&repo, &home, &["add", "notes.txt"]), "git add");
    let o = isolated("git", &repo, &home)
        .env("NETMARGIN", "/nonexistent/netmargin")
        .args(["commit", "-q", "-m", "notes"])
        .output()
        .unwrap();
    ok(&o, "a commit with no netlist");

    // no netmargin to run: refused with a clear message
    std::fs::write(&board, &clean).unwrap();
    ok(
        &git(&repo, &home, &["add", "hardware/sequencer.net"]),
        "git add",
    );
    let o = isolated("git", &repo, &home)
        .env("NETMARGIN", "/nonexistent/netmargin")
        .args(["commit", "-q", "-m", "x"])
        .output()
        .unwrap();
    assert!(!o.status.success());
    assert!(
        text(&o).contains("`/nonexistent/netmargin` not found"),
        "{}",
        text(&o)
    );
}

#[test]
fn plain_git_hook_uses_the_committed_baseline() {
    let s = Scratch::new("baseline");
    let home = s.0.join("home");
    std::fs::create_dir_all(&home).unwrap();
    let repo = s.0.join("project");
    new_repo(&repo, &home);
    let hook = repo.join(".git/hooks/pre-commit");
    std::fs::copy(root().join("ci/git-hooks/pre-commit"), &hook).expect("install the hook");
    #[cfg(unix)]
    {
        use std::os::unix::fs::PermissionsExt;
        std::fs::set_permissions(&hook, std::fs::Permissions::from_mode(0o755)).unwrap();
    }
    let (bad, _) = netlists();
    std::fs::create_dir_all(repo.join("hardware")).unwrap();
    std::fs::write(repo.join("hardware/sequencer.net"), &bad).unwrap();
    // the known findings recorded at the top of the repository, as the README says
    let o = Command::new(bin())
        .args(["baseline", "hardware/"])
        .current_dir(&repo)
        .output()
        .unwrap();
    ok(&o, "netmargin baseline");
    ok(
        &git(
            &repo,
            &home,
            &["add", "hardware/sequencer.net", "netmargin-baseline.json"],
        ),
        "git add",
    );
    let commit = |baseline: Option<&str>| {
        let mut c = isolated("git", &repo, &home);
        c.env("NETMARGIN", bin());
        if let Some(b) = baseline {
            c.env("NETMARGIN_BASELINE", b);
        }
        c.args(["commit", "-q", "-m", "legacy board"])
            .output()
            .unwrap()
    };
    // without the baseline the known findings refuse the commit
    let o = commit(Some("none"));
    assert!(!o.status.success(), "{}", text(&o));
    assert!(text(&o).contains("[floating-cmos-input]"), "{}", text(&o));
    // a baseline that is not there is an error, not a silent check without it
    let o = commit(Some("ci/missing-baseline.json"));
    assert!(!o.status.success());
    assert!(
        text(&o)
            .contains("`ci/missing-baseline.json` (NETMARGIN_BASELINE) is not in the repository"),
        "{}",
        text(&o)
    );
    // the committed baseline is found and its paths match: only new findings count
    let o = commit(None);
    ok(&o, "the commit with the baseline");
    assert_eq!(commits(&repo, &home), 1);
}

fn pre_commit_available() -> bool {
    Command::new("pre-commit")
        .arg("--version")
        .output()
        .is_ok_and(|o| o.status.success())
}

#[test]
fn pre_commit_framework_runs_the_manifest() {
    if !pre_commit_available() {
        notice::skipped(
            "the hook manifest in the pre-commit framework",
            "python3 -m pip install pre-commit",
        );
        return;
    }
    notice::ran("the hook manifest in the pre-commit framework");
    let s = Scratch::new("framework");
    let home = s.0.join("home");
    std::fs::create_dir_all(&home).unwrap();
    let manifest_path = root().join(".pre-commit-hooks.yaml");
    let manifest = std::fs::read_to_string(&manifest_path).expect("the manifest");

    // the manifest as shipped is valid for the framework
    let o = isolated("pre-commit", &root(), &home)
        .env("PRE_COMMIT_HOME", s.0.join("cache"))
        .arg("validate-manifest")
        .arg(&manifest_path)
        .output()
        .unwrap();
    ok(&o, "pre-commit validate-manifest");
    for line in [
        "- id: netmargin",
        "entry: netmargin check --format short",
        "files: \\.(net|kicad_sch)$",
        "pass_filenames: true",
        "language: rust",
    ] {
        assert!(
            manifest.lines().any(|l| l.trim() == line),
            "the manifest lacks `{line}`"
        );
    }

    // a hook repository holding the manifest, with `language: system` so the test uses the
    // binary under test instead of a cargo build from the network
    let hooks = s.0.join("hooks");
    new_repo(&hooks, &home);
    assert_eq!(manifest.matches("language: rust").count(), 1);
    std::fs::write(
        hooks.join(".pre-commit-hooks.yaml"),
        manifest.replace("language: rust", "language: system"),
    )
    .unwrap();
    ok(&git(&hooks, &home, &["add", "."]), "git add");
    ok(
        &git(&hooks, &home, &["commit", "-q", "-m", "hooks"]),
        "git commit",
    );
    let rev = String::from_utf8_lossy(&git(&hooks, &home, &["rev-parse", "HEAD"]).stdout)
        .trim()
        .to_string();

    let repo = s.0.join("project");
    new_repo(&repo, &home);
    std::fs::write(
        repo.join(".pre-commit-config.yaml"),
        format!(
            "repos:\n  - repo: {}\n    rev: {rev}\n    hooks:\n      - id: netmargin\n",
            hooks.display()
        ),
    )
    .unwrap();
    let bin_dir = bin().parent().expect("the binary's folder").to_path_buf();
    let path = std::env::join_paths(std::iter::once(bin_dir).chain(std::env::split_paths(
        &std::env::var_os("PATH").unwrap_or_default(),
    )))
    .unwrap();
    let run = |args: &[&str]| {
        isolated(args[0], &repo, &home)
            .args(&args[1..])
            .env("PATH", &path)
            .env("PRE_COMMIT_HOME", s.0.join("cache"))
            .env("PRE_COMMIT_COLOR", "never")
            .output()
            .expect("runs")
    };
    ok(&run(&["pre-commit", "install"]), "pre-commit install");

    let (bad, clean) = netlists();
    std::fs::create_dir_all(repo.join("hardware")).unwrap();
    std::fs::write(repo.join("hardware/sequencer.net"), &bad).unwrap();
    std::fs::write(repo.join("README.txt"), "the sequencer board\n").unwrap();
    ok(&git(&repo, &home, &["add", "."]), "git add");
    let o = run(&["git", "commit", "-q", "-m", "add the board"]);
    let out = text(&o);
    assert!(
        !o.status.success(),
        "the framework let a floating CMOS input in:\n{out}"
    );
    assert!(
        out.contains("hardware/sequencer.net:528:7: error: gate D of U2 (74HC00) is unused"),
        "{out}"
    );
    assert!(out.contains("[floating-cmos-input]"), "{out}");
    assert!(!has_head(&repo, &home));

    std::fs::write(repo.join("hardware/sequencer.net"), &clean).unwrap();
    ok(&git(&repo, &home, &["add", "."]), "git add");
    let o = run(&["git", "commit", "-q", "-m", "add the board"]);
    ok(&o, "the clean commit through the framework");
    assert!(text(&o).contains("Passed"), "{}", text(&o));
    assert_eq!(commits(&repo, &home), 1);
}

/// The plain git hook on a schematic project: a staged sheet is checked through its
/// project's root sheet, with the other sheets taken from the index, and the finding points
/// into the sub-sheet where the gate is drawn.
#[test]
fn plain_git_hook_checks_a_staged_sheet_through_its_project() {
    let s = Scratch::new("sheets");
    let home = s.0.join("home");
    std::fs::create_dir_all(&home).unwrap();
    let repo = s.0.join("project");
    new_repo(&repo, &home);
    let hook = repo.join(".git/hooks/pre-commit");
    std::fs::copy(root().join("ci/git-hooks/pre-commit"), &hook).expect("install the hook");
    #[cfg(unix)]
    {
        use std::os::unix::fs::PermissionsExt;
        std::fs::set_permissions(&hook, std::fs::Permissions::from_mode(0o755)).unwrap();
    }
    std::fs::create_dir_all(repo.join("hardware")).unwrap();
    for f in ["panel.kicad_sch", "logic.kicad_sch"] {
        std::fs::copy(
            root().join("fixtures/schematics/cmos").join(f),
            repo.join("hardware").join(f),
        )
        .unwrap();
    }
    let commit = |msg: &str| {
        isolated("git", &repo, &home)
            .env("NETMARGIN", bin())
            .args(["commit", "-q", "-m", msg])
            .output()
            .expect("git commit runs")
    };
    // the root sheet was committed before the hook was in place; only the sub-sheet is
    // staged now: the project is still checked whole
    ok(
        &git(&repo, &home, &["add", "hardware/panel.kicad_sch"]),
        "git add",
    );
    ok(
        &git(
            &repo,
            &home,
            &[
                "-c",
                "core.hooksPath=/dev/null",
                "commit",
                "-q",
                "-m",
                "root",
            ],
        ),
        "the first commit",
    );
    ok(
        &git(&repo, &home, &["add", "hardware/logic.kicad_sch"]),
        "git add",
    );
    let o = commit("add the logic sheet");
    let out = text(&o);
    assert!(!o.status.success(), "the commit went in:\n{out}");
    assert!(
        out.contains("hardware/logic.kicad_sch:14:9: error: gate B of U1 (74HC00) is unused"),
        "{out}"
    );
    assert!(out.contains("[floating-cmos-input]"), "{out}");
    // checked once, through the root: each finding once
    assert_eq!(out.matches("gate B of U1").count(), 1, "{out}");
    assert_eq!(commits(&repo, &home), 1);
}
