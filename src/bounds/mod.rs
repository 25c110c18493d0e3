//! Lower bounds on the cost of any plan.
//!
//! [`bound`] returns the best lower bound this crate knows how to compute
//! for an instance; every feasible plan costs at least its value.
//! [`all_bounds`] lists every bound computed, each with its method.
//! The much stronger but slower cutting-plane LP bound is in [`lp`]
//! ([`lp::LpBound`]); it is not part of [`all_bounds`] and runs with its own
//! time budget.
//!
//! Every bound here is written as *service cost + a lower bound on the
//! deadhead cost*. A plan's total cost is the service cost of every task
//! (each served once) plus the cost of every link driven without serving
//! (its deadhead traversals, `D`). Together, the served links `R` and `D`
//! form a union of closed walks from the depot, so as an undirected
//! multigraph `R ∪ D` has only even degrees, and in it the depot has degree
//! at least twice the number of routes. The bounds below only use these facts
//! and shortest-path distances in the undirected relaxation of the network
//! (one-way restrictions dropped), which are never longer than real deadhead
//! paths: they stay valid for mixed networks, one-way links and Forward-only
//! tasks. [`imbalance_flow_bound`] uses directions and is applied only when
//! every task has a fixed service direction.
//!
//! These bounds assume the plain model (one yard, trucks that never tip).
//! Which of them stay valid with dump sites, several yards and truck types,
//! and the bound the fleet solver reports then, is in
//! [`crate::fleet::bound`].

mod capacity;
pub mod lp;
mod single;

pub(crate) use capacity::depot_cuts;
pub use capacity::{blended_bound, depot_cut_bound, depot_degree_bound, min_vehicles};
pub use single::{connection_bound, imbalance_flow_bound, odd_matching_bound};

use crate::model::{Cost, Instance};
use crate::paths::Distances;
use crate::postman::DenseBlossom;

/// Largest number of vertices [`all_bounds`] hands to the dense matching
/// solver (odd junctions, plus depot copies for [`depot_degree_bound`]).
pub const MAX_DENSE_MATCHING: usize = 1000;

/// A lower bound and the method that gave it.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct LowerBound {
    /// The bound: no feasible plan costs less.
    pub value: Cost,
    /// Which method gave the value (for reports).
    pub by: &'static str,
}

/// Name of the service-cost bound.
pub const SERVICE: &str = "service cost";
/// Name of [`odd_matching_bound`].
pub const ODD_MATCHING: &str = "odd-vertex matching";
/// Name of [`connection_bound`].
pub const CONNECTION: &str = "component connection";
/// Name of [`imbalance_flow_bound`].
pub const IMBALANCE_FLOW: &str = "imbalance flow";
/// Name of [`depot_degree_bound`].
pub const DEPOT_DEGREE: &str = "depot-degree matching";
/// Name of [`depot_cut_bound`].
pub const DEPOT_CUTS: &str = "depot-distance cuts";
/// Name of [`blended_bound`].
pub const BLENDED: &str = "cuts + depot-degree blend";

/// The best lower bound known to the crate for `inst`: the largest value of
/// [`all_bounds`] (the first listed among equals).
///
/// # Complexity
/// Dominated by the matchings: a minimum-cost perfect matching on the odd
/// junctions and on the yard's copies, `O(k^3)` for `k` matched junctions
/// (dense blossom up to [`MAX_DENSE_MATCHING`], sparse above), plus a few
/// shortest-path and flow computations `O((V + E) log V)` each.
///
/// ```
/// use arcwright::bounds::bound;
/// use arcwright::model::{Fleet, Instance, Network};
/// use arcwright::paths::Distances;
/// // Two streets of 4 and 5 from the yard; trucks of 10 bins.
/// let mut net = Network::with_junctions(3);
/// net.add_required_edge(0, 1, 4, 2);
/// net.add_required_edge(0, 2, 5, 3);
/// let inst = Instance::new("fork", net, Fleet::with_capacity(10), 0).unwrap();
/// let dist = Distances::new(&inst).unwrap();
/// let lb = bound(&inst, &dist);
/// assert_eq!(lb.value, 18); // each street driven twice: (4 + 5) x 2
/// ```
pub fn bound(inst: &Instance, dist: &Distances) -> LowerBound {
    all_bounds(inst, dist)
        .into_iter()
        .reduce(|a, b| if b.value > a.value { b } else { a })
        .expect("the service-cost bound is always listed")
}

