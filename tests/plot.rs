//! Figures on small synthetic data (made-up demonstration values, not results): each SVG parses
//! as XML and holds its axis labels and data series; PNGs have the requested width, a PNG
//! signature and visible content; degenerate input is refused with a typed error.
//!
//! To look at the figures: `REGWAVE_PLOT_DIR=/tmp/figs cargo test --release --test plot --
//! --ignored` writes them there as SVG and PNG.

use num_complex::Complex64;
use regwave::output::plot::{
    agreement_plot, nu_plot, residual_plot, stacked_profiles, strip_heatmap, to_png, AgreementBars,
    NuCurve, PlotError, ProfileSeries, ResidualSeries, StripMap, FIGURE_SIZE, MISSING_CELL,
    STRIP_FIGURE_SIZE,
};
use resvg::tiny_skia::Pixmap;
use std::f64::consts::PI;

// ---- demonstration data ------------------------------------------------------------------

/// Plot data, not a tolerance: the floor line of the demo residual plots, at a decade so that
/// its label reads "floor 10⁻⁴⁰".
const DEMO_FLOOR: f64 = 1e-40;

fn grid(lo: f64, hi: f64, n: usize) -> Vec<f64> {
    (0..n)
        .map(|i| lo + (hi - lo) * i as f64 / (n - 1) as f64)
        .collect()
}

/// Hermite functions with a quadratic phase: shaped like eigenfunctions, nothing more.
fn demo_profile(level: usize, modulus: f64) -> ProfileSeries {
    let r = grid(-8.0, 8.0, 321);
    let values = r
        .iter()
        .map(|&x| {
            let (mut h0, mut h1) = (1.0, 2.0 * x / 2.0);
            for k in 1..level {
                (h0, h1) = (h1, x * h1 - k as f64 * h0);
            }
            let h = if level == 0 { h0 } else { h1 };
            Complex64::from_polar(h * (-x * x / 4.0).exp(), x * x / (8.0 * PI))
        })
        .collect();
    ProfileSeries {
        level,
        modulus,
        r,
        values,
    }
}

fn demo_profiles() -> Vec<ProfileSeries> {
    let moduli = [17.8466, 51.0173, 112.4902, 218.7071];
    let mut series: Vec<_> = moduli
        .iter()
        .enumerate()
        .map(|(n, &a)| demo_profile(n, a))
        .collect();
    // A stretch not sampled: a gap in the curves of level 2.
    for v in &mut series[2].values[100..110] {
        *v = Complex64::new(f64::NAN, f64::NAN);
    }
    series
}

/// ψ(z) = (z − 1.5) e^{−z²/6} on a 41 × 9 grid, unsampled near a pole on the upper line.
fn demo_strip() -> StripMap {
    let re = grid(-6.0, 6.0, 41);
    let im = grid(-2.0 * PI, 2.0 * PI, 9);
    let values = im
        .iter()
        .map(|&y| {
            re.iter()
                .map(|&x| {
                    let z = Complex64::new(x, y);
                    let near_pole = (z - Complex64::new(0.0, 2.0 * PI)).norm() < 0.5;
                    (!near_pole).then(|| (z - 1.5) * (-z * z / 6.0).exp())
                })
                .collect()
        })
        .collect();
    StripMap {
        re,
        im,
        values,
        poles: vec![[0.0, 2.0 * PI]],
        branch_points: vec![[1.2, PI], [-1.2, -PI]],
    }
}

fn demo_residuals() -> Vec<ResidualSeries> {
    (0..3)
        .map(|n| {
            let r = grid(-10.0, 10.0, 201);
            let residual = r
                .iter()
                .enumerate()
                .map(|(i, &x)| match i {
                    50 => f64::NAN, // not computed
                    51 => 0.0,      // exact: no logarithm
                    _ => 10f64.powf(-45.0 + 0.8 * x.abs() + 2.0 * n as f64),
                })
                .collect();
            ResidualSeries {
                label: format!("n = {n}"),
                r,
                residual,
            }
        })
        .collect()
}

fn demo_nu() -> NuCurve {
    let log_a = grid(2.0, 6.0, 161);
    // ν = (log a)²/4 − 1, crossing the integers at log a = 2√(k + 1).
    let nu = log_a.iter().map(|l| l * l / 4.0 - 1.0).collect();
    let crossings: Vec<(f64, i64)> = (1..=7)
        .map(|k| (2.0 * ((k + 1) as f64).sqrt(), k))
        .collect();
    // Plot data, not a tolerance: the eigenvalue markers a hair off the crossings they match.
    let eigenvalues_log_a = crossings.iter().map(|c| c.0 + 1e-9).collect();
    NuCurve {
        log_a,
        nu,
        crossings,
        eigenvalues_log_a,
    }
}

