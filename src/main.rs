//! The `regwave` command line: argument parsing, calls into the library, file writing.

use clap::{Args, Parser, Subcommand};
use indicatif::{ProgressBar, ProgressStyle};
use num_complex::Complex64;
use rayon::prelude::*;
use regwave::checks::audit::{self, Audit, AuditError, AuditOptions};
use regwave::checks::level::{self, CheckOptions};
use regwave::curve::{attractor, periods};
use regwave::eigenfunction::profile::{self, Profile, ProfileError, ProfileOptions, Target};
use regwave::input::grid;
use regwave::input::numbers;
use regwave::input::selection::{self, Selection, SelectionError};
use regwave::lattice::catalogue;
use regwave::operator::spectrum::{self, SpectrumError, SpectrumOptions};
use regwave::output::{figures, report};
use regwave::precision::{bits_for_digits, check_digits, with_guard, PrecisionError};
use regwave::TOOL_VERSION;
use serde_json::{json, Value};
use std::io::IsTerminal;
use std::path::{Path, PathBuf};
use std::process::ExitCode;
use std::time::Instant;

#[derive(Parser)]
#[command(
    name = "regwave",
    version,
    about = "Eigenfunctions of quantized mirror curves at hbar = 2 pi from regulators (numerical evidence, not proofs)"
)]
struct Cli {
    #[command(subcommand)]
    command: Command,
}

#[derive(Subcommand)]
enum Command {
    /// The catalogue of reflexive polygons: 15 strip families and the one excluded.
    Families {
        /// Print one JSON document instead of the table.
        #[arg(long)]
        json: bool,
    },
    /// Independent eigenvalues from a harmonic-oscillator basis, with convergence estimates.
    Spectrum(SpectrumArgs),
    /// Periods Omega, regulator periods R over the cycles alpha and beta, tau and nu at one modulus.
    Periods(PeriodsArgs),
    /// Attractor moduli: the moduli where the higher normal function nu is an integer.
    Attractors(AttractorsArgs),
    /// Build the eigenfunction psi at an attractor modulus and write psi.csv (+ strip lines) and psi.json.
    Build(BuildArgs),
    /// Audit a family: attractor moduli matched to the independent spectrum both ways, every level's eigenfunction checked; Markdown, JSON and figures.
    Audit(AuditArgs),
    /// The residual report of one eigenfunction (all checks), without writing samples.
    Check(CheckArgs),
    /// The built-in demonstration, written into out/tour/.
    Tour {
        /// Output directory.
        #[arg(long, default_value = "out/tour")]
        out: PathBuf,
        /// Also write PNG versions of the figures.
        #[arg(long)]
        png: bool,
    },
}

#[derive(Args, Clone)]
struct FamilyArgs {
    /// Catalogue id (see `regwave families`).
    #[arg(long)]
    family: Option<String>,
    /// Vertices of a reflexive polygon, e.g. "(1,0),(0,1),(-1,-1)".
    #[arg(long, allow_hyphen_values = true)]
    vertices: Option<String>,
    /// Coefficients to check against the tempered ones, e.g. "(1,0)=1,(0,1)=1".
    #[arg(long, allow_hyphen_values = true)]
    coefficients: Option<String>,
}

#[derive(Args, Clone)]
struct SpectrumArgs {
    #[command(flatten)]
    family: FamilyArgs,
    /// Levels: an inclusive range A..B or one level n.
    #[arg(long, default_value = "0..5")]
    levels: String,
    /// Basis size N: solve at N and 3N/2 only (default: adaptive from 200 up to --max-basis).
    #[arg(long)]
    basis: Option<usize>,
    /// Largest basis of the adaptive ladder 200, 300, 450, 675, 1013, ... (it stops once the digits are reached)
    #[arg(long, default_value_t = 1013)]
    max_basis: usize,
    /// Decimal digits wanted.
    #[arg(long, default_value_t = 16)]
    digits: u32,
    /// Print one JSON document instead of the table.
    #[arg(long)]
    json: bool,
}

#[derive(Args, Clone)]
struct PeriodsArgs {
    #[command(flatten)]
    family: FamilyArgs,
    /// The modulus a (a decimal number above the spectral threshold).
    #[arg(long, allow_hyphen_values = true)]
    modulus: String,
    /// Decimal digits of the working precision.
    #[arg(long, default_value_t = 30)]
    digits: u32,
    /// Print one JSON document instead of the table.
    #[arg(long)]
    json: bool,
}

#[derive(Args, Clone)]
struct AttractorsArgs {
    #[command(flatten)]
    family: FamilyArgs,
    /// Levels: an inclusive range A..B or one level n.
    #[arg(long, default_value = "0..5")]
    levels: String,
    /// Decimal digits wanted.
    #[arg(long, default_value_t = 16)]
    digits: u32,
    /// Print one JSON document instead of the table.
    #[arg(long)]
    json: bool,
}

