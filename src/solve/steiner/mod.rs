//! Steiner tree in graphs: connect the terminals (critical sites) at least total cost.
//!
//! The problem is NP-hard, so the plan is built by heuristics and certified by a lower bound:
//!
//! 1. [`reduce`]: exact reductions (zero-cost components, non-terminal leaves, degree-2 chains).
//! 2. [`sph`]: the shortest-path heuristic from several roots, each polished by [`local`] search
//!    (key-path exchange, key-vertex elimination); the best few are [`merge`]d (their union searched
//!    by branch-and-bound) and the cheapest tree wins.
//! 3. Beside it, on the other core: [`dual_ascent`], Wong's lower bound, so every plan states how
//!    far from optimal it can be; then [`mehlhorn`]'s 2-approximation, which replaces the tree in
//!    the rare case it is cheaper and whose own bound replaces Wong's when higher (as on large
//!    graphs at quick effort, where the ascent is cut short).
//! 4. When the ascent completed: the [`da_heuristic`] (trees grown on the saturated edges from many
//!    roots, polished), merged with the trees of step 2.
//! 5. When the ascent completed and a gap is left: the [`root`] step (reductions by bound from
//!    ascents at several roots, [`fixing`], then the heuristics again on what is left) and, at
//!    thorough effort, [`branch`]-and-bound on vertices ([`exact`] steps), within a fixed number of
//!    steps.
//! 6. [`reduce::expand`]: back to road edges, with the intact roads that join the pieces.
//!
//! All choices are deterministic for a given [`Effort`].

pub mod branch;
pub mod da_heuristic;
pub mod dual_ascent;
pub mod exact;
pub mod fixing;
pub mod local;
pub mod mehlhorn;
pub mod merge;
pub mod paths;
pub mod reduce;
pub mod root;
pub mod sph;
pub mod tree;
pub mod vertex_moves;

use crate::network::Cost;
use crate::solve::SolveError;
use crate::solve::graph::{Csr, EdgeList};
use paths::Workspace;

/// Above this size (reduced vertices plus edges) thorough effort polishes only the best 32 starts
/// and a tenth of the perturbed restarts: on the Malta extract (41,000) polishing all ~1,000 starts
/// and 400 restarts took more than a minute before the exact search began, which is where the gap
/// closes. SteinLib C and D (at most 26,000) stay below it.
const THOROUGH_BIG: usize = 30_000;

/// Largest reduced graph (vertices plus edges) on which quick effort runs the dual ascent.
const QUICK_ASCENT_UP_TO: usize = 60_000;

/// How much work to spend on quality.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum Effort {
    /// One improvement start, a short bound computation: for very large networks or quick looks.
    Quick,
    /// Several starts, local search to a local optimum, a full bound on most networks.
    #[default]
    Normal,
    /// Many starts, an unlimited bound and up to 500 search steps to prove the plan optimal; on
    /// networks of tens of thousands of junctions it can take many minutes.
    Thorough,
}

