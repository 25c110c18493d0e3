//! Which instances the LP bound is valid for.

use crate::model::Instance;

/// Why the LP bound refuses an instance (it then reports nothing rather than
/// a value that might be wrong).
#[derive(Clone, Debug, PartialEq, Eq, thiserror::Error)]
#[non_exhaustive]
pub enum Why {
    /// A cost is so large that the exact arithmetic of the rounding could
    /// overflow.
    #[error("link {link}: cost {cost} is beyond the range of the LP bound (at most {max})")]
    CostTooLarge {
        /// Link index.
        link: usize,
        /// Its cost.
        cost: i64,
        /// The largest cost accepted.
        max: i64,
    },
    /// The scenario has dump sites (tipping trips), several yards, truck
    /// types or a shift balance ([`crate::model::Operations`]): the cuts
    /// count trucks from one yard with one capacity, which such plans need
    /// not obey.
    #[error("the scenario has {0}, which the LP bound does not model")]
    Operations(&'static str),
}

/// Largest link cost the LP bound accepts (`2^40`): keeps the scaled exact
/// sums of [`super::rounding`] far from `i128` overflow.
pub const MAX_COST: i64 = 1 << 40;

/// Whether the LP bound is valid for `inst`, or why not.
///
/// What the bound assumes, feature by feature (each checked here or shown
/// valid in [`super::Formulation::cut`]):
/// - **Undirected, mixed and one-way networks; Forward-only tasks**: valid.
///   The inequalities count crossings of a junction set in either
///   direction, which a directed walk also makes; dropping directions only
///   enlarges the set of plans the LP admits.
/// - **Parallel links**: one variable per junction pair at the cheapest
///   link's cost, which no deadhead traversal undercuts.
/// - **Service costs** differing from deadhead costs: served links pay their
///   service cost once (added outside the LP); deadheads pay the link cost.
/// - **Shift limits**: used only through `k(S) ≥ ⌈t(S)/L⌉` (a route's time
///   includes the service time of its tasks); otherwise ignored, which
///   only admits more plans.
/// - **Fleet size limits**: ignored (they only forbid plans).
/// - **Turn rules**: none in the model; the bound would stay valid if they
///   came (they only make walks dearer) as long as they add to the cost of
///   a walk rather than make it cheaper.
/// - **Tipping trips / dump sites, several yards, truck types, shift
///   balance** ([`crate::model::Operations`] not plain): refused
///   ([`Why::Operations`]). With dump sites the capacity count
///   `k(S) = ⌈d(S)/Q⌉` counts trips rather than trucks and a trip may end at
///   a dump site inside `S`; with several yards or capacities the cuts
///   around "the" yard and "the" capacity do not hold; a balance setting
///   changes what a plan pays. The caller falls back to the combinatorial
///   bound.
///
/// # Errors
///
/// [`Why`] names the feature the bound cannot handle.
pub fn applies(inst: &Instance) -> Result<(), Why> {
    let ops = inst.operations();
    if !ops.is_plain(inst) {
        let what = if !ops.dump_sites.is_empty() {
            "dump sites (tipping trips)"
        } else if ops.yards.len() > 1 {
            "several yards"
        } else if !ops.truck_types.is_empty() {
            "truck types"
        } else {
            "a yard or shift balance setting of its own"
        };
        return Err(Why::Operations(what));
    }
    for (i, l) in inst.network().links.iter().enumerate() {
        let service = l.service.as_ref().map_or(0, |s| s.cost);
        let cost = l.cost.max(service);
        if cost > MAX_COST {
            return Err(Why::CostTooLarge {
                link: i,
                cost,
                max: MAX_COST,
            });
        }
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::model::{Fleet, Network};

    #[test]
    fn refuses_dump_sites() {
        use crate::model::{DumpSite, Operations};
        let mut net = Network::with_junctions(3);
        net.add_required_edge(0, 1, 4, 2);
        net.add_edge(1, 2, 5);
        let inst = Instance::new("lane", net, Fleet::with_capacity(10), 0).unwrap();
        assert_eq!(applies(&inst), Ok(()));
        let dump = Operations {
            dump_sites: vec![DumpSite {
                name: None,
                junction: 2,
                unload_time: 20,
                unload_cost: 0,
                hours: None,
            }],
            ..Operations::default()
        };
        let tipping = inst.clone().with_operations(dump).unwrap();
        assert!(matches!(applies(&tipping), Err(Why::Operations(w)) if w.contains("dump")));
        assert!(crate::bounds::lp::LpBound::new(&tipping).is_err());
    }

    #[test]
    fn refuses_costs_beyond_exact_range() {
        let mut net = Network::with_junctions(2);
        net.add_required_edge(0, 1, 5, 1);
        let ok = Instance::new("ok", net.clone(), Fleet::with_capacity(1), 0).unwrap();
        assert_eq!(applies(&ok), Ok(()));
        net.add_edge(0, 1, MAX_COST + 1);
        let big = Instance::new("big", net, Fleet::with_capacity(1), 0).unwrap();
        assert_eq!(
            applies(&big),
            Err(Why::CostTooLarge {
                link: 1,
                cost: MAX_COST + 1,
                max: MAX_COST
            })
        );
    }
}
