//! The command line as a user meets it: help, error messages and the
//! summary compared with committed text (`tests/cli/*.txt`), every exit
//! status of the table, options in every mode, output paths, a closed pipe
//! and colour. After a deliberate change of wording, regenerate the
//! expected text with `SHEAF_BLESS=1 cargo test --test cli` and review the diff.

mod common;

use std::path::{Path, PathBuf};
use std::process::{Command, Output, Stdio};

use common::{root, sheaf, text};

fn demo_recipe() -> String {
    root()
        .join("workbooks/depot-monthly.sheaf")
        .display()
        .to_string()
}

fn october() -> String {
    root()
        .join("workbooks/depot-2026-10.xlsx")
        .display()
        .to_string()
}

/// The exit status, standard output and standard error, with the
/// repository and temporary folders replaced by placeholders.
fn shown(o: &Output, dir: &Path) -> String {
    let raw = format!(
        "status: {}\n--- stdout\n{}--- stderr\n{}",
        o.status.code().map_or("none".into(), |c| c.to_string()),
        String::from_utf8_lossy(&o.stdout),
        String::from_utf8_lossy(&o.stderr)
    );
    raw.replace(&dir.display().to_string(), "[TMP]")
        .replace(&root().display().to_string(), "[ROOT]")
}

/// Compares with `tests/cli/NAME.txt`; `SHEAF_BLESS=1` rewrites it.
fn snapshot(name: &str, o: &Output, dir: &Path) {
    let actual = shown(o, dir);
    let path = root().join("tests/cli").join(format!("{name}.txt"));
    if std::env::var_os("SHEAF_BLESS").is_some() {
        std::fs::create_dir_all(path.parent().unwrap()).unwrap();
        std::fs::write(&path, &actual).unwrap();
    }
    let expected = std::fs::read_to_string(&path).unwrap_or_default();
    assert!(
        expected == actual,
        "{name}: output differs from {}\n--- expected\n{expected}\n--- actual\n{actual}",
        path.display()
    );
}

/// Like `sheaf`, with no colour setting from the environment, so the
/// expected text holds on any machine.
fn plain(args: &[&str], dir: &Path) -> Output {
    Command::new(env!("CARGO_BIN_EXE_sheaf"))
        .args(args)
        .current_dir(dir)
        .env("SHEAF_RUN_TIME", "2026-11-01 09:00:00 UTC")
        .env_remove("CLICOLOR_FORCE")
        .env_remove("CLICOLOR")
        .env_remove("NO_COLOR")
        .output()
        .unwrap()
}

fn case(name: &str, args: &[&str]) {
    let dir = tempfile::tempdir().unwrap();
    let o = plain(args, dir.path());
    snapshot(name, &o, dir.path());
}

#[test]
fn help_texts() {
    case("help", &["--help"]);
    case("help-run", &["run", "--help"]);
    case("help-validate", &["validate", "--help"]);
    case("help-inspect", &["inspect", "--help"]);
    case("help-calc", &["calc", "--help"]);
}

#[test]
fn error_messages() {
    let recipe = demo_recipe();
    let folder = root().join("workbooks").display().to_string();
    case("error-folder-as-data", &["run", &recipe, "--data", &folder]);
    let months: Vec<String> = ["08", "09", "10"]
        .iter()
        .map(|m| {
            root()
                .join(format!("workbooks/depot-2026-{m}.xlsx"))
                .display()
                .to_string()
        })
        .collect();
    let mut unquoted = vec!["run", &recipe, "--data"];
    unquoted.extend(months.iter().map(String::as_str));
    unquoted.extend(["--out-dir", "out"]);
    case("error-unquoted-pattern", &unquoted);
    case(
        "error-out-not-xlsx",
        &["run", &recipe, "--data", &october(), "--out", "r.csv"],
    );
    let pattern = root().join("workbooks/depot-*.xlsx").display().to_string();
    case(
        "error-out-in-batch",
        &["run", &recipe, "--data", &pattern, "--out", "r.xlsx"],
    );
    case(
        "error-calc-no-value",
        &["calc", "skewness(weight_kg * 0)", "--data", &october()],
    );
    case(
        "error-unknown-column",
        &["calc", "mean({Minutes lat})", "--data", &october()],
    );
}