impl Effort {
    /// The name used in settings and summaries.
    pub fn name(self) -> &'static str {
        match self {
            Effort::Quick => "quick",
            Effort::Normal => "normal",
            Effort::Thorough => "thorough",
        }
    }

    /// Number of improvement starts on a reduced graph of `size` vertices plus edges: more on small
    /// graphs, where each start is cheap.
    fn starts(self, size: usize) -> usize {
        let size = size.max(1);
        match self {
            Effort::Quick => 1,
            Effort::Normal => (4_000_000 / size).clamp(8, 200),
            Effort::Thorough => (40_000_000 / size).clamp(32, 2000),
        }
    }

    /// Restarts on perturbed costs: many on small graphs, none on big ones.
    fn perturbed(self, size: usize) -> usize {
        let size = size.max(1);
        match self {
            Effort::Quick => 0,
            Effort::Normal => (1_000_000 / size).min(16),
            Effort::Thorough if size > THOROUGH_BIG => (4_000_000 / size).clamp(8, 400),
            Effort::Thorough => (40_000_000 / size).clamp(8, 400),
        }
    }

    /// How many of the best shortest-path trees get the full local search (fewer on big graphs).
    fn polished(self, size: usize) -> usize {
        match self {
            Effort::Quick => 1,
            Effort::Normal if size > 500_000 => 2,
            Effort::Normal => 4,
            Effort::Thorough if size > THOROUGH_BIG => 32,
            Effort::Thorough => usize::MAX,
        }
    }

    fn reach(self) -> local::Reach {
        match self {
            Effort::Quick => local::Reach {
                seeds: 64,
                eliminate: false,
            },
            Effort::Normal => local::Reach {
                seeds: 512,
                eliminate: true,
            },
            Effort::Thorough => local::Reach {
                seeds: 4096,
                eliminate: true,
            },
        }
    }

    /// Trees with more vertices than this skip vertex insertion and elimination (each try costs time
    /// proportional to the tree).
    fn vertex_moves_limit(self) -> usize {
        match self {
            Effort::Quick => 0,
            Effort::Normal => 3_000,
            Effort::Thorough => 500,
        }
    }

    fn rounds(self) -> usize {
        match self {
            Effort::Quick => 1,
            Effort::Normal => 25,
            Effort::Thorough => 100,
        }
    }

    /// Steps of the exact search (reductions by bound, then branch-and-bound) after the heuristics:
    /// one at normal effort (the reductions and a fresh bound on what they leave) on reduced graphs
    /// of up to 500,000 vertices plus edges, none above (where normal has its time budget to keep).
    fn search_nodes(self, size: usize) -> u64 {
        match self {
            Effort::Quick => 0,
            Effort::Normal if size > 500_000 => 0,
            Effort::Normal => 1,
            Effort::Thorough => 500,
        }
    }

    /// The dual-ascent heuristic: from how many roots trees are grown on the saturated edges, and
    /// how many of the best get the full local search (fewer on big graphs, as for the starts).
    fn dual_trees(self, size: usize) -> (usize, usize) {
        let size = size.max(1);
        match self {
            Effort::Quick => (1, 1),
            Effort::Normal => ((4_000_000 / size).clamp(8, 256), self.polished(size) * 2),
            Effort::Thorough => ((40_000_000 / size).clamp(32, 2000), 32),
        }
    }

    /// Solution merging after the heuristics: how many of the best distinct trees are joined, and
    /// the most branch-and-bound steps spent on their union (none at quick effort).
    fn merging(self) -> (usize, u64) {
        match self {
            Effort::Quick => (0, 0),
            Effort::Normal => (16, 200),
            Effort::Thorough => (32, 1000),
        }
    }

    /// Arc visits the dual ascent may spend on a reduced graph of `size` vertices plus edges, or
    /// `None` to skip it. Quick effort runs a short ascent on small graphs, where it usually completes
    /// with a near-optimal bound, and none on large ones, where an ascent that short stays below
    /// Mehlhorn's bound anyway.
    fn bound_budget(self, size: usize) -> Option<u64> {
        match self {
            Effort::Quick if size > QUICK_ASCENT_UP_TO => None,
            Effort::Quick => Some((4 * size as u64).max(1_000_000)),
            Effort::Normal => Some(1_200_000_000),
            Effort::Thorough => Some(u64::MAX),
        }
    }
}

/// A Steiner tree in the original graph with its certificate.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct SteinerTree {
    /// Original edge ids, ascending (positive-cost edges and the intact edges joining them).
    pub edges: Vec<u32>,
    /// Total cost.
    pub cost: Cost,
    /// A proven lower bound on the cost of any tree connecting the terminals.
    pub lower_bound: Cost,
    /// False when the dual ascent stopped at its work budget or was skipped (the bound still holds).
    pub bound_complete: bool,
    /// Vertices and edges of the reduced graph that was searched.
    pub reduced_size: (usize, usize),
}

