//! Capacity-aware bounds: they use the least number of vehicles a plan needs.

use super::required_degrees;
use crate::model::{Cost, Instance};
use crate::postman::chinese::distance_rows;
use crate::postman::graph::FAR;
use crate::postman::matching::matching_cost;
use crate::postman::Multigraph;
use crate::postman::{PerfectMatching, PostmanError};

/// Least number of routes any plan needs: `ceil(total demand / capacity)`,
/// or, with a shift limit `L`, `ceil(total service time / L)` when larger
/// (a route's time includes the service times of its tasks); at least one
/// when there is a task, 0 without tasks.
pub fn min_vehicles(inst: &Instance) -> usize {
    let tasks = inst.tasks();
    if tasks.is_empty() {
        return 0;
    }
    let by_load = ceil_div(inst.total_demand(), inst.fleet().capacity);
    let by_time = match inst.fleet().shift_limit {
        Some(l) if l > 0 => ceil_div(tasks.iter().map(|t| t.time).sum(), l),
        _ => 0,
    };
    (by_load.max(by_time) as usize).max(1)
}

fn ceil_div(a: Cost, b: Cost) -> Cost {
    (a + b - 1) / b
}

/// Depot-degree matching bound: the odd-vertex matching bound strengthened
/// by the fact that a plan with at least `K = ceil(total demand / capacity)`
/// routes leaves and re-enters the depot at least `K` times.
///
/// Method: the depot-degree argument of Benavent, Campos, Corberán & Mota
/// (1992, Networks 22; their LB1/LB2 family) and the node-duplication
/// matching of Win (1987) and Saruwatari, Hirabayashi & Nishida (1992), in a
/// simplified form of ours (citations from memory).
///
/// Construction. Let `R` be the required links, `O` the junctions other than
/// the depot with odd degree in `R`, `d_R` the depot's degree in `R`, and
/// `r = max(0, 2K − d_R)`. Match perfectly the vertices `O` plus `r` copies
/// of the depot, at costs: junction–junction and junction–copy the
/// shortest-path cost (undirected relaxation, from the depot for a copy),
/// copy–copy `c₂ = min(2 × cheapest non-loop link at the depot, cheapest
/// loop at the depot)`. When `r = 0` this is [`super::odd_matching_bound`].
///
/// Why it is a bound. Each of the at least `K` non-empty routes starts and
/// ends with a traversal at the depot, so the depot has degree `s ≥ 2K` in
/// `R ∪ D` (`D`: deadhead traversals), i.e. degree `s_D ≥ r` in `D`, with
/// `s_D ≡ r (mod 2)` since all degrees of `R ∪ D` are even. Split the depot
/// of `D` into `s_D` copies, one per link end at it. The odd vertices of the
/// split `D` are then `O` and the copies, and its edges split into trails
/// pairing them up (plus closed trails). A trail costs at least the
/// shortest-path cost between its ends; a copy–copy trail is either a loop
/// at the depot or starts and ends with two distinct non-loop links at the
/// depot, so costs at least `c₂`. Hence `cost(D)` is at least the cheapest
/// matching with `s_D` copies, which is at least the one with `r` copies:
/// two extra copies matched to `x` and `y` can be dropped and `x`, `y`
/// matched together at no more cost, by the triangle inequality
/// (`c₂ ≥ 0`, and `dist(x, y) ≤ dist(x, depot) + dist(depot, y)`).
///
/// # Errors
/// [`PostmanError`] when the matching solver fails or a cost is beyond
/// [`crate::postman::COST_LIMIT`]; `Solver` when no link touches the yard.
pub fn depot_degree_bound(
    inst: &Instance,
    matcher: &dyn PerfectMatching,
) -> Result<Cost, PostmanError> {
    let g = Multigraph::from_network(inst.network());
    Ok(inst.total_service_cost() + depot_degree_matching(inst, &g, matcher)?)
}

/// The deadhead part of [`depot_degree_bound`] with the link costs of `g`
/// (any non-negative costs; `g` has the network's links in order).
fn depot_degree_matching(
    inst: &Instance,
    g: &Multigraph,
    matcher: &dyn PerfectMatching,
) -> Result<Cost, PostmanError> {
    let depot = inst.depot();
    let deg = required_degrees(inst);
    let k = min_vehicles(inst) as i64;
    let r = (2 * k - deg[depot] as i64).max(0) as usize;
    let mut verts: Vec<usize> = (0..deg.len())
        .filter(|&v| deg[v] % 2 == 1 && (v != depot || r == 0))
        .collect();
    let real = verts.len();
    verts.push(depot);
    let rows = distance_rows(g, &verts, &verts, false);
    let depot_row = real;
    let mut c2 = Cost::MAX;
    for e in &g.edges {
        if e.u == depot && e.v == depot {
            c2 = c2.min(e.cost);
        } else if e.u == depot || e.v == depot {
            c2 = c2.min(2 * e.cost);
        }
    }
    if r > 0 && c2 == Cost::MAX {
        // No link at the depot but a route must leave it: cannot happen for a
        // valid instance with tasks; refuse rather than guess.
        return Err(PostmanError::Solver("no link at the depot".into()));
    }
    let total = real + r;
    let c = |i: usize, j: usize| -> Cost {
        match (i < real, j < real) {
            (true, true) => rows[i][j],
            (true, false) => rows[i][depot_row],
            (false, true) => rows[depot_row][j],
            (false, false) => c2,
        }
    };
    let mate = matcher.min_cost_perfect_matching(total, &c)?;
    Ok(matching_cost(&mate, &c))
}

