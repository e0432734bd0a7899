//! The JSON documents of the commands, as typed records built from the results.
//!
//! # Conventions
//! Keys are snake_case and stable. Every document of a computation carries `tool_version`,
//! `inputs`, `precision_bits` (where a computation ran), `elapsed_s` and a `note` ([`Document`]).
//! High-precision numbers are decimal strings holding only the digits the computation supports
//! ([`crate::output::decimal`]); the results themselves serialize every computed digit
//! ([`crate::numerics::serial`]), which is what a library user gets from `serde_json::to_value`
//! on a result.

use crate::checks::audit::Audit;
use crate::checks::level::{Check, LevelAudit, NegativeControl};
use crate::checks::matching::Unmatched;
use crate::checks::zeros::{TailZeros, Zeros};
use crate::curve::attractor::Attractor;
use crate::curve::laurent::Laurent;
use crate::curve::series_periods::{Agreement, TwoMethods};
use crate::eigenfunction::poles::Pole;
use crate::eigenfunction::profile::{PointNote, Profile};
use crate::lattice::catalogue::Family;
use crate::lattice::polygon::{LatticePoint, Mat2};
use crate::operator::spectrum::Spectrum;
use crate::output::decimal::{decimal, round1, sci, supported_digits};
use crate::precision::{digits_for_bits, path_digits};
use crate::TOOL_VERSION;
use rug::Float;
use serde::Serialize;
use std::collections::BTreeMap;

/// At most this many digits of an independent eigenvalue are reported (the spectrum's own error
/// estimate usually allows fewer).
pub const SPECTRUM_REPORT_DIGITS: u32 = 30;

/// The digits of ν a profile reports: those of its modulus for an attractor modulus (ν is then the
/// integer, to the digits the modulus was confirmed to), else those of a path computation at the
/// precision ν was computed at.
fn nu_digits(p: &Profile) -> u32 {
    match p.level {
        Some(_) if p.nu.is_integer() => p.modulus_digits.max(1),
        _ => path_digits(p.nu.prec()),
    }
}

/// What every document says about itself: the body's keys, then the common keys.
#[derive(Debug, Clone, Serialize)]
pub struct Document<B: Serialize, I: Serialize> {
    #[serde(flatten)]
    pub body: B,
    pub precision_bits: Option<u32>,
    pub tool_version: &'static str,
    pub inputs: I,
    /// Wall time in seconds (null in a report whose timings are kept apart because they depend on
    /// the machine).
    pub elapsed_s: Option<f64>,
    pub note: &'static str,
}

impl<B: Serialize, I: Serialize> Document<B, I> {
    /// A document with the tool version filled in.
    pub fn new(body: B, inputs: I, precision_bits: Option<u32>, elapsed_s: f64) -> Self {
        Document {
            body,
            precision_bits,
            tool_version: TOOL_VERSION,
            inputs,
            elapsed_s: Some(elapsed_s),
            note: NOTE,
        }
    }

    /// Without its timing (kept in a separate, machine-dependent file).
    pub fn untimed(mut self) -> Self {
        self.elapsed_s = None;
        self
    }

    /// With another note.
    pub fn noting(mut self, note: &'static str) -> Self {
        self.note = note;
        self
    }
}

/// The note of most documents.
pub const NOTE: &str = "numerical evidence, not proofs";

/// How a family was selected, and what it resolved to (the `inputs` of every family command).
#[derive(Debug, Clone, Serialize)]
pub struct FamilyInputs {
    pub family: Option<String>,
    pub vertices: Option<String>,
    pub coefficients: Option<String>,
    pub resolved_family: &'static str,
    pub polygon: Vec<LatticePoint>,
    pub transform: Option<Mat2>,
    pub phi: String,
}

/// The inputs of a command: the family selection and the command's own options.
#[derive(Debug, Clone, Serialize)]
pub struct Inputs<O: Serialize> {
    #[serde(flatten)]
    pub family: FamilyInputs,
    #[serde(flatten)]
    pub options: O,
}

/// A grid as read: its ends and step exactly (decimal text, or 40 significant digits where
/// the step has no finite decimal expansion) and its point count.
#[derive(Debug, Clone, Serialize)]
pub struct GridRecord {
    pub start: String,
    pub end: String,
    pub points: usize,
}

