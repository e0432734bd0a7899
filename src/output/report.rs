//! JSON documents and human-readable tables for the commands. Pure formatting: no I/O.
//!
//! # Conventions
//! Keys are snake_case and stable. Every document carries `tool_version`, `inputs`,
//! `precision_bits` (where a computation ran) and `elapsed_s`. High-precision numbers are
//! decimal strings holding only the digits the computation supports.

use crate::curve::laurent::Laurent;
use crate::lattice::catalogue::Family;
use crate::operator::spectrum::Spectrum;
use crate::TOOL_VERSION;
use rug::Float;
use serde_json::{json, Value};

/// Significant digits a value supports given its absolute error estimate, at most `cap`.
pub fn supported_digits(value: &Float, error: f64, cap: u32) -> u32 {
    let v = value.to_f64().abs();
    if error <= 0.0 || v == 0.0 {
        return cap;
    }
    let d = (v / error).log10().floor();
    (d.max(1.0) as u32).min(cap)
}

/// `value` as a decimal string with `digits` significant digits.
pub fn decimal(value: &Float, digits: u32) -> String {
    let digits = digits.max(1) as usize;
    let s = value.to_string_radix(10, Some(digits));
    // rug writes e.g. "1.7846643118044799e1": render plainly when the exponent is small.
    plain_decimal(&s)
}

fn plain_decimal(s: &str) -> String {
    let Some((mantissa, exp)) = s.split_once('e') else {
        return s.to_string();
    };
    let Ok(exp) = exp.parse::<i64>() else {
        return s.to_string();
    };
    if !(-6..=30).contains(&exp) {
        return s.to_string();
    }
    let (sign, m) = mantissa
        .strip_prefix('-')
        .map(|m| ("-", m))
        .unwrap_or(("", mantissa));
    let digits: String = m.chars().filter(|c| *c != '.').collect();
    let point = m.find('.').unwrap_or(m.len()) as i64 + exp;
    let out = if point <= 0 {
        format!("0.{}{}", "0".repeat((-point) as usize), digits)
    } else if point as usize >= digits.len() {
        format!("{}{}", digits, "0".repeat(point as usize - digits.len()))
    } else {
        format!(
            "{}.{}",
            &digits[..point as usize],
            &digits[point as usize..]
        )
    };
    format!("{sign}{out}")
}

/// A short scientific rendering of an error estimate.
pub fn sci(x: f64) -> String {
    format!("{x:.1e}")
}

/// One catalogue entry as JSON.
pub fn family_json(f: &Family) -> Value {
    let mut v = json!({
        "id": f.id,
        "description": f.description,
        "vertices": f.vertices,
        "boundary_points": f.boundary_points,
        "dual": f.dual,
        "applicable": f.applicable,
    });
    if f.applicable {
        let laurent = Laurent::tempered(&f.polygon());
        let parts = laurent
            .strip_parts()
            .expect("applicable families are in strip form");
        let (_, threshold) = laurent.classical_minimum();
        v["phi"] = json!(laurent.to_string());
        v["a"] = json!(parts.a.render("x"));
        v["b"] = json!(parts.b.render("x"));
        v["c"] = json!(parts.c.render("x"));
        v["threshold"] = json!(threshold);
        v["series_radius"] = json!(laurent.coefficient_sum());
    } else {
        v["phi"] = Value::Null;
        v["reason"] = json!(f.reason);
    }
    v
}

/// `regwave families --json`.
pub fn families_json(families: &[Family]) -> Value {
    json!({
        "families": families.iter().map(family_json).collect::<Vec<_>>(),
        "tool_version": TOOL_VERSION,
    })
}

/// `regwave families` as a table.
pub fn families_table(families: &[Family]) -> String {
    let mut out = String::new();
    out.push_str(&format!(
        "{:<6} {:>3}  {:<42} {:>9}  {}\n",
        "id", "b", "vertices (strip form)", "threshold", "phi"
    ));
    for f in families {
        let verts = f
            .vertices
            .iter()
            .map(|p| format!("({},{})", p[0], p[1]))
            .collect::<Vec<_>>()
            .join(",");
        if f.applicable {
            let laurent = Laurent::tempered(&f.polygon());
            let (_, t) = laurent.classical_minimum();
            out.push_str(&format!(
                "{:<6} {:>3}  {:<42} {:>9.5}  {}\n",
                f.id, f.boundary_points, verts, t, laurent
            ));
        } else {
            out.push_str(&format!(
                "{:<6} {:>3}  {:<42} {:>9}  not applicable: {}\n",
                f.id,
                f.boundary_points,
                verts,
                "-",
                f.reason.unwrap_or("")
            ));
        }
    }
    let n = families.iter().filter(|f| f.applicable).count();
    out.push_str(&format!(
        "\n{} families in strip form, {} not applicable.\n",
        n,
        families.len() - n
    ));
    out
}

