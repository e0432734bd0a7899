//! Hostile command lines: every one answered with a one-line reason on stderr and the exit code
//! of the contract in the README (2 for bad input, 1 for a failed computation), never a panic,
//! an abort, a hang or output on stdout. The classes: malformed and extreme vertices,
//! coefficients, family ids, levels, bases, digits, moduli, grids, output paths, unknown and
//! conflicting flags. Each case is cheap (refused before the expensive work), so the table runs
//! in seconds.
//!
//! The parsers' own properties (no panic on any text, exact round trips of valid input) are in
//! `tests/parsers.rs`.

use std::process::{Command, Output, Stdio};
use std::time::Instant;

/// The longest any refused command line may take: all are refused before the expensive work
/// (measured: well under a second each; generous for a loaded CI machine).
const REFUSAL_SECONDS: f64 = 20.0;

fn regwave(args: &[String]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_regwave"))
        .args(args)
        .stdin(Stdio::null())
        .output()
        .expect("run regwave")
}

/// One hostile command line: its arguments, the expected exit code and a piece of the reason
/// stderr must give.
struct Case {
    args: Vec<String>,
    code: i32,
    reason: &'static str,
}

fn case(args: &[&str], code: i32, reason: &'static str) -> Case {
    Case {
        args: args.iter().map(|s| s.to_string()).collect(),
        code,
        reason,
    }
}

/// A command with one polygon given as vertices.
fn vertices(text: &str, reason: &'static str) -> Vec<Case> {
    ["spectrum", "attractors"]
        .iter()
        .map(|cmd| Case {
            args: vec![
                cmd.to_string(),
                "--vertices".into(),
                text.into(),
                "--levels".into(),
                "0".into(),
            ],
            code: 2,
            reason,
        })
        .collect()
}

/// `attractors --vertices F0's square --coefficients text`.
fn coefficients(text: &str, reason: &'static str) -> Case {
    case(
        &[
            "attractors",
            "--vertices",
            "(1,0),(0,1),(-1,0),(0,-1)",
            "--coefficients",
            text,
            "--levels",
            "0",
        ],
        2,
        reason,
    )
}

/// `periods --family F --modulus text`.
fn modulus(family: &str, text: &str, reason: &'static str) -> Case {
    case(
        &["periods", "--family", family, "--modulus", text],
        2,
        reason,
    )
}

/// `build --family F0 --level 0 --grid=text` and `check` with the same grid.
fn grid(text: &str, reason: &'static str) -> Vec<Case> {
    let flag = format!("--grid={text}");
    vec![
        case(
            &[
                "build",
                "--family",
                "F0",
                "--level",
                "0",
                &flag,
                "--out",
                "/tmp/regwave-robustness-never",
            ],
            2,
            reason,
        ),
        case(
            &["check", "--family", "F0", "--level", "0", &flag],
            2,
            reason,
        ),
    ]
}

/// `attractors`, `spectrum` and `audit` with `--levels text`.
fn levels(text: &str, reason: &'static str) -> Vec<Case> {
    ["attractors", "spectrum", "audit"]
        .iter()
        .map(|cmd| {
            let mut c = case(&[cmd, "--family", "F0", "--levels", text], 2, reason);
            if *cmd == "audit" {
                c.args
                    .extend(["--out".into(), "/tmp/regwave-robustness-never".into()]);
            }
            c
        })
        .collect()
}

/// `--digits text` on every command that takes it.
fn digits(text: &str, reason: &'static str) -> Vec<Case> {
    vec![
        case(
            &[
                "attractors",
                "--family",
                "P2",
                "--levels",
                "0",
                "--digits",
                text,
            ],
            2,
            reason,
        ),
        case(
            &[
                "spectrum", "--family", "P2", "--levels", "0", "--digits", text,
            ],
            2,
            reason,
        ),
        case(
            &[
                "periods",
                "--family",
                "P2",
                "--modulus",
                "20",
                "--digits",
                text,
            ],
            2,
            reason,
        ),
        case(
            &["check", "--family", "P2", "--level", "0", "--digits", text],
            2,
            reason,
        ),
    ]
}

