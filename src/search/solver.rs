//! The fleet solver: one entry point, [`Solver`].
//!
//! A population-based hybrid search in the spirit of the memetic algorithm
//! for the CARP (Lacomme, Prins & Ramdane-Chérif 2004) and of hybrid genetic
//! search (Vidal 2022): giant-tour order crossover, Ulusoy's split, local
//! search with neighbour lists, occasional Merge-Split (Tang, Mei & Yao 2009),
//! and survivor selection on biased fitness (cost rank plus diversity rank by
//! broken-pairs distance). All individuals are feasible.
//!
//! **Parallelism and determinism.** With `workers = W` the search runs `W`
//! independent islands on a rayon pool of `W` threads. Each island draws
//! from its own ChaCha stream (derived from the seed and the island index).
//! Islands run in epochs of a fixed number of offspring; at the barrier
//! between epochs every island receives the overall best solution (a
//! deterministic exchange). Hence for a given seed, worker count and
//! iteration limit the result is always the same; the only time-dependent
//! decision is when to stop (time limit or external stop flag).
//!
//! ```
//! use arcwright::model::{Fleet, Instance, Network};
//! use arcwright::Solver;
//! let mut net = Network::with_junctions(4);
//! net.add_required_edge(0, 1, 3, 2);
//! net.add_required_edge(1, 2, 4, 2);
//! net.add_required_edge(2, 3, 2, 2);
//! net.add_edge(3, 0, 5);
//! let inst = Instance::new("square", net, Fleet::with_capacity(4), 0).unwrap();
//! let sol = Solver::new(&inst).max_iterations(200).solve().unwrap();
//! assert_eq!(sol.plan.visits(), 3);
//! assert!(sol.cost >= sol.lower_bound.value);
//! ```

use std::fmt;
use std::sync::atomic::{AtomicBool, Ordering};
use std::sync::Arc;
use std::time::{Duration, Instant};

use rand::{Rng, SeedableRng};
use rand_chacha::ChaCha12Rng;
use rayon::prelude::*;

use crate::bounds::{bound, LowerBound};
use crate::construct::arcs::{ArcMatrix, BIG};
use crate::construct::giant;
use crate::construct::path_scanning::{path_scan, Rule, RULES};
use crate::construct::split::{split, SplitFailure};
use crate::improve::local_search::{neighbour_lists, LocalSearch, DEFAULT_NEIGHBOURS, SCALE};
use crate::improve::merge_split::merge_split;
use crate::model::{Cost, Instance};
use crate::paths::{DistanceError, Distances};
use crate::plan::Plan;
use crate::search::crossover::order_crossover;
use crate::search::population::{Individual, Params, Population};

/// Progress report, sent when the best plan improves.
#[derive(Clone, Debug)]
pub struct Progress {
    /// Cost of the best plan so far.
    pub best_cost: Cost,
    /// The lower bound in use.
    pub lower_bound: Cost,
    /// Time since `solve` started.
    pub elapsed: Duration,
    /// Offspring generated so far (all workers).
    pub iteration: u64,
}

/// Run statistics.
#[derive(Clone, Debug)]
pub struct Stats {
    /// Offspring generated (all workers).
    pub iterations: u64,
    /// Total time of `solve`.
    pub elapsed: Duration,
    /// Time at which the returned plan was first found.
    pub time_to_best: Duration,
    /// Number of workers (islands).
    pub workers: usize,
    /// The seed.
    pub seed: u64,
}

/// The solver's result.
#[derive(Clone, Debug)]
pub struct Solution {
    /// The best plan found (feasible).
    pub plan: Plan,
    /// Its cost.
    pub cost: Cost,
    /// The lower bound of [`crate::bounds::bound`].
    pub lower_bound: LowerBound,
    /// Percent above the lower bound: `100 (cost - bound) / bound` (0 when the bound is 0).
    pub gap: f64,
    /// Statistics.
    pub stats: Stats,
}

