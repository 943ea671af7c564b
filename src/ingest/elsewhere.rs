//! A point layer lying wholly away from the roads: refused, naming both extents and the layer's
//! CRS option.
//!
//! A layer in a projected CRS whose numbers happen to fall within ±180 and ±90 (metres of a small
//! district, a local grid near its origin) passes every longitude/latitude check and lands near
//! 0°, 0°, far from any road. Each site or report would then be listed on its own as too far from
//! a road (or, for reports, only noted), and the plan would go on as if the layer held nothing.
//! One site a few kilometres beyond the roads is normal; a whole layer tens of kilometres away,
//! farther than a few times the road network's own size, is read in the wrong CRS or belongs to
//! another district, so it is refused before anything is planned.

use super::IngestError;
use super::geodesy::karney_distance_m;
use super::wrap::canonical_lon;
use crate::decimal::trimmed;
use std::path::PathBuf;

/// The least distance (metres) a layer may lie from the roads before it is refused, however small
/// the network: 50 km is five times the farthest `--max-attach` allows.
pub const FAR_MIN_M: f64 = 50_000.0;
/// A layer is also kept while it lies within this many times the road network's own size.
pub const FAR_SIZES: f64 = 3.0;

/// The box a set of lon/lat positions spans; across ±180° `west` is greater than `east`.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Extent {
    /// Westernmost longitude.
    pub west: f64,
    /// Easternmost longitude.
    pub east: f64,
    /// Southernmost latitude.
    pub south: f64,
    /// Northernmost latitude.
    pub north: f64,
}

impl Extent {
    /// The narrowest box holding every position (whichever side of ±180° it is narrower on), or
    /// `None` when there is none.
    pub fn of(points: impl IntoIterator<Item = [f64; 2]>) -> Option<Extent> {
        // Longitudes as given, and turned into [0, 360): the narrower span is the extent.
        let (mut lo, mut hi, mut lo360, mut hi360) = ([f64::MAX; 2], [f64::MIN; 2], 360.0, 0.0);
        for p in points {
            let lon = canonical_lon(p[0]);
            let l360 = if lon < 0.0 { lon + 360.0 } else { lon };
            lo = [lo[0].min(lon), lo[1].min(p[1])];
            hi = [hi[0].max(lon), hi[1].max(p[1])];
            lo360 = f64::min(lo360, l360);
            hi360 = f64::max(hi360, l360);
        }
        if lo[0] > hi[0] {
            return None;
        }
        let (west, east) = if hi360 - lo360 < hi[0] - lo[0] {
            (canonical_lon(lo360), canonical_lon(hi360))
        } else {
            (lo[0], hi[0])
        };
        Some(Extent {
            west,
            east,
            south: lo[1],
            north: hi[1],
        })
    }

    /// Degrees of longitude spanned, eastwards from `west`.
    fn width(&self) -> f64 {
        if self.east >= self.west {
            self.east - self.west
        } else {
            self.east + 360.0 - self.west
        }
    }

    /// The length of the box's diagonal in metres: the network's own size.
    pub fn size_m(&self) -> f64 {
        let east = self.west + self.width();
        karney_distance_m([self.west, self.south], [east, self.north]).max(karney_distance_m(
            [self.west, self.north],
            [east, self.south],
        ))
    }

    /// Geodesic distance in metres from `p` to the nearest point of the box's edge (0 inside).
    pub fn distance_m(&self, p: [f64; 2]) -> f64 {
        let lat = p[1].clamp(self.south, self.north);
        let from_west = (canonical_lon(p[0]) - self.west).rem_euclid(360.0);
        let lon = if from_west <= self.width() {
            p[0]
        } else {
            // Outside the span: the nearer of its two edge meridians.
            let to_east = from_west - self.width();
            if to_east <= 360.0 - from_west {
                self.east
            } else {
                self.west
            }
        };
        karney_distance_m(p, [lon, lat])
    }

    /// The box for a message: "longitude W to E, latitude S to N".
    pub fn shown(&self) -> String {
        format!(
            "longitude {} to {}, latitude {} to {}",
            trimmed(self.west, 5),
            trimmed(self.east, 5),
            trimmed(self.south, 5),
            trimmed(self.north, 5)
        )
    }
}

/// Where a point layer came from, for the message refusing it.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct LayerOrigin {
    /// The file messages name.
    pub path: PathBuf,
    /// The layer's role in messages: "sites", "damage reports".
    pub role: &'static str,
    /// The option giving the layer's CRS (`--sites-crs`).
    pub crs_flag: &'static str,
    /// The CRS the positions were converted from (given or declared), described; `None` when the
    /// layer named none and was read as WGS84 longitude/latitude.
    pub crs: Option<String>,
}

