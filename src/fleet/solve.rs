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
//! 3. *Local search on routes* (module `route_search`): each start's
//!    routes are improved by moves between and within routes (relocate,
//!    swap, 2-opt, 2-opt*, a route to another truck type and so another
//!    yard, a task to a new route), each priced exactly by the split's inner
//!    programme on the routes it touches only (directions and tips
//!    re-chosen), then split again as one giant tour (the exact split of the
//!    routes put one after the other is never worse), and improved again.
//!    Then [`FleetSolver::moves`] rounds of iterated local search: a few
//!    random moves, a descent, the result kept when its objective is not
//!    worse (equal plans cross plateaus), otherwise the best plan restored.
//!    The start's best plan is split again as a giant tour at the end.
//!
//! **Limits.** Today's solver on each relaxation stops at the iteration
//! limit; the rounds stop at [`FleetSolver::moves`]; under least cost a plan
//! that reaches the lower bound ends the search (it is optimal). With
//! [`FleetSolver::time_limit`] or [`FleetSolver::stop_flag`] the search also
//! ends at the deadline or when the flag is set, and the best plan so far is
//! returned (the relaxations get at most a quarter of the time; each start
//! a fair share of the rest). At least one start is always split, so a plan
//! exists even when the flag is set from the beginning.
//!
//! **Parallelism and determinism.** Starts are improved on
//! [`FleetSolver::workers`] threads, start `i` by worker `i mod W`, each
//! with its own ChaCha stream derived from the seed and `i`; the best plan
//! is chosen in start order. So for a seed and worker count, and when no
//! time limit or stop flag ends the run, the result is always the same.
//!
//! The result is checked by [`crate::check::fleet::check_fleet_plan`]
//! before it is returned.

use std::sync::atomic::{AtomicBool, AtomicU64, Ordering};
use std::sync::{Arc, Mutex};
use std::time::{Duration, Instant};

use rand::seq::SliceRandom;
use rand::{Rng, SeedableRng};
use rand_chacha::ChaCha12Rng;

use super::bound::fleet_bound;
use super::route::{FleetPlan, FleetRoute};
use super::route_search::{Limits, Routes};
use super::split::{split, FleetSplit};
use super::tables::Tables;
use crate::bounds::LowerBound;
use crate::model::{Balance, Cost, Fleet, Instance};
use crate::paths::DistanceError;
use crate::{Phase, Progress, SolveError, Solver};

/// Largest number of depots for which a plain relaxation is solved.
pub const MAX_RELAXATIONS: usize = 4;

/// Random orders added to the relaxations' orders as starts of the local
/// search, on instances of at most [`RANDOM_STARTS_UP_TO`] streets to serve.
pub const RANDOM_STARTS: usize = 2;

/// Largest number of streets to serve for which random starts are added
/// (above, the descent from a random order costs far more than it finds:
/// on the demo town with a landfill it ended 4–5% above the descents from
/// the relaxations' orders, at twice their time).
pub const RANDOM_STARTS_UP_TO: usize = 100;

/// Nearest tasks looked at per task by the local search.
pub const NEIGHBOURS: usize = 8;

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
    /// Whether every split and route price was exact (no label cap hit).
    pub exact_split: bool,
    /// Local-search moves that improved the plan.
    pub improving_moves: u64,
    /// Rounds of iterated local search done (all starts; with every feature
    /// off, the offspring of today's solver).
    pub rounds: u64,
    /// Local-search moves priced (all starts), each by the inner programme
    /// on the routes it touches.
    pub moves_priced: u64,
    /// Whether the time limit or the stop flag ended the search early.
    pub stopped_early: bool,
    /// Total time of [`FleetSolver::solve`].
    pub elapsed: Duration,
}

type ProgressFn<'a> = Box<dyn Fn(&Progress) + Send + Sync + 'a>;

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
    time_limit: Option<Duration>,
    stop: Option<Arc<AtomicBool>>,
    progress: Option<ProgressFn<'a>>,
}

/// What one start's local search gives back.
struct Improved {
    plan: FleetPlan,
    objective: Cost,
    exact: bool,
    improving: u64,
}

/// What the workers share: the best value so far (for progress reports)
/// and the rounds done.
struct Shared<'s, 'a> {
    solver: &'s FleetSolver<'a>,
    tables: &'s Tables,
    near: &'s [Vec<usize>],
    limits: Limits,
    start: Instant,
    bound: &'s LowerBound,
    best: Mutex<Cost>,
    rounds: AtomicU64,
    priced: AtomicU64,
}

