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

use super::{PlotError, MAX_PNG_SIDE};
use resvg::{tiny_skia, usvg};
use std::sync::{Arc, OnceLock};

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
    let options = usvg::Options {
        font_family: EMBEDDED_FAMILY.to_string(),
        fontdb: embedded_fonts(),
        ..Default::default()
    };
    let tree =
        usvg::Tree::from_str(svg, &options).map_err(|e| PlotError::SvgParse(e.to_string()))?;
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
