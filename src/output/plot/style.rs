//! The look of data series: a palette told apart by lightness as well as hue, with a dash
//! pattern and a marker shape per series, so that every series is identified three ways.
//!
//! # Method
//! The six series colours were chosen in CIELAB: their lightnesses L* lie about 10 apart
//! between 19 and 74 (so that a greyscale print still orders them), and they are ordered so
//! that neighbouring series (neighbouring levels) differ by at least 9 in L* and alternate
//! between the blue and the orange–red sides, the axis that survives the common red–green
//! deficiencies. Each colour was checked under simulated protanopia, deuteranopia and
//! tritanopia (full severity, linear sRGB matrices of the physiological model below): every pair
//! stays at least 15 CIELAB units (CIE 1976 ΔE) apart. The unit tests of this module repeat that
//! check. Dash patterns and markers come in the same order and repeat with period six, as the
//! colours do; no two series of a figure share all three below seven series.
//!
//! # Accuracy
//! sRGB to CIELAB with the D65 white; the simulation matrices are given to six decimals.
//!
//! # References
//! - "A Physiologically-based Model for Simulation of Color Vision Deficiency", IEEE
//!   Transactions on Visualization and Computer Graphics 15 (2009) 1291–1298.
//! - CIE 15:2004, Colorimetry, 3rd edition (CIELAB, ΔE*ab).
//! - IEC 61966-2-1:1999, the sRGB colour space.

use super::svg::{Marker, Rgb};

/// Series colours (see the module documentation for how they were chosen).
pub(super) const PALETTE: [Rgb; 6] = [
    Rgb(0x1b, 0x2a, 0x5c), // night blue, L* 19
    Rgb(0xe0, 0x8a, 0x2c), // amber, L* 65
    Rgb(0x2f, 0x62, 0xa8), // cobalt, L* 41
    Rgb(0x8a, 0x2c, 0x1c), // brick, L* 32
    Rgb(0x74, 0xc2, 0xd8), // glacier, L* 74
    Rgb(0xb8, 0x62, 0x9f), // orchid, L* 53
];

/// Dash patterns in nominal px: solid, long dash, dots, dash-dot, short dash, dash-dot-dot.
const DASHES: [&[f64]; 6] = [
    &[],
    &[9.0, 4.0],
    &[2.0, 3.0],
    &[9.0, 3.0, 2.0, 3.0],
    &[5.0, 3.0],
    &[9.0, 3.0, 2.0, 3.0, 2.0, 3.0],
];

const MARKERS: [Marker; 6] = [
    Marker::Circle,
    Marker::Square,
    Marker::TriangleUp,
    Marker::Diamond,
    Marker::TriangleDown,
    Marker::Pentagon,
];

/// How one data series is drawn: colour, dash pattern (empty: solid) and marker.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct SeriesStyle {
    pub colour: Rgb,
    pub dash: &'static [f64],
    pub marker: Marker,
}

/// The style of the series with this index (they repeat with period six).
pub fn series_style(index: usize) -> SeriesStyle {
    let i = index % PALETTE.len();
    SeriesStyle {
        colour: PALETTE[i],
        dash: DASHES[i],
        marker: MARKERS[i],
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn linear(c: u8) -> f64 {
        let c = c as f64 / 255.0;
        if c <= 0.04045 {
            c / 12.92
        } else {
            ((c + 0.055) / 1.055).powf(2.4)
        }
    }

    fn lab([r, g, b]: [f64; 3]) -> [f64; 3] {
        let x = 0.4124 * r + 0.3576 * g + 0.1805 * b;
        let y = 0.2126 * r + 0.7152 * g + 0.0722 * b;
        let z = 0.0193 * r + 0.1192 * g + 0.9505 * b;
        let f = |t: f64| {
            if t > 0.008856 {
                t.cbrt()
            } else {
                7.787 * t + 16.0 / 116.0
            }
        };
        let (fx, fy, fz) = (f(x / 0.95047), f(y), f(z / 1.08883));
        [116.0 * fy - 16.0, 500.0 * (fx - fy), 200.0 * (fy - fz)]
    }

    const IDENTITY: [[f64; 3]; 3] = [[1.0, 0.0, 0.0], [0.0, 1.0, 0.0], [0.0, 0.0, 1.0]];
    const PROTAN: [[f64; 3]; 3] = [
        [0.152286, 1.052583, -0.204868],
        [0.114503, 0.786281, 0.099216],
        [-0.003882, -0.048116, 1.051998],
    ];
    const DEUTAN: [[f64; 3]; 3] = [
        [0.367322, 0.860646, -0.227968],
        [0.280085, 0.672501, 0.047413],
        [-0.011820, 0.042940, 0.968881],
    ];
    const TRITAN: [[f64; 3]; 3] = [
        [1.255528, -0.076749, -0.178779],
        [-0.078411, 0.930809, 0.147602],
        [0.004733, 0.691367, 0.303900],
    ];

    fn seen(m: &[[f64; 3]; 3], c: Rgb) -> [f64; 3] {
        let v = [linear(c.0), linear(c.1), linear(c.2)];
        let row = |i: usize| (0..3).map(|j| m[i][j] * v[j]).sum::<f64>().clamp(0.0, 1.0);
        lab([row(0), row(1), row(2)])
    }

    fn delta(a: [f64; 3], b: [f64; 3]) -> f64 {
        (0..3).map(|i| (a[i] - b[i]).powi(2)).sum::<f64>().sqrt()
    }

    #[test]
    fn every_pair_of_colours_stays_apart_under_colour_vision_deficiencies() {
        for (name, m) in [
            ("normal", IDENTITY),
            ("protanopia", PROTAN),
            ("deuteranopia", DEUTAN),
            ("tritanopia", TRITAN),
        ] {
            for i in 0..PALETTE.len() {
                for j in i + 1..PALETTE.len() {
                    let d = delta(seen(&m, PALETTE[i]), seen(&m, PALETTE[j]));
                    assert!(
                        d >= 15.0,
                        "{name}: colours {i} and {j} only ΔE {d:.1} apart"
                    );
                }
            }
        }
    }

    #[test]
    fn lightness_orders_the_colours_in_greyscale() {
        let l: Vec<f64> = PALETTE.iter().map(|&c| seen(&IDENTITY, c)[0]).collect();
        for i in 0..l.len() {
            for j in i + 1..l.len() {
                assert!(
                    (l[i] - l[j]).abs() >= 8.0,
                    "L* {} and {} too close",
                    l[i],
                    l[j]
                );
            }
        }
        // Lines on white: none lighter than L* 76.
        assert!(l.iter().all(|&v| v <= 76.0), "{l:?}");
    }

    #[test]
    fn the_first_six_series_differ_in_colour_dash_and_marker() {
        let styles: Vec<SeriesStyle> = (0..6).map(series_style).collect();
        for i in 0..6 {
            for j in i + 1..6 {
                assert_ne!(styles[i].colour, styles[j].colour);
                assert_ne!(styles[i].dash, styles[j].dash);
                assert_ne!(styles[i].marker, styles[j].marker);
            }
        }
        assert_eq!(series_style(6), series_style(0));
    }
}