impl<'a> FleetSolver<'a> {
    /// A solver with seed 1, one worker, 200 iterations and 200 rounds, no
    /// time limit.
    pub fn new(inst: &'a Instance) -> Self {
        FleetSolver {
            inst,
            seed: 1,
            workers: 1,
            iterations: 200,
            moves: 200,
            time_limit: None,
            stop: None,
            progress: None,
        }
    }

    /// Random seed (default 1).
    pub fn seed(mut self, seed: u64) -> Self {
        self.seed = seed;
        self
    }

    /// Workers: of today's solver, and threads improving the starts
    /// (default 1).
    pub fn workers(mut self, n: usize) -> Self {
        self.workers = n.max(1);
        self
    }

    /// Iteration limit of today's solver, per relaxation (default 200).
    pub fn max_iterations(mut self, n: u64) -> Self {
        self.iterations = n;
        self
    }

    /// Rounds of iterated local search per start after its first descent
    /// (default 200; `u64::MAX` to search until the time limit or the stop
    /// flag).
    pub fn moves(mut self, n: u64) -> Self {
        self.moves = n;
        self
    }

    /// Stop after this much time (checked between moves) and return the
    /// best plan so far.
    pub fn time_limit(mut self, t: Duration) -> Self {
        self.time_limit = Some(t);
        self
    }

    /// External stop: when the flag becomes true the search ends soon and
    /// returns the best plan so far.
    pub fn stop_flag(mut self, flag: Arc<AtomicBool>) -> Self {
        self.stop = Some(flag);
        self
    }

    /// Called when a phase starts and whenever the best plan improves (from
    /// the worker that found it; calls never overlap). `best_cost` is the
    /// plan's total cost; under balancing a report is sent when the
    /// objective improves.
    pub fn on_progress(mut self, f: impl Fn(&Progress) + Send + Sync + 'a) -> Self {
        self.progress = Some(Box::new(f));
        self
    }

