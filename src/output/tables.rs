//! Human-readable tables for the terminal: the catalogue, spectra, periods, attractor moduli and
//! the checks of one eigenfunction. Pure formatting.

use crate::checks::level::Check;
use crate::checks::zeros::TailZeros;
use crate::curve::attractor::Attractor;
use crate::curve::laurent::Laurent;
use crate::curve::series_periods::TwoMethods;
use crate::lattice::catalogue::Family;
use crate::operator::spectrum::Spectrum;
use crate::output::decimal::{decimal, sci, sci_opt, supported_digits};
use rug::Float;

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

/// `regwave spectrum` as a table.
pub fn spectrum_table(family: &str, spectrum: &Spectrum, digits: u32, elapsed_s: f64) -> String {
    let mut out = format!(
        "family {family}: eigenvalues a_n of the quantum curve at hbar = 2 pi\n\
         harmonic-oscillator Rayleigh-Ritz, bases {:?}, {} bits, {:.2} s\n\n",
        spectrum.bases, spectrum.working_bits, elapsed_s
    );
    out.push_str(&format!(
        "{:>5}  {:<40} {:<28} {:>9}\n",
        "level", "a_n", "ln a_n", "error"
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

/// `regwave periods` as a table: every value by path and by series, with their agreement.
pub fn periods_table(
    family: &str,
    a: &str,
    c: &TwoMethods,
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
    let path_rows = [
        ("Omega_alpha", &p.alpha.omega),
        ("R_alpha", &p.alpha.regulator),
        ("Omega_beta", &p.beta.omega),
        ("R_beta", &p.beta.regulator),
        ("tau", &p.tau),
        ("nu", &p.nu),
    ];
    match (&c.series, &c.agreement) {
        (Some(s), Some(ag)) => {
            let series = [
                &s.alpha.omega,
                &s.alpha.regulator,
                &s.beta.omega,
                &s.beta.regulator,
                &s.derived.tau,
                &s.derived.nu,
            ];
            let agree = [
                ag.omega_alpha,
                ag.r_alpha,
                ag.omega_beta,
                ag.r_beta,
                ag.tau,
                ag.nu,
            ];
            for (((name, path), series), d) in path_rows.iter().zip(series).zip(agree) {
                out.push_str(&format!("  {name:<12} path    {}\n", z(path)));
                out.push_str(&format!(
                    "  {:<12} series  {}   (agree to {d:.1} digits)\n",
                    "",
                    z(series)
                ));
            }
            out.push_str(&format!(
                "\nseries at a = infinity: {} terms; path and series agree to at least {:.1} digits.\n",
                s.terms,
                ag.worst()
            ));
            if ag.beta_shift != 0 {
                out.push_str(&format!(
                    "the path's beta is the series' beta {:+}·alpha: Omega_beta, R_beta and tau are compared after removing it (nu does not depend on it).\n",
                    ag.beta_shift
                ));
            }
        }
        _ => {
            for (name, path) in path_rows {
                out.push_str(&format!("  {name:<12} path    {}\n", z(path)));
            }
            out.push_str(&format!(
                "\nno series: {}\n",
                c.series_note.clone().unwrap_or_default()
            ));
        }
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

/// `regwave attractors` as a table.
pub fn attractors_table(family: &str, list: &[Attractor], digits: u32, elapsed_s: f64) -> String {
    let mut out = format!("family {family}: attractor moduli (nu(a) integer, level n <-> nu = n + 1), {digits} digits, {elapsed_s:.2} s\n\n");
    let width = (digits as usize + 8).max(12);
    out.push_str(&format!(
        "{:>5} {:>4}  {:<width$}  {:<width$}  {}\n",
        "level", "nu", "a_n", "ln a_n", "volume gap"
    ));
    for a in list {
        out.push_str(&format!(
            "{:>5} {:>4}  {:<width$}  {:<width$}  {:.12}\n",
            a.level,
            a.nu,
            decimal(&a.modulus, a.digits.max(1)),
            decimal(&a.log_modulus, a.digits.max(1)),
            a.volume_gap,
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
    out.push_str("\nDigits shown are those confirmed by a second solve at higher precision (numerical evidence, not proofs).\nvolume gap: Area(polar polygon)*(ln a_n)^2 - 4 pi^2 (n + 1/2), tending to minus the constant of the perturbative volume.\n");
    out
}

/// `regwave check` as text.
pub fn check_text(family: &str, c: &Check, elapsed_s: f64) -> String {
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
            sci_opt(r.max),
            sci_opt(r.rms),
            r.points_formed,
            r.pole_limits
        ));
        if r.points_without_value > 0 {
            out.push_str(&format!(
                "  residual NOT formed at {} of {} points: psi has no value there (see points_without_value)\n",
                r.points_without_value,
                p.grid.len()
            ));
        }
    }
    if l.grid_points_without_value > 0 {
        out.push_str(&format!(
            "  {} of {} grid points on R have no value (nan), left out of the norm inside the grid (they may carry up to {} of it) and of the tail zeros\n",
            l.grid_points_without_value,
            p.grid.len(),
            sci(l.excluded_mass_bound)
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
        "  zeros inside the turning points        {} ({}, window [{:.3}, {:.3}])\n",
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

/// One end's tail zeros as "count, measured spacing constant / predicted".
pub(crate) fn tail_text(t: &TailZeros) -> String {
    let measured = t
        .spacing_constant
        .map(|c| format!("{c:.2}"))
        .unwrap_or_else(|| "–".into());
    let predicted = t
        .predicted
        .map(|c| format!("{c:.2}"))
        .unwrap_or_else(|| "none (roots meet at this end)".into());
    let missing = match t.points_without_value {
        0 => String::new(),
        n => format!(", {n} points without a value not searched"),
    };
    format!(
        "{} zeros, s·|r|/π² = {measured} (predicted {predicted}){missing}",
        t.count
    )
}
