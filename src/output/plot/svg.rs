//! The SVG writer of the figures: a document of nominal pixel size built element by element,
//! with clip regions, dashed strokes, markers and embedded raster images.
//!
//! # Method
//! Coordinates are nominal pixels (user units of the document, y downwards) written with two
//! decimals; text is SVG `<text>` in the generic `sans-serif` family positioned at its
//! baseline, so that no renderer-specific baseline attribute is needed. Series are grouped in
//! `<g class="series" aria-label="…">` and their legend keys in
//! `<g class="legend-key" aria-label="…">`, which names each element for readers of the
//! document and for the tests.
//!
//! # Accuracy
//! Positions to 0.01 px. `tests/plot.rs` parses every figure as XML.
//!
//! # References
//! - Scalable Vector Graphics (SVG) 1.1 (Second Edition), W3C Recommendation, 2011.

use std::fmt::Write;

/// An sRGB colour.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Rgb(pub u8, pub u8, pub u8);

impl Rgb {
    /// "#rrggbb".
    pub fn hex(self) -> String {
        format!("#{:02x}{:02x}{:02x}", self.0, self.1, self.2)
    }
}

pub(super) const WHITE: Rgb = Rgb(0xff, 0xff, 0xff);

/// A stroke: colour, width and dash pattern (lengths in nominal px; empty: solid).
#[derive(Debug, Clone, Copy, PartialEq)]
pub(super) struct Stroke {
    pub(super) colour: Rgb,
    pub(super) width: f64,
    pub(super) dash: &'static [f64],
    pub(super) opacity: f64,
}

impl Stroke {
    pub(super) const fn solid(colour: Rgb, width: f64) -> Self {
        Stroke {
            colour,
            width,
            dash: &[],
            opacity: 1.0,
        }
    }

    pub(super) const fn dashed(colour: Rgb, width: f64, dash: &'static [f64]) -> Self {
        Stroke {
            colour,
            width,
            dash,
            opacity: 1.0,
        }
    }

    fn attributes(&self) -> String {
        let mut a = format!(
            "stroke=\"{}\" stroke-width=\"{}\" stroke-linejoin=\"round\"",
            self.colour.hex(),
            num(self.width)
        );
        if !self.dash.is_empty() {
            let dash: Vec<String> = self.dash.iter().map(|d| num(*d)).collect();
            let _ = write!(a, " stroke-dasharray=\"{}\"", dash.join(" "));
        } else {
            a.push_str(" stroke-linecap=\"round\"");
        }
        if self.opacity < 1.0 {
            let _ = write!(a, " stroke-opacity=\"{}\"", num(self.opacity));
        }
        a
    }
}

/// Marker shapes of data series; each is drawn filled in the series colour with a white rim.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Marker {
    Circle,
    Square,
    TriangleUp,
    Diamond,
    TriangleDown,
    Pentagon,
}

impl Marker {
    /// The name used as the marker's class in the document.
    pub fn name(self) -> &'static str {
        match self {
            Marker::Circle => "circle",
            Marker::Square => "square",
            Marker::TriangleUp => "triangle-up",
            Marker::Diamond => "diamond",
            Marker::TriangleDown => "triangle-down",
            Marker::Pentagon => "pentagon",
        }
    }

    /// Path data of the marker centred at (x, y) with "radius" r; the shapes are scaled to
    /// about the same area, so that none looks heavier than the others.
    fn path(self, x: f64, y: f64, r: f64) -> String {
        let polygon = |corners: usize, turn: f64, scale: f64| {
            let pts: Vec<String> = (0..corners)
                .map(|k| {
                    let t = turn + std::f64::consts::TAU * k as f64 / corners as f64;
                    format!(
                        "{},{}",
                        num(x + scale * r * t.sin()),
                        num(y - scale * r * t.cos())
                    )
                })
                .collect();
            format!("M{}Z", pts.join("L"))
        };
        match self {
            Marker::Circle => format!(
                "M{},{}a{r},{r} 0 1,0 {d},0a{r},{r} 0 1,0 -{d},0Z",
                num(x - r),
                num(y),
                r = num(r),
                d = num(2.0 * r)
            ),
            Marker::Square => polygon(4, std::f64::consts::FRAC_PI_4, 1.2),
            Marker::Diamond => polygon(4, 0.0, 1.3),
            Marker::TriangleUp => polygon(3, 0.0, 1.45),
            Marker::TriangleDown => polygon(3, std::f64::consts::PI, 1.45),
            Marker::Pentagon => polygon(5, 0.0, 1.15),
        }
    }
}