/// What a caller may ask of a solve beyond its effort: to hear progress, or to run on the clock.
#[derive(Clone, Copy, Default)]
pub struct Watch<'a> {
    /// Hears the best tree's cost and the lower bound (cost units) once the heuristics and the
    /// bound are done, then whenever the exact search improves either.
    pub report: Option<&'a (dyn Fn(Cost, Cost) + Sync)>,
    /// When given, the exact search goes on past its fixed step budget until the tree is proven
    /// optimal or this instant passes: the result then depends on the machine's speed (never worse
    /// than without, since the budgeted steps all run first).
    pub deadline: Option<std::time::Instant>,
}

/// Connects `terminals` (original vertex ids, mutually reachable over usable edges) at least cost.
pub fn steiner_tree(
    g: &EdgeList,
    terminals: &[u32],
    effort: Effort,
) -> Result<SteinerTree, SolveError> {
    steiner_tree_watched(g, terminals, effort, Watch::default())
}

/// [`steiner_tree`] with progress reports and, optionally, a wall-clock limit in place of the
/// exact search's step budget.
pub fn steiner_tree_watched(
    g: &EdgeList,
    terminals: &[u32],
    effort: Effort,
    watch: Watch,
) -> Result<SteinerTree, SolveError> {
    let mut terms = terminals.to_vec();
    terms.sort_unstable();
    terms.dedup();
    let red = reduce::reduce(g, &terms);
    let rg = &red.graph;
    let mut best: Vec<u32> = Vec::new();
    let mut bound = dual_ascent::Bound::zero(true);
    if red.terminals.len() >= 2 {
        let csr = Csr::from_edges(rg);
        let size = rg.vertices + rg.len();
        // The bound and the heuristics are independent: compute them side by side, with
        // Mehlhorn's tree on the bound's side to even out the two.
        let ((b, first), ((heuristic, mut pool), mut ws)) = rayon::join(
            || {
                let b = match effort.bound_budget(size) {
                    Some(budget) => dual_ascent::dual_ascent(rg, &csr, &red.terminals, budget),
                    None => dual_ascent::Bound::zero(false),
                };
                let mut ws = Workspace::new(rg.vertices);
                let it = &red.is_terminal;
                (b, mehlhorn::mehlhorn(rg, &csr, &red.terminals, it, &mut ws))
            },
            || {
                let mut ws = Workspace::new(rg.vertices);
                (heuristics_pool(rg, &csr, &red, effort, &mut ws, false), ws)
            },
        );
        bound = b;
        best = heuristic;
        // Mehlhorn's 2-approximation rarely wins, but when it does the plan must not be worse.
        // Its bound can beat a dual ascent stopped early.
        if first.lower_bound > bound.value {
            bound.value = first.lower_bound;
        }
        if tree::cost(rg, &first.edges) < tree::cost(rg, &best) {
            best = polish(rg, &csr, &red.is_terminal, first.edges, &mut ws, effort);
        }
        let it = &red.is_terminal;
        // A tree at the bound is optimal: nothing below can improve it.
        let open = bound.value < tree::cost(rg, &best);
        if open && bound.complete {
            // The dual-ascent heuristic: trees on the saturated edges (they join every terminal to
            // the root) from many roots, the best polished; they differ from the shortest-path
            // trees where those go wrong, which makes them good partners in the merge below.
            let (roots, polished) = effort.dual_trees(size);
            let da = da_heuristic::trees(rg, &csr, it, &red.terminals, &bound, roots, &mut ws);
            for (_, t) in da.into_iter().take(polished) {
                let t = polish(rg, &csr, it, t, &mut ws, effort);
                let c = tree::cost(rg, &t);
                if c < tree::cost(rg, &best) {
                    best = t.clone();
                }
                pool.push((c, t));
            }
        }
        let (trees, steps) = effort.merging();
        if open && trees >= 2 {
            pool.push((tree::cost(rg, &best), best.clone()));
            if let Some(t) = merge::merged(rg, &red.terminals, pool, trees, steps) {
                let t = polish(rg, &csr, it, t, &mut ws, effort);
                if tree::cost(rg, &t) < tree::cost(rg, &best) {
                    best = t;
                }
            }
        }
        let cost = tree::cost(rg, &best);
        let nodes = effort.search_nodes(rg.vertices + rg.len());
        let mut report = |c: Cost, b: Cost| {
            if let Some(r) = watch.report {
                r(c, b);
            }
        };
        report(cost, bound.value.min(cost));
        if bound.complete && bound.value < cost && (nodes > 0 || watch.deadline.is_some()) {
            let mut held = exact::Incumbent { edges: best, cost };
            let mut ws = Workspace::new(rg.vertices);
            let rest = root::root_step(rg, &red.terminals, &mut held, effort, &mut ws);
            let mut low = rest.bound.map_or(held.cost, |b| b.max(bound.value));
            report(held.cost, low.min(held.cost));
            if let Some(sub) = rest.graph.filter(|_| nodes > 1 || watch.deadline.is_some()) {
                let limits = branch::Limits {
                    nodes: nodes.saturating_sub(1),
                    deadline: watch.deadline,
                };
                let out = branch::search(&sub, &red.terminals, held, low, limits, &mut report);
                held = out.best;
                low = low.max(out.lower_bound);
            }
            best = held.edges;
            bound.value = bound.value.max(low.min(tree::cost(rg, &best)));
        }
    }
    let edges = reduce::expand(g, &red, &best, &terms);
    tree::check_steiner_tree(g, &edges, &terms).map_err(|detail| SolveError::Verification {
        what: "Steiner tree",
        detail,
    })?;
    let cost = tree::cost(g, &edges);
    if bound.value > cost {
        return Err(SolveError::Verification {
            what: "Steiner lower bound",
            detail: format!("bound {} exceeds the tree's cost {cost}", bound.value),
        });
    }
    Ok(SteinerTree {
        edges,
        cost,
        lower_bound: bound.value,
        bound_complete: bound.complete,
        reduced_size: (rg.vertices, rg.len()),
    })
}

