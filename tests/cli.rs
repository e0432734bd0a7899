//! The command line: outputs a user relies on, and bad input answered with a clear message on
//! stderr and exit code 2, never a panic.

use std::process::{Command, Output};

mod common;
use common::{double, requested, DOUBLE_RESIDUAL_LOSS, HIGH_RESIDUAL_LOSS, NEGATIVE_CONTROL_MIN};

/// Not a tolerance: the F0 ground state of docs/MATHEMATICS.md §4 to the 4 decimals compared
/// (17.8466…).
const CHECKED_VALUE_4_DECIMALS: f64 = 1e-3;
/// Not a tolerance of the precision: ν at the P2 ground state given to 24 decimals is 1 to about
/// those decimals (measured 5.6e-28 at 30 digits), whatever the digits requested.
const NU_AT_CHECKED_VALUE: f64 = 1e-26;
/// Not a tolerance: the grid −12:12:481 misses the mass of ψ beyond ±12, ≈ |ψ(12)|² ≈ 1e-6
/// (measured 9.3e-7 for dP3 level 2).
const NORM_ON_GRID: f64 = 1e-4;
/// Detection threshold: ν at a modulus that is not an attractor (F0, a = 20) is this far from an
/// integer at least (measured 0.069); not a tolerance.
const NOT_AN_INTEGER: f64 = 1e-3;

fn regwave(args: &[&str]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_regwave"))
        .args(args)
        .output()
        .expect("run regwave")
}

fn stderr(o: &Output) -> String {
    String::from_utf8_lossy(&o.stderr).into_owned()
}

/// Bad input: exit code 2, a message containing `needle`, no panic.
fn rejects(args: &[&str], needle: &str) {
    let o = regwave(args);
    let e = stderr(&o);
    assert_eq!(
        o.status.code(),
        Some(2),
        "{args:?}: exit {:?}, stderr {e}",
        o.status.code()
    );
    assert!(e.contains(needle), "{args:?}: stderr lacks {needle:?}: {e}");
    assert!(!e.contains("panicked"), "{args:?} panicked: {e}");
}

#[test]
fn families_lists_fifteen_plus_one() {
    let o = regwave(&["families", "--json"]);
    assert!(o.status.success(), "{}", stderr(&o));
    let v: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    let fams = v["families"].as_array().unwrap();
    assert_eq!(fams.len(), 16);
    assert_eq!(fams.iter().filter(|f| f["applicable"] == true).count(), 15);
    for f in fams {
        for key in ["id", "vertices", "boundary_points", "applicable", "phi"] {
            assert!(f.get(key).is_some(), "missing {key} in {f}");
        }
    }
    let f0 = fams.iter().find(|f| f["id"] == "F0").unwrap();
    assert_eq!(f0["boundary_points"], 4);
    let table = regwave(&["families"]);
    let text = String::from_utf8_lossy(&table.stdout);
    assert!(text.contains("not applicable"), "{text}");
}

