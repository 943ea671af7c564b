//! Backup links: the cheapest further repairs after which every site stays joined to the hub when
//! any one road fails (each site 2-edge-connected to the hub).
//!
//! The network after the plan (intact roads plus planned repairs) is shrunk to its bridge tree:
//! its 2-edge-connected pieces become nodes and its bridges tree edges. Only the bridges on a
//! path from the hub to a site need a backup. A *link* is a way round through damaged roads
//! (and pieces of the network off the tree) between two tree nodes; it protects every bridge on
//! the tree path between its ends. Choosing the cheapest links that protect every needed bridge
//! is weighted tree augmentation, solved with the 2-approximation of Frederickson & JáJá (1981):
//! a minimum-cost arborescence on the tree with free arcs towards the root and, for each link,
//! arcs from the ends' lowest common ancestor down to each end. Redundant links are then dropped,
//! dearest first, and on small networks single repairs too (local search).
//!
//! Links come from one multi-source shortest-path search from all tree nodes (a link wherever two
//! search regions meet, as in Mehlhorn's Steiner heuristic), or, when the tree has few nodes, from
//! one search per node (every node pair's cheapest way round). A needed bridge that no way round
//! can avoid is reported as having no possible backup.

mod lca;
mod links;
mod tree;

use super::SolveError;
use super::arborescence::{Arc, min_arborescence};
use super::fragility::fragility;
use super::graph::{EdgeList, UNUSABLE};
use crate::network::Cost;
use lca::{Lca, path_nodes};
use links::{Link, links};
use std::cmp::Reverse;
use tree::build_tree;

const NONE: u32 = u32::MAX;

/// Single-repair local search runs when edges × added repairs stays under this.
const PRUNE_WORK: usize = 20_000_000;

/// One way round: damaged roads to repair that protect the bridges between its two ends.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct BackupLink {
    /// Edges to repair, in path order.
    pub edges: Vec<u32>,
    /// Their total cost.
    pub cost: Cost,
    /// Terminals (indices into the caller's list) for which it protects at least one bridge.
    pub protects: Vec<usize>,
}

/// The backup plan.
#[derive(Debug, Clone, Default, PartialEq, Eq)]
pub struct Backup {
    /// Links in repair order (most terminals protected first, then cheapest).
    pub links: Vec<BackupLink>,
    /// Added repairs in order, each once.
    pub edges: Vec<u32>,
    /// Total cost of the added repairs.
    pub cost: Cost,
    /// Per terminal (index into the caller's list) still cut off by some single failure: those
    /// failures (edges), none of which any backup could avoid.
    pub no_backup: Vec<(usize, Vec<u32>)>,
    /// Bridges that needed a backup before (on a hub-to-terminal path).
    pub needed: usize,
}

/// For each terminal joined to `root` over `free` edges, the bridges of the `free` network
/// whose loss would cut it off (ascending), indexed like `terminals`; `None` for terminals not
/// joined to the root at all.
pub fn single_failures(
    g: &EdgeList,
    free: &dyn Fn(usize) -> bool,
    root: u32,
    terminals: &[u32],
) -> Vec<Option<Vec<u32>>> {
    let h = EdgeList {
        vertices: g.vertices,
        ends: g.ends.clone(),
        cost: (0..g.len())
            .map(|e| if g.usable(e) && free(e) { 0 } else { UNUSABLE })
            .collect(),
    };
    let f = fragility(&h, &[root]);
    terminals
        .iter()
        .map(|&t| {
            f.cutting_off(&[root], t)
                .map(|cut| cut.into_iter().map(|b| f.bridges[b]).collect())
        })
        .collect()
}

