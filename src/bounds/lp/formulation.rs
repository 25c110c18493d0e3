//! The one-index formulation on the undirected relaxation of the network, and
//! its cuts.
//!
//! One variable `x_e ≥ 0` per pair of junctions joined by a link: the number
//! of deadhead traversals, summed over all trucks and all parallel links,
//! priced at the cheapest link of the pair. Every cut is a set `S` of
//! junctions without the yard and reads `x(δ(S)) ≥ rhs(S)` (see [`Cut`]).

use std::collections::HashMap;

use crate::model::{Cost, Instance};

/// A deadhead variable: the junction pair `u < v` and its cost per traversal
/// (the cheapest link between them).
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct Column {
    /// Smaller junction index.
    pub u: usize,
    /// Larger junction index.
    pub v: usize,
    /// Cost of one deadhead traversal (cheapest parallel link).
    pub cost: Cost,
}

/// One task as the cuts see it: its two ends, demand and service time.
#[derive(Clone, Copy, Debug)]
struct TaskEnds {
    a: usize,
    b: usize,
    demand: Cost,
    time: Cost,
}

/// A valid inequality `x(δ(S)) ≥ rhs` of the formulation.
///
/// `set` is the side of the cut without the yard, sorted; `cols` the
/// variables crossing it; `rhs > 0` the right-hand side (see
/// [`Formulation::cut`] for why it is valid).
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Cut {
    /// Junctions of the side without the yard, sorted ascending.
    pub set: Vec<usize>,
    /// Indices into [`Formulation::columns`] of the variables crossing the cut.
    pub cols: Vec<u32>,
    /// Right-hand side: deadhead crossings every plan needs.
    pub rhs: i64,
}

/// The one-index formulation of an instance: variables, yard and the data
/// the cuts need. Owns its data (it is `Send` and outlives the instance).
#[derive(Clone, Debug)]
pub struct Formulation {
    n: usize,
    depot: usize,
    columns: Vec<Column>,
    /// For each junction, the (column, other end) pairs incident to it.
    adj: Vec<Vec<(u32, u32)>>,
    tasks: Vec<TaskEnds>,
    capacity: Cost,
    shift: Option<Cost>,
    service_cost: Cost,
}

impl Formulation {
    /// Builds the formulation of `inst`: one column per junction pair joined
    /// by a non-loop link (one-way links included, as two-way), at the cost of
    /// the cheapest such link.
    pub fn new(inst: &Instance) -> Formulation {
        let n = inst.network().len();
        let mut by_pair: HashMap<(usize, usize), usize> = HashMap::new();
        let mut columns: Vec<Column> = Vec::new();
        for l in &inst.network().links {
            if l.from == l.to {
                continue;
            }
            let (u, v) = (l.from.min(l.to), l.from.max(l.to));
            match by_pair.get(&(u, v)) {
                Some(&i) => columns[i].cost = columns[i].cost.min(l.cost),
                None => {
                    by_pair.insert((u, v), columns.len());
                    columns.push(Column { u, v, cost: l.cost });
                }
            }
        }
        let mut adj = vec![Vec::new(); n];
        for (i, c) in columns.iter().enumerate() {
            adj[c.u].push((i as u32, c.v as u32));
            adj[c.v].push((i as u32, c.u as u32));
        }
        let tasks = inst
            .tasks()
            .iter()
            .map(|t| TaskEnds {
                a: t.tail,
                b: t.head,
                demand: t.demand,
                time: t.time,
            })
            .collect();
        Formulation {
            n,
            depot: inst.depot(),
            columns,
            adj,
            tasks,
            capacity: inst.fleet().capacity,
            shift: inst.fleet().shift_limit.filter(|&l| l > 0),
            service_cost: inst.total_service_cost(),
        }
    }

    /// Number of junctions.
    pub fn junctions(&self) -> usize {
        self.n
    }

    /// The yard junction.
    pub fn depot(&self) -> usize {
        self.depot
    }

    /// The variables.
    pub fn columns(&self) -> &[Column] {
        &self.columns
    }

    /// Sum of the service costs of all tasks (paid by every plan).
    pub fn service_cost(&self) -> Cost {
        self.service_cost
    }

    /// Number of tasks.
    pub fn task_count(&self) -> usize {
        self.tasks.len()
    }

    /// For each junction, the incident (column, other end) pairs.
    pub(crate) fn adjacency(&self) -> &[Vec<(u32, u32)>] {
        &self.adj
    }