/// Digits shown for a level: what the error estimate supports, at most the digits requested.
fn level_digits(value: &Float, error: f64, requested: u32) -> u32 {
    supported_digits(value, error, requested)
}

/// `regwave spectrum --json`.
pub fn spectrum_json(
    family: &str,
    spectrum: &Spectrum,
    digits: u32,
    inputs: Value,
    elapsed_s: f64,
) -> Value {
    let eigenvalues: Vec<Value> = spectrum
        .levels
        .iter()
        .map(|l| {
            let d = level_digits(&l.value, l.error_estimate, digits);
            let log = Float::with_val(spectrum.working_bits, l.value.ln_ref());
            json!({
                "level": l.level,
                "value": decimal(&l.value, d),
                "log_value": decimal(&log, d),
                "error_estimate": sci(l.error_estimate),
                "digits": d,
            })
        })
        .collect();
    json!({
        "family": family,
        "eigenvalues": eigenvalues,
        "method": "harmonic-oscillator Rayleigh-Ritz",
        "bases": spectrum.bases,
        "frame": {
            "centre": spectrum.frame.centre,
            "symplectic": spectrum.frame.symplectic,
            "squeeze": spectrum.frame.squeeze,
            "threshold": spectrum.frame.threshold,
        },
        "real_matrix": spectrum.real_matrix,
        "precision_bits": spectrum.working_bits,
        "tool_version": TOOL_VERSION,
        "inputs": inputs,
        "elapsed_s": elapsed_s,
        "note": "numerical evidence: error estimates are differences between basis sizes, not bounds",
    })
}

/// `regwave spectrum` as a table.
pub fn spectrum_table(family: &str, spectrum: &Spectrum, digits: u32, elapsed_s: f64) -> String {
    let mut out = format!(
        "family {family}: eigenvalues a_n of the quantum curve at hbar = 2 pi\n\
         harmonic-oscillator Rayleigh-Ritz, bases {:?}, {} bits, {:.2} s\n\n",
        spectrum.bases, spectrum.working_bits, elapsed_s
    );
    out.push_str(&format!(
        "{:>5}  {:<40} {:<28} {:>9}\n",
        "level", "a_n", "log a_n", "error"
    ));
    for l in &spectrum.levels {
        let d = level_digits(&l.value, l.error_estimate, digits);
        let log = Float::with_val(spectrum.working_bits, l.value.ln_ref());
        out.push_str(&format!(
            "{:>5}  {:<40} {:<28} {:>9}\n",
            l.level,
            decimal(&l.value, d),
            decimal(&log, d.min(26)),
            sci(l.error_estimate)
        ));
    }
    let short: Vec<String> = spectrum
        .levels
        .iter()
        .filter(|l| level_digits(&l.value, l.error_estimate, digits) < digits)
        .map(|l| l.level.to_string())
        .collect();
    if !short.is_empty() {
        out.push_str(&format!(
            "\nlevels {} did not reach {digits} digits within the largest basis; raise --max-basis for more.\n",
            short.join(", ")
        ));
    }
    out.push_str("\nErrors are estimates from the change between the last two bases (numerical evidence, not bounds).\n");
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn decimals_are_plain_and_honest() {
        let x = Float::with_val(200, 17.846643118044799282_f64);
        assert_eq!(decimal(&x, 5), "17.847");
        let y = Float::with_val(200, 0.00012345_f64);
        assert_eq!(decimal(&y, 3), "0.000123");
        assert_eq!(supported_digits(&x, 1e-10, 30), 11);
        assert_eq!(supported_digits(&x, 0.0, 30), 30);
    }
}

/// A complex number as `{"re", "im"}` decimal strings with `digits` significant digits.
pub fn complex_json(z: &rug::Complex, digits: u32) -> Value {
    json!({ "re": decimal(z.real(), digits), "im": decimal(z.imag(), digits) })
}

