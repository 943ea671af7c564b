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

use super::SolveError;
use super::arborescence::{Arc, min_arborescence};
use super::components::components_where;
use super::fragility::fragility;
use super::graph::{Csr, EdgeList, UNUSABLE};
use crate::network::Cost;
use std::cmp::Reverse;
use std::collections::{BinaryHeap, HashMap};

const NONE: u32 = u32::MAX;

/// Trees with at most this many nodes get every node pair's cheapest link.
const ALL_PAIRS_NODES: usize = 40;

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
            if !f.in_subtree(root, t) {
                return None;
            }
            Some(
                f.bridge_child
                    .iter()
                    .zip(&f.bridges)
                    .filter(|&(&c, _)| f.in_subtree(c, t) && !f.in_subtree(c, root))
                    .map(|(_, &b)| b)
                    .collect(),
            )
        })
        .collect()
}

/// The bridge tree nodes that matter (ancestor-closed, parents before children) and how every
/// vertex maps to a search region.
struct Tree {
    /// Parent of each tree node (NONE for the root, node 0).
    parent: Vec<u32>,
    /// Region of each vertex: tree node ids first, then one region per piece off the tree.
    region: Vec<u32>,
    /// Number of regions.
    regions: usize,
    /// Tree node of each terminal (NONE when not joined to the root).
    terminal_node: Vec<u32>,
}

fn build_tree(g: &EdgeList, free: &[bool], root: u32, terminals: &[u32]) -> Tree {
    let n = g.vertices;
    let h0 = EdgeList {
        vertices: n,
        ends: g.ends.clone(),
        cost: (0..g.len())
            .map(|e| if free[e] { 0 } else { UNUSABLE })
            .collect(),
    };
    let f = fragility(&h0, &[root]);
    let mut is_bridge = vec![false; g.len()];
    for &b in &f.bridges {
        is_bridge[b as usize] = true;
    }
    let pieces = components_where(&h0, |e| !is_bridge[e]);
    let joined = components_where(&h0, |_| true);
    let hub_comp = joined.of[root as usize];
    // Bridge tree over the pieces of the hub's component, searched breadth-first from the hub.
    let mut adj: Vec<Vec<(u32, u32)>> = vec![Vec::new(); pieces.count];
    for &b in &f.bridges {
        let [a, c] = g.ends[b as usize];
        if joined.of[a as usize] == hub_comp {
            let (pa, pc) = (pieces.of[a as usize], pieces.of[c as usize]);
            adj[pa as usize].push((pc, b));
            adj[pc as usize].push((pa, b));
        }
    }
    let start = pieces.of[root as usize];
    let mut par = vec![NONE; pieces.count];
    let mut seen = vec![false; pieces.count];
    let mut bfs = vec![start];
    seen[start as usize] = true;
    let mut i = 0;
    while i < bfs.len() {
        let x = bfs[i];
        i += 1;
        for &(y, _) in &adj[x as usize] {
            if !seen[y as usize] {
                seen[y as usize] = true;
                par[y as usize] = x;
                bfs.push(y);
            }
        }
    }
    // Nodes on some hub-to-terminal path.
    let mut marked = vec![false; pieces.count];
    marked[start as usize] = true;
    for &t in terminals {
        let mut x = pieces.of[t as usize];
        if !seen[x as usize] {
            continue;
        }
        while !marked[x as usize] {
            marked[x as usize] = true;
            x = par[x as usize];
        }
    }
    // Tree ids in breadth-first order; other pieces of the hub's component join the nearest
    // marked ancestor (they hang off the tree on roads that need no backup).
    let mut tree_id = vec![NONE; pieces.count];
    let mut parent = Vec::new();
    for &x in &bfs {
        let xi = x as usize;
        if marked[xi] {
            tree_id[xi] = parent.len() as u32;
            if x == start {
                parent.push(NONE);
            } else {
                parent.push(tree_id[par[xi] as usize]);
            }
        } else {
            tree_id[xi] = tree_id[par[xi] as usize];
        }
    }
    let k = parent.len();
    // Off the hub's component, each piece joined by free roads is one region.
    let mut off_id = vec![NONE; joined.count];
    let mut regions = k;
    let region: Vec<u32> = (0..n)
        .map(|v| {
            let p = pieces.of[v] as usize;
            if seen[p] {
                tree_id[p]
            } else {
                let c = joined.of[v] as usize;
                if off_id[c] == NONE {
                    off_id[c] = regions as u32;
                    regions += 1;
                }
                off_id[c]
            }
        })
        .collect();
    let terminal_node = terminals
        .iter()
        .map(|&t| {
            let p = pieces.of[t as usize] as usize;
            if seen[p] { tree_id[p] } else { NONE }
        })
        .collect();
    Tree {
        parent,
        region,
        regions,
        terminal_node,
    }
}