/// Text anchoring along the baseline.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(super) enum Anchor {
    Start,
    Middle,
    End,
}

/// Text: size in nominal px, colour, anchoring, and rotation by −90° (reading upwards).
#[derive(Debug, Clone, Copy, PartialEq)]
pub(super) struct Font {
    pub(super) size: f64,
    pub(super) colour: Rgb,
    pub(super) anchor: Anchor,
    pub(super) upright: bool,
}

/// A document under construction.
pub(super) struct Svg {
    width: u32,
    height: u32,
    defs: String,
    body: String,
    clips: usize,
}

/// Numbers with at most two decimals and no trailing zeros.
pub(super) fn num(v: f64) -> String {
    let s = format!("{v:.2}");
    let s = s.trim_end_matches('0').trim_end_matches('.');
    if s == "-0" {
        "0".into()
    } else {
        s.into()
    }
}

/// Fill and stroke attributes of a shape (no fill: "none").
fn paint(fill: Option<Rgb>, stroke: Option<&Stroke>) -> String {
    let fill = fill.map_or("none".to_string(), Rgb::hex);
    match stroke {
        Some(s) => format!("fill=\"{fill}\" {}", s.attributes()),
        None => format!("fill=\"{fill}\""),
    }
}

pub(super) fn escape(s: &str) -> String {
    s.replace('&', "&amp;")
        .replace('<', "&lt;")
        .replace('>', "&gt;")
        .replace('"', "&quot;")
}

impl Svg {
    /// A white canvas of `size` nominal px.
    pub(super) fn new(size: (u32, u32)) -> Self {
        let mut svg = Svg {
            width: size.0,
            height: size.1,
            defs: String::new(),
            body: String::new(),
            clips: 0,
        };
        svg.rect((0.0, 0.0, size.0 as f64, size.1 as f64), Some(WHITE), None);
        svg
    }

    /// The finished document.
    pub(super) fn finish(self) -> String {
        let defs = if self.defs.is_empty() {
            String::new()
        } else {
            format!("<defs>\n{}</defs>\n", self.defs)
        };
        format!(
            "<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"{w}\" height=\"{h}\" viewBox=\"0 0 {w} {h}\">\n{defs}{}</svg>\n",
            self.body,
            w = self.width,
            h = self.height
        )
    }

    /// Opens a group; `class` and `label` (aria-label) name it when given.
    pub(super) fn open_group(&mut self, class: &str, label: Option<&str>) {
        let _ = write!(self.body, "<g class=\"{}\"", escape(class));
        if let Some(label) = label {
            let _ = write!(self.body, " aria-label=\"{}\"", escape(label));
        }
        self.body.push_str(">\n");
    }

    /// Opens a group whose content is clipped to the rectangle (x, y, width, height).
    pub(super) fn open_clip(&mut self, (x, y, w, h): (f64, f64, f64, f64)) {
        self.clips += 1;
        let id = format!("clip{}", self.clips);
        let _ = writeln!(
            self.defs,
            "<clipPath id=\"{id}\"><rect x=\"{}\" y=\"{}\" width=\"{}\" height=\"{}\"/></clipPath>",
            num(x),
            num(y),
            num(w),
            num(h)
        );
        let _ = writeln!(self.body, "<g clip-path=\"url(#{id})\">");
    }

