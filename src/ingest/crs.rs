//! Coordinate reference systems: from EPSG codes, `.prj` files (ESRI or OGC WKT) and GeoJSON `crs`
//! members, to WGS84 longitude/latitude, with the ground-length rule for each.
//!
//! The pure-Rust projection stack (proj4rs, proj4wkt, crs-definitions) carries no datum database:
//! a WKT without a datum shift would land tens to hundreds of metres off for datums other than
//! WGS84/NAD83-like ones. So a WKT naming an EPSG code is resolved by the code; otherwise the datum
//! name is looked up in a small table of shifts; an unknown non-WGS84 datum is an error asking for
//! `--crs EPSG:…`, never a silent unshifted result.

use proj4rs::Proj;

/// How edge lengths are measured for a CRS.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum LengthRule {
    /// Geodesic on WGS84 from longitude/latitude (geographic CRSs, and projections whose planar
    /// distances are far from ground, such as Web Mercator).
    Geodesic,
    /// Planar length times the unit: conformal national and zone grids (UTM, State Plane, …), as the
    /// analyst's own GIS reports them.
    Planar,
}

/// A coordinate reference system ready to convert to WGS84 longitude/latitude.
pub struct Crs {
    /// How it was named (e.g. `EPSG:2223`, or the WKT's own name).
    pub name: String,
    src: Proj,
    dst: Proj,
    /// True for longitude/latitude CRSs.
    pub geographic: bool,
    /// Metres per unit of the projected coordinates (1 for geographic).
    pub to_meter: f64,
    /// How lengths are measured.
    pub lengths: LengthRule,
    /// Accuracy notes worth stating in the summary (e.g. a datum shift without grids).
    pub note: Option<String>,
}

impl std::fmt::Debug for Crs {
    fn fmt(&self, f: &mut std::fmt::Formatter) -> std::fmt::Result {
        write!(f, "Crs({})", self.name)
    }
}

/// Conformal projections used for national and zone grids: planar lengths are ground lengths to
/// within the grid's scale error.
const CONFORMAL: &[&str] = &[
    "tmerc", "etmerc", "utm", "lcc", "sterea", "stere", "somerc", "omerc",
];

/// Datum shifts to WGS84 (Helmert, PROJ `towgs84` form) keyed by spellings of the datum name in ESRI
/// and GDAL WKT. Values are the common published transformations (from memory; each carries the
/// metre-level accuracy of a grid-free shift).
const DATUM_SHIFTS: &[(&[&str], &str, &str)] = &[
    (
        &[
            "D_North_American_1927",
            "North_American_Datum_1927",
            "NAD27",
        ],
        "-8,160,176,0,0,0,0",
        "NAD27 shifted without grids (metre-level, as PROJ does without grid files)",
    ),
    (
        &["D_OSGB_1936", "OSGB_1936", "OSGB36"],
        "446.448,-125.157,542.06,0.15,0.247,0.842,-20.489",
        "OSGB36 shifted by the 7-parameter Helmert transformation (about 2 m; OSTN15 grids are more exact)",
    ),
    (
        &["D_European_1950", "European_Datum_1950", "ED50"],
        "-87,-98,-121,0,0,0,0",
        "ED50 shifted by the 3-parameter mean transformation (several metres)",
    ),
    (
        &["D_Amersfoort", "Amersfoort"],
        "565.2369,50.0087,465.658,-0.406857,0.350733,-1.87035,4.0812",
        "Amersfoort shifted by the 7-parameter Helmert transformation (about 1 m)",
    ),
    (
        &["D_CH1903+", "CH1903+", "D_CH1903", "CH1903"],
        "674.374,15.056,405.346,0,0,0,0",
        "CH1903 shifted by the 3-parameter transformation (about 1 m)",
    ),
];

