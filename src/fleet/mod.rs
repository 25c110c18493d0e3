//! The fleet model's solver: routes with tips at dump sites, several yards,
//! truck types and balanced shifts (see [`crate::model::Operations`]).
//!
//! - [`tables`]: per truck type distances (without its `no_entry` streets);
//! - [`route`]: routes with tips ([`FleetRoute`], [`FleetPlan`]) and their
//!   evaluation;
//! - [`split`]: the exact split of a giant tour into routes with tips, for
//!   one truck type or a mixed fleet.

pub mod route;
pub mod split;
pub mod tables;

pub use route::{FleetPlan, FleetRoute, RouteProblem, Tip};
pub use tables::Tables;
