//! Figures on small synthetic data (made-up demonstration values, not results): each SVG parses
//! as XML and holds its axis labels and data series; legend keys are drawn as their series are;
//! labels and legends keep off the curves; the heat map is one small raster a panel; PNGs have
//! the requested width, a PNG signature and visible content; PDFs are complete with the font
//! embedded; degenerate input is refused with a typed error.
//!
//! To look at the figures: `REGWAVE_PLOT_DIR=/tmp/figs cargo test --release --test plot --
//! --ignored` writes them there as SVG and PNG.

use num_complex::Complex64;
use regwave::output::plot::{
    agreement_plot, nu_plot, residual_plot, series_style, stacked_profiles, strip_heatmap, to_pdf,
    to_png, AgreementBars, NuCurve, PlotError, ProfileSeries, ResidualSeries, StripMap,
    FIGURE_SIZE, MISSING_CELL, STRIP_FIGURE_SIZE,
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

/// ψ sampled on the grid re × im (None where `psi` gives none).
fn sampled(
    re: &[f64],
    im: &[f64],
    psi: impl Fn(Complex64) -> Option<Complex64>,
) -> Vec<Vec<Option<Complex64>>> {
    im.iter()
        .map(|&y| re.iter().map(|&x| psi(Complex64::new(x, y))).collect())
        .collect()
}

/// ψ(z) = (z − 1.5) e^{−z²/6} on a 41 × 9 grid, unsampled near a pole on the upper line.
fn demo_strip() -> StripMap {
    let re = grid(-6.0, 6.0, 41);
    let im = grid(-2.0 * PI, 2.0 * PI, 9);
    let values = sampled(&re, &im, |z| {
        let near_pole = (z - Complex64::new(0.0, 2.0 * PI)).norm() < 0.5;
        (!near_pole).then(|| (z - 1.5) * (-z * z / 6.0).exp())
    });
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

/// Five levels in two clusters fourteen decades apart, as when some levels were computed at a
/// higher precision: the upper cluster runs flat up to the legend's corners.
fn clustered_residuals() -> Vec<ResidualSeries> {
    [-13.0, -12.2, -11.7, -26.0, -25.8]
        .iter()
        .enumerate()
        .map(|(n, &centre)| {
            let r = grid(-12.0, 12.0, 241);
            let residual = r
                .iter()
                .map(|&x| 10f64.powf(centre + 0.7 * (7.0 * x + n as f64).sin()))
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
            caps: vec![40.0; 6],
        },
        AgreementBars {
            family: "P2".into(),
            levels: (0..6).collect(),
            // At their caps, which fall with the level: each bar has its own.
            digits: vec![30.5, 29.2, f64::NAN, 27.1, 26.8, 25.0],
            caps: vec![30.5, 29.2, 28.4, 27.1, 26.8, 25.0],
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

/// Every figure of the demonstration data, titled or not.
fn all_figures(titled: bool) -> Vec<String> {
    let t = |s: &'static str| titled.then_some(s);
    vec![
        stacked_profiles(t("F0: eigenfunctions on ℝ"), &demo_profiles(), "Re ψ").unwrap(),
        strip_heatmap(t("F0, n = 1: ψ over the strip"), &demo_strip()).unwrap(),
        residual_plot(t("F0: residual"), &demo_residuals(), Some(DEMO_FLOOR)).unwrap(),
        nu_plot(t("F0: ν(a)"), &demo_nu()).unwrap(),
        agreement_plot(t("agreement"), &demo_agreement()).unwrap(),
    ]
}

#[test]
fn every_figure_parses_with_and_without_titles() {
    for titled in [true, false] {
        for svg in all_figures(titled) {
            let doc = parse(&svg);
            assert_eq!(doc.root_element().tag_name().name(), "svg");
            // resvg reads it too (the PNG and PDF come from the same document).
            assert!(to_png(&svg, 320).is_ok());
        }
    }
}

#[test]
fn the_titles_option_removes_the_titles() {
    let titles = [
        "F0: eigenfunctions on ℝ",
        "F0, n = 1: ψ over the strip",
        "F0: residual",
        "F0: ν(a)",
        "agreement",
    ];
    for ((with, without), title) in all_figures(true).iter().zip(all_figures(false)).zip(titles) {
        assert_texts(with, &[title]);
        assert!(!texts(&without).iter().any(|t| t == title), "{title} drawn");
        assert_eq!(texts(with).len(), texts(&without).len() + 1);
    }
}

#[test]
fn stacked_profiles_label_levels_and_moduli() {
    let series = demo_profiles();
    let svg = stacked_profiles(Some("F0"), &series, "Re ψ").unwrap();
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
fn strip_heatmap_has_both_panels_pi_ticks_and_a_marker_key() {
    let svg = strip_heatmap(Some("F0, n = 1: ψ on the strip"), &demo_strip()).unwrap();
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
            "arg ψ, from −π to π",
            "log₁₀|ψ|, colours clipped at the 2nd and 98th percentiles",
            "branch point",
            "pole of ψ",
        ],
    );
    // One pole: halo and ink in each panel and in the key.
    assert_eq!(count(&svg, "circle"), 2 * 3);
    // No poles, no branch points: no key.
    let bare = StripMap {
        poles: vec![],
        branch_points: vec![],
        ..demo_strip()
    };
    let svg = strip_heatmap(None, &bare).unwrap();
    assert!(!texts(&svg)
        .iter()
        .any(|t| t == "pole of ψ" || t == "branch point"));
}

/// The embedded PNG images of a document, decoded.
fn images(svg: &str) -> Vec<Pixmap> {
    use base64::Engine;
    parse(svg)
        .descendants()
        .filter(|n| n.has_tag_name("image"))
        .map(|n| {
            let href = n.attribute("href").expect("an image has an href");
            let data = href
                .strip_prefix("data:image/png;base64,")
                .expect("a PNG data URL");
            let bytes = base64::engine::general_purpose::STANDARD
                .decode(data)
                .expect("valid base64");
            Pixmap::decode_png(&bytes).expect("a decodable PNG")
        })
        .collect()
}

fn pixels_of(image: &Pixmap, colour: (u8, u8, u8)) -> usize {
    image
        .pixels()
        .iter()
        .filter(|p| (p.red(), p.green(), p.blue()) == colour)
        .count()
}

#[test]
fn heatmap_is_one_raster_image_a_panel_with_grey_where_unsampled() {
    let map = demo_strip();
    assert!(map.values.iter().flatten().any(|v| v.is_none()));
    let svg = strip_heatmap(None, &map).unwrap();
    let grey = (MISSING_CELL.0, MISSING_CELL.1, MISSING_CELL.2);
    let panels = images(&svg);
    assert_eq!(panels.len(), 2);
    for image in &panels {
        assert!(pixels_of(image, grey) > 0, "the unsampled disc is not grey");
    }
    let mut full = map.clone();
    full.values
        .iter_mut()
        .flatten()
        .for_each(|v| *v = Some(v.unwrap_or(Complex64::new(1.0, 0.0))));
    for image in images(&strip_heatmap(None, &full).unwrap()) {
        assert_eq!(pixels_of(&image, grey), 0);
    }
}

/// ψ(z) = (z − 1.5)(z + 2) e^{−z²/6} on the grid the reports use (81 × 33), one value near a
/// zero making a far outlier of log₁₀|ψ|.
fn realistic_strip() -> StripMap {
    let (re, im) = regwave::output::data::strip_axes();
    let values = sampled(&re, &im, |z| {
        Some((z - 1.6) * (z + 2.0) * (-z * z / 6.0).exp())
    });
    StripMap {
        re,
        im,
        values,
        poles: vec![[0.0, 2.0 * PI], [0.0, -2.0 * PI]],
        branch_points: vec![[5.3, 0.0], [-5.3, 0.0]],
    }
}

#[test]
fn heatmap_of_a_report_grid_is_small_and_clips_its_colours_at_percentiles() {
    let map = realistic_strip();
    let svg = strip_heatmap(Some("F0, n = 2: ψ over the strip"), &map).unwrap();
    assert!(svg.len() < 200_000, "{} bytes", svg.len());
    assert_eq!(count(&svg, "image"), 2);
    // The colour bars are steps, not a cell per grid value.
    assert!(count(&svg, "rect") < 400, "{} rects", count(&svg, "rect"));
    // Near the zero at 1.6 log₁₀|ψ| dips far below the rest: the colour bar's lowest tick
    // lies well above that minimum, and a pointed cap says values lie beyond.
    let logs: Vec<f64> = map
        .values
        .iter()
        .flatten()
        .map(|v| v.unwrap().norm().log10())
        .collect();
    let min = logs.iter().copied().fold(f64::INFINITY, f64::min);
    let ticks: Vec<f64> = texts(&svg)
        .iter()
        .filter_map(|t| t.replace('−', "-").parse::<f64>().ok())
        .collect();
    assert!(ticks.iter().all(|&t| t > min + 0.5), "{ticks:?} vs {min}");
}

#[test]
fn residual_plot_has_decades_legend_and_floor() {
    let series = demo_residuals();
    let svg = residual_plot(
        Some("F0: eigen-equation residual"),
        &series,
        Some(DEMO_FLOOR),
    )
    .unwrap();
    assert_texts(
        &svg,
        &["r", "relative residual", "n = 0", "n = 2", "floor 10⁻⁴⁰"],
    );
    assert!(texts(&svg).iter().any(|t| t.starts_with("10⁻")));
    // Each series is split by its NaN and its zero into two runs, and the floor is a line.
    assert!(count(&svg, "polyline") >= 2 * series.len());
    let without = residual_plot(None, &series, None).unwrap();
    assert!(count(&svg, "polyline") > count(&without, "polyline"));
    // A floor that is no power of ten, in the notation of the axis.
    let svg = residual_plot(None, &series, Some(f64::EPSILON / 2.0)).unwrap();
    assert_texts(&svg, &["floor 1.11 × 10⁻¹⁶"]);
}

/// (stroke, width, dash pattern) of the first polyline and (class, fill) of the first marker
/// in a node.
fn look(node: roxmltree::Node<'_, '_>) -> (Option<String>, Option<(String, String)>) {
    let line = node
        .descendants()
        .find(|n| n.has_tag_name("polyline"))
        .map(|n| {
            format!(
                "{} {} {}",
                n.attribute("stroke").unwrap_or(""),
                n.attribute("stroke-width").unwrap_or(""),
                n.attribute("stroke-dasharray").unwrap_or("solid")
            )
        });
    let marker = node
        .descendants()
        .find(|n| {
            n.attribute("class")
                .is_some_and(|c| c.starts_with("marker"))
        })
        .map(|n| {
            (
                n.attribute("class").unwrap().to_string(),
                n.attribute("fill").unwrap_or("").to_string(),
            )
        });
    (line, marker)
}

#[test]
fn legend_keys_are_drawn_as_their_series() {
    for svg in [
        residual_plot(None, &demo_residuals(), Some(DEMO_FLOOR)).unwrap(),
        nu_plot(None, &demo_nu()).unwrap(),
    ] {
        let doc = parse(&svg);
        let keys: Vec<_> = doc
            .descendants()
            .filter(|n| n.attribute("class") == Some("legend-key"))
            .collect();
        assert!(keys.len() >= 3);
        for key in keys {
            let label = key.attribute("aria-label").unwrap();
            let series = doc
                .descendants()
                .find(|n| {
                    n.attribute("class") == Some("series")
                        && n.attribute("aria-label") == Some(label)
                })
                .unwrap_or_else(|| panic!("no series named {label}"));
            let (key_line, key_marker) = look(key);
            let (line, marker) = look(series);
            if key_line.is_some() {
                assert_eq!(key_line, line, "{label}");
            }
            assert_eq!(key_marker, marker, "{label}");
        }
    }
    // Level n of the residuals is drawn in the n-th series style.
    let svg = residual_plot(None, &demo_residuals(), None).unwrap();
    let doc = parse(&svg);
    for n in 0..3 {
        let label = format!("n = {n}");
        let series = doc
            .descendants()
            .find(|x| {
                x.attribute("class") == Some("series") && x.attribute("aria-label") == Some(&label)
            })
            .unwrap();
        let style = series_style(n);
        assert_eq!(look(series).1.unwrap().1, style.colour.hex());
        assert_eq!(
            look(series).1.unwrap().0,
            format!("marker {}", style.marker.name())
        );
    }
}

/// Width of one line of text in DejaVu Sans, as the renderer lays it out.
fn text_width(content: &str, size: f64) -> f64 {
    use resvg::usvg;
    use std::sync::Arc;
    let mut db = usvg::fontdb::Database::new();
    db.load_font_source(usvg::fontdb::Source::Binary(Arc::new(
        dejavu::sans::regular(),
    )));
    db.set_sans_serif_family("DejaVu Sans");
    let options = usvg::Options {
        font_family: "DejaVu Sans".into(),
        fontdb: Arc::new(db),
        ..Default::default()
    };
    let doc = format!(
        r#"<svg xmlns="http://www.w3.org/2000/svg" width="2000" height="100"><text x="10" y="50" font-size="{size}">{content}</text></svg>"#
    );
    let tree = usvg::Tree::from_str(&doc, &options).unwrap();
    tree.root().abs_bounding_box().width() as f64
}

/// Box of every `<text>` inside a group of class `class`: (left, top, right, bottom).
fn text_boxes(doc: &roxmltree::Document<'_>, class: &str) -> Vec<(String, [f64; 4])> {
    doc.descendants()
        .filter(|n| n.attribute("class") == Some(class))
        .flat_map(|g| g.descendants().filter(|n| n.has_tag_name("text")))
        .map(|t| {
            let num = |a| t.attribute(a).unwrap().parse::<f64>().unwrap();
            let (x, y, size) = (num("x"), num("y"), num("font-size"));
            let content = t.text().unwrap().to_string();
            let w = text_width(&content, size);
            let left = match t.attribute("text-anchor") {
                Some("end") => x - w,
                Some("middle") => x - w / 2.0,
                _ => x,
            };
            // Ascent and descent of DejaVu Sans.
            (content, [left, y - 0.76 * size, left + w, y + 0.24 * size])
        })
        .collect()
}

/// Every polyline point of the data series, interpolated to half a pixel.
fn series_points(doc: &roxmltree::Document<'_>) -> Vec<(f64, f64)> {
    let mut out = Vec::new();
    for line in doc
        .descendants()
        .filter(|n| n.attribute("class") == Some("series"))
        .flat_map(|g| g.descendants().filter(|n| n.has_tag_name("polyline")))
    {
        let pts: Vec<(f64, f64)> = line
            .attribute("points")
            .unwrap()
            .split_whitespace()
            .map(|p| {
                let (x, y) = p.split_once(',').unwrap();
                (x.parse().unwrap(), y.parse().unwrap())
            })
            .collect();
        for w in pts.windows(2) {
            let steps = ((w[1].0 - w[0].0).hypot(w[1].1 - w[0].1) * 2.0)
                .ceil()
                .max(1.0) as usize;
            for k in 0..=steps {
                let t = k as f64 / steps as f64;
                out.push((
                    w[0].0 + t * (w[1].0 - w[0].0),
                    w[0].1 + t * (w[1].1 - w[0].1),
                ));
            }
        }
    }
    out
}

fn assert_clear_of_curves(svg: &str, class: &str, expected: usize) {
    let doc = parse(svg);
    let boxes = text_boxes(&doc, class);
    assert_eq!(boxes.len(), expected, "{class}: {boxes:?}");
    let points = series_points(&doc);
    for (label, [l, t, r, b]) in boxes {
        let hit = points
            .iter()
            .find(|(x, y)| (l..=r).contains(x) && (t..=b).contains(y));
        assert!(hit.is_none(), "{label:?} meets a curve at {hit:?}");
    }
}

#[test]
fn labels_and_legends_keep_off_the_curves() {
    let profiles = stacked_profiles(None, &demo_profiles(), "Re ψ").unwrap();
    assert_clear_of_curves(&profiles, "label", 4);
    assert_clear_of_curves(&profiles, "legend", 2);
    let nu = nu_plot(None, &demo_nu()).unwrap();
    assert_clear_of_curves(&nu, "label", demo_nu().crossings.len());
    assert_clear_of_curves(&nu, "legend", 3);
    // The residuals rise to both ends: the legend needs the head room made for it, with a
    // title band or without.
    for title in [None, Some("F0: residual")] {
        let residual = residual_plot(title, &demo_residuals(), Some(DEMO_FLOOR)).unwrap();
        assert_clear_of_curves(&residual, "legend", 4);
        let residual = residual_plot(title, &clustered_residuals(), None).unwrap();
        assert_clear_of_curves(&residual, "legend", 5);
    }

    // Where the preferred places are taken: a falling ν(a) fills the upper left corner (the
    // legend's first choice) and the upper left of each dot (a label's); profiles pushed to
    // the right end fill the places above their baselines at the right.
    let mut falling = demo_nu();
    falling.nu.iter_mut().for_each(|v| *v = 15.0 - *v);
    falling.crossings.iter_mut().for_each(|c| c.1 = 15 - c.1);
    let nu = nu_plot(None, &falling).unwrap();
    assert_clear_of_curves(&nu, "label", falling.crossings.len());
    assert_clear_of_curves(&nu, "legend", 3);
    let mut shifted = demo_profiles();
    for s in &mut shifted {
        s.r.iter_mut().for_each(|r| *r += 5.0);
    }
    let profiles = stacked_profiles(None, &shifted, "Re ψ").unwrap();
    assert_clear_of_curves(&profiles, "label", 4);
    assert_clear_of_curves(&profiles, "legend", 2);
}

#[test]
fn nu_plot_labels_crossings_by_level_and_marks_eigenvalues() {
    let curve = demo_nu();
    let svg = nu_plot(Some("F0"), &curve).unwrap();
    // ν = k at level n = k − 1, as levels are labelled everywhere.
    assert_texts(
        &svg,
        &[
            "ln a",
            "ν(a)",
            "n = 0",
            "n = 6",
            "independent spectrum",
            "ν ∈ ℤ: attractor modulus",
        ],
    );
    assert!(!texts(&svg).iter().any(|t| t.starts_with("ν = ")));
    assert!(!texts(&svg).iter().any(|t| t == "log a"));
    // Filled dots: one per crossing plus the legend key.
    let dots = parse(&svg)
        .descendants()
        .filter(|n| n.has_tag_name("circle") && n.attribute("fill") != Some("none"))
        .count();
    assert_eq!(dots, curve.crossings.len() + 1);
}

#[test]
fn agreement_plot_groups_families_with_a_cap_per_level() {
    let bars = demo_agreement();
    let svg = agreement_plot(None, &bars).unwrap();
    assert_texts(
        &svg,
        &[
            "level n",
            "agreement digits",
            "F0",
            "P2",
            "cap: spectrum's error estimate",
            "0",
            "5",
        ],
    );
    // 11 finite bars and two legend keys, in the two family colours.
    let coloured: usize = parse(&svg)
        .descendants()
        .filter(|n| n.has_tag_name("rect") && n.attribute("fill") != Some("none"))
        .filter(|n| n.attribute("fill") != Some("#ffffff"))
        .count();
    assert_eq!(coloured, 11 + 2);
    // One cap per level and family, each at its own height: P2's fall with the level.
    let doc = parse(&svg);
    let caps: Vec<f64> = doc
        .descendants()
        .filter(|n| n.attribute("class") == Some("cap"))
        .map(|g| {
            let line = g
                .descendants()
                .find(|n| n.has_tag_name("polyline"))
                .unwrap();
            let first = line
                .attribute("points")
                .unwrap()
                .split_whitespace()
                .next()
                .unwrap();
            first.split_once(',').unwrap().1.parse().unwrap()
        })
        .collect();
    assert_eq!(caps.len(), 12);
    let p2 = &caps[6..];
    assert!(p2.windows(2).all(|w| w[1] > w[0]), "P2 caps (px): {p2:?}");
    // F0's caps are all 40 digits: one height.
    assert!(caps[..6].windows(2).all(|w| (w[1] - w[0]).abs() < 1e-9));
}

// ---- PDF ---------------------------------------------------------------------------------

#[test]
fn pdf_of_each_figure_is_complete_with_the_font_embedded() {
    for svg in all_figures(false) {
        let pdf = to_pdf(&svg).unwrap();
        assert!(pdf.starts_with(b"%PDF-"));
        let end = String::from_utf8_lossy(&pdf[pdf.len() - 16..]).to_string();
        assert!(end.trim_end().ends_with("%%EOF"), "{end:?}");
        assert!(pdf.len() > 4000, "{} bytes", pdf.len());
        let text = String::from_utf8_lossy(&pdf);
        assert!(text.contains("/FontFile"), "no embedded font program");
        assert!(text.contains("DejaVu"), "not DejaVu Sans");
    }
    // The heat map's rasters become image objects.
    let strip = to_pdf(&strip_heatmap(None, &realistic_strip()).unwrap()).unwrap();
    assert!(String::from_utf8_lossy(&strip).contains("/Image"));
    assert!(matches!(to_pdf("not an svg"), Err(PlotError::SvgParse(_))));
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
    let svgs = all_figures(true);
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
        stacked_profiles(None, &[], "Re ψ"),
        Err(PlotError::NoSeries { .. })
    ));
    assert!(matches!(
        residual_plot(None, &[], None),
        Err(PlotError::NoSeries { .. })
    ));
    assert!(matches!(
        agreement_plot(None, &[]),
        Err(PlotError::NoSeries { .. })
    ));
    assert!(matches!(
        nu_plot(None, &NuCurve::default()),
        Err(PlotError::TooFewPoints { .. })
    ));
    assert!(matches!(
        strip_heatmap(None, &StripMap::default()),
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
        stacked_profiles(None, &[nan], "Re ψ"),
        Err(PlotError::TooFewPoints { plottable: 0, .. })
    ));
    let single = ResidualSeries {
        label: "n = 0".into(),
        r: vec![1.0, 2.0, 3.0],
        // Plot data: one plottable residual between a NaN and a negative value.
        residual: vec![f64::NAN, 1e-20, -1.0],
    };
    assert!(matches!(
        residual_plot(None, &[single], None),
        Err(PlotError::TooFewPoints { plottable: 1, .. })
    ));
    let mut nu = demo_nu();
    nu.nu.iter_mut().for_each(|v| *v = f64::NAN);
    assert!(matches!(
        nu_plot(None, &nu),
        Err(PlotError::TooFewPoints { .. })
    ));
    let mut bars = demo_agreement();
    bars[1].digits = vec![f64::NAN; 6];
    assert!(matches!(
        agreement_plot(None, &bars),
        Err(PlotError::TooFewPoints { .. })
    ));
}

#[test]
fn inconsistent_input_is_refused() {
    let mut short = demo_profile(1, 2.0);
    short.values.pop();
    assert!(matches!(
        stacked_profiles(None, &[short], "Re ψ"),
        Err(PlotError::LengthMismatch { .. })
    ));
    let mut zero = demo_profile(1, 2.0);
    zero.values
        .iter_mut()
        .for_each(|v| *v = Complex64::new(0.0, 0.0));
    assert!(matches!(
        stacked_profiles(None, &[zero], "Re ψ"),
        Err(PlotError::ZeroProfile { .. })
    ));
    let mut one_r = demo_profile(0, 1.0);
    one_r.r.iter_mut().for_each(|r| *r = 3.0);
    assert!(matches!(
        stacked_profiles(None, &[one_r], "Re ψ"),
        Err(PlotError::DegenerateRange { .. })
    ));

    let mut unsampled = demo_strip();
    unsampled
        .values
        .iter_mut()
        .flatten()
        .for_each(|v| *v = None);
    assert_eq!(
        strip_heatmap(None, &unsampled),
        Err(PlotError::NoSampledValue)
    );
    let mut ragged = demo_strip();
    ragged.values[3].pop();
    assert!(matches!(
        strip_heatmap(None, &ragged),
        Err(PlotError::GridRowLength { row: 3, .. })
    ));
    let mut outside = demo_strip();
    outside.im[8] = 7.0;
    assert!(matches!(
        strip_heatmap(None, &outside),
        Err(PlotError::OutsideStrip { .. })
    ));
    let mut unordered = demo_strip();
    unordered.re.swap(3, 4);
    assert!(matches!(
        strip_heatmap(None, &unordered),
        Err(PlotError::GridNotIncreasing { index: 4, .. })
    ));
}

#[test]
fn png_width_and_svg_errors() {
    let svg = agreement_plot(None, &demo_agreement()).unwrap();
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
    let names = [
        "profiles",
        "strip",
        "residual",
        "nu",
        "agreement",
        "residual-clustered",
    ];
    let mut figures = all_figures(true);
    figures.push(residual_plot(Some("clustered"), &clustered_residuals(), None).unwrap());
    for (name, svg) in names.iter().zip(figures) {
        std::fs::write(dir.join(format!("{name}.svg")), &svg).unwrap();
        std::fs::write(dir.join(format!("{name}.png")), to_png(&svg, 1280).unwrap()).unwrap();
        std::fs::write(dir.join(format!("{name}.pdf")), to_pdf(&svg).unwrap()).unwrap();
    }
}