/// Why no plan was produced.
#[derive(Clone, Debug, PartialEq, Eq)]
#[non_exhaustive]
pub enum SolveError {
    /// The shortest paths could not be computed or stored.
    Distances(DistanceError),
    /// A deadhead is too long for the solver's 32-bit arc matrix.
    MatrixOverflow {
        /// The offending value.
        value: Cost,
    },
    /// The total demand needs more trucks than the fleet bound allows.
    FleetTooSmall {
        /// `ceil(total demand / capacity)`.
        needed_at_least: usize,
        /// The fleet bound.
        max_vehicles: usize,
    },
    /// No plan within the fleet bound was found (none may exist).
    NoPlanWithinFleet {
        /// The fleet bound.
        max_vehicles: usize,
        /// Fewest routes of any plan the constructions found.
        fewest_found: usize,
    },
    /// The instance has dump sites, several yards, truck types or a balance
    /// setting ([`crate::model::Operations`]), which this solver does not
    /// know: use [`crate::fleet::FleetSolver`].
    NeedsFleetSolver,
    /// A task cannot be served on a route of its own within capacity and shift.
    TaskAlone {
        /// The link of the task.
        link: usize,
    },
}

impl fmt::Display for SolveError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            SolveError::Distances(e) => write!(f, "shortest paths: {e}"),
            SolveError::MatrixOverflow { value } => write!(
                f,
                "a deadhead costs {value}, too much for the solver's 32-bit arc matrix"
            ),
            SolveError::FleetTooSmall {
                needed_at_least,
                max_vehicles,
            } => write!(
                f,
                "the fleet is too small: the total demand needs at least {needed_at_least} trucks, but at most {max_vehicles} may be used"
            ),
            SolveError::NoPlanWithinFleet {
                max_vehicles,
                fewest_found,
            } => write!(
                f,
                "no plan with at most {max_vehicles} trucks was found (the fewest found uses {fewest_found})"
            ),
            SolveError::NeedsFleetSolver => write!(
                f,
                "the scenario has dump sites, several yards, truck types or balancing: plan it with the fleet solver"
            ),
            SolveError::TaskAlone { link } => write!(
                f,
                "link {link} cannot be served even on a route of its own within the capacity and shift limit"
            ),
        }
    }
}

impl std::error::Error for SolveError {}

impl From<DistanceError> for SolveError {
    fn from(e: DistanceError) -> Self {
        SolveError::Distances(e)
    }
}

type ProgressFn<'a> = Box<dyn Fn(&Progress) + Send + Sync + 'a>;

/// The fleet solver (builder style).
pub struct Solver<'a> {
    inst: &'a Instance,
    seed: u64,
    workers: usize,
    time_limit: Option<Duration>,
    max_iterations: Option<u64>,
    target: Option<Cost>,
    progress: Option<ProgressFn<'a>>,
    stop: Option<Arc<AtomicBool>>,
    epoch: u64,
}

impl<'a> Solver<'a> {
    /// A solver for `inst` with seed 1, one worker and no limit other than the
    /// lower bound. Set a time or iteration limit for anything but tiny instances.
    pub fn new(inst: &'a Instance) -> Self {
        Solver {
            inst,
            seed: 1,
            workers: 1,
            time_limit: None,
            max_iterations: None,
            target: None,
            progress: None,
            stop: None,
            epoch: 500,
        }
    }

    /// Random seed (default 1).
    pub fn seed(mut self, seed: u64) -> Self {
        self.seed = seed;
        self
    }

    /// Number of parallel workers (islands); default 1, at least 1.
    pub fn workers(mut self, n: usize) -> Self {
        self.workers = n.max(1);
        self
    }

    /// Stop after this much time (checked between offspring).
    pub fn time_limit(mut self, t: Duration) -> Self {
        self.time_limit = Some(t);
        self
    }

    /// Stop after this many offspring in total (all workers).
    pub fn max_iterations(mut self, n: u64) -> Self {
        self.max_iterations = Some(n);
        self
    }