/// Shortest-path trees from spread-out roots; the cheapest few are polished by local search and the
/// best tree is returned (reduced edge ids).
pub(crate) fn heuristics(
    rg: &EdgeList,
    csr: &Csr,
    red: &reduce::Reduced,
    effort: Effort,
    ws: &mut Workspace,
) -> Vec<u32> {
    heuristics_pool(rg, csr, red, effort, ws, true).0
}

/// [`heuristics`], also returning every polished tree with its cost (the pool merging draws on);
/// without `merge`, the caller merges the pool (with trees of its own: one merge of all the trees
/// found more than two merges of parts of them on SteinLib D).
fn heuristics_pool(
    rg: &EdgeList,
    csr: &Csr,
    red: &reduce::Reduced,
    effort: Effort,
    ws: &mut Workspace,
    merge: bool,
) -> (Vec<u32>, Vec<(u64, Vec<u32>)>) {
    let it = &red.is_terminal;
    let mut best = Vec::new();
    let mut best_cost = u64::MAX;
    let mut pool: Vec<(u64, Vec<u32>)> = Vec::new();
    let k = red.terminals.len();
    let size = rg.vertices + rg.len();
    let roots = effort.starts(size).min(k);
    let mut starts: Vec<(u64, Vec<u32>)> = (0..roots)
        .map(|r| {
            let root = red.terminals[r * k / roots];
            let t = sph::sph(rg, csr, &red.terminals, it, root, ws);
            (tree::cost(rg, &t), t)
        })
        .collect();
    starts.sort();
    starts.dedup();
    for (_, t) in starts.into_iter().take(effort.polished(size)) {
        let t = if effort == Effort::Quick {
            t
        } else {
            polish(rg, csr, it, t, ws, effort)
        };
        let c = tree::cost(rg, &t);
        pool.push((c, t.clone()));
        if c < best_cost {
            best = t;
            best_cost = c;
        }
    }
    // Restarts from shortest-path trees on randomly perturbed costs (fixed seed, each cost times a
    // factor in [1, 2)), each polished with the true costs: they escape the local optima the plain
    // starts share (noise of up to 25 % left them there on SteinLib D).
    let mut rng = crate::rng::Rng::new(0x5EED_0000 ^ k as u64);
    let mut noisy = rg.clone();
    for _ in 0..effort.perturbed(size) {
        for (c, &orig) in noisy.cost.iter_mut().zip(&rg.cost) {
            *c = orig * (1000 + rng.below(1000)) / 1000;
        }
        let root = red.terminals[rng.below(k as u64) as usize];
        let t = sph::sph(&noisy, csr, &red.terminals, it, root, ws);
        let t = tree::mst_prune(rg, csr, &t, it);
        let t = polish(rg, csr, it, t, ws, effort);
        let c = tree::cost(rg, &t);
        pool.push((c, t.clone()));
        if c < best_cost {
            best = t;
            best_cost = c;
        }
    }
    let best = polish(rg, csr, it, best, ws, effort);
    // The best trees share most of their edges and differ where the choice is hard: an exact
    // search on their union often finds what none of them has.
    pool.push((tree::cost(rg, &best), best.clone()));
    let (trees, steps) = effort.merging();
    if merge
        && trees >= 2
        && k >= 2
        && let Some(t) = merge::merged(rg, &red.terminals, pool.clone(), trees, steps)
    {
        let t = polish(rg, csr, it, t, ws, effort);
        let c = tree::cost(rg, &t);
        if c < tree::cost(rg, &best) {
            pool.push((c, t.clone()));
            return (t, pool);
        }
    }
    (best, pool)
}

