//! The key-path exchange pass, with a helper thread that tries paths ahead of the one applying
//! moves (see [`exchange_pass`]).

use super::{KeyPath, Outcome, State};
use crate::solve::steiner::paths::Workspace;
use std::sync::Mutex;
use std::sync::atomic::{AtomicBool, AtomicU64, AtomicUsize, Ordering};

/// A path's result as the helper left it: claimed or done, on which version of the tree.
#[derive(Clone)]
enum Slot {
    Empty,
    Claimed(u64),
    Done(u64, Outcome),
}

/// Trees with fewer edges than this get no helper (a second copy of the search state costs more
/// than it saves).
const HELPER_FROM: usize = 256;

/// Tries a key-path exchange for each path in order on the current tree, applying each improving
/// one; true when any was applied.
///
/// With a second thread, a helper holding its own copy of the tree tries the paths ahead. Each
/// result carries the version of the tree it was found on, and is used only on that same version
/// (the version changes with every applied move, after which the helper catches up and starts
/// again from the next path). So the moves made are exactly those of trying one path at a time,
/// whatever the thread count or timing.
pub(super) fn exchange_pass(st: &mut State<'_>, paths: &[KeyPath], ws: &mut Workspace) -> bool {
    if rayon::current_num_threads() < 2 || st.edges.len() < HELPER_FROM || paths.len() < 2 {
        let mut improved = false;
        for p in paths {
            if let Outcome::Better(edges) = st.try_exchange(p, ws) {
                st.set(edges);
                improved = true;
            }
        }
        return improved;
    }
    let slots: Vec<Mutex<Slot>> = (0..paths.len()).map(|_| Mutex::new(Slot::Empty)).collect();
    let version = AtomicU64::new(0);
    let cursor = AtomicUsize::new(1);
    let done = AtomicBool::new(false);
    let latest: Mutex<(u64, Vec<u32>)> = Mutex::new((0, Vec::new()));
    let lock = |i: usize| slots[i].lock().unwrap_or_else(|e| e.into_inner());
    // Keeps the result of the newer tree version when two land in one slot.
    let store = |i: usize, v: u64, o: Outcome| {
        let mut slot = lock(i);
        let older = match &*slot {
            Slot::Done(w, _) | Slot::Claimed(w) => *w <= v,
            Slot::Empty => true,
        };
        if older {
            *slot = Slot::Done(v, o);
        }
    };
    let mut helper_state = st.clone();
    let n = st.g.vertices;
    let (improved, ()) = rayon::join(
        || {
            let mut improved = false;
            let mut v = 0u64;
            let mut i = 0;
            while i < paths.len() {
                // Read the slot and let it go before any search (the helper may want to store).
                let seen = lock(i).clone();
                let ready = match seen {
                    Slot::Done(w, o) if w == v => Some(o),
                    Slot::Claimed(w) if w == v => None,
                    _ => {
                        cursor.fetch_max(i + 1, Ordering::AcqRel);
                        Some(st.try_exchange(&paths[i], ws))
                    }
                };
                let outcome = match ready {
                    Some(o) => o,
                    None => {
                        // The helper is on this path: try the next unclaimed one meanwhile, or
                        // this one when none is left.
                        let j = cursor.fetch_add(1, Ordering::AcqRel);
                        if j < paths.len() {
                            let o = st.try_exchange(&paths[j], ws);
                            store(j, v, o);
                            continue;
                        }
                        st.try_exchange(&paths[i], ws)
                    }
                };
                if let Outcome::Better(edges) = outcome {
                    improved = true;
                    v += 1;
                    *latest.lock().unwrap_or_else(|e| e.into_inner()) = (v, edges.clone());
                    st.set(edges);
                    version.store(v, Ordering::Release);
                    cursor.store(i + 1, Ordering::Release);
                }
                i += 1;
            }
            done.store(true, Ordering::Release);
            improved
        },
        || {
            let mut hws = Workspace::new(n);
            let mut mine = 0u64;
            while !done.load(Ordering::Acquire) {
                if version.load(Ordering::Acquire) != mine {
                    let (w, edges) = latest.lock().unwrap_or_else(|e| e.into_inner()).clone();
                    helper_state.set(edges);
                    mine = w;
                    continue;
                }
                let j = cursor.fetch_add(1, Ordering::AcqRel);
                if j >= paths.len() {
                    std::thread::yield_now();
                    continue;
                }
                *lock(j) = Slot::Claimed(mine);
                let o = helper_state.try_exchange(&paths[j], &mut hws);
                store(j, mine, o);
            }
        },
    );
    improved
}

#[cfg(test)]
mod tests {
    use super::super::{Fixture, Reach, improve};
    use super::*;
    use crate::solve::steiner::tree;

    /// Key-path exchange with a helper thread makes exactly the moves of the one-thread pass, on
    /// trees large enough to get the helper.
    #[test]
    fn helper_thread_changes_nothing() {
        let one = rayon::ThreadPoolBuilder::new()
            .num_threads(1)
            .build()
            .unwrap();
        let two = rayon::ThreadPoolBuilder::new()
            .num_threads(2)
            .build()
            .unwrap();
        for seed in 0..4 {
            let f = Fixture::new(120, 60, seed);
            let (rg, csr, it, start) = (&f.red.graph, &f.csr, &f.red.is_terminal, &f.tree);
            assert!(start.len() >= HELPER_FROM, "tree of {} edges", start.len());
            let reach = Reach {
                seeds: 64,
                eliminate: false,
            };
            let run = |pool: &rayon::ThreadPool| {
                pool.install(|| {
                    let mut ws = Workspace::new(rg.vertices);
                    improve(rg, csr, it, start.clone(), &mut ws, 3, reach)
                })
            };
            let want = run(&one);
            assert!(
                tree::cost(rg, &want) < tree::cost(rg, start),
                "no move made"
            );
            for _ in 0..5 {
                assert_eq!(run(&two), want, "seed {seed}");
            }
        }
    }
}