    /// Stop as soon as a plan costing at most `cost` is found.
    pub fn target(mut self, cost: Cost) -> Self {
        self.target = Some(cost);
        self
    }

    /// Called (from the calling thread) whenever the best plan improves.
    pub fn on_progress(mut self, f: impl Fn(&Progress) + Send + Sync + 'a) -> Self {
        self.progress = Some(Box::new(f));
        self
    }

    /// External stop: when the flag becomes true the search ends soon and
    /// returns the best plan so far.
    pub fn stop_flag(mut self, flag: Arc<AtomicBool>) -> Self {
        self.stop = Some(flag);
        self
    }

    /// Offspring per island between two exchanges (default 500).
    pub fn epoch(mut self, n: u64) -> Self {
        self.epoch = n.max(1);
        self
    }

    /// Runs the search.
    pub fn solve(self) -> Result<Solution, SolveError> {
        let start = Instant::now();
        let inst = self.inst;
        if !inst.operations().is_plain(inst) {
            return Err(SolveError::NeedsFleetSolver);
        }
        let dist = Distances::new(inst)?;
        let lb = bound(inst, &dist);
        let m = ArcMatrix::new(inst, &dist)
            .map_err(|e| SolveError::MatrixOverflow { value: e.value })?;
        let stats0 = |iterations, ttb| Stats {
            iterations,
            elapsed: start.elapsed(),
            time_to_best: ttb,
            workers: self.workers,
            seed: self.seed,
        };
        if m.n == 0 {
            let plan = Plan {
                routes: Vec::new(),
                cost: 0,
            };
            return Ok(self.finish(plan, lb, stats0(0, Duration::ZERO)));
        }
        for t in 0..m.n {
            let ok = [2 * t as u32, 2 * t as u32 + 1]
                .iter()
                .any(|&a| m.allowed[a as usize] && m.route_feasible(&[a]));
            if !ok {
                return Err(SolveError::TaskAlone {
                    link: inst.tasks()[t].link,
                });
            }
        }
        if let Some(k) = m.max_routes {
            let total = inst.total_demand();
            let needed = ((total + m.capacity - 1) / m.capacity) as usize;
            if needed > k {
                return Err(SolveError::FleetTooSmall {
                    needed_at_least: needed,
                    max_vehicles: k,
                });
            }
        }
        let neigh = neighbour_lists(&m, DEFAULT_NEIGHBOURS);
        let deadline = self.time_limit.map(|t| start + t);
        let stop_at = self.target.unwrap_or(Cost::MIN).max(lb.value);
        let ctx = Ctx {
            m: &m,
            neigh: &neigh,
            deadline,
            stop: self.stop.clone(),
            stop_at,
            start,
        };
        let pool = rayon::ThreadPoolBuilder::new()
            .num_threads(self.workers)
            .build()
            .expect("thread pool");
        let mut islands: Vec<Island> = (0..self.workers)
            .map(|k| {
                let mut rng = ChaCha12Rng::seed_from_u64(self.seed);
                rng.set_stream(k as u64 + 1);
                Island::new(rng, &m)
            })
            .collect();
        pool.install(|| islands.par_iter_mut().for_each(|isl| isl.init(&ctx)));
        let mut best: Option<(i64, Vec<Vec<u32>>, Duration)> = None;
        let mut fewest = usize::MAX;
        for isl in &islands {
            fewest = fewest.min(isl.fewest);
            if let Some(b) = &isl.best {
                if best.as_ref().is_none_or(|x| b.cost < x.0) {
                    best = Some((b.cost, b.routes.clone(), isl.best_time));
                }
            }
        }
        let Some(mut best) = best else {
            return Err(SolveError::NoPlanWithinFleet {
                max_vehicles: m.max_routes.unwrap_or(0),
                fewest_found: fewest,
            });
        };
        let w = self.workers as u64;
        let mut budget: Vec<u64> = (0..w)
            .map(|k| match self.max_iterations {
                Some(n) => n / w + u64::from(k < n % w),
                None => u64::MAX,
            })
            .collect();
        let mut iterations = 0u64;
        let report = |best: &(i64, Vec<Vec<u32>>, Duration), iterations| {
            if let Some(f) = &self.progress {
                f(&Progress {
                    best_cost: best.0,
                    lower_bound: lb.value,
                    elapsed: start.elapsed(),
                    iteration: iterations,
                });
            }
        };
        report(&best, 0);
        // Epochs in a row in which no island made an offspring (an island
        // whose population cannot hold two distinct plans, as on a tiny
        // instance, makes none); without this guard the loop never ended.
        let mut idle = 0;
        loop {
            if best.0 <= stop_at
                || ctx.should_stop()
                || budget.iter().all(|&b| b == 0)
                || idle >= IDLE_EPOCHS
            {
                break;
            }
            let left = budget.clone();
            let epoch = self.epoch;
            pool.install(|| {
                islands
                    .par_iter_mut()
                    .zip(budget.par_iter_mut())
                    .for_each(|(isl, b)| {
                        let n = epoch.min(*b);
                        let done = isl.run(&ctx, n);
                        *b -= done;
                    })
            });
            idle = if budget == left { idle + 1 } else { 0 };
            let mut improved = false;
            iterations = islands.iter().map(|i| i.iterations).sum();
            // Deterministic exchange: the best of all islands (lowest index on ties).
            let mut bi = usize::MAX;
            let mut bc = best.0;
            for (k, isl) in islands.iter().enumerate() {
                if let Some(b) = &isl.best {
                    if b.cost < bc {
                        bc = b.cost;
                        bi = k;
                    }
                }
            }
            if bi != usize::MAX {
                let b = islands[bi].best.as_ref().expect("best");
                best = (b.cost, b.routes.clone(), islands[bi].best_time);
                improved = true;
            }
            for isl in islands.iter_mut() {
                isl.receive(&best.1, best.0);
            }
            if improved {
                report(&best, iterations);
            }
        }
        let visits: Vec<Vec<crate::plan::Visit>> = best
            .1
            .iter()
            .map(|r| r.iter().map(|&a| ArcMatrix::visit(a)).collect())
            .collect();
        let plan = Plan::from_visits(inst, &dist, visits);
        debug_assert_eq!(plan.cost, best.0, "matrix and plan costs disagree");
        debug_assert!(
            crate::check::check_plan(inst, &plan).is_ok(),
            "the solver's plan fails the checker: {:?}",
            crate::check::check_plan(inst, &plan)
        );
        Ok(self.finish(plan, lb, stats0(iterations, best.2)))
    }

