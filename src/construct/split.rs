//! Route-first, cluster-second: Ulusoy's (1985) split of a giant tour.
//!
//! A *giant tour* is an order of all tasks, ignoring capacity. The split cuts
//! it into consecutive routes by a shortest path on an auxiliary acyclic
//! graph: node `i` stands for "the first `i` tasks are served", and an edge
//! `i -> j` for one route serving tasks `i..j` in tour order, weighted by the
//! route's cost; it exists when the route respects capacity and shift limit.
//!
//! The service direction of every task is chosen optimally inside each route
//! by a small dynamic program over the two directions of each task (the
//! tour's directions are only an order, not a commitment).
//!
//! With a shift limit the direction program keeps two labels, cheapest first
//! (ties: quickest) and quickest first (ties: cheapest); a route is accepted
//! with the cheapest label if it fits the shift, else with the quickest one
//! if that fits. This is exact without a shift limit and a sound (always
//! feasible, possibly not cheapest) rule with one.
//!
//! With a fleet bound `K` the split is a shortest path with at most `K`
//! edges (a dynamic program over the number of routes, `O(K·n·w)` for
//! routes of at most `w` tasks).

use super::arcs::{ArcMatrix, BIG};

const INF: i64 = i64::MAX / 4;

/// Orientation labels of a route prefix: per direction of the last task,
/// (cost, time) of the cheapest and of the quickest chain.
#[derive(Clone, Copy)]
struct Labels {
    cheap: [(i64, i64); 2],
    quick: [(i64, i64); 2],
}

impl Labels {
    fn start(m: &ArcMatrix, task: usize) -> Labels {
        let mut l = Labels {
            cheap: [(INF, INF); 2],
            quick: [(INF, INF); 2],
        };
        for k in 0..2 {
            let a = (2 * task + k) as u32;
            if !m.allowed[a as usize] {
                continue;
            }
            let c = m.d(m.depot, a) + m.serve_cost[a as usize];
            let t = m.t(m.depot, a) + m.serve_time[a as usize];
            l.cheap[k] = (c, t);
            l.quick[k] = (c, t);
        }
        l
    }

    /// The labels after going on to `task` with the legs `legs[p][k]` from
    /// the previous task in direction `p` to `task` in direction `k`.
    #[allow(clippy::needless_range_loop)]
    fn extend(&self, m: &ArcMatrix, legs: &Pair, task: usize) -> Labels {
        let mut l = Labels {
            cheap: [(INF, INF); 2],
            quick: [(INF, INF); 2],
        };
        let timed = m.timed();
        for k in 0..2 {
            let b = (2 * task + k) as u32;
            if !m.allowed[b as usize] {
                continue;
            }
            for p in 0..2 {
                let (ld, lt) = legs[p][k];
                let (c0, t0) = self.cheap[p];
                if c0 < INF {
                    let c = c0 + ld + m.serve_cost[b as usize];
                    let t = if timed {
                        t0 + lt + m.serve_time[b as usize]
                    } else {
                        c
                    };
                    if (c, t) < l.cheap[k] {
                        l.cheap[k] = (c, t);
                    }
                }
                if timed {
                    let (c0, t0) = self.quick[p];
                    if t0 < INF {
                        let c = c0 + ld + m.serve_cost[b as usize];
                        let t = t0 + lt + m.serve_time[b as usize];
                        if (t, c) < (l.quick[k].1, l.quick[k].0) {
                            l.quick[k] = (c, t);
                        }
                    }
                }
            }
        }
        if !timed {
            l.quick = l.cheap;
        }
        l
    }

