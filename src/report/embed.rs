//! How a figure goes into `report.html`: the smaller of its SVG (vector, prints
//! sharply at any size) and its PNG at report resolution ([`EMBED_WIDTH_PX`] wide,
//! as an indexed PNG of
//! [`EMBED_COLOURS`] colours). The files in `figures/` are left
//! at their full size; only the copy embedded in the report is made smaller, so the
//! report stays small enough to e-mail ([`super::MAX_HTML_BYTES`]).

use super::doc::Figure;
use std::path::Path;

/// Width of a PNG figure as embedded in the report, px: at the A4 text width
/// (180 mm) about 170 dpi, enough for print; the files in `figures/` keep
/// [`crate::plot::SIZE`].
pub const EMBED_WIDTH_PX: u32 = 1200;

/// A figure ready to embed as a `data:` URI.
#[derive(Debug, Clone, PartialEq)]
pub struct Embedded {
    /// `image/png` or `image/svg+xml`.
    pub mime: &'static str,
    /// The file's bytes (for a PNG: at report resolution).
    pub bytes: Vec<u8>,
}

/// An SVG file that refers to nothing outside itself (no external `href`), so it
/// can be embedded as a `data:` URI without breaking self-containment.
pub fn is_svg(bytes: &[u8]) -> bool {
    let text = String::from_utf8_lossy(bytes);
    text.contains("<svg") && !text.contains("href=\"http") && !text.contains("href='http")
}

/// Colours of a PNG figure as embedded (an indexed PNG: one byte per pixel).
pub const EMBED_COLOURS: usize = 256;

/// `bytes` (a PNG) scaled down to [`EMBED_WIDTH_PX`] wide (aspect kept), its
/// colours reduced to a palette of [`EMBED_COLOURS`] (NeuQuant), and encoded as an
/// indexed PNG with the best compression; `None` when it does not decode. A PNG
/// already at most that wide keeps its size.
pub fn shrink_png(bytes: &[u8]) -> Option<Vec<u8>> {
    let img = image::load_from_memory_with_format(bytes, image::ImageFormat::Png).ok()?;
    let img = if img.width() > EMBED_WIDTH_PX {
        let h = ((img.height() as u64 * EMBED_WIDTH_PX as u64 + img.width() as u64 / 2) / img.width() as u64).max(1) as u32;
        img.resize_exact(EMBED_WIDTH_PX, h, image::imageops::FilterType::CatmullRom)
    } else {
        img
    };
    let rgba = img.to_rgba8();
    // Sampling factor 10: NeuQuant's documented balance of speed and quality.
    let quant = color_quant::NeuQuant::new(10, EMBED_COLOURS, rgba.as_raw());
    let indices: Vec<u8> = rgba.as_raw().chunks_exact(4).map(|px| quant.index_of(px) as u8).collect();
    let mut out = Vec::new();
    {
        let mut enc = png::Encoder::new(&mut out, rgba.width(), rgba.height());
        enc.set_color(png::ColorType::Indexed);
        enc.set_depth(png::BitDepth::Eight);
        enc.set_palette(quant.color_map_rgb());
        enc.set_compression(png::Compression::Best);
        enc.set_filter(png::FilterType::NoFilter);
        let mut w = enc.write_header().ok()?;
        w.write_image_data(&indices).ok()?;
        w.finish().ok()?;
    }
    Some(out)
}

/// The figure as the report embeds it: the smaller of the self-contained SVG and
/// the PNG at report resolution (the PNG as it is when it cannot be decoded);
/// `None` when neither file is there or readable.
pub fn embed(figures_dir: &Path, figure: &Figure) -> Option<Embedded> {
    let svg = figure
        .svg
        .as_deref()
        .and_then(|f| std::fs::read(figures_dir.join(f)).ok())
        .filter(|b| is_svg(b))
        .map(|bytes| Embedded { mime: "image/svg+xml", bytes });
    let png = figure
        .png
        .as_deref()
        .and_then(|f| std::fs::read(figures_dir.join(f)).ok())
        .filter(|b| b.starts_with(b"\x89PNG"))
        .map(|b| Embedded { mime: "image/png", bytes: shrink_png(&b).filter(|s| s.len() < b.len()).unwrap_or(b) });
    match (svg, png) {
        (Some(s), Some(p)) => Some(if s.bytes.len() <= p.bytes.len() { s } else { p }),
        (s, p) => s.or(p),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn png(w: u32, h: u32) -> Vec<u8> {
        // A white image with a dark diagonal, like a line on a chart.
        let img =
            image::RgbImage::from_fn(w, h, |x, y| if x * h / w == y { image::Rgb([20, 60, 140]) } else { image::Rgb([255, 255, 255]) });
        let mut out = Vec::new();
        image::DynamicImage::ImageRgb8(img).write_to(&mut std::io::Cursor::new(&mut out), image::ImageFormat::Png).unwrap();
        out
    }

    #[test]
    fn a_wide_png_is_embedded_at_report_width_with_its_aspect() {
        let small = shrink_png(&png(2400, 1500)).unwrap();
        let img = image::load_from_memory(&small).unwrap();
        assert_eq!((img.width(), img.height()), (EMBED_WIDTH_PX, 750));
        let narrow = shrink_png(&png(600, 400)).unwrap();
        let img = image::load_from_memory(&narrow).unwrap();
        assert_eq!((img.width(), img.height()), (600, 400));
        assert!(shrink_png(b"\x89PNG not really").is_none());
    }

    #[test]
    fn the_smaller_of_svg_and_png_is_embedded() {
        let dir = tempfile::tempdir().unwrap();
        std::fs::write(dir.path().join("a.png"), png(2400, 1500)).unwrap();
        std::fs::write(dir.path().join("a.svg"), "<svg xmlns=\"http://www.w3.org/2000/svg\"><line/></svg>").unwrap();
        let both = Figure { png: Some("a.png".into()), svg: Some("a.svg".into()), caption: Default::default() };
        assert_eq!(embed(dir.path(), &both).unwrap().mime, "image/svg+xml");
        // A huge SVG loses to the PNG.
        std::fs::write(dir.path().join("a.svg"), format!("<svg>{}</svg>", "<line/>".repeat(200_000))).unwrap();
        let e = embed(dir.path(), &both).unwrap();
        assert_eq!(e.mime, "image/png");
        assert_eq!(image::load_from_memory(&e.bytes).unwrap().width(), EMBED_WIDTH_PX);
        // An SVG that fetches something is never embedded.
        std::fs::write(dir.path().join("b.svg"), "<svg><image href=\"http://x/y.png\"/></svg>").unwrap();
        let b = Figure { png: None, svg: Some("b.svg".into()), caption: Default::default() };
        assert!(embed(dir.path(), &b).is_none());
    }
}
