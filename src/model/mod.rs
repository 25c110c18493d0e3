//! The street-network model: junctions, links, required streets (tasks), the fleet and the yard.
//!
//! A [`Network`] is a mixed multigraph: every [`Link`] joins two junctions and
//! is either two-way or one-way. A link may be *required* (it carries a
//! [`ServiceSpec`]): it must then be served exactly once, in an allowed
//! direction. A street whose two sides are served separately is modelled as two
//! required links, each with [`ServeDirection::Forward`].
//!
//! An [`Instance`] joins a network with a [`Fleet`] and a depot (the yard) and
//! derives one [`Task`] per required link. Building an instance validates it:
//! every index in range, no negative cost, every task reachable from the depot
//! and back, no single task heavier than a truck.
//!
//! All costs, times and demands are exact integers ([`Cost`]).

mod coords;
mod fleet;
mod instance;
mod network;
mod operations;
mod units;

pub use coords::{CoordError, Coordinates, Projection, EARTH_RADIUS_M};
pub use fleet::Fleet;
pub use instance::{Dir, Instance, ModelError, Reach, Task, MAX_PROBLEMS};
pub use network::{Junction, Link, Network, ServeDirection, ServiceSpec, TurnRestriction};
pub use operations::{
    known_class, Balance, DumpSite, Element, Hours, Operations, OperationsError, TruckType, Yard,
};
pub use units::{Units, MAX_UNIT_LEN};

/// Exact integer cost, time or demand.
pub type Cost = i64;