    /// Closed route cost with the rule of the module docs; `None` if the
    /// route fits no label. Returns (cost, uses the quick label).
    fn close(&self, m: &ArcMatrix, last: usize) -> Option<(i64, bool)> {
        let mut best_cheap = (INF, INF);
        let mut best_quick = (INF, INF);
        for k in 0..2 {
            let a = (2 * last + k) as u32;
            let (c, t) = self.cheap[k];
            if c < INF {
                let v = (c + m.d(a, m.depot), t + m.t(a, m.depot));
                if v < best_cheap {
                    best_cheap = v;
                }
            }
            let (c, t) = self.quick[k];
            if c < INF {
                let v = (c + m.d(a, m.depot), t + m.t(a, m.depot));
                if (v.1, v.0) < (best_quick.1, best_quick.0) {
                    best_quick = v;
                }
            }
        }
        if best_cheap.0 >= BIG {
            return None;
        }
        match m.shift {
            None => Some((best_cheap.0, false)),
            Some(s) if best_cheap.1 <= s => Some((best_cheap.0, false)),
            Some(s) if best_quick.1 <= s && best_quick.0 < BIG => Some((best_quick.0, true)),
            _ => None,
        }
    }
}

/// Best directions for a fixed task order served as one route; returns the
/// arcs, or `None` if no direction choice makes it feasible under the rule
/// of the module docs (capacity is not checked here).
pub fn orient(m: &ArcMatrix, tasks: &[usize], quick: bool) -> Vec<u32> {
    let pairs = between(m, tasks);
    orient_with(m, tasks, &pairs, quick)
}

/// The legs between consecutive tasks of an order: `[p][k]` is `(d, t)`
/// from the previous task in direction `p` to the next in direction `k`
/// (`BIG` where a direction is not allowed).
type Pair = [[(i64, i64); 2]; 2];

/// The [`Pair`] legs between `tour[j]` and `tour[j + 1]` for every `j`:
/// the values of [`ArcMatrix::d`] and [`ArcMatrix::t`], asked once per
/// pair. On demand the pairs are asked in parallel (rayon; the values do
/// not depend on the threads), each by at most one search per direction of
/// the earlier task ([`ArcMatrix::legs_from`]) instead of a search per leg
/// asked again for every route of the split that holds the pair.
fn between(m: &ArcMatrix, tour: &[usize]) -> Vec<Pair> {
    if !m.is_on_demand() {
        // Matrix lookups: no search to batch, nothing to allocate.
        return tour
            .windows(2)
            .map(|w| {
                let mut out = [[(BIG, BIG); 2]; 2];
                for (p, row) in out.iter_mut().enumerate() {
                    let a = (2 * w[0] + p) as u32;
                    for (k, leg) in row.iter_mut().enumerate() {
                        let b = (2 * w[1] + k) as u32;
                        *leg = (m.d(a, b), m.t(a, b));
                    }
                }
                out
            })
            .collect();
    }
    let pair = |w: &[usize]| {
        let (u, v) = (w[0], w[1]);
        let mut out = [[(BIG, BIG); 2]; 2];
        let bs: Vec<u32> = (0..2)
            .map(|k| (2 * v + k) as u32)
            .filter(|&b| m.allowed[b as usize])
            .collect();
        for (p, row) in out.iter_mut().enumerate() {
            let a = (2 * u + p) as u32;
            if !m.allowed[a as usize] || bs.is_empty() {
                continue;
            }
            for (&b, leg) in bs.iter().zip(m.legs_from(a, &bs)) {
                row[(b & 1) as usize] = leg;
            }
        }
        out
    };
    use rayon::prelude::*;
    tour.par_windows(2).map(pair).collect()
}

