//! Construction heuristics: path-scanning and route-first cluster-second splitting.
//!
//! - [`arcs`]: the dense arc-to-arc matrices every solver loop uses;
//! - [`path_scanning`]: Path-Scanning (Golden, DeArmon & Baker 1983) with its
//!   five rules and a randomized variant;
//! - [`split`]: Ulusoy's (1985) optimal split of a giant tour, with optimal
//!   service directions and an optional fleet bound;
//! - [`giant`]: giant tours (concatenations of routes, random orders).

pub mod arcs;
pub mod candidates;
pub mod giant;
pub mod path_scanning;
pub mod split;

#[cfg(test)]
mod on_demand_tests;
