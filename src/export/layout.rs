//! The picture's layout: a title row, the map area on the left, the legend column on its right, a
//! row for the scale bar and the north arrow below the map, the notes, and the cautions band.
//!
//! The map area takes the district's shape: its long side is [`MAP_LONG`] pixels and its short side
//! follows the district's proportions (never less than the legend's height or [`MAP_SHORT_MIN`]),
//! so a tall or a wide district fills the map area on both axes instead of leaving blank strips.
//! Positions use a local equirectangular frame around the district's centre (x scaled by the
//! cosine of the mean latitude, so shapes and the scale bar hold).

use super::picture::SiteMark;
use crate::network::Network;

/// Outer margin of the picture, pixels.
pub const MARGIN: f64 = 30.0;
/// Height of the title row.
pub const TITLE_H: f64 = 56.0;
/// Gap between the map area and the legend column.
pub const GAP: f64 = 20.0;
/// Long side of the map area.
pub const MAP_LONG: f64 = 1300.0;
/// The least short side of the map area (a road strip still gets room for labels).
pub const MAP_SHORT_MIN: f64 = 360.0;
/// Inner padding of the map area, so symbols at the district's edge stay inside.
pub const PAD: f64 = 14.0;
/// Height of the row under the map (scale bar, north arrow).
pub const SCALE_ROW: f64 = 46.0;

/// Where everything goes, and how lon/lat becomes pixels.
#[derive(Debug, Clone)]
pub struct Frame {
    /// Western longitudes drawn a turn east (+360°): set when the district straddles ±180°.
    east: bool,
    lo: [f64; 2],
    mx: f64,
    my: f64,
    /// Pixels per metre.
    pub scale: f64,
    /// Top-left corner of the drawn extent, pixels.
    origin: (f64, f64),
    /// The map area: x, y, width, height.
    pub map: (f64, f64, f64, f64),
    /// Picture width (the height is known only once the notes are counted: see `picture`).
    pub width: f64,
    /// Left edge of the legend column.
    pub legend_x: f64,
    /// Base line width in pixels.
    pub base: f64,
}

impl Frame {
    /// Pixel position of a lon/lat point.
    pub fn px(&self, p: [f64; 2]) -> (f64, f64) {
        let lon = if self.east && p[0] < 0.0 {
            p[0] + 360.0
        } else {
            p[0]
        };
        (
            self.origin.0 + (lon - self.lo[0]) * self.mx * self.scale,
            self.origin.1 - (p[1] - self.lo[1]) * self.my * self.scale,
        )
    }

    /// Bottom of the map area.
    pub fn map_bottom(&self) -> f64 {
        self.map.1 + self.map.3
    }

    /// Metres east and north of the district's south-west corner in the frame's local
    /// equirectangular projection: the map page's coordinates.
    pub fn metres(&self, p: [f64; 2]) -> (f64, f64) {
        let (x, y) = self.px(p);
        self.px_metres((x, y))
    }

    /// The metres (as [`Frame::metres`]) of a pixel position.
    pub fn px_metres(&self, (x, y): (f64, f64)) -> (f64, f64) {
        (
            (x - self.origin.0) / self.scale,
            (self.origin.1 - y) / self.scale,
        )
    }

    /// The projection behind [`Frame::metres`]: western longitudes a turn east or not, the
    /// south-west corner (lon, lat), and metres per degree of longitude and of latitude.
    pub fn projection(&self) -> (bool, [f64; 2], f64, f64) {
        (self.east, self.lo, self.mx, self.my)
    }

    /// The same frame with `k` times as many pixels each way (a finer grid for snapping).
    pub fn finer(&self, k: f64) -> Frame {
        Frame {
            scale: self.scale * k,
            origin: (self.origin.0 * k, self.origin.1 * k),
            ..self.clone()
        }
    }
}

/// The bounds of the network and the sites, lon/lat, and whether western longitudes go a turn
/// east (a district across ±180° is narrower so; its edges may step from 179.99 to -179.99).
fn bounds(net: &Network, sites: &[SiteMark]) -> (bool, [f64; 2], [f64; 2]) {
    let points = || net.geom.iter().chain(sites.iter().map(|s| &s.pos));
    let span = |east: bool| {
        let (mut lo, mut hi) = ([f64::MAX; 2], [f64::MIN; 2]);
        for &p in points() {
            let lon = if east && p[0] < 0.0 {
                p[0] + 360.0
            } else {
                p[0]
            };
            lo = [lo[0].min(lon), lo[1].min(p[1])];
            hi = [hi[0].max(lon), hi[1].max(p[1])];
        }
        (lo, hi)
    };
    let (plain, turned) = (span(false), span(true));
    let east = turned.1[0] - turned.0[0] < plain.1[0] - plain.0[0];
    let (mut lo, mut hi) = if east { turned } else { plain };
    if lo[0] > hi[0] {
        lo = [0.0, 0.0];
        hi = [1e-3, 1e-3];
    }
    (east, lo, hi)
}

/// The frame for a district, with a legend `legend` (width, height) pixels in size. Damage zones
/// are not part of the extent (a zone drawn for a whole region would shrink the district to a
/// dot); they are clipped to the map area.
pub fn frame(net: &Network, sites: &[SiteMark], legend: (f64, f64)) -> Frame {
    let (east, lo, hi) = bounds(net, sites);
    let lat0 = 0.5 * (lo[1] + hi[1]);
    let (my, mx) = crate::ingest::geodesy::metres_per_degree(lat0);
    let span = [
        ((hi[0] - lo[0]) * mx).max(1.0),
        ((hi[1] - lo[1]) * my).max(1.0),
    ];
    // The map area takes the district's proportions, its long side MAP_LONG.
    let short_min = MAP_SHORT_MIN.max(legend.1);
    let (mw, mh) = if span[0] >= span[1] {
        (
            MAP_LONG,
            (MAP_LONG * span[1] / span[0]).clamp(short_min, MAP_LONG),
        )
    } else {
        ((MAP_LONG * span[0] / span[1]).max(MAP_SHORT_MIN), MAP_LONG)
    };
    let scale = ((mw - 2.0 * PAD) / span[0]).min((mh - 2.0 * PAD) / span[1]);
    let map = (MARGIN, TITLE_H, mw, mh);
    // The drawn extent centred in the map area.
    let (dw, dh) = (span[0] * scale, span[1] * scale);
    let origin = (map.0 + 0.5 * (mw - dw), map.1 + 0.5 * (mh + dh));
    let legend_x = map.0 + mw + GAP;
    let n = net.edges.len().max(1) as f64;
    Frame {
        east,
        lo,
        mx,
        my,
        scale,
        origin,
        map,
        width: (legend_x + legend.0 + MARGIN).round(),
        legend_x,
        base: (2.0 / (1.0 + n.log10() / 2.0)).clamp(0.3, 1.6),
    }
}