impl GridRecord {
    /// The record of `grid`.
    pub fn new(grid: &crate::input::grid::Grid) -> Self {
        GridRecord {
            start: grid.point_text(0, 40),
            end: grid.point_text(grid.points - 1, 40),
            points: grid.points,
        }
    }
}

/// A complex number as `{"re", "im"}` decimal strings.
#[derive(Debug, Clone, Serialize)]
pub struct ComplexText {
    pub re: String,
    pub im: String,
}

impl ComplexText {
    /// `z` with `digits` significant digits in each part.
    pub fn new(z: &rug::Complex, digits: u32) -> Self {
        ComplexText {
            re: decimal(z.real(), digits),
            im: decimal(z.imag(), digits),
        }
    }
}

/// A double-precision complex number as `{"re", "im"}` numbers.
#[derive(Debug, Clone, Copy, Serialize)]
pub struct ComplexNumber {
    pub re: f64,
    pub im: f64,
}

impl From<num_complex::Complex64> for ComplexNumber {
    fn from(z: num_complex::Complex64) -> Self {
        ComplexNumber { re: z.re, im: z.im }
    }
}

// ---------------------------------------------------------------------------------------------
// families

/// One catalogue entry.
#[derive(Debug, Clone, Serialize)]
pub struct FamilyRecord {
    pub id: &'static str,
    pub description: &'static str,
    pub vertices: &'static [LatticePoint],
    pub boundary_points: usize,
    pub dual: &'static str,
    pub applicable: bool,
    /// φ as text (null when not applicable).
    pub phi: Option<String>,
    #[serde(skip_serializing_if = "Option::is_none")]
    pub a: Option<String>,
    #[serde(skip_serializing_if = "Option::is_none")]
    pub b: Option<String>,
    #[serde(skip_serializing_if = "Option::is_none")]
    pub c: Option<String>,
    #[serde(skip_serializing_if = "Option::is_none")]
    pub threshold: Option<f64>,
    #[serde(skip_serializing_if = "Option::is_none")]
    pub series_radius: Option<i64>,
    #[serde(skip_serializing_if = "Option::is_none")]
    pub reason: Option<&'static str>,
}

impl From<&Family> for FamilyRecord {
    fn from(f: &Family) -> Self {
        let mut r = FamilyRecord {
            id: f.id,
            description: f.description,
            vertices: f.vertices,
            boundary_points: f.boundary_points,
            dual: f.dual,
            applicable: f.applicable,
            phi: None,
            a: None,
            b: None,
            c: None,
            threshold: None,
            series_radius: None,
            reason: None,
        };
        if !f.applicable {
            r.reason = f.reason;
            return r;
        }
        let laurent = Laurent::tempered(&f.polygon());
        let parts = laurent
            .strip_parts()
            .expect("applicable families are in strip form");
        r.phi = Some(laurent.to_string());
        r.a = Some(parts.a.render("x"));
        r.b = Some(parts.b.render("x"));
        r.c = Some(parts.c.render("x"));
        r.threshold = Some(laurent.classical_minimum().1);
        r.series_radius = Some(laurent.coefficient_sum());
        r
    }
}

/// `regwave families --json` (body).
#[derive(Debug, Clone, Serialize)]
pub struct FamiliesRecord {
    pub families: Vec<FamilyRecord>,
}

impl FamiliesRecord {
    /// The catalogue.
    pub fn new(families: &[Family]) -> Self {
        FamiliesRecord {
            families: families.iter().map(FamilyRecord::from).collect(),
        }
    }
}

/// The inputs of a command that takes none.
#[derive(Debug, Clone, Copy, Serialize)]
pub struct NoInputs {}

/// The catalogue as a document (the catalogue is exact data: no precision).
pub fn families_document(
    families: &[Family],
    elapsed_s: f64,
) -> Document<FamiliesRecord, NoInputs> {
    Document::new(FamiliesRecord::new(families), NoInputs {}, None, elapsed_s)
        .noting("exact data: the reflexive polygons, their tempered Laurent polynomials and spectral thresholds")
}