/// Which eigenfunction: `--level n` or `--modulus A`.
#[derive(Args, Clone)]
struct TargetArgs {
    /// Level n (the attractor modulus with nu = n + 1).
    #[arg(long, conflicts_with = "modulus")]
    level: Option<usize>,
    /// An explicit modulus a (must be an attractor modulus unless --allow-non-attractor).
    #[arg(long, allow_hyphen_values = true)]
    modulus: Option<String>,
    /// Accept a modulus that is not an attractor modulus (the result is then not an eigenfunction; the checks show it).
    #[arg(long)]
    allow_non_attractor: bool,
}

#[derive(Args, Clone)]
struct BuildArgs {
    #[command(flatten)]
    family: FamilyArgs,
    #[command(flatten)]
    target: TargetArgs,
    /// Grid of real parts R0:R1:N.
    #[arg(long, default_value = "-12:12:481", allow_hyphen_values = true)]
    grid: String,
    /// Also write the lines Im r = +2 pi and -2 pi (psi_up.csv, psi_down.csv).
    #[arg(long)]
    strip: bool,
    /// Decimal digits of the working precision (16 or less: double precision).
    #[arg(long, default_value_t = 16)]
    digits: u32,
    /// Output directory.
    #[arg(long, default_value = "out/build")]
    out: PathBuf,
    /// Replace existing outputs.
    #[arg(long)]
    force: bool,
}

#[derive(Args, Clone)]
struct AuditArgs {
    #[command(flatten)]
    family: FamilyArgs,
    /// Levels: an inclusive range A..B or one level n.
    #[arg(long, default_value = "0..4")]
    levels: String,
    /// Decimal digits (16 or less: double precision where it suffices).
    #[arg(long, default_value_t = 16)]
    digits: u32,
    /// Grid of real parts R0:R1:N for the residual and the profiles.
    #[arg(long, default_value = "-12:12:241", allow_hyphen_values = true)]
    grid: String,
    /// Output directory (default out/audit-<family>).
    #[arg(long)]
    out: Option<PathBuf>,
    /// Replace existing outputs.
    #[arg(long)]
    force: bool,
    /// Also write PNG versions of the figures.
    #[arg(long)]
    png: bool,
    /// Print one JSON document instead of the table.
    #[arg(long)]
    json: bool,
}

#[derive(Args, Clone)]
struct CheckArgs {
    #[command(flatten)]
    family: FamilyArgs,
    #[command(flatten)]
    target: TargetArgs,
    /// Grid of real parts R0:R1:N.
    #[arg(long, default_value = "-12:12:241", allow_hyphen_values = true)]
    grid: String,
    /// Decimal digits (16 or less: double precision where it suffices).
    #[arg(long, default_value_t = 16)]
    digits: u32,
    /// Print one JSON document instead of the table.
    #[arg(long)]
    json: bool,
}

/// A failure with its exit code: 2 for bad input, 1 for a computation that failed.
struct Failure {
    code: u8,
    message: String,
}

impl Failure {
    fn input(e: impl std::fmt::Display) -> Self {
        Failure {
            code: 2,
            message: e.to_string(),
        }
    }
    fn compute(e: impl std::fmt::Display) -> Self {
        Failure {
            code: 1,
            message: e.to_string(),
        }
    }
}

impl From<SelectionError> for Failure {
    fn from(e: SelectionError) -> Self {
        Failure::input(e)
    }
}

impl From<PrecisionError> for Failure {
    fn from(e: PrecisionError) -> Self {
        Failure::input(e)
    }
}

impl From<SpectrumError> for Failure {
    fn from(e: SpectrumError) -> Self {
        match e {
            SpectrumError::EmptyLevels | SpectrumError::BasisTooSmall { .. } => Failure::input(e),
            _ => Failure::compute(e),
        }
    }
}

fn main() -> ExitCode {
    let cli = Cli::parse();
    let result = match cli.command {
        Command::Families { json } => families(json),
        Command::Spectrum(args) => spectrum_command(&args),
        Command::Periods(args) => periods_command(&args),
        Command::Attractors(args) => attractors_command(&args),
        Command::Build(args) => build_command(&args),
        Command::Audit(args) => audit_command(&args),
        Command::Check(args) => check_command(&args),
        Command::Tour { out, png } => tour(&out, png),
    };
    match result {
        Ok(()) => ExitCode::SUCCESS,
        Err(f) => {
            eprintln!("regwave: error: {}", f.message);
            ExitCode::from(f.code)
        }
    }
}

fn families(json: bool) -> Result<(), Failure> {
    let all = catalogue::all();
    if json {
        println!(
            "{}",
            serde_json::to_string_pretty(&report::families_json(all)).expect("JSON")
        );
    } else {
        print!("{}", report::families_table(all));
    }
    Ok(())
}

