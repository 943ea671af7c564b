//! Work-order keys: a text key for each piece of road that stays the same in every re-plan of the
//! same road layer, so crews can hand a sheet back and it still matches the next plan.
//!
//! A key is `WO-<road>-<from>-<to>`: `<road>` is the source feature's id as written (`--id-field`,
//! the GeoJSON `id`, or a field such as `osm_id`), or `#<n>` (its 0-based position in the layer)
//! when it has none; `<from>` and `<to>` are whole metres along the source feature, from its first
//! vertex, where the piece starts and ends. Edge numbers are never used: they shift whenever a road
//! is added or removed anywhere in the layer, while a piece's place along its own road changes only
//! when the road itself, or a road meeting it, changes. Damage never moves a piece.
//!
//! Uniqueness holds by construction: a road id written on several features gets `/k` on its k-th
//! feature (k ≥ 2, in layer order); in an id, `%`, `/` and a leading `#` are written `%25`, `%2F`
//! and `%23`, so no id can look like a position or a repeat; and two pieces of one road whose spans
//! round to the same metres get `+k` on the k-th.
//!
//! With several road layers in one run, the key names the layer first, `WO-<layer>:<road>-…`
//! (the layer's label with `%`, `:` and `/` written `%25`, `%3A` and `%2F`), and a road id's
//! repeats are counted within its layer: two layers with the same ids give distinct keys, and a
//! layer's keys do not depend on the other layers. A run of one layer keeps the keys above.

use crate::decimal::push_digits;
use crate::fxhash::FxHashMap;
use crate::network::Network;

/// The keys of one network's edges, computed once for every layer and the work orders.
pub struct WorkOrderIds {
    /// Metres along its source feature where each edge starts.
    start_m: Vec<f64>,
    /// For each feature: 1 for the first feature with its id, k for the k-th (0: no id).
    occurrence: Vec<u32>,
    /// k for the k-th piece of its road with the same rounded span (k ≥ 2; absent for the rest).
    repeat: FxHashMap<u32, u32>,
}

/// The id text of a feature as written, when it has one.
fn id_text(v: &serde_json::Value) -> Option<String> {
    crate::ingest::value::text(v)
}

impl WorkOrderIds {
    /// Measures every edge's place along its source feature. Edges of one feature follow each other
    /// in id order along the feature (noding keeps the input's direction and order, and splits
    /// replace a piece in place), so a running sum per feature gives each piece's start.
    pub fn new(net: &Network) -> WorkOrderIds {
        let mut along = vec![0.0f64; net.features.len()];
        let start_m: Vec<f64> = net
            .edges
            .iter()
            .map(|e| {
                let s = along[e.feature as usize];
                along[e.feature as usize] += e.length_m;
                s
            })
            .collect();
        // Repeated ids, exactly, in little memory: a map from the text's hash to the first
        // feature with it and the count; a text whose hash an earlier, different text took is
        // counted in a map keyed by the text itself (rare: only on a 64-bit hash collision).
        let hash = |t: &str| {
            use std::hash::{BuildHasher, BuildHasherDefault};
            BuildHasherDefault::<crate::fxhash::FxHasher>::default().hash_one(t)
        };
        // With several layers an id is counted within its layer: the layer's number goes first.
        let several = net.layers.len() > 1;
        let text_of = |i: usize| {
            let t = net.features[i].source_id.as_ref().and_then(id_text)?;
            Some(match several {
                true => format!("{}\u{0}{t}", layer_number(net, i as u32)),
                false => t,
            })
        };
        let mut seen: FxHashMap<u64, (u32, u32)> = FxHashMap::default();
        let mut collided: FxHashMap<String, u32> = FxHashMap::default();
        let occurrence = (0..net.features.len())
            .map(|i| {
                let Some(t) = text_of(i) else { return 0 };
                let (first, n) = seen.entry(hash(&t)).or_insert((i as u32, 0));
                if *first as usize == i || text_of(*first as usize).as_deref() == Some(t.as_str()) {
                    *n += 1;
                    *n
                } else {
                    let c = collided.entry(t).or_insert(0);
                    *c += 1;
                    *c
                }
            })
            .collect();
        drop((seen, collided));
        // Two pieces of one road can share rounded spans only when both are under a metre (the
        // later starts where the earlier ends or beyond): only those are counted.
        let mut spans: FxHashMap<(u32, i64, i64), u32> = FxHashMap::default();
        let mut repeat: FxHashMap<u32, u32> = FxHashMap::default();
        for (i, (e, &s)) in net.edges.iter().zip(&start_m).enumerate() {
            if e.length_m < 1.0 {
                let n = spans
                    .entry((e.feature, metres(s), metres(s + e.length_m)))
                    .or_insert(0);
                *n += 1;
                if *n > 1 {
                    repeat.insert(i as u32, *n);
                }
            }
        }
        WorkOrderIds {
            start_m,
            occurrence,
            repeat,
        }
    }

    /// The key of edge `e`.
    pub fn key(&self, net: &Network, e: u32) -> String {
        let mut k = String::new();
        self.key_into(&mut k, net, e);
        k
    }

