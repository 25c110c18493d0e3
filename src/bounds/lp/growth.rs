//! Greedy growth of junction sets for capacity cuts: from a seed set, add
//! one neighbouring junction at a time, the one that most raises
//! `2·d(S)/Q − (x(δ(S)) + r(S))` (the fractional violation), and keep every
//! set on the way whose exact inequality is violated. In the spirit of the
//! greedy shrinking heuristics for capacity cuts of the CVRP (Augerat et al.
//! 1998; Lysgaard, Letchford & Eglese 2004), adapted to the cut right-hand
//! side of [`super::Formulation::cut`] (ours).

use super::formulation::Formulation;
use crate::model::Cost;

/// How one growth runs.
#[derive(Clone, Copy, Debug, Default)]
pub struct Growth {
    /// False: the set grows away from the yard (which is never added) and
    /// is the cut's set. True: the yard is added to the seed and the cut's
    /// set is the complement of the growing set.
    pub outer: bool,
    /// Most junctions added.
    pub max_steps: usize,
    /// Only sets violated by more than this are returned.
    pub min_violation: f64,
    /// Seed of the xorshift generator perturbing the gains.
    pub seed: u64,
    /// Gains are perturbed uniformly in `[0, amplitude)` (0: plain greedy).
    pub amplitude: f64,
}

/// Per-junction task incidence, built once per formulation.
pub struct Grower {
    /// Tasks with an end at each junction (a loop once).
    task_at: Vec<Vec<u32>>,
    /// (end a, end b, demand, service time) per task.
    tasks: Vec<(usize, usize, Cost, Cost)>,
    /// Total demand, service time and number of tasks.
    totals: (Cost, Cost, usize),
}

/// Incremental state of one growing set.
struct State {
    inside: Vec<bool>,
    ends_in: Vec<u8>,
    /// Demand and time of the tasks with at least one end inside, and their number.
    any: (Cost, Cost, usize),
    /// The same for the tasks with both ends inside.
    full: (Cost, Cost, usize),
    r: i64,
    xd: f64,
    /// True when the growing set holds the yard and the cut's set is its complement.
    outer: bool,
}

impl State {
    /// Demand, time and task count of the cut's set (the side without the yard).
    fn load(&self, totals: (Cost, Cost, usize)) -> (Cost, Cost, usize) {
        if self.outer {
            (
                totals.0 - self.full.0,
                totals.1 - self.full.1,
                totals.2 - self.full.2,
            )
        } else {
            self.any
        }
    }
}

impl Grower {
    /// Prepares growth for `form`.
    pub fn new(form: &Formulation) -> Grower {
        let tasks: Vec<_> = form.task_data().collect();
        let mut task_at = vec![Vec::new(); form.junctions()];
        for (i, &(a, b, _, _)) in tasks.iter().enumerate() {
            task_at[a].push(i as u32);
            if b != a {
                task_at[b].push(i as u32);
            }
        }
        let totals = (
            tasks.iter().map(|t| t.2).sum(),
            tasks.iter().map(|t| t.3).sum(),
            tasks.len(),
        );
        Grower {
            task_at,
            tasks,
            totals,
        }
    }