fn select(f: &FamilyArgs) -> Result<Selection, Failure> {
    Ok(selection::resolve(
        f.family.as_deref(),
        f.vertices.as_deref(),
        f.coefficients.as_deref(),
    )?)
}

fn family_inputs(f: &FamilyArgs, s: &Selection) -> Value {
    json!({
        "family": f.family,
        "vertices": f.vertices,
        "coefficients": f.coefficients,
        "resolved_family": s.family.id,
        "polygon": s.polygon.vertices(),
        "transform": s.transform,
        "phi": s.laurent.to_string(),
    })
}

/// Runs the spectrum command; returns (family id, JSON document, table).
fn run_spectrum(args: &SpectrumArgs) -> Result<(Value, String), Failure> {
    check_digits(args.digits)?;
    let sel = select(&args.family)?;
    let levels = numbers::parse_levels(&args.levels)?;
    let (basis, max_basis) = match args.basis {
        Some(n) => (n, spectrum::next_basis(n)),
        None => (
            200.max(spectrum::minimum_basis(*levels.end())),
            args.max_basis,
        ),
    };
    let opts = SpectrumOptions {
        levels: levels.clone(),
        basis,
        max_basis,
        digits: args.digits,
        squeeze: 1.0,
    };
    let start = Instant::now();
    let spec = spectrum::solve(&sel.laurent, &opts)?;
    let elapsed = start.elapsed().as_secs_f64();
    let mut inputs = family_inputs(&args.family, &sel);
    inputs["levels"] = json!([levels.start(), levels.end()]);
    inputs["basis"] = json!(args.basis);
    inputs["max_basis"] = json!(max_basis);
    inputs["digits"] = json!(args.digits);
    let doc = report::spectrum_json(sel.family.id, &spec, args.digits, inputs, elapsed);
    let table = report::spectrum_table(sel.family.id, &spec, args.digits, elapsed);
    Ok((doc, table))
}

/// Prints the JSON document or the table.
fn emit(json: bool, (doc, table): (Value, String)) -> Result<(), Failure> {
    if json {
        println!("{}", serde_json::to_string_pretty(&doc).expect("JSON"));
    } else {
        print!("{table}");
    }
    Ok(())
}

fn spectrum_command(args: &SpectrumArgs) -> Result<(), Failure> {
    emit(args.json, run_spectrum(args)?)
}

fn periods_command(args: &PeriodsArgs) -> Result<(), Failure> {
    check_digits(args.digits)?;
    let sel = select(&args.family)?;
    let bits = with_guard(bits_for_digits(args.digits as f64));
    let a = numbers::parse_modulus(&args.modulus, bits, &sel.laurent)?;
    let start = Instant::now();
    let terms = sel.laurent.constant_terms(2000).map_err(Failure::compute)?;
    let ac = rug::Complex::with_val(bits, (&a, 0));
    let cmp = periods::compare(&sel.laurent, &ac, &terms).map_err(Failure::compute)?;
    let elapsed = start.elapsed().as_secs_f64();
    let mut inputs = family_inputs(&args.family, &sel);
    inputs["modulus"] = json!(args.modulus);
    inputs["digits"] = json!(args.digits);
    let doc = report::periods_json(sel.family.id, &cmp, args.digits, bits, inputs, elapsed);
    emit(
        args.json,
        (
            doc,
            report::periods_table(
                sel.family.id,
                args.modulus.trim(),
                &cmp,
                args.digits,
                bits,
                elapsed,
            ),
        ),
    )
}

fn run_attractors(args: &AttractorsArgs) -> Result<(Value, String), Failure> {
    check_digits(args.digits)?;
    let sel = select(&args.family)?;
    let levels = numbers::parse_levels(&args.levels)?;
    let start = Instant::now();
    let list = attractor::solve_levels(&sel.laurent, levels.clone(), args.digits)
        .map_err(Failure::compute)?;
    let elapsed = start.elapsed().as_secs_f64();
    let mut inputs = family_inputs(&args.family, &sel);
    inputs["levels"] = json!([levels.start(), levels.end()]);
    inputs["digits"] = json!(args.digits);
    let doc = report::attractors_json(sel.family.id, &list, args.digits, inputs, elapsed);
    let table = report::attractors_table(sel.family.id, &list, args.digits, elapsed);
    Ok((doc, table))
}

fn attractors_command(args: &AttractorsArgs) -> Result<(), Failure> {
    emit(args.json, run_attractors(args)?)
}

fn csv(grid: &[f64], values: &[Option<Complex64>]) -> String {
    let mut out = String::from("r,re_psi,im_psi\n");
    for (r, v) in grid.iter().zip(values) {
        match v {
            Some(v) => out.push_str(&format!("{r:.12},{:.17e},{:.17e}\n", v.re, v.im)),
            None => out.push_str(&format!("{r:.12},nan,nan\n")),
        }
    }
    out
}