    fn finish(&self, plan: Plan, lb: LowerBound, stats: Stats) -> Solution {
        let gap = if lb.value > 0 {
            100.0 * (plan.cost - lb.value) as f64 / lb.value as f64
        } else {
            0.0
        };
        Solution {
            cost: plan.cost,
            plan,
            lower_bound: lb,
            gap,
            stats,
        }
    }
}

struct Ctx<'c> {
    m: &'c ArcMatrix,
    neigh: &'c [Vec<u32>],
    deadline: Option<Instant>,
    stop: Option<Arc<AtomicBool>>,
    stop_at: i64,
    start: Instant,
}

impl Ctx<'_> {
    fn should_stop(&self) -> bool {
        self.deadline.is_some_and(|d| Instant::now() >= d)
            || self
                .stop
                .as_ref()
                .is_some_and(|f| f.load(Ordering::Relaxed))
    }
}

/// Epochs in a row without any offspring after which the search stops.
const IDLE_EPOCHS: u32 = 100;

/// Search parameters of one island.
const RESTART_AFTER: u64 = 3000;
const MS_RATE: f64 = 0.2;
const TARGET_FEASIBLE: f64 = 0.5;

struct Island {
    rng: ChaCha12Rng,
    pop: Population,
    best: Option<Individual>,
    best_time: Duration,
    fewest: usize,
    iterations: u64,
    since_improvement: u64,
    initialised: bool,
    pen_load: f64,
    pen_time: f64,
    feasible_window: (u64, u64),
}