/// [`orient`] with the legs between consecutive tasks given (`pairs[x]`
/// between `tasks[x]` and `tasks[x + 1]`).
#[allow(clippy::needless_range_loop)]
fn orient_with(m: &ArcMatrix, tasks: &[usize], pairs: &[Pair], quick: bool) -> Vec<u32> {
    // Forward DP storing back-pointers, in the chosen criterion.
    let n = tasks.len();
    let key = |c: i64, t: i64| if quick { (t, c) } else { (c, t) };
    let mut lab = vec![[(INF, INF); 2]; n];
    let mut back = vec![[0u8; 2]; n];
    for k in 0..2 {
        let a = (2 * tasks[0] + k) as u32;
        if m.allowed[a as usize] {
            lab[0][k] = (
                m.d(m.depot, a) + m.serve_cost[a as usize],
                m.t(m.depot, a) + m.serve_time[a as usize],
            );
        }
    }
    for i in 1..n {
        for k in 0..2 {
            let b = (2 * tasks[i] + k) as u32;
            if !m.allowed[b as usize] {
                continue;
            }
            for p in 0..2 {
                let (c0, t0) = lab[i - 1][p];
                if c0 >= INF {
                    continue;
                }
                let (ld, lt) = pairs[i - 1][p][k];
                let c = c0 + ld + m.serve_cost[b as usize];
                let t = t0 + lt + m.serve_time[b as usize];
                let (oc, ot) = lab[i][k];
                if key(c, t) < key(oc, ot) {
                    lab[i][k] = (c, t);
                    back[i][k] = p as u8;
                }
            }
        }
    }
    let mut best = (INF, INF);
    let mut bk = 0;
    for k in 0..2 {
        let (c, t) = lab[n - 1][k];
        if c >= INF {
            continue;
        }
        let a = (2 * tasks[n - 1] + k) as u32;
        let v = (c + m.d(a, m.depot), t + m.t(a, m.depot));
        if key(v.0, v.1) < key(best.0, best.1) {
            best = v;
            bk = k;
        }
    }
    let mut out = vec![0u32; n];
    let mut k = bk;
    for i in (0..n).rev() {
        out[i] = (2 * tasks[i] + k) as u32;
        k = back[i][k] as usize;
    }
    out
}

/// The cost of the route `arcs` (as [`ArcMatrix::route_eval`]) with the
/// legs between its consecutive tasks from `pairs`.
fn route_cost(m: &ArcMatrix, arcs: &[u32], pairs: &[Pair]) -> i64 {
    let Some((&first, &last)) = arcs.first().zip(arcs.last()) else {
        return 0;
    };
    let mut c = m.d(m.depot, first) + m.d(last, m.depot);
    for (x, &a) in arcs.iter().enumerate() {
        c += m.serve_cost[a as usize];
        if x > 0 {
            c += pairs[x - 1][(arcs[x - 1] & 1) as usize][(a & 1) as usize].0;
        }
    }
    c
}

/// Why a giant tour could not be split.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum SplitFailure {
    /// Some task cannot be served on a route of its own.
    Infeasible,
    /// Every split needs more routes than the fleet bound; `fewest` is the
    /// smallest number of routes a split of this tour needs.
    TooFewVehicles {
        /// The fewest routes any split of the tour needs.
        fewest: usize,
    },
}

/// A split: total cost and routes as task arcs.
#[derive(Clone, Debug)]
pub struct Split {
    /// Total cost (service plus deadhead).
    pub cost: i64,
    /// Routes as task arcs in driving order.
    pub routes: Vec<Vec<u32>>,
}

/// Splits the giant tour `tour` (task indices; any order of any subset of
/// tasks) into feasible routes of least total cost, honouring
/// `max_routes` when given (else the matrix's fleet bound).
///
/// # Errors
/// [`SplitFailure`] when no split is feasible within the fleet bound.
pub fn split(m: &ArcMatrix, tour: &[usize]) -> Result<Split, SplitFailure> {
    split_bounded(m, tour, m.max_routes)
}