/// `regwave periods --json`.
pub fn periods_json(
    family: &str,
    c: &crate::curve::periods::Comparison,
    digits: u32,
    bits: u32,
    inputs: Value,
    elapsed_s: f64,
) -> Value {
    let p = &c.path;
    let cj = |z: &rug::Complex| complex_json(z, digits);
    let series = c.series.as_ref().map(|s| json!({ "omega_alpha": cj(&s.omega), "r_alpha": cj(&s.regulator), "error_estimate": sci(s.error) }));
    json!({
        "family": family,
        "omega_alpha": cj(&p.alpha.omega),
        "omega_beta": cj(&p.beta.omega),
        "r_alpha": cj(&p.alpha.regulator),
        "r_beta": cj(&p.beta.regulator),
        "tau": cj(&p.tau),
        "nu": cj(&p.nu),
        "nu_derivative": cj(&p.nu_da),
        "nu_error_estimate": sci(p.nu_error),
        "agreement_digits": c.agreement_digits.map(|d| (d * 10.0).floor() / 10.0),
        "series": series,
        "series_note": c.series_note,
        "path": {
            "alpha_error_estimate": sci(p.alpha.error),
            "alpha_steps": p.alpha.steps,
            "beta_steps": p.beta.steps,
            "beta_error_estimate": sci(p.beta.error),
            "beta_branch_points": p.beta_loop.branch_points,
            "beta_encloses_puncture": p.beta_loop.encloses_puncture,
        },
        "precision_bits": bits,
        "tool_version": TOOL_VERSION,
        "inputs": inputs,
        "elapsed_s": elapsed_s,
        "note": "numerical evidence: path integrals with a-priori error estimates, series with rigorous tail bounds",
    })
}

/// `regwave periods` as a table.
pub fn periods_table(
    family: &str,
    a: &str,
    c: &crate::curve::periods::Comparison,
    digits: u32,
    bits: u32,
    elapsed_s: f64,
) -> String {
    let p = &c.path;
    let z = |z: &rug::Complex| {
        format!(
            "{} {}{} i",
            decimal(z.real(), digits),
            if z.imag().is_sign_negative() {
                "-"
            } else {
                "+"
            },
            decimal(&Float::with_val(z.prec().0, z.imag().abs_ref()), digits)
        )
    };
    let mut out = format!("family {family}, modulus a = {a}: periods of phi + a = 0 ({bits} bits, {elapsed_s:.2} s)\n\n");
    let rows = [
        ("Omega_alpha (path)", z(&p.alpha.omega)),
        ("R_alpha (path)", z(&p.alpha.regulator)),
        ("Omega_beta (path)", z(&p.beta.omega)),
        ("R_beta (path)", z(&p.beta.regulator)),
        ("tau", z(&p.tau)),
        ("nu", z(&p.nu)),
    ];
    for (k, v) in rows {
        out.push_str(&format!("  {k:<20} {v}\n"));
    }
    match (&c.series, c.agreement_digits) {
        (Some(s), Some(d)) => {
            out.push_str(&format!(
                "  {:<20} {}\n  {:<20} {}\n",
                "Omega_alpha (series)",
                z(&s.omega),
                "R_alpha (series)",
                z(&s.regulator)
            ));
            out.push_str(&format!(
                "\nseries and path agree to {:.1} digits for Omega_alpha and R_alpha.\n",
                d
            ));
        }
        _ => out.push_str(&format!(
            "\nno series: {}\n",
            c.series_note.clone().unwrap_or_default()
        )),
    }
    out.push_str(&format!(
        "beta: loop around the branch points {:.4}{:+.4}i and {:.4}{:+.4}i{}\n",
        p.beta_loop.branch_points[0][0],
        p.beta_loop.branch_points[0][1],
        p.beta_loop.branch_points[1][0],
        p.beta_loop.branch_points[1][1],
        if p.beta_loop.encloses_puncture {
            " (enclosing the puncture z = 0)"
        } else {
            ""
        }
    ));
    out
}

