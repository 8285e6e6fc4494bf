//! Nothing lost: ductrace never modifies its inputs, refuses an output over an input,
//! leaves every output file either absent or complete when a long `export` is interrupted
//! (SIGTERM, SIGINT), and still writes the other specimens' rows when one fails.
//!
//! Expectations are the project's own stated contract (docs/ARCHITECTURE.md, output.rs:
//! inputs opened read-only; outputs written to a temporary file and renamed); completeness
//! of a written .vtu is judged by ductrace's reader decoding every array of it, and the
//! reader is itself checked against VTK-written files (tests/cli_history.rs).

#![allow(clippy::unwrap_used)]

mod common;

use std::collections::BTreeMap;
use std::path::{Path, PathBuf};
use std::process::Stdio;
use std::time::{Duration, Instant, SystemTime};

use assert_cmd::Command;
use assert_cmd::cargo::CommandCargoExt;

fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

fn s(p: &Path) -> &str {
    p.to_str().unwrap()
}

/// Copies a folder tree.
fn copy_tree(from: &Path, to: &Path) {
    std::fs::create_dir_all(to).unwrap();
    for e in std::fs::read_dir(from).unwrap() {
        let e = e.unwrap();
        let t = to.join(e.file_name());
        if e.file_type().unwrap().is_dir() {
            copy_tree(&e.path(), &t);
        } else {
            std::fs::copy(e.path(), &t).unwrap();
        }
    }
}

/// Every file under `dir` with its bytes and modification time.
fn snapshot(dir: &Path) -> BTreeMap<PathBuf, (Vec<u8>, SystemTime)> {
    let mut m = BTreeMap::new();
    let mut stack = vec![dir.to_path_buf()];
    while let Some(d) = stack.pop() {
        for e in std::fs::read_dir(&d).unwrap() {
            let e = e.unwrap();
            if e.file_type().unwrap().is_dir() {
                stack.push(e.path());
            } else {
                let meta = e.metadata().unwrap();
                m.insert(
                    e.path(),
                    (std::fs::read(e.path()).unwrap(), meta.modified().unwrap()),
                );
            }
        }
    }
    m
}

fn assert_unchanged(
    before: &BTreeMap<PathBuf, (Vec<u8>, SystemTime)>,
    dir: &Path,
    after_what: &str,
) {
    let after = snapshot(dir);
    assert_eq!(
        before.keys().collect::<Vec<_>>(),
        after.keys().collect::<Vec<_>>(),
        "{after_what}: files added to or removed from the inputs"
    );
    for (p, (bytes, mtime)) in before {
        let (b2, m2) = &after[p];
        assert!(bytes == b2, "{after_what}: {} changed", p.display());
        assert_eq!(mtime, m2, "{after_what}: {} touched", p.display());
    }
}

fn ductrace(args: &[&str]) -> (i32, String) {
    let out = Command::cargo_bin("ductrace")
        .unwrap()
        .args(args)
        .output()
        .unwrap();
    (
        out.status.code().unwrap_or(-1),
        String::from_utf8_lossy(&out.stderr).into_owned(),
    )
}

/// A study of the first three specimens of the bundled campaign, results copied into
/// `dir/inputs`; returns the study path.
fn campaign_copy(dir: &Path) -> PathBuf {
    let inputs = dir.join("inputs");
    let src = root().join("fixtures/campaign");
    for sp in ["srb", "nrb_r10", "nrb_r4"] {
        copy_tree(&src.join(sp), &inputs.join(sp));
    }
    let text = std::fs::read_to_string(src.join("study.toml")).unwrap();
    let parts: Vec<&str> = text.split("[[specimen]]").collect();
    let mut study = parts[0].to_string();
    for p in &parts[1..4] {
        study.push_str("[[specimen]]");
        study.push_str(p);
    }
    let path = inputs.join("study.toml");
    std::fs::write(&path, study).unwrap();
    copy_tree(
        &root().join("fixtures/vtk/good/series_pvd"),
        &inputs.join("series_pvd"),
    );
    copy_tree(&root().join("fixtures/vtk/good/pvtu"), &inputs.join("pvtu"));
    path
}

