//! `ductrace probe` and `ductrace history` on the conformance fixtures written by VTK itself
//! (fixtures/vtk/generate.py). Expected values: numpy, computed by the generator from the
//! arrays it handed to VTK (hydrostatic and von Mises stress, triaxiality, principal
//! stresses by numpy.linalg.eigvalsh).

#![allow(clippy::unwrap_used)]

use std::path::{Path, PathBuf};

use assert_cmd::Command;
use predicates::prelude::*;
use serde_json::Value;

fn fixture(rel: &str) -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("fixtures/vtk/good")
        .join(rel)
}

fn ductrace() -> Command {
    Command::cargo_bin("ductrace").unwrap()
}

fn json_of(args: &[&str]) -> Value {
    let out = ductrace().args(args).output().unwrap();
    assert!(
        out.status.success(),
        "{args:?}: {}",
        String::from_utf8_lossy(&out.stderr)
    );
    serde_json::from_slice(&out.stdout).unwrap()
}

fn f(v: &Value) -> f64 {
    v.as_f64().unwrap_or_else(|| panic!("not a number: {v}"))
}

#[test]
fn probe_json_keys_and_counts() {
    let p = fixture("series_pvd/collection.pvd");
    let v = json_of(&["probe", p.to_str().unwrap(), "--format", "json"]);
    let exp: Value = serde_json::from_str(
        &std::fs::read_to_string(fixture("series_pvd/collection.pvd.expected.json")).unwrap(),
    )
    .unwrap();
    assert_eq!(v["points"], exp["n_points"]);
    assert_eq!(v["cells"], exp["n_cells"]);
    let incs = v["increments"].as_array().unwrap();
    assert_eq!(incs.len(), exp["increments"].as_array().unwrap().len());
    for (a, b) in incs.iter().zip(exp["increments"].as_array().unwrap()) {
        assert_eq!(a["index"], b["index"]);
        assert_eq!(f(&a["time"]), f(&b["time"]));
        assert!(
            a["file"].as_str().unwrap().ends_with(
                Path::new(b["file"].as_str().unwrap())
                    .file_name()
                    .unwrap()
                    .to_str()
                    .unwrap()
            )
        );
    }
    for field in v["fields"].as_array().unwrap() {
        for key in ["name", "location", "components", "type"] {
            assert!(!field[key].is_null(), "{key}");
        }
    }
    for key in ["stress", "eqps", "plastic_strain", "displacement"] {
        assert!(v["roles"].get(key).is_some(), "roles.{key}");
    }
    assert_eq!(v["roles"]["stress"], "stress");
    assert_eq!(v["roles"]["eqps"], "eqps");
    ductrace()
        .args(["probe", p.to_str().unwrap()])
        .assert()
        .success()
        .stdout(predicate::str::contains("VTK_HEXAHEDRON"));
}

/// Every cell's history reproduces numpy's measures at every increment.
#[test]
fn history_rows_match_numpy() {
    let p = fixture("series_pvd/collection.pvd");
    let exp: Value = serde_json::from_str(
        &std::fs::read_to_string(fixture("series_pvd/collection.pvd.expected.json")).unwrap(),
    )
    .unwrap();
    let incs = exp["increments"].as_array().unwrap();
    let n_cells = exp["n_cells"].as_u64().unwrap() as usize;
    for c in 0..n_cells {
        let sel = format!("cell:{c}");
        let v = json_of(&[
            "history",
            p.to_str().unwrap(),
            "--at",
            &sel,
            "--format",
            "json",
            "-q",
        ]);
        let rows = v["rows"].as_array().unwrap();
        assert_eq!(rows.len(), incs.len());
        for (row, inc) in rows.iter().zip(incs) {
            let stress = inc["arrays"]
                .as_array()
                .unwrap()
                .iter()
                .find(|a| a["name"] == "stress" && a["location"] == "cell")
                .unwrap();
            let eqps = inc["arrays"]
                .as_array()
                .unwrap()
                .iter()
                .find(|a| a["name"] == "eqps")
                .unwrap();
            let s = &stress["stress"];
            let vm = f(&s["von_mises"][c]);
            let scale = vm.max(1.0);
            let close = |a: f64, b: f64, what: &str| {
                assert!(
                    (a - b).abs() <= 1e-9 * scale,
                    "cell {c} {what}: {a} vs numpy {b}"
                );
            };
            close(f(&row["eqps"]), f(&eqps["values"][c]), "eqps");
            close(f(&row["sigma_h"]), f(&s["hydrostatic"][c]), "sigma_h");
            close(f(&row["sigma_vm"]), vm, "sigma_vm");
            match s["triaxiality"][c].as_f64() {
                Some(t) => close(f(&row["triaxiality"]), t, "triaxiality"),
                None => assert!(row["triaxiality"].is_null()),
            }
            for k in 0..3 {
                close(
                    f(&row[format!("sigma_{}", k + 1)]),
                    f(&s["principal"][c][k]),
                    "principal",
                );
            }
        }
    }
}

#[test]
fn history_csv_has_the_columns_and_a_summary() {
    let p = fixture("series_pvd/collection.pvd");
    let out = ductrace()
        .args([
            "history",
            p.to_str().unwrap(),
            "--at",
            "max:eqps",
            "--format",
            "csv",
            "-q",
        ])
        .output()
        .unwrap();
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let text = String::from_utf8(out.stdout).unwrap();
    let mut lines = text.lines();
    assert_eq!(
        lines.next().unwrap(),
        "increment,time,eqps,sigma_h,sigma_vm,triaxiality,lode_angle_param,lode_param,sigma_1,sigma_2,sigma_3"
    );
    assert!(text.contains("\n# triaxiality_avg = "));
    assert!(text.contains("\n# rule = trapezoid\n"));
}

#[test]
fn history_errors() {
    let p = fixture("series_pvd/collection.pvd");
    let p = p.to_str().unwrap();
    ductrace()
        .args(["history", p, "--at", "cell:1000"])
        .assert()
        .code(1)
        .stderr(predicate::str::contains("out of range"));
    ductrace()
        .args(["history", p, "--at", "edge:3"])
        .assert()
        .code(2)
        .stderr(predicate::str::contains("invalid selector"));
    ductrace()
        .args(["history", p, "--at", "cell:0", "--until", "increment:99"])
        .assert()
        .code(1)
        .stderr(predicate::str::contains("increments 0 to 3"));
    ductrace()
        .args(["history", p, "--at", "cell:0", "--stress", "nothing"])
        .assert()
        .code(1)
        .stderr(predicate::str::contains("nothing"));
    ductrace()
        .args(["history", "no/such/file.pvd", "--at", "cell:0"])
        .assert()
        .code(1)
        .stderr(predicate::str::contains("no/such/file.pvd"));
}
