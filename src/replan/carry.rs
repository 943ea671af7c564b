//! The previous plan and the finished work matched to the new network by work-order keys, and the
//! finished repairs marked intact.
//!
//! Keys are matched exactly: a key that names no piece of the new network (a road layer given anew
//! that moved or split the road) is listed, never guessed.

use super::FieldWork;
use crate::export::work_order_id::WorkOrderIds;
use crate::fxhash::FxHashMap;
use crate::ingest::damage::Damage;
use crate::network::Network;

/// The previous round matched to this network, edge ids ascending in every list.
#[derive(Debug, Clone, Default)]
pub struct Carried {
    /// Finished repairs, now intact (cost 0).
    pub finished: Vec<u32>,
    /// Finished repairs a damage point given anew lies on, or now closed: the new damage stands.
    pub damaged_again: Vec<u32>,
    /// Started repairs on usable roads: kept in the plan at their full cost.
    pub started: Vec<u32>,
    /// Every edge of the previous plan (intact ones too).
    pub old_plan: Vec<u32>,
    /// The previous plan's repairs not finished.
    pub old_repairs: Vec<u32>,
    /// Keys of the previous plan or of the finished work that name no piece of this network.
    pub missing: Vec<String>,
}

/// Each edge's span along its source feature, metres from its first vertex: (feature, start, end).
/// Edges of one feature follow each other along it in id order (the rule work-order keys use).
fn spans(net: &Network) -> Vec<(u32, f64, f64)> {
    let mut along = vec![0.0f64; net.features.len()];
    net.edges
        .iter()
        .map(|e| {
            let s = along[e.feature as usize];
            along[e.feature as usize] += e.length_m;
            (e.feature, s, s + e.length_m)
        })
        .collect()
}

/// The spans of the given edges, to find their pieces again once sites have split the roads.
pub fn spans_of(net: &Network, edges: &[u32]) -> Vec<(u32, f64, f64)> {
    let all = spans(net);
    edges.iter().map(|&e| all[e as usize]).collect()
}

/// Matches the keys to `net`'s edges and marks the finished repairs intact, except on pieces a
/// damage point given anew lies on (`touched`: spans from [`spans_of`]).
pub fn carry(
    net: &mut Network,
    ids: &WorkOrderIds,
    work: &FieldWork,
    touched: &[(u32, f64, f64)],
) -> Carried {
    let by_key: FxHashMap<String, u32> = (0..net.edges.len() as u32)
        .map(|e| (ids.key(net, e), e))
        .collect();
    let span = spans(net);
    // A millimetre of overlap or less is a shared end, not a shared piece.
    let hit = |e: u32| {
        let (f, s, t) = span[e as usize];
        touched
            .iter()
            .any(|&(tf, ts, tt)| tf == f && s < tt - 1e-3 && t > ts + 1e-3)
    };
    let mut c = Carried::default();
    let find = |key: &str, c: &mut Carried| {
        let e = by_key.get(key).copied();
        if e.is_none() && !c.missing.iter().any(|k| k == key) {
            c.missing.push(key.to_string());
        }
        e
    };
    for key in &work.finished {
        if let Some(e) = find(key, &mut c) {
            // The previous plan used the road, so a closure now is news, as is a point on it.
            if hit(e) || !net.edges[e as usize].usable() {
                c.damaged_again.push(e);
            } else {
                let edge = &mut net.edges[e as usize];
                edge.damage = Damage::Factor(0.0);
                edge.cost = 0;
                c.finished.push(e);
            }
        }
    }
    for key in &work.started {
        if let Some(e) = find(key, &mut c)
            && net.edges[e as usize].usable()
        {
            c.started.push(e);
        }
    }
    for old in &work.old_plan {
        if let Some(e) = find(&old.key, &mut c) {
            c.old_plan.push(e);
            if old.repair && !work.finished.contains(&old.key) {
                c.old_repairs.push(e);
            }
        }
    }
    for list in [
        &mut c.finished,
        &mut c.damaged_again,
        &mut c.started,
        &mut c.old_plan,
        &mut c.old_repairs,
    ] {
        list.sort_unstable();
        list.dedup();
    }
    c.missing.sort();
    c
}