impl From<ProfileError> for Failure {
    fn from(e: ProfileError) -> Self {
        if e.is_input() {
            Failure::input(e)
        } else {
            Failure::compute(e)
        }
    }
}

/// The eigenfunction selected by `--level` / `--modulus`.
fn target_of(level: Option<usize>, modulus: &Option<String>) -> Result<Target, Failure> {
    match (level, modulus) {
        (Some(n), _) => Ok(Target::Level(n)),
        (None, Some(text)) => Ok(Target::Modulus(text.clone())),
        (None, None) => Err(Failure::input("give --level n or --modulus A")),
    }
}

/// The JSON record of a profile (psi.json).
fn profile_json(p: &Profile, family: &str, files: &[&str], inputs: Value, elapsed: f64) -> Value {
    json!({
        "family": family,
        "level": p.level,
        "modulus": report::decimal(&p.modulus, regwave::precision::digits_for_bits(p.modulus.prec()).max(17)),
        "nu": p.nu,
        "nu_distance_to_integer": p.nu_distance,
        "lambda": {"re": p.lambda.re, "im": p.lambda.im},
        "base_point": {"re": p.base.re, "im": p.base.im},
        "spine_im": p.spine,
        "precision_bits": p.precision_bits,
        "lambda_digits_lost": p.lambda_digits_lost,
        "cancellation_digits_lost_on_r": p.cancellation_digits,
        "digits_left_min_on_r": p.working_digits - p.cancellation_digits,
        "cancellation_digits_lost_on_strip_lines": p.strip_cancellation_digits,
        "phase_rule": match p.rule {
            Some(k) => json!({"k": k, "statement": format!("exp(-i*({k})*r^2/(8*pi)) * psi(r) is real (antiunitary symmetry m -> (m1 + ({k}) m2, -m2))"), "max_imaginary_part_relative": p.reality_defect}),
            None => json!({"k": null, "statement": "no pointwise reality rule for this family: the phase profile arg psi(r) is in psi.csv"}),
        },
        "normalization": {
            "rule": "unit L2 norm on R; with a phase rule, exp(-i k r^2/(8 pi)) psi real and positive where |psi| is largest on the grid, else psi itself",
            "raw_norm_squared": p.normalization.raw_norm_squared,
            "quadrature_range": [-p.normalization.range_ends[0], p.normalization.range_ends[1]],
            "quadrature_step": p.normalization.step,
            "tail_fraction": p.normalization.tail,
            "peak_r": p.normalization.peak,
        },
        "checks": {
            "decay_power_left": p.normalization.decay_power[0],
            "decay_power_right": p.normalization.decay_power[1],
            "eigen_equation_residual_max": p.residual.as_ref().map(|r| r.max),
            "eigen_equation_residual_rms": p.residual.as_ref().map(|r| r.rms),
            "residual_points_with_pole_limits": p.residual.as_ref().map(|r| r.pole_limits),
            "residual_note": "A psi(r-2pi i) + C psi(r+2pi i) - (B+a) psi(r), each value integrated along its own route, relative to max|psi| on the grid; at poles of psi the products are evaluated as limits (needs --strip)",
            "decay_rate_left": p.normalization.decay[0],
            "decay_rate_right": p.normalization.decay[1],
        },
        "poles": p.poles,
        "files": files,
        "tool_version": TOOL_VERSION,
        "inputs": inputs,
        "elapsed_s": elapsed,
        "note": "numerical evidence, not proofs",
    })
}

fn build_command(args: &BuildArgs) -> Result<(), Failure> {
    let start = Instant::now();
    check_digits(args.digits)?;
    let sel = select(&args.family)?;
    let grid = grid::Grid::parse(&args.grid).map_err(Failure::input)?;
    let target = target_of(args.target.level, &args.target.modulus)?;
    // Refuse to overwrite unless --force, before computing anything expensive.
    let files: Vec<&str> = if args.strip {
        vec!["psi.csv", "psi_up.csv", "psi_down.csv", "psi.json"]
    } else {
        vec!["psi.csv", "psi.json"]
    };
    refuse_existing(&args.out, &files, args.force)?;
    let options = ProfileOptions {
        grid: grid.values(),
        strip: args.strip,
        digits: args.digits,
        allow_non_attractor: args.target.allow_non_attractor,
    };
    let bar = progress_bar(2, args.digits <= 16, &format!("build {}", sel.family.id));
    let tick = |what: &str| {
        bar.set_message(what.to_string());
        bar.inc(1);
    };
    let p = profile::build_observed(&sel.laurent, &target, &options, &tick)?;
    bar.finish_and_clear();
    let elapsed = start.elapsed().as_secs_f64();
    let mut inputs = family_inputs(&args.family, &sel);
    inputs["level"] = json!(args.target.level);
    inputs["modulus"] = json!(args.target.modulus);
    inputs["grid"] = json!(args.grid);
    inputs["strip"] = json!(args.strip);
    inputs["digits"] = json!(args.digits);
    let doc = profile_json(&p, sel.family.id, &files, inputs, elapsed);
    let mut outputs = vec![("psi.csv", csv(&p.grid, &p.real_line))];
    if args.strip {
        outputs.push(("psi_up.csv", csv(&p.grid, &p.upper_line)));
        outputs.push(("psi_down.csv", csv(&p.grid, &p.lower_line)));
    }
    outputs.push((
        "psi.json",
        serde_json::to_string_pretty(&doc).expect("JSON"),
    ));
    write_all_atomic(&args.out, &outputs)?;
    eprintln!(
        "regwave build: wrote {} ({:.2} s)",
        args.out.display(),
        elapsed
    );
    Ok(())
}