fn table() -> Vec<Case> {
    let mut t = Vec::new();
    // Vertices: malformed text.
    for (text, reason) in [
        ("", "no vertices given"),
        ("   ", "no vertices given"),
        ("(", "expected the first coordinate"),
        ("()", "expected the first coordinate"),
        ("(1)", "expected `,` after the first coordinate"),
        ("(1,0", "expected `)`"),
        ("(1,0,2)", "a vertex has two coordinates"),
        ("(a,b),(0,1),(-1,-1)", "is not an integer"),
        ("(1.5,0),(0,1),(-1,-1)", "is not an integer"),
        ("(1,0)(0,1),(-1,-1)", "expected `,` or the end of the text"),
        ("(1,0),,(0,1),(-1,-1)", "expected `(`"),
        ("(1,0),(0,1),(-1,-1),", "expected `(`"),
        (
            "(1,0),(0,1),(-1,-1)x",
            "expected `,` or the end of the text",
        ),
        (
            "(1 0,0),(0,1),(-1,-1)",
            "expected `,` after the first coordinate",
        ),
        (
            "(1=0),(0,1),(-1,-1)",
            "expected `,` after the first coordinate",
        ),
        ("(99999999999999999999,0),(0,1),(-1,-1)", "out of range"),
        ("(1_0,0),(0,1),(-1,-1)", "is not an integer"),
        ("1,0,0,1,-1,-1", "expected `(`"),
    ] {
        t.extend(vertices(text, reason));
    }
    // Vertices: well formed, but no strip reflexive polygon.
    for (text, reason) in [
        ("(1000001,0),(0,1),(-1,-1)", "above 1000000"),
        ("(1,0),(0,1)", "do not span a polygon"),
        ("(0,0),(1,0),(2,0)", "do not span a polygon"),
        ("(1,0),(1,0),(1,0)", "do not span a polygon"),
        ("(2,0),(0,2),(-2,-2)", "not reflexive"),
        ("(0,0),(1,0),(0,1)", "not reflexive"),
        ("(2,1),(1,2),(0,0)", "not the origin"),
        ("(1,0),(0,1),(-1,-1),(0,0)", "not convex"),
        (
            "(1000000,0),(0,1000000),(-1000000,-1000000)",
            "too many to list",
        ),
        ("(-1,2),(-1,-1),(2,-1)", "no strip form"),
        (
            "(1,0),(0,1),(-1,0),(0,-1),(1,1),(-1,-1),(1,-1),(-1,1),(2,0),(0,2)",
            "at most 9",
        ),
    ] {
        t.extend(vertices(text, reason));
    }
    // Thousands of points: refused at once, not after a quadratic membership check.
    let many: Vec<String> = (0..3000).map(|k| format!("({k},{})", k * k % 7)).collect();
    t.extend(vertices(&many.join(","), "at most 9"));
    // Coefficients.
    for (text, reason) in [
        ("", "the list is empty"),
        ("(1,0)", "expected `=` after the point"),
        ("(1,0)=", "expected the coefficient"),
        ("=1", "expected `(`"),
        ("(1,0)=x", "is not an integer"),
        ("(1,0)=1 0", "expected `,` or the end of the text"),
        ("(1,0)=1,", "expected `(`"),
        ("(1,0)=1_0", "is not an integer"),
        ("(1,0)==1", "expected the coefficient"),
        ("(1,0)=99999999999999999999", "out of range"),
        ("(1,0)=2", "not tempered"),
        ("(1,0)=-1", "not tempered"),
        ("(5,5)=1", "not a boundary lattice point"),
        ("(0,0)=1", "not a boundary lattice point"),
        ("(1,0)=1,(1,0)=1", "given twice"),
    ] {
        t.push(coefficients(text, reason));
    }
    // Families.
    for (id, reason) in [
        ("F9", "unknown family"),
        ("", "unknown family"),
        ("F0**", "unknown family"),
        ("P2*", "not applicable"),
    ] {
        t.push(case(
            &["attractors", "--family", id, "--levels", "0"],
            2,
            reason,
        ));
    }
    t.push(case(
        &[
            "attractors",
            "--family",
            "F0",
            "--vertices",
            "(1,0),(0,1),(-1,-1)",
        ],
        2,
        "cannot be used with",
    ));
    t.push(case(&["attractors", "--levels", "0"], 2, "--family"));
    // Levels.
    for (text, reason) in [
        ("", "cannot read the level range"),
        ("-1", "is not a level"),
        ("a", "is not a level"),
        ("5..2", "the range is reversed"),
        ("1..", "both ends are needed"),
        ("..3", "both ends are needed"),
        ("1.5", "is not a level"),
        ("0...3", "is not a level"),
        ("1 0", "is not a level"),
        ("0..10001", "levels above 10000"),
        ("18446744073709551616", "is not a level"),
        ("9223372036854775807", "levels above 10000"),
    ] {
        t.extend(levels(text, reason));
    }
    // Levels beyond the reach of the attractor solve, and a spectrum beyond memory.
    for text in ["1001", "0..1001", "9999..10000"] {
        t.push(case(
            &["attractors", "--family", "F0", "--levels", text],
            2,
            "beyond the levels regwave solves",
        ));
    }
    // Eigenfunctions: levels up to 20 (`eigenfunction::profile::MAX_LEVEL`).
    for text in ["21", "0..30", "9999..10000"] {
        t.push(case(
            &[
                "audit",
                "--family",
                "F0",
                "--levels",
                text,
                "--out",
                "/tmp/regwave-robustness-never",
            ],
            2,
            "beyond the levels whose eigenfunctions",
        ));
    }
    for level in ["21", "100", "1001", "18446744073709551615"] {
        for cmd in ["check", "build"] {
            t.push(case(
                &[
                    cmd,
                    "--family",
                    "P2",
                    "--level",
                    level,
                    "--out",
                    "/tmp/regwave-robustness-never",
                ][..if cmd == "build" { 7 } else { 5 }],
                2,
                "beyond the levels whose eigenfunctions",
            ));
        }
    }
    for args in [
        &["--levels", "0..10000"][..],
        &["--levels", "0", "--basis", "18446744073709551615"],
        &["--levels", "0", "--basis", "100000000"],
        &["--levels", "0", "--max-basis", "18446744073709551615"],
        &["--levels", "0..5000", "--max-basis", "20000"],
    ] {
        let mut a = vec!["spectrum", "--family", "F0"];
        a.extend_from_slice(args);
        t.push(case(&a, 2, "of memory"));
    }
    for (args, reason) in [
        (&["--basis", "0"][..], "too small"),
        (&["--basis", "5"], "too small"),
        (&["--basis", "-1"], "invalid value"),
        (&["--basis", "x"], "invalid value"),
        (&["--max-basis", "-3"], "invalid value"),
    ] {
        let mut a = vec!["spectrum", "--family", "F0", "--levels", "0"];
        a.extend_from_slice(args);
        t.push(case(&a, 2, reason));
    }
    // Digits.
    for (text, reason) in [
        ("0", "outside the supported range"),
        ("7", "outside the supported range"),
        ("1001", "outside the supported range"),
        ("4294967295", "outside the supported range"),
        ("-5", "invalid value"),
        ("x", "invalid value"),
        ("99999999999", "invalid value"),
    ] {
        t.extend(digits(text, reason));
    }
    // Moduli: strict syntax, domain, and the threshold compared exactly.
    for (family, text, reason) in [
        ("F0", "", "the text is empty"),
        ("F0", "abc", "not a decimal number"),
        ("F0", "1 7.8466", "inside a number"),
        ("F0", "17.8466e 1", "inside a number"),
        ("F0", "1_7.8466", "inside a number"),
        ("F0", "17,8466", "not a decimal number"),
        ("F0", "0x11", "not a decimal number"),
        ("F0", "inf", "not a finite number"),
        ("F0", "-Infinity", "not a finite number"),
        ("F0", "nan", "not a finite number"),
        ("F0", "+", "not a decimal number"),
        ("F0", ".", "not a decimal number"),
        ("F0", "1e", "the exponent is not a whole number"),
        ("F0", "1e1.5", "the exponent is not a whole number"),
        ("F0", "1..2", "not a decimal number"),
        ("F0", "1e99999", "the exponent is beyond"),
        ("F0", "1e-99999", "the exponent is beyond"),
        ("F0", "1e101", "the largest modulus handled"),
        ("F0", "1e300", "the largest modulus handled"),
        ("F0", "-5", "spectral threshold"),
        ("F0", "0", "spectral threshold"),
        ("F0", "4", "spectral threshold"),
        ("F0", "3.9999999999999999999999", "spectral threshold"),
        ("P2", "3", "spectral threshold"),
        ("Q6", "6", "spectral threshold"),
        ("T6", "6.0", "spectral threshold"),
        ("F0*", "12", "spectral threshold"),
        ("dP3", "6e0", "spectral threshold"),
    ] {
        t.push(modulus(family, text, reason));
    }
    for text in ["1 7.8466", "4", "1e101"] {
        t.push(case(
            &["check", "--family", "F0", "--modulus", text],
            2,
            "modulus",
        ));
    }
    t.push(case(&["periods", "--family", "F0"], 2, "--modulus"));
    // Grids.
    for (text, reason) in [
        ("", "use R0:R1:N"),
        ("1:2", "use R0:R1:N"),
        ("0:1:3:4", "use R0:R1:N"),
        ("a:1:3", "not a decimal number"),
        ("2:1:3", "empty or reversed"),
        ("1:1:3", "empty or reversed"),
        ("0:1:1", "between 2 and"),
        ("0:1:0", "between 2 and"),
        ("0:1:-3", "is not a point count"),
        ("0:1:x", "is not a point count"),
        ("0:1:1000001", "between 2 and"),
        ("0:1:99999999999999999999", "is not a point count"),
        ("-1e308:1e308:3", "an end beyond"),
        ("1e300:1e301:3", "an end beyond"),
        ("-1e10:1e10:3", "an end beyond"),
        ("inf:1:3", "not a finite number"),
        ("nan:0:3", "not a finite number"),
        ("1 0:20:3", "inside a number"),
        ("0:1_0:3", "inside a number"),
        ("1:1.0000000000000001:3", "too fine"),
        ("0:1e99999:3", "the exponent is beyond"),
        // Beyond the reach of the profile (|r| <= 230, `eigenfunction::profile::reach`): refused
        // after the modulus is solved and before any sampling (measured 0.07 s each for F0).
        ("-400:400:9", "beyond the reach |r| <= 230"),
        ("230.001:260:2", "beyond the reach |r| <= 230"),
        ("-1e6:-300:3", "beyond the reach |r| <= 230"),
    ] {
        t.extend(grid(text, reason));
    }
    // The reach at a merging end (T6's right end) and above double precision (measured 0.2 s).
    t.push(case(
        &[
            "build",
            "--family",
            "T6",
            "--level",
            "0",
            "--digits",
            "40",
            "--grid=0:300:3",
            "--out",
            "/tmp/regwave-robustness-never",
        ],
        2,
        "beyond the reach",
    ));
    // Output paths that cannot be written.
    for out in ["/proc/regwave-cannot", "/dev/null/regwave"] {
        t.push(case(
            &["build", "--family", "F0", "--level", "0", "--out", out],
            2,
            "cannot write",
        ));
        t.push(case(
            &["audit", "--family", "F0", "--levels", "0", "--out", out],
            2,
            "cannot write",
        ));
    }
    // Unknown, missing and conflicting flags.
    for (args, reason) in [
        (&[][..], "Usage"),
        (&["nosuch"], "unrecognized subcommand"),
        (&["families", "--frobnicate"], "unexpected argument"),
        (
            &["spectrum", "--family", "F0", "--level", "0"],
            "unexpected argument",
        ),
        (
            &[
                "build",
                "--family",
                "F0",
                "--level",
                "0",
                "--modulus",
                "17.9",
            ],
            "cannot be used with",
        ),
        (&["build", "--family", "F0"], "--level"),
        (&["check", "--family", "F0"], "--level"),
        (
            &[
                "attractors",
                "--family",
                "F0",
                "--digits",
                "20",
                "--digits",
                "30",
            ],
            "cannot be used multiple times",
        ),
        (&["tour", "--frobnicate"], "unexpected argument"),
        (
            &["periods", "--family", "F0", "--modulus"],
            "a value is required",
        ),
    ] {
        t.push(case(args, 2, reason));
    }
    t
}