/// `regwave attractors --json`.
pub fn attractors_json(
    family: &str,
    list: &[crate::curve::attractor::Attractor],
    digits: u32,
    inputs: Value,
    elapsed_s: f64,
) -> Value {
    let items: Vec<Value> = list
        .iter()
        .map(|a| {
            json!({
                "level": a.level,
                "nu": a.nu,
                "modulus": decimal(&a.modulus, a.digits.max(1)),
                "log_modulus": decimal(&a.log_modulus, a.digits.max(1)),
                "digits": a.digits,
                "residual": sci(a.residual),
                "imaginary_part_of_nu": sci(a.imaginary_part),
            })
        })
        .collect();
    json!({
        "family": family,
        "attractors": items,
        "digits": digits,
        "level_rule": "nu(a_n) = n + 1",
        "precision_bits": list.first().map(|a| a.precision_bits),
        "tool_version": TOOL_VERSION,
        "inputs": inputs,
        "elapsed_s": elapsed_s,
        "note": "digits are those confirmed by a second solve at higher working precision (numerical evidence, not proofs)",
    })
}

/// `regwave attractors` as a table.
pub fn attractors_table(
    family: &str,
    list: &[crate::curve::attractor::Attractor],
    digits: u32,
    elapsed_s: f64,
) -> String {
    let mut out = format!("family {family}: attractor moduli (nu(a) integer, level n <-> nu = n + 1), {digits} digits, {elapsed_s:.2} s\n\n");
    out.push_str(&format!(
        "{:>5} {:>4}  {:<width$}  {}\n",
        "level",
        "nu",
        "a_n",
        "log a_n",
        width = (digits as usize + 8).max(12)
    ));
    for a in list {
        out.push_str(&format!(
            "{:>5} {:>4}  {:<width$}  {}\n",
            a.level,
            a.nu,
            decimal(&a.modulus, a.digits.max(1)),
            decimal(&a.log_modulus, a.digits.max(1)),
            width = (digits as usize + 8).max(12)
        ));
    }
    let short: Vec<String> = list
        .iter()
        .filter(|a| a.digits < digits)
        .map(|a| format!("{} ({} digits)", a.level, a.digits))
        .collect();
    if !short.is_empty() {
        out.push_str(&format!(
            "\nconfirmed to fewer digits than requested: {}\n",
            short.join(", ")
        ));
    }
    out.push_str("\nDigits shown are those confirmed by a second solve at higher precision (numerical evidence, not proofs).\n");
    out
}

/// The JSON record of one audited level (the per-level keys of `audit` and `check`).
pub fn level_json(l: &crate::checks::level::LevelAudit) -> Value {
    let p = &l.profile;
    let spectrum_digits = supported_digits(&l.spectrum_value, l.spectrum_error, 30);
    json!({
        "level": l.level,
        "nu": l.nu,
        "modulus": decimal(&l.profile.modulus, l.profile.modulus_digits.max(1)),
        "modulus_digits": l.profile.modulus_digits,
        "spectrum_value": decimal(&l.spectrum_value, spectrum_digits),
        "spectrum_error_estimate": sci(l.spectrum_error),
        "agreement_digits": round1(l.agreement_digits),
        "agreement_cap_digits": round1(l.agreement_cap),
        "residual_max": p.residual.as_ref().map(|r| r.max),
        "residual_rms": p.residual.as_ref().map(|r| r.rms),
        "residual_points_with_pole_limits": p.residual.as_ref().map(|r| r.pole_limits),
        "norm": l.norm,
        "norm_on_grid": l.norm_on_grid,
        "norm_tail_fraction": p.normalization.tail,
        "zeros_inside": l.zeros.count,
        "zeros": l.zeros,
        "tail_zeros": l.tail_zeros,
        "decay_rate": {"left": p.normalization.decay[0], "right": p.normalization.decay[1]},
        "eigenvector_difference": l.eigenvector_difference,
        "route_dependence": l.route_dependence,
        "cauchy_defect": l.cauchy_defect,
        "phase_rule_k": p.rule,
        "phase_rule_max_imaginary_part": p.reality_defect,
        "lambda": {"re": p.lambda.re, "im": p.lambda.im},
        "precision_bits": p.precision_bits,
        "cancellation_digits_lost_on_r": p.cancellation_digits,
    })
}

fn round1(x: f64) -> f64 {
    (x * 10.0).round() / 10.0
}