/// Alternates path-based and vertex-based local search until neither improves the tree.
fn polish(
    g: &EdgeList,
    csr: &Csr,
    is_terminal: &[bool],
    mut t: Vec<u32>,
    ws: &mut Workspace,
    effort: Effort,
) -> Vec<u32> {
    let mut c = tree::cost(g, &t);
    for _ in 0..effort.rounds() {
        t = local::improve(g, csr, is_terminal, t, ws, effort.rounds(), effort.reach());
        t = tree::mst_prune(g, csr, &t, is_terminal);
        if t.len() < effort.vertex_moves_limit() {
            t = vertex_moves::improve(g, csr, is_terminal, t, effort.rounds());
        }
        let c2 = tree::cost(g, &t);
        if c2 >= c {
            break;
        }
        c = c2;
    }
    t
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Above the size where quick effort skips the dual ascent, the plan still carries Mehlhorn's
    /// bound: positive, never above the plan, and at least half of it (the plan costs no more than
    /// Mehlhorn's tree, whose distance-network weight W gives the bound W·k / (2(k − 1)) ≥ W / 2).
    #[test]
    fn quick_on_a_large_graph_keeps_mehlhorns_bound() {
        let g = crate::synthetic::grid_graph(260, 0.3, 5);
        let (terms, _, _) = crate::synthetic::sites_on_largest_component(&g, 40);
        let t = steiner_tree(&g, &terms, Effort::Quick).unwrap();
        assert!(t.reduced_size.0 + t.reduced_size.1 > QUICK_ASCENT_UP_TO);
        assert!(!t.bound_complete);
        assert!(t.lower_bound > 0 && t.lower_bound <= t.cost);
        assert!(
            2 * t.lower_bound >= t.cost,
            "{} vs {}",
            t.lower_bound,
            t.cost
        );
    }
}