fn demo_agreement() -> Vec<AgreementBars> {
    vec![
        AgreementBars {
            family: "F0".into(),
            levels: (0..6).collect(),
            digits: vec![39.2, 38.8, 38.1, 37.0, 36.4, 35.9],
            cap: 40.0,
        },
        AgreementBars {
            family: "P2".into(),
            levels: (0..6).collect(),
            digits: vec![39.5, 38.2, f64::NAN, 36.1, 34.8, 33.0],
            cap: 40.0,
        },
    ]
}

// ---- reading the documents ---------------------------------------------------------------

fn parse(svg: &str) -> roxmltree::Document<'_> {
    roxmltree::Document::parse(svg).expect("the SVG is well-formed XML")
}

fn texts(svg: &str) -> Vec<String> {
    parse(svg)
        .descendants()
        .filter(|n| n.has_tag_name("text"))
        .map(|n| n.text().unwrap_or("").trim().to_string())
        .collect()
}

fn count(svg: &str, tag: &str) -> usize {
    parse(svg)
        .descendants()
        .filter(|n| n.has_tag_name(tag))
        .count()
}

fn count_fill(svg: &str, tag: &str, fill: &str) -> usize {
    parse(svg)
        .descendants()
        .filter(|n| n.has_tag_name(tag) && n.attribute("fill") == Some(fill))
        .count()
}

fn assert_texts(svg: &str, wanted: &[&str]) {
    let texts = texts(svg);
    for w in wanted {
        assert!(
            texts.iter().any(|t| t == w),
            "no <text> reads {w:?}; texts: {texts:?}"
        );
    }
}

fn svg_size(svg: &str) -> (u32, u32) {
    let doc = parse(svg);
    let root = doc.root_element();
    let dim = |a| root.attribute(a).and_then(|v| v.parse().ok()).unwrap();
    (dim("width"), dim("height"))
}

// ---- the figures -------------------------------------------------------------------------

#[test]
fn stacked_profiles_label_levels_and_moduli() {
    let series = demo_profiles();
    let svg = stacked_profiles("F0", &series, "Re ψ").unwrap();
    assert_eq!(svg_size(&svg), FIGURE_SIZE);
    assert_texts(
        &svg,
        &[
            "r",
            "level n (offset ψₙ)",
            "n = 0",
            "n = 3",
            "a = 17.8466",
            "a = 218.707",
            "Re ψ",
            "±|ψ|",
        ],
    );
    // Three curves a level (Re ψ, +|ψ|, −|ψ|), the gap in level 2 splitting three of them.
    assert!(count(&svg, "polyline") >= 3 * series.len() + 3);
}

#[test]
fn strip_heatmap_has_both_panels_and_pi_ticks() {
    let svg = strip_heatmap("F0, n = 1: ψ on the strip", &demo_strip()).unwrap();
    assert_eq!(svg_size(&svg), STRIP_FIGURE_SIZE);
    assert_texts(
        &svg,
        &[
            "Re r",
            "Im r",
            "−2π",
            "−π",
            "0",
            "π",
            "2π",
            "arg ψ",
            "log₁₀|ψ|",
        ],
    );
    // One pole (two circles: halo and ink), two branch points (crosses are two paths each).
    assert_eq!(count(&svg, "circle"), 2 * 2);
}

#[test]
fn heatmap_draws_one_cell_per_grid_value_and_grey_for_each_missing_one() {
    let map = demo_strip();
    let missing = map.values.iter().flatten().filter(|v| v.is_none()).count();
    assert!(missing > 0);
    let svg = strip_heatmap("cells", &map).unwrap();
    let grey = format!(
        "#{:02X}{:02X}{:02X}",
        MISSING_CELL.0, MISSING_CELL.1, MISSING_CELL.2
    );
    assert_eq!(count_fill(&svg, "rect", &grey), 2 * missing);

    // Dropping one column removes exactly one cell per row in each of the two panels.
    let mut narrower = map.clone();
    narrower.re.pop();
    narrower.values.iter_mut().for_each(|row| {
        row.pop();
    });
    let fewer = strip_heatmap("cells", &narrower).unwrap();
    assert_eq!(
        count(&svg, "rect") - count(&fewer, "rect"),
        2 * map.im.len()
    );
}

