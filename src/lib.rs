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
//! (single-tour routes and lower bounds), [`construct`], [`improve`] and
//! [`search`] (the fleet solver), [`demo`] and [`report`] (demo towns and
//! outputs for people), and [`app`] (the logic of the `planner` example
//! program).

pub mod app;
pub mod bounds;
pub mod check;
pub mod construct;
pub mod demo;
pub mod error;
pub mod improve;
pub mod io;
pub mod model;
pub mod paths;
pub mod plan;
pub mod postman;
pub mod report;
pub mod search;

pub use error::{Error, Result};
pub use search::{Progress, Solution, SolveError, Solver, Stats};