#[test]
fn spectrum_json_contract() {
    let o = regwave(&[
        "spectrum", "--family", "F0", "--levels", "0..1", "--basis", "80", "--json",
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    let v: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    for key in [
        "family",
        "eigenvalues",
        "tool_version",
        "inputs",
        "elapsed_s",
        "precision_bits",
    ] {
        assert!(v.get(key).is_some(), "missing {key}");
    }
    let ev = v["eigenvalues"].as_array().unwrap();
    assert_eq!(ev.len(), 2);
    for e in ev {
        assert!(e["value"].is_string() && e["error_estimate"].is_string() && e["level"].is_u64());
    }
    let a0: f64 = ev[0]["value"].as_str().unwrap().parse().unwrap();
    assert!((a0 - 17.8466).abs() < CHECKED_VALUE_4_DECIMALS, "{a0}");
}

#[test]
fn spectrum_from_vertices_matches_the_family() {
    // A GL₂(Z) image of P2 that is not in strip form: identified and mapped to a strip form.
    let o = regwave(&[
        "spectrum",
        "--vertices",
        "(2,1),(1,1),(-3,-2)",
        "--levels",
        "0",
        "--basis",
        "60",
        "--json",
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    let v: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    assert_eq!(v["family"], "P2");
}

#[test]
fn bad_vertex_lists() {
    rejects(
        &[
            "spectrum",
            "--vertices",
            "(0,0),(1,1),(2,2)",
            "--levels",
            "0",
        ],
        "do not span a polygon",
    );
    rejects(
        &["spectrum", "--vertices", "(1,0)", "--levels", "0"],
        "do not span a polygon",
    );
    // Not convex: (0,0) lies strictly inside; duplicates and edge points are fine.
    rejects(
        &[
            "spectrum",
            "--vertices",
            "(1,0),(0,0),(0,1),(-1,-1)",
            "--levels",
            "0",
        ],
        "not convex",
    );
    let o = regwave(&[
        "spectrum",
        "--vertices",
        "(0,1),(-1,-1),(1,-1),(0,-1),(0,1)",
        "--levels",
        "0",
        "--basis",
        "40",
    ]);
    assert!(
        o.status.success(),
        "duplicates and edge points are allowed: {}",
        stderr(&o)
    );
    // Two interior points: the triangle (−1,−1), (3,−1), (−1,2) contains (0,0) and (1,0).
    rejects(
        &[
            "spectrum",
            "--vertices",
            "(-1,-1),(3,-1),(-1,2)",
            "--levels",
            "0",
        ],
        "not reflexive",
    );
    rejects(
        &[
            "spectrum",
            "--vertices",
            "(1,0),(0,1),(-1,",
            "--levels",
            "0",
        ],
        "cannot read vertices",
    );
    rejects(
        &[
            "spectrum",
            "--vertices",
            "(a,b),(0,1),(-1,-1)",
            "--levels",
            "0",
        ],
        "cannot read vertices",
    );
}

#[test]
fn width_three_triangle_has_no_strip_form() {
    rejects(
        &[
            "spectrum",
            "--vertices",
            "(2,-1),(-1,2),(-1,-1)",
            "--levels",
            "0",
        ],
        "strip form",
    );
    rejects(
        &["spectrum", "--family", "P2*", "--levels", "0"],
        "not applicable",
    );
}

#[test]
fn non_binomial_coefficients_are_not_tempered() {
    rejects(
        &[
            "spectrum",
            "--family",
            "dP3",
            "--coefficients",
            "(1,0)=2",
            "--levels",
            "0",
        ],
        "not tempered",
    );
    rejects(
        &[
            "spectrum",
            "--family",
            "F0",
            "--coefficients",
            "(0,0)=1",
            "--levels",
            "0",
        ],
        "constant term",
    );
}

#[test]
fn unknown_family_and_bad_ranges() {
    rejects(
        &["spectrum", "--family", "K3", "--levels", "0"],
        "unknown family",
    );
    rejects(
        &["spectrum", "--family", "F0", "--levels", "5..2"],
        "reversed",
    );
    rejects(
        &["spectrum", "--family", "F0", "--levels", "x"],
        "level range",
    );
    rejects(
        &["spectrum", "--family", "F0", "--digits", "3"],
        "--digits 3",
    );
    rejects(&["spectrum", "--levels", "0"], "--family");
    rejects(
        &[
            "spectrum",
            "--family",
            "F0",
            "--vertices",
            "(1,0),(0,1),(-1,-1)",
        ],
        "cannot be used with",
    );
}

/// An SVG document that parses as XML; returns the concatenated text of its <text> elements and
/// the number of drawn series elements (polylines and paths).
fn parse_svg(path: &std::path::Path) -> (String, usize) {
    let text = std::fs::read_to_string(path).unwrap_or_else(|e| panic!("{path:?}: {e}"));
    let doc = roxmltree::Document::parse(&text).unwrap_or_else(|e| panic!("{path:?}: {e}"));
    let labels: Vec<&str> = doc
        .descendants()
        .filter(|n| n.has_tag_name("text"))
        .filter_map(|n| n.text())
        .collect();
    let series = doc
        .descendants()
        .filter(|n| n.has_tag_name("polyline") || n.has_tag_name("path") || n.has_tag_name("rect"))
        .count();
    (labels.join(" | "), series)
}

#[test]
fn tour_writes_every_promised_file() {
    // End to end: the README's main command into a temporary directory.
    let dir = temp_dir("tour");
    let o = regwave(&["tour", "--out", dir.to_str().unwrap()]);
    assert!(o.status.success(), "{}", stderr(&o));
    for f in [
        "report.md",
        "report.json",
        "families.json",
        "families.txt",
        "agreement.svg",
    ] {
        assert!(dir.join(f).is_file(), "missing {f}");
    }
    // Figures: parse, axes labelled, data drawn.
    for id in ["F0", "P2", "dP3"] {
        for (stem, axis) in [
            ("profiles", "r"),
            ("residual", "relative residual"),
            ("nu", "ln a"),
            ("strip", "Re r"),
        ] {
            let (labels, series) = parse_svg(&dir.join(format!("{stem}-{id}.svg")));
            assert!(
                labels.contains(axis),
                "{stem}-{id}: no axis label {axis:?} in {labels}"
            );
            assert!(series >= 3, "{stem}-{id}: {series} drawn elements");
        }
    }
    let (labels, _) = parse_svg(&dir.join("agreement.svg"));
    assert!(
        labels.contains("agreement digits") && labels.contains("level"),
        "{labels}"
    );
    let (labels, _) = parse_svg(&dir.join("residual-F0-40digits.svg"));
    assert!(labels.contains("relative residual"), "{labels}");
    // The report JSON keeps the documented audit contract.
    let v: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(dir.join("report.json")).unwrap()).unwrap();
    for key in [
        "audits",
        "high_precision",
        "tool_version",
        "inputs",
        "precision_bits",
    ] {
        assert!(!v[key].is_null(), "report.json lacks {key}");
    }
    // The report's timing is kept apart (machine-dependent), in timings.json.
    assert!(v["elapsed_s"].is_null());
    let timings: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(dir.join("timings.json")).unwrap()).unwrap();
    assert!(timings["elapsed_s"].as_f64().unwrap() > 0.0);
    // The tables behind the figures: one row per level.
    for id in ["F0", "P2", "dP3"] {
        let levels = std::fs::read_to_string(dir.join(format!("levels-{id}.csv"))).unwrap();
        assert_eq!(levels.lines().count(), 1 + 5, "levels-{id}.csv");
    }
    let audits = v["audits"].as_array().unwrap();
    assert_eq!(audits.len(), 3);
    for a in audits {
        check_audit_contract(a);
    }
    // The 40-digit eigenfunction: loadable CSVs and its residual at the stated precision.
    let high = dir.join("psi-F0-2-40digits");
    for f in ["psi.csv", "psi_up.csv", "psi_down.csv"] {
        assert_eq!(read_csv(&high.join(f)).len(), 201, "{f}");
    }
    let h = &v["high_precision"];
    let max = h["checks"]["eigen_equation_residual_max"].as_f64().unwrap();
    assert!(max < requested(40, HIGH_RESIDUAL_LOSS));
    // The residual per point behind the figure: one row per grid point, its largest value the
    // reported maximum (to the three digits written).
    let residual = std::fs::read_to_string(high.join("residual.csv")).unwrap();
    let mut rows = residual.lines();
    assert_eq!(rows.next(), Some("r,residual"));
    let values: Vec<f64> = rows
        .map(|l| l.split(',').nth(1).unwrap().parse::<f64>().unwrap())
        .collect();
    assert_eq!(values.len(), 201);
    let largest = values
        .iter()
        .copied()
        .filter(|v| v.is_finite())
        .fold(0.0, f64::max);
    assert!((largest / max - 1.0).abs() < 1e-2, "{largest} vs {max}");
    assert!(h["precision_bits"].as_u64().unwrap() >= 133);
    // The report says what it was computed at and does not hide failures.
    let md = std::fs::read_to_string(dir.join("report.md")).unwrap();
    assert!(md.contains("Numerical evidence, not proofs"));
    assert!(md.contains("bits"));
    assert!(
        !md.contains("unmatched**"),
        "an unmatched level in the tour: {md}"
    );
    // Run again without --force: the tour refreshes its own files (contents.txt), and every file
    // but the timings comes out byte for byte the same, so the committed copy stays unchanged.
    let before = snapshot(&dir);
    let o = regwave(&["tour", "--out", dir.to_str().unwrap()]);
    assert!(o.status.success(), "{}", stderr(&o));
    let after = snapshot(&dir);
    assert_eq!(before.len(), after.len());
    for ((name, a), (_, b)) in before.iter().zip(&after) {
        if !name.ends_with("timings.json") {
            assert!(a == b, "{name} changed between two runs");
        }
    }
    // Files the tour did not write are not replaced without --force.
    let foreign = temp_dir("tour-foreign");
    std::fs::create_dir_all(&foreign).unwrap();
    std::fs::write(foreign.join("report.md"), "mine").unwrap();
    rejects(&["tour", "--out", foreign.to_str().unwrap()], "--force");
    assert_eq!(
        std::fs::read_to_string(foreign.join("report.md")).unwrap(),
        "mine"
    );
    let _ = std::fs::remove_dir_all(&foreign);
    let _ = std::fs::remove_dir_all(&dir);
}

/// Every file below `dir` with its contents, sorted by path.
fn snapshot(dir: &std::path::Path) -> Vec<(String, Vec<u8>)> {
    let mut out = Vec::new();
    let mut stack = vec![dir.to_path_buf()];
    while let Some(d) = stack.pop() {
        for entry in std::fs::read_dir(&d).unwrap() {
            let path = entry.unwrap().path();
            if path.is_dir() {
                stack.push(path);
            } else {
                let name = path.strip_prefix(dir).unwrap().display().to_string();
                out.push((name, std::fs::read(&path).unwrap()));
            }
        }
    }
    out.sort();
    out
}

/// The documented keys of an audit JSON document.
fn check_audit_contract(a: &serde_json::Value) {
    for key in [
        "family",
        "levels",
        "orthogonality_max",
        "unmatched",
        "negative_control_defect",
        "tool_version",
        "inputs",
        "elapsed_s",
        "precision_bits",
    ] {
        assert!(a.get(key).is_some(), "audit lacks {key}");
    }
    for l in a["levels"].as_array().unwrap() {
        for key in [
            "level",
            "nu",
            "modulus",
            "spectrum_value",
            "agreement_digits",
            "residual_max",
            "norm",
            "zeros_inside",
            "decay_rate",
        ] {
            assert!(l.get(key).is_some(), "level lacks {key}: {l}");
        }
        assert_eq!(l["zeros_inside"], l["level"]);
    }
}

#[test]
fn audit_and_check_json_contracts() {
    let dir = temp_dir("audit");
    let o = regwave(&[
        "audit",
        "--family",
        "P2",
        "--levels",
        "0..2",
        "--json",
        "--out",
        dir.to_str().unwrap(),
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    let a: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    check_audit_contract(&a);
    assert_eq!(a["unmatched"].as_array().unwrap().len(), 0);
    // The residual at double precision, the negative control far above it.
    for l in a["levels"].as_array().unwrap() {
        assert!(
            l["residual_max"].as_f64().unwrap() < double(DOUBLE_RESIDUAL_LOSS),
            "{l}"
        );
    }
    assert!(a["negative_control_defect"].as_f64().unwrap() > NEGATIVE_CONTROL_MIN);
    for f in [
        "audit.md",
        "audit.json",
        "profiles-P2.svg",
        "strip-P2.svg",
        "nu-P2.svg",
        "residual-P2.svg",
        "agreement-P2.svg",
    ] {
        assert!(dir.join(f).is_file(), "missing {f}");
    }
    // Without --force an existing report is not replaced, nor an existing figure (refused
    // before the work, the figure untouched).
    let again = [
        "audit",
        "--family",
        "P2",
        "--levels",
        "0..2",
        "--out",
        dir.to_str().unwrap(),
    ];
    rejects(&again, "audit.md exists; use --force");
    for f in [
        "audit.md",
        "audit.json",
        "levels.csv",
        "profiles.csv",
        "nu_scan.csv",
        "strip.csv",
    ] {
        std::fs::remove_file(dir.join(f)).unwrap();
    }
    let figure = std::fs::read(dir.join("profiles-P2.svg")).unwrap();
    rejects(&again, "profiles-P2.svg exists; use --force");
    assert_eq!(std::fs::read(dir.join("profiles-P2.svg")).unwrap(), figure);
    let o = regwave(&["check", "--family", "dP3", "--level", "1", "--json"]);
    assert!(o.status.success(), "{}", stderr(&o));
    let c: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    for key in [
        "family",
        "levels",
        "negative_control_defect",
        "tool_version",
        "inputs",
        "elapsed_s",
        "precision_bits",
    ] {
        assert!(c.get(key).is_some(), "check lacks {key}");
    }
    assert_eq!(c["levels"][0]["zeros_inside"], 1);
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn audit_and_check_refuse_bad_input() {
    rejects(
        &["audit", "--family", "F0", "--levels", "3..1"],
        "level range",
    );
    rejects(&["audit", "--family", "P2*", "--levels", "0..1"], "strip");
    rejects(
        &[
            "audit",
            "--family",
            "F0",
            "--levels",
            "0..1",
            "--out",
            "/proc/regwave-no",
        ],
        "cannot",
    );
    rejects(
        &["check", "--family", "F0", "--modulus", "20"],
        "not an attractor modulus: nu =",
    );
    rejects(&["check", "--family", "F0", "--modulus", "3"], "threshold");
    rejects(&["check", "--family", "F0"], "--level");
}

#[test]
fn unwritable_output_is_a_clear_error() {
    rejects(
        &["tour", "--out", "/proc/regwave-cannot-write-here"],
        "cannot",
    );
}

#[test]
fn attractors_json_contract_and_values() {
    let o = regwave(&[
        "attractors",
        "--family",
        "F0",
        "--levels",
        "0..1",
        "--digits",
        "30",
        "--json",
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    let v: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    for key in [
        "family",
        "attractors",
        "digits",
        "tool_version",
        "inputs",
        "elapsed_s",
    ] {
        assert!(v.get(key).is_some(), "missing {key}");
    }
    let list = v["attractors"].as_array().unwrap();
    for (item, want) in list
        .iter()
        .zip(["17.846643118044799282389997", "70.428043469428353462422178"])
    {
        for key in ["level", "nu", "modulus", "log_modulus"] {
            assert!(item.get(key).is_some(), "missing {key}");
        }
        // docs/MATHEMATICS.md §4 checked values.
        assert!(
            item["modulus"].as_str().unwrap().starts_with(want),
            "{item}"
        );
    }
}

#[test]
fn periods_json_contract() {
    let o = regwave(&[
        "periods",
        "--family",
        "P2",
        "--modulus",
        "12.970039821793337437623954",
        "--digits",
        "30",
        "--json",
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    let v: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    for key in [
        "omega_alpha",
        "omega_beta",
        "r_alpha",
        "r_beta",
        "tau",
        "nu",
        "agreement_digits",
        "tool_version",
        "inputs",
        "elapsed_s",
    ] {
        assert!(v.get(key).is_some(), "missing {key}");
    }
    // Series and path agree on every value (Ω, R over α and β, τ, ν).
    for key in [
        "omega_alpha",
        "r_alpha",
        "omega_beta",
        "r_beta",
        "tau",
        "nu",
    ] {
        let d = v["agreement_digits"][key].as_f64().unwrap();
        assert!(d >= 30.0, "{key}: {d} digits");
    }
    let nu_re: f64 = v["nu"]["re"].as_str().unwrap().parse().unwrap();
    assert!((nu_re - 1.0).abs() < NU_AT_CHECKED_VALUE, "{nu_re}");
}

#[test]
fn bad_moduli_digits_and_levels() {
    rejects(
        &["periods", "--family", "F0", "--modulus", "3.5"],
        "spectral threshold",
    );
    rejects(
        &["periods", "--family", "F0", "--modulus", "inf"],
        "not a finite number",
    );
    rejects(
        &["periods", "--family", "F0", "--modulus", "nan"],
        "modulus",
    );
    rejects(
        &["periods", "--family", "F0", "--modulus", "abc"],
        "cannot read the modulus",
    );
    rejects(
        &[
            "periods",
            "--family",
            "F0",
            "--modulus",
            "20",
            "--digits",
            "7",
        ],
        "--digits 7",
    );
    rejects(
        &["attractors", "--family", "F0", "--digits", "1001"],
        "--digits 1001",
    );
    rejects(
        &["attractors", "--family", "F0", "--levels", "3..1"],
        "reversed",
    );
    rejects(&["attractors", "--family", "F0", "--levels", ""], "level");
    // The one reflexive class without a strip form has no β rule: not applicable.
    rejects(&["attractors", "--family", "P2*"], "not applicable");
}

fn temp_dir(tag: &str) -> std::path::PathBuf {
    let d = std::env::temp_dir().join(format!("regwave-{tag}-{}", std::process::id()));
    let _ = std::fs::remove_dir_all(&d);
    d
}

/// Rows of a psi CSV: (r, re, im), after checking the header (`r,re_psi,im_psi` on R,
/// `r,im_r,re_psi,im_psi` on the boundary lines of the strip, where im_r must be ±2π).
fn read_csv(path: &std::path::Path) -> Vec<(f64, f64, f64)> {
    let text = std::fs::read_to_string(path).unwrap();
    let mut lines = text.lines();
    let strip = match lines.next() {
        Some("r,re_psi,im_psi") => false,
        Some("r,im_r,re_psi,im_psi") => true,
        other => panic!("unexpected header {other:?}"),
    };
    lines
        .map(|l| {
            let v: Vec<f64> = l.split(',').map(|x| x.parse::<f64>().unwrap()).collect();
            if strip {
                let two_pi = 2.0 * std::f64::consts::PI;
                assert!((v[1].abs() - two_pi).abs() < 1e-15, "im_r = {}", v[1]);
                (v[0], v[2], v[3])
            } else {
                (v[0], v[1], v[2])
            }
        })
        .collect()
}

#[test]
fn build_writes_loadable_files() {
    // The issue's example: dP3 level 2 on −12:12:481 with the strip lines; three CSVs with the
    // header r,re_psi,im_psi (one numpy.loadtxt(..., delimiter=",", skiprows=1) each) and a JSON
    // sidecar. The poles of dP3 at ±2πi are located and written as nan, never sampled.
    let dir = temp_dir("build");
    let o = regwave(&[
        "build",
        "--family",
        "dP3",
        "--level",
        "2",
        "--grid",
        "-12:12:481",
        "--strip",
        "--out",
        dir.to_str().unwrap(),
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    let main = read_csv(&dir.join("psi.csv"));
    assert_eq!(main.len(), 481);
    let norm: f64 = main.iter().map(|(_, a, b)| a * a + b * b).sum::<f64>() * 0.05;
    assert!((norm - 1.0).abs() < NORM_ON_GRID, "norm on the grid {norm}");
    for f in ["psi_up.csv", "psi_down.csv"] {
        let rows = read_csv(&dir.join(f));
        assert_eq!(rows.len(), 481);
        let nans: Vec<f64> = rows.iter().filter(|r| r.1.is_nan()).map(|r| r.0).collect();
        assert_eq!(nans, vec![0.0], "{f}: the pole at r = 0 only");
    }
    let v: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(dir.join("psi.json")).unwrap()).unwrap();
    for key in [
        "inputs",
        "modulus",
        "lambda",
        "base_point",
        "precision_bits",
        "normalization",
        "checks",
        "tool_version",
        "elapsed_s",
    ] {
        assert!(v.get(key).is_some(), "missing {key}");
    }
    assert!(
        v["checks"]["eigen_equation_residual_max"].as_f64().unwrap() < double(DOUBLE_RESIDUAL_LOSS)
    );
    assert!(v["modulus"].as_str().unwrap().starts_with("534.3440388"));
    // Existing output without --force: refused, files untouched.
    let before = std::fs::read_to_string(dir.join("psi.json")).unwrap();
    rejects(
        &[
            "build",
            "--family",
            "dP3",
            "--level",
            "2",
            "--out",
            dir.to_str().unwrap(),
        ],
        "--force",
    );
    assert_eq!(
        before,
        std::fs::read_to_string(dir.join("psi.json")).unwrap()
    );
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn build_refuses_bad_input() {
    let dir = temp_dir("build-bad");
    let out = dir.to_str().unwrap();
    // Not an attractor modulus: ν and its distance to Z are reported.
    rejects(
        &["build", "--family", "F0", "--modulus", "20", "--out", out],
        "not an attractor modulus: nu =",
    );
    rejects(
        &[
            "build", "--family", "F0", "--level", "0", "--grid", "3:-3:10", "--out", out,
        ],
        "reversed",
    );
    rejects(
        &[
            "build", "--family", "F0", "--level", "0", "--grid", "1:2", "--out", out,
        ],
        "R0:R1:N",
    );
    rejects(
        &[
            "build", "--family", "F0", "--level", "0", "--grid", "0:1:1", "--out", out,
        ],
        "points",
    );
    rejects(
        &[
            "build",
            "--family",
            "F0",
            "--level",
            "0",
            "--out",
            "/proc/regwave-no",
        ],
        "cannot",
    );
    rejects(&["build", "--family", "F0", "--out", out], "--level");
    assert!(
        !dir.exists() || std::fs::read_dir(&dir).unwrap().next().is_none(),
        "nothing half-written"
    );
    // --allow-non-attractor builds anyway and records how far ν is from an integer.
    let o = regwave(&[
        "build",
        "--family",
        "F0",
        "--modulus",
        "20",
        "--allow-non-attractor",
        "--grid",
        "-2:2:21",
        "--out",
        out,
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    let v: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(dir.join("psi.json")).unwrap()).unwrap();
    // Numbers with more than double precision are decimal strings.
    let distance: f64 = v["nu_distance_to_integer"]
        .as_str()
        .unwrap()
        .parse()
        .unwrap();
    assert!(distance > NOT_AN_INTEGER);
    // A dangling symlink at an output name is an existing output: refused without --force,
    // and its target never created; with --force the link itself is replaced.
    let linked = dir.join("linked");
    std::fs::create_dir_all(&linked).unwrap();
    #[cfg(unix)]
    {
        std::os::unix::fs::symlink(dir.join("nowhere"), linked.join("psi.json")).unwrap();
        let quick = [
            "build",
            "--family",
            "F0",
            "--level",
            "0",
            "--grid=-2:2:21",
            "--out",
            linked.to_str().unwrap(),
        ];
        rejects(&quick, "psi.json exists; use --force");
        let o = regwave(&[&quick[..], &["--force"]].concat());
        assert!(o.status.success(), "{}", stderr(&o));
        assert!(std::fs::symlink_metadata(linked.join("psi.json"))
            .unwrap()
            .is_file());
        assert!(!dir.join("nowhere").exists());
    }
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn a_reader_that_stops_early_ends_the_output_quietly() {
    // `regwave families --json | head -c 1` and worse: the reading end is closed before the
    // program writes anything, so every write meets a closed pipe; no panic, exit 0.
    let mut child = std::process::Command::new(env!("CARGO_BIN_EXE_regwave"))
        .args(["families", "--json"])
        .stdout(std::process::Stdio::piped())
        .stderr(std::process::Stdio::piped())
        .spawn()
        .unwrap();
    drop(child.stdout.take());
    let o = child.wait_with_output().unwrap();
    assert!(o.status.success(), "{}", stderr(&o));
    assert!(!stderr(&o).contains("panicked"), "{}", stderr(&o));
}
