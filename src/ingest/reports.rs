//! Field damage reports: points with a factor (or "closed") from GeoJSON, CSV, a Shapefile (also
//! zipped) or a GeoPackage, each applied to the nearest road within a distance. The worst report on a road wins; reports that find no road are listed.

use super::IngestError;
use super::damage::{Damage, DamageRule};
use super::points::{PointSpec, read_points};
use super::source::{InputRecord, Source};
use super::wrap::{self, Frame};
use crate::network::{Network, cost_of};
use rstar::primitives::{GeomWithData, Line};
use rstar::{AABB, RTree};

/// One field report.
#[derive(Debug, Clone, PartialEq)]
pub struct Report {
    /// 0-based position in the input.
    pub index: usize,
    /// Position, lon/lat.
    pub pos: [f64; 2],
    /// Reported damage.
    pub damage: Damage,
    /// True when the report has no damage value and took the default.
    pub defaulted: bool,
}

/// What applying the reports did.
#[derive(Debug, Clone, Default, serde::Serialize)]
pub struct ReportFigures {
    /// Reports read.
    pub read: usize,
    /// Reports applied to a road.
    pub applied: usize,
    /// Reports with no road within the distance: (feature index, distance to the nearest road, m).
    pub unmatched: Vec<(usize, Option<f64>)>,
    /// Reports matched to a road: (feature index, the road's source feature, distance to it in
    /// metres, the damage reported), in input order (not written: the report lists them).
    #[serde(skip)]
    pub matched: Vec<(usize, u32, f64, Damage)>,
    /// Edges whose damage a report set, ascending (not written: a re-plan reads it).
    #[serde(skip)]
    pub touched: Vec<u32>,
}

/// How damage reports are read: the choices the user gave for the layer (`--damage-points-crs`,
/// `--damage-points-delimiter`, `--damage-points-layer`).
#[derive(Debug, Clone, Default, PartialEq)]
pub struct ReportSettings {
    /// The layer's CRS as `EPSG:NNNN` (default: the Shapefile's .prj, the GeoPackage layer's SRS,
    /// or WGS84 lon/lat).
    pub crs: Option<String>,
    /// CSV field separator; default: told from the header line.
    pub delimiter: Option<u8>,
    /// The layer of a GeoPackage, or the set of a zip, holding several.
    pub layer: Option<String>,
    /// CSV longitude column (`--damage-points-lon-column`; default: [`super::points::LON_COLUMNS`]).
    pub lon_column: Option<String>,
    /// CSV latitude column (`--damage-points-lat-column`; default: [`super::points::LAT_COLUMNS`]).
    pub lat_column: Option<String>,
}

impl ReportSettings {
    /// How the generic point reader reads a damage reports layer whose damage is in `field`.
    pub fn point_spec(&self, field: &str) -> PointSpec {
        PointSpec {
            kind: &super::kind::DAMAGE_REPORTS,
            column_flags: "--damage-points-lon-column/--damage-points-lat-column",
            polygons: false,
            crs: self.crs.clone(),
            delimiter: self.delimiter,
            layer: self.layer.clone(),
            lon_column: self.lon_column.clone(),
            lat_column: self.lat_column.clone(),
            number_columns: vec![field.to_string()],
        }
    }
}

/// The reports of one layer with where they came from.
#[derive(Debug, Clone)]
pub struct ReportLayer {
    /// Reports in input order.
    pub reports: Vec<Report>,
    /// Path, size and SHA-256 of the input.
    pub input: InputRecord,
    /// Where the layer came from, for the check against the roads' extent.
    pub origin: super::elsewhere::LayerOrigin,
}

/// Reads point reports from any point layer format ([`super::points`]): GeoJSON, CSV, Shapefile
/// (also zipped) or GeoPackage, positions converted to lon/lat.
pub fn read_reports(
    source: &Source,
    rule: &DamageRule,
    settings: &ReportSettings,
) -> Result<ReportLayer, IngestError> {
    let spec = settings.point_spec(&rule.field);
    let layer = read_points(source, &spec)?;
    let origin = layer.origin(&spec);
    let path = layer.path;
    let mut out = Vec::with_capacity(layer.features.len());
    for f in layer.features {
        let value = f.attributes.get(&rule.field);
        let damage = rule.interpret(value).map_err(|m| IngestError::Feature {
            path: path.clone(),
            feature: f.index,
            field: Some(rule.field.clone()),
            message: m,
        })?;
        out.push(Report {
            index: f.index,
            pos: f.pos,
            damage,
            defaulted: DamageRule::is_missing(value),
        });
    }
    // No report at all would plan as if nothing were damaged: refused, not read as "no damage".
    if out.is_empty() {
        return Err(IngestError::Io {
            path,
            source: std::io::Error::other(
                "the damage reports layer holds no reports (no features, or a header and no \
                 rows): a plan would treat every road as undamaged; give at least one report, or \
                 plan without --damage-points",
            ),
        });
    }
    Ok(ReportLayer {
        reports: out,
        input: layer.input,
        origin,
    })
}