impl Island {
    fn new(rng: ChaCha12Rng, m: &ArcMatrix) -> Self {
        let mut max_d = 1i64;
        for a in (0..m.arcs as u32).step_by(7) {
            for b in (0..m.arcs as u32).step_by(5) {
                let d = m.d(a, b);
                if d < BIG as i64 {
                    max_d = max_d.max(d);
                }
            }
        }
        let max_q = m.demand.iter().copied().max().unwrap_or(1).max(1);
        let w = (max_d as f64 / max_q as f64).clamp(0.1, 1000.0);
        Island {
            pen_load: w,
            pen_time: 1.0,
            feasible_window: (0, 0),
            rng,
            pop: Population::new(Params::default()),
            best: None,
            best_time: Duration::ZERO,
            fewest: usize::MAX,
            iterations: 0,
            since_improvement: 0,
            initialised: false,
        }
    }

    /// Split + local search with penalised excess (+ repair, + Merge-Split)
    /// of a giant tour; returns a feasible individual or `None`.
    fn educate(&mut self, ctx: &Ctx, tour: &[usize], ls: &mut LocalSearch) -> Option<Individual> {
        let s = match split(ctx.m, tour) {
            Ok(s) => s,
            Err(SplitFailure::TooFewVehicles { fewest }) => {
                self.fewest = self.fewest.min(fewest);
                return None;
            }
            Err(SplitFailure::Infeasible) => return None,
        };
        self.fewest = self.fewest.min(s.routes.len());
        let scaled = |w: f64| ((w * SCALE as f64).round() as i64).max(1);
        ls.set_penalties(scaled(self.pen_load), scaled(self.pen_time));
        let (mut routes, mut cost, mut ok) = ls.run(&s.routes, &mut self.rng);
        self.feasible_window.0 += u64::from(ok);
        self.feasible_window.1 += 1;
        let mut factor = 10.0;
        while !ok && factor <= 10000.0 {
            ls.set_penalties(
                scaled(self.pen_load * factor),
                scaled(self.pen_time * factor),
            );
            (routes, cost, ok) = ls.run(&routes, &mut self.rng);
            factor *= 10.0;
        }
        if !ok {
            return None;
        }
        if self.rng.gen_bool(MS_RATE) {
            let gain = merge_split(ctx.m, ctx.neigh, &mut routes, 3, &mut self.rng);
            if gain > 0 {
                ls.set_penalties(0, 0);
                (routes, cost, _) = ls.run(&routes, &mut self.rng);
            }
        }
        Some(Individual::new(ctx.m.n, routes, cost))
    }

    /// Adapts the penalty weights towards the target share of feasible
    /// local-search outcomes (as in hybrid genetic search).
    fn adapt_penalties(&mut self) {
        let (f, t) = self.feasible_window;
        if t < 100 {
            return;
        }
        let share = f as f64 / t as f64;
        if share < TARGET_FEASIBLE - 0.05 {
            self.pen_load = (self.pen_load * 1.2).min(1e5);
            self.pen_time = (self.pen_time * 1.2).min(1e5);
        } else if share > TARGET_FEASIBLE + 0.05 {
            self.pen_load = (self.pen_load * 0.85).max(0.1);
            self.pen_time = (self.pen_time * 0.85).max(0.1);
        }
        self.feasible_window = (0, 0);
    }

    fn offer(&mut self, ctx: &Ctx, ind: Individual) {
        if self.best.as_ref().is_none_or(|b| ind.cost < b.cost) {
            self.best = Some(ind.clone());
            self.best_time = ctx.start.elapsed();
            self.since_improvement = 0;
        }
        if !self.pop.has_clone(&ind) {
            self.pop.add(ind);
        }
    }