/// Every command, run on copies of the inputs; the inputs' bytes and modification times
/// are compared after each.
#[test]
fn inputs_are_never_modified() {
    let d = tempfile::tempdir().unwrap();
    let study = campaign_copy(d.path());
    let inputs = d.path().join("inputs");
    let out = d.path().join("out");
    std::fs::create_dir_all(&out).unwrap();
    let pvd = inputs.join("series_pvd/collection.pvd");
    let pvtu = inputs.join("pvtu/block.pvtu");
    let srb = inputs.join("srb/srb.pvd");
    let o = |n: &str| out.join(n).to_str().unwrap().to_string();
    let before = snapshot(&inputs);
    let commands: Vec<Vec<String>> = vec![
        vec!["probe".into(), s(&pvd).into()],
        vec![
            "probe".into(),
            s(&pvtu).into(),
            "--format".into(),
            "json".into(),
            "-o".into(),
            o("probe.json"),
        ],
        vec![
            "history".into(),
            s(&pvd).into(),
            "--at".into(),
            "max:eqps".into(),
            "-o".into(),
            o("h.csv"),
            "--format".into(),
            "csv".into(),
        ],
        vec![
            "history".into(),
            s(&srb).into(),
            "--at".into(),
            "near:0,0,0".into(),
            "--gauge".into(),
            "0,-20,0:0,20,0".into(),
            "--until".into(),
            "gauge:9.7686".into(),
            "--band".into(),
            "4".into(),
        ],
        vec![
            "table".into(),
            s(&study).into(),
            "--format".into(),
            "csv".into(),
            "-o".into(),
            o("table.csv"),
        ],
        vec!["fit".into(), o("table.csv"), "--model".into(), "jc".into()],
        vec![
            "fit".into(),
            s(&study).into(),
            "--model".into(),
            "hc".into(),
            "--format".into(),
            "json".into(),
            "-o".into(),
            o("fit.json"),
        ],
        vec![
            "damage".into(),
            s(&study).into(),
            "--locus".into(),
            o("fit.json"),
        ],
        vec![
            "damage".into(),
            s(&srb).into(),
            "--locus".into(),
            o("fit.json"),
        ],
        vec![
            "export".into(),
            s(&pvtu).into(),
            "-o".into(),
            o("export_pvtu"),
        ],
        vec![
            "export".into(),
            s(&srb).into(),
            "-o".into(),
            o("export_srb"),
            "--locus".into(),
            o("fit.json"),
        ],
    ];
    for c in &commands {
        // Commands on the campaign's smooth-bar result name its arrays as the study does.
        let mut c = c.clone();
        if c[1].contains("srb") {
            c.extend(common::campaign_field_options());
        }
        let a: Vec<&str> = c.iter().map(String::as_str).collect();
        let (code, err) = ductrace(&a);
        assert_eq!(code, 0, "{a:?}: {err}");
        assert_unchanged(&before, &inputs, &format!("{a:?}"));
    }
}

/// `-o` over any input is refused (exit 2) and the input keeps its bytes: the result, a
/// data file of its collection, a piece of a .pvtu, the study, the table being fitted,
/// and `export` into the input folder or over the collection it reads.
#[test]
fn output_over_an_input_is_refused() {
    let d = tempfile::tempdir().unwrap();
    let study = campaign_copy(d.path());
    let inputs = d.path().join("inputs");
    let pvd = inputs.join("series_pvd/collection.pvd");
    let step = inputs.join("series_pvd/steps/s1.vtu");
    let piece = inputs.join("pvtu/block_1.vtu");
    let pvtu = inputs.join("pvtu/block.pvtu");
    let table = d.path().join("table.csv");
    let (code, err) = ductrace(&["table", s(&study), "--format", "csv", "-o", s(&table), "-q"]);
    assert_eq!(code, 0, "{err}");
    let before = snapshot(&inputs);
    let table_bytes = std::fs::read(&table).unwrap();
    let srb_dir = inputs.join("srb");
    let export_back = d.path().join("exp");
    let (code, err) = ductrace(&["export", s(&pvd), "-o", s(&export_back), "-q"]);
    assert_eq!(code, 0, "{err}");
    let exported = snapshot(&export_back);
    let cases: Vec<Vec<&str>> = vec![
        vec!["probe", s(&pvd), "-o", s(&pvd)],
        vec!["history", s(&pvd), "--at", "cell:0", "-o", s(&step)],
        vec!["history", s(&pvtu), "--at", "cell:0", "-o", s(&piece)],
        vec!["probe", s(&pvtu), "-o", s(&pvtu)],
        vec!["table", s(&study), "-o", s(&study)],
        vec!["fit", s(&table), "--model", "jc", "-o", s(&table)],
        vec!["export", s(&srb_dir), "-o", s(&srb_dir)],
        vec!["export", s(&export_back), "-o", s(&export_back)],
    ];
    for a in &cases {
        let (code, err) = ductrace(a);
        assert_eq!(code, 2, "{a:?}: {err}");
        assert!(err.contains("refusing to"), "{a:?}: {err}");
        assert_eq!(err.lines().count(), 1, "{a:?}: {err}");
        assert_unchanged(&before, &inputs, &format!("{a:?}"));
        assert!(
            std::fs::read(&table).unwrap() == table_bytes,
            "{a:?}: table changed"
        );
        assert_unchanged(&exported, &export_back, &format!("{a:?}"));
    }
}

