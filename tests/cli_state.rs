//! The `ductrace state` command and the conventions every command follows
//! (formats, `-o`, exit codes, help, completions).

#![allow(clippy::unwrap_used)]

use assert_cmd::Command;
use predicates::prelude::*;

fn ductrace() -> Command {
    Command::cargo_bin("ductrace").unwrap()
}

fn state_json(components: &str, extra: &[&str]) -> serde_json::Value {
    let out = ductrace()
        .args(["state", components, "--format", "json"])
        .args(extra)
        .output()
        .unwrap();
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    serde_json::from_slice(&out.stdout).unwrap()
}

/// Checks η, θ̄, μ of one state printed by `ductrace state --format json`.
fn check(components: &str, eta: f64, theta: f64, mu: f64) {
    let v = state_json(components, &[]);
    let get = |k: &str| {
        v[k].as_f64()
            .unwrap_or_else(|| panic!("{components}: {k} = {}", v[k]))
    };
    assert!((get("triaxiality") - eta).abs() < 1e-9, "{components}: η");
    assert!(
        (get("lode_angle_param") - theta).abs() < 1e-7,
        "{components}: θ̄"
    );
    assert!((get("lode_param") - mu).abs() < 1e-7, "{components}: μ");
}

/// FIELD-NOTES §1 table (textbook values; common practice): uniaxial tension 1/3, +1, −1;
/// compression −1/3, −1, +1; pure shear 0, 0, 0; plane-strain tension 1/√3, 0, 0;
/// equibiaxial 2/3, −1, +1.
#[test]
fn standard_states() {
    check("300,0,0,0,0,0", 1.0 / 3.0, 1.0, -1.0);
    check("0,0,-300,0,0,0", -1.0 / 3.0, -1.0, 1.0);
    check("0,0,0,150,0,0", 0.0, 0.0, 0.0); // pure shear as τ_xy
    check("400,200,0,0,0,0", 1.0 / 3.0_f64.sqrt(), 0.0, 0.0);
    check("250,250,0,0,0,0", 2.0 / 3.0, -1.0, 1.0);
}

#[test]
fn json_has_exactly_the_documented_keys_and_nulls_when_undefined() {
    let v = state_json("50,50,50,0,0,0", &[]);
    let obj = v.as_object().unwrap();
    let mut keys: Vec<&str> = obj.keys().map(String::as_str).collect();
    keys.sort();
    assert_eq!(
        keys,
        [
            "lode_angle_param",
            "lode_param",
            "principal",
            "sigma_h",
            "sigma_vm",
            "triaxiality",
            "xi"
        ]
    );
    assert!(v["triaxiality"].is_null() && v["lode_angle_param"].is_null());
    assert!(v["lode_param"].is_null() && v["xi"].is_null());
    assert_eq!(v["sigma_h"].as_f64().unwrap(), 50.0);
    assert_eq!(v["principal"].as_array().unwrap().len(), 3);
}

/// Voigt order xx,yy,zz,yz,xz,xy maps to the same tensor as VTK order.
#[test]
fn other_orders_and_nine_components() {
    let a = state_json("10,20,30,4,5,6", &[]); // VTK: xy=4, yz=5, xz=6
    let b = state_json("10,20,30,5,6,4", &["--order", "xx,yy,zz,yz,xz,xy"]);
    let c = state_json("10,4,6,4,20,5,6,5,30", &[]);
    for k in ["sigma_vm", "triaxiality", "lode_angle_param"] {
        let (x, y, z) = (
            a[k].as_f64().unwrap(),
            b[k].as_f64().unwrap(),
            c[k].as_f64().unwrap(),
        );
        assert!((x - y).abs() < 1e-12 && (x - z).abs() < 1e-12, "{k}");
    }
}

#[test]
fn usage_and_data_errors_have_codes_and_one_line_messages() {
    ductrace()
        .args(["state", "1,2,3"])
        .assert()
        .code(2)
        .stderr(predicate::str::contains(
            "expected 6 or 9 stress components, got 3",
        ));
    ductrace()
        .args(["state", "1,2,x,0,0,0"])
        .assert()
        .code(2)
        .stderr(predicate::str::contains("\"x\""));
    ductrace()
        .args(["state", "1,2,3,4,5,6,7,8,9"])
        .assert()
        .code(1)
        .stderr(predicate::str::contains("not symmetric"));
    ductrace()
        .args(["state", "1,2,3,0,0,0", "--order", "xx,yy"])
        .assert()
        .code(2)
        .stderr(predicate::str::contains("--order"));
    ductrace().args(["nonsense"]).assert().code(2);
    let out = ductrace()
        .args(["state", "nan,0,0,0,0,0"])
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(1));
    assert_eq!(
        String::from_utf8_lossy(&out.stderr).trim().lines().count(),
        1
    );
}

#[test]
fn csv_and_text_formats() {
    ductrace()
        .args(["state", "300,0,0,0,0,0", "--format", "csv"])
        .assert()
        .success()
        .stdout(predicate::str::starts_with(
            "sigma_h,sigma_vm,triaxiality,lode_angle_param,lode_param,xi,sigma_1,sigma_2,sigma_3\n100,300,0.333",
        ));
    ductrace()
        .args(["state", "7,7,7,0,0,0", "--format", "csv"])
        .assert()
        .success()
        .stdout(predicate::str::contains("\n7,0,,,,,7,7,7\n"));
    ductrace()
        .args(["state", "300,0,0,0,0,0"])
        .assert()
        .success()
        .stdout(
            predicate::str::contains("triaxiality η").and(predicate::str::contains("0.333333")),
        );
}

#[test]
fn output_file_is_written_and_help_carries_the_caution() {
    let dir = tempfile::tempdir().unwrap();
    let p = dir.path().join("s.json");
    ductrace()
        .args(["state", "1,0,0,0,0,0", "--format", "json", "-o"])
        .arg(&p)
        .assert()
        .success()
        .stdout("");
    let v: serde_json::Value = serde_json::from_slice(&std::fs::read(&p).unwrap()).unwrap();
    assert!(v["sigma_vm"].as_f64().unwrap() > 0.0);
    ductrace()
        .args(["--help"])
        .assert()
        .success()
        .stdout(predicate::str::contains("licensed engineering practice"));
    ductrace()
        .args(["state", "--help"])
        .assert()
        .success()
        .stdout(predicate::str::contains("Example"));
    ductrace()
        .args(["--version"])
        .assert()
        .success()
        .stdout(predicate::str::starts_with("ductrace "));
    ductrace()
        .args(["completions", "bash"])
        .assert()
        .success()
        .stdout(predicate::str::contains("ductrace"));
}

/// A closed stdout (e.g. `| head -1`) is not an error: exit 0, nothing on stderr.
#[test]
fn broken_pipe_is_not_an_error() {
    use std::process::{Command as Std, Stdio};
    let bin = assert_cmd::cargo::cargo_bin("ductrace");
    let mut child = Std::new(bin)
        .args(["completions", "bash"])
        .stdout(Stdio::piped())
        .stderr(Stdio::piped())
        .spawn()
        .unwrap();
    // Close the read end before the child writes its (long) script.
    drop(child.stdout.take());
    let out = child.wait_with_output().unwrap();
    assert_eq!(
        out.status.code(),
        Some(0),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    assert!(
        out.stderr.is_empty(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
}
