//! Nearest-candidate lists without an all-pairs scan.
//!
//! For every task, the `k` tasks nearest to it by [`ArcMatrix::task_gap`]
//! among the tasks *near it in the street network*: a Dijkstra search over
//! the junctions (links driven either way, link costs), started from both
//! ends of the task, collects the tasks touching the junctions it settles
//! until it has [`POOL`] times `k` of them (or the network is exhausted);
//! these are then ranked by their exact deadhead gap in the solver's matrix
//! (ties by task index). On street networks the tasks nearest by deadhead
//! are almost always among those near on the map, so the lists match the
//! exact ones of `neighbour_lists` closely; where they differ (one-way
//! detours) the candidates are still near and every cost used stays exact.
//!
//! **Cost.** Each search settles a few dozen junctions on street networks:
//! `O(n (p log p))` time for `n` tasks and pools of `p` tasks, `O(n k)`
//! memory, instead of the `O(n^2)` gap evaluations of the exact lists. The
//! searches run in parallel with rayon; the result does not depend on the
//! number of threads.

use std::cmp::Reverse;
use std::collections::BinaryHeap;

use rayon::prelude::*;

use super::arcs::ArcMatrix;
use crate::model::Instance;

/// Tasks collected per search, as a multiple of the list length.
pub const POOL: usize = 3;

/// Undirected junction adjacency plus the tasks touching each junction.
struct Near {
    start: Vec<u32>,
    to: Vec<u32>,
    cost: Vec<i64>,
    tstart: Vec<u32>,
    tasks: Vec<u32>,
}

impl Near {
    fn new(inst: &Instance) -> Self {
        let net = inst.network();
        let nj = net.junctions.len();
        let (start, to, cost) = csr(
            nj,
            net.links
                .iter()
                .flat_map(|l| [(l.from, l.to, l.cost), (l.to, l.from, l.cost)]),
        );
        let (tstart, tasks, _) = csr(
            nj,
            inst.tasks()
                .iter()
                .enumerate()
                .flat_map(|(i, t)| [(t.tail, i, 0), (t.head, i, 0)]),
        );
        Near {
            start,
            to,
            cost,
            tstart,
            tasks,
        }
    }

    /// Up to `want` tasks other than `t` near task `t` (junctions in order
    /// of their undirected distance from the task's ends; at the last
    /// junction, its streets in index order).
    fn pool(&self, inst: &Instance, t: usize, want: usize, seen: &mut [u32]) -> Vec<u32> {
        let task = &inst.tasks()[t];
        let mut out: Vec<u32> = Vec::with_capacity(want);
        let mut heap = BinaryHeap::new();
        let stamp = t as u32 + 1;
        for v in [task.tail, task.head] {
            heap.push(Reverse((0i64, v as u32)));
        }
        while let Some(Reverse((d, v))) = heap.pop() {
            let vi = v as usize;
            if seen[vi] == stamp {
                continue;
            }
            seen[vi] = stamp;
            // At most `want`: a junction touched by very many streets (a
            // yard shared by many districts) would otherwise fill the pool
            // with streets whose gaps take long searches to find.
            for p in self.tstart[vi]..self.tstart[vi + 1] {
                let u = self.tasks[p as usize];
                if out.len() < want && u as usize != t && !out.contains(&u) {
                    out.push(u);
                }
            }
            if out.len() >= want {
                break;
            }
            for p in self.start[vi]..self.start[vi + 1] {
                let w = self.to[p as usize];
                if seen[w as usize] != stamp {
                    heap.push(Reverse((d + self.cost[p as usize], w)));
                }
            }
        }
        out
    }
}

/// Compressed rows of `(row, value, weight)` triples over `rows` rows, in
/// input order within a row.
fn csr(
    rows: usize,
    items: impl Iterator<Item = (usize, usize, i64)> + Clone,
) -> (Vec<u32>, Vec<u32>, Vec<i64>) {
    let mut start = vec![0u32; rows + 1];
    for (r, _, _) in items.clone() {
        start[r + 1] += 1;
    }
    for r in 0..rows {
        start[r + 1] += start[r];
    }
    let mut fill = start.clone();
    let m = start[rows] as usize;
    let (mut val, mut wt) = (vec![0u32; m], vec![0i64; m]);
    for (r, v, w) in items {
        let p = fill[r] as usize;
        fill[r] += 1;
        val[p] = v as u32;
        wt[p] = w;
    }
    (start, val, wt)
}