/// `regwave audit --json`.
pub fn audit_json(
    family: &str,
    a: &crate::checks::audit::Audit,
    inputs: Value,
    elapsed_s: f64,
) -> Value {
    json!({
        "family": family,
        "levels": a.levels.iter().map(level_json).collect::<Vec<_>>(),
        "orthogonality": a.orthogonality,
        "orthogonality_max": a.orthogonality_max,
        "normalization_max_deviation": a.normalization_max_deviation,
        "unmatched": a.unmatched,
        "all_matched": a.unmatched.is_empty(),
        "negative_control_defect": a.negative_control.defect(),
        "negative_control": a.negative_control,
        "window": a.window,
        "eigenvalues_in_window": a.eigenvalues_in_window,
        "nu_scan": {
            "points": a.scan.log_a.len(),
            "increasing": a.scan.increasing,
            "skipped_below": a.scan.skipped,
            "start": {"modulus": a.scan.log_a[0].exp(), "nu": a.scan.nu[0]},
            "crossings": a.scan.crossings.iter().map(|c| json!({"log_a": c.0, "nu": c.1})).collect::<Vec<_>>(),
        },
        "period_agreement_digits": a.period_agreement_digits,
        "precision_bits": a.levels.iter().map(|l| l.profile.precision_bits).max(),
        "diagnostic_precision_bits": a.diagnostic_bits,
        "spectrum": {"bases": a.spectrum_bases, "precision_bits": a.spectrum_bits},
        "tool_version": TOOL_VERSION,
        "inputs": inputs,
        "elapsed_s": elapsed_s,
        "note": "numerical evidence, not proofs",
    })
}

/// One row of the per-level table (Markdown).
fn level_row(l: &crate::checks::level::LevelAudit) -> String {
    let p = &l.profile;
    let spectrum_digits = supported_digits(&l.spectrum_value, l.spectrum_error, 30);
    let residual = p
        .residual
        .as_ref()
        .map(|r| sci(r.max))
        .unwrap_or_else(|| "–".into());
    format!(
        "| {} | {} | {} | {} | {:.1} | {} | {} | {} | {:.3} / {:.3} | {} | {} |\n",
        l.level,
        l.nu,
        decimal(&l.profile.modulus, l.profile.modulus_digits.max(1)),
        decimal(&l.spectrum_value, spectrum_digits),
        l.agreement_digits,
        residual,
        sci(l.norm - 1.0),
        l.zeros.count,
        p.normalization.decay[0],
        p.normalization.decay[1],
        sci(l.eigenvector_difference),
        sci(l.route_dependence.max(l.cauchy_defect)),
    )
}

/// One end's tail zeros as "count, measured spacing constant / predicted".
fn tail_text(t: &crate::checks::zeros::TailZeros) -> String {
    let measured = t
        .spacing_constant
        .map(|c| format!("{c:.2}"))
        .unwrap_or_else(|| "–".into());
    let predicted = t
        .predicted
        .map(|c| format!("{c:.2}"))
        .unwrap_or_else(|| "none (roots meet at this end)".into());
    format!(
        "{} zeros, s·|r|/π² = {measured} (predicted {predicted})",
        t.count
    )
}

/// The report line on the zeros beyond the turning points.
fn tail_line(levels: &[crate::checks::level::LevelAudit]) -> String {
    let mut out = String::from(
        "- Beyond the outermost turning points ψ keeps oscillating while it decays, with zeros spaced \
         s ≈ 4π²/(Δm |r|) (Δm the gap of the root exponents at that end: 2 for F0, i.e. 2π²/|r|); on the grid, r → −∞ / r → +∞:",
    );
    for l in levels {
        out.push_str(&format!(
            " n = {}: {}; {}.",
            l.level,
            tail_text(&l.tail_zeros[0]),
            tail_text(&l.tail_zeros[1])
        ));
    }
    out.push('\n');
    out
}

/// What the columns of the per-level table mean (Markdown, once per report).
pub const COLUMNS_NOTE: &str = "Columns: residual = max |A ψ(r−2πi) + C ψ(r+2πi) − (B+a) ψ(r)| / max|ψ| on the grid, the shifted values \
integrated along their own routes; ‖ψ‖² − 1 = the norm by a second, independent quadrature; zeros between the outermost real parts of \
the branch points (sign changes of the real function of the reality rule, phase slips without one); decay = fitted rates κ of \
|ψ| ~ e^{−κ|r|}; ψ vs oscillator = max difference from the harmonic-oscillator eigenfunction relative to max|ψ|; \
single-valuedness = the larger of route dependence and Cauchy defect (0 up to rounding at an attractor modulus).\n\n";

