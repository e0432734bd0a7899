//! Matching attractor moduli and independent eigenvalues, both ways.
//!
//! # Rule
//! An attractor modulus a and an eigenvalue E match when |a − E|/E < max([`crate::precision::MATCH_FLOOR`], 100 ×
//! the spectrum's relative error estimate). An attractor modulus without an eigenvalue, an
//! eigenvalue without an attractor modulus, and a match between different level labels are each
//! reported as [`Unmatched`], with the nearest partner and the gap. Every attractor modulus is an
//! eigenvalue (proven); whether every eigenvalue is an attractor modulus is open, which is why the
//! two directions are checked separately.
//!
//! # References
//! `docs/MATHEMATICS.md` §4 and §7.

use crate::checks::audit::AuditError;
use crate::checks::nu_scan::NuScan;
use crate::curve::attractor::{self, LEVEL_OFFSET};
use crate::curve::laurent::Laurent;
use crate::operator::spectrum;
use crate::precision::MATCH_FLOOR;

/// An attractor modulus without an eigenvalue, or an eigenvalue without an attractor modulus.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct Unmatched {
    /// "attractor_modulus", "eigenvalue" or "level_label".
    pub kind: String,
    pub value: f64,
    /// ν for an attractor modulus, the level for an eigenvalue.
    pub label: i64,
    pub nearest: f64,
    pub relative_gap: f64,
    pub note: String,
}

/// Relative tolerance of a match with eigenvalue `k`.
fn tolerance(spec: &spectrum::Spectrum, k: usize) -> f64 {
    let l = &spec.levels[k];
    (100.0 * l.error_estimate / l.value.to_f64()).max(MATCH_FLOOR)
}

/// Both directions of the matching (see the module docs): the solved attractor moduli and every
/// other crossing of the scan, against the spectrum.
pub(crate) fn match_both_ways(
    laurent: &Laurent,
    scan: &NuScan,
    attractors: &[attractor::Attractor],
    spec: &spectrum::Spectrum,
    window_eigenvalues: &[f64],
) -> Result<Vec<Unmatched>, AuditError> {
    let mut fam = attractor::HigherNormalFunction::new(laurent)?;
    let mut moduli: Vec<(f64, i64)> = attractors
        .iter()
        .map(|a| (a.modulus.to_f64(), a.nu))
        .collect();
    for &(t, k) in &scan.crossings {
        let solved = attractors.iter().any(|a| a.nu == k);
        let count = scan.crossings.iter().filter(|c| c.1 == k).count();
        if !solved || count > 1 {
            moduli.push((refine_crossing(&mut fam, t, k)?.exp(), k));
        }
    }
    let eigen: Vec<(f64, f64)> = (0..spec.levels.len())
        .map(|k| (spec.levels[k].value.to_f64(), tolerance(spec, k)))
        .collect();
    Ok(match_moduli(&moduli, &eigen, window_eigenvalues.len()))
}

/// Matches attractor moduli `(a, ν)` with eigenvalues `(E_k, relative tolerance)` (index = level)
/// both ways: every modulus must lie within tolerance of an eigenvalue, of the level ν − 1, and
/// each of the first `window_count` eigenvalues within tolerance of a modulus. Returns what did
/// not match.
pub fn match_moduli(
    moduli: &[(f64, i64)],
    eigen: &[(f64, f64)],
    window_count: usize,
) -> Vec<Unmatched> {
    let nearest = |a: f64, set: &mut dyn Iterator<Item = f64>| -> Option<(usize, f64)> {
        set.enumerate()
            .map(|(i, v)| (i, (a - v).abs() / v))
            .min_by(|x, y| x.1.total_cmp(&y.1))
    };
    let mut out = Vec::new();
    for &(a, k) in moduli {
        let Some((i, gap)) = nearest(a, &mut eigen.iter().map(|e| e.0)) else {
            continue;
        };
        let level = k - LEVEL_OFFSET;
        if gap >= eigen[i].1 {
            out.push(Unmatched {
                kind: "attractor_modulus".into(),
                value: a,
                label: k,
                nearest: eigen[i].0,
                relative_gap: gap,
                note: "no eigenvalue of the independent spectrum within tolerance".into(),
            });
        } else if i as i64 != level {
            out.push(Unmatched {
                kind: "level_label".into(),
                value: a,
                label: k,
                nearest: eigen[i].0,
                relative_gap: gap,
                note: format!(
                    "the attractor modulus with nu = {k} matches eigenvalue {i}, not level {level}"
                ),
            });
        }
    }
    for (i, &(v, tol)) in eigen.iter().enumerate().take(window_count) {
        match nearest(v, &mut moduli.iter().map(|m| m.0)) {
            Some((_, gap)) if gap < tol => {}
            found => out.push(Unmatched {
                kind: "eigenvalue".into(),
                value: v,
                label: i as i64,
                nearest: found.map(|f| moduli[f.0].0).unwrap_or(f64::NAN),
                relative_gap: found.map(|f| f.1).unwrap_or(f64::INFINITY),
                note: "no attractor modulus within tolerance".into(),
            }),
        }
    }
    out
}

/// A crossing ν = k of the scan refined by Newton in ln a (double precision).
fn refine_crossing(
    fam: &mut attractor::HigherNormalFunction,
    t0: f64,
    k: i64,
) -> Result<f64, AuditError> {
    let mut t = t0;
    for _ in 0..30 {
        let (v, slope) = fam.nu_f64(t)?;
        let step = (v - k as f64) / slope;
        t -= step.clamp(-0.2, 0.2);
        if step.abs() < 1e-14 * t.abs().max(1.0) {
            break;
        }
    }
    Ok(t)
}