/// Fails early (before any computation) when `dir` cannot be created or written.
fn ensure_writable(dir: &Path) -> Result<(), Failure> {
    let probe = dir.join(format!(".regwave-probe.{}", std::process::id()));
    std::fs::create_dir_all(dir)
        .and_then(|_| std::fs::write(&probe, b""))
        .and_then(|_| std::fs::remove_file(&probe))
        .map_err(|e| Failure::input(format!("cannot write into {}: {e}", dir.display())))
}

/// Refuses to replace existing outputs unless `force`.
fn refuse_existing(dir: &Path, files: &[&str], force: bool) -> Result<(), Failure> {
    if force {
        return Ok(());
    }
    match files.iter().find(|f| dir.join(f).exists()) {
        Some(f) => Err(Failure::input(format!(
            "{} exists; use --force to replace it",
            dir.join(f).display()
        ))),
        None => Ok(()),
    }
}

impl From<AuditError> for Failure {
    fn from(e: AuditError) -> Self {
        match e {
            AuditError::Profile(p) => p.into(),
            e => Failure::compute(e),
        }
    }
}

/// A progress bar on stderr when it is a terminal and output is not JSON; hidden otherwise.
fn progress_bar(len: u64, quiet: bool, label: &str) -> ProgressBar {
    if quiet || !std::io::stderr().is_terminal() {
        return ProgressBar::hidden();
    }
    let bar = ProgressBar::new(len);
    bar.set_style(
        ProgressStyle::with_template("{prefix} [{bar:30}] {pos}/{len} {msg} ({elapsed})")
            .expect("template")
            .progress_chars("=> "),
    );
    bar.set_prefix(label.to_string());
    bar
}

/// Runs one audit with a progress bar; returns the audit and its wall time.
fn run_audit(
    sel: &Selection,
    levels: std::ops::RangeInclusive<usize>,
    digits: u32,
    grid: &[f64],
    quiet: bool,
) -> Result<(Audit, f64), Failure> {
    let start = Instant::now();
    let stages = (levels.end() - levels.start() + 1) as u64 + 4;
    let bar = progress_bar(stages, quiet, &format!("audit {}", sel.family.id));
    let options = AuditOptions {
        levels,
        digits,
        grid: grid.to_vec(),
        perturbation: 1e-6,
        spectrum_basis: 200,
        spectrum_max_basis: 300,
    };
    let tick = |what: &str| {
        bar.set_message(what.to_string());
        bar.inc(1);
    };
    let audit = audit::run(&sel.laurent, &options, &tick)?;
    bar.finish_and_clear();
    Ok((audit, start.elapsed().as_secs_f64()))
}

fn audit_command(args: &AuditArgs) -> Result<(), Failure> {
    check_digits(args.digits)?;
    let sel = select(&args.family)?;
    let levels = numbers::parse_levels(&args.levels)?;
    let grid = grid::Grid::parse(&args.grid).map_err(Failure::input)?;
    let out = args
        .out
        .clone()
        .unwrap_or_else(|| PathBuf::from(format!("out/audit-{}", sel.family.id)));
    refuse_existing(&out, &["audit.md", "audit.json"], args.force)?;
    ensure_writable(&out)?;
    let (audit, elapsed) = run_audit(&sel, levels.clone(), args.digits, &grid.values(), args.json)?;
    let mut inputs = family_inputs(&args.family, &sel);
    inputs["levels"] = json!([levels.start(), levels.end()]);
    inputs["digits"] = json!(args.digits);
    inputs["grid"] = json!(args.grid);
    let doc = report::audit_json(sel.family.id, &audit, inputs, elapsed);
    let mut md = format!(
        "# regwave audit: {}\n\nGenerated by `regwave audit` (regwave {TOOL_VERSION}). Numerical evidence, not proofs.\n\n",
        sel.family.id
    );
    md.push_str(&report::audit_markdown(
        sel.family.id,
        &audit,
        args.digits,
        elapsed,
    ));
    md.push_str(report::COLUMNS_NOTE);
    let mut figs = family_figures(&sel, &audit)?;
    figs.push(figures::agreement(&[(sel.family.id, &audit)]).map_err(Failure::compute)?);
    md.push_str(&figure_links(&figs));
    let mut files = vec![
        ("audit.md".to_string(), md.clone().into_bytes()),
        (
            "audit.json".to_string(),
            serde_json::to_string_pretty(&doc)
                .expect("JSON")
                .into_bytes(),
        ),
    ];
    files.extend(figure_files(&figs, args.png)?);
    write_files_atomic(&out, &files)?;
    if args.json {
        println!("{}", serde_json::to_string_pretty(&doc).expect("JSON"));
    } else {
        print!("{md}");
        eprintln!("regwave audit: wrote {}", out.display());
    }
    unmatched_failure(sel.family.id, &audit)
}

