//! The map page's layers as JSON: the network by style, the plan (repairs coloured by day, each
//! pointing at its work-order row), the backup links, the roads with no way round, the corridors,
//! the damage zones, the geometry checks and the sites with their status; a layer the run does not
//! have is left out.
//!
//! Up to [`SIMPLIFY_ABOVE`] geometry points every road keeps its own line. Above it the network and
//! the intact roads of the plan are drawn as the picture simplifies them ([`Stroker`]), on a grid
//! [`FINER`] times the picture's; repairs, backup links, roads with no way round and corridors keep
//! one line each (snapped to the same grid) so each can still be clicked.

use super::Page;
use super::encode::Json;
pub use crate::export::strokes::SIMPLIFY_ABOVE;
use crate::export::strokes::Stroker;

/// The simplified page's grid is this many times finer than the picture's pixels.
pub const FINER: f64 = 2.0;

/// Site statuses in the order of the page's symbols.
pub const STATUSES: [&str; 4] = [
    "joined",
    "not_attached",
    "left_out_by_budget",
    "unreachable",
];

/// Network line styles: intact road, damaged road outside the plan, impassable road.
const INTACT: i64 = 0;
const DAMAGED: i64 = 1;
const IMPASSABLE: i64 = 2;

/// The simplification grid's metres per step, when the page simplifies the network.
pub fn grid_m(p: &Page) -> Option<f64> {
    let frame = p.drawing.frame.finer(FINER);
    Stroker::new(p.scene.net, &frame)
        .simplify
        .then(|| 1.0 / frame.scale)
}

/// Writes the layers object (simplified when [`grid_m`] says so).
pub fn write_layers(j: &mut Json, p: &Page) {
    let scene = p.scene;
    let net = scene.net;
    let frame = p.drawing.frame.finer(FINER);
    let st = Stroker::new(net, &frame);
    let m = |q: (f64, f64)| frame.px_metres(q);
    let exact = |e: usize| {
        let fr = &p.drawing.frame;
        net.edge_geometry(e).iter().map(move |&q| fr.metres(q))
    };
    // One line of an edge: exact, or snapped (never empty, so it can still be clicked).
    let one = |j: &mut Json, meta: &[i64], e: usize| {
        if st.simplify {
            let mut l = st.edge(e);
            if l.is_empty() {
                let g = net.edge_geometry(e);
                l = vec![frame.px(g[0]), frame.px(g[g.len() - 1])];
            }
            j.feature(meta, l.into_iter().map(m));
        } else {
            j.feature(meta, exact(e));
        }
    };
    let many =
        |j: &mut Json, meta: &[i64], first: &mut bool, edges: &mut dyn Iterator<Item = usize>| {
            if st.simplify {
                // Written as they are made: the lines of a national network are never all held.
                st.each_line(edges, |l| {
                    sep(j, first);
                    j.feature(meta, l.into_iter().map(m));
                });
            } else {
                for e in edges {
                    sep(j, first);
                    j.feature(meta, exact(e));
                }
            }
        };
    let planned = scene.planned();
    let colours = p.colours();
    j.raw("{");
    let lf = &mut true;
    // Damage zones, clipped to the picture's map area as the picture draws them.
    if !p.drawing.zones.is_empty() {
        layer(j, lf, "zones", 0, |j, first| {
            for ring in &p.drawing.zones {
                sep(j, first);
                j.feature(&[], ring.iter().map(|&q| p.drawing.frame.px_metres(q)));
            }
        });
    }
    layer(j, lf, "network", 1, |j, first| {
        let n = net.edges.len();
        let usable = |e: &usize| net.edges[*e].usable();
        let intact = |e: &usize| usable(e) && !scene.damaged_outside(&planned, *e);
        many(j, &[INTACT], first, &mut (0..n).filter(intact));
        let damaged = |e: &usize| scene.damaged_outside(&planned, *e);
        many(j, &[DAMAGED], first, &mut (0..n).filter(damaged));
        many(j, &[IMPASSABLE], first, &mut (0..n).filter(|e| !usable(e)));
    });
    if let Some(f) = p.single_failures {
        layer(j, lf, "single_failures", 0, |j, first| {
            for (e, _) in &f.cutting {
                sep(j, first);
                one(j, &[], *e as usize);
            }
        });
    }
    // The plan: intact roads it uses (colour -1, no row), then the repairs in order.
    layer(j, lf, "plan", 2, |j, first| {
        let intact = scene.plan_edges.iter().map(|&e| e as usize);
        let intact = &mut intact.filter(|&e| net.edges[e].cost == 0);
        many(j, &[-1, -1], first, intact);
        for (i, s) in scene.steps.iter().enumerate() {
            sep(j, first);
            let colour = p.colour_index(&colours, s.last_day.unwrap_or(1));
            one(j, &[colour, i as i64], s.edge as usize);
        }
    });
    if let Some(b) = p.backup {
        layer(j, lf, "backup", 1, |j, first| {
            for (i, r) in b.rows.iter().enumerate() {
                sep(j, first);
                one(j, &[(scene.steps.len() + i) as i64], r.edge as usize);
            }
        });
    }
    if let Some(c) = p.corridors {
        layer(j, lf, "corridors", 0, |j, first| {
            for r in c.rows.iter().filter(|r| !r.edges.is_empty()) {
                sep(j, first);
                let pts = crate::export::corridors::route_points(net, r.junctions[0], &r.edges);
                if st.simplify {
                    let px: Vec<(f64, f64)> = pts.iter().map(|&q| frame.px(q)).collect();
                    j.feature(&[], px.into_iter().map(|q| m((q.0.round(), q.1.round()))));
                } else {
                    j.feature(&[], pts.iter().map(|&q| p.drawing.frame.metres(q)));
                }
            }
        });
    }
    if !p.qa.is_empty() {
        layer(j, lf, "qa", 0, |j, first| {
            for q in p.qa {
                sep(j, first);
                j.feature(&[], [p.drawing.frame.metres(q.pos)]);
            }
        });
    }
    if !p.sites.is_empty() {
        layer(j, lf, "sites", 2, |j, first| {
            for s in p.sites {
                sep(j, first);
                let status = STATUSES.iter().position(|c| *c == s.status).unwrap_or(0);
                j.feature(
                    &[i64::from(s.hub), status as i64],
                    [p.drawing.frame.metres(s.pos)],
                );
            }
        });
    }
    j.raw("}");
}

/// Writes `"name":{"meta":n,"f":[…]}`, after a comma unless it is the first layer.
fn layer(
    j: &mut Json,
    lf: &mut bool,
    name: &str,
    meta: i64,
    fill: impl FnOnce(&mut Json, &mut bool),
) {
    sep(j, lf);
    j.key(name)
        .raw("{")
        .key("meta")
        .int(meta)
        .raw(",")
        .key("f")
        .raw("[");
    let mut first = true;
    fill(j, &mut first);
    j.raw("]}");
}

/// A comma before every item but the first.
fn sep(j: &mut Json, first: &mut bool) {
    if !*first {
        j.raw(",");
    }
    *first = false;
}