/// [`split`] with an explicit fleet bound (`None`: unlimited).
///
/// # Errors
/// [`SplitFailure::Infeasible`] when some task fits no route, [`SplitFailure::TooFewVehicles`]
/// when more routes than `max_routes` are needed.
pub fn split_bounded(
    m: &ArcMatrix,
    tour: &[usize],
    max_routes: Option<usize>,
) -> Result<Split, SplitFailure> {
    let n = tour.len();
    if n == 0 {
        return Ok(Split {
            cost: 0,
            routes: Vec::new(),
        });
    }
    let pairs = between(m, tour);
    let edges = auxiliary_edges(m, tour, &pairs);
    // Unbounded shortest path, with route counts as tie-break (fewest routes).
    let mut v = vec![(INF, usize::MAX); n + 1];
    let mut pred = vec![(usize::MAX, false); n + 1];
    v[0] = (0, 0);
    for i in 0..n {
        if v[i].0 >= INF {
            continue;
        }
        for &(j, c, q) in &edges[i] {
            let j = j as usize;
            let cand = (v[i].0 + c, v[i].1 + 1);
            if cand < v[j] {
                v[j] = cand;
                pred[j] = (i, q);
            }
        }
    }
    if v[n].0 >= INF {
        return Err(SplitFailure::Infeasible);
    }
    let mut cuts = match max_routes {
        Some(k) if v[n].1 > k => bounded_cuts(&edges, k)?,
        _ => {
            let mut cuts = Vec::new();
            let mut j = n;
            while j > 0 {
                let (i, q) = pred[j];
                cuts.push((i, j, q));
                j = i;
            }
            cuts
        }
    };
    cuts.reverse();
    let mut cost = 0;
    let routes: Vec<Vec<u32>> = cuts
        .into_iter()
        .map(|(i, j, q)| {
            let p = &pairs[i..j.saturating_sub(1).max(i)];
            let r = orient_with(m, &tour[i..j], p, q);
            cost += route_cost(m, &r, p);
            r
        })
        .collect();
    Ok(Split { cost, routes })
}

/// Arcs of the auxiliary graph: from `i`, to each `j` such that the route
/// `tour[i..j]` fits the capacity and some label, with its cost and label
/// choice (quick label or not).
type AuxEdges = Vec<Vec<(u32, i64, bool)>>;

fn auxiliary_edges(m: &ArcMatrix, tour: &[usize], pairs: &[Pair]) -> AuxEdges {
    let n = tour.len();
    let mut edges: AuxEdges = vec![Vec::new(); n];
    for i in 0..n {
        let mut load = 0;
        let mut lab = Labels::start(m, tour[i]);
        for j in i..n {
            if j > i {
                lab = lab.extend(m, &pairs[j - 1], tour[j]);
            }
            load += m.demand[2 * tour[j]];
            if load > m.capacity {
                break;
            }
            if let Some((c, q)) = lab.close(m, tour[j]) {
                edges[i].push(((j + 1) as u32, c, q));
            }
        }
    }
    edges
}