/// Real parts and imaginary parts of the strip map.
fn strip_axes() -> (Vec<f64>, Vec<f64>) {
    let two_pi = 2.0 * std::f64::consts::PI;
    // 81 × 33 cells: enough to see the zeros and poles, small enough to commit as SVG.
    let re = (0..=80).map(|k| -8.0 + 0.2 * k as f64).collect();
    let im = (0..=32)
        .map(|k| -two_pi + two_pi * k as f64 / 16.0)
        .collect();
    (re, im)
}

/// The per-family figures of an audit: profiles, residuals, ν(a), and the strip map of the
/// middle audited level.
fn family_figures(sel: &Selection, audit: &Audit) -> Result<Vec<figures::Figure>, Failure> {
    let id = sel.family.id;
    let profiles: Vec<&Profile> = audit.levels.iter().map(|l| &l.profile).collect();
    let chosen = &audit.levels[audit.levels.len() / 2].profile;
    let (re, im) = strip_axes();
    let values = profile::strip_map(&sel.laurent, chosen, &re, &im)?;
    [
        figures::profiles(id, &profiles),
        figures::residuals(id, &profiles),
        figures::nu(id, audit),
        figures::strip(id, chosen, &re, &im, values),
    ]
    .into_iter()
    .map(|f| f.map_err(Failure::compute))
    .collect()
}

/// Markdown image links with captions.
fn figure_links(figs: &[figures::Figure]) -> String {
    let mut out = String::from("### Figures\n\n");
    for f in figs {
        out.push_str(&format!(
            "![{}]({}.svg)\n\n*{}*\n\n",
            f.name, f.name, f.caption
        ));
    }
    out
}

/// The SVG files of the figures, and their PNG versions when asked.
fn figure_files(figs: &[figures::Figure], png: bool) -> Result<Vec<(String, Vec<u8>)>, Failure> {
    let mut out = Vec::new();
    for f in figs {
        out.push((format!("{}.svg", f.name), f.svg.clone().into_bytes()));
        if png {
            let bytes = regwave::output::plot::to_png(&f.svg, 1280).map_err(Failure::compute)?;
            out.push((format!("{}.png", f.name), bytes));
        }
    }
    Ok(out)
}

/// Exit code 1 with the findings when some level is unmatched.
fn unmatched_failure(family: &str, audit: &Audit) -> Result<(), Failure> {
    if audit.unmatched.is_empty() {
        return Ok(());
    }
    let list: Vec<String> = audit
        .unmatched
        .iter()
        .map(|u| {
            format!(
                "{} {:.12} (label {}, nearest {:.12})",
                u.kind, u.value, u.label, u.nearest
            )
        })
        .collect();
    Err(Failure::compute(format!(
        "{family}: unmatched in the audit window: {}",
        list.join("; ")
    )))
}

fn check_command(args: &CheckArgs) -> Result<(), Failure> {
    let start = Instant::now();
    check_digits(args.digits)?;
    let sel = select(&args.family)?;
    let grid = grid::Grid::parse(&args.grid).map_err(Failure::input)?;
    let target = target_of(args.target.level, &args.target.modulus)?;
    let options = CheckOptions {
        grid: grid.values(),
        digits: args.digits,
        allow_non_attractor: args.target.allow_non_attractor,
        perturbation: 1e-6,
    };
    let c = level::check(&sel.laurent, &target, &options)?;
    let elapsed = start.elapsed().as_secs_f64();
    let mut inputs = family_inputs(&args.family, &sel);
    inputs["level"] = json!(args.target.level);
    inputs["modulus"] = json!(args.target.modulus);
    inputs["grid"] = json!(args.grid);
    inputs["digits"] = json!(args.digits);
    let doc = report::check_json(sel.family.id, &c, inputs, elapsed);
    if args.json {
        println!("{}", serde_json::to_string_pretty(&doc).expect("JSON"));
    } else {
        print!("{}", report::check_text(sel.family.id, &c, elapsed));
    }
    Ok(())
}