#[test]
fn residual_plot_has_decades_legend_and_floor() {
    let series = demo_residuals();
    let svg = residual_plot("F0: eigen-equation residual", &series, Some(DEMO_FLOOR)).unwrap();
    assert_texts(
        &svg,
        &["r", "relative residual", "n = 0", "n = 2", "floor 10⁻⁴⁰"],
    );
    assert!(texts(&svg).iter().any(|t| t.starts_with("10⁻")));
    // Each series is split by its NaN and its zero into two runs, and the floor is dashed.
    assert!(count(&svg, "polyline") >= 2 * series.len());
    let without = residual_plot("", &series, None).unwrap();
    assert!(count(&svg, "polyline") + count(&svg, "path") > count(&without, "polyline"));
}

#[test]
fn nu_plot_marks_crossings_and_eigenvalues() {
    let curve = demo_nu();
    let svg = nu_plot("F0", &curve).unwrap();
    assert_texts(
        &svg,
        &["log a", "ν(a)", "ν = 1", "ν = 7", "independent spectrum"],
    );
    // Filled dots: one per crossing plus the legend key.
    let dots = parse(&svg)
        .descendants()
        .filter(|n| n.has_tag_name("circle") && n.attribute("fill") != Some("none"))
        .count();
    assert_eq!(dots, curve.crossings.len() + 1);
}

#[test]
fn agreement_plot_groups_families() {
    let bars = demo_agreement();
    let svg = agreement_plot(&bars).unwrap();
    assert_texts(
        &svg,
        &[
            "level n",
            "agreement digits",
            "F0",
            "P2",
            "cap 40 digits",
            "0",
            "5",
        ],
    );
    // 11 finite bars and two legend keys, in the two family colours.
    let coloured: usize = parse(&svg)
        .descendants()
        .filter(|n| n.has_tag_name("rect") && n.attribute("fill") != Some("none"))
        .filter(|n| n.attribute("fill") != Some("#FFFFFF"))
        .count();
    assert_eq!(coloured, 11 + 2);
}

// ---- PNG ---------------------------------------------------------------------------------

fn non_white_pixels(png: &[u8]) -> usize {
    let pixmap = Pixmap::decode_png(png).expect("a decodable PNG");
    pixmap
        .pixels()
        .iter()
        .filter(|p| (p.red(), p.green(), p.blue()) != (255, 255, 255))
        .count()
}

fn assert_png(png: &[u8], width: u32) {
    assert_eq!(&png[..8], b"\x89PNG\r\n\x1a\n");
    let ihdr_width = u32::from_be_bytes(png[16..20].try_into().unwrap());
    assert_eq!(ihdr_width, width);
    assert!(non_white_pixels(png) > 1000, "the PNG is (almost) blank");
}

#[test]
fn png_of_each_figure_has_the_width_asked_for() {
    let svgs = [
        stacked_profiles("F0", &demo_profiles(), "Re ψ").unwrap(),
        strip_heatmap("strip", &demo_strip()).unwrap(),
        residual_plot("residual", &demo_residuals(), Some(DEMO_FLOOR)).unwrap(),
        nu_plot("F0", &demo_nu()).unwrap(),
        agreement_plot(&demo_agreement()).unwrap(),
    ];
    for (svg, width) in svgs.iter().zip([640, 800, 1280, 320, 960]) {
        assert_png(&to_png(svg, width).unwrap(), width);
    }
}

#[test]
fn png_text_is_rendered_with_the_embedded_font() {
    // Nothing but text: without a usable font the raster would be blank.
    let svg = r#"<svg xmlns="http://www.w3.org/2000/svg" width="200" height="40">
        <text x="10" y="30" font-family="sans-serif" font-size="24">ν = 1, ψₙ</text></svg>"#;
    let png = to_png(svg, 200).unwrap();
    assert!(non_white_pixels(&png) > 100);
}

// ---- degenerate input --------------------------------------------------------------------

#[test]
fn empty_input_is_refused() {
    assert!(matches!(
        stacked_profiles("F0", &[], "Re ψ"),
        Err(PlotError::NoSeries { .. })
    ));
    assert!(matches!(
        residual_plot("", &[], None),
        Err(PlotError::NoSeries { .. })
    ));
    assert!(matches!(
        agreement_plot(&[]),
        Err(PlotError::NoSeries { .. })
    ));
    assert!(matches!(
        nu_plot("F0", &NuCurve::default()),
        Err(PlotError::TooFewPoints { .. })
    ));
    assert!(matches!(
        strip_heatmap("", &StripMap::default()),
        Err(PlotError::GridTooSmall { .. })
    ));
}