/// Blend of [`depot_cut_bound`] and [`depot_degree_bound`]: for a weight
/// `α ∈ {0, ¼, ½, ¾, 1}`, service cost plus `α` times the cut crossings
/// plus the depot-degree matching on the costs left over, the best `α` kept.
///
/// Method: a Lagrangian-style split of the link costs between the two
/// arguments above (ours), each of which follows the published methods cited
/// there.
///
/// Why it is a bound. With `dist` the shortest-path costs from the depot
/// (undirected relaxation) and `Δ_e = |dist(a) − dist(b)|` for a link
/// `e = (a, b)`, write `c_e = ⌈α Δ_e⌉ + c^α_e`; `c^α_e ≥ 0` since
/// `Δ_e ≤ c_e`. The deadhead cost of a plan is then
/// `Σ_D ⌈α Δ_e⌉ + Σ_D c^α_e ≥ α Σ_D Δ_e + Σ_D c^α_e`. The first sum is at
/// least `α` times the cut crossings of [`depot_cut_bound`] (its proof only
/// bounds `Σ_D Δ_e`); the second is at least the depot-degree matching with
/// the costs `c^α` (its proof holds for any non-negative link costs). The
/// two parts bound disjoint shares of the same cost, so they add; the sum is
/// rounded up since plan costs are integers.
///
/// # Errors
/// [`PostmanError`] from the matching solver, as for [`depot_degree_bound`].
pub fn blended_bound(inst: &Instance, matcher: &dyn PerfectMatching) -> Result<Cost, PostmanError> {
    let g = Multigraph::from_network(inst.network());
    let (dist, _) = g.dijkstra(&[inst.depot()], false);
    let cuts = cut_crossings(inst, &dist, true);
    let mut best = 0;
    for quarters in 0..=4 {
        let mut h = g.clone();
        for e in &mut h.edges {
            let (a, b) = (dist[e.u], dist[e.v]);
            if a < FAR && b < FAR {
                let delta = (a - b).abs();
                e.cost -= (quarters * delta + 3) / 4;
                debug_assert!(e.cost >= 0);
            }
        }
        let m = depot_degree_matching(inst, &h, matcher)?;
        best = best.max(m + (quarters * cuts + 3) / 4);
    }
    Ok(inst.total_service_cost() + best)
}

/// Depot-distance cut bound: service cost plus, summed over the cuts around
/// the depot at every distance `t = 1, 2, …`, the deadhead crossings each
/// cut needs.
///
/// Method: the capacity cut reasoning of Belenguer & Benavent (1998, 2003)
/// and the cutsets grown from the depot of Benavent, Campos, Corberán & Mota
/// (1992, Networks 22), restricted to the nested sets of junctions at
/// shortest-path distance at least `t` from the depot, so that no linear
/// program is needed (citations from memory; the simplification is ours).
///
/// Why it is a bound. Let `dist` be shortest-path costs from the depot in
/// the undirected relaxation and `S_t = {v : dist(v) ≥ t}` (the depot is
/// outside for `t ≥ 1`). Every route that serves a task with an end in
/// `S_t` crosses the cut `δ(S_t)` at least twice (it is a closed walk from
/// outside that reaches inside); those routes carry the demand `d_t` (and
/// the service time) of these tasks, so there are at least `k_t` of them,
/// counted as in [`min_vehicles`] (at least 1 if there is such a task). The
/// served links cross the cut exactly `n_t` times (the tasks with one end on
/// each side), so the deadhead traversals cross it at least
/// `max(2 k_t − n_t, n_t mod 2)` times (crossing counts of a union of closed
/// walks are even). A deadhead traversal of a link `(a, b)` costs at least
/// `|dist(a) − dist(b)|` (triangle inequality), which is the number of
/// integers `t` for which it crosses `δ(S_t)`. Summing the needed crossings
/// over all `t` therefore bounds the deadhead cost.
///
/// (Adding a matching on the leftover costs `c − |Δdist|` gains nothing:
/// the shortest-path tree from the depot has leftover cost zero.)
pub fn depot_cut_bound(inst: &Instance) -> Cost {
    depot_cuts(inst, true)
}