/// As [`write_all_atomic`] for owned names.
fn write_files_atomic(dir: &Path, files: &[(String, Vec<u8>)]) -> Result<(), Failure> {
    let borrowed: Vec<(&str, &[u8])> = files
        .iter()
        .map(|(n, c)| (n.as_str(), c.as_slice()))
        .collect();
    write_all_atomic(dir, &borrowed)
}

/// Writes several files into `dir` (names may hold subdirectories): every file goes to a
/// temporary name beside its target first and is renamed only when all were written, so a
/// failure leaves nothing half-written.
fn write_all_atomic<C: AsRef<[u8]>>(dir: &Path, files: &[(&str, C)]) -> Result<(), Failure> {
    let mut temps: Vec<(PathBuf, PathBuf)> = Vec::new();
    let cleanup = |temps: &[(PathBuf, PathBuf)]| {
        for (t, _) in temps {
            let _ = std::fs::remove_file(t);
        }
    };
    for (name, contents) in files {
        let target = dir.join(name);
        let parent = target.parent().unwrap_or(dir).to_path_buf();
        let file = target
            .file_name()
            .map(|n| n.to_string_lossy().into_owned())
            .unwrap_or_default();
        let tmp = parent.join(format!(".{file}.{}.tmp", std::process::id()));
        let written =
            std::fs::create_dir_all(&parent).and_then(|_| std::fs::write(&tmp, contents.as_ref()));
        if let Err(e) = written {
            cleanup(&temps);
            let _ = std::fs::remove_file(&tmp);
            return Err(Failure::input(format!(
                "cannot write {}: {e}",
                target.display()
            )));
        }
        temps.push((tmp, target));
    }
    for (k, (tmp, target)) in temps.iter().enumerate() {
        if let Err(e) = std::fs::rename(tmp, target) {
            cleanup(&temps[k..]);
            return Err(Failure::input(format!(
                "cannot write {}: {e}",
                target.display()
            )));
        }
    }
    Ok(())
}

/// Families, levels and the high-precision eigenfunction of the tour.
const TOUR_FAMILIES: [&str; 3] = ["F0", "P2", "dP3"];
const TOUR_LEVELS: std::ops::RangeInclusive<usize> = 0..=4;
const TOUR_GRID: &str = "-12:12:241";
const TOUR_HIGH: (&str, usize, u32, &str) = ("F0", 2, 40, "-10:10:201");