    fn init(&mut self, ctx: &Ctx) {
        let m = ctx.m;
        let mut ls = LocalSearch::new(m, ctx.neigh);
        let all: Vec<usize> = (0..m.n).collect();
        let p = Params::default();
        let mut tours: Vec<Vec<usize>> = Vec::new();
        ls.interrupt_at(ctx.deadline, ctx.stop.clone());
        for rule in RULES {
            let r = path_scan::<ChaCha12Rng>(m, &all, rule, None, 0, false);
            self.fallback(m, &r);
            tours.push(giant::of_routes(&r));
            if ctx.should_stop() {
                break;
            }
        }
        for _ in 0..3 {
            if ctx.should_stop() {
                break;
            }
            let r = path_scan(m, &all, Rule::Random, Some(&mut self.rng), 10, false);
            tours.push(giant::of_routes(&r));
        }
        while tours.len() < p.mu + 8 {
            tours.push(giant::random(m.n, &mut self.rng));
        }
        for t in tours {
            if let Some(ind) = self.educate(ctx, &t, &mut ls) {
                self.offer(ctx, ind);
            }
            if ctx.should_stop() && self.best.is_some() {
                break;
            }
        }
        self.initialised = true;
    }

    /// Keeps a feasible construction as the best plan while there is none
    /// yet (so that a stop during the first local search still has a plan);
    /// the population itself only receives educated individuals.
    fn fallback(&mut self, m: &ArcMatrix, routes: &[Vec<u32>]) {
        if self.best.is_some() || !routes.iter().all(|r| m.route_feasible(r)) {
            return;
        }
        if m.max_routes.is_some_and(|k| routes.len() > k) {
            return;
        }
        let cost = routes.iter().map(|r| m.route_eval(r).0).sum();
        self.best = Some(Individual::new(m.n, routes.to_vec(), cost));
    }

    fn receive(&mut self, routes: &[Vec<u32>], cost: i64) {
        if self.best.as_ref().is_none_or(|b| cost < b.cost) {
            let ind = Individual::new(self.pop_n(routes), routes.to_vec(), cost);
            if !self.pop.has_clone(&ind) {
                self.pop.add(ind.clone());
            }
            self.best = Some(ind);
            self.since_improvement = 0;
        }
    }

    fn pop_n(&self, routes: &[Vec<u32>]) -> usize {
        routes.iter().map(|r| r.len()).sum()
    }

    /// Runs up to `n` offspring; returns how many were made.
    fn run(&mut self, ctx: &Ctx, n: u64) -> u64 {
        let m = ctx.m;
        let mut ls = LocalSearch::new(m, ctx.neigh);
        ls.interrupt_at(ctx.deadline, ctx.stop.clone());
        let mut done = 0;
        while done < n {
            if ctx.should_stop() || self.best.as_ref().is_some_and(|b| b.cost <= ctx.stop_at) {
                break;
            }
            if self.pop.len() < 2 {
                self.init(ctx);
                if self.pop.len() < 2 {
                    break;
                }
            }
            self.pop.update_fitness();
            let p1 = self.pop.select(&mut self.rng).tour.clone();
            let p2 = self.pop.select(&mut self.rng).tour.clone();
            let child = order_crossover(&p1, &p2, &mut self.rng);
            if let Some(ind) = self.educate(ctx, &child, &mut ls) {
                self.offer(ctx, ind);
            }
            done += 1;
            self.iterations += 1;
            self.adapt_penalties();
            self.since_improvement += 1;
            if self.since_improvement > RESTART_AFTER {
                let keep = self.best.clone();
                self.pop.clear();
                self.init(ctx);
                if let Some(b) = keep {
                    if !self.pop.has_clone(&b) {
                        self.pop.add(b);
                    }
                }
                self.since_improvement = 0;
            }
        }
        done
    }
}