    pub(super) fn close_group(&mut self) {
        self.body.push_str("</g>\n");
    }

    pub(super) fn polyline(&mut self, points: &[(f64, f64)], stroke: &Stroke) {
        if points.len() < 2 {
            return;
        }
        let pts: Vec<String> = points
            .iter()
            .map(|(x, y)| format!("{},{}", num(*x), num(*y)))
            .collect();
        let _ = writeln!(
            self.body,
            "<polyline fill=\"none\" {} points=\"{}\"/>",
            stroke.attributes(),
            pts.join(" ")
        );
    }

    pub(super) fn rect(
        &mut self,
        (x, y, w, h): (f64, f64, f64, f64),
        fill: Option<Rgb>,
        stroke: Option<&Stroke>,
    ) {
        let _ = writeln!(
            self.body,
            "<rect x=\"{}\" y=\"{}\" width=\"{}\" height=\"{}\" {}/>",
            num(x),
            num(y),
            num(w.max(0.0)),
            num(h.max(0.0)),
            paint(fill, stroke)
        );
    }

    /// A marker of a data series: filled, with a white rim that parts it from lines.
    pub(super) fn marker(&mut self, marker: Marker, (x, y): (f64, f64), r: f64, fill: Rgb) {
        let _ = writeln!(
            self.body,
            "<path class=\"marker {}\" d=\"{}\" fill=\"{}\" stroke=\"#ffffff\" stroke-width=\"1\"/>",
            marker.name(),
            marker.path(x, y, r),
            fill.hex()
        );
    }

    pub(super) fn circle(
        &mut self,
        (x, y): (f64, f64),
        r: f64,
        fill: Option<Rgb>,
        stroke: Option<&Stroke>,
    ) {
        let _ = writeln!(
            self.body,
            "<circle cx=\"{}\" cy=\"{}\" r=\"{}\" {}/>",
            num(x),
            num(y),
            num(r),
            paint(fill, stroke)
        );
    }

    /// A filled path given as SVG path data.
    pub(super) fn filled_path(&mut self, d: &str, fill: Rgb, stroke: &Stroke) {
        let _ = writeln!(
            self.body,
            "<path d=\"{d}\" fill=\"{}\" {}/>",
            fill.hex(),
            stroke.attributes()
        );
    }

    /// A path given as SVG path data, unfilled.
    pub(super) fn path(&mut self, d: &str, stroke: &Stroke) {
        let _ = writeln!(
            self.body,
            "<path d=\"{d}\" fill=\"none\" {}/>",
            stroke.attributes()
        );
    }

    /// Text with its baseline at y (for upright text: the baseline runs upwards through x).
    pub(super) fn text(&mut self, (x, y): (f64, f64), content: &str, font: &Font) {
        let anchor = match font.anchor {
            Anchor::Start => "start",
            Anchor::Middle => "middle",
            Anchor::End => "end",
        };
        let rotate = if font.upright {
            format!(" transform=\"rotate(-90 {} {})\"", num(x), num(y))
        } else {
            String::new()
        };
        let _ = writeln!(
            self.body,
            "<text x=\"{}\" y=\"{}\" font-family=\"{}\" font-size=\"{}\" text-anchor=\"{anchor}\" fill=\"{}\"{rotate}>{}</text>",
            num(x),
            num(y),
            super::FONT,
            num(font.size),
            font.colour.hex(),
            escape(content)
        );
    }

    /// A PNG image stretched over the rectangle, smoothed when scaled.
    pub(super) fn png_image(&mut self, (x, y, w, h): (f64, f64, f64, f64), png: &[u8]) {
        use base64::Engine;
        let data = base64::engine::general_purpose::STANDARD.encode(png);
        let _ = writeln!(
            self.body,
            "<image x=\"{}\" y=\"{}\" width=\"{}\" height=\"{}\" preserveAspectRatio=\"none\" href=\"data:image/png;base64,{data}\"/>",
            num(x),
            num(y),
            num(w),
            num(h)
        );
    }
}