/// Datums that coincide with WGS84 at the metre level (no shift applied).
const WGS84_LIKE: &[&str] = &[
    "WGS_1984",
    "D_WGS_1984",
    "WGS84",
    "World Geodetic System 1984",
    "North_American_Datum_1983",
    "D_North_American_1983",
    "NAD83",
    "European_Terrestrial_Reference_System_1989",
    "D_ETRS_1989",
    "ETRS89",
    "Geocentric_Datum_of_Australia_1994",
    "D_GDA_1994",
    "GDA94",
    "Geocentric_Datum_of_Australia_2020",
    "D_GDA2020",
    "GDA2020",
    "New_Zealand_Geodetic_Datum_2000",
    "D_NZGD_2000",
    "NZGD2000",
    "Sistema_de_Referencia_Geocentrico_para_las_AmericaS_2000",
    "D_SIRGAS_2000",
    "SIRGAS2000",
    "D_North_American_1983_HARN",
    "NAD83_High_Accuracy_Reference_Network",
    "D_NAD_1983_2011",
    "NAD83_National_Spatial_Reference_System_2011",
];

impl Crs {
    /// WGS84 longitude/latitude (EPSG:4326), as RFC 7946 GeoJSON uses.
    pub fn wgs84() -> Crs {
        Crs::from_proj_string(
            "EPSG:4326".into(),
            "+proj=longlat +datum=WGS84 +no_defs",
            None,
        )
        .expect("WGS84 is always available")
    }

    /// A CRS from an EPSG code.
    pub fn from_epsg(code: u32) -> Result<Crs, String> {
        let name = format!("EPSG:{code}");
        if code == 4326 {
            return Ok(Crs::wgs84());
        }
        let def = u16::try_from(code)
            .ok()
            .and_then(crs_definitions::from_code)
            .ok_or_else(|| format!("{name} is not a coordinate reference system reknit knows"))?;
        let mut proj = def.proj4.to_string();
        let mut note = None;
        if proj.contains("+datum=NAD27") || proj.contains("+nadgrids") {
            // No grid files here: use the grid-free shift PROJ itself falls back to.
            proj = proj
                .replace("+datum=NAD27", "+ellps=clrk66 +towgs84=-8,160,176,0,0,0,0")
                .split_whitespace()
                .filter(|p| !p.starts_with("+nadgrids"))
                .collect::<Vec<_>>()
                .join(" ");
            note = Some(
                "NAD27 shifted without grids (metre-level, as PROJ does without grid files)".into(),
            );
        }
        Crs::from_proj_string(name, &proj, note)
    }

    /// A CRS from a user string: `EPSG:NNNN` (or a bare number).
    pub fn from_user(s: &str) -> Result<Crs, String> {
        let t = s.trim();
        let code = t
            .strip_prefix("EPSG:")
            .or_else(|| t.strip_prefix("epsg:"))
            .unwrap_or(t);
        let code: u32 = code
            .parse()
            .map_err(|_| format!("{s:?} is not a CRS reknit understands; give it as EPSG:NNNN"))?;
        Crs::from_epsg(code)
    }

    /// A CRS from the WKT of a `.prj` file (ESRI or OGC WKT 1, or WKT 2); the error ends where
    /// the caller adds [`hint`] with the option of its layer kind.
    pub fn from_wkt(wkt: &str) -> Result<Crs, String> {
        let wkt = wkt.trim().trim_start_matches('\u{feff}');
        if let Some(code) = top_level_epsg(wkt)
            && let Ok(c) = Crs::from_epsg(code)
        {
            return Ok(c);
        }
        let name = wkt_name(wkt).unwrap_or_else(|| "the .prj's CRS".into());
        let proj = proj4wkt::wkt_to_projstring(wkt)
            .map_err(|e| format!("cannot read the CRS {name:?}: {e}"))?;
        let datum = wkt_datum(wkt).unwrap_or_default();
        let mut note = None;
        let proj = if WGS84_LIKE.iter().any(|d| d.eq_ignore_ascii_case(&datum)) || datum.is_empty()
        {
            if datum.contains("1983") || datum.contains("NAD83") {
                note = Some(
                    "NAD83 treated as WGS84 (no shift, as PROJ does; about 1–2 m in reality)"
                        .into(),
                );
            }
            proj
        } else if let Some((_, shift, why)) = DATUM_SHIFTS
            .iter()
            .find(|(names, _, _)| names.iter().any(|n| n.eq_ignore_ascii_case(&datum)))
        {
            note = Some(why.to_string());
            set_towgs84(&proj, shift)
        } else {
            return Err(format!(
                "the CRS {name:?} uses the datum {datum:?}, whose shift to WGS84 reknit does not know"
            ));
        };
        Crs::from_proj_string(name, &proj, note)
    }

