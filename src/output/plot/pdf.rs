//! PDF: any of the figures' SVG documents converted to a one-page vector PDF.
//!
//! # Method
//! `svg2pdf` (pure Rust) parses the SVG with its own `usvg` and writes the page as PDF
//! drawing operators: lines and text stay vector graphics, embedded raster images (the heat
//! maps) become image objects. Text is set in DejaVu Sans, embedded (subset) through the
//! `dejavu` crate and standing in for every generic family, so the PDF looks as the PNG does
//! and needs no font on the reader's machine. The page is the document's nominal size at
//! 96 px per inch (640 px: 6⅔ in).
//!
//! # Accuracy
//! Vector output; `tests/plot.rs` checks the PDF header and trailer, its size, and that the
//! font is embedded.
//!
//! # Errors
//! [`PlotError::SvgParse`], [`PlotError::PdfConversion`].
//!
//! # References
//! - ISO 32000-1:2008, Document management — Portable document format — Part 1: PDF 1.7.
//! - DejaVu Sans (Bitstream Vera font licence; DejaVu changes in the public domain).

use super::PlotError;
use std::sync::{Arc, OnceLock};
use svg2pdf::usvg;

const EMBEDDED_FAMILY: &str = "DejaVu Sans";

/// CSS pixels per inch: the SVG's nominal size becomes the page size.
const PX_PER_INCH: f32 = 96.0;

/// The same face as `png` loads, into svg2pdf's own (older) usvg font database, whose type
/// differs from the one resvg uses: the two cannot share one database.
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

/// Converts an SVG document (one of this module's figures, or any SVG) to the bytes of a
/// one-page PDF with the embedded font.
///
/// # Errors
/// An SVG that does not parse, or a failed conversion.
pub fn to_pdf(svg: &str) -> Result<Vec<u8>, PlotError> {
    let options = usvg::Options {
        font_family: EMBEDDED_FAMILY.to_string(),
        fontdb: embedded_fonts(),
        dpi: PX_PER_INCH,
        ..Default::default()
    };
    let tree =
        usvg::Tree::from_str(svg, &options).map_err(|e| PlotError::SvgParse(e.to_string()))?;
    let page = svg2pdf::PageOptions { dpi: PX_PER_INCH };
    svg2pdf::to_pdf(&tree, svg2pdf::ConversionOptions::default(), page)
        .map_err(|e| PlotError::PdfConversion(e.to_string()))
}