// ---------------------------------------------------------------------------------------------
// spectrum

/// One eigenvalue of the independent spectrum, with the digits its error estimate supports.
#[derive(Debug, Clone, Serialize)]
pub struct EigenvalueRecord {
    pub level: usize,
    pub value: String,
    pub log_value: String,
    pub error_estimate: String,
    pub digits: u32,
}

/// The oscillator frame.
#[derive(Debug, Clone, Serialize)]
pub struct FrameRecord {
    pub centre: [f64; 2],
    pub symplectic: [[f64; 2]; 2],
    pub squeeze: f64,
    pub threshold: f64,
}

/// `regwave spectrum --json` (body).
#[derive(Debug, Clone, Serialize)]
pub struct SpectrumRecord {
    pub family: String,
    pub eigenvalues: Vec<EigenvalueRecord>,
    pub method: &'static str,
    pub bases: Vec<usize>,
    pub frame: FrameRecord,
    pub real_matrix: bool,
}

/// The note of spectrum documents.
pub const SPECTRUM_NOTE: &str =
    "numerical evidence: error estimates are differences between basis sizes, not bounds";

impl SpectrumRecord {
    /// The record of `spectrum` with at most `digits` digits per eigenvalue.
    pub fn new(family: &str, spectrum: &Spectrum, digits: u32) -> Self {
        let eigenvalues = spectrum
            .levels
            .iter()
            .map(|l| {
                let d = supported_digits(&l.value, l.error_estimate, digits);
                let log = Float::with_val(spectrum.working_bits, l.value.ln_ref());
                EigenvalueRecord {
                    level: l.level,
                    value: decimal(&l.value, d),
                    log_value: decimal(&log, d),
                    error_estimate: sci(l.error_estimate),
                    digits: d,
                }
            })
            .collect();
        SpectrumRecord {
            family: family.to_string(),
            eigenvalues,
            method: "harmonic-oscillator Rayleigh-Ritz",
            bases: spectrum.bases.clone(),
            frame: FrameRecord {
                centre: spectrum.frame.centre,
                symplectic: spectrum.frame.symplectic,
                squeeze: spectrum.frame.squeeze,
                threshold: spectrum.frame.threshold,
            },
            real_matrix: spectrum.real_matrix,
        }
    }
}

// ---------------------------------------------------------------------------------------------
// periods

/// Every period by the series at a = ∞.
#[derive(Debug, Clone, Serialize)]
pub struct SeriesRecord {
    pub omega_alpha: ComplexText,
    pub r_alpha: ComplexText,
    pub omega_beta: ComplexText,
    pub r_beta: ComplexText,
    pub tau: ComplexText,
    pub nu: ComplexText,
    pub nu_error_estimate: String,
    pub terms: usize,
}

/// How the path periods were integrated.
#[derive(Debug, Clone, Serialize)]
pub struct PathRecord {
    pub alpha_error_estimate: String,
    pub alpha_steps: usize,
    pub beta_steps: usize,
    pub beta_error_estimate: String,
    pub beta_branch_points: [[f64; 2]; 2],
    pub beta_encloses_puncture: bool,
}

/// `regwave periods --json` (body).
#[derive(Debug, Clone, Serialize)]
pub struct PeriodsRecord {
    pub family: String,
    /// The modulus as read, at the working precision (every digit).
    #[serde(serialize_with = "crate::numerics::serial::float")]
    pub modulus: rug::Float,
    pub omega_alpha: ComplexText,
    pub omega_beta: ComplexText,
    pub r_alpha: ComplexText,
    pub r_beta: ComplexText,
    pub tau: ComplexText,
    pub nu: ComplexText,
    pub nu_derivative: ComplexText,
    pub nu_error_estimate: String,
    /// Digits on which series and path agree, per value.
    pub agreement_digits: Option<Agreement>,
    pub series: Option<SeriesRecord>,
    pub series_note: Option<String>,
    pub path: PathRecord,
}

/// The note of periods documents.
pub const PERIODS_NOTE: &str = "numerical evidence: path integrals with a-priori error estimates, Frobenius series at a = infinity with estimated tails and beta constants matched to path integration at one reference modulus";