/// A .pvd listing the smooth bar's 51 increments `repeat` times (times 0, 1, 2, ...), so
/// that the export of it runs long enough to be interrupted.
fn long_series(dir: &Path, repeat: usize) -> PathBuf {
    let srb = dir.join("srb");
    copy_tree(&root().join("fixtures/campaign/srb"), &srb);
    let mut files: Vec<String> = std::fs::read_dir(&srb)
        .unwrap()
        .map(|e| e.unwrap().file_name().into_string().unwrap())
        .filter(|n| n.ends_with(".vtu"))
        .collect();
    files.sort();
    let mut text = String::from(
        "<?xml version=\"1.0\"?>\n<VTKFile type=\"Collection\" version=\"1.0\">\n<Collection>\n",
    );
    let mut t = 0usize;
    for _ in 0..repeat {
        for f in &files {
            text.push_str(&format!("<DataSet timestep=\"{t}\" file=\"{f}\"/>\n"));
            t += 1;
        }
    }
    text.push_str("</Collection>\n</VTKFile>\n");
    let p = srb.join("long.pvd");
    std::fs::write(&p, text).unwrap();
    p
}

/// Starts a long export, waits until it has written a few files, sends `signal` with the
/// `kill` command, and checks what is left: every derived_NNNN.vtu decodes completely,
/// derived.pvd is absent or complete, and nothing else but hidden `.*.tmp` files remains.
fn interrupted_export(signal: &str) {
    let d = tempfile::tempdir().unwrap();
    let input = long_series(d.path(), 30);
    let out = d.path().join("out");
    let mut child = std::process::Command::cargo_bin("ductrace")
        .unwrap()
        .args(["export", s(&input), "-o", s(&out), "-q"])
        .args(common::campaign_field_options())
        .stdout(Stdio::null())
        .stderr(Stdio::piped())
        .spawn()
        .unwrap();
    // Wait (not a timed assertion: a bound on waiting) until a few outputs exist.
    let start = Instant::now();
    let count = |p: &Path| {
        std::fs::read_dir(p)
            .map(|r| {
                r.filter(|e| {
                    e.as_ref()
                        .map(|e| e.file_name().to_string_lossy().starts_with("derived_"))
                        .unwrap_or(false)
                })
                .count()
            })
            .unwrap_or(0)
    };
    while count(&out) < 5 && start.elapsed() < Duration::from_secs(120) {
        if child.try_wait().unwrap().is_some() {
            break;
        }
        std::thread::sleep(Duration::from_millis(5));
    }
    let status = std::process::Command::new("kill")
        .args([signal, &child.id().to_string()])
        .status()
        .unwrap();
    assert!(status.success() || child.try_wait().unwrap().is_some());
    let exit = child.wait().unwrap();
    let finished = exit.success();
    let mut vtus = Vec::new();
    let mut tmps = Vec::new();
    let mut pvd = false;
    for e in std::fs::read_dir(&out).unwrap() {
        let name = e.unwrap().file_name().into_string().unwrap();
        if name.starts_with("derived_") && name.ends_with(".vtu") {
            vtus.push(name);
        } else if name == "derived.pvd" {
            pvd = true;
        } else if name.starts_with('.') && name.ends_with(".tmp") {
            tmps.push(name);
        } else {
            panic!("{signal}: unexpected file {name} in the output");
        }
    }
    vtus.sort();
    eprintln!(
        "{signal}: process {}; {} .vtu written of {}, derived.pvd {}, temporary files left: {:?}",
        if finished {
            "finished before the signal"
        } else {
            "interrupted"
        },
        vtus.len(),
        30 * 51,
        if pvd { "present" } else { "absent" },
        tmps
    );
    assert!(!vtus.is_empty());
    if !finished {
        assert!(!pvd, "{signal}: the .pvd is written last, after every .vtu");
        assert!(
            tmps.len() <= 1,
            "{signal}: more than one temporary file: {tmps:?}"
        );
    }
    // Every .vtu written is complete: every array decodes (max: scans read whole arrays).
    for v in &vtus {
        let p = out.join(v);
        for field in ["max:sigma_vm", "max:eqps", "max:triaxiality"] {
            let (code, err) = ductrace(&["history", s(&p), "--at", field, "-q"]);
            assert_eq!(code, 0, "{signal}: {v} is not complete ({field}): {err}");
        }
    }
    if pvd {
        let (code, err) = ductrace(&["probe", s(&out.join("derived.pvd"))]);
        assert_eq!(code, 0, "{signal}: derived.pvd: {err}");
    }
    // Running the export again into the same folder completes it and removes the
    // temporary file the interrupted run left (a shorter series keeps the test quick).
    let short = long_series(&d.path().join("again"), 1);
    let names = common::campaign_field_options();
    let mut again = vec!["export", s(&short), "-o", s(&out), "-q"];
    again.extend(names.iter().map(String::as_str));
    let (code, err) = ductrace(&again);
    assert_eq!(code, 0, "{signal}: export again: {err}");
    let left: Vec<String> = std::fs::read_dir(&out)
        .unwrap()
        .map(|e| e.unwrap().file_name().into_string().unwrap())
        .filter(|n| n.ends_with(".tmp"))
        .collect();
    assert!(
        left.is_empty(),
        "{signal}: temporary files remain: {left:?}"
    );
    let (code, err) = ductrace(&["probe", s(&out.join("derived.pvd"))]);
    assert_eq!(
        code, 0,
        "{signal}: derived.pvd after the second export: {err}"
    );
}

