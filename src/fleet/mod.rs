//! The fleet model's solver: routes with tips at dump sites, several yards,
//! truck types and balanced shifts (see [`crate::model::Operations`]).
//!
//! - [`tables`]: per truck type distances (without its `no_entry` streets);
//! - [`route`]: routes with tips ([`FleetRoute`], [`FleetPlan`]) and their
//!   evaluation;
//! - [`split`]: the exact split of a giant tour into routes with tips, for
//!   one truck type or a mixed fleet;
//! - `route_search`: local search on routes, each move priced by the split's
//!   inner programme on the routes it touches;
//! - [`solve`]: the fleet solver ([`FleetSolver`]);
//! - [`bound`]: lower bounds valid for the features in use.
//!
//! Plans are checked by [`crate::check::fleet::check_fleet_plan`].

pub mod bound;
pub mod route;
mod route_search;
pub mod solve;
pub mod split;
pub mod tables;

pub use route::{FleetPlan, FleetRoute, RouteProblem, Tip};
pub use solve::{FleetSolution, FleetSolveError, FleetSolver};
pub use tables::Tables;