    fn from_proj_string(name: String, proj: &str, note: Option<String>) -> Result<Crs, String> {
        let src = Proj::from_proj_string(proj)
            .map_err(|e| format!("the CRS {name} ({proj}) is not supported: {e}"))?;
        let dst = Proj::from_proj_string("+proj=longlat +datum=WGS84 +no_defs")
            .map_err(|e| format!("WGS84: {e}"))?;
        let geographic = src.is_latlong();
        let projname = src.projname();
        let web_mercator =
            projname == "merc" && proj.contains("+a=6378137") && proj.contains("+b=6378137");
        let lengths = if !geographic && CONFORMAL.contains(&projname) && !web_mercator {
            LengthRule::Planar
        } else {
            LengthRule::Geodesic
        };
        Ok(Crs {
            name,
            to_meter: if geographic { 1.0 } else { src.to_meter() },
            src,
            dst,
            geographic,
            lengths,
            note,
        })
    }

    /// True when the CRS is WGS84 longitude/latitude itself (no conversion needed).
    pub fn is_wgs84(&self) -> bool {
        self.name == "EPSG:4326"
    }

    /// Converts one position to WGS84 longitude/latitude (degrees); `None` when it cannot be
    /// converted or lands outside the globe.
    pub fn to_lonlat(&self, p: [f64; 2]) -> Option<[f64; 2]> {
        if self.is_wgs84() {
            return Some(p);
        }
        let (x, y) = if self.geographic {
            (p[0].to_radians(), p[1].to_radians())
        } else {
            (p[0], p[1])
        };
        let (lon, lat) = proj4rs::adaptors::transform_xy(&self.src, &self.dst, x, y).ok()?;
        let (lon, lat) = (lon.to_degrees(), lat.to_degrees());
        let ll = (lon.is_finite()
            && lat.is_finite()
            && lon.abs() <= 180.0 + 1e-9
            && lat.abs() <= 90.0 + 1e-9)
            .then_some([lon.clamp(-180.0, 180.0), lat.clamp(-90.0, 90.0)])?;
        // A position far outside the projection's domain can land on the globe while meaning
        // nothing (a pole, a wrapped longitude): it must come back to where it started.
        let back = self.from_lonlat(ll)?;
        let tol = |a: f64| 1e-3 + 1e-9 * a.abs();
        ((back[0] - p[0]).abs() <= tol(p[0]) && (back[1] - p[1]).abs() <= tol(p[1])).then_some(ll)
    }

    /// Converts WGS84 longitude/latitude to this CRS (for tests and checks).
    pub fn from_lonlat(&self, p: [f64; 2]) -> Option<[f64; 2]> {
        let (x, y) = proj4rs::adaptors::transform_xy(
            &self.dst,
            &self.src,
            p[0].to_radians(),
            p[1].to_radians(),
        )
        .ok()?;
        let out = if self.geographic {
            [x.to_degrees(), y.to_degrees()]
        } else {
            [x, y]
        };
        (out[0].is_finite() && out[1].is_finite()).then_some(out)
    }

    /// A description for summaries.
    pub fn describe(&self) -> String {
        let unit = if self.geographic {
            "degrees".to_string()
        } else if (self.to_meter - 1.0).abs() < 1e-12 {
            "metres".to_string()
        } else if (self.to_meter - 0.304_800_609_601_219_2).abs() < 1e-12 {
            "US survey feet".to_string()
        } else if (self.to_meter - 0.3048).abs() < 1e-12 {
            "international feet".to_string()
        } else {
            format!("units of {} m", self.to_meter)
        };
        format!("{} ({unit})", self.name)
    }
}

