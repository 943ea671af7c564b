//! Sites from an OpenStreetMap extract, chosen by tag: tagged nodes, and closed ways (a hospital
//! drawn as a building) placed at a point inside them.
//!
//! Without `--site-tags` the tags of [`DEFAULT_SITE_TAGS`] choose them; each `--site-tags
//! KEY=V1,V2` replaces that list (several are joined: a feature matching any is a site). A site's
//! id is `node/ID` or `way/ID`, its name the `name` tag, and its attributes every tag.

use super::IngestError;
use super::cost_table::RoadFilter;
use super::osm::{Positions, fingerprint, open, refuse};
use super::sites::{SiteLayer, SiteSettings};
use super::source::Source;
use osmpbf::Element;
use serde_json::{Map, Value};

/// The tags that make a site by default: hospitals and clinics (as `amenity` or `healthcare`),
/// emergency shelters and assembly points, schools, and fuel stations. OpenStreetMap tagging
/// (wiki Key:amenity, Key:healthcare, Key:social_facility, Key:emergency), from memory.
pub const DEFAULT_SITE_TAGS: &[(&str, &[&str])] = &[
    ("amenity", &["hospital", "clinic", "school", "fuel"]),
    ("healthcare", &["hospital", "clinic"]),
    ("social_facility", &["shelter"]),
    ("emergency", &["assembly_point"]),
];

/// The tag rules in force: the user's `--site-tags`, else [`DEFAULT_SITE_TAGS`].
pub fn rules(settings: &SiteSettings) -> Vec<RoadFilter> {
    if !settings.osm_tags.is_empty() {
        return settings.osm_tags.clone();
    }
    DEFAULT_SITE_TAGS
        .iter()
        .map(|(k, vs)| RoadFilter {
            field: k.to_string(),
            values: vs.iter().map(|v| v.to_string()).collect(),
            keep: true,
        })
        .collect()
}

/// True when some tag matches some rule (values compared as every attribute value is).
fn chosen(rules: &[RoadFilter], tags: &[(String, String)]) -> bool {
    rules.iter().any(|r| {
        tags.iter().any(|(k, v)| {
            *k == r.field
                && r.values
                    .iter()
                    .any(|x| super::value::same(v, x) || x == "*")
        })
    })
}

/// A candidate site before it is placed.
struct Found {
    kind: &'static str,
    id: i64,
    tags: Vec<(String, String)>,
    at: Result<[f64; 2], Vec<i64>>,
}

/// Reads the sites of an `.osm.pbf` extract.
pub fn read_osm_sites(source: &Source, settings: &SiteSettings) -> Result<SiteLayer, IngestError> {
    let path = source.display_path();
    let rules = rules(settings);
    let tags_of = |it: &mut dyn Iterator<Item = (&str, &str)>| -> Vec<(String, String)> {
        it.map(|(k, v)| (k.to_string(), v.to_string())).collect()
    };
    let mut found: Vec<Found> = Vec::new();
    open(source)?
        .for_each(|e| {
            if let Element::Way(w) = &e {
                let tags = tags_of(&mut w.tags());
                let refs: Vec<i64> = w.refs().collect();
                if chosen(&rules, &tags) && refs.len() >= 4 && refs.first() == refs.last() {
                    found.push(Found {
                        kind: "way",
                        id: w.id(),
                        tags,
                        at: Err(refs),
                    });
                }
            }
        })
        .map_err(|e| refuse(&path, e))?;
    let mut at = Positions::wanted(
        found
            .iter()
            .flat_map(|f| f.at.as_ref().err().into_iter().flatten().copied())
            .collect(),
    );
    let mut nodes = Vec::new();
    at.fill(source, |id, p, tags| {
        let tags = tags_of(tags);
        if chosen(&rules, &tags) {
            nodes.push(Found {
                kind: "node",
                id,
                tags,
                at: Ok(p),
            });
        }
    })?;
    // Nodes first, then ways, each in file order: the order is the file's, whatever the threads.
    nodes.append(&mut found);
    let mut sites = Vec::new();
    let mut defaults = Default::default();
    for f in nodes {
        let pos = match &f.at {
            Ok(p) => *p,
            Err(refs) => {
                let ring: Option<Vec<[f64; 2]>> = refs.iter().map(|r| at.get(*r)).collect();
                // A closed way cut at the extract's edge has no known inside: left out.
                let Some(p) = ring.as_deref().and_then(point_inside) else {
                    continue;
                };
                p
            }
        };
        let mut attributes: Map<String, Value> = f
            .tags
            .into_iter()
            .map(|(k, v)| (k, Value::from(v)))
            .collect();
        attributes.insert("osm_type".into(), Value::from(f.kind));
        attributes.insert("osm_id".into(), Value::from(f.id));
        let member = Value::from(format!("{}/{}", f.kind, f.id));
        let index = sites.len();
        sites.push(super::sites::make_site(
            &path,
            index,
            pos,
            attributes,
            Some(&member),
            settings,
            &mut defaults,
        )?);
    }
    if sites.is_empty() {
        return Err(IngestError::Empty {
            path,
            detail: format!(
                "no node or closed way carries a site tag ({}); choose tags with --site-tags KEY=V1,V2",
                rules
                    .iter()
                    .map(|r| format!("{}={}", r.field, r.values.join(",")))
                    .collect::<Vec<_>>()
                    .join("; ")
            ),
        });
    }
    Ok(SiteLayer {
        sites,
        input: fingerprint(source, "sites")?,
        defaults,
        origin: None,
    })
}

/// A point inside a ring: the middle of the widest stretch inside it along the line of latitude
/// through the vertices' mean (a centroid can fall outside an L-shaped building; this cannot).
pub fn point_inside(ring: &[[f64; 2]]) -> Option<[f64; 2]> {
    let n = ring.len().saturating_sub(1);
    if n < 3 {
        return None;
    }
    let y = ring[..n].iter().map(|p| p[1]).sum::<f64>() / n as f64;
    let mut xs: Vec<f64> = ring
        .windows(2)
        .filter(|w| (w[0][1] > y) != (w[1][1] > y))
        .map(|w| w[0][0] + (y - w[0][1]) / (w[1][1] - w[0][1]) * (w[1][0] - w[0][0]))
        .collect();
    xs.sort_by(f64::total_cmp);
    xs.chunks_exact(2)
        .max_by(|a, b| (a[1] - a[0]).total_cmp(&(b[1] - b[0])))
        .map(|c| [(c[0] + c[1]) / 2.0, y])
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_point_inside_an_l_shape() {
        // An L whose vertex mean lies in the notch: the point must still be inside the L.
        let l = [
            [0.0, 0.0],
            [4.0, 0.0],
            [4.0, 1.0],
            [1.0, 1.0],
            [1.0, 4.0],
            [0.0, 4.0],
            [0.0, 0.0],
        ];
        let p = point_inside(&l).unwrap();
        let inside = (p[0] > 0.0 && p[0] < 4.0 && p[1] > 0.0 && p[1] < 1.0)
            || (p[0] > 0.0 && p[0] < 1.0 && p[1] > 0.0 && p[1] < 4.0);
        assert!(inside, "{p:?}");
        assert_eq!(point_inside(&[[0.0, 0.0], [1.0, 0.0], [0.0, 0.0]]), None);
    }
}