impl PeriodsRecord {
    /// The record of a comparison, `digits` digits per value.
    pub fn new(family: &str, modulus: &rug::Float, c: &TwoMethods, digits: u32) -> Self {
        let p = &c.path;
        let cj = |z: &rug::Complex| ComplexText::new(z, digits);
        let floor = |d: f64| (d * 10.0).floor() / 10.0;
        PeriodsRecord {
            family: family.to_string(),
            modulus: modulus.clone(),
            omega_alpha: cj(&p.alpha.omega),
            omega_beta: cj(&p.beta.omega),
            r_alpha: cj(&p.alpha.regulator),
            r_beta: cj(&p.beta.regulator),
            tau: cj(&p.tau),
            nu: cj(&p.nu),
            nu_derivative: cj(&p.nu_da),
            nu_error_estimate: sci(p.nu_error),
            agreement_digits: c.agreement.map(|a| Agreement {
                omega_alpha: floor(a.omega_alpha),
                r_alpha: floor(a.r_alpha),
                omega_beta: floor(a.omega_beta),
                r_beta: floor(a.r_beta),
                tau: floor(a.tau),
                nu: floor(a.nu),
                beta_shift: a.beta_shift,
            }),
            series: c.series.as_ref().map(|s| SeriesRecord {
                omega_alpha: cj(&s.alpha.omega),
                r_alpha: cj(&s.alpha.regulator),
                omega_beta: cj(&s.beta.omega),
                r_beta: cj(&s.beta.regulator),
                tau: cj(&s.derived.tau),
                nu: cj(&s.derived.nu),
                nu_error_estimate: sci(s.derived.nu_error),
                terms: s.terms,
            }),
            series_note: c.series_note.clone(),
            path: PathRecord {
                alpha_error_estimate: sci(p.alpha.error),
                alpha_steps: p.alpha.steps,
                beta_steps: p.beta.steps,
                beta_error_estimate: sci(p.beta.error),
                beta_branch_points: p.beta_loop.branch_points,
                beta_encloses_puncture: p.beta_loop.encloses_puncture,
            },
        }
    }
}

// ---------------------------------------------------------------------------------------------
// attractors

/// One attractor modulus with its confirmed digits.
#[derive(Debug, Clone, Serialize)]
pub struct AttractorRecord {
    pub level: usize,
    pub nu: i64,
    pub modulus: String,
    pub log_modulus: String,
    pub digits: u32,
    pub residual: String,
    pub imaginary_part_of_nu: String,
    /// Area(Δ°)·(ln a_n)² − 4π²(n + 1/2): minus the constant of the perturbative volume, up to
    /// exponentially small terms.
    pub volume_gap: String,
}

impl From<&Attractor> for AttractorRecord {
    fn from(a: &Attractor) -> Self {
        AttractorRecord {
            level: a.level,
            nu: a.nu,
            modulus: decimal(&a.modulus, a.digits.max(1)),
            log_modulus: decimal(&a.log_modulus, a.digits.max(1)),
            digits: a.digits,
            residual: sci(a.residual),
            imaginary_part_of_nu: sci(a.imaginary_part),
            volume_gap: format!("{:.15}", a.volume_gap),
        }
    }
}

/// `regwave attractors --json` (body).
#[derive(Debug, Clone, Serialize)]
pub struct AttractorsRecord {
    pub family: String,
    pub attractors: Vec<AttractorRecord>,
    pub digits: u32,
    pub level_rule: &'static str,
}

/// The note of attractor documents.
pub const ATTRACTORS_NOTE: &str = "digits are those confirmed by a second solve at higher working precision (numerical evidence, not proofs)";

impl AttractorsRecord {
    /// The record of a list of attractor moduli requested at `digits`.
    pub fn new(family: &str, list: &[Attractor], digits: u32) -> Self {
        AttractorsRecord {
            family: family.to_string(),
            attractors: list.iter().map(AttractorRecord::from).collect(),
            digits,
            level_rule: "nu(a_n) = n + 1",
        }
    }
}

// ---------------------------------------------------------------------------------------------
// levels, audits, checks