#[test]
fn all_nan_and_single_points_are_refused() {
    let mut nan = demo_profile(0, 1.0);
    nan.values
        .iter_mut()
        .for_each(|v| *v = Complex64::new(f64::NAN, 0.0));
    assert!(matches!(
        stacked_profiles("F0", &[nan], "Re ψ"),
        Err(PlotError::TooFewPoints { plottable: 0, .. })
    ));
    let single = ResidualSeries {
        label: "n = 0".into(),
        r: vec![1.0, 2.0, 3.0],
        // Plot data: one plottable residual between a NaN and a negative value.
        residual: vec![f64::NAN, 1e-20, -1.0],
    };
    assert!(matches!(
        residual_plot("", &[single], None),
        Err(PlotError::TooFewPoints { plottable: 1, .. })
    ));
    let mut nu = demo_nu();
    nu.nu.iter_mut().for_each(|v| *v = f64::NAN);
    assert!(matches!(
        nu_plot("F0", &nu),
        Err(PlotError::TooFewPoints { .. })
    ));
    let mut bars = demo_agreement();
    bars[1].digits = vec![f64::NAN; 6];
    assert!(matches!(
        agreement_plot(&bars),
        Err(PlotError::TooFewPoints { .. })
    ));
}

#[test]
fn inconsistent_input_is_refused() {
    let mut short = demo_profile(1, 2.0);
    short.values.pop();
    assert!(matches!(
        stacked_profiles("F0", &[short], "Re ψ"),
        Err(PlotError::LengthMismatch { .. })
    ));
    let mut zero = demo_profile(1, 2.0);
    zero.values
        .iter_mut()
        .for_each(|v| *v = Complex64::new(0.0, 0.0));
    assert!(matches!(
        stacked_profiles("F0", &[zero], "Re ψ"),
        Err(PlotError::ZeroProfile { .. })
    ));
    let mut one_r = demo_profile(0, 1.0);
    one_r.r.iter_mut().for_each(|r| *r = 3.0);
    assert!(matches!(
        stacked_profiles("F0", &[one_r], "Re ψ"),
        Err(PlotError::DegenerateRange { .. })
    ));

    let mut unsampled = demo_strip();
    unsampled
        .values
        .iter_mut()
        .flatten()
        .for_each(|v| *v = None);
    assert_eq!(
        strip_heatmap("", &unsampled),
        Err(PlotError::NoSampledValue)
    );
    let mut ragged = demo_strip();
    ragged.values[3].pop();
    assert!(matches!(
        strip_heatmap("", &ragged),
        Err(PlotError::GridRowLength { row: 3, .. })
    ));
    let mut outside = demo_strip();
    outside.im[8] = 7.0;
    assert!(matches!(
        strip_heatmap("", &outside),
        Err(PlotError::OutsideStrip { .. })
    ));
    let mut unordered = demo_strip();
    unordered.re.swap(3, 4);
    assert!(matches!(
        strip_heatmap("", &unordered),
        Err(PlotError::GridNotIncreasing { index: 4, .. })
    ));
}

#[test]
fn png_width_and_svg_errors() {
    let svg = agreement_plot(&demo_agreement()).unwrap();
    assert!(matches!(to_png(&svg, 0), Err(PlotError::PngSize { .. })));
    assert!(matches!(
        to_png(&svg, 100_000),
        Err(PlotError::PngSize { .. })
    ));
    let tall = r#"<svg xmlns="http://www.w3.org/2000/svg" width="10" height="10000"/>"#;
    assert!(matches!(
        to_png(tall, 100),
        Err(PlotError::PngSize {
            height: 100_000,
            ..
        })
    ));
    assert!(matches!(
        to_png("not an svg", 100),
        Err(PlotError::SvgParse(_))
    ));
}

/// Writes the demonstration figures for a look; run as described in the file's doc comment.
#[test]
#[ignore]
fn write_demo_figures() {
    let Some(dir) = std::env::var_os("REGWAVE_PLOT_DIR") else {
        return;
    };
    let dir = std::path::PathBuf::from(dir);
    std::fs::create_dir_all(&dir).unwrap();
    let figures = [
        (
            "profiles",
            stacked_profiles("F0", &demo_profiles(), "Re ψ").unwrap(),
        ),
        ("strip", strip_heatmap("F0, n = 1", &demo_strip()).unwrap()),
        (
            "residual",
            residual_plot("F0: residual", &demo_residuals(), Some(DEMO_FLOOR)).unwrap(),
        ),
        ("nu", nu_plot("F0", &demo_nu()).unwrap()),
        ("agreement", agreement_plot(&demo_agreement()).unwrap()),
    ];
    for (name, svg) in figures {
        std::fs::write(dir.join(format!("{name}.svg")), &svg).unwrap();
        std::fs::write(dir.join(format!("{name}.png")), to_png(&svg, 1280).unwrap()).unwrap();
    }
}
