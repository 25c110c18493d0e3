//! The fleet solver: plans with tips, several yards and truck types.
//!
//! **Every feature off.** When the instance's operations are plain
//! ([`crate::model::Operations::is_plain`]) the solver runs today's
//! [`Solver`] with the same seed, workers and iteration limit and returns
//! its plan, each route a one-trip route of the one truck type: the same
//! plan and cost as [`Solver`] gives.
//!
//! **With features.** Route first, split second:
//! 1. *Orders.* Today's [`Solver`] solves plain relaxations of the instance
//!    (every street, the largest load limit, no shift limit, unlimited
//!    trucks) with the depot at each yard and at each dump site (at most
//!    [`MAX_RELAXATIONS`] depots, yards first); the routes of each plan,
//!    concatenated, give a giant tour. Trips between tips look like routes
//!    from a depot at the dump site, and a truck's first trip like a route
//!    from its yard, which is why both kinds of depot are tried.
//! 2. *Split.* Each giant tour is split exactly ([`super::split::split`]):
//!    the split chooses where to cut, the truck type (hence the yard) of each
//!    route, the service directions and every tip.
//! 3. *Local search on the order.* From each of these orders and
//!    [`RANDOM_STARTS`] random ones: moves of the order — move a task right
//!    after or right before one of its nearest tasks, swap two such tasks,
//!    reverse the stretch between them — each priced by a new exact split,
//!    so every move is priced with its tipping detours, and the split
//!    re-decides the truck type and yard of every route (this is how tasks
//!    move between yards and types). A move is kept when the objective does
//!    not go up (equal moves cross plateaus). The move limit applies to each
//!    start; moves are drawn from a ChaCha stream of the seed, so results
//!    are deterministic. Under balancing a move is priced with at most
//!    [`MOVE_THRESHOLDS`] candidate longest shifts, and each start's final
//!    order is split again with the full number. The best plan of all
//!    starts is returned.
//!
//! The result is checked by [`crate::check::fleet::check_fleet_plan`]
//! before it is returned.

use rand::seq::SliceRandom;
use rand::{Rng, SeedableRng};
use rand_chacha::ChaCha12Rng;

use super::bound::fleet_bound;
use super::route::{FleetPlan, FleetRoute};
use super::split::{split, split_with, FleetSplit};
use super::tables::Tables;
use crate::bounds::LowerBound;
use crate::model::{Cost, Fleet, Instance};
use crate::paths::DistanceError;
use crate::{SolveError, Solver};

/// Largest number of depots for which a plain relaxation is solved.
pub const MAX_RELAXATIONS: usize = 4;

/// Candidate longest shifts tried when a move is priced under balancing
/// (the starts and the final plan use [`super::split::MAX_THRESHOLDS`]).
pub const MOVE_THRESHOLDS: usize = 8;

/// Random orders added to the relaxations' orders as starts of the local search.
pub const RANDOM_STARTS: usize = 2;

/// Why the fleet solver produced no plan.
#[derive(Clone, Debug, PartialEq, Eq, thiserror::Error)]
#[non_exhaustive]
pub enum FleetSolveError {
    /// Today's solver failed (on the instance itself or a relaxation).
    #[error("{0}")]
    Solve(SolveError),
    /// The shortest paths could not be computed.
    #[error("shortest paths: {0}")]
    Distances(DistanceError),
    /// No order found could be split within the load and shift limits and
    /// the numbers of trucks.
    #[error("no plan within the load and shift limits and the numbers of trucks was found")]
    NoPlan,
    /// The plan failed the independent checker (a bug; the violations are listed).
    #[error("the plan fails the checker: {0}")]
    Unchecked(String),
}

/// The fleet solver's result.
#[derive(Clone, Debug)]
pub struct FleetSolution {
    /// The best plan found.
    pub plan: FleetPlan,
    /// Its total cost.
    pub cost: Cost,
    /// The value minimised (the cost, plus weight × longest shift when balancing).
    pub objective: Cost,
    /// Longest and shortest shift time of the plan.
    pub shift_spread: (Cost, Cost),
    /// A lower bound on the cost valid for the instance's features.
    pub lower_bound: LowerBound,
    /// Whether every split was exact (no label cap hit).
    pub exact_split: bool,
    /// Local-search moves that improved the plan.
    pub improving_moves: u64,
}

