//! The picture prepared once for both outputs: the frame, the road layers as pixel polylines, the
//! zones, the repairs by day, the labels placed, and the notes on what the picture left out or
//! simplified. [`super::picture`] writes it as SVG; [`super::raster`] draws the same lines.

use super::clip::{Ring, zone_rings};
use super::labels::{Placer, Spot};
use super::layout::{self, Frame};
use super::legend::{self, Legend};
use super::scene::Scene;
use super::strokes::{Lines, Stroker, midpoint};

/// The most repairs numbered on the map; beyond it the first ones are and a note says so.
pub const MAX_NUMBERS: usize = 300;
/// Font size of site labels and of repair numbers.
pub const LABEL_FONT: f64 = 13.0;
/// Font size of the repair numbers.
pub const NUMBER_FONT: f64 = 11.0;

/// Everything drawn, in pixels.
pub struct Drawing {
    /// The frame.
    pub frame: Frame,
    /// The legend.
    pub legend: Legend,
    /// Picture height.
    pub height: f64,
    /// Damage zones, clipped to the map area.
    pub zones: Vec<Ring>,
    /// Usable roads (the background network).
    pub roads: Lines,
    /// Damaged roads outside the plan.
    pub damaged: Lines,
    /// Impassable roads.
    pub impassable: Lines,
    /// Intact roads the plan uses.
    pub plan_intact: Lines,
    /// Backup links.
    pub backup: Lines,
    /// Repairs: colour and lines, one entry per repair in order (per day when simplified).
    pub repairs: Vec<(String, Lines)>,
    /// Repair numbers placed: number and spot.
    pub numbers: Vec<(u32, Spot)>,
    /// Site labels placed: site index and spot.
    pub labels: Vec<(usize, Spot)>,
    /// True when the roads were drawn at the picture's resolution.
    pub simplified: bool,
    /// Sentences under the map about what was simplified or left out.
    pub notes: Vec<String>,
}

/// Prepares the picture of `scene`.
pub fn prepare(scene: &Scene) -> Drawing {
    let net = scene.net;
    let numbered = scene.steps.len().min(MAX_NUMBERS);
    let legend = legend::build(scene, numbered);
    let frame = layout::frame(net, scene.sites, (legend.width, legend.height));
    let st = Stroker::new(net, &frame);
    let planned = scene.planned();
    let usable = |e: &usize| net.edges[*e].usable();
    let roads = st.edges((0..net.edges.len()).filter(usable));
    let damaged = st.edges((0..net.edges.len()).filter(|&e| scene.damaged_outside(&planned, e)));
    let impassable = st.edges((0..net.edges.len()).filter(|e| !usable(e)));
    let plan_intact = st.edges(
        scene
            .plan_edges
            .iter()
            .map(|&e| e as usize)
            .filter(|&e| net.edges[e].cost == 0),
    );
    let backup = st.edges(scene.backup_edges.iter().map(|&e| e as usize));
    let repair_lines: Vec<Vec<(f64, f64)>> = scene
        .steps
        .iter()
        .map(|s| st.edge(s.edge as usize))
        .collect();
    let repairs: Vec<(String, Lines)> = if st.simplify {
        // Runs of repairs of one colour, drawn at the picture's resolution like the roads.
        let mut by_day: Vec<(String, Vec<usize>)> = Vec::new();
        for s in scene.steps {
            let c = scene.day_colour(s.last_day.unwrap_or(1));
            match by_day.last_mut() {
                Some((last, edges)) if *last == c => edges.push(s.edge as usize),
                _ => by_day.push((c, vec![s.edge as usize])),
            }
        }
        by_day
            .into_iter()
            .map(|(c, edges)| (c, st.edges(edges.into_iter())))
            .collect()
    } else {
        scene
            .steps
            .iter()
            .zip(&repair_lines)
            .map(|(s, l)| {
                let mut one = Lines::new();
                one.push(l);
                (scene.day_colour(s.last_day.unwrap_or(1)), one)
            })
            .collect()
    };
    let (x, y, w, h) = frame.map;
    let rect = [x, y, x + w, y + h];
    let zones = zone_rings(scene.zones, &frame, rect, st.simplify);
    // Labels: the site symbols are taken first, then the labels by priority (the hub first), then
    // the repair numbers in order.
    let mut placer = Placer::new(rect);
    for s in scene.sites {
        let (sx, sy) = frame.px(s.pos);
        placer.take([sx - 7.0, sy - 7.0, sx + 7.0, sy + 7.0]);
    }
    let mut order: Vec<usize> = (0..scene.sites.len()).collect();
    order.sort_by(|&a, &b| {
        let (sa, sb) = (&scene.sites[a], &scene.sites[b]);
        sb.hub
            .cmp(&sa.hub)
            .then(sb.priority.total_cmp(&sa.priority))
            .then(a.cmp(&b))
    });
    let mut labels = Vec::new();
    for i in order {
        let s = &scene.sites[i];
        if let Some(spot) = placer.place(s.label, LABEL_FONT, false, frame.px(s.pos), 6.0) {
            labels.push((i, spot));
        }
    }
    let mut numbers = Vec::new();
    for (s, l) in scene.steps.iter().zip(&repair_lines).take(numbered) {
        let at = midpoint(l)
            .unwrap_or_else(|| frame.px(net.junctions[net.edges[s.edge as usize].from as usize]));
        if let Some(spot) = placer.place_on(&s.order.to_string(), NUMBER_FONT, at) {
            numbers.push((s.order, spot));
        }
    }
    let simplified = st.simplify;
    let mut notes = Vec::new();
    if simplified {
        let drawn: usize = roads.len() + damaged.len() + impassable.len();
        notes.push(format!(
            "Simplified: the {} roads are drawn at the picture's resolution ({drawn} lines; pieces shorter than a pixel merged). The layers hold every road.",
            net.edges.len()
        ));
    }
    if scene.steps.len() > numbered {
        notes.push(format!(
            "Repairs 1–{numbered} of {} are numbered; work-orders.csv gives the whole order.",
            scene.steps.len()
        ));
    }
    if numbers.len() < numbered {
        notes.push(format!(
            "{} repair numbers left out where they would cover others; work-orders.csv lists every repair.",
            numbered - numbers.len()
        ));
    }
    if labels.len() < scene.sites.len() {
        notes.push(format!(
            "{} of {} site labels left out where they would cover others; sites.geojson names every site.",
            scene.sites.len() - labels.len(),
            scene.sites.len()
        ));
    }
    let band_w = frame.width - 2.0 * layout::MARGIN;
    // Each note wrapped to the picture's width.
    let notes: Vec<String> = notes
        .iter()
        .flat_map(|n| super::band::wrap_px(n, band_w))
        .collect();
    let height = (frame.map_bottom()
        + layout::SCALE_ROW
        + NOTE_H * notes.len() as f64
        + 8.0
        + super::band::height(band_w, scene.caution)
        + layout::MARGIN)
        .ceil();
    Drawing {
        frame,
        legend,
        height,
        zones,
        roads,
        damaged,
        impassable,
        plan_intact,
        backup,
        repairs,
        numbers,
        labels,
        simplified,
        notes,
    }
}

/// Height of one note line under the map.
pub const NOTE_H: f64 = 18.0;