/// Applies each report to the nearest road within `max_m` metres.
pub fn apply_reports(net: &mut Network, reports: &[Report], max_m: f64) -> ReportFigures {
    let mut fig = ReportFigures {
        read: reports.len(),
        ..Default::default()
    };
    if reports.is_empty() {
        return fig;
    }
    // Only segments near some report go into the tree, each held unwrapped (its second end within
    // 180° of its first); the box round the reports is searched on both sides of ±180°.
    let max_lat = reports.iter().fold(0.0f64, |m, r| m.max(r.pos[1].abs()));
    let (pad_lon, pad_lat) = wrap::reach_deg(max_m, max_lat);
    let pad_lon = pad_lon.unwrap_or(360.0);
    let (mut lo, mut hi) = ([f64::MAX; 2], [f64::MIN; 2]);
    for r in reports {
        lo = [lo[0].min(r.pos[0] - pad_lon), lo[1].min(r.pos[1] - pad_lat)];
        hi = [hi[0].max(r.pos[0] + pad_lon), hi[1].max(r.pos[1] + pad_lat)];
    }
    let boxes = wrap::search_boxes(lo, hi, [-360.0, 360.0]);
    let mut segs = Vec::new();
    for e in 0..net.edges.len() {
        let g = net.edge_geometry(e);
        for k in 0..g.len() - 1 {
            let (a, b) = (g[k], wrap::unwrap(g[k + 1], g[k]));
            if boxes.iter().any(|(lo, hi)| {
                a[0].max(b[0]) >= lo[0]
                    && a[0].min(b[0]) <= hi[0]
                    && a[1].max(b[1]) >= lo[1]
                    && a[1].min(b[1]) <= hi[1]
            }) {
                segs.push(GeomWithData::new(Line::new(a, b), e as u32));
            }
        }
    }
    let tree = RTree::bulk_load(segs);
    let data_lon = if tree.size() == 0 {
        [-180.0, 180.0]
    } else {
        let e = tree.root().envelope();
        [e.lower()[0], e.upper()[0]]
    };
    let mut worst: std::collections::BTreeMap<u32, Damage> = Default::default();
    for r in reports {
        let p = r.pos;
        let frame = Frame::at(p);
        let (dlon, dlat) = wrap::reach_deg(max_m, p[1].abs());
        let dlon = dlon.unwrap_or(360.0);
        let boxes = wrap::search_boxes(
            [p[0] - dlon, p[1] - dlat],
            [p[0] + dlon, p[1] + dlat],
            data_lon,
        );
        let mut best: Option<(f64, u32)> = None;
        for s in boxes.iter().flat_map(|(lo, hi)| {
            tree.locate_in_envelope_intersecting(&AABB::from_corners(*lo, *hi))
        }) {
            let d = frame.foot(s.geom().from, s.geom().to).0;
            if d <= max_m && best.is_none_or(|(bd, be)| (d, s.data) < (bd, be)) {
                best = Some((d, s.data));
            }
        }
        match best {
            Some((d, e)) => {
                fig.applied += 1;
                let feature = net.edges[e as usize].feature;
                fig.matched
                    .push((r.index, feature, (d * 1000.0).round() / 1000.0, r.damage));
                let w = worst.entry(e).or_insert(r.damage);
                let rank = |d: Damage| d.factor().unwrap_or(f64::INFINITY);
                if rank(r.damage) > rank(*w) {
                    *w = r.damage;
                }
            }
            None => {
                let near = [0.0, -360.0, 360.0]
                    .into_iter()
                    .filter_map(|k| tree.nearest_neighbor(&[p[0] + k, p[1]]))
                    .map(|s| frame.foot(s.geom().from, s.geom().to).0)
                    .min_by(f64::total_cmp);
                fig.unmatched
                    .push((r.index, near.map(|d| (d * 1000.0).round() / 1000.0)));
            }
        }
    }
    fig.touched = worst.keys().copied().collect();
    for (e, d) in worst {
        let edge = &mut net.edges[e as usize];
        edge.damage = d;
        edge.cost = cost_of(edge.length_m, d);
    }
    fig
}