/// The per-level table header (Markdown).
pub const LEVEL_TABLE_HEADER: &str = "| n | ν | a_n (attractor) | a_n (spectrum) | agree (digits) | residual | ‖ψ‖² − 1 | zeros | decay −∞ / +∞ | ψ vs oscillator | single-valuedness |\n|---:|---:|---|---|---:|---:|---:|---:|---|---:|---:|\n";

/// The per-level table of an audit or check (Markdown).
pub fn level_table(levels: &[crate::checks::level::LevelAudit]) -> String {
    let mut out = String::from(LEVEL_TABLE_HEADER);
    for l in levels {
        out.push_str(&level_row(l));
    }
    out
}

/// The audit of one family as Markdown (a section of a report; figures are linked by the caller).
pub fn audit_markdown(
    family: &str,
    a: &crate::checks::audit::Audit,
    digits: u32,
    elapsed_s: f64,
) -> String {
    let mut out = format!("## {family}\n\n");
    let bits = a
        .levels
        .iter()
        .map(|l| l.profile.precision_bits)
        .max()
        .unwrap_or(53);
    out.push_str(&format!(
        "Requested {digits} digits; eigenfunctions at up to {bits} bits (≈ {} digits), diagnostics at {} bits; \
         independent spectrum at bases {:?} ({} bits). Window of moduli ({:.6}, {:.6}]. {:.1} s.\n\n",
        crate::precision::digits_for_bits(bits),
        a.diagnostic_bits,
        a.spectrum_bases,
        a.spectrum_bits,
        a.window[0],
        a.window[1],
        elapsed_s
    ));
    out.push_str(&level_table(&a.levels));
    out.push_str(&format!(
        "\n- Matching both ways: {} attractor moduli and {} eigenvalues in the window; {}.\n",
        a.scan.crossings.len(),
        a.eigenvalues_in_window.len(),
        if a.unmatched.is_empty() {
            "every attractor modulus matches an eigenvalue and every eigenvalue an attractor modulus".to_string()
        } else {
            format!("**{} unmatched** (listed below)", a.unmatched.len())
        }
    ));
    out.push_str(&tail_line(&a.levels));
    out.push_str(&format!(
        "- ν(a) increases on all {} scan points: {}.{}\n",
        a.scan.log_a.len(),
        if a.scan.increasing { "yes" } else { "**no**" },
        if a.scan.skipped > 0 {
            format!(
                " The scan starts at a = {:.6} (ν = {:.4}): below it the β cycle of the period rule is not defined ({} points skipped).",
                a.scan.log_a[0].exp(),
                a.scan.nu[0],
                a.scan.skipped
            )
        } else {
            String::new()
        }
    ));
    out.push_str(&format!(
        "- Orthogonality: max |⟨ψ_m, ψ_n⟩| (m ≠ n) = {}; max |‖ψ_n‖² − 1| = {}.\n",
        sci(a.orthogonality_max),
        sci(a.normalization_max_deviation)
    ));
    out.push_str(&format!(
        "- Negative control: at a₀·(1 + {:.0e}) the route dependence is {} and the Cauchy defect {} (at the attractor modulus: {} and {}).\n",
        a.negative_control.perturbation,
        sci(a.negative_control.route_dependence),
        sci(a.negative_control.cauchy_defect),
        sci(a.negative_control.route_dependence_at_attractor),
        sci(a.negative_control.cauchy_defect_at_attractor),
    ));
    out.push_str(&match a.period_agreement_digits {
        Some(d) => format!("- Ω_α and R_α by series and by path agree to {d:.1} digits at the largest audited modulus.\n"),
        None => "- Ω_α, R_α: the largest audited modulus is inside the series radius; path values only.\n".into(),
    });
    for u in &a.unmatched {
        out.push_str(&format!(
            "- **unmatched {}**: {:.12} (label {}), nearest {:.12}, relative gap {} — {}\n",
            u.kind,
            u.value,
            u.label,
            u.nearest,
            sci(u.relative_gap),
            u.note
        ));
    }
    out.push('\n');
    out
}