/// Decay rates at the two ends.
#[derive(Debug, Clone, Copy, Serialize)]
pub struct Sides {
    pub left: f64,
    pub right: f64,
}

/// One audited level (the per-level keys of `audit` and `check`).
#[derive(Debug, Clone, Serialize)]
pub struct LevelRecord {
    pub level: usize,
    pub nu: i64,
    pub modulus: String,
    pub modulus_digits: u32,
    pub spectrum_value: String,
    pub spectrum_error_estimate: String,
    pub agreement_digits: f64,
    pub agreement_cap_digits: f64,
    pub residual_max: Option<f64>,
    pub residual_rms: Option<f64>,
    pub residual_points_with_pole_limits: Option<usize>,
    pub residual_points_without_value: Option<usize>,
    /// Grid points on R without a value (written as nan; left out of the norm on the grid and
    /// the tail zeros).
    pub points_without_value: usize,
    /// Bound on the share of the mass inside the grid those points may carry.
    pub excluded_mass_bound: f64,
    pub norm: f64,
    pub norm_on_grid: f64,
    pub norm_tail_fraction: f64,
    pub zeros_inside: usize,
    pub zeros: Zeros,
    pub tail_zeros: [TailZeros; 2],
    pub decay_rate: Sides,
    pub eigenvector_difference: f64,
    pub route_dependence: f64,
    pub cauchy_defect: f64,
    pub phase_rule_k: Option<i64>,
    pub phase_rule_max_imaginary_part: Option<f64>,
    pub lambda: ComplexText,
    pub precision_bits: u32,
    pub cancellation_digits_lost_on_r: f64,
}

impl From<&LevelAudit> for LevelRecord {
    fn from(l: &LevelAudit) -> Self {
        let p = &l.profile;
        let spectrum_digits =
            supported_digits(&l.spectrum_value, l.spectrum_error, SPECTRUM_REPORT_DIGITS);
        LevelRecord {
            level: l.level,
            nu: l.nu,
            modulus: decimal(&p.modulus, p.modulus_digits.max(1)),
            modulus_digits: p.modulus_digits,
            spectrum_value: decimal(&l.spectrum_value, spectrum_digits),
            spectrum_error_estimate: sci(l.spectrum_error),
            agreement_digits: round1(l.agreement_digits),
            agreement_cap_digits: round1(l.agreement_cap),
            residual_max: p.residual.as_ref().and_then(|r| r.max),
            residual_rms: p.residual.as_ref().and_then(|r| r.rms),
            residual_points_with_pole_limits: p.residual.as_ref().map(|r| r.pole_limits),
            residual_points_without_value: p.residual.as_ref().map(|r| r.points_without_value),
            points_without_value: l.grid_points_without_value,
            excluded_mass_bound: l.excluded_mass_bound,
            norm: l.norm,
            norm_on_grid: l.norm_on_grid,
            norm_tail_fraction: p.normalization.tail,
            zeros_inside: l.zeros.count,
            zeros: l.zeros.clone(),
            tail_zeros: l.tail_zeros.clone(),
            decay_rate: Sides {
                left: p.normalization.decay[0],
                right: p.normalization.decay[1],
            },
            eigenvector_difference: l.eigenvector_difference,
            route_dependence: l.route_dependence,
            cauchy_defect: l.cauchy_defect,
            phase_rule_k: p.rule,
            phase_rule_max_imaginary_part: p.reality_defect,
            lambda: ComplexText::new(&p.lambda, path_digits(p.precision_bits)),
            precision_bits: p.precision_bits,
            cancellation_digits_lost_on_r: p.cancellation_digits,
        }
    }
}

/// A modulus and ν there.
#[derive(Debug, Clone, Copy, Serialize)]
pub struct ScanStart {
    pub modulus: f64,
    pub nu: f64,
}

/// An integer crossing of ν.
#[derive(Debug, Clone, Copy, Serialize)]
pub struct Crossing {
    pub log_a: f64,
    pub nu: i64,
}

/// The ν scan of an audit.
#[derive(Debug, Clone, Serialize)]
pub struct ScanRecord {
    pub points: usize,
    pub increasing: bool,
    pub skipped_below: usize,
    pub start: ScanStart,
    pub crossings: Vec<Crossing>,
}

