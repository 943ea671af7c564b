//! `plan.png`: the SVG picture rendered with resvg, with DejaVu Sans compiled into the program so
//! labels appear on any machine (no system fonts are consulted, so the pixels are the same
//! everywhere). The font's licence is in `src/export/fonts/LICENSE-DejaVu.txt`.

use resvg::{tiny_skia, usvg};

const SANS: &[u8] = include_bytes!("fonts/DejaVuSans.ttf");
const SANS_BOLD: &[u8] = include_bytes!("fonts/DejaVuSans-Bold.ttf");

/// Renders SVG text to PNG bytes at its own size.
pub fn svg_to_png(svg: &[u8]) -> Result<Vec<u8>, String> {
    let mut opt = usvg::Options {
        font_family: "DejaVu Sans".into(),
        ..Default::default()
    };
    opt.fontdb_mut().load_font_data(SANS.to_vec());
    opt.fontdb_mut().load_font_data(SANS_BOLD.to_vec());
    let tree = usvg::Tree::from_data(svg, &opt)
        .map_err(|e| format!("the picture is not valid SVG: {e}"))?;
    let size = tree.size().to_int_size();
    let mut pixmap = tiny_skia::Pixmap::new(size.width(), size.height())
        .ok_or_else(|| "the picture has no area".to_string())?;
    resvg::render(
        &tree,
        tiny_skia::Transform::identity(),
        &mut pixmap.as_mut(),
    );
    pixmap.encode_png().map_err(|e| e.to_string())
}
