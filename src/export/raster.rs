//! `plan.png`: the picture drawn straight into pixels. The road lines and zones prepared by
//! [`super::drawing`] are stroked with tiny-skia in batches (no SVG tree, so a million edges stay
//! cheap); the overlay (sites, labels, numbers, legend, scale bar, north arrow, title, notes,
//! caution) is a small SVG rendered on top with resvg, using DejaVu Sans compiled into the program
//! so labels appear on any machine (no system fonts are consulted, so the pixels are the same
//! everywhere). The font's licence: `src/export/fonts/LICENSE-DejaVu.txt`.

use super::drawing::{self, Drawing};
use super::palette;
use super::picture;
use super::scene::Scene;
use resvg::tiny_skia::{
    self, Color, FillRule, Paint, PathBuilder, Pixmap, Stroke, StrokeDash, Transform,
};
use resvg::usvg;

const SANS: &[u8] = include_bytes!("fonts/DejaVuSans.ttf");
const SANS_BOLD: &[u8] = include_bytes!("fonts/DejaVuSans-Bold.ttf");

fn colour(hex: &str) -> Color {
    let v = u32::from_str_radix(hex.trim_start_matches('#'), 16).unwrap_or(0);
    Color::from_rgba8((v >> 16) as u8, (v >> 8) as u8, v as u8, 255)
}

fn paint(hex: &str) -> Paint<'static> {
    let mut p = Paint::default();
    p.set_color(colour(hex));
    p.anti_alias = true;
    p
}

/// Parses SVG text with the embedded fonts, as the overlay is parsed.
pub fn parse_overlay(svg: &[u8]) -> Result<usvg::Tree, String> {
    let mut opt = usvg::Options {
        font_family: "DejaVu Sans".into(),
        ..Default::default()
    };
    opt.fontdb_mut().load_font_data(SANS.to_vec());
    opt.fontdb_mut().load_font_data(SANS_BOLD.to_vec());
    usvg::Tree::from_data(svg, &opt).map_err(|e| format!("the overlay is not valid SVG: {e}"))
}

/// Strokes polylines in batches of about 64k points: one path for a million roads would make
/// tiny-skia hold its whole stroked outline at once (hundreds of MB); batches keep it small.
fn stroke_lines<'a>(
    pixmap: &mut Pixmap,
    lines: impl IntoIterator<Item = &'a [(f64, f64)]>,
    hex: &str,
    width: f64,
    dash: Option<[f32; 2]>,
) {
    const BATCH_POINTS: usize = 1 << 16;
    let paint = paint(hex);
    let mut stroke = Stroke {
        width: width as f32,
        line_cap: tiny_skia::LineCap::Round,
        line_join: tiny_skia::LineJoin::Round,
        ..Default::default()
    };
    if let Some([on, off]) = dash {
        stroke.dash = StrokeDash::new(vec![on, off], 0.0);
        stroke.line_cap = tiny_skia::LineCap::Butt;
    }
    let flush = |pb: PathBuilder, pixmap: &mut Pixmap| {
        if let Some(path) = pb.finish() {
            pixmap.stroke_path(&path, &paint, &stroke, Transform::identity(), None);
        }
    };
    let mut pb = PathBuilder::new();
    let mut points = 0usize;
    for l in lines {
        for (i, &(x, y)) in l.iter().enumerate() {
            if i == 0 {
                pb.move_to(x as f32, y as f32);
            } else {
                pb.line_to(x as f32, y as f32);
            }
        }
        points += l.len();
        if points >= BATCH_POINTS {
            flush(std::mem::replace(&mut pb, PathBuilder::new()), pixmap);
            points = 0;
        }
    }
    flush(pb, pixmap);
}

/// Draws the scene as PNG bytes.
pub fn render_png(scene: &Scene) -> Result<Vec<u8>, String> {
    let d = drawing::prepare(scene);
    render_drawing(scene, &d)
}

/// Draws a prepared drawing as PNG bytes.
pub fn render_drawing(scene: &Scene, d: &Drawing) -> Result<Vec<u8>, String> {
    let mut pixmap =
        Pixmap::new(d.frame.width as u32, d.height as u32).ok_or("the picture has no area")?;
    pixmap.fill(Color::WHITE);
    for ring in &d.zones {
        let mut pb = PathBuilder::new();
        for (i, &(x, y)) in ring.iter().enumerate() {
            if i == 0 {
                pb.move_to(x as f32, y as f32);
            } else {
                pb.line_to(x as f32, y as f32);
            }
        }
        pb.close();
        if let Some(path) = pb.finish() {
            let fill = paint(palette::ZONE_FILL);
            pixmap.fill_path(&path, &fill, FillRule::Winding, Transform::identity(), None);
            let edge = paint(palette::ZONE_EDGE);
            pixmap.stroke_path(
                &path,
                &edge,
                &Stroke::default(),
                Transform::identity(),
                None,
            );
        }
    }
    let b = d.frame.base;
    stroke_lines(&mut pixmap, &d.roads, palette::ROAD, b, None);
    stroke_lines(&mut pixmap, &d.damaged, palette::DAMAGED, b * 1.4, None);
    stroke_lines(
        &mut pixmap,
        &d.impassable,
        palette::IMPASSABLE,
        b * 1.2,
        Some([4.0, 3.0]),
    );
    stroke_lines(
        &mut pixmap,
        &d.plan_intact,
        palette::PLAN_INTACT,
        b * 1.8,
        None,
    );
    stroke_lines(
        &mut pixmap,
        &d.backup,
        palette::BACKUP,
        b * 2.4,
        Some([7.0, 4.0]),
    );
    // Consecutive repairs of one colour in one batch (a day at a time), in repair order.
    let mut k = 0;
    while k < d.repairs.len() {
        let c = &d.repairs[k].0;
        let run = d.repairs[k..].iter().take_while(|r| &r.0 == c).count();
        let lines = d.repairs[k..k + run].iter().flat_map(|r| r.1.iter());
        stroke_lines(&mut pixmap, lines, c, b * 3.0, None);
        k += run;
    }
    // The overlay: everything but the road lines, as SVG on a transparent background.
    let mut overlay = Vec::new();
    picture::write_drawing(&mut overlay, scene, d, false).map_err(|e| e.to_string())?;
    let tree = parse_overlay(&overlay)?;
    resvg::render(&tree, Transform::identity(), &mut pixmap.as_mut());
    pixmap.encode_png().map_err(|e| e.to_string())
}