#[test]
fn hostile_command_lines_get_a_reason_and_their_exit_code() {
    let cases = table();
    assert!(cases.len() >= 150, "only {} cases", cases.len());
    eprintln!("{} hostile command lines", cases.len());
    let mut failures = Vec::new();
    for c in &cases {
        let start = Instant::now();
        let o = regwave(&c.args);
        let seconds = start.elapsed().as_secs_f64();
        let err = String::from_utf8_lossy(&o.stderr);
        let shown: Vec<&str> = c.args.iter().map(|a| &a[..a.len().min(60)]).collect();
        if o.status.code() != Some(c.code) {
            failures.push(format!(
                "{shown:?}: exit {:?}, expected {}: {err}",
                o.status.code(),
                c.code
            ));
        } else if !err.contains(c.reason) {
            failures.push(format!("{shown:?}: stderr lacks {:?}: {err}", c.reason));
        } else if err.contains("panicked") || !o.stdout.is_empty() {
            failures.push(format!("{shown:?}: a panic or output on stdout: {err}"));
        } else if seconds > REFUSAL_SECONDS {
            failures.push(format!("{shown:?}: took {seconds:.1} s to refuse"));
        }
    }
    assert!(
        failures.is_empty(),
        "{} of {} cases failed:\n{}",
        failures.len(),
        cases.len(),
        failures.join("\n")
    );
}

/// The negative companion: the harness itself notices a wrong exit code, a missing reason and
/// output on stdout (a valid command line does not pass as refused).
#[test]
fn the_table_harness_notices_an_accepted_command() {
    let o = regwave(&["families".to_string()]);
    assert_eq!(o.status.code(), Some(0));
    assert!(!o.stdout.is_empty());
    let o = regwave(&[
        "periods".into(),
        "--family".into(),
        "F0".into(),
        "--modulus".into(),
        "4.000001".into(),
    ]);
    // Just above the threshold is inside the domain (not refused by the threshold test).
    assert_eq!(
        o.status.code(),
        Some(0),
        "{}",
        String::from_utf8_lossy(&o.stderr)
    );
}
