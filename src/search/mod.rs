//! The metaheuristic search and the solver entry point, [`Solver`]
//! (re-exported at the crate root).
//!
//! Inside (crate-private): `solver` (the islands and their epochs),
//! `population` (individuals, broken-pairs distance, biased fitness) and
//! `crossover` (order crossover on giant tours).

mod crossover;
mod districts;
mod lp_side;
mod population;
mod recreate;
mod solver;

pub use lp_side::{LpBudget, LpOutcome};
pub use solver::{
    Decomposition, Phase, Progress, Solution, SolveError, Solver, Stats, DISTRICTS_FROM,
    DISTRICT_STREETS,
};