/// The fleet solver (builder style).
///
/// ```
/// use arcwright::fleet::solve::FleetSolver;
/// use arcwright::model::{DumpSite, Fleet, Instance, Network, Operations};
/// let mut net = Network::with_junctions(4);
/// net.add_required_edge(0, 1, 3, 4);
/// net.add_required_edge(1, 2, 4, 4);
/// net.add_required_edge(2, 0, 2, 4);
/// net.add_edge(2, 3, 9); // the road to the landfill
/// let inst = Instance::new("landfill", net, Fleet::with_capacity(5), 0).unwrap();
/// let site = DumpSite { name: Some("landfill".into()), junction: 3, unload_time: 15,
///                       unload_cost: 0, hours: None };
/// let inst = inst
///     .with_operations(Operations { dump_sites: vec![site], ..Operations::default() })
///     .unwrap();
/// let sol = FleetSolver::new(&inst).max_iterations(50).moves(50).solve().unwrap();
/// assert!(sol.plan.tips() >= 3); // 12 bins, 5 a trip, and it must return empty
/// assert!(sol.cost >= sol.lower_bound.value);
/// ```
pub struct FleetSolver<'a> {
    inst: &'a Instance,
    seed: u64,
    workers: usize,
    iterations: u64,
    moves: u64,
}

impl<'a> FleetSolver<'a> {
    /// A solver with seed 1, one worker, 200 iterations and 200 moves.
    pub fn new(inst: &'a Instance) -> Self {
        FleetSolver {
            inst,
            seed: 1,
            workers: 1,
            iterations: 200,
            moves: 200,
        }
    }

    /// Random seed (default 1).
    pub fn seed(mut self, seed: u64) -> Self {
        self.seed = seed;
        self
    }

    /// Workers of today's solver (default 1).
    pub fn workers(mut self, n: usize) -> Self {
        self.workers = n.max(1);
        self
    }

    /// Iteration limit of today's solver, per relaxation (default 200).
    pub fn max_iterations(mut self, n: u64) -> Self {
        self.iterations = n;
        self
    }

    /// Local-search moves tried on the order (default 200).
    pub fn moves(mut self, n: u64) -> Self {
        self.moves = n;
        self
    }

    /// Runs the solver.
    ///
    /// # Errors
    ///
    /// A [`FleetSolveError`] when no plan is found.
    pub fn solve(self) -> Result<FleetSolution, FleetSolveError> {
        let inst = self.inst;
        if inst.operations().is_plain(inst) {
            return self.solve_plain();
        }
        if inst.turn_rules().is_some() {
            return Err(FleetSolveError::Solve(SolveError::TurnsWithOperations));
        }
        let tables = Tables::new(inst).map_err(FleetSolveError::Distances)?;
        let lower_bound = fleet_bound(inst, &tables);
        let mut starts: Vec<(FleetSplit, Vec<usize>)> = Vec::new();
        let mut exact = true;
        let mut rng = ChaCha12Rng::seed_from_u64(self.seed);
        let mut tours = self.orders(&tables)?;
        for _ in 0..RANDOM_STARTS {
            let mut t: Vec<usize> = (0..inst.tasks().len()).collect();
            t.shuffle(&mut rng);
            tours.push(t);
        }
        for tour in tours {
            if let Ok(s) = split(inst, &tables, &tour) {
                exact &= s.exact;
                starts.push((s, tour));
            }
        }
        if starts.is_empty() {
            return Err(FleetSolveError::NoPlan);
        }
        let near = nearest(inst, &tables, 8);
        let mut improving = 0;
        let mut best: Option<FleetSplit> = None;
        for (mut s, mut tour) in starts {
            improving += self.improve(&tables, &near, &mut rng, &mut s, &mut tour, &mut exact);
            if let Ok(fine) = split(inst, &tables, &tour) {
                // Moves were priced with fewer candidate longest shifts.
                if fine.objective < s.objective {
                    s = fine;
                }
            }
            if best.as_ref().is_none_or(|b| s.objective < b.objective) {
                best = Some(s);
            }
        }
        let best = best.expect("at least one start");
        let plan = FleetPlan::new(best.routes);
        if let Err(v) = crate::check::fleet::check_fleet_plan(inst, &plan) {
            return Err(FleetSolveError::Unchecked(format!("{v:?}")));
        }
        Ok(FleetSolution {
            cost: plan.cost,
            objective: plan.objective(inst),
            shift_spread: plan.shift_spread(),
            plan,
            lower_bound,
            exact_split: exact,
            improving_moves: improving,
        })
    }

    /// Today's solver, its routes as one-trip routes of the one type.
    fn solve_plain(&self) -> Result<FleetSolution, FleetSolveError> {
        let inst = self.inst;
        let sol = Solver::new(inst)
            .seed(self.seed)
            .workers(self.workers)
            .max_iterations(self.iterations)
            .solve()
            .map_err(FleetSolveError::Solve)?;
        let routes = sol
            .plan
            .routes
            .iter()
            .map(|r| FleetRoute {
                truck_type: 0,
                yard: 0,
                visits: r.visits.clone(),
                tips: Vec::new(),
                trip_loads: vec![r.load],
                cost: r.cost,
                driven: r.cost,
                time: r.time,
            })
            .collect();
        let plan = FleetPlan::new(routes);
        Ok(FleetSolution {
            cost: plan.cost,
            objective: plan.cost,
            shift_spread: plan.shift_spread(),
            plan,
            lower_bound: sol.lower_bound,
            exact_split: true,
            improving_moves: 0,
        })
    }