/// Every lower bound the crate computes for `inst`, in a fixed order:
///
/// 1. service cost: every task is served once;
/// 2. [`odd_matching_bound`] (single tour, Edmonds & Johnson 1973): exact
///    Chinese postman value when every link is required, two-way, and the
///    network is connected;
/// 3. [`connection_bound`] (single tour, rural-postman connectivity);
/// 4. [`imbalance_flow_bound`] (single tour, directed), only when every task
///    has a fixed service direction;
/// 5. [`depot_degree_bound`] (fleet, uses the least number of vehicles);
/// 6. [`depot_cut_bound`] (fleet, capacity cuts at every distance from the depot);
/// 7. [`blended_bound`] (fleet, 5 and 6 sharing the link costs).
///
/// A bound whose sub-solver fails (e.g. costs beyond the exact solvers'
/// range) is left out, and so are the two matching bounds when more than
/// [`MAX_DENSE_MATCHING`] vertices would be matched (the dense solver is
/// cubic: about 2 s at 1,000 vertices, 21 s at 2,000, measured with
/// `cargo bench --bench matching`); the service-cost bound is always
/// present. `dist` must be the instance's [`Distances`] (used by the
/// directed bound).
pub fn all_bounds(inst: &Instance, dist: &Distances) -> Vec<LowerBound> {
    let mut out = vec![LowerBound {
        value: inst.total_service_cost(),
        by: SERVICE,
    }];
    let odd = required_degrees(inst)
        .iter()
        .filter(|&&d| d % 2 == 1)
        .count();
    let small = odd + 2 * min_vehicles(inst) <= MAX_DENSE_MATCHING;
    if small {
        if let Ok(v) = odd_matching_bound(inst, &DenseBlossom) {
            out.push(LowerBound {
                value: v,
                by: ODD_MATCHING,
            });
        }
    }
    out.push(LowerBound {
        value: connection_bound(inst),
        by: CONNECTION,
    });
    if let Some(Ok(v)) = imbalance_flow_bound(inst, dist) {
        out.push(LowerBound {
            value: v,
            by: IMBALANCE_FLOW,
        });
    }
    if small {
        if let Ok(v) = depot_degree_bound(inst, &DenseBlossom) {
            out.push(LowerBound {
                value: v,
                by: DEPOT_DEGREE,
            });
        }
    }
    out.push(LowerBound {
        value: depot_cut_bound(inst),
        by: DEPOT_CUTS,
    });
    if small {
        if let Ok(v) = blended_bound(inst, &DenseBlossom) {
            out.push(LowerBound {
                value: v,
                by: BLENDED,
            });
        }
    }
    out
}

/// Shortest-path costs between all pairs of `verts` in the undirected
/// relaxation of the instance's network (one-way restrictions dropped).
pub(crate) fn relaxed_rows(inst: &Instance, verts: &[usize]) -> Vec<Vec<Cost>> {
    let g = crate::postman::Multigraph::from_network(inst.network());
    crate::postman::chinese::distance_rows(&g, verts, verts, false)
}

/// Undirected degree of each junction counting task links only (a loop counts twice).
pub(crate) fn required_degrees(inst: &Instance) -> Vec<usize> {
    let mut deg = vec![0; inst.network().len()];
    for t in inst.tasks() {
        deg[t.tail] += 1;
        deg[t.head] += 1;
    }
    deg
}