    /// Grows from `seed` as `how` says. Returns the sets whose exact cut is violated by more than
    /// `min_violation` at `x`: the most violated set on the way, if any, as a
    /// membership mask.
    pub fn grow(
        &self,
        form: &Formulation,
        x: &[f64],
        seed: &[usize],
        how: Growth,
    ) -> Vec<Vec<bool>> {
        let Growth {
            outer,
            max_steps,
            min_violation,
            ..
        } = how;
        let mut rng = how.seed | 1;
        let n = form.junctions();
        let mut s = State {
            inside: vec![false; n],
            ends_in: vec![0; self.tasks.len()],
            any: (0, 0, 0),
            full: (0, 0, 0),
            r: 0,
            xd: 0.0,
            outer,
        };
        let mut boundary: Vec<usize> = Vec::new();
        let mut listed = vec![false; n];
        listed[form.depot()] = !outer;
        if outer {
            self.add(form, x, &mut s, form.depot(), &mut boundary, &mut listed);
        }
        for &v in seed {
            if v != form.depot() && !s.inside[v] {
                self.add(form, x, &mut s, v, &mut boundary, &mut listed);
            }
        }
        let q = form.capacity() as f64;
        let mut best: Option<(f64, Vec<bool>)> = None;
        let record = |s: &State, best: &mut Option<(f64, Vec<bool>)>| {
            let (d, t, touching) = s.load(self.totals);
            if touching == 0 {
                return;
            }
            let k = form.vehicles(d, t);
            let viol = (2 * k - s.r).max(s.r % 2) as f64 - s.xd;
            if viol > min_violation && best.as_ref().is_none_or(|b| viol > b.0 + 1e-9) {
                *best = Some((viol, s.inside.iter().map(|&b| b != s.outer).collect()));
            }
        };
        record(&s, &mut best);
        for _ in 0..max_steps {
            let mut pick: Option<(f64, usize)> = None;
            for &v in &boundary {
                if s.inside[v] {
                    continue;
                }
                let mut g = self.gain(form, x, &s, v, q);
                if how.amplitude > 0.0 {
                    rng ^= rng << 13;
                    rng ^= rng >> 7;
                    rng ^= rng << 17;
                    g += (rng % 1024) as f64 / 1024.0 * how.amplitude;
                }
                if pick.is_none_or(|p| g > p.0) {
                    pick = Some((g, v));
                }
            }
            let Some((_, v)) = pick else { break };
            self.add(form, x, &mut s, v, &mut boundary, &mut listed);
            boundary.retain(|&u| !s.inside[u]);
            record(&s, &mut best);
        }
        best.into_iter().map(|b| b.1).collect()
    }

    /// Fractional gain of adding `v`: `2·Δd/Q − Δx − Δr`, `d` the demand of
    /// the cut's set.
    fn gain(&self, form: &Formulation, x: &[f64], s: &State, v: usize, q: f64) -> f64 {
        let mut dw = 0.0;
        for &(c, u) in &form.adjacency()[v] {
            let w = x[c as usize];
            dw += if s.inside[u as usize] { -w } else { w };
        }
        let mut dd = 0;
        for &i in &self.task_at[v] {
            let (a, b, dem, _) = self.tasks[i as usize];
            let e = s.ends_in[i as usize];
            if !s.outer && e == 0 {
                dd += dem;
            } else if s.outer && (a == b || e == 1) {
                dd -= dem;
            }
            if a != b {
                let u = if a == v { b } else { a };
                dw += if s.inside[u] { -1.0 } else { 1.0 };
            }
        }
        2.0 * dd as f64 / q - dw
    }

    fn add(
        &self,
        form: &Formulation,
        x: &[f64],
        s: &mut State,
        v: usize,
        boundary: &mut Vec<usize>,
        listed: &mut [bool],
    ) {
        for &(c, u) in &form.adjacency()[v] {
            let (w, u) = (x[c as usize], u as usize);
            s.xd += if s.inside[u] { -w } else { w };
            if !listed[u] {
                listed[u] = true;
                boundary.push(u);
            }
        }
        for &i in &self.task_at[v] {
            let (a, b, dem, time) = self.tasks[i as usize];
            let i = i as usize;
            if s.ends_in[i] == 0 {
                s.any = (s.any.0 + dem, s.any.1 + time, s.any.2 + 1);
            }
            if a != b {
                let u = if a == v { b } else { a };
                s.r += if s.inside[u] { -1 } else { 1 };
                s.ends_in[i] += 1;
            } else {
                s.ends_in[i] += 2;
            }
            if s.ends_in[i] == 2 {
                s.full = (s.full.0 + dem, s.full.1 + time, s.full.2 + 1);
            }
        }
        s.inside[v] = true;
    }
}