/// [`depot_cut_bound`], or with `capacity_aware = false` its single-tour
/// form (one route crosses each cut that has work beyond it twice).
pub(crate) fn depot_cuts(inst: &Instance, capacity_aware: bool) -> Cost {
    let g = crate::postman::Multigraph::from_network(inst.network());
    let (dist, _) = g.dijkstra(&[inst.depot()], false);
    inst.total_service_cost() + cut_crossings(inst, &dist, capacity_aware)
}

/// The deadhead part of [`depot_cut_bound`]: needed deadhead crossings of the
/// cuts `δ(S_t)`, summed over `t`.
fn cut_crossings(inst: &Instance, dist: &[Cost], capacity_aware: bool) -> Cost {
    // Without capacity: one truck of unbounded load and shift.
    let q = if capacity_aware {
        inst.fleet().capacity
    } else {
        Cost::MAX / 4
    };
    let shift = inst
        .fleet()
        .shift_limit
        .filter(|&l| l > 0 && capacity_aware);
    let mut values: Vec<Cost> = vec![0];
    for t in inst.tasks() {
        values.push(dist[t.tail]);
        values.push(dist[t.head]);
    }
    values.sort_unstable();
    values.dedup();
    let m = values.len();
    let idx = |x: Cost| values.partition_point(|&v| v < x);
    // Suffix sums over the index of a task's far end: demand, service time,
    // number of tasks; cross[i]: tasks with near end < i <= far end.
    let mut demand_at = vec![0 as Cost; m + 1];
    let mut time_at = vec![0 as Cost; m + 1];
    let mut touch_at = vec![0usize; m + 1];
    let mut cross = vec![0i64; m + 1];
    for t in inst.tasks() {
        let (a, b) = (idx(dist[t.tail]), idx(dist[t.head]));
        let (lo, hi) = (a.min(b), a.max(b));
        demand_at[hi] += t.demand;
        time_at[hi] += t.time;
        touch_at[hi] += 1;
        cross[lo + 1] += 1;
        cross[hi + 1] -= 1;
    }
    for i in (0..m).rev() {
        demand_at[i] += demand_at[i + 1];
        time_at[i] += time_at[i + 1];
        touch_at[i] += touch_at[i + 1];
    }
    let mut n_cross = 0i64;
    let mut extra: Cost = 0;
    for i in 0..m {
        n_cross += cross[i];
        if i == 0 || touch_at[i] == 0 {
            continue;
        }
        let by_time = shift.map_or(0, |l| ceil_div(time_at[i], l));
        let routes = ceil_div(demand_at[i], q).max(by_time).max(1);
        let need = (2 * routes - n_cross).max(n_cross % 2).max(0);
        extra += (values[i] - values[i - 1]) * need;
    }
    extra
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::bounds::{connection_bound, odd_matching_bound};
    use crate::model::{Fleet, Network};
    use crate::postman::DenseBlossom;

    /// Depot 0 —(10)— 1, and two parallel required links 1–2 (cost 1), each
    /// needing a whole truck. By hand: every plan has two routes, each at
    /// least 10 + 1 + 1 + 10 = 22 (out, serve, back across 2–1, home), so the
    /// optimum is 44.
    fn spur() -> Instance {
        let mut net = Network::with_junctions(3);
        net.add_edge(0, 1, 10);
        net.add_required_edge(1, 2, 1, 5);
        net.add_required_edge(1, 2, 1, 5);
        Instance::new("spur", net, Fleet::with_capacity(5), 0).unwrap()
    }

    #[test]
    fn hand_computed_values_on_a_spur() {
        let inst = spur();
        assert_eq!(min_vehicles(&inst), 2);
        // Cuts: t = 1..10 need 2·2 crossings (40), t = 11 needs 4 − 2 (2).
        assert_eq!(depot_cut_bound(&inst), 2 + 42);
        // Four depot copies, matched in pairs at 2 × 10 each.
        assert_eq!(depot_degree_bound(&inst, &DenseBlossom).unwrap(), 2 + 40);
        // No odd vertex; one link of 10 joins the depot to the work.
        assert_eq!(odd_matching_bound(&inst, &DenseBlossom).unwrap(), 2);
        assert_eq!(connection_bound(&inst), 2 + 10);
        // α = 1: all cuts (42), and the left-over costs are all zero.
        assert_eq!(blended_bound(&inst, &DenseBlossom).unwrap(), 2 + 42);
    }

    #[test]
    fn shift_limit_raises_the_vehicle_count() {
        // Three parallel required links 0–1 of cost (and time) 10: a route
        // fits two of them in a shift of 20 (serve out, serve back), so at
        // least ceil(30 / 20) = 2 routes are needed though one truck holds all.
        let mut net = Network::with_junctions(2);
        for _ in 0..3 {
            net.add_required_edge(0, 1, 10, 1);
        }
        let mut fleet = Fleet::with_capacity(100);
        let inst = Instance::new("shift", net, fleet.clone(), 0).unwrap();
        assert_eq!(min_vehicles(&inst), 1);
        fleet.shift_limit = Some(20);
        assert_eq!(min_vehicles(&inst.with_fleet(fleet).unwrap()), 2);
    }
}