/// The cheapest split into at most `k` routes, as (start, end, quick) cuts
/// from the end of the tour backwards.
fn bounded_cuts(edges: &AuxEdges, k: usize) -> Result<Vec<(usize, usize, bool)>, SplitFailure> {
    let n = edges.len();
    // Fewest routes of any split: BFS-like DP on counts.
    let mut fewest = vec![usize::MAX; n + 1];
    fewest[0] = 0;
    for i in 0..n {
        if fewest[i] == usize::MAX {
            continue;
        }
        for &(j, _, _) in &edges[i] {
            let j = j as usize;
            fewest[j] = fewest[j].min(fewest[i] + 1);
        }
    }
    if fewest[n] > k {
        return Err(SplitFailure::TooFewVehicles { fewest: fewest[n] });
    }
    // Layered DP: best[r][j] = cheapest cover of tour[..j] by r routes.
    let mut best = vec![vec![INF; n + 1]; k + 1];
    let mut bp = vec![vec![(usize::MAX, false); n + 1]; k + 1];
    best[0][0] = 0;
    for r in 0..k {
        for i in 0..n {
            let b = best[r][i];
            if b >= INF {
                continue;
            }
            for &(j, c, q) in &edges[i] {
                let j = j as usize;
                if b + c < best[r + 1][j] {
                    best[r + 1][j] = b + c;
                    bp[r + 1][j] = (i, q);
                }
            }
        }
    }
    let (mut r, _) = (1..=k)
        .map(|r| (r, best[r][n]))
        .min_by_key(|&(r, c)| (c, r))
        .expect("k >= fewest[n] >= 1");
    let mut cuts = Vec::new();
    let mut j = n;
    while j > 0 {
        let (i, q) = bp[r][j];
        cuts.push((i, j, q));
        j = i;
        r -= 1;
    }
    Ok(cuts)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::model::{Dir, Fleet, Instance, Network};
    use crate::paths::Distances;

    /// A square of junctions 0-1-2-3 (depot 0), every side costing 1. Required:
    /// e0 = (0,1), e1 = (1,2), e2 = (2,3), each of demand 1; (3,0) may only be
    /// deadheaded. Capacity 2. Giant tour [e2, e1, e0].
    ///
    /// Routes of consecutive tasks (service 1 per task plus shortest deadheads):
    /// - {e2}: 0->3 (1) serve 3->2 (1) 2->0 (2) = 4 (the other direction also 4);
    /// - {e2,e1}: 0->3 (1), serve 3->2, serve 2->1, 1->0 (1) = 4 (both backward);
    /// - {e1}: 4; {e1,e0}: 0->2 (2) serve 2->1, serve 1->0 = 4; {e0}: 2;
    /// - {e2,e1,e0} would need load 3 > 2.
    ///
    /// Shortest path on the auxiliary graph: V1 = 4, V2 = min(4+4, 4) = 4,
    /// V3 = min(V1 + {e1,e0} = 8, V2 + {e0} = 6) = 6. So the split is
    /// [e2 backward, e1 backward], [e0], cost 6.
    #[test]
    fn split_of_a_hand_made_tour() {
        let mut net = Network::with_junctions(4);
        net.add_required_edge(0, 1, 1, 1);
        net.add_required_edge(1, 2, 1, 1);
        net.add_required_edge(2, 3, 1, 1);
        net.add_edge(3, 0, 1);
        let inst = Instance::new("square", net, Fleet::with_capacity(2), 0).unwrap();
        let dist = Distances::new(&inst).unwrap();
        let m = ArcMatrix::new(&inst, &dist).unwrap();
        let s = split(&m, &[2, 1, 0]).unwrap();
        assert_eq!(s.cost, 6);
        assert_eq!(s.routes.len(), 2);
        let r0: Vec<_> = s.routes[0].iter().map(|&a| ArcMatrix::visit(a)).collect();
        assert_eq!(r0[0].task, 2);
        assert_eq!(r0[0].dir, Dir::Backward);
        assert_eq!(r0[1].task, 1);
        assert_eq!(r0[1].dir, Dir::Backward);
        assert_eq!(ArcMatrix::task(s.routes[1][0]), 0);
        // One truck cannot carry demand 3 with capacity 2.
        assert_eq!(
            split_bounded(&m, &[2, 1, 0], Some(1)).unwrap_err(),
            SplitFailure::TooFewVehicles { fewest: 2 }
        );
    }

    /// gdb1 (Golden, DeArmon & Baker 1983; ../shared/instances): 22 tasks of
    /// demand 1, capacity 5. With at most 5 trucks the bounded split never
    /// uses more, and costs at least the free split.
    #[test]
    fn bounded_split_of_gdb1() {
        let path = std::path::Path::new(env!("CARGO_MANIFEST_DIR"))
            .join("../shared/instances/gdb/gdb1.dat");
        if !path.is_file() {
            println!("SKIPPED split::bounded_split_of_gdb1: {} is absent", path.display());
            return;
        }
        let inst = crate::io::read_dat_file(&path).unwrap().instance;
        let five = inst
            .with_fleet(Fleet {
                capacity: 5,
                shift_limit: None,
                max_vehicles: Some(5),
            })
            .unwrap();
        let dist = Distances::new(&five).unwrap();
        let m = ArcMatrix::new(&five, &dist).unwrap();
        let tour: Vec<usize> = (0..22).collect();
        let free = split_bounded(&m, &tour, None).unwrap();
        let bounded = split(&m, &tour).unwrap();
        assert!(bounded.routes.len() <= 5 && bounded.cost >= free.cost);
        assert!(free.routes.len() >= 5, "22 bins in trucks of 5");
    }
}
