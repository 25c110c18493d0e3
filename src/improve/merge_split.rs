//! Merge-Split (Tang, Mei & Yao 2009): merge the tasks of a few routes,
//! order them again with Path-Scanning under each of its rules (ignoring
//! capacity, which yields one ordered giant route), split each order
//! optimally with Ulusoy's procedure, and keep the best result if it is
//! cheaper than the routes it replaces. A large move that local search with
//! small moves cannot make.

use rand::Rng;

use crate::construct::arcs::ArcMatrix;
use crate::construct::path_scanning::{path_scan, Rule, RULES};
use crate::construct::split::split_bounded;

/// Tries Merge-Split on the routes `picked` of `routes` (indices, distinct).
/// On improvement replaces them in place and returns the gain.
pub fn merge_split_routes<R: Rng>(
    m: &ArcMatrix,
    routes: &mut Vec<Vec<u32>>,
    picked: &[usize],
    rng: &mut R,
    random_orders: usize,
) -> Option<i64> {
    let tasks: Vec<usize> = picked
        .iter()
        .flat_map(|&r| routes[r].iter().map(|&a| ArcMatrix::task(a)))
        .collect();
    let old: i64 = picked.iter().map(|&r| m.route_eval(&routes[r]).0).sum();
    let spare = m.max_routes.map(|k| {
        let others = routes.iter().filter(|r| !r.is_empty()).count() - picked.len();
        k.saturating_sub(others)
    });
    let mut best: Option<(i64, Vec<Vec<u32>>)> = None;
    let n_rules = RULES.len() + random_orders;
    for k in 0..n_rules {
        let rule = RULES.get(k).copied().unwrap_or(Rule::Random);
        let giant = path_scan(m, &tasks, rule, Some(&mut *rng), 0, true);
        let order: Vec<usize> = giant
            .iter()
            .flatten()
            .map(|&a| ArcMatrix::task(a))
            .collect();
        if let Ok(s) = split_bounded(m, &order, spare) {
            if best.as_ref().is_none_or(|b| s.cost < b.0) {
                best = Some((s.cost, s.routes));
            }
        }
    }
    let (cost, new) = best?;
    if cost >= old {
        return None;
    }
    let mut sorted = picked.to_vec();
    sorted.sort_unstable_by(|a, b| b.cmp(a));
    for r in sorted {
        routes.swap_remove(r);
    }
    routes.extend(new);
    Some(old - cost)
}

/// Picks up to `tries` pairs of neighbouring routes at random and applies
/// [`merge_split_routes`] to each; returns the total gain.
pub fn merge_split<R: Rng>(
    m: &ArcMatrix,
    neigh: &[Vec<u32>],
    routes: &mut Vec<Vec<u32>>,
    tries: usize,
    rng: &mut R,
) -> i64 {
    let mut gain = 0;
    for _ in 0..tries {
        if routes.len() < 2 {
            break;
        }
        let mut route_of = vec![usize::MAX; m.n];
        for (r, rt) in routes.iter().enumerate() {
            for &a in rt {
                route_of[ArcMatrix::task(a)] = r;
            }
        }
        let u = rng.random_range(0..m.n);
        let ru = route_of[u];
        let cands: Vec<usize> = neigh[u]
            .iter()
            .map(|&v| route_of[v as usize])
            .filter(|&r| r != ru && r != usize::MAX)
            .collect();
        if ru == usize::MAX || cands.is_empty() {
            continue;
        }
        let rv = cands[rng.random_range(0..cands.len())];
        if let Some(g) = merge_split_routes(m, routes, &[ru, rv], rng, 1) {
            gain += g;
        }
    }
    gain
}
