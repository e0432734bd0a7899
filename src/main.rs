//! The `regwave` command line: argument parsing, calls into the library, file writing.

use clap::{Args, Parser, Subcommand};
use num_complex::Complex64;
use regwave::eigenfn::{self, Eigenfunction};
use regwave::numeric::CNum;
use regwave::precision::{bits_for_digits, check_digits, with_guard, PrecisionError};
use regwave::selection::{self, Selection, SelectionError};
use regwave::spectrum::{self, SpectrumError, SpectrumOptions};
use regwave::{attractor, catalogue, periods, report, TOOL_VERSION};
use serde_json::{json, Value};
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
    /// The built-in demonstration, written into out/tour/.
    Tour {
        /// Output directory.
        #[arg(long, default_value = "out/tour")]
        out: PathBuf,
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

#[derive(Args, Clone)]
struct BuildArgs {
    #[command(flatten)]
    family: FamilyArgs,
    /// Level n (the attractor modulus with nu = n + 1).
    #[arg(long, conflicts_with = "modulus")]
    level: Option<usize>,
    /// An explicit modulus a (must be an attractor modulus unless --allow-non-attractor).
    #[arg(long, allow_hyphen_values = true)]
    modulus: Option<String>,
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
    /// Build even if the modulus is not an attractor modulus (the result is then not an eigenfunction).
    #[arg(long)]
    allow_non_attractor: bool,
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
        Command::Tour { out } => tour(&out),
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
    let levels = selection::parse_levels(&args.levels)?;
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
    let a = selection::parse_modulus(&args.modulus, bits, &sel.laurent)?;
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
    let levels = selection::parse_levels(&args.levels)?;
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

/// The sampled, normalized eigenfunction.
struct Samples {
    grid: Vec<f64>,
    main: Vec<Complex64>,
    up: Vec<Option<Complex64>>,
    down: Vec<Option<Complex64>>,
    norm: eigenfn::Normalization,
    lambda: Complex64,
    spine: f64,
    base: Complex64,
    residual: Option<f64>,
    poles: Vec<[f64; 2]>,
    rule: Option<i64>,
    reality_defect: Option<f64>,
    cancellation_digits: f64,
    strip_cancellation_digits: f64,
}

fn sample<T: CNum + Send + Sync>(
    laurent: &regwave::laurent::Laurent,
    a: T,
    digits: f64,
    grid: &[f64],
    strip: bool,
) -> Result<Samples, Failure> {
    let prec = a.prec();
    let eig = Eigenfunction::new(laurent, a, digits, None, 0.3).map_err(Failure::compute)?;
    let norm = eig.normalization(0.05).map_err(Failure::compute)?;
    let poles = eigenfn::strip_poles(eig.curve());
    // A pole is located and reported, never sampled (None). Values stay at the working
    // precision until the residual is formed (its terms are up to a·|ψ|: in f64 the residual
    // itself would be floored at 1e-16·a).
    let two_pi = 2.0 * std::f64::consts::PI;
    // The three lines are independent: computed in parallel.
    let line_at = |im: f64| {
        eig.psi_on_line_with_loss(grid, im)
            .map_err(Failure::compute)
    };
    let (main_res, (up_res, down_res)) = rayon::join(
        || line_at(0.0),
        || {
            if strip {
                rayon::join(|| line_at(two_pi).map(Some), || line_at(-two_pi).map(Some))
            } else {
                (Ok(None), Ok(None))
            }
        },
    );
    let (raw_main, cancellation_digits) = main_res?;
    let (raw_up, up_loss) = up_res?.unwrap_or((Vec::new(), 0.0));
    let (raw_down, down_loss) = down_res?.unwrap_or((Vec::new(), 0.0));
    let strip_cancellation_digits = cancellation_digits.max(up_loss).max(down_loss);
    let residual = if strip {
        let q = regwave::operator::QuantumCurve::new(laurent).map_err(Failure::input)?;
        let scale = raw_main
            .iter()
            .flatten()
            .map(|v| v.abs_f64())
            .fold(0.0, f64::max);
        let a_t = T::from_f64s(0.0, 0.0, prec) + eig.curve().modulus().clone();
        let mut worst: f64 = 0.0;
        for (k, &r) in grid.iter().enumerate() {
            if let (Some(d), Some(m), Some(u)) = (&raw_down[k], &raw_main[k], &raw_up[k]) {
                let c = q.coefficients(&T::from_f64s(r, 0.0, prec));
                let res =
                    c.down * d.clone() + (c.centre - a_t.clone()) * m.clone() + c.up * u.clone();
                worst = worst.max(res.abs_f64() / scale);
            }
        }
        Some(worst)
    } else {
        None
    };
    let round = |v: Vec<Option<T>>| -> Vec<Option<Complex64>> {
        v.into_iter()
            .map(|v| v.map(|v| v.to_c64() * norm.factor))
            .collect()
    };
    let mut main: Vec<Complex64> = round(raw_main)
        .into_iter()
        .map(|v| v.unwrap_or(Complex64::new(f64::NAN, f64::NAN)))
        .collect();
    let (mut up, mut down) = (round(raw_up), round(raw_down));
    // Phase: with a reality rule k, e^{−ikr²/(8π)}ψ is made real and positive at the grid point of
    // largest |ψ| (the normalization already made ψ itself positive at the peak on R).
    let rule = eigenfn::reality_rule(laurent);
    let mut reality_defect = None;
    if let Some(k) = rule {
        let g: Vec<Complex64> = main
            .iter()
            .zip(grid)
            .map(|(v, &r)| v * eigenfn::reality_factor(k, r))
            .collect();
        if let Some(peak) = g
            .iter()
            .copied()
            .filter(|v| v.is_finite())
            .max_by(|x, y| x.norm().total_cmp(&y.norm()))
        {
            let turn = (peak / peak.norm()).conj();
            for v in main.iter_mut() {
                *v *= turn;
            }
            for v in up.iter_mut().chain(down.iter_mut()).flatten() {
                *v *= turn;
            }
            let d = g
                .iter()
                .filter(|v| v.is_finite())
                .map(|v| (v * turn).im.abs())
                .fold(0.0, f64::max)
                / peak.norm();
            reality_defect = Some(d);
        }
    }
    Ok(Samples {
        grid: grid.to_vec(),
        main,
        up,
        down,
        norm,
        lambda: eig.lambda.to_c64(),
        spine: eig.spine,
        base: eig.base.z.to_c64(),
        residual,
        poles,
        rule,
        reality_defect,
        cancellation_digits,
        strip_cancellation_digits,
    })
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

fn build_command(args: &BuildArgs) -> Result<(), Failure> {
    let start = Instant::now();
    check_digits(args.digits)?;
    let sel = select(&args.family)?;
    let grid = eigenfn::Grid::parse(&args.grid).map_err(Failure::input)?;
    let bits = with_guard(bits_for_digits(args.digits.max(20) as f64));
    let mut fam = attractor::Family::new(&sel.laurent).map_err(Failure::compute)?;
    let (a, level, nu, distance) = match (args.level, &args.modulus) {
        (Some(n), _) => {
            let at = attractor::solve_levels(&sel.laurent, n..=n, args.digits.max(20))
                .map_err(Failure::compute)?;
            (at[0].modulus.clone(), Some(n), at[0].nu as f64, 0.0)
        }
        (None, Some(text)) => {
            let a = selection::parse_modulus(text, bits, &sel.laurent)?;
            let (nu, _, _, _) = fam.nu(&a, bits).map_err(Failure::compute)?;
            let nu = nu.to_f64();
            let distance = (nu - nu.round()).abs();
            if distance > 1e-6 && !args.allow_non_attractor {
                return Err(Failure::input(format!(
                    "the modulus {} is not an attractor modulus: nu = {nu:.12}, {distance:.3e} from the nearest integer {}; \
                     give --level n, or --allow-non-attractor to build anyway (the result is then not an eigenfunction)",
                    text.trim(),
                    nu.round()
                )));
            }
            let level = if distance <= 1e-6 && nu.round() >= 1.0 {
                Some(nu.round() as usize - 1)
            } else {
                None
            };
            (a, level, nu, distance)
        }
        (None, None) => return Err(Failure::input("give --level n or --modulus A")),
    };
    // Refuse to overwrite unless --force, before computing anything expensive.
    let files: Vec<&str> = if args.strip {
        vec!["psi.csv", "psi_up.csv", "psi_down.csv", "psi.json"]
    } else {
        vec!["psi.csv", "psi.json"]
    };
    if !args.force {
        if let Some(f) = files.iter().find(|f| args.out.join(f).exists()) {
            return Err(Failure::input(format!(
                "{} exists; use --force to replace it",
                args.out.join(f).display()
            )));
        }
    }
    let grid_values = grid.values();
    // The exponent integrals grow like |λ| = |R_α/Ω_α| (≈ 50 at F0 level 0, 2e5 at level 9), and
    // exp loses log₁₀|λ| digits: measured residual ≈ 2e-15·|λ| in double precision. When that
    // would exceed 1e-11 the working precision is raised (rug) by the digits lost.
    let lambda = {
        let curve = regwave::cover::Curve::new(&sel.laurent, Complex64::new(a.to_f64(), 0.0))
            .map_err(Failure::compute)?;
        let sing = curve.singular_points().map_err(Failure::compute)?;
        let alpha = periods::alpha_path(&curve, &sing, &regwave::cover::March::for_digits(15.0))
            .map_err(Failure::compute)?;
        (alpha.regulator / alpha.omega).norm()
    };
    let lost = lambda.max(1.0).log10();
    let digits = if args.digits <= 16 && 2e-15 * lambda > 1e-11 {
        (16.0 + lost).ceil()
    } else {
        args.digits as f64
    };
    let work_bits = with_guard(bits_for_digits(
        digits.max(args.digits as f64) + if args.digits > 16 { lost } else { 0.0 },
    ));
    let double = args.digits <= 16 && digits <= 16.0;
    // The modulus must carry the working precision: re-solve the attractor there if needed.
    let a = match (double, level, &args.modulus) {
        (false, Some(n), None) => {
            let d =
                regwave::precision::digits_for_bits(work_bits).min(regwave::precision::MAX_DIGITS);
            attractor::solve_levels(&sel.laurent, n..=n, d).map_err(Failure::compute)?[0]
                .modulus
                .clone()
        }
        _ => a,
    };
    let s = if double {
        sample(
            &sel.laurent,
            Complex64::new(a.to_f64(), 0.0),
            15.0,
            &grid_values,
            args.strip,
        )?
    } else {
        let a_work = rug::Float::with_val(work_bits, &a);
        sample(
            &sel.laurent,
            rug::Complex::with_val(work_bits, (&a_work, 0)),
            regwave::precision::digits_for_bits(work_bits) as f64,
            &grid_values,
            args.strip,
        )?
    };
    // The difference χ − χ∘ι̃ consumes digits where both are large (the strip lines at high
    // levels): if fewer than 12 digits would survive, redo the lines at a precision that covers
    // the loss plus 15 digits.
    let mut working_digits = if double {
        15.0
    } else {
        regwave::precision::digits_for_bits(work_bits) as f64
    };
    let (mut s, mut bits) = (s, if double { 53 } else { work_bits });
    // The loss is only measurable below the working precision, so the check repeats (at most
    // three times) until at least 12 digits are left everywhere on R. On the strip lines far out
    // at high levels |ψ| is astronomically small against |χ|: their accuracy is absolute
    // (relative to max|ψ| on R, as the residual is) and their loss is reported, not chased.
    for _ in 0..3 {
        if working_digits - s.cancellation_digits >= 12.0 {
            break;
        }
        let need = (15.0 + s.cancellation_digits.max(working_digits - 8.0) + 4.0)
            .ceil()
            .min(regwave::precision::MAX_DIGITS as f64);
        let retry_bits = with_guard(bits_for_digits(need));
        let d = regwave::precision::digits_for_bits(retry_bits).min(regwave::precision::MAX_DIGITS);
        let a_retry = match (level, &args.modulus) {
            (Some(n), None) => attractor::solve_levels(&sel.laurent, n..=n, d)
                .map_err(Failure::compute)?[0]
                .modulus
                .clone(),
            _ => rug::Float::with_val(retry_bits, &a),
        };
        let a_retry = rug::Float::with_val(retry_bits, &a_retry);
        s = sample(
            &sel.laurent,
            rug::Complex::with_val(retry_bits, (&a_retry, 0)),
            d as f64,
            &grid_values,
            args.strip,
        )?;
        bits = retry_bits;
        working_digits = d as f64;
    }
    let elapsed = start.elapsed().as_secs_f64();
    let mut inputs = family_inputs(&args.family, &sel);
    inputs["level"] = json!(args.level);
    inputs["modulus"] = json!(args.modulus);
    inputs["grid"] = json!(args.grid);
    inputs["strip"] = json!(args.strip);
    inputs["digits"] = json!(args.digits);
    let doc = json!({
        "family": sel.family.id,
        "level": level,
        "modulus": report::decimal(&a, args.digits.max(20)),
        "nu": nu,
        "nu_distance_to_integer": distance,
        "lambda": {"re": s.lambda.re, "im": s.lambda.im},
        "base_point": {"re": s.base.re, "im": s.base.im},
        "spine_im": s.spine,
        "precision_bits": bits,
        "lambda_digits_lost": lost,
        "cancellation_digits_lost_on_r": s.cancellation_digits,
        "digits_left_min_on_r": working_digits - s.cancellation_digits,
        "cancellation_digits_lost_on_strip_lines": if args.strip { Some(s.strip_cancellation_digits) } else { None },
        "phase_rule": match s.rule {
            Some(k) => json!({"k": k, "statement": format!("exp(-i*({k})*r^2/(8*pi)) * psi(r) is real (antiunitary symmetry m -> (m1 + ({k}) m2, -m2))"), "max_imaginary_part_relative": s.reality_defect}),
            None => json!({"k": null, "statement": "no pointwise reality rule for this family: the phase profile arg psi(r) is in psi.csv"}),
        },
        "normalization": {
            "rule": "unit L2 norm on R; with a phase rule, exp(-i k r^2/(8 pi)) psi real and positive where |psi| is largest on the grid, else psi itself",
            "raw_norm_squared": s.norm.raw_norm_squared,
            "quadrature_range": s.norm.range,
            "quadrature_step": s.norm.step,
            "tail_fraction": s.norm.tail,
            "peak_r": s.norm.peak,
        },
        "checks": {
            "eigen_equation_residual_max": s.residual,
            "residual_note": "A psi(r-2pi i) + C psi(r+2pi i) - (B+a) psi(r), each value integrated along its own route, max over the grid relative to max|psi| (needs --strip)",
            "decay_rate_left": s.norm.decay[0],
            "decay_rate_right": s.norm.decay[1],
        },
        "poles": s.poles,
        "files": files,
        "tool_version": TOOL_VERSION,
        "inputs": inputs,
        "elapsed_s": elapsed,
        "note": "numerical evidence, not proofs",
    });
    let main: Vec<Option<Complex64>> = s.main.iter().map(|v| Some(*v)).collect();
    let mut outputs = vec![("psi.csv", csv(&s.grid, &main))];
    if args.strip {
        outputs.push(("psi_up.csv", csv(&s.grid, &s.up)));
        outputs.push(("psi_down.csv", csv(&s.grid, &s.down)));
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

/// Writes several files into `dir`: every file goes to a temporary name first and is renamed
/// only when all were written, so a failure leaves nothing half-written.
fn write_all_atomic(dir: &Path, files: &[(&str, String)]) -> Result<(), Failure> {
    std::fs::create_dir_all(dir)
        .map_err(|e| Failure::input(format!("cannot create directory {}: {e}", dir.display())))?;
    let mut temps = Vec::new();
    for (name, contents) in files {
        let tmp = dir.join(format!(".{name}.{}.tmp", std::process::id()));
        if let Err(e) = std::fs::write(&tmp, contents) {
            for t in &temps {
                let _ = std::fs::remove_file(t);
            }
            let _ = std::fs::remove_file(&tmp);
            return Err(Failure::input(format!(
                "cannot write {}: {e}",
                dir.join(name).display()
            )));
        }
        temps.push(tmp);
    }
    for ((name, _), tmp) in files.iter().zip(&temps) {
        std::fs::rename(tmp, dir.join(name)).map_err(|e| {
            Failure::input(format!("cannot write {}: {e}", dir.join(name).display()))
        })?;
    }
    Ok(())
}

/// Writes `contents` to `path` atomically: a temporary file in the same directory, then rename.
fn write_atomic(path: &Path, contents: &str) -> Result<(), Failure> {
    let dir = path
        .parent()
        .filter(|d| !d.as_os_str().is_empty())
        .unwrap_or(Path::new("."));
    std::fs::create_dir_all(dir)
        .map_err(|e| Failure::input(format!("cannot create directory {}: {e}", dir.display())))?;
    let name = path
        .file_name()
        .map(|n| n.to_string_lossy().into_owned())
        .unwrap_or_default();
    let tmp = dir.join(format!(".{name}.{}.tmp", std::process::id()));
    std::fs::write(&tmp, contents)
        .map_err(|e| Failure::input(format!("cannot write {}: {e}", tmp.display())))?;
    std::fs::rename(&tmp, path).map_err(|e| {
        let _ = std::fs::remove_file(&tmp);
        Failure::input(format!("cannot write {}: {e}", path.display()))
    })
}

/// The tour: the catalogue and the independent spectra of three families.
fn tour(out: &Path) -> Result<(), Failure> {
    let start = Instant::now();
    let all = catalogue::all();
    write_atomic(
        &out.join("families.json"),
        &serde_json::to_string_pretty(&report::families_json(all)).expect("JSON"),
    )?;
    write_atomic(&out.join("families.txt"), &report::families_table(all))?;
    let mut md = String::from(
        "# regwave tour\n\nGenerated by `regwave tour` (regwave ".to_string()
            + TOOL_VERSION
            + "). Numerical evidence, not proofs.\n\n",
    );
    md.push_str("## Catalogue\n\n```\n");
    md.push_str(&report::families_table(all));
    md.push_str("```\n\n## Attractor moduli against the independent spectrum (hbar = 2 pi)\n\n");
    md.push_str("Attractor moduli a_n (nu(a_n) = n + 1, 30 digits confirmed by a second solve at higher precision) and the\n");
    md.push_str("harmonic-oscillator eigenvalues (basis 200 and its 300 check); agreement = digits on which they coincide,\n");
    md.push_str("limited by the spectrum's own error estimate.\n\n");
    for id in ["F0", "P2", "dP3"] {
        eprintln!("regwave tour: {id} ...");
        let fam = FamilyArgs {
            family: Some(id.into()),
            vertices: None,
            coefficients: None,
        };
        let spec_args = SpectrumArgs {
            family: fam.clone(),
            levels: "0..4".into(),
            basis: Some(200),
            max_basis: 300,
            digits: 16,
            json: true,
        };
        let (spec_doc, spec_table) = run_spectrum(&spec_args)?;
        let at_args = AttractorsArgs {
            family: fam,
            levels: "0..4".into(),
            digits: 30,
            json: true,
        };
        let (at_doc, at_table) = run_attractors(&at_args)?;
        write_atomic(
            &out.join(format!("spectrum-{id}.json")),
            &serde_json::to_string_pretty(&spec_doc).expect("JSON"),
        )?;
        write_atomic(
            &out.join(format!("attractors-{id}.json")),
            &serde_json::to_string_pretty(&at_doc).expect("JSON"),
        )?;
        md.push_str(&format!("### {id}\n\n| level | nu | attractor modulus a_n | spectrum | error estimate | agreement digits |\n|---:|---:|---|---|---|---:|\n"));
        let ats = at_doc["attractors"].as_array().cloned().unwrap_or_default();
        let evs = spec_doc["eigenvalues"]
            .as_array()
            .cloned()
            .unwrap_or_default();
        for (a, e) in ats.iter().zip(&evs) {
            let am: f64 = a["modulus"]
                .as_str()
                .unwrap_or("0")
                .parse()
                .unwrap_or(f64::NAN);
            let em: f64 = e["value"]
                .as_str()
                .unwrap_or("0")
                .parse()
                .unwrap_or(f64::NAN);
            let agree = if am == em {
                16.0
            } else {
                -((am - em).abs() / am).log10()
            };
            md.push_str(&format!(
                "| {} | {} | {} | {} | {} | {:.1} |\n",
                a["level"],
                a["nu"],
                a["modulus"].as_str().unwrap_or(""),
                e["value"].as_str().unwrap_or(""),
                e["error_estimate"].as_str().unwrap_or(""),
                agree
            ));
        }
        md.push_str(&format!("\n<details><summary>tables</summary>\n\n```\n{at_table}\n{spec_table}```\n</details>\n\n"));
    }
    md.push_str(&format!(
        "Total time {:.1} s.\n",
        start.elapsed().as_secs_f64()
    ));
    write_atomic(&out.join("report.md"), &md)?;
    eprintln!("regwave tour: wrote {}", out.display());
    Ok(())
}