/// Bases and precision of the independent spectrum.
#[derive(Debug, Clone, Serialize)]
pub struct SpectrumUsed {
    pub bases: Vec<usize>,
    pub precision_bits: u32,
}

/// `regwave audit --json` (body).
#[derive(Debug, Clone, Serialize)]
pub struct AuditRecord {
    pub family: String,
    pub levels: Vec<LevelRecord>,
    pub orthogonality: Vec<Vec<f64>>,
    pub orthogonality_max: f64,
    pub normalization_max_deviation: f64,
    pub unmatched: Vec<Unmatched>,
    pub all_matched: bool,
    pub negative_control_defect: f64,
    pub negative_control: NegativeControl,
    pub window: [f64; 2],
    pub eigenvalues_in_window: Vec<String>,
    pub nu_scan: ScanRecord,
    pub period_agreement_digits: Option<f64>,
    pub diagnostic_precision_bits: u32,
    pub spectrum: SpectrumUsed,
    /// The CSV tables written beside the document, each column defined in words.
    pub tables: BTreeMap<&'static str, BTreeMap<&'static str, &'static str>>,
}

/// The definitions of the columns of the tables written with an audit.
pub fn table_definitions() -> BTreeMap<&'static str, BTreeMap<&'static str, &'static str>> {
    let mut out: BTreeMap<&'static str, BTreeMap<&'static str, &'static str>> = BTreeMap::new();
    for &(file, column, definition) in crate::output::data::COLUMNS {
        out.entry(file).or_default().insert(column, definition);
    }
    out
}

impl AuditRecord {
    /// The record of the audit of `family`.
    pub fn new(family: &str, a: &Audit) -> Self {
        AuditRecord {
            family: family.to_string(),
            levels: a.levels.iter().map(LevelRecord::from).collect(),
            orthogonality: a.orthogonality.clone(),
            orthogonality_max: a.orthogonality_max,
            normalization_max_deviation: a.normalization_max_deviation,
            unmatched: a.unmatched.clone(),
            all_matched: a.unmatched.is_empty(),
            negative_control_defect: a.negative_control.defect(),
            negative_control: a.negative_control.clone(),
            window: a.window,
            eigenvalues_in_window: a
                .eigenvalues_in_window
                .iter()
                .map(|w| {
                    let d = supported_digits(&w.value, w.error_estimate, SPECTRUM_REPORT_DIGITS);
                    decimal(&w.value, d)
                })
                .collect(),
            nu_scan: ScanRecord {
                points: a.scan.log_a.len(),
                increasing: a.scan.increasing,
                skipped_below: a.scan.skipped,
                start: ScanStart {
                    modulus: a.scan.log_a[0].exp(),
                    nu: a.scan.nu[0],
                },
                crossings: a
                    .scan
                    .crossings
                    .iter()
                    .map(|c| Crossing {
                        log_a: c.0,
                        nu: c.1,
                    })
                    .collect(),
            },
            period_agreement_digits: a.period_agreement_digits,
            diagnostic_precision_bits: a.diagnostic_bits,
            spectrum: SpectrumUsed {
                bases: a.spectrum_bases.clone(),
                precision_bits: a.spectrum_bits,
            },
            tables: table_definitions(),
        }
    }

    /// The largest working precision of the audited eigenfunctions.
    pub fn precision_bits(a: &Audit) -> Option<u32> {
        a.levels.iter().map(|l| l.profile.precision_bits).max()
    }
}

/// `regwave check --json` (body).
#[derive(Debug, Clone, Serialize)]
pub struct CheckRecord {
    pub family: String,
    pub levels: [LevelRecord; 1],
    pub negative_control_defect: f64,
    pub negative_control: NegativeControl,
    pub nu_distance_to_integer: String,
    pub period_agreement_digits: Option<f64>,
    pub spectrum: SpectrumUsed,
}