#[test]
fn a_comparison_says_how_many_figures_moved_and_verbose_says_what_was_read() {
    let dir = tempfile::tempdir().unwrap();
    let september = root().join("workbooks/depot-2026-09.xlsx");
    let o = plain(
        &[
            "run",
            &demo_recipe(),
            "-d",
            september.to_str().unwrap(),
            "-o",
            "sept.xlsx",
        ],
        dir.path(),
    );
    assert_eq!(o.status.code(), Some(0), "{}", text(&o));
    let o = plain(
        &[
            "run",
            &demo_recipe(),
            "-d",
            &october(),
            "-o",
            "oct.xlsx",
            "-c",
            "sept.xlsx",
            "-v",
        ],
        dir.path(),
    );
    snapshot("summary-compare-verbose", &o, dir.path());
    // The summary's count is the Changes sheet's flags.
    let flags = ["moved", "shape changed", "new extreme"];
    let moved = common::cells(&dir.path().join("oct.xlsx"), "Changes")
        .iter()
        .filter(|row| row.iter().any(|c| flags.iter().any(|f| *c == *f)))
        .count();
    assert!(
        text(&o).contains(&format!("changes: {moved} figures flagged")),
        "{moved}: {}",
        text(&o)
    );
}

#[test]
fn summaries() {
    case(
        "summary-run",
        &[
            "run",
            &demo_recipe(),
            "--data",
            &october(),
            "--out",
            "r.xlsx",
        ],
    );
    let pattern = root().join("workbooks/depot-*.xlsx").display().to_string();
    case(
        "summary-batch",
        &[
            "run",
            &demo_recipe(),
            "--data",
            &pattern,
            "--out-dir",
            "out",
        ],
    );
}

/// The demo months copied into `dir/months`, plus one file that is not a workbook.
fn months_with_a_broken_one(dir: &Path) -> String {
    let months = dir.join("months");
    std::fs::create_dir(&months).unwrap();
    for m in ["08", "09", "10"] {
        let name = format!("depot-2026-{m}.xlsx");
        std::fs::copy(root().join("workbooks").join(&name), months.join(&name)).unwrap();
    }
    std::fs::write(
        months.join("depot-2026-11.xlsx"),
        b"PK\x03\x04 not a workbook",
    )
    .unwrap();
    months.join("depot-*.xlsx").display().to_string()
}

#[test]
fn every_exit_status_of_the_table() {
    let dir = tempfile::tempdir().unwrap();
    let d = dir.path();
    let (recipe, data) = (demo_recipe(), october());
    let code = |args: &[&str]| sheaf(args, d).status.code();

    // 0, and 1 when --fail-on-warn meets the demo's warn checks.
    assert_eq!(
        code(&["run", &recipe, "-d", &data, "-o", "a.xlsx"]),
        Some(0)
    );
    let o = sheaf(
        &[
            "run",
            &recipe,
            "-d",
            &data,
            "-o",
            "b.xlsx",
            "--fail-on-warn",
        ],
        d,
    );
    assert_eq!(o.status.code(), Some(1), "{}", text(&o));

    // 1 from a fail check (in any file of a batch), 3 and 4 when files were skipped.
    let strict = d.join("strict.sheaf");
    std::fs::write(
        &strict,
        "check \"weights are plausible\" fail per depot: max(weight_kg) <= 100\n",
    )
    .unwrap();
    let strict = strict.display().to_string();
    assert_eq!(
        code(&["run", &strict, "-d", &data, "-o", "c.xlsx"]),
        Some(1)
    );
    let pattern = months_with_a_broken_one(d);
    let o = sheaf(&["run", &recipe, "-d", &pattern, "--out-dir", "o1"], d);
    assert_eq!(o.status.code(), Some(3), "{}", text(&o));
    assert!(d.join("o1/depot-2026-10-summary.xlsx").exists());
    let o = sheaf(&["run", &strict, "-d", &pattern, "--out-dir", "o2"], d);
    assert_eq!(o.status.code(), Some(4), "{}", text(&o));
    // Every file unreadable: nothing summarised, 2.
    let broken = d.join("months/depot-2026-11.xlsx").display().to_string();
    assert_eq!(
        code(&["run", &recipe, "-d", &broken, "--out-dir", "o3"]),
        Some(2)
    );

    // 5: calc without a value says why on standard error only.
    let o = sheaf(&["calc", "skewness(weight_kg * 0)", "-d", &data], d);
    assert_eq!(o.status.code(), Some(5));
    assert!(o.stdout.is_empty());
    assert!(String::from_utf8_lossy(&o.stderr).contains("constant column"));
}