/// Replaces (or adds) the `+towgs84` of a PROJ string.
fn set_towgs84(proj: &str, shift: &str) -> String {
    let mut parts: Vec<String> = proj
        .split_whitespace()
        .filter(|p| !p.starts_with("+towgs84"))
        .map(str::to_string)
        .collect();
    parts.push(format!("+towgs84={shift}"));
    parts.join(" ")
}

/// The EPSG code in the WKT's outermost AUTHORITY (WKT 1) or ID (WKT 2), if any.
fn top_level_epsg(wkt: &str) -> Option<u32> {
    // The outermost object's authority is the last AUTHORITY/ID at nesting depth 1.
    let bytes = wkt.as_bytes();
    let mut depth = 0i32;
    let mut found = None;
    let mut i = 0;
    while i < bytes.len() {
        match bytes[i] {
            b'[' | b'(' => depth += 1,
            b']' | b')' => depth -= 1,
            _ if depth == 1 => {
                let rest = &wkt[i..];
                for key in ["AUTHORITY[", "ID["] {
                    if rest.len() >= key.len() && rest[..key.len()].eq_ignore_ascii_case(key) {
                        let inner = &rest[key.len()..];
                        let end = inner.find(']').unwrap_or(inner.len());
                        let fields: Vec<&str> = inner[..end]
                            .split(',')
                            .map(|s| s.trim().trim_matches('"'))
                            .collect();
                        if fields.len() >= 2 && fields[0].eq_ignore_ascii_case("EPSG") {
                            found = fields[1].parse().ok();
                        }
                    }
                }
            }
            _ => {}
        }
        i += 1;
    }
    found
}

/// The first quoted name of the WKT's outermost object.
fn wkt_name(wkt: &str) -> Option<String> {
    let start = wkt.find('"')? + 1;
    let end = start + wkt[start..].find('"')?;
    Some(wkt[start..end].to_string())
}

/// The name of the WKT's DATUM.
fn wkt_datum(wkt: &str) -> Option<String> {
    let upper = wkt.to_ascii_uppercase();
    let at = upper.find("DATUM[").or_else(|| upper.find("DATUM ["))?;
    let rest = &wkt[at..];
    let start = rest.find('"')? + 1;
    let end = start + rest[start..].find('"')?;
    Some(rest[start..end].to_string())
}

/// The option that gives the CRS of a layer of `role` (as inputs are named in summaries): every
/// CRS message names the option that applies to the layer it is about, and that option works.
pub fn option_for(role: &str) -> &'static str {
    super::kind::LayerKind::of_role(role).crs_flag
}

/// The advice ending a CRS message about a layer whose CRS is given with `option`.
pub fn hint(option: &str) -> String {
    format!("give the layer's CRS with {option} EPSG:NNNN")
}

