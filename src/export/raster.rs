//! `plan.png`: the picture drawn straight into pixels. Road lines are stroked with tiny-skia, one
//! path per layer (no SVG tree, so a million edges stay cheap); the overlay (sites, labels, legend,
//! scale bar, north arrow, title, caution) is a small SVG rendered on top with resvg, using DejaVu
//! Sans compiled into the program so labels appear on any machine (no system fonts are consulted,
//! so the pixels are the same everywhere). The font's licence: `src/export/fonts/LICENSE-DejaVu.txt`.

use super::palette;
use super::picture::{self, SiteMark};
use crate::network::Network;
use crate::solve::order::Step;
use resvg::tiny_skia::{self, Color, Paint, PathBuilder, Pixmap, Stroke, StrokeDash, Transform};
use resvg::usvg;

const SANS: &[u8] = include_bytes!("fonts/DejaVuSans.ttf");
const SANS_BOLD: &[u8] = include_bytes!("fonts/DejaVuSans-Bold.ttf");

fn colour(hex: &str) -> Color {
    let v = u32::from_str_radix(hex.trim_start_matches('#'), 16).unwrap_or(0);
    Color::from_rgba8((v >> 16) as u8, (v >> 8) as u8, v as u8, 255)
}

/// Draws the plan as PNG bytes.
#[allow(clippy::too_many_arguments)]
pub fn render_png(
    title: &str,
    net: &Network,
    plan_edges: &[u32],
    steps: &[Step],
    sites: &[SiteMark],
    caution: &str,
    attribution: Option<&str>,
) -> Result<Vec<u8>, String> {
    let (w, h) = picture::SIZE;
    let mut pixmap = Pixmap::new(w, h).ok_or("the picture has no area")?;
    pixmap.fill(Color::WHITE);
    let fr = picture::frame(net, sites);
    // Roads are stroked in batches of about 64k points: one path for a million roads would make
    // tiny-skia hold its whole stroked outline at once (hundreds of MB); batches keep it small.
    const BATCH_POINTS: usize = 1 << 16;
    let stroke_edges = |pixmap: &mut Pixmap,
                        edges: &mut dyn Iterator<Item = usize>,
                        hex: &str,
                        width: f64,
                        dash: bool| {
        let mut paint = Paint::default();
        paint.set_color(colour(hex));
        paint.anti_alias = true;
        let mut stroke = Stroke {
            width: width as f32,
            line_cap: tiny_skia::LineCap::Round,
            line_join: tiny_skia::LineJoin::Round,
            ..Default::default()
        };
        if dash {
            stroke.dash = StrokeDash::new(vec![4.0, 3.0], 0.0);
            stroke.line_cap = tiny_skia::LineCap::Butt;
        }
        let mut pb = PathBuilder::new();
        let mut points = 0usize;
        let flush = |pb: PathBuilder, pixmap: &mut Pixmap| {
            if let Some(path) = pb.finish() {
                pixmap.stroke_path(&path, &paint, &stroke, Transform::identity(), None);
            }
        };
        for e in edges {
            let g = net.edge_geometry(e);
            for (i, p) in g.iter().enumerate() {
                let (x, y) = fr.px(*p);
                if i == 0 {
                    pb.move_to(x as f32, y as f32);
                } else {
                    pb.line_to(x as f32, y as f32);
                }
            }
            points += g.len();
            if points >= BATCH_POINTS {
                flush(std::mem::replace(&mut pb, PathBuilder::new()), pixmap);
                points = 0;
            }
        }
        flush(pb, pixmap);
    };
    let b = fr.base;
    stroke_edges(
        &mut pixmap,
        &mut (0..net.edges.len()).filter(|&e| net.edges[e].usable()),
        palette::ROAD,
        b,
        false,
    );
    stroke_edges(
        &mut pixmap,
        &mut (0..net.edges.len()).filter(|&e| !net.edges[e].usable()),
        palette::IMPASSABLE,
        b * 1.2,
        true,
    );
    stroke_edges(
        &mut pixmap,
        &mut plan_edges
            .iter()
            .map(|&e| e as usize)
            .filter(|&e| net.edges[e].cost == 0),
        palette::PLAN_INTACT,
        b * 1.8,
        false,
    );
    let phases = steps.iter().filter_map(|s| s.day).max().unwrap_or(1);
    for p in 1..=phases {
        stroke_edges(
            &mut pixmap,
            &mut steps
                .iter()
                .filter(|s| s.day.unwrap_or(1) == p)
                .map(|s| s.edge as usize),
            &palette::day_colour(p, phases),
            b * 3.0,
            false,
        );
    }
    // The overlay: everything but the road lines, as SVG on a transparent background.
    let mut overlay = Vec::new();
    picture::write_svg(
        &mut overlay,
        title,
        net,
        plan_edges,
        steps,
        sites,
        caution,
        attribution,
        false,
    )
    .map_err(|e| e.to_string())?;
    let mut opt = usvg::Options {
        font_family: "DejaVu Sans".into(),
        ..Default::default()
    };
    opt.fontdb_mut().load_font_data(SANS.to_vec());
    opt.fontdb_mut().load_font_data(SANS_BOLD.to_vec());
    let tree = usvg::Tree::from_data(&overlay, &opt)
        .map_err(|e| format!("the overlay is not valid SVG: {e}"))?;
    resvg::render(&tree, Transform::identity(), &mut pixmap.as_mut());
    pixmap.encode_png().map_err(|e| e.to_string())
}