#[test]
fn the_readme_holds_the_exit_status_table() {
    let readme = std::fs::read_to_string(root().join("README.md")).unwrap();
    let table = sheaf::cli::exit_status_table();
    assert!(
        readme.contains(&table),
        "README.md's exit status table differs from the one --help prints:\n{table}"
    );
}

/// Runs sheaf with standard output a pipe whose reading end is already closed.
fn with_closed_stdout(args: &[&str], dir: &Path) -> Output {
    let (reader, writer) = std::io::pipe().unwrap();
    drop(reader);
    Command::new(env!("CARGO_BIN_EXE_sheaf"))
        .args(args)
        .current_dir(dir)
        .stdout(writer)
        .stderr(Stdio::piped())
        .output()
        .unwrap()
}

#[test]
fn a_closed_pipe_ends_sheaf_quietly_with_status_141() {
    let dir = tempfile::tempdir().unwrap();
    let (recipe, data) = (demo_recipe(), october());
    let cases: [&[&str]; 4] = [
        &["calc", "{Minutes late}", "-d", &data],
        &["run", &recipe, "-d", &data, "-o", "r.xlsx", "--json"],
        &["inspect", &data],
        &["--help"],
    ];
    for args in cases {
        let o = with_closed_stdout(args, dir.path());
        let stderr = String::from_utf8_lossy(&o.stderr);
        assert!(!stderr.contains("panicked"), "{args:?}: {stderr}");
        if args != ["--help"] {
            assert_eq!(o.status.code(), Some(141), "{args:?}: {stderr}");
            assert!(stderr.is_empty(), "{args:?}: {stderr}");
        }
    }
    // A batch finishes its work before it prints: the trend is there.
    let pattern = root().join("workbooks/depot-*.xlsx");
    let args = [
        "run",
        &recipe,
        "-d",
        pattern.to_str().unwrap(),
        "--out-dir",
        "out",
        "--json",
    ];
    let o = with_closed_stdout(&args, dir.path());
    assert_eq!(o.status.code(), Some(141));
    assert!(dir.path().join("out/trend.xlsx").exists());
}

#[test]
fn results_go_only_to_regular_xlsx_files() {
    let dir = tempfile::tempdir().unwrap();
    let d = dir.path();
    let (recipe, data) = (demo_recipe(), october());
    // A device node behind an .xlsx name is refused, even with --force.
    let device: PathBuf = d.join("null.xlsx");
    std::os::unix::fs::symlink("/dev/null", &device).unwrap();
    let o = sheaf(&["run", &recipe, "-d", &data, "-o", "null.xlsx", "-f"], d);
    assert_eq!(o.status.code(), Some(2));
    assert!(text(&o).contains("not a regular file"), "{}", text(&o));
    assert!(std::fs::symlink_metadata(&device).unwrap().is_symlink());
    // A CSV is never replaced by a workbook.
    std::fs::write(d.join("keep.csv"), "a,b\n").unwrap();
    let o = sheaf(&["run", &recipe, "-d", &data, "-o", "keep.csv", "-f"], d);
    assert_eq!(o.status.code(), Some(2));
    assert_eq!(
        std::fs::read_to_string(d.join("keep.csv")).unwrap(),
        "a,b\n"
    );
    // A folder named like a workbook.
    std::fs::create_dir(d.join("dir.xlsx")).unwrap();
    let o = sheaf(&["run", &recipe, "-d", &data, "-o", "dir.xlsx", "-f"], d);
    assert_eq!(o.status.code(), Some(2));
    // Refused before any work: no temporary file left behind either.
    let left: Vec<_> = std::fs::read_dir(d)
        .unwrap()
        .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
        .filter(|n| n.contains("partial"))
        .collect();
    assert!(left.is_empty(), "{left:?}");
}