/// For each task, up to `k` nearby tasks sorted by [`ArcMatrix::task_gap`]
/// (then index), found by network searches (see the module docs). `m` must
/// be the matrix of `inst`.
pub fn candidate_lists(inst: &Instance, m: &ArcMatrix, k: usize) -> Vec<Vec<u32>> {
    let near = Near::new(inst);
    let nj = inst.network().junctions.len();
    (0..m.n)
        .into_par_iter()
        .map_init(
            || vec![0u32; nj],
            |seen, u| {
                // Marks are stamped with the task (`u + 1`), unique per
                // search, so they never need clearing.
                let pool = near.pool(inst, u, POOL * k, seen);
                let gaps = m.task_gaps(u, &pool);
                let mut v: Vec<(i64, u32)> = gaps.into_iter().zip(pool).collect();
                v.sort_unstable();
                v.truncate(k);
                v.into_iter().map(|(_, x)| x).collect()
            },
        )
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::construct::path_scanning::{path_scan_listed, RULES};
    use crate::demo::{town, TownSpec};
    use crate::improve::local_search::neighbour_lists;
    use crate::paths::Distances;
    use rand_chacha::ChaCha12Rng;

    fn setup() -> (Instance, ArcMatrix) {
        let inst = town(&TownSpec::new(4, 6)).expect("town");
        let dist = Distances::new(&inst).expect("paths");
        let m = ArcMatrix::new(&inst, &dist).expect("matrix");
        (inst, m)
    }

    #[test]
    fn candidate_lists_find_the_exact_nearest_street_almost_always() {
        let (inst, m) = setup();
        let cand = candidate_lists(&inst, &m, 16);
        let exact = neighbour_lists(&m, 1);
        let mut same = 0;
        for u in 0..m.n {
            assert!(cand[u].len() <= 16 && !cand[u].contains(&(u as u32)));
            let gaps: Vec<i64> = cand[u].iter().map(|&v| m.task_gap(u, v as usize)).collect();
            assert!(gaps.windows(2).all(|w| w[0] <= w[1]));
            // The exact nearest gap (all pairs) is a lower bound of ours.
            let best = m.task_gap(u, exact[u][0] as usize);
            assert!(gaps[0] >= best);
            same += usize::from(gaps[0] == best);
        }
        assert!(same * 100 >= m.n * 95, "{same} of {}", m.n);
    }

    #[test]
    fn batched_gaps_on_demand_equal_the_gaps_pair_by_pair_and_the_full_matrix() {
        let (inst, full) = setup();
        let lazy = ArcMatrix::new(&inst, &Distances::on_demand(&inst)).expect("matrix");
        assert!(lazy.is_on_demand() && !full.is_on_demand());
        let all: Vec<u32> = (0..full.n as u32).collect();
        for u in (0..full.n).step_by(7) {
            let batched = lazy.task_gaps(u, &all);
            for (v, &g) in batched.iter().enumerate() {
                assert_eq!(g, lazy.task_gap(u, v), "{u} {v}");
                assert_eq!(g, full.task_gap(u, v), "{u} {v}");
            }
        }
        assert_eq!(candidate_lists(&inst, &lazy, 16), candidate_lists(&inst, &full, 16));
    }

    #[test]
    fn listed_path_scanning_serves_every_street_once_within_limits() {
        let (inst, m) = setup();
        let cand = candidate_lists(&inst, &m, 16);
        for rule in RULES {
            let routes = path_scan_listed::<ChaCha12Rng>(&m, &cand, rule, None, &|| false)
                .expect("never gives up");
            let mut seen = vec![0; m.n];
            for r in &routes {
                assert!(m.route_feasible(r), "{rule:?}");
                for &a in r {
                    seen[ArcMatrix::task(a)] += 1;
                }
            }
            assert!(seen.iter().all(|&c| c == 1), "{rule:?}");
        }
    }
}
