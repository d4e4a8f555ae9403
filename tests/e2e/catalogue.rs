//! The catalogue of bad inputs in `tests/bad-inputs/`: every file must be refused with exit
//! code 2, an error naming the file, every line of its `.expect` file on standard error, no
//! panic, and no output folder left behind.
//!
//! Kinds: `models/` (`dwell check`), `weather/` (`dwell weather summary`), `variants/`
//! (merge patches for `dwell compare` on the invented cabin), `measured/` (`dwell calibrate`).

use std::path::{Path, PathBuf};

use crate::util::*;

fn cases(kind: &str, ext: &str) -> Vec<(PathBuf, Vec<String>)> {
    let dir = root().join("tests/bad-inputs").join(kind);
    let mut out: Vec<_> = std::fs::read_dir(&dir)
        .unwrap()
        .map(|e| e.unwrap().path())
        .filter(|p| p.extension().is_some_and(|e| e == ext))
        .map(|p| {
            let expect = std::fs::read_to_string(p.with_extension("expect"))
                .unwrap_or_else(|_| panic!("{} has no .expect file", p.display()));
            (
                p,
                expect
                    .lines()
                    .filter(|l| !l.is_empty())
                    .map(String::from)
                    .collect(),
            )
        })
        .collect();
    out.sort();
    out
}

fn refused(file: &Path, expect: &[String], args: &[&str], out: Option<&Path>) {
    let o = dwell(args);
    let err = stderr(&o);
    let name = file.file_name().unwrap().to_string_lossy();
    assert_eq!(
        o.status.code(),
        Some(2),
        "{name}: exit code {:?}, stderr: {err}",
        o.status.code()
    );
    assert!(err.starts_with("error: "), "{name}: {err}");
    assert!(!err.contains("panicked"), "{name}: {err}");
    assert!(
        err.contains(&*name),
        "{name}: the error does not name the file: {err}"
    );
    for e in expect {
        assert!(err.contains(e.as_str()), "{name}: expected `{e}` in: {err}");
    }
    if let Some(out) = out {
        assert!(!out.exists(), "{name}: an output folder was left behind");
    }
}

#[test]
fn the_catalogue_holds_at_least_forty_cases() {
    let n: usize = [
        ("models", "json"),
        ("weather", "csv"),
        ("variants", "json"),
        ("measured", "csv"),
    ]
    .iter()
    .map(|(k, e)| cases(k, e).len())
    .sum();
    assert!(n >= 40, "{n} cases");
}

#[test]
fn bad_models_are_refused() {
    for (f, expect) in cases("models", "json") {
        refused(&f, &expect, &["check", f.to_str().unwrap()], None);
    }
}

#[test]
fn bad_weather_files_are_refused() {
    for (f, expect) in cases("weather", "csv") {
        refused(
            &f,
            &expect,
            &["weather", "summary", f.to_str().unwrap()],
            None,
        );
    }
}

#[test]
fn bad_weather_files_stop_a_simulation_before_it_writes() {
    let tmp = tempfile::tempdir().unwrap();
    for (f, expect) in cases("weather", "csv") {
        let out = tmp.path().join(f.file_stem().unwrap());
        let args = [
            "simulate",
            "zones-examples/fernhollow-cabin.json",
            "--weather",
            f.to_str().unwrap(),
            "--out",
            out.to_str().unwrap(),
        ];
        refused(&f, &expect, &args, Some(&out));
    }
}

#[test]
fn bad_variants_are_refused_naming_the_variant() {
    let tmp = tempfile::tempdir().unwrap();
    for (f, mut expect) in cases("variants", "json") {
        let out = tmp.path().join(f.file_stem().unwrap());
        let v = format!("trial={}", f.display());
        expect.push("trial".into());
        let args = [
            "compare",
            "zones-examples/fernhollow-cabin.json",
            "--variant",
            &v,
            "--from",
            "2025-01-06",
            "--to",
            "2025-01-07",
            "--out",
            out.to_str().unwrap(),
        ];
        refused(&f, &expect, &args, Some(&out));
    }
}

#[test]
fn bad_measured_data_are_refused() {
    let tmp = tempfile::tempdir().unwrap();
    for (f, expect) in cases("measured", "csv") {
        let out = tmp.path().join(f.file_stem().unwrap());
        refused(
            &f,
            &expect,
            &[
                "calibrate",
                f.to_str().unwrap(),
                "--out",
                out.to_str().unwrap(),
            ],
            Some(&out),
        );
    }
}

#[test]
fn a_run_that_fails_midway_leaves_no_half_written_file() {
    // The output folder exists but one of the files to write is a directory: the write fails
    // after others succeeded. No temporary file may remain, and no file may be partial.
    let tmp = tempfile::tempdir().unwrap();
    let out = tmp.path().join("run");
    std::fs::create_dir_all(out.join("summary.json")).unwrap();
    let o = dwell(&[
        "simulate",
        "zones-examples/fernhollow-cabin.json",
        "--from",
        "2025-01-06",
        "--to",
        "2025-01-07",
        "--out",
        out.to_str().unwrap(),
    ]);
    assert_eq!(o.status.code(), Some(1), "{}", stderr(&o));
    assert!(stderr(&o).contains("summary.json"), "{}", stderr(&o));
    for e in std::fs::read_dir(&out).unwrap() {
        let p = e.unwrap().path();
        let n = p.file_name().unwrap().to_string_lossy().to_string();
        assert!(!n.contains(".tmp-"), "temporary file {n} left behind");
        if p.is_file() && n.ends_with(".csv") {
            let text = std::fs::read_to_string(&p).unwrap();
            assert!(text.ends_with('\n'), "{n} is cut short");
        }
    }
}