/// `regwave check --json`: the per-level keys of the audit plus the one-function checks.
pub fn check_json(
    family: &str,
    c: &crate::checks::level::Check,
    inputs: Value,
    elapsed_s: f64,
) -> Value {
    json!({
        "family": family,
        "levels": [level_json(&c.level)],
        "negative_control_defect": c.negative_control.defect(),
        "negative_control": c.negative_control,
        "nu_distance_to_integer": c.level.profile.nu_distance,
        "period_agreement_digits": c.period_agreement_digits,
        "precision_bits": c.level.profile.precision_bits,
        "spectrum": {"bases": c.spectrum_bases, "precision_bits": c.spectrum_bits},
        "tool_version": TOOL_VERSION,
        "inputs": inputs,
        "elapsed_s": elapsed_s,
        "note": "numerical evidence, not proofs",
    })
}

/// `regwave check` as text.
pub fn check_text(family: &str, c: &crate::checks::level::Check, elapsed_s: f64) -> String {
    let l = &c.level;
    let p = &l.profile;
    let mut out = format!(
        "family {family}, level {}: checks of the eigenfunction at a = {} ({} bits, {:.2} s)\n\n",
        l.level,
        decimal(&l.profile.modulus, l.profile.modulus_digits.max(1)),
        p.precision_bits,
        elapsed_s
    );
    out.push_str(&format!(
        "  nu at the modulus                      {:.15} (distance to an integer {})\n",
        p.nu,
        sci(p.nu_distance)
    ));
    out.push_str(&format!(
        "  independent eigenvalue                 {} (error estimate {}): {:.1} digits agree (comparison supports {:.1})\n",
        decimal(&l.spectrum_value, supported_digits(&l.spectrum_value, l.spectrum_error, 30)),
        sci(l.spectrum_error),
        l.agreement_digits,
        l.agreement_cap
    ));
    if let Some(r) = &p.residual {
        out.push_str(&format!(
            "  eigen-equation residual (max / rms)    {} / {} on {} points ({} pole products as limits)\n",
            sci(r.max),
            sci(r.rms),
            p.grid.len(),
            r.pole_limits
        ));
    }
    out.push_str(&format!(
        "  L2 norm (independent quadrature)       {:.15} (tail {}; inside the grid {:.12})\n",
        l.norm,
        sci(p.normalization.tail),
        l.norm_on_grid
    ));
    out.push_str(&format!(
        "  decay rates (left / right)             {:.4} / {:.4}\n",
        p.normalization.decay[0], p.normalization.decay[1]
    ));
    out.push_str(&format!(
        "  zeros inside the turning points        {} ({:?}, window [{:.3}, {:.3}])\n",
        l.zeros.count, l.zeros.method, l.zeros.window[0], l.zeros.window[1]
    ));
    out.push_str(&format!(
        "  zeros beyond (left; right)             {}; {}\n",
        tail_text(&l.tail_zeros[0]),
        tail_text(&l.tail_zeros[1])
    ));
    out.push_str(&format!(
        "  difference from the oscillator ψ       {}\n",
        sci(l.eigenvector_difference)
    ));
    out.push_str(&format!(
        "  route dependence / Cauchy defect       {} / {}\n",
        sci(l.route_dependence),
        sci(l.cauchy_defect)
    ));
    out.push_str(&format!(
        "  negative control at a·(1 + {:.0e})      {} / {}\n",
        c.negative_control.perturbation,
        sci(c.negative_control.route_dependence),
        sci(c.negative_control.cauchy_defect)
    ));
    out.push_str(&match c.period_agreement_digits {
        Some(d) => format!("  Omega_alpha, R_alpha series vs path    {d:.1} digits\n"),
        None => {
            "  Omega_alpha, R_alpha series vs path    (modulus inside the series radius)\n".into()
        }
    });
    match p.rule {
        Some(k) => out.push_str(&format!(
            "  reality rule k = {k}: max imaginary part {}\n",
            sci(p.reality_defect.unwrap_or(f64::NAN))
        )),
        None => out.push_str("  no pointwise reality rule: the phase profile is the information\n"),
    }
    out.push_str("\nNumerical evidence, not proofs.\n");
    out
}