    /// Each task's ends, demand and service time (loops included).
    pub(crate) fn task_data(&self) -> impl Iterator<Item = (usize, usize, Cost, Cost)> + '_ {
        self.tasks.iter().map(|t| (t.a, t.b, t.demand, t.time))
    }

    /// The vehicle count `k` for a set touched by tasks of total demand `d`
    /// and service time `t` (see [`Self::cut`]).
    pub(crate) fn vehicles(&self, d: Cost, t: Cost) -> i64 {
        let mut k = ceil_div(d, self.capacity).max(1);
        if let Some(l) = self.shift {
            k = k.max(ceil_div(t, l));
        }
        k
    }

    /// The capacity `Q`.
    pub(crate) fn capacity(&self) -> Cost {
        self.capacity
    }

    /// The two ends of each task (loops included).
    pub(crate) fn task_ends(&self) -> impl Iterator<Item = (usize, usize)> + '_ {
        self.tasks.iter().map(|t| (t.a, t.b))
    }

    /// The upper bound `U = 2·|tasks|` on every variable in some optimal
    /// plan, used by the sound rounding ([`super::rounding`]).
    ///
    /// Why: take an optimal plan and cut every deadhead walk between two
    /// services (or the yard) short at a repeated junction; costs and times
    /// are non-negative, so the plan stays feasible and optimal. Each of its
    /// deadhead walks is then a path, which crosses each junction pair at
    /// most once; a plan has one more walk per route than services and, after
    /// dropping empty routes, at most one route per task: at most `2·|tasks|`
    /// walks.
    pub fn upper(&self) -> i64 {
        2 * self.tasks.len() as i64
    }

    /// The cut of the junction set `members` (given as a membership mask of
    /// length [`Self::junctions`]; either side of the cut may be given), or
    /// `None` when its right-hand side is not positive.
    ///
    /// Let `S` be the side without the yard, `d(S)` and `t(S)` the demand and
    /// service time of the tasks with at least one end in `S`, `r(S)` the
    /// number of tasks with exactly one end in `S`, `Q` the capacity and `L`
    /// the shift limit. The right-hand side is
    /// `max(2k(S) − r(S), r(S) mod 2)` with
    /// `k(S) = max(⌈d(S)/Q⌉, ⌈t(S)/L⌉, 1)` when some task touches `S`, else 0.
    ///
    /// Why every plan satisfies `x(δ(S)) ≥ rhs`: every route is a closed walk
    /// from the yard (outside `S`), so it crosses `δ(S)` an even number of
    /// times, and at least twice when it serves a task with an end in `S`
    /// (serving it reaches that end). Those routes carry `d(S)` and spend at
    /// least `t(S)` serving, each at most `Q` and `L`, so there are at least
    /// `k(S)` of them: at least `2k(S)` crossings, of which served tasks make
    /// exactly `r(S)` (each task is served once); deadheads make the rest.
    /// Parity: all crossings together are even, so the deadhead crossings
    /// have the parity of `r(S)`; in particular at least one when `r(S)` is
    /// odd (the odd-cut inequality). `2k − r` already has the parity of `r`,
    /// so no further rounding applies. This is the capacity inequality of
    /// Belenguer & Benavent (2003, Computers & OR 30(5)) with its odd-cut
    /// companion (Belenguer & Benavent 1998), the time count as in
    /// [`crate::bounds::depot_cut_bound`]; the inequality counts crossings
    /// regardless of direction, so it holds for one-way links and
    /// Forward-only tasks too.
    pub fn cut(&self, members: &[bool]) -> Option<Cut> {
        debug_assert_eq!(members.len(), self.n);
        let flip = members[self.depot];
        let inside = |v: usize| members[v] != flip;
        let set: Vec<usize> = (0..self.n).filter(|&v| inside(v)).collect();
        if set.is_empty() {
            return None;
        }
        let rhs = self.rhs(&inside);
        if rhs <= 0 {
            return None;
        }
        let mut cols = Vec::new();
        for &v in &set {
            for &(c, w) in &self.adj[v] {
                if !inside(w as usize) {
                    cols.push(c);
                }
            }
        }
        cols.sort_unstable();
        Some(Cut { set, cols, rhs })
    }

    /// Right-hand side of the cut around the yard-free side `inside`.
    fn rhs(&self, inside: &impl Fn(usize) -> bool) -> i64 {
        let (mut d, mut t, mut r, mut touch) = (0 as Cost, 0 as Cost, 0i64, false);
        for task in &self.tasks {
            let (ia, ib) = (inside(task.a), inside(task.b));
            if ia || ib {
                touch = true;
                d += task.demand;
                t += task.time;
            }
            if ia != ib {
                r += 1;
            }
        }
        if !touch {
            return 0;
        }
        let k = self.vehicles(d, t);
        (2 * k - r).max(r % 2)
    }

    /// The value `x(δ(S))` of a cut at the point `x`.
    pub fn lhs(&self, cut: &Cut, x: &[f64]) -> f64 {
        cut.cols.iter().map(|&c| x[c as usize]).sum()
    }
}

fn ceil_div(a: Cost, b: Cost) -> Cost {
    (a + b - 1).div_euclid(b)
}
