//! Several road layers in one run (`--roads` given more than once): each layer is read through the
//! one path every format takes ([`super::reader::read_lines`]), in its own CRS, then the layers are
//! laid end to end into one [`LineLayer`], so noding makes one network of them.
//!
//! Each layer keeps a label, written as `source_layer` beside `source_index` in the outputs: the
//! file's name (for a GeoPackage, `name.gpkg:TABLE`), or the path as given when two layers share a
//! file name, with `~2`, `~3`, … on a label an earlier layer still holds (unique by
//! construction). The same file given twice is refused (its roads would all be duplicates).

use super::IngestError;
use super::reader::{open_source, read_lines_as};
use super::roads::{LineLayer, RoadSettings};
use super::source::Source;
use crate::network::FeatureMeta;

/// One input layer's place in a [`LineLayer`] or network: its label and its first feature.
#[derive(Debug, Clone, PartialEq, Eq, Default)]
pub struct SourceLayer {
    /// The label written as `source_layer`.
    pub label: String,
    /// Index of the layer's first feature in the features of the whole.
    pub first_feature: u32,
}

/// The label of the layer whose first feature is at or before `feature` (`None` without layers).
pub fn label_of(layers: &[SourceLayer], feature: u32) -> Option<&str> {
    let i = layers.partition_point(|l| l.first_feature <= feature);
    (i > 0).then(|| layers[i - 1].label.as_str())
}

/// Reads every layer in `sources` and lays them end to end. With several layers, `--crs` applies
/// to those that declare no CRS of their own; with one, it overrides the layer's own (as always).
pub fn read_layers(sources: &[Source], settings: &RoadSettings) -> Result<LineLayer, IngestError> {
    let several = sources.len() > 1;
    for (i, a) in sources.iter().enumerate() {
        for b in &sources[..i] {
            if same_file(a, b) {
                return Err(IngestError::Io {
                    path: a.display_path(),
                    source: std::io::Error::other(format!(
                        "is given twice as a road layer (also as {}): every road would be doubled",
                        b.display_path().display()
                    )),
                });
            }
        }
    }
    let mut parts = Vec::with_capacity(sources.len());
    let mut named = false;
    for s in sources {
        let mut src = open_source(s, settings, several)?;
        named |= src.chosen_by_name();
        parts.push(read_lines_as(src.as_mut(), settings, several)?);
    }
    // With several inputs --roads-layer chooses only in those holding several layers: a name
    // that chose nothing is refused, never ignored.
    if let (true, Some(name), false) = (several, &settings.layer, named) {
        return Err(IngestError::Setting {
            name: "--roads-layer",
            message: format!(
                "{name:?} chose no layer: with several --roads inputs it chooses within each \
                 GeoPackage or zip that holds several layers (one holding a single layer is read \
                 whole), and none of them holds several; leave it out"
            ),
        });
    }
    Ok(merge(parts))
}

/// True when two sources name the same file (after following links), or the same name.
fn same_file(a: &Source, b: &Source) -> bool {
    match (a.path(), b.path()) {
        (Some(p), Some(q)) => match (std::fs::canonicalize(p), std::fs::canonicalize(q)) {
            (Ok(x), Ok(y)) => x == y,
            _ => p == q,
        },
        _ => a.display_path() == b.display_path(),
    }
}