/// The tour's report (Markdown): what was run, a summary across families, each family's audit,
/// and the high-precision eigenfunction. `high` = (family, level, digits, grid).
pub fn tour_markdown(
    audits: &[(&str, &crate::checks::audit::Audit, f64)],
    high_profile: &crate::eigenfunction::profile::Profile,
    high: (&str, usize, u32, &str),
    high_elapsed_s: f64,
    elapsed_s: f64,
) -> String {
    let mut out = format!(
        "# regwave tour\n\nGenerated by `regwave tour` (regwave {TOOL_VERSION}) in {elapsed_s:.1} s. \
         Every number below was computed in this run. Numerical evidence, not proofs.\n\n\
         The quantum curves at ħ = 2π of three reflexive polygons — F0 (x + 1/x + y + 1/y), P2 (x + y + 1/(xy)) and \
         the hexagon dP3 — audited for levels {}..{}: attractor moduli (ν(a) = n + 1) against an independent \
         harmonic-oscillator spectrum in both directions, and for every level the eigenfunction built from the \
         regulator, with its eigen-equation residual (the shifted values ψ(r ± 2πi) integrated along their own \
         routes), norm, zeros, decay, agreement with the oscillator eigenvector, single-valuedness and a negative \
         control off the attractor modulus. Then one eigenfunction at {} digits.\n\n",
        audits.first().and_then(|a| a.1.levels.first()).map(|l| l.level).unwrap_or(0),
        audits.first().and_then(|a| a.1.levels.last()).map(|l| l.level).unwrap_or(0),
        high.2
    );
    out.push_str("## Summary\n\n| family | levels | matched both ways | max residual | max ‖ψ‖² − 1 | max orthogonality | negative control (single-valuedness off / at the attractor) | time |\n|---|---|---|---:|---:|---:|---|---:|\n");
    for (family, a, t) in audits {
        let residual = a
            .levels
            .iter()
            .filter_map(|l| l.profile.residual.as_ref().map(|r| r.max))
            .fold(0.0, f64::max);
        let norm = a
            .levels
            .iter()
            .map(|l| (l.norm - 1.0).abs())
            .fold(0.0, f64::max);
        let at = a
            .negative_control
            .route_dependence_at_attractor
            .max(a.negative_control.cauchy_defect_at_attractor);
        out.push_str(&format!(
            "| {family} | {}..{} | {} | {} | {} | {} | {} / {} | {t:.1} s |\n",
            a.levels.first().map(|l| l.level).unwrap_or(0),
            a.levels.last().map(|l| l.level).unwrap_or(0),
            if a.unmatched.is_empty() {
                "yes".to_string()
            } else {
                format!("**no: {} unmatched**", a.unmatched.len())
            },
            sci(residual),
            sci(norm),
            sci(a.orthogonality_max),
            sci(a.negative_control.defect()),
            sci(at),
        ));
    }
    out.push('\n');
    for (family, a, t) in audits {
        out.push_str(&audit_markdown(family, a, 16, *t));
    }
    let p = high_profile;
    out.push_str(&format!(
        "## {} level {} at {} digits\n\nThe eigenfunction at the attractor modulus a = {} ({} bits of working precision, {} lost to \
         |λ| = {:.4e}), sampled on {} points of R and of the lines Im r = ±2π ({:.1} s). Files: `psi-{}-{}-{}digits/`.\n\n",
        high.0,
        high.1,
        high.2,
        decimal(&p.modulus, high.2),
        p.precision_bits,
        format!("{:.1} digits", p.lambda_digits_lost),
        p.lambda.norm(),
        p.grid.len(),
        high_elapsed_s,
        high.0,
        high.1,
        high.2
    ));
    if let Some(r) = &p.residual {
        out.push_str(&format!(
            "- Eigen-equation residual: max {} and rms {} relative to max|ψ| (working precision ≈ 1e-{}).\n",
            sci(r.max),
            sci(r.rms),
            p.working_digits.floor()
        ));
    }
    out.push_str(&format!(
        "- Digits consumed by χ − χ∘ι̃ on R: {:.1}; on the strip lines: {:.1}.\n- Decay rates of |ψ|: {:.4} (r → −∞), {:.4} (r → +∞).\n\n",
        p.cancellation_digits,
        p.strip_cancellation_digits.unwrap_or(f64::NAN),
        p.normalization.decay[0],
        p.normalization.decay[1]
    ));
    out
}