    /// Writes the key of edge `e` into `k` (cleared first): layers and work orders make one per
    /// edge, millions on a national layer, so the buffer is reused and no number allocates.
    pub fn key_into(&self, k: &mut String, net: &Network, e: u32) {
        use serde_json::Value;
        let edge = &net.edges[e as usize];
        let meta = &net.features[edge.feature as usize];
        k.clear();
        k.push_str("WO-");
        if net.layers.len() > 1 {
            let label = net.source_layer(edge.feature).unwrap_or_default();
            for ch in label.chars() {
                match ch {
                    '%' => k.push_str("%25"),
                    ':' => k.push_str("%3A"),
                    '/' => k.push_str("%2F"),
                    c => k.push(c),
                }
            }
            k.push(':');
        }
        let escape = |k: &mut String, t: &str| {
            for (i, ch) in t.chars().enumerate() {
                match ch {
                    '%' => k.push_str("%25"),
                    '/' => k.push_str("%2F"),
                    '#' if i == 0 => k.push_str("%23"),
                    c => k.push(c),
                }
            }
        };
        let named = match meta.source_id.as_ref() {
            // Text as `id_text` gives it, without the copy.
            Some(Value::String(s)) if !s.trim().is_empty() => {
                escape(k, s.trim());
                true
            }
            Some(v) => match id_text(v) {
                Some(t) => {
                    escape(k, &t);
                    true
                }
                None => false,
            },
            None => false,
        };
        if named {
            let n = self.occurrence[edge.feature as usize];
            if n > 1 {
                k.push('/');
                push_digits(k, u64::from(n), 1);
            }
        } else {
            k.push('#');
            push_digits(k, u64::from(meta.source_index), 1);
        }
        let s = self.start_m[e as usize];
        k.push('-');
        push_metres(k, metres(s));
        k.push('-');
        push_metres(k, metres(s + edge.length_m));
        if let Some(r) = self.repeat.get(&e) {
            k.push('+');
            push_digits(k, u64::from(*r), 1);
        }
    }
}

/// Whole metres as `format!("{}")` writes an i64.
fn push_metres(k: &mut String, m: i64) {
    if m < 0 {
        k.push('-');
    }
    push_digits(k, m.unsigned_abs(), 1);
}

/// The number of the layer feature `f` came from.
fn layer_number(net: &Network, f: u32) -> usize {
    net.layers.partition_point(|l| l.first_feature <= f)
}

/// Whole metres, rounded half away from zero.
fn metres(x: f64) -> i64 {
    x.round() as i64
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::ingest::damage::Damage;
    use crate::network::{Edge, FeatureMeta};
    use serde_json::json;

    fn net(ids: &[Option<serde_json::Value>], pieces: &[(u32, f64)]) -> Network {
        let mut n = Network {
            junctions: vec![[0.0, 0.0]; pieces.len() + 1],
            ..Default::default()
        };
        n.geom_offsets.push(0);
        for (i, id) in ids.iter().enumerate() {
            n.features.push(FeatureMeta {
                source_index: i as u32,
                source_id: id.clone(),
                damage: Damage::Factor(1.0),
                category: None,
                label: None,
                structure: None,
            });
        }
        for (i, &(f, len)) in pieces.iter().enumerate() {
            n.edges.push(Edge {
                from: i as u32,
                to: i as u32 + 1,
                length_m: len,
                damage: Damage::Factor(1.0),
                cost: 0,
                feature: f,
            });
            n.geom.extend([[0.0, 0.0], [0.0, 0.0]]);
            n.geom_offsets.push(n.geom.len());
        }
        n
    }

    #[test]
    fn keys_name_the_road_and_the_span_along_it() {
        let n = net(
            &[Some(json!(42)), None, Some(json!("a/b")), Some(json!(42))],
            &[(0, 100.4), (0, 50.2), (1, 10.0), (2, 5.0), (3, 7.0)],
        );
        let ids = WorkOrderIds::new(&n);
        let keys: Vec<String> = (0..5).map(|e| ids.key(&n, e)).collect();
        assert_eq!(
            keys,
            [
                "WO-42-0-100",
                "WO-42-100-151",
                "WO-#1-0-10",
                "WO-a%2Fb-0-5",
                "WO-42/2-0-7"
            ]
        );
    }

    #[test]
    fn ids_that_look_generated_cannot_collide() {
        let n = net(
            &[
                None,
                Some(json!("#0")),
                Some(json!("x")),
                Some(json!("x/2")),
            ],
            &[(0, 3.0), (1, 3.0), (2, 3.0), (2, 0.2), (2, 0.2), (3, 3.0)],
        );
        let ids = WorkOrderIds::new(&n);
        let keys: Vec<String> = (0..6).map(|e| ids.key(&n, e)).collect();
        let unique: std::collections::BTreeSet<&String> = keys.iter().collect();
        assert_eq!(unique.len(), keys.len(), "{keys:?}");
        assert_eq!(keys[1], "WO-%230-0-3");
        // Two pieces under a metre whose spans round alike: the second gets +2.
        assert_eq!(keys[3], "WO-x-3-3");
        assert_eq!(keys[4], "WO-x-3-3+2");
    }
}