#[test]
fn a_batch_honours_timings_compare_and_quiet() {
    let dir = tempfile::tempdir().unwrap();
    let d = dir.path();
    let recipe = demo_recipe();
    let september = root().join("workbooks/depot-2026-09.xlsx");
    let o = sheaf(
        &[
            "run",
            &recipe,
            "-d",
            september.to_str().unwrap(),
            "-o",
            "sept.xlsx",
        ],
        d,
    );
    assert_eq!(o.status.code(), Some(0), "{}", text(&o));
    // Only October matches; --compare gives it September as its previous period.
    let pattern = root().join("workbooks/depot-2026-1?.xlsx");
    let o = sheaf(
        &[
            "run",
            &recipe,
            "-d",
            pattern.to_str().unwrap(),
            "--out-dir",
            "out",
            "--compare",
            "sept.xlsx",
            "--timings",
            "--json",
            "-q",
        ],
        d,
    );
    assert_eq!(o.status.code(), Some(0), "{}", text(&o));
    let stderr = String::from_utf8_lossy(&o.stderr);
    assert_eq!(stderr.matches("timings: ").count(), 1, "{stderr}");
    assert!(stderr.contains("depot-2026-10.xlsx: load"), "{stderr}");
    let first: serde_json::Value =
        serde_json::from_str(String::from_utf8_lossy(&o.stdout).lines().next().unwrap()).unwrap();
    assert_eq!(first["changes"]["previous_period"], "2026-09");
    // -q: no summary lines besides the timings asked for.
    assert!(!stderr.contains("trend over"), "{stderr}");
}

#[test]
fn colour_only_when_asked_or_on_a_terminal() {
    let dir = tempfile::tempdir().unwrap();
    let args = ["calc", "mean(x)", "-d", "missing.xlsx"];
    let esc = |o: &Output| String::from_utf8_lossy(&o.stderr).contains('\u{1b}');
    // Standard error is a pipe here: no colour by default.
    assert!(!esc(&plain(&args, dir.path())));
    let mut always = vec!["--color", "always"];
    always.extend(args);
    assert!(esc(&plain(&always, dir.path())));
    let o = Command::new(env!("CARGO_BIN_EXE_sheaf"))
        .args(["--color", "never"])
        .args(args)
        .env("CLICOLOR_FORCE", "1")
        .output()
        .unwrap();
    assert!(!esc(&o));
    // The argument parser's own errors follow --color too.
    let o = plain(&["--color", "always", "run"], dir.path());
    assert_eq!(o.status.code(), Some(2));
    assert!(esc(&o));
    assert!(!esc(&plain(&["--color", "never", "run"], dir.path())));
}

#[test]
fn completions_and_a_manual_page_for_every_command() {
    let dir = tempfile::tempdir().unwrap();
    for shell in ["bash", "zsh", "fish", "elvish", "powershell"] {
        let o = plain(&["completions", shell], dir.path());
        assert_eq!(o.status.code(), Some(0), "{shell}: {}", text(&o));
        assert!(
            String::from_utf8_lossy(&o.stdout).contains("fail-on-warn"),
            "{shell}"
        );
    }
    let o = plain(&["manual"], dir.path());
    let page = String::from_utf8_lossy(&o.stdout);
    assert!(
        page.starts_with(".ie") && page.contains(".TH sheaf 1"),
        "{page}"
    );
    assert!(
        page.contains(".SH \"EXIT STATUS\"\n.nf\n  0    all went well\n"),
        "{page}"
    );
    for command in [
        "run",
        "validate",
        "inspect",
        "calc",
        "completions",
        "manual",
    ] {
        let o = plain(&["manual", command], dir.path());
        assert_eq!(o.status.code(), Some(0), "{command}: {}", text(&o));
        let page = String::from_utf8_lossy(&o.stdout);
        assert!(page.contains(&format!(".TH sheaf-{command} 1")), "{page}");
    }
    assert_eq!(
        plain(&["manual", "nope"], dir.path()).status.code(),
        Some(2)
    );
}