impl CheckRecord {
    /// The record of the checks of one eigenfunction of `family`.
    pub fn new(family: &str, c: &Check) -> Self {
        CheckRecord {
            family: family.to_string(),
            levels: [LevelRecord::from(&c.level)],
            negative_control_defect: c.negative_control.defect(),
            negative_control: c.negative_control.clone(),
            nu_distance_to_integer: sci(c.level.profile.nu_distance),
            period_agreement_digits: c.period_agreement_digits,
            spectrum: SpectrumUsed {
                bases: c.spectrum_bases.clone(),
                precision_bits: c.spectrum_bits,
            },
        }
    }
}

// ---------------------------------------------------------------------------------------------
// profiles (psi.json)

/// The phase rule of a profile.
#[derive(Debug, Clone, Serialize)]
pub struct PhaseRuleRecord {
    pub k: Option<i64>,
    pub statement: String,
    #[serde(skip_serializing_if = "Option::is_none")]
    pub max_imaginary_part_relative: Option<Option<f64>>,
}

/// How a profile was normalized.
#[derive(Debug, Clone, Serialize)]
pub struct NormalizationRecord {
    pub rule: &'static str,
    pub raw_norm_squared: f64,
    pub quadrature_range: [f64; 2],
    pub quadrature_step: f64,
    pub tail_fraction: f64,
    pub peak_r: f64,
}

/// The checks carried by a profile.
#[derive(Debug, Clone, Serialize)]
pub struct ProfileChecks {
    pub decay_power_left: f64,
    pub decay_power_right: f64,
    pub eigen_equation_residual_max: Option<f64>,
    pub eigen_equation_residual_rms: Option<f64>,
    pub residual_points_with_pole_limits: Option<usize>,
    pub residual_points_formed: Option<usize>,
    pub residual_points_without_value: Option<usize>,
    pub residual_note: &'static str,
    pub decay_rate_left: f64,
    pub decay_rate_right: f64,
}

/// The per-point digits of a profile in `psi.json`.
#[derive(Debug, Clone, Serialize)]
pub struct PointDigitsRecord {
    pub rule: &'static str,
    /// Digits every written value must hold relative to its own size.
    pub wanted: f64,
    /// The fewest digits of a written value relative to its own size, on R and on the two
    /// boundary lines (None: not sampled or no value).
    pub relative_min_on_r: Option<f64>,
    pub relative_min_on_strip_lines: Option<f64>,
    /// Points computed again at a raised precision, and its bits.
    pub raised: Vec<PointNote>,
    pub raised_precision_bits: Option<u32>,
    /// Points written as nan because no value with the wanted digits was within the budget.
    pub without_value: Vec<PointNote>,
    /// Zeros of psi: values that stayed rounding noise when the precision was raised, kept with
    /// their digits relative to the line's peak (not counted in the minima above).
    pub zeros: Vec<PointNote>,
    /// Points whose recomputation gave no usable value: the first value is kept with the
    /// (fewer than wanted) digits it holds, stated here (counted in the minima above).
    pub kept_short: Vec<PointNote>,
}

impl PointDigitsRecord {
    /// The record of the per-point digits of `p`.
    pub fn new(p: &Profile) -> Self {
        let d = &p.point_digits;
        let strip = [d.min_relative(1), d.min_relative(2)]
            .into_iter()
            .flatten()
            .reduce(f64::min);
        PointDigitsRecord {
            rule: "each value holds the working digits less the cancellation in chi - chi o iota at its point and the error of the exponent integral (log10(1 + |e|/2pi)); values with fewer than `wanted` digits are computed again at a raised precision (within a budget of 100 digits above the working digits), else written as nan and listed here; a value whose own digits do not grow when the precision is raised is a zero of psi, kept with its digits relative to the line's peak; a value whose recomputation gave no usable value keeps its first value with the digits it holds (kept_short)",
            wanted: d.wanted,
            relative_min_on_r: d.min_relative(0),
            relative_min_on_strip_lines: strip,
            raised: d.raised.clone(),
            raised_precision_bits: d.raised_bits,
            without_value: d.dropped.clone(),
            zeros: d.zeros.clone(),
            kept_short: d.kept_short.clone(),
        }
    }
}