/// Refuses a layer whose every position lies farther from the roads' extent than
/// [`FAR_MIN_M`] and than [`FAR_SIZES`] times the network's size; a layer with any position
/// within that reach is kept (its far features are listed one by one by the stage that uses
/// them).
pub fn check_near(
    origin: &LayerOrigin,
    points: &[[f64; 2]],
    roads: &Extent,
) -> Result<(), IngestError> {
    let reach = FAR_MIN_M.max(FAR_SIZES * roads.size_m());
    let mut nearest = f64::INFINITY;
    for p in points {
        let d = roads.distance_m(*p);
        if d <= reach {
            return Ok(());
        }
        nearest = nearest.min(d);
    }
    let Some(layer) = Extent::of(points.iter().copied()) else {
        return Ok(());
    };
    let read = match &origin.crs {
        None => format!(
            "its positions were read as WGS84 longitude/latitude, as no CRS was given or \
             declared: a projected layer whose numbers fall within ±180 and ±90 (metres of a \
             small district or a local grid) reads so; {}",
            super::crs::hint(origin.crs_flag)
        ),
        Some(crs) => format!(
            "its positions were converted from {crs}: if that is not the layer's CRS, {}",
            super::crs::hint(origin.crs_flag)
        ),
    };
    Err(IngestError::Crs {
        path: origin.path.clone(),
        message: format!(
            "the {role} layer lies wholly away from the roads: its nearest position is {} km \
             from the road network's extent, farther than {} km; the layer spans {}, the roads \
             span {}; {read}; or give the {role} of this road network",
            trimmed(nearest / 1000.0, 1),
            trimmed(reach / 1000.0, 1),
            layer.shown(),
            roads.shown(),
            role = origin.role,
        ),
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    fn origin() -> LayerOrigin {
        LayerOrigin {
            path: "sites.csv".into(),
            role: "sites",
            crs_flag: "--sites-crs",
            crs: None,
        }
    }

    #[test]
    fn extent_takes_the_narrow_side_of_the_antimeridian() {
        let e = Extent::of([[179.5, -17.0], [-179.5, -16.0]]).unwrap();
        assert_eq!(
            (e.west, e.east, e.south, e.north),
            (179.5, -179.5, -17.0, -16.0)
        );
        assert!((e.width() - 1.0).abs() < 1e-12);
        assert_eq!(e.distance_m([180.0, -16.5]), 0.0);
        let plain = Extent::of([[10.0, 47.0], [10.2, 47.1]]).unwrap();
        assert_eq!((plain.west, plain.east), (10.0, 10.2));
        assert!(Extent::of(std::iter::empty()).is_none());
    }

    #[test]
    fn a_layer_near_the_roads_is_kept_and_one_elsewhere_refused() {
        // Roads of a small district near 9.5°E 47.1°N, about 2 km across.
        let roads = Extent::of([[9.50, 47.10], [9.52, 47.11]]).unwrap();
        // One site 5 km beyond the roads, the others inside: kept.
        let near = [[9.51, 47.105], [9.59, 47.10]];
        assert!(check_near(&origin(), &near, &roads).is_ok());
        // The same district in metres of a local grid, read as degrees: near 0°, 0°.
        let grid = [[0.35, 0.12], [1.2, 0.8]];
        let e = check_near(&origin(), &grid, &roads)
            .unwrap_err()
            .to_string();
        assert!(
            e.starts_with("sites.csv: the sites layer lies wholly away from the roads")
                && e.contains("--sites-crs EPSG:NNNN")
                && e.contains("longitude 0.35 to 1.2, latitude 0.12 to 0.8")
                && e.contains("longitude 9.5 to 9.52, latitude 47.1 to 47.11")
                && e.contains("farther than 50 km"),
            "{e}"
        );
        let converted = LayerOrigin {
            crs: Some("EPSG:2056 (metres)".into()),
            ..origin()
        };
        let e = check_near(&converted, &grid, &roads)
            .unwrap_err()
            .to_string();
        assert!(e.contains("converted from EPSG:2056 (metres)"), "{e}");
    }

    #[test]
    fn the_reach_grows_with_the_network() {
        // Roads 200 km across: a layer 300 km beyond them is within three sizes.
        let roads = Extent::of([[10.0, 45.0], [12.5, 46.0]]).unwrap();
        assert!(roads.size_m() > 200_000.0);
        assert!(check_near(&origin(), &[[16.0, 45.5]], &roads).is_ok());
        assert!(check_near(&origin(), &[[40.0, 45.5]], &roads).is_err());
    }
}