    /// Runs the solver.
    ///
    /// # Errors
    ///
    /// A [`FleetSolveError`] when no plan is found.
    ///
    /// # Complexity
    ///
    /// Per-type shortest paths, today's solver on at most
    /// [`MAX_RELAXATIONS`] relaxations, one exact split `O(n · m · L · (1 +
    /// S))` per start (`n` tasks, `m` the longest route, `L` labels, `S` dump
    /// sites), then moves each costing `O(m · L · (1 + S))`.
    pub fn solve(self) -> Result<FleetSolution, FleetSolveError> {
        let start = Instant::now();
        let inst = self.inst;
        if inst.operations().is_plain(inst) {
            return self.solve_plain(start);
        }
        if inst.turn_rules().is_some() {
            return Err(FleetSolveError::Solve(SolveError::TurnsWithOperations));
        }
        let limits = Limits {
            deadline: self.time_limit.map(|t| start + t),
            stop: self.stop.clone(),
        };
        let no_bound = LowerBound {
            value: 0,
            by: "none yet",
        };
        self.announce(Phase::Distances, None, &no_bound, start, 0);
        let tables = Tables::new(inst).map_err(FleetSolveError::Distances)?;
        self.announce(Phase::Bound, None, &no_bound, start, 0);
        let lower_bound = fleet_bound(inst, &tables);
        self.announce(Phase::Construction, None, &lower_bound, start, 0);
        let (starts, mut exact) = self.starts(&tables, &limits, start)?;
        let first = starts.iter().map(|s| s.cost).min();
        self.announce(Phase::Search, first, &lower_bound, start, 0);
        let near = nearest(inst, &tables, NEIGHBOURS);
        let shared = Shared {
            solver: &self,
            tables: &tables,
            near: &near,
            limits,
            start,
            bound: &lower_bound,
            best: Mutex::new(Cost::MAX),
            rounds: AtomicU64::new(0),
            priced: AtomicU64::new(0),
        };
        let results = shared.improve_all(starts);
        let rounds = shared.rounds.load(Ordering::Relaxed);
        let moves_priced = shared.priced.load(Ordering::Relaxed);
        let stopped_early = shared.limits.hit();
        drop(shared);
        let mut improving = 0;
        let mut best: Option<Improved> = None;
        for r in results {
            exact &= r.exact;
            improving += r.improving;
            if best.as_ref().is_none_or(|b| r.objective < b.objective) {
                best = Some(r);
            }
        }
        let plan = best.expect("at least one start").plan;
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
            rounds,
            moves_priced,
            stopped_early,
            elapsed: start.elapsed(),
        })
    }

    /// Sends a progress report, if anyone listens.
    fn announce(
        &self,
        phase: Phase,
        best: Option<Cost>,
        bound: &LowerBound,
        start: Instant,
        iteration: u64,
    ) {
        if let Some(f) = &self.progress {
            f(&Progress {
                phase,
                best_cost: best,
                lower_bound: bound.value,
                bound_by: bound.by,
                elapsed: start.elapsed(),
                iteration,
            });
        }
    }

    /// Today's solver, its routes as one-trip routes of the one type.
    fn solve_plain(mut self, start: Instant) -> Result<FleetSolution, FleetSolveError> {
        let inst = self.inst;
        let mut solver = Solver::new(inst)
            .seed(self.seed)
            .workers(self.workers)
            .max_iterations(self.iterations);
        if let Some(t) = self.time_limit {
            solver = solver.time_limit(t);
        }
        if let Some(s) = &self.stop {
            solver = solver.stop_flag(s.clone());
        }
        if let Some(f) = self.progress.take() {
            solver = solver.on_progress(move |p: &Progress| f(p));
        }
        let sol = solver.solve().map_err(FleetSolveError::Solve)?;
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
        let stopped_early = self.time_limit.is_some_and(|t| start.elapsed() >= t)
            || self
                .stop
                .as_ref()
                .is_some_and(|s| s.load(Ordering::Relaxed));
        Ok(FleetSolution {
            cost: plan.cost,
            objective: plan.cost,
            shift_spread: plan.shift_spread(),
            plan,
            lower_bound: sol.lower_bound,
            exact_split: true,
            improving_moves: 0,
            rounds: sol.stats.iterations,
            moves_priced: 0,
            stopped_early,
            elapsed: start.elapsed(),
        })
    }

    /// The starts: the relaxations' orders and [`RANDOM_STARTS`] random
    /// ones, each split exactly; also whether every split was exact. Once
    /// the limits are hit, only what is needed for one plan is done.
    fn starts(
        &self,
        tables: &Tables,
        limits: &Limits,
        start: Instant,
    ) -> Result<(Vec<FleetSplit>, bool), FleetSolveError> {
        let inst = self.inst;
        let mut rng = ChaCha12Rng::seed_from_u64(self.seed);
        let mut tours = self.orders(tables, limits, start)?;
        let randoms = if inst.tasks().len() <= RANDOM_STARTS_UP_TO {
            RANDOM_STARTS
        } else {
            0
        };
        for _ in 0..randoms {
            let mut t: Vec<usize> = (0..inst.tasks().len()).collect();
            t.shuffle(&mut rng);
            tours.push(t);
        }
        let mut starts = Vec::new();
        let mut exact = true;
        for tour in tours {
            if limits.hit() && !starts.is_empty() {
                break;
            }
            if let Ok(s) = split(inst, tables, &tour) {
                exact &= s.exact;
                starts.push(s);
            }
        }
        if starts.is_empty() {
            return Err(FleetSolveError::NoPlan);
        }
        Ok((starts, exact))
    }

    /// Giant tours from plain relaxations with the depot at each yard and
    /// each dump site (with a time limit, together within a quarter of it).
    fn orders(
        &self,
        tables: &Tables,
        limits: &Limits,
        start: Instant,
    ) -> Result<Vec<Vec<usize>>, FleetSolveError> {
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
        let count = depots.len().max(1) as u32;
        for d in depots {
            if limits.hit() {
                break;
            }
            let Ok(relaxed) = Instance::new(
                inst.name.clone(),
                inst.network().clone(),
                Fleet::with_capacity(capacity),
                d,
            ) else {
                continue; // some street cannot be reached from this depot
            };
            let mut solver = Solver::new(&relaxed)
                .seed(self.seed)
                .workers(self.workers)
                .max_iterations(self.iterations);
            if let Some(t) = self.time_limit {
                let end = start + t / 4;
                solver = solver.time_limit(end.saturating_duration_since(Instant::now()) / count);
            }
            if let Some(s) = &self.stop {
                solver = solver.stop_flag(s.clone());
            }
            match solver.solve() {
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
        if tours.is_empty() && !limits.hit() {
            return Err(last_err.map_or(FleetSolveError::NoPlan, FleetSolveError::Solve));
        }
        Ok(tours)
    }
}

impl<'s> Shared<'s, '_> {
    /// Improves every start, start `i` on worker `i mod W`; results in start
    /// order.
    fn improve_all(&self, starts: Vec<FleetSplit>) -> Vec<Improved> {
        let w = self.solver.workers.min(starts.len()).max(1);
        let mut mine: Vec<Vec<(usize, FleetSplit)>> = (0..w).map(|_| Vec::new()).collect();
        for (i, s) in starts.into_iter().enumerate() {
            mine[i % w].push((i, s));
        }
        let mut out: Vec<(usize, Improved)> = if w == 1 {
            let list = mine.pop().expect("one worker");
            self.worker(list)
        } else {
            std::thread::scope(|scope| {
                let handles: Vec<_> = mine
                    .into_iter()
                    .map(|list| scope.spawn(move || self.worker(list)))
                    .collect();
                handles
                    .into_iter()
                    .flat_map(|h| h.join().expect("a worker of the fleet search panicked"))
                    .collect()
            })
        };
        out.sort_by_key(|x| x.0);
        out.into_iter().map(|x| x.1).collect()
    }

    /// One worker's starts, one after the other, each within a fair share of
    /// the time left.
    fn worker(&self, list: Vec<(usize, FleetSplit)>) -> Vec<(usize, Improved)> {
        let m = list.len();
        list.into_iter()
            .enumerate()
            .map(|(j, (i, s))| {
                let mut limits = self.limits.clone();
                if let Some(d) = limits.deadline {
                    let left = d.saturating_duration_since(Instant::now());
                    limits.deadline = Some(Instant::now() + left / (m - j) as u32);
                }
                let seed = self.solver.seed ^ (i as u64 + 1).wrapping_mul(0x9E37_79B9_7F4A_7C15);
                let mut rng = ChaCha12Rng::seed_from_u64(seed);
                (i, self.improve(s, &mut rng, &limits))
            })
            .collect()
    }

    /// Reports a plan when it beats the best reported so far.
    fn report(&self, r: &Routes) {
        let mut best = self.best.lock().unwrap_or_else(|e| e.into_inner());
        if r.objective < *best {
            *best = r.objective;
            self.solver.announce(
                Phase::Search,
                Some(r.cost),
                self.bound,
                self.start,
                self.rounds.load(Ordering::Relaxed),
            );
        }
    }

    /// Splits the routes again as one giant tour; when that is better,
    /// takes it and descends again.
    fn resplit(&self, r: &mut Routes<'s>, limits: &Limits) -> u64 {
        let inst = self.solver.inst;
        match split(inst, self.tables, &r.order()) {
            Ok(s) if s.objective < r.objective => {
                let exact = r.exact && s.exact;
                *r = Routes::from_split(inst, self.tables, &s);
                r.exact &= exact;
                self.descend(r, &[], limits)
            }
            _ => 0,
        }
    }

    /// A descent of `r` (see `route_search`), its moves priced counted;
    /// returns the improving moves.
    fn descend(&self, r: &mut Routes<'s>, start: &[usize], limits: &Limits) -> u64 {
        let (improving, priced) = r.descend(self.near, start, limits);
        self.priced.fetch_add(priced, Ordering::Relaxed);
        improving
    }

    /// Whether `r` is proven optimal (least cost at the lower bound).
    fn optimal(&self, r: &Routes) -> bool {
        matches!(self.solver.inst.operations().balance, Balance::LeastCost)
            && r.cost <= self.bound.value
    }

    /// Local search from one start (see the module docs).
    fn improve(&self, s: FleetSplit, rng: &mut ChaCha12Rng, limits: &Limits) -> Improved {
        let inst = self.solver.inst;
        let mut cur = Routes::from_split(inst, self.tables, &s);
        cur.exact &= s.exact;
        let mut improving = self.descend(&mut cur, &[], limits);
        improving += self.resplit(&mut cur, limits);
        self.report(&cur);
        let mut best = cur.clone();
        for _ in 0..self.solver.moves {
            if limits.hit() || self.optimal(&best) {
                break;
            }
            self.rounds.fetch_add(1, Ordering::Relaxed);
            let count = 2 + rng.random_range(0..3);
            let touched = cur.perturb(self.near, rng, count);
            improving += self.descend(&mut cur, &touched, limits);
            if cur.objective < best.objective {
                self.report(&cur);
                best = cur.clone();
            } else if cur.objective == best.objective {
                best = cur.clone();
            } else {
                cur = best.clone();
            }
        }
        improving += self.resplit(&mut best, limits);
        Improved {
            plan: best.plan(),
            objective: best.objective,
            exact: best.exact,
            improving,
        }
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
