//! Markdown reports: the per-level table of an audit (ready for a paper's appendix), the audit of
//! a family, and the tour's report. Pure formatting.

use crate::checks::audit::Audit;
use crate::checks::level::LevelAudit;
use crate::eigenfunction::profile::Profile;
use crate::numerics::complex::CNum;
use crate::output::decimal::{decimal, sci, sci_opt, supported_digits};
use crate::output::tables::tail_text;
use crate::precision::digits_for_bits;
use crate::TOOL_VERSION;

/// One row of the per-level table (Markdown).
fn level_row(l: &LevelAudit) -> String {
    let p = &l.profile;
    let spectrum_digits = supported_digits(&l.spectrum_value, l.spectrum_error, 30);
    let residual = sci_opt(p.residual.as_ref().and_then(|r| r.max));
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

/// The report line on the zeros beyond the turning points.
fn tail_line(levels: &[LevelAudit]) -> String {
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

/// The per-level table of an audit or check (Markdown).
pub fn level_table(levels: &[LevelAudit]) -> String {
    let mut out = String::from(LEVEL_TABLE_HEADER);
    for l in levels {
        out.push_str(&level_row(l));
    }
    out
}

/// The audit of one family as Markdown (a section of a report; figures are linked by the caller).
pub fn audit_markdown(family: &str, a: &Audit, digits: u32, elapsed_s: Option<f64>) -> String {
    let mut out = format!("## {family}\n\n");
    let bits = a
        .levels
        .iter()
        .map(|l| l.profile.precision_bits)
        .max()
        .unwrap_or(53);
    out.push_str(&format!(
        "Requested {digits} digits; eigenfunctions at up to {bits} bits (≈ {} digits), diagnostics at {} bits; \
         independent spectrum at bases {:?} ({} bits). Window of moduli ({:.6}, {:.6}].{}\n\n",
        digits_for_bits(bits),
        a.diagnostic_bits,
        a.spectrum_bases,
        a.spectrum_bits,
        a.window[0],
        a.window[1],
        seconds(elapsed_s)
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
            u.kind.replace('_', " "),
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

/// The tour's report (Markdown): what was run, a summary across families, each family's audit,
/// and the high-precision eigenfunction. `high` = (family, level, digits, grid).
pub fn tour_markdown(
    audits: &[(&str, &Audit, Option<f64>)],
    high_profile: &Profile,
    high: (&str, usize, u32, &str),
    high_elapsed_s: Option<f64>,
    elapsed_s: Option<f64>,
) -> String {
    let timing = match elapsed_s {
        Some(t) => format!(" in {t:.1} s"),
        None => String::new(),
    };
    let mut out = format!(
        "# regwave tour\n\nGenerated by `regwave tour` (regwave {TOOL_VERSION}){timing}. \
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
    out.push_str("## Summary\n\n| family | levels | matched both ways | max residual | max ‖ψ‖² − 1 | max orthogonality | negative control (single-valuedness off / at the attractor) |\n|---|---|---|---:|---:|---:|---|\n");
    for (family, a, _) in audits {
        let residual = a
            .levels
            .iter()
            .filter_map(|l| l.profile.residual.as_ref().and_then(|r| r.max))
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
            "| {family} | {}..{} | {} | {} | {} | {} | {} / {} |\n",
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
    if elapsed_s.is_none() {
        out.push_str("The timings of this run are in `timings.json` beside this report (they depend on the machine, so the committed copy of the report leaves them out).\n\n");
    }
    let p = high_profile;
    out.push_str(&format!(
        "## {} level {} at {} digits\n\nThe eigenfunction at the attractor modulus a = {} ({} bits of working precision, {} lost to \
         |λ| = {:.4e}), sampled on {} points of R and of the lines Im r = ±2π{}. Files: `psi-{}-{}-{}digits/`.\n\n",
        high.0,
        high.1,
        high.2,
        decimal(&p.modulus, high.2),
        p.precision_bits,
        format!("{:.1} digits", p.lambda_digits_lost),
        CNum::abs_f64(&p.lambda),
        p.grid.len(),
        match high_elapsed_s {
            Some(t) => format!(" ({t:.1} s)"),
            None => String::new(),
        },
        high.0,
        high.1,
        high.2
    ));
    if let Some(r) = &p.residual {
        out.push_str(&format!(
            "- Eigen-equation residual: max {} and rms {} relative to max|ψ| (working precision ≈ 1e-{}).\n",
            sci_opt(r.max),
            sci_opt(r.rms),
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

/// " 12.3 s." or nothing.
fn seconds(t: Option<f64>) -> String {
    t.map(|t| format!(" {t:.1} s.")).unwrap_or_default()
}

/// Markdown image links with captions, under a heading.
pub fn figure_links(figures: &[(String, String)]) -> String {
    let mut out = String::from("### Figures\n\n");
    for (name, caption) in figures {
        out.push_str(&format!("![{name}]({name}.svg)\n\n*{caption}*\n\n"));
    }
    out
}
