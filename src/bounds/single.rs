//! Single-tour (rural postman) relaxations: bounds that ignore capacity.

use super::{relaxed_rows, required_degrees};
use crate::model::{Cost, Instance};
use crate::paths::{Distances, UNREACHABLE};
use crate::postman::matching::matching_cost;
use crate::postman::rural::{components, connection_tree};
use crate::postman::{
    Multigraph, PerfectMatching, PostmanError, SuccessiveShortestPaths, Transport,
};

/// Odd-vertex matching bound: service cost plus a minimum-cost perfect
/// matching of the odd-degree junctions of the required links, with
/// shortest-path costs in the whole network (undirected relaxation).
///
/// Method: the matching step of the Chinese postman solution of Edmonds &
/// Johnson (1973, Math. Programming 5), used as a rural postman bound as in
/// Christofides, Campos, Corberán & Mota (1981) and, for the CARP, Golden &
/// Wong (1981, Networks 11) (citations from memory).
///
/// Why it is a bound: the deadhead traversals `D` of any plan make every
/// degree of `R ∪ D` even, so the odd vertices of `D` are exactly the odd
/// vertices `O` of `R`. The edges of `D` split into `|O|/2` trails pairing
/// up `O` (plus closed trails); each trail costs at least the shortest-path
/// cost between its ends in the undirected relaxation. So `cost(D)` is at
/// least the cheapest perfect matching of `O`. When every link is required,
/// two-way and connected, this is exactly the Chinese postman value.
///
/// # Errors
/// [`PostmanError`] when the matching solver fails or a cost is beyond
/// [`crate::postman::COST_LIMIT`].
pub fn odd_matching_bound(
    inst: &Instance,
    matcher: &dyn PerfectMatching,
) -> Result<Cost, PostmanError> {
    let deg = required_degrees(inst);
    let odd: Vec<usize> = (0..deg.len()).filter(|&v| deg[v] % 2 == 1).collect();
    let rows = relaxed_rows(inst, &odd);
    let c = |i: usize, j: usize| rows[i][j];
    let mate = matcher.min_cost_perfect_matching(odd.len(), &c)?;
    Ok(inst.total_service_cost() + matching_cost(&mate, &c))
}

/// Component-connection bound: service cost plus the cost of a minimum
/// spanning tree over the connected pieces of the required links (the
/// depot's piece included), two pieces being joined at their shortest-path
/// cost (undirected relaxation).
///
/// Method: the connectivity part of the rural postman bounds of Christofides,
/// Campos, Corberán & Mota (1981) and Frederickson (1979, J. ACM 26) (from
/// memory).
///
/// Why it is a bound: cut every route at each visit of a junction that
/// belongs to a piece. Between two such visits the route only deadheads, at
/// a cost at least the shortest-path cost between the two pieces (zero when
/// it stays in one piece). The pieces visited in order by all routes (which
/// all pass the depot) form a connected multigraph on all pieces, whose cost
/// is at least that of a minimum spanning tree.
pub fn connection_bound(inst: &Instance) -> Cost {
    let g = Multigraph::from_network(inst.network());
    let (tree, _) = connection_tree(&g, &components(inst));
    inst.total_service_cost() + tree
}

/// Imbalance-flow bound for fixed service directions: service cost plus a
/// minimum-cost transportation that balances, at every junction, the arcs
/// served in (tail → head) against the arcs served out, over directed
/// shortest paths (`dist`, the real network with its one-way links).
///
/// Method: the directed Chinese postman solution of Edmonds & Johnson (1973)
/// and Beltrami & Bodin (1974), used as a relaxation (from memory).
///
/// Why it is a bound: every task is served in its only allowed direction,
/// and the traversals of all routes, read as arcs, enter every junction as
/// often as they leave it. So the deadhead traversals form directed paths
/// from each junction with more served arcs in than out to those with more
/// out than in (plus closed walks), each path costing at least the directed
/// shortest-path cost.
///
/// Returns `None` (not applicable) when some task may be served in either
/// direction.
pub fn imbalance_flow_bound(
    inst: &Instance,
    dist: &Distances,
) -> Option<Result<Cost, PostmanError>> {
    if inst.tasks().iter().any(|t| t.either) {
        return None;
    }
    let n = inst.network().len();
    let mut bal = vec![0 as Cost; n];
    for t in inst.tasks() {
        bal[t.head] += 1;
        bal[t.tail] -= 1;
    }
    let src: Vec<usize> = (0..n).filter(|&v| bal[v] > 0).collect();
    let dst: Vec<usize> = (0..n).filter(|&v| bal[v] < 0).collect();
    let supply: Vec<Cost> = src.iter().map(|&v| bal[v]).collect();
    let demand: Vec<Cost> = dst.iter().map(|&v| -bal[v]).collect();
    let cost = |i: usize, j: usize| {
        let c = dist.cost(src[i], dst[j]);
        (c < UNREACHABLE).then_some(c)
    };
    let r = SuccessiveShortestPaths
        .min_cost_transport(&supply, &demand, &cost)
        .map(|arcs| {
            inst.total_service_cost()
                + arcs
                    .iter()
                    .map(|f| f.amount * cost(f.from, f.to).unwrap_or(0))
                    .sum::<Cost>()
        });
    Some(r)
}
