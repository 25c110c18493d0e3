//! Lower bounds on the cost of any plan.
//!
//! [`bound`] returns the best lower bound this crate knows how to compute
//! for an instance; every feasible plan costs at least its value.

use crate::model::{Cost, Instance};
use crate::paths::Distances;

/// A lower bound and the method that gave it.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct LowerBound {
    /// The bound: no feasible plan costs less.
    pub value: Cost,
    /// Which method gave the value (for reports).
    pub by: &'static str,
}

/// The best lower bound known to the crate for `inst`.
///
/// Currently: every task must be served once, so the sum of service costs is
/// a bound.
pub fn bound(inst: &Instance, _dist: &Distances) -> LowerBound {
    LowerBound {
        value: inst.total_service_cost(),
        by: "service cost",
    }
}