/// The tour: an audit of three families (levels 0..4, double precision where it suffices) and one
/// 40-digit eigenfunction with its residual, written as a report with figures.
fn tour(out: &Path, png: bool) -> Result<(), Failure> {
    let start = Instant::now();
    ensure_writable(out)?;
    let grid = grid::Grid::parse(TOUR_GRID)
        .map_err(Failure::input)?
        .values();
    let selections: Vec<Selection> = TOUR_FAMILIES
        .iter()
        .map(|id| selection::resolve(Some(id), None, None).map_err(Failure::from))
        .collect::<Result<_, _>>()?;
    eprintln!("regwave tour: auditing {} ...", TOUR_FAMILIES.join(", "));
    let bar = progress_bar(TOUR_FAMILIES.len() as u64 + 1, false, "tour");
    let audits: Vec<(Audit, f64)> = selections
        .par_iter()
        .map(|sel| {
            let done = run_audit(sel, TOUR_LEVELS, 16, &grid, true);
            bar.set_message(format!("{} audited", sel.family.id));
            bar.inc(1);
            done
        })
        .collect::<Result<_, _>>()?;
    bar.set_message(format!("{}-digit eigenfunction", TOUR_HIGH.2));
    bar.suspend(|| eprintln!("regwave tour: the {}-digit eigenfunction ...", TOUR_HIGH.2));
    let high_start = Instant::now();
    let high_sel = selection::resolve(Some(TOUR_HIGH.0), None, None)?;
    let high = profile::build(
        &high_sel.laurent,
        &Target::Level(TOUR_HIGH.1),
        &ProfileOptions {
            grid: grid::Grid::parse(TOUR_HIGH.3)
                .map_err(Failure::input)?
                .values(),
            strip: true,
            digits: TOUR_HIGH.2,
            allow_non_attractor: false,
        },
    )?;
    let high_elapsed = high_start.elapsed().as_secs_f64();
    bar.finish_and_clear();
    let mut figs = Vec::new();
    for (sel, (audit, _)) in selections.iter().zip(&audits) {
        figs.extend(family_figures(sel, audit)?);
    }
    let pairs: Vec<(&str, &Audit)> = TOUR_FAMILIES
        .iter()
        .copied()
        .zip(audits.iter().map(|a| &a.0))
        .collect();
    figs.push(figures::agreement(&pairs).map_err(Failure::compute)?);
    let mut high_fig = figures::residuals(
        &format!(
            "{} n = {}, {} digits",
            TOUR_HIGH.0, TOUR_HIGH.1, TOUR_HIGH.2
        ),
        &[&high],
    )
    .map_err(Failure::compute)?;
    high_fig.name = format!("residual-{}-{}digits", TOUR_HIGH.0, TOUR_HIGH.2);
    figs.push(high_fig);
    let elapsed = start.elapsed().as_secs_f64();
    let inputs = json!({
        "families": TOUR_FAMILIES,
        "levels": [TOUR_LEVELS.start(), TOUR_LEVELS.end()],
        "grid": TOUR_GRID,
        "digits": 16,
        "high_precision": {"family": TOUR_HIGH.0, "level": TOUR_HIGH.1, "digits": TOUR_HIGH.2, "grid": TOUR_HIGH.3},
    });
    let family_docs: Vec<Value> = selections
        .iter()
        .zip(&audits)
        .map(|(sel, (audit, t))| {
            let mut inputs = family_inputs(
                &FamilyArgs {
                    family: Some(sel.family.id.into()),
                    vertices: None,
                    coefficients: None,
                },
                sel,
            );
            inputs["levels"] = json!([TOUR_LEVELS.start(), TOUR_LEVELS.end()]);
            inputs["digits"] = json!(16);
            inputs["grid"] = json!(TOUR_GRID);
            report::audit_json(sel.family.id, audit, inputs, *t)
        })
        .collect();
    let high_files = ["psi.csv", "psi_up.csv", "psi_down.csv", "psi.json"];
    let mut high_inputs = family_inputs(
        &FamilyArgs {
            family: Some(TOUR_HIGH.0.into()),
            vertices: None,
            coefficients: None,
        },
        &high_sel,
    );
    high_inputs["level"] = json!(TOUR_HIGH.1);
    high_inputs["grid"] = json!(TOUR_HIGH.3);
    high_inputs["strip"] = json!(true);
    high_inputs["digits"] = json!(TOUR_HIGH.2);
    let high_doc = profile_json(&high, TOUR_HIGH.0, &high_files, high_inputs, high_elapsed);
    let doc = json!({
        "audits": family_docs,
        "high_precision": high_doc,
        "all_matched": audits.iter().all(|a| a.0.unmatched.is_empty()),
        "precision_bits": audits.iter().flat_map(|a| a.0.levels.iter().map(|l| l.profile.precision_bits)).chain([high.precision_bits]).max(),
        "tool_version": TOOL_VERSION,
        "inputs": inputs,
        "elapsed_s": elapsed,
        "note": "numerical evidence, not proofs",
    });
    let sections: Vec<(&str, &Audit, f64)> = TOUR_FAMILIES
        .iter()
        .copied()
        .zip(audits.iter().map(|a| (&a.0, a.1)))
        .map(|(f, (a, t))| (f, a, t))
        .collect();
    let mut md = report::tour_markdown(&sections, &high, TOUR_HIGH, high_elapsed, elapsed);
    md.push_str(report::COLUMNS_NOTE);
    md.push_str(&figure_links(&figs));
    let mut files: Vec<(String, Vec<u8>)> = vec![
        ("report.md".into(), md.into_bytes()),
        (
            "report.json".into(),
            serde_json::to_string_pretty(&doc)
                .expect("JSON")
                .into_bytes(),
        ),
        (
            "families.json".into(),
            serde_json::to_string_pretty(&report::families_json(catalogue::all()))
                .expect("JSON")
                .into_bytes(),
        ),
        (
            "families.txt".into(),
            report::families_table(catalogue::all()).into_bytes(),
        ),
    ];
    files.extend(figure_files(&figs, png)?);
    let dir = format!("psi-{}-{}-{}digits", TOUR_HIGH.0, TOUR_HIGH.1, TOUR_HIGH.2);
    let psi_files = [
        ("psi.csv", csv(&high.grid, &high.real_line)),
        ("psi_up.csv", csv(&high.grid, &high.upper_line)),
        ("psi_down.csv", csv(&high.grid, &high.lower_line)),
        (
            "psi.json",
            serde_json::to_string_pretty(&doc["high_precision"]).expect("JSON"),
        ),
    ];
    files.extend(
        psi_files
            .into_iter()
            .map(|(n, c)| (format!("{dir}/{n}"), c.into_bytes())),
    );
    write_files_atomic(out, &files)?;
    eprintln!("regwave tour: wrote {} ({:.1} s)", out.display(), elapsed);
    Ok(())
}
