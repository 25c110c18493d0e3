//! The metaheuristic search and the solver entry point.
//!
//! - [`solver`]: [`Solver`], the one entry point (re-exported at the crate root);
//! - [`population`]: individuals, broken-pairs distance, biased fitness;
//! - [`crossover`]: order crossover on giant tours.

pub mod crossover;
pub mod population;
pub mod solver;

pub use solver::{Progress, Solution, SolveError, Solver, Stats};