#[test]
fn interrupted_export_sigterm_leaves_only_complete_files() {
    interrupted_export("-TERM");
}

#[test]
fn interrupted_export_sigint_leaves_only_complete_files() {
    interrupted_export("-INT");
}

/// One specimen fails (its result folder is missing): the others' rows are written, the
/// failure is named on stderr and in the table, the exit code is 1.
#[test]
fn one_failing_specimen_does_not_lose_the_others() {
    let d = tempfile::tempdir().unwrap();
    let study = campaign_copy(d.path());
    std::fs::remove_dir_all(d.path().join("inputs/nrb_r10")).unwrap();
    for (format, marker) in [("csv", "# failed: nrb-r10: "), ("json", "\"failed\"")] {
        let out = d.path().join(format!("table.{format}"));
        let (code, err) = ductrace(&["table", s(&study), "--format", format, "-o", s(&out)]);
        assert_eq!(code, 1, "{err}");
        assert!(
            err.contains("specimen nrb-r10: ") && err.contains("nrb_r10"),
            "{err}"
        );
        let text = std::fs::read_to_string(&out).unwrap();
        assert!(text.contains(marker), "{text}");
        for name in ["srb", "nrb-r4"] {
            assert!(text.contains(name), "{name} lost: {text}");
        }
        if format == "json" {
            let v: serde_json::Value = serde_json::from_str(&text).unwrap();
            assert_eq!(v["rows"].as_array().unwrap().len(), 2);
            assert_eq!(v["failed"][0]["specimen"], "nrb-r10");
        }
    }
}

/// A command that fails leaves an existing output file as it was (the output is written
/// only after the work succeeded, atomically), and leaves no temporary file behind.
#[test]
fn a_failing_command_keeps_the_old_output() {
    let d = tempfile::tempdir().unwrap();
    let old = d.path().join("history.csv");
    std::fs::write(&old, "previous result\n").unwrap();
    let bad = root().join("fixtures/vtk/bad/corrupt_zlib.vtu");
    let good = root().join("fixtures/vtk/good/hex_appended_zlib.vtu");
    for (input, at) in [(&bad, "max:sigma_vm"), (&good, "cell:999")] {
        let (code, err) = ductrace(&["history", s(input), "--at", at, "-o", s(&old)]);
        assert_eq!(code, 1, "{err}");
        assert_eq!(std::fs::read_to_string(&old).unwrap(), "previous result\n");
    }
    let names: Vec<String> = std::fs::read_dir(d.path())
        .unwrap()
        .map(|e| e.unwrap().file_name().into_string().unwrap())
        .collect();
    assert_eq!(names, ["history.csv"]);
}
