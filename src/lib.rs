//! # arcwright
//!
//! Route planning for street-service fleets (refuse collection, sweeping,
//! winter gritting, meter reading, inspection): the capacitated arc routing
//! problem (CARP) and its single-tour relaxations, the Chinese and rural
//! postman problems.
//!
//! Layout: [`model`] (network, fleet, tasks), [`io`] (readers and writers),
//! [`paths`] (shortest deadhead paths), [`plan`] (routes and walks),
//! [`check`] (independent plan checker), [`postman`] and [`bounds`]
//! (single-tour routes and lower bounds), [`search`] (the fleet solver,
//! [`Solver`]; its internals `construct` and `improve` are crate-private,
//! public only with the non-default `internals` feature for the kernel
//! benchmarks), [`map`] (OpenStreetMap and GeoJSON street maps in),
//! [`fleet`] (dump sites, several yards, truck types and balanced shifts), [`demo`]
//! and [`report`] (demo towns and outputs for people, rendered as text). The
//! `planner` program that writes them into a folder is an example
//! (`examples/planner/`), not library API.
//!
//! ```
//! use arcwright::model::{Fleet, Instance, Network};
//! use arcwright::{check::check_plan, Solver};
//!
//! // Four streets around a block, all to be served, trucks of 5 bins.
//! let mut net = Network::with_junctions(4);
//! net.add_required_edge(0, 1, 10, 3); // from, to, cost, demand
//! net.add_required_edge(1, 2, 12, 2);
//! net.add_required_edge(2, 3, 10, 3);
//! net.add_required_edge(3, 0, 12, 2);
//! let inst = Instance::new("block", net, Fleet::with_capacity(5), 0).unwrap();
//!
//! let sol = Solver::new(&inst).seed(1).max_iterations(100).solve().unwrap();
//! assert!(check_plan(&inst, &sol.plan).is_ok());
//! assert_eq!(sol.plan.visits(), 4);
//! assert!(sol.plan.routes.len() >= 2); // 10 bins need two trucks
//! assert!(sol.cost >= sol.lower_bound.value);
//! ```

/// Declares a solver-internal module: crate-private, public only with the
/// non-default `internals` feature (for the kernel benchmarks). Nothing in it
/// is a stable API.
macro_rules! internal_mod {
    ($name:ident) => {
        #[cfg(feature = "internals")]
        pub mod $name;
        #[cfg(not(feature = "internals"))]
        #[allow(dead_code, unreachable_pub)] // parts only the benchmarks use
        pub(crate) mod $name;
    };
}
pub mod bounds;
pub mod check;
// Solver internals: the arc matrix, Path-Scanning, giant tours and split.
internal_mod!(construct);
pub mod demo;
pub mod error;
pub mod fleet;
// Solver internals: local search and Merge-Split.
internal_mod!(improve);
pub mod io;
pub mod map;
pub mod model;
pub mod paths;
pub mod plan;
pub mod postman;
pub mod report;
pub mod search;
pub mod turns;

pub use error::{Error, Result};
pub use search::{
    Decomposition, LpBudget, LpOutcome, Phase, Progress, Solution, SolveError, Solver, Stats,
};

/// The README's Rust snippets, compiled (and run, unless marked `no_run`) as doctests.
#[cfg(doctest)]
#[doc = include_str!("../README.md")]
pub struct ReadmeDoctests;