/// `psi.json` of `regwave build` (body).
#[derive(Debug, Clone, Serialize)]
pub struct ProfileRecord {
    pub family: String,
    pub level: Option<usize>,
    pub modulus: String,
    pub nu: String,
    pub nu_distance_to_integer: String,
    pub lambda: ComplexText,
    pub base_point: ComplexNumber,
    pub spine_im: f64,
    pub lambda_digits_lost: f64,
    pub cancellation_digits_lost_on_r: f64,
    /// The fewest digits of a value on R relative to the largest |ψ| on R (per point).
    pub digits_left_min_on_r: Option<f64>,
    pub cancellation_digits_lost_on_strip_lines: Option<f64>,
    pub point_digits: PointDigitsRecord,
    pub phase_rule: PhaseRuleRecord,
    pub normalization: NormalizationRecord,
    pub checks: ProfileChecks,
    pub poles: Vec<Pole>,
    pub files: Vec<String>,
}

impl ProfileRecord {
    /// The record of a profile of `family` written to `files`.
    pub fn new(p: &Profile, family: &str, files: &[&str]) -> Self {
        let n = &p.normalization;
        let phase_rule = match p.rule {
            Some(k) => PhaseRuleRecord {
                k: Some(k),
                statement: format!("exp(-i*({k})*r^2/(8*pi)) * psi(r) is real (antiunitary symmetry m -> (m1 + ({k}) m2, -m2))"),
                max_imaginary_part_relative: Some(p.reality_defect),
            },
            None => PhaseRuleRecord {
                k: None,
                statement: "no pointwise reality rule for this family: the phase profile arg psi(r) is in psi.csv".into(),
                max_imaginary_part_relative: None,
            },
        };
        ProfileRecord {
            family: family.to_string(),
            level: p.level,
            modulus: decimal(&p.modulus, digits_for_bits(p.modulus.prec()).max(17)),
            nu: decimal(&p.nu, nu_digits(p)),
            nu_distance_to_integer: sci(p.nu_distance),
            lambda: ComplexText::new(&p.lambda, path_digits(p.precision_bits)),
            base_point: p.base.into(),
            spine_im: p.spine,
            lambda_digits_lost: p.lambda_digits_lost,
            cancellation_digits_lost_on_r: p.cancellation_digits,
            digits_left_min_on_r: p.digits_left_min_on_r(),
            cancellation_digits_lost_on_strip_lines: p.strip_cancellation_digits,
            point_digits: PointDigitsRecord::new(p),
            phase_rule,
            normalization: NormalizationRecord {
                rule: "unit L2 norm on R; with a phase rule, exp(-i k r^2/(8 pi)) psi real and positive where |psi| is largest on the grid, else psi itself",
                raw_norm_squared: n.raw_norm_squared,
                quadrature_range: [-n.range_ends[0], n.range_ends[1]],
                quadrature_step: n.step,
                tail_fraction: n.tail,
                peak_r: n.peak,
            },
            checks: ProfileChecks {
                decay_power_left: n.decay_power[0],
                decay_power_right: n.decay_power[1],
                eigen_equation_residual_max: p.residual.as_ref().and_then(|r| r.max),
                eigen_equation_residual_rms: p.residual.as_ref().and_then(|r| r.rms),
                residual_points_with_pole_limits: p.residual.as_ref().map(|r| r.pole_limits),
                residual_points_formed: p.residual.as_ref().map(|r| r.points_formed),
                residual_points_without_value: p.residual.as_ref().map(|r| r.points_without_value),
                residual_note: "A psi(r-2pi i) + C psi(r+2pi i) - (B+a) psi(r), each value integrated along its own route, relative to max|psi| on the grid; at poles of psi the products are evaluated as limits (needs --strip)",
                decay_rate_left: n.decay[0],
                decay_rate_right: n.decay[1],
            },
            poles: p.poles.clone(),
            files: files.iter().map(|f| f.to_string()).collect(),
        }
    }
}

/// JSON text of a serializable value, pretty-printed.
///
/// Serializing these records cannot fail (no maps with non-string keys, no custom errors).
pub fn pretty<T: Serialize>(value: &T) -> String {
    serde_json::to_string_pretty(value).expect("records serialize to JSON")
}
