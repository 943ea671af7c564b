//! The topological road network every later stage works on.
//!
//! Junctions and edges are numbered densely (u32) in order of first appearance in the input, and each
//! edge keeps its geometry, length, damage, integer cost and the input feature it came from.
//! Invariants: every edge's `from`/`to` is a valid junction; an edge's geometry starts at its `from`
//! junction and ends at its `to` junction; closed edges carry cost 0 and are never part of a plan.

use crate::ingest::damage::Damage;
use crate::texts::{Text, TextTable};
use serde_json::Value;

/// Cost in milli-repair-metres (one repair-metre is one metre of road at damage factor 1.0).
pub type Cost = u64;

/// Converts a cost in milli-repair-metres into repair-metres for display.
pub fn cost_to_repair_metres(c: Cost) -> f64 {
    c as f64 / 1000.0
}

/// The integer cost of a piece of road: length in millimetres times damage, rounded once.
pub fn cost_of(length_m: f64, damage: Damage) -> Cost {
    match damage {
        Damage::Factor(f) => (length_m * 1000.0 * f).round() as Cost,
        Damage::Closed => 0,
    }
}

/// Attributes of an input feature that outputs carry back to the user.
#[derive(Debug, Clone, PartialEq)]
pub struct FeatureMeta {
    /// 0-based position of the feature in its input layer.
    pub source_index: u32,
    /// The feature's own id (GeoJSON `id` member or an id-like property), when it has one.
    pub source_id: Option<Value>,
    /// The damage read from the feature's attributes (factor × class rate).
    pub damage: Damage,
    /// The damage category, when damage comes from a category field (text in [`Network::texts`]).
    pub category: Option<Text>,
    /// Road name and reference number (`name (ref)`), when the input has them.
    pub label: Option<Text>,
    /// The structure the road lies on (`bridge`, `tunnel`, `culvert`, …), when its attributes say
    /// so (see [`crate::ingest::structures`]).
    pub structure: Option<Text>,
}

/// One road piece between two junctions.
#[derive(Debug, Clone, PartialEq)]
pub struct Edge {
    /// Junction at the start of the geometry.
    pub from: u32,
    /// Junction at the end of the geometry.
    pub to: u32,
    /// Ground length in metres.
    pub length_m: f64,
    /// Damage of the piece.
    pub damage: Damage,
    /// Repair cost in milli-repair-metres (0 for intact and for closed pieces).
    pub cost: Cost,
    /// Index into [`Network::features`] of the input feature it came from.
    pub feature: u32,
}

impl Edge {
    /// True when the edge may be used by a plan (not closed).
    pub fn usable(&self) -> bool {
        !self.damage.is_closed()
    }
}

/// Junctions, edges with their geometry, and the input features they came from.
#[derive(Debug, Clone, Default)]
pub struct Network {
    /// Junction positions (lon/lat, WGS84).
    pub junctions: Vec<[f64; 2]>,
    /// Edges, numbered by position.
    pub edges: Vec<Edge>,
    /// `geom_offsets[e]..geom_offsets[e + 1]` indexes edge `e`'s vertices in `geom`.
    pub geom_offsets: Vec<usize>,
    /// Vertices of every edge, lon/lat.
    pub geom: Vec<[f64; 2]>,
    /// Input features, indexed by [`Edge::feature`].
    pub features: Vec<FeatureMeta>,
    /// The features' texts (names, categories, structures), each kept once.
    pub texts: TextTable,
    /// The input layers the features came from, in order, each with its first feature.
    pub layers: Vec<crate::ingest::layers::SourceLayer>,
}

impl Network {
    /// The label of the input layer feature `feature` came from (`source_layer` in the outputs).
    pub fn source_layer(&self, feature: u32) -> Option<&str> {
        crate::ingest::layers::label_of(&self.layers, feature)
    }

    /// The text of a feature's handle (its `label`, `category` or `structure`).
    pub fn text(&self, t: Option<Text>) -> Option<&str> {
        self.texts.get(t)
    }

    /// The vertices of edge `e`, from its `from` junction to its `to` junction.
    pub fn edge_geometry(&self, e: usize) -> &[[f64; 2]] {
        &self.geom[self.geom_offsets[e]..self.geom_offsets[e + 1]]
    }

    /// The edges as a compact weighted edge list for the solvers (closed edges marked unusable).
    pub fn weighted_edges(&self) -> crate::solve::graph::EdgeList {
        crate::solve::graph::EdgeList {
            vertices: self.junctions.len(),
            ends: self.edges.iter().map(|e| [e.from, e.to]).collect(),
            cost: self
                .edges
                .iter()
                .map(|e| {
                    if e.usable() {
                        e.cost
                    } else {
                        crate::solve::graph::UNUSABLE
                    }
                })
                .collect(),
        }
    }

    /// Checks the structural invariants; returns a description of the first violation.
    pub fn validate(&self) -> Result<(), String> {
        let n = self.junctions.len();
        if self.geom_offsets.len() != self.edges.len() + 1 {
            return Err("geometry offsets do not match the edge count".into());
        }
        for (i, e) in self.edges.iter().enumerate() {
            if e.from as usize >= n || e.to as usize >= n {
                return Err(format!("edge {i} names a junction out of range"));
            }
            let g = self.edge_geometry(i);
            if g.len() < 2 {
                return Err(format!("edge {i} has fewer than 2 vertices"));
            }
            if g[0] != self.junctions[e.from as usize]
                || g[g.len() - 1] != self.junctions[e.to as usize]
            {
                return Err(format!("edge {i} geometry does not end at its junctions"));
            }
            if e.feature as usize >= self.features.len() {
                return Err(format!("edge {i} names a feature out of range"));
            }
        }
        // A junction no edge ends at would count as a component of its own.
        let mut used = vec![false; n];
        for e in &self.edges {
            used[e.from as usize] = true;
            used[e.to as usize] = true;
        }
        if let Some(j) = used.iter().position(|u| !u) {
            return Err(format!("junction {j} ends no edge"));
        }
        Ok(())
    }
}
