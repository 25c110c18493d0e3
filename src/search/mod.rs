//! The metaheuristic search and the solver entry point.
