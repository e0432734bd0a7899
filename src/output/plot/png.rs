//! PNG: any of the figures' SVG documents rasterized at a requested width.
//!
//! # Method
//! `resvg` (pure Rust) parses the SVG and renders it with `tiny-skia` on a white pixmap scaled
//! to the requested width, the height following the document's aspect ratio. Text is set in
//! DejaVu Sans, embedded through the `dejavu` crate and standing in for every generic family,
//! so no system font or font library is consulted.
//!
//! # Accuracy
//! Anti-aliased rasterization at the requested width; `tests/plot.rs` checks the PNG signature,
//! the width, visible content, and that text is drawn with the embedded font.
//!
//! # Errors
//! [`PlotError::PngSize`], [`PlotError::SvgParse`], [`PlotError::PngEncode`].
//!
//! # References
//! - DejaVu Sans (Bitstream Vera font licence; DejaVu changes in the public domain; the licence
//!   text ships with the `dejavu` crate). See `docs/REFERENCES.md`.

use super::svg::escape;
use super::{PlotError, FONT, MAX_PNG_SIDE};
use resvg::{tiny_skia, usvg};
use std::collections::HashMap;
use std::sync::{Arc, Mutex, OnceLock};

const EMBEDDED_FAMILY: &str = "DejaVu Sans";

/// The embedded font, loaded once: DejaVu Sans (the figures use one face) standing in for every
/// generic family, so that no system font is consulted.
fn embedded_fonts() -> Arc<usvg::fontdb::Database> {
    static FONTS: OnceLock<Arc<usvg::fontdb::Database>> = OnceLock::new();
    FONTS
        .get_or_init(|| {
            let mut db = usvg::fontdb::Database::new();
            let face = dejavu::sans::regular();
            db.load_font_source(usvg::fontdb::Source::Binary(Arc::new(face)));
            db.set_sans_serif_family(EMBEDDED_FAMILY);
            db.set_serif_family(EMBEDDED_FAMILY);
            db.set_monospace_family(EMBEDDED_FAMILY);
            Arc::new(db)
        })
        .clone()
}

fn options() -> usvg::Options<'static> {
    usvg::Options {
        font_family: EMBEDDED_FAMILY.to_string(),
        fontdb: embedded_fonts(),
        ..Default::default()
    }
}

/// Width in px of one line of text at `size` px in the embedded font, as laid out by usvg (the
/// extent of the glyphs drawn). Labels recur (ticks, legends): widths are remembered.
pub(super) fn text_width(content: &str, size: f64) -> f64 {
    static WIDTHS: OnceLock<Mutex<HashMap<(String, u64), f64>>> = OnceLock::new();
    let key = (content.to_string(), size.to_bits());
    let widths = WIDTHS.get_or_init(Default::default);
    if let Some(&w) = widths.lock().ok().as_ref().and_then(|m| m.get(&key)) {
        return w;
    }
    let doc = format!(
        "<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"4000\" height=\"400\">\
         <text x=\"10\" y=\"200\" font-family=\"{FONT}\" font-size=\"{size}\">{}</text></svg>",
        escape(content)
    );
    // A guess of 0.6 em a character stands in should the font ever fail to lay it out.
    let w = usvg::Tree::from_str(&doc, &options())
        .ok()
        .map(|t| t.root().abs_bounding_box().width() as f64)
        .filter(|w| *w > 0.0)
        .unwrap_or(0.6 * size * content.chars().count() as f64);
    if let Ok(mut m) = widths.lock() {
        m.insert(key, w);
    }
    w
}

/// Rasterizes an SVG document (one of this module's figures, or any SVG) to PNG bytes of the
/// given width, the height following the document's aspect ratio, on a white background.
///
/// # Errors
/// A side of 0 or above [`MAX_PNG_SIDE`] pixels, an SVG that does not parse, or a failed
/// encoding.
pub fn to_png(svg: &str, width: u32) -> Result<Vec<u8>, PlotError> {
    let size_error = |height| PlotError::PngSize {
        width,
        height,
        max: MAX_PNG_SIDE,
    };
    if width == 0 || width > MAX_PNG_SIDE {
        return Err(size_error(0));
    }
    let tree =
        usvg::Tree::from_str(svg, &options()).map_err(|e| PlotError::SvgParse(e.to_string()))?;
    let size = tree.size();
    let scale = width as f32 / size.width();
    let height = (size.height() * scale).round().max(1.0) as u32;
    if height > MAX_PNG_SIDE {
        return Err(size_error(height));
    }
    let mut pixmap = tiny_skia::Pixmap::new(width, height).ok_or(size_error(height))?;
    pixmap.fill(tiny_skia::Color::WHITE);
    let transform = tiny_skia::Transform::from_scale(scale, scale);
    resvg::render(&tree, transform, &mut pixmap.as_mut());
    pixmap
        .encode_png()
        .map_err(|e| PlotError::PngEncode(e.to_string()))
}