    /// Giant tours from plain relaxations with the depot at each yard and
    /// each dump site.
    fn orders(&self, tables: &Tables) -> Result<Vec<Vec<usize>>, FleetSolveError> {
        let inst = self.inst;
        let ops = inst.operations();
        let mut depots: Vec<usize> = ops.yards_of(inst).iter().map(|y| y.junction).collect();
        depots.extend(ops.dump_sites.iter().map(|s| s.junction));
        let mut seen = Vec::new();
        depots.retain(|d| {
            let new = !seen.contains(d);
            seen.push(*d);
            new
        });
        depots.truncate(MAX_RELAXATIONS);
        let capacity = tables
            .types
            .iter()
            .map(|t| t.ty.capacity)
            .max()
            .unwrap_or(1);
        let mut tours = Vec::new();
        let mut last_err = None;
        for d in depots {
            let Ok(relaxed) = Instance::new(
                inst.name.clone(),
                inst.network().clone(),
                Fleet::with_capacity(capacity),
                d,
            ) else {
                continue; // some street cannot be reached from this depot
            };
            match Solver::new(&relaxed)
                .seed(self.seed)
                .workers(self.workers)
                .max_iterations(self.iterations)
                .solve()
            {
                Ok(sol) => tours.push(
                    sol.plan
                        .routes
                        .iter()
                        .flat_map(|r| r.visits.iter().map(|v| v.task))
                        .collect(),
                ),
                Err(e) => last_err = Some(e),
            }
        }
        if tours.is_empty() {
            return Err(last_err.map_or(FleetSolveError::NoPlan, FleetSolveError::Solve));
        }
        Ok(tours)
    }

    /// Local search on the order, every move priced by an exact split; moves
    /// that keep the objective are kept too (to cross plateaus).
    fn improve(
        &self,
        tables: &Tables,
        near: &[Vec<usize>],
        rng: &mut ChaCha12Rng,
        best: &mut FleetSplit,
        tour: &mut Vec<usize>,
        exact: &mut bool,
    ) -> u64 {
        let n = tour.len();
        if n < 2 {
            return 0;
        }
        let mut improving = 0;
        for _ in 0..self.moves {
            let u = tour[rng.random_range(0..n)];
            let v = near[u][rng.random_range(0..near[u].len())];
            let (pu, pv) = (
                tour.iter().position(|&x| x == u).expect("u in tour"),
                tour.iter().position(|&x| x == v).expect("v in tour"),
            );
            let mut cand = tour.clone();
            match rng.random_range(0..4) {
                0 => {
                    // Move u right after v.
                    let x = cand.remove(pu);
                    let at = cand.iter().position(|&y| y == v).expect("v") + 1;
                    cand.insert(at, x);
                }
                1 => {
                    // Move u right before v.
                    let x = cand.remove(pu);
                    let at = cand.iter().position(|&y| y == v).expect("v");
                    cand.insert(at, x);
                }
                2 => cand.swap(pu, pv),
                _ => {
                    let (a, b) = (pu.min(pv), pu.max(pv));
                    cand[a + 1..=b].reverse();
                }
            }
            if cand == *tour {
                continue;
            }
            if let Ok(s) = split_with(self.inst, tables, &cand, MOVE_THRESHOLDS) {
                *exact &= s.exact;
                if s.objective <= best.objective {
                    improving += u64::from(s.objective < best.objective);
                    *best = s;
                    *tour = cand;
                }
            }
        }
        improving
    }
}

/// For each task, up to `k` other tasks nearest to it (least deadhead
/// between any ends, with the first truck type's distances; ties by index).
fn nearest(inst: &Instance, tables: &Tables, k: usize) -> Vec<Vec<usize>> {
    let d = tables.dist(0);
    let tasks = inst.tasks();
    let n = tasks.len();
    (0..n)
        .map(|u| {
            let mut o: Vec<(Cost, usize)> = (0..n)
                .filter(|&v| v != u)
                .map(|v| {
                    let a = &tasks[u];
                    let b = &tasks[v];
                    let gap = [a.tail, a.head]
                        .iter()
                        .flat_map(|&x| [b.tail, b.head].map(|y| d.cost(x, y).min(d.cost(y, x))))
                        .min()
                        .expect("four pairs");
                    (gap, v)
                })
                .collect();
            o.sort_unstable();
            o.truncate(k);
            if o.is_empty() {
                vec![u]
            } else {
                o.into_iter().map(|x| x.1).collect()
            }
        })
        .collect()
}