/// Lays layers end to end: features, parts and vertices renumbered, counts added, labels made
/// unique. Layers in one CRS keep their lengths' method; layers in different CRSs are all measured
/// on the ellipsoid (one method for one network).
pub fn merge(mut parts: Vec<LineLayer>) -> LineLayer {
    if parts.len() == 1 {
        return parts.pop().unwrap_or_default();
    }
    relabel(&mut parts);
    let same_crs = parts.windows(2).all(|w| {
        w[0].crs_name == w[1].crs_name
            && w[0].to_meter == w[1].to_meter
            && w[0].native.is_empty() == w[1].native.is_empty()
    });
    let mut out = LineLayer {
        to_meter: parts[0].to_meter,
        ..Default::default()
    };
    if same_crs {
        out.crs_name = parts[0].crs_name.clone();
        out.length_method = parts[0].length_method.clone();
        out.crs_note = parts[0].crs_note.clone();
    } else {
        let each: Vec<String> = parts
            .iter()
            .map(|p| format!("{}: {}", p.layers[0].label, p.crs_name))
            .collect();
        out.crs_name = each.join("; ");
        out.length_method = "geodesic on the WGS84 ellipsoid (the layers are in different CRSs, \
                             each converted to longitude/latitude)"
            .into();
        let notes: Vec<String> = parts.iter().filter_map(|p| p.crs_note.clone()).collect();
        out.crs_note = (!notes.is_empty()).then(|| notes.join("; "));
    }
    for p in parts {
        let (f0, c0) = (out.features.len() as u32, out.coords.len());
        out.layers.push(super::layers::SourceLayer {
            label: p.layers[0].label.clone(),
            first_feature: f0,
        });
        out.coords.extend_from_slice(&p.coords);
        if same_crs {
            out.native.extend_from_slice(&p.native);
        }
        out.part_ends.extend(p.part_ends.iter().map(|e| e + c0));
        out.part_feature
            .extend(p.part_feature.iter().map(|f| f + f0));
        // Each layer's text handles are renumbered into the one table.
        let moved = out.texts.absorb(&p.texts);
        let re = |t| crate::texts::TextTable::moved(&moved, t);
        out.features
            .extend(p.features.into_iter().map(|m| FeatureMeta {
                category: re(m.category),
                label: re(m.label),
                structure: re(m.structure),
                ..m
            }));
        let (s, t) = (&mut out.stats, &p.stats);
        s.features_read += t.features_read;
        s.features_used += t.features_used;
        s.line_parts += t.line_parts;
        s.vertices += t.vertices;
        s.damage_defaulted += t.damage_defaulted;
        s.features_cut_at_edge += t.features_cut_at_edge;
        for (k, n) in &t.features_skipped {
            *s.features_skipped.entry(k.clone()).or_default() += n;
        }
        out.osm_fields |= p.osm_fields;
        match &out.input {
            None => out.input = p.input,
            Some(_) => out.more_inputs.extend(p.input),
        }
    }
    out
}

/// Replaces labels that two layers share by each layer's path as given (a GeoPackage keeps its
/// `:TABLE`), then makes every label unique by construction: a label still taken by an earlier
/// layer (a GeoPackage `g.gpkg` table `roads` beside a file named `g.gpkg:roads`) gets `~2`, `~3`,
/// … (the first free), so work-order keys, which name the layer, never repeat.
fn relabel(parts: &mut [LineLayer]) {
    paths_for_shared(parts);
    let mut taken = std::collections::BTreeSet::new();
    for p in parts.iter_mut() {
        let base = p.layers[0].label.clone();
        let mut label = base.clone();
        let mut k = 2;
        while taken.contains(&label) {
            label = format!("{base}~{k}");
            k += 1;
        }
        taken.insert(label.clone());
        p.layers[0].label = label;
    }
}

/// Replaces labels that two layers share by each layer's path as given.
fn paths_for_shared(parts: &mut [LineLayer]) {
    let labels: Vec<String> = parts.iter().map(|p| p.layers[0].label.clone()).collect();
    for (i, p) in parts.iter_mut().enumerate() {
        if labels.iter().filter(|l| **l == labels[i]).count() > 1
            && let Some(input) = &p.input
        {
            let name = std::path::Path::new(&input.path)
                .file_name()
                .map(|n| n.to_string_lossy().into_owned())
                .unwrap_or_default();
            let table = labels[i].strip_prefix(&name).unwrap_or("");
            p.layers[0].label = format!("{}{table}", input.path);
        }
    }
}