/// A candidate link between tree nodes `a` and `b`.
#[derive(Debug, Clone)]
struct Link {
    a: u32,
    b: u32,
    cost: Cost,
    edges: Vec<u32>,
}

/// Region adjacency over the candidate roads (damaged, usable, not free) between regions.
struct RegionGraph {
    csr: Csr,
}

impl RegionGraph {
    fn new(g: &EdgeList, free: &[bool], tree: &Tree) -> RegionGraph {
        let rg = EdgeList {
            vertices: tree.regions,
            ends: g
                .ends
                .iter()
                .map(|&[a, b]| [tree.region[a as usize], tree.region[b as usize]])
                .collect(),
            cost: (0..g.len())
                .map(|e| {
                    if free[e] || !g.usable(e) {
                        UNUSABLE
                    } else {
                        g.cost[e]
                    }
                })
                .collect(),
        };
        RegionGraph {
            csr: Csr::from_edges(&rg),
        }
    }
}

/// Shortest paths from `sources` (tree nodes, at distance 0) that pass only through regions off
/// the tree. Returns distance, nearest source and the edge each region was reached by.
fn search(
    g: &EdgeList,
    tree: &Tree,
    rg: &RegionGraph,
    sources: &[u32],
    k: usize,
) -> (Vec<Cost>, Vec<u32>, Vec<u32>) {
    let r = tree.regions;
    let mut dist = vec![Cost::MAX; r];
    let mut label = vec![NONE; r];
    let mut via = vec![NONE; r];
    let mut heap = BinaryHeap::new();
    for &s in sources {
        dist[s as usize] = 0;
        label[s as usize] = s;
        heap.push(Reverse((0, s)));
    }
    while let Some(Reverse((d, x))) = heap.pop() {
        if d > dist[x as usize] {
            continue;
        }
        for (y, e) in rg.csr.neighbours(x) {
            if (y as usize) < k {
                continue;
            }
            let nd = d + g.cost[e as usize];
            if nd < dist[y as usize] {
                dist[y as usize] = nd;
                label[y as usize] = label[x as usize];
                via[y as usize] = e;
                heap.push(Reverse((nd, y)));
            }
        }
    }
    (dist, label, via)
}

/// The edges from region `x` back to its search source, nearest the source first.
fn path_back(g: &EdgeList, tree: &Tree, via: &[u32], mut x: u32) -> Vec<u32> {
    let mut out = Vec::new();
    while via[x as usize] != NONE {
        let e = via[x as usize];
        out.push(e);
        let [a, b] = g.ends[e as usize];
        let (ra, rb) = (tree.region[a as usize], tree.region[b as usize]);
        x = if ra == x { rb } else { ra };
    }
    out.reverse();
    out
}