/// The CRS of a legacy GeoJSON `crs` member: WGS84 when absent, the named EPSG code when it names
/// one, an error otherwise; `option` is the one that gives this layer's CRS instead.
///
/// The 2008 GeoJSON specification (§3.1) writes it `{"type":"name","properties":{"name":…}}`;
/// its older `{"type":"EPSG","properties":{"code":N}}` and a bare string naming a code are read
/// too (common practice, no source): each names its CRS plainly.
pub fn crs_member(
    path: &std::path::Path,
    crs: Option<&serde_json::Value>,
    option: &str,
) -> Result<Crs, super::IngestError> {
    let Some(crs) = crs.filter(|c| !c.is_null()) else {
        return Ok(Crs::wgs84());
    };
    let code_member = crs
        .pointer("/properties/code")
        .and_then(serde_json::Value::as_u64)
        .filter(|_| crs.get("type").and_then(|t| t.as_str()) == Some("EPSG"))
        .map(|c| format!("EPSG:{c}"));
    let name = crs
        .as_str()
        .or_else(|| {
            crs.pointer("/properties/name")
                .and_then(serde_json::Value::as_str)
        })
        .map(str::to_string)
        .or(code_member)
        .unwrap_or_default();
    let lonlat = [
        "urn:ogc:def:crs:OGC:1.3:CRS84",
        "urn:ogc:def:crs:OGC::CRS84",
        "CRS84",
    ];
    if lonlat.iter().any(|n| n.eq_ignore_ascii_case(name.trim())) {
        return Ok(Crs::wgs84());
    }
    let code = name
        .trim()
        .rsplit([':', '/'])
        .next()
        .filter(|_| name.to_ascii_uppercase().contains("EPSG"))
        .and_then(|c| c.parse::<u32>().ok());
    match code {
        Some(c) => Crs::from_epsg(c).map_err(|message| super::IngestError::Crs {
            path: path.to_path_buf(),
            message: format!("the layer's crs member names {name}: {message}"),
        }),
        None => {
            let mut shown = crs.to_string();
            if shown.chars().count() > 200 {
                shown = shown.chars().take(200).collect::<String>() + "…";
            }
            Err(super::IngestError::Crs {
                path: path.to_path_buf(),
                message: format!(
                    "the layer's crs member {shown} names no EPSG code reknit can read; {} or \
                     reproject the layer to WGS84 longitude/latitude (RFC 7946)",
                    hint(option)
                ),
            })
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn close(a: [f64; 2], b: [f64; 2], tol: f64) -> bool {
        (a[0] - b[0]).abs() <= tol && (a[1] - b[1]).abs() <= tol
    }

    #[test]
    fn transverse_mercator_worked_example() {
        // EPSG Guidance Note 7-2, Transverse Mercator example (OSGB36 / British National Grid):
        // φ = 50°30'N, λ = 0°30'E gives E = 577 274.99 m, N = 69 740.50 m (from memory). Projection
        // only, on the Airy ellipsoid, so no datum shift is involved.
        let c = Crs::from_proj_string(
            "BNG (Airy, projection only)".into(),
            "+proj=tmerc +lat_0=49 +lon_0=-2 +k=0.9996012717 +x_0=400000 +y_0=-100000 +ellps=airy +towgs84=0,0,0,0,0,0,0",
            None,
        )
        .unwrap();
        let local = Crs::from_proj_string(
            "Airy lon/lat".into(),
            "+proj=longlat +ellps=airy +towgs84=0,0,0,0,0,0,0",
            None,
        )
        .unwrap();
        let (x, y) = proj4rs::adaptors::transform_xy(
            &local.src,
            &c.src,
            0.5f64.to_radians(),
            50.5f64.to_radians(),
        )
        .unwrap();
        assert!(close([x, y], [577_274.99, 69_740.50], 0.01), "{x} {y}");
        assert_eq!(c.lengths, LengthRule::Planar);
    }

    #[test]
    fn lambert_conic_2sp_worked_example() {
        // EPSG Guidance Note 7-2, Lambert Conic Conformal (2SP) example (NAD27 / Texas South
        // Central): φ = 28°30'N, λ = 96°00'W gives E = 2 963 503.91 US ft, N = 254 759.80 US ft
        // (from memory). Projection only, on the Clarke 1866 ellipsoid.
        let proj = "+proj=lcc +lat_1=28.38333333333333 +lat_2=30.28333333333333 +lat_0=27.83333333333333 \
                    +lon_0=-99 +x_0=609601.2192024384 +y_0=0 +ellps=clrk66 +towgs84=0,0,0,0,0,0,0 +units=us-ft";
        let c = Crs::from_proj_string("TX SC".into(), proj, None).unwrap();
        let local = Crs::from_proj_string(
            "Clarke lon/lat".into(),
            "+proj=longlat +ellps=clrk66 +towgs84=0,0,0,0,0,0,0",
            None,
        )
        .unwrap();
        let (x, y) = proj4rs::adaptors::transform_xy(
            &local.src,
            &c.src,
            (-96f64).to_radians(),
            28.5f64.to_radians(),
        )
        .unwrap();
        // proj4rs works in the CRS's own unit (US survey feet here).
        assert!(close([x, y], [2_963_503.91, 254_759.80], 0.02), "{x} {y}");
        assert!((c.to_meter - 0.304_800_609_601_219_2).abs() < 1e-12);
    }

    #[test]
    fn prj_files_resolve_with_units_and_datums() {
        // An ESRI .prj as ArcGIS writes it (GeoDa Center sample, Arizona State Plane Central, US ft).
        let az = r#"PROJCS["NAD_1983_StatePlane_Arizona_Central_FIPS_0202_Feet",GEOGCS["GCS_North_American_1983",DATUM["D_North_American_1983",SPHEROID["GRS_1980",6378137.0,298.257222101]],PRIMEM["Greenwich",0.0],UNIT["Degree",0.0174532925199433]],PROJECTION["Transverse_Mercator"],PARAMETER["False_Easting",699998.6],PARAMETER["False_Northing",0.0],PARAMETER["Central_Meridian",-111.9166666666667],PARAMETER["Scale_Factor",0.9999],PARAMETER["Latitude_Of_Origin",31.0],UNIT["Foot_US",0.3048006096012192]]"#;
        let c = Crs::from_wkt(az).unwrap();
        assert!((c.to_meter - 0.304_800_609_601_219_2).abs() < 1e-12);
        assert_eq!(c.lengths, LengthRule::Planar);
        assert!(c.note.as_deref().unwrap_or("").contains("NAD83"));
        // A GDAL-style WKT with a top-level EPSG authority resolves by the code.
        let utm = r#"PROJCS["WGS 84 / UTM zone 33N",GEOGCS["WGS 84",DATUM["WGS_1984",SPHEROID["WGS 84",6378137,298.257223563]],PRIMEM["Greenwich",0],UNIT["degree",0.0174532925199433]],PROJECTION["Transverse_Mercator"],PARAMETER["latitude_of_origin",0],PARAMETER["central_meridian",15],PARAMETER["scale_factor",0.9996],PARAMETER["false_easting",500000],PARAMETER["false_northing",0],UNIT["metre",1],AUTHORITY["EPSG","32633"]]"#;
        assert_eq!(Crs::from_wkt(utm).unwrap().name, "EPSG:32633");
        // An unknown datum is refused, never silently unshifted.
        let odd = az.replace("D_North_American_1983", "D_Atlantis_1900");
        let e = Crs::from_wkt(&odd).unwrap_err();
        assert!(e.contains("Atlantis"), "{e}");
        assert!(Crs::from_wkt("PROJCS[garbage").is_err());
    }

    #[test]
    fn crs_members_in_each_spelling() {
        use serde_json::json;
        let p = std::path::Path::new("x.geojson");
        for (member, name) in [
            (
                json!({"type":"name","properties":{"name":"urn:ogc:def:crs:EPSG::32632"}}),
                "EPSG:32632",
            ),
            (
                json!({"type":"name","properties":{"name":"EPSG:32632"}}),
                "EPSG:32632",
            ),
            (json!("EPSG:32632"), "EPSG:32632"),
            (
                json!({"type":"EPSG","properties":{"code":32632}}),
                "EPSG:32632",
            ),
            (json!("urn:ogc:def:crs:OGC:1.3:CRS84"), "EPSG:4326"),
        ] {
            let c = crs_member(p, Some(&member), "--crs").unwrap();
            assert_eq!(c.name, name, "{member}");
        }
        let e = crs_member(
            p,
            Some(&json!({"type":"name","properties":{"name":"my grid"}})),
            "--sites-crs",
        )
        .unwrap_err()
        .to_string();
        assert!(
            e.contains("--sites-crs EPSG:NNNN") && !e.contains("--crs "),
            "{e}"
        );
        assert_eq!(option_for("damage zones"), "--zones-crs");
    }

    #[test]
    fn web_mercator_lengths_are_geodesic_and_round_trip() {
        let c = Crs::from_epsg(3857).unwrap();
        assert_eq!(c.lengths, LengthRule::Geodesic);
        let p = c.from_lonlat([9.5, 47.1]).unwrap();
        let back = c.to_lonlat(p).unwrap();
        assert!(close(back, [9.5, 47.1], 1e-9));
        assert!(Crs::from_user("EPSG:99999").is_err());
        assert!(Crs::from_user("banana").is_err());
    }
}