/// Refuses a network in which one of several road layers lost all, or nearly all (nine in ten, at
/// ten features or more), of its features to lines collapsed to single points: the sign of a layer
/// read in the wrong CRS (a `--crs` in metres applied to longitudes and latitudes shrinks the layer
/// to a few metres), which would otherwise drop out of the network without a word.
pub fn check_layers_kept(
    net: &crate::network::Network,
    stats: &super::noding::NodingStats,
    snap_m: f64,
) -> Result<(), IngestError> {
    if net.layers.len() < 2 {
        return Ok(());
    }
    let n = net.features.len();
    let mut has_edge = vec![false; n];
    for e in &net.edges {
        has_edge[e.feature as usize] = true;
    }
    let mut collapsed = vec![false; n];
    for q in &stats.qa_points {
        if let (super::qa::QaKind::RemovedZeroLength, Some(f)) = (q.kind, q.feature) {
            collapsed[f as usize] = true;
        }
    }
    for (i, l) in net.layers.iter().enumerate() {
        let end = net
            .layers
            .get(i + 1)
            .map_or(n, |m| m.first_feature as usize);
        let range = l.first_feature as usize..end;
        let total = range.len();
        let lost = range.filter(|&f| collapsed[f] && !has_edge[f]).count();
        if total > 0 && (lost == total || (total >= 10 && lost * 10 >= total * 9)) {
            return Err(IngestError::Crs {
                path: std::path::PathBuf::from(&l.label),
                message: format!(
                    "road layer `{}`: {lost} of its {total} feature(s) collapsed to single points \
                     when vertices closer than --snap {} m were merged, so the layer would \
                     drop out of the network: its CRS is probably wrong. With several layers, \
                     --crs applies to every layer without a CRS of its own (a Shapefile without \
                     .prj, a GeoJSON without a `crs` member); give the layer a CRS of its own (a \
                     .prj, or a `crs` member such as \"urn:ogc:def:crs:OGC:1.3:CRS84\" for \
                     longitude/latitude) or leave out --crs",
                    l.label,
                    crate::decimal::shown(snap_m)
                ),
            });
        }
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn labels_by_first_feature() {
        let l = |label: &str, first_feature| SourceLayer {
            label: label.into(),
            first_feature,
        };
        let layers = [l("a.geojson", 0), l("b.zip", 3)];
        assert_eq!(label_of(&layers, 0), Some("a.geojson"));
        assert_eq!(label_of(&layers, 2), Some("a.geojson"));
        assert_eq!(label_of(&layers, 3), Some("b.zip"));
        assert_eq!(label_of(&[], 0), None);
    }

    /// A GeoPackage table `roads` and a file named `g.gpkg:roads` in one folder share a label
    /// and a path-based label: the second gets `~2`, and a third layer really named `…~2` `~3`.
    #[test]
    fn labels_are_unique_by_construction() {
        let part = |label: &str, path: &str| LineLayer {
            layers: vec![SourceLayer {
                label: label.into(),
                first_feature: 0,
            }],
            input: Some(crate::ingest::source::InputRecord {
                role: "roads".into(),
                path: path.into(),
                sha256: String::new(),
                bytes: 0,
                deleted_records: 0,
            }),
            ..Default::default()
        };
        let mut parts = vec![
            part("g.gpkg:roads", "d/g.gpkg"),
            part("g.gpkg:roads", "d/g.gpkg:roads"),
            part("d/g.gpkg:roads~2", "d/g.gpkg:roads~2"),
        ];
        relabel(&mut parts);
        let labels: Vec<&str> = parts.iter().map(|p| p.layers[0].label.as_str()).collect();
        assert_eq!(
            labels,
            ["d/g.gpkg:roads", "d/g.gpkg:roads~2", "d/g.gpkg:roads~2~2"]
        );
    }
}
