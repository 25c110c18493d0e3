//! The population of the hybrid search: feasible individuals with their
//! giant tours, broken-pairs distances and biased fitness (Vidal et al.
//! 2012; Vidal 2022): rank by cost plus a weighted rank by contribution to
//! diversity, so that survivors stay both good and different.

use rand::Rng;

use crate::construct::arcs::ArcMatrix;
use crate::construct::giant;

/// One solution in the population.
#[derive(Clone, Debug)]
pub struct Individual {
    /// Routes as task arcs.
    pub routes: Vec<Vec<u32>>,
    /// Total cost.
    pub cost: i64,
    /// Giant tour (the routes concatenated).
    pub tour: Vec<usize>,
    /// Per task: (predecessor, successor) task, `n` for the depot.
    adj: Vec<(u32, u32)>,
    /// Distances to the others: (distance, id), sorted.
    prox: Vec<(f64, u64)>,
    id: u64,
    biased: f64,
}

impl Individual {
    /// Wraps routes.
    pub fn new(n: usize, routes: Vec<Vec<u32>>, cost: i64) -> Self {
        let mut adj = vec![(n as u32, n as u32); n];
        for r in &routes {
            for (k, &a) in r.iter().enumerate() {
                let t = ArcMatrix::task(a);
                let p = if k == 0 { n } else { ArcMatrix::task(r[k - 1]) };
                let s = if k + 1 == r.len() {
                    n
                } else {
                    ArcMatrix::task(r[k + 1])
                };
                adj[t] = (p as u32, s as u32);
            }
        }
        Individual {
            tour: giant::of_routes(&routes),
            routes,
            cost,
            adj,
            prox: Vec::new(),
            id: 0,
            biased: 0.0,
        }
    }

    /// Broken-pairs distance in [0, 1]: share of task adjacencies (in either
    /// orientation) of `self` missing in `other`.
    pub fn distance(&self, other: &Individual) -> f64 {
        let n = self.adj.len();
        if n == 0 {
            return 0.0;
        }
        let mut broken = 0usize;
        for t in 0..n {
            let (p, s) = self.adj[t];
            let (op, os) = other.adj[t];
            if s != os && s != op {
                broken += 1;
            }
            if p == n as u32 && op != n as u32 && os != n as u32 {
                broken += 1;
            }
        }
        broken as f64 / n as f64
    }
}

/// Population parameters.
#[derive(Clone, Copy, Debug)]
pub struct Params {
    /// Survivors after a selection.
    pub mu: usize,
    /// Offspring between selections.
    pub lambda: usize,
    /// Elite individuals protected by the biased fitness.
    pub elite: usize,
    /// Neighbours averaged for the diversity contribution.
    pub close: usize,
}

impl Default for Params {
    fn default() -> Self {
        Params {
            mu: 12,
            lambda: 20,
            elite: 4,
            close: 5,
        }
    }
}

/// A population of feasible individuals.
#[derive(Clone, Debug, Default)]
pub struct Population {
    members: Vec<Individual>,
    next_id: u64,
    params: Option<Params>,
}

impl Population {
    /// An empty population.
    pub fn new(params: Params) -> Self {
        Population {
            members: Vec::new(),
            next_id: 0,
            params: Some(params),
        }
    }

    fn params(&self) -> Params {
        self.params.unwrap_or_default()
    }

    /// Number of members.
    pub fn len(&self) -> usize {
        self.members.len()
    }

    /// Removes everyone.
    pub fn clear(&mut self) {
        self.members.clear();
    }

    /// Whether an individual with this cost and distance 0 exists.
    pub fn has_clone(&self, ind: &Individual) -> bool {
        self.members
            .iter()
            .any(|m| m.cost == ind.cost && m.distance(ind) == 0.0)
    }

    /// Adds an individual; runs survivor selection when the population is full.
    pub fn add(&mut self, mut ind: Individual) {
        ind.id = self.next_id;
        self.next_id += 1;
        ind.prox.clear();
        for m in &mut self.members {
            let d = ind.distance(m);
            let pos = m.prox.partition_point(|x| x.0 < d);
            m.prox.insert(pos, (d, ind.id));
            ind.prox.push((d, m.id));
        }
        ind.prox
            .sort_by(|a, b| a.0.total_cmp(&b.0).then(a.1.cmp(&b.1)));
        self.members.push(ind);
        let p = self.params();
        if self.members.len() >= p.mu + p.lambda {
            while self.members.len() > p.mu {
                self.remove_worst();
            }
        }
    }

    fn diversity(&self, m: &Individual) -> f64 {
        let k = self.params().close.min(m.prox.len());
        if k == 0 {
            return 0.0;
        }
        m.prox[..k].iter().map(|x| x.0).sum::<f64>() / k as f64
    }

    /// Recomputes the biased fitness of every member.
    pub fn update_fitness(&mut self) {
        let n = self.members.len();
        if n == 0 {
            return;
        }
        let mut by_cost: Vec<usize> = (0..n).collect();
        by_cost.sort_by_key(|&i| (self.members[i].cost, self.members[i].id));
        let div: Vec<f64> = self.members.iter().map(|m| self.diversity(m)).collect();
        let mut by_div: Vec<usize> = (0..n).collect();
        by_div.sort_by(|&a, &b| div[b].total_cmp(&div[a]).then(a.cmp(&b)));
        let mut div_rank = vec![0.0; n];
        for (r, &i) in by_div.iter().enumerate() {
            div_rank[i] = if n > 1 {
                r as f64 / (n - 1) as f64
            } else {
                0.0
            };
        }
        let elite = self.params().elite as f64;
        for (r, &i) in by_cost.iter().enumerate() {
            let fit = if n > 1 {
                r as f64 / (n - 1) as f64
            } else {
                0.0
            };
            self.members[i].biased = fit + (1.0 - elite / n as f64).max(0.0) * div_rank[i];
        }
    }

    fn remove_worst(&mut self) {
        self.update_fitness();
        // Clones first, then the worst biased fitness.
        let mut worst = 0;
        let mut key = (false, f64::MIN);
        for (i, m) in self.members.iter().enumerate() {
            let clone = m.prox.first().is_some_and(|x| x.0 == 0.0);
            let k = (clone, m.biased);
            if k.0 && !key.0 || k.0 == key.0 && k.1 > key.1 {
                key = k;
                worst = i;
            }
        }
        let gone = self.members.swap_remove(worst);
        for m in &mut self.members {
            if let Some(p) = m.prox.iter().position(|x| x.1 == gone.id) {
                m.prox.remove(p);
            }
        }
    }

    /// Binary tournament on biased fitness.
    pub fn select<R: Rng>(&mut self, rng: &mut R) -> &Individual {
        let n = self.members.len();
        let a = rng.random_range(0..n);
        let b = rng.random_range(0..n);
        if self.members[a].biased <= self.members[b].biased {
            &self.members[a]
        } else {
            &self.members[b]
        }
    }
}