fn links(g: &EdgeList, free: &[bool], tree: &Tree) -> Vec<Link> {
    let k = tree.parent.len();
    let rg = RegionGraph::new(g, free, tree);
    let mut best: HashMap<(u32, u32), Link> = HashMap::new();
    let offer = |best: &mut HashMap<(u32, u32), Link>, l: Link| {
        let key = (l.a.min(l.b), l.a.max(l.b));
        match best.get(&key) {
            Some(old) if (old.cost, &old.edges) <= (l.cost, &l.edges) => {}
            _ => {
                best.insert(key, l);
            }
        }
    };
    let mut candidates: Vec<u32> = (0..g.len() as u32)
        .filter(|&e| !free[e as usize] && g.usable(e as usize))
        .collect();
    candidates.retain(|&e| {
        let [a, b] = g.ends[e as usize];
        tree.region[a as usize] != tree.region[b as usize]
    });
    if k <= ALL_PAIRS_NODES {
        for s in 0..k as u32 {
            let (dist, _, via) = search(g, tree, &rg, &[s], k);
            for &e in &candidates {
                let [a, b] = g.ends[e as usize];
                let (ra, rb) = (tree.region[a as usize], tree.region[b as usize]);
                for (x, y) in [(ra, rb), (rb, ra)] {
                    if (y as usize) < k && y != s && dist[x as usize] != Cost::MAX {
                        let mut edges = path_back(g, tree, &via, x);
                        edges.push(e);
                        offer(
                            &mut best,
                            Link {
                                a: s,
                                b: y,
                                cost: dist[x as usize] + g.cost[e as usize],
                                edges,
                            },
                        );
                    }
                }
            }
        }
    } else {
        let sources: Vec<u32> = (0..k as u32).collect();
        let (dist, label, via) = search(g, tree, &rg, &sources, k);
        for &e in &candidates {
            let [a, b] = g.ends[e as usize];
            let (ra, rb) = (tree.region[a as usize], tree.region[b as usize]);
            let (la, lb) = (label[ra as usize], label[rb as usize]);
            if la == NONE || lb == NONE || la == lb {
                continue;
            }
            let mut edges = path_back(g, tree, &via, ra);
            edges.push(e);
            let mut tail = path_back(g, tree, &via, rb);
            tail.reverse();
            edges.extend(tail);
            offer(
                &mut best,
                Link {
                    a: la,
                    b: lb,
                    cost: dist[ra as usize] + g.cost[e as usize] + dist[rb as usize],
                    edges,
                },
            );
        }
    }
    let mut out: Vec<Link> = best.into_values().collect();
    out.sort_by_key(|x| (x.a.min(x.b), x.a.max(x.b)));
    out
}

/// Parent pointers with depths and binary lifting for lowest common ancestors.
struct Lca {
    depth: Vec<u32>,
    up: Vec<Vec<u32>>,
}

impl Lca {
    /// `parent` lists parents before children, root 0 (its parent NONE).
    fn new(parent: &[u32]) -> Lca {
        let k = parent.len();
        let mut depth = vec![0u32; k];
        for x in 1..k {
            depth[x] = depth[parent[x] as usize] + 1;
        }
        let mut up = vec![
            parent
                .iter()
                .map(|&p| if p == NONE { 0 } else { p })
                .collect::<Vec<_>>(),
        ];
        let mut span = 1usize;
        while span < k {
            let prev = up.last().expect("level");
            let next: Vec<u32> = (0..k).map(|x| prev[prev[x] as usize]).collect();
            up.push(next);
            span *= 2;
        }
        Lca { depth, up }
    }

    fn lca(&self, mut a: u32, mut b: u32) -> u32 {
        if self.depth[a as usize] < self.depth[b as usize] {
            std::mem::swap(&mut a, &mut b);
        }
        let mut diff = self.depth[a as usize] - self.depth[b as usize];
        let mut j = 0;
        while diff > 0 {
            if diff & 1 == 1 {
                a = self.up[j][a as usize];
            }
            diff >>= 1;
            j += 1;
        }
        if a == b {
            return a;
        }
        for j in (0..self.up.len()).rev() {
            let (x, y) = (self.up[j][a as usize], self.up[j][b as usize]);
            if x != y {
                a = x;
                b = y;
            }
        }
        self.up[0][a as usize]
    }
}

/// Tree nodes (standing for the edge to their parent) on the tree path between `a` and `b`.
fn path_nodes(parent: &[u32], lca: &Lca, a: u32, b: u32) -> Vec<u32> {
    let w = lca.lca(a, b);
    let mut out = Vec::new();
    for mut x in [a, b] {
        while x != w {
            out.push(x);
            x = parent[x as usize];
        }
    }
    out
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