/// Plans backup links so that every terminal joined to `root` over `free` edges stays joined
/// after any single edge failure, wherever some repair of damaged roads can make that so.
pub fn backup_links(
    g: &EdgeList,
    free: &[bool],
    root: u32,
    terminals: &[u32],
) -> Result<Backup, SolveError> {
    let free: Vec<bool> = (0..g.len()).map(|e| free[e] && g.usable(e)).collect();
    let tree = build_tree(g, &free, root, terminals);
    let k = tree.parent.len();
    let mut all = links(g, &free, &tree);

    // Bridges no link can protect are merged into their parent: they need no (possible) backup.
    let lca0 = Lca::new(&tree.parent);
    let mut sub = vec![0i64; k];
    for l in &all {
        let w = lca0.lca(l.a, l.b);
        sub[l.a as usize] += 1;
        sub[l.b as usize] += 1;
        sub[w as usize] -= 2;
    }
    for x in (1..k).rev() {
        let p = tree.parent[x] as usize;
        sub[p] += sub[x];
    }
    let mut rep: Vec<u32> = (0..k as u32).collect();
    let mut compact = vec![NONE; k];
    let mut parent = Vec::new();
    for x in 0..k {
        if x > 0 && sub[x] == 0 {
            rep[x] = rep[tree.parent[x] as usize];
        } else {
            compact[x] = parent.len() as u32;
            parent.push(if x == 0 {
                NONE
            } else {
                compact[rep[tree.parent[x] as usize] as usize]
            });
        }
    }
    let node = |x: u32| compact[rep[x as usize] as usize];
    for l in &mut all {
        l.a = node(l.a);
        l.b = node(l.b);
    }
    all.retain(|l| l.a != l.b);
    let kk = parent.len();
    let needed = kk - 1;
    let lca = Lca::new(&parent);

    // Frederickson–JáJá: free arcs up the tree, each link as arcs from its ends' common ancestor.
    let mut arcs: Vec<Arc> = (1..kk as u32)
        .map(|x| Arc {
            from: x,
            to: parent[x as usize],
            cost: 0,
        })
        .collect();
    let mut arc_link: Vec<u32> = vec![NONE; arcs.len()];
    for (i, l) in all.iter().enumerate() {
        let w = lca.lca(l.a, l.b);
        for end in [l.a, l.b] {
            if end != w {
                arcs.push(Arc {
                    from: w,
                    to: end,
                    cost: l.cost.min(i64::MAX as Cost / 4) as i64,
                });
                arc_link.push(i as u32);
            }
        }
    }
    let mut chosen: Vec<u32> = Vec::new();
    if kk > 1 {
        let (_, entering) =
            min_arborescence(kk, 0, &arcs).ok_or_else(|| SolveError::Verification {
                what: "backup plan",
                detail: "a needed bridge has no link although one was counted".into(),
            })?;
        chosen = entering
            .into_iter()
            .flatten()
            .map(|a| arc_link[a as usize])
            .filter(|&l| l != NONE)
            .collect();
        chosen.sort_unstable();
        chosen.dedup();
    }

    // Drop links whose bridges all stay protected by others, dearest first.
    let mut count = vec![0u32; kk];
    let paths: Vec<Vec<u32>> = chosen
        .iter()
        .map(|&l| path_nodes(&parent, &lca, all[l as usize].a, all[l as usize].b))
        .collect();
    for p in &paths {
        for &x in p {
            count[x as usize] += 1;
        }
    }
    let mut by_cost: Vec<usize> = (0..chosen.len()).collect();
    by_cost.sort_by_key(|&i| (Reverse(all[chosen[i] as usize].cost), i));
    let mut keep = vec![true; chosen.len()];
    for i in by_cost {
        if paths[i].iter().all(|&x| count[x as usize] >= 2) {
            keep[i] = false;
            for &x in &paths[i] {
                count[x as usize] -= 1;
            }
        }
    }
    let mut kept: Vec<Link> = chosen
        .iter()
        .zip(&keep)
        .filter(|&(_, &k)| k)
        .map(|(&l, _)| all[l as usize].clone())
        .collect();

    // Which terminals each link protects: its tree path shares an edge with theirs.
    let tnodes: Vec<u32> = tree
        .terminal_node
        .iter()
        .map(|&x| if x == NONE { NONE } else { node(x) })
        .collect();
    let protects: Vec<Vec<usize>> = kept
        .iter()
        .map(|l| {
            let w = lca.lca(l.a, l.b);
            let dw = lca.depth[w as usize];
            tnodes
                .iter()
                .enumerate()
                .filter(|&(_, &t)| {
                    t != NONE
                        && (lca.depth[lca.lca(l.a, t) as usize] > dw
                            || lca.depth[lca.lca(l.b, t) as usize] > dw)
                })
                .map(|(i, _)| i)
                .collect()
        })
        .collect();
    let mut order: Vec<usize> = (0..kept.len()).collect();
    order.sort_by_key(|&i| (Reverse(protects[i].len()), kept[i].cost, i));
    let mut in_plan = vec![false; g.len()];
    let mut edges = Vec::new();
    let mut out_links = Vec::new();
    for i in order {
        let l = std::mem::replace(
            &mut kept[i],
            Link {
                a: 0,
                b: 0,
                cost: 0,
                edges: Vec::new(),
            },
        );
        for &e in &l.edges {
            if !in_plan[e as usize] {
                in_plan[e as usize] = true;
                edges.push(e);
            }
        }
        out_links.push(BackupLink {
            edges: l.edges,
            cost: l.cost,
            protects: protects[i].clone(),
        });
    }

    // Local search on single repairs (shared stretches can make some redundant), where cheap.
    let unavoidable = single_failures(g, &|e| g.usable(e), root, terminals);
    let fails_ok = |added: &[bool]| -> bool {
        let after = single_failures(g, &|e| free[e] || added[e], root, terminals);
        after.iter().zip(&unavoidable).all(|(a, u)| match (a, u) {
            (Some(a), Some(u)) => a.iter().all(|b| u.binary_search(b).is_ok()),
            _ => true,
        })
    };
    if g.len().saturating_mul(edges.len()) <= PRUNE_WORK {
        let mut by_cost = edges.clone();
        by_cost.sort_by_key(|&e| (Reverse(g.cost[e as usize]), e));
        for e in by_cost {
            in_plan[e as usize] = false;
            if !fails_ok(&in_plan) {
                in_plan[e as usize] = true;
            }
        }
        edges.retain(|&e| in_plan[e as usize]);
        for l in &mut out_links {
            l.edges.retain(|&e| in_plan[e as usize]);
            l.cost = l.edges.iter().map(|&e| g.cost[e as usize]).sum();
        }
        out_links.retain(|l| !l.edges.is_empty());
    }

    // Check the result: what still cuts a terminal off must be something no backup avoids.
    let after = single_failures(g, &|e| free[e] || in_plan[e], root, terminals);
    let mut no_backup = Vec::new();
    for (i, (a, u)) in after.iter().zip(&unavoidable).enumerate() {
        if let (Some(a), Some(u)) = (a, u) {
            if let Some(b) = a.iter().find(|b| u.binary_search(b).is_err()) {
                return Err(SolveError::Verification {
                    what: "backup plan",
                    detail: format!("terminal {i} is still cut off by edge {b}"),
                });
            }
            if !a.is_empty() {
                no_backup.push((i, a.clone()));
            }
        }
    }
    Ok(Backup {
        cost: edges.iter().map(|&e| g.cost[e as usize]).sum(),
        links: out_links,
        edges,
        no_backup,
        needed,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    fn graph(n: usize, edges: &[(u32, u32, Cost)]) -> EdgeList {
        EdgeList {
            vertices: n,
            ends: edges.iter().map(|&(a, b, _)| [a, b]).collect(),
            cost: edges.iter().map(|&(_, _, c)| c).collect(),
        }
    }

    #[test]
    fn a_path_gets_the_cheaper_way_round() {
        // Plan 0-1-2 (free); ways round: 2-3-0 (cost 5 + 5) or 2-0 direct (cost 30).
        let g = graph(4, &[(0, 1, 0), (1, 2, 0), (2, 3, 5), (3, 0, 5), (2, 0, 30)]);
        let free = [true, true, false, false, false];
        let b = backup_links(&g, &free, 0, &[2]).unwrap();
        assert_eq!(b.cost, 10);
        let mut e = b.edges.clone();
        e.sort();
        assert_eq!(e, vec![2, 3]);
        assert!(b.no_backup.is_empty());
        assert_eq!(b.needed, 2);
    }

    #[test]
    fn a_single_way_in_is_reported_not_failed() {
        // Site 3 hangs off 2 by the only road there is; 1-2 can be backed up through 0-2.
        let g = graph(4, &[(0, 1, 0), (1, 2, 0), (2, 3, 0), (0, 2, 7), (3, 3, 1)]);
        let free = [true, true, true, false, false];
        let b = backup_links(&g, &free, 0, &[3]).unwrap();
        assert_eq!(b.edges, vec![3]);
        assert_eq!(b.no_backup, vec![(0, vec![2])]);
    }

    #[test]
    fn closed_roads_are_never_used() {
        let g = graph(3, &[(0, 1, 0), (1, 2, UNUSABLE), (0, 2, 0)]);
        let b = backup_links(&g, &[true, false, true], 0, &[1]).unwrap();
        assert!(b.edges.is_empty());
        assert_eq!(b.no_backup, vec![(0, vec![0])]);
    }
}
