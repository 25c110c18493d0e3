//! Rural postman: a closed walk from the depot that serves every required
//! link (the other links may be deadheaded), and a lower bound on it.
//!
//! The tour follows Frederickson's heuristic (Frederickson 1979,
//! "Approximation algorithms for some postman problems", J. ACM 26): join the
//! connected pieces of the required links (and the depot) by a minimum
//! spanning tree over shortest-path distances between pieces, pair the
//! remaining odd vertices by a minimum-cost perfect matching on shortest-path
//! distances, and take an Euler tour from the depot. The lower bound is the
//! larger of the odd-vertex matching bound and the component-connection
//! bound (see [`crate::bounds`]).

use super::chinese::{distance_rows, paths_between};
use super::euler::euler_tour;
use super::{DenseBlossom, Multigraph, PerfectMatching, PostmanError};
use crate::model::{Cost, Instance};
use crate::plan::Step;

/// The connected pieces of the required links, plus the depot's piece.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Components {
    /// Piece of each junction (`usize::MAX` for junctions touched by no
    /// required link, other than the depot).
    pub of: Vec<usize>,
    /// Number of pieces (the depot's counts even without required links).
    pub count: usize,
}

impl Components {
    /// The junctions of each piece.
    pub fn members(&self) -> Vec<Vec<usize>> {
        let mut m = vec![Vec::new(); self.count];
        for (v, &c) in self.of.iter().enumerate() {
            if c != usize::MAX {
                m[c].push(v);
            }
        }
        m
    }
}

/// Pieces of the required links, read as undirected, and the depot.
pub fn components(inst: &Instance) -> Components {
    let n = inst.network().len();
    let mut parent: Vec<usize> = (0..n).collect();
    fn find(p: &mut [usize], mut x: usize) -> usize {
        while p[x] != x {
            p[x] = p[p[x]];
            x = p[x];
        }
        x
    }
    let mut touched = vec![false; n];
    touched[inst.depot()] = true;
    for t in inst.tasks() {
        touched[t.tail] = true;
        touched[t.head] = true;
        let (a, b) = (find(&mut parent, t.tail), find(&mut parent, t.head));
        parent[a] = b;
    }
    let mut label = vec![usize::MAX; n];
    let mut of = vec![usize::MAX; n];
    let mut count = 0;
    for v in 0..n {
        if touched[v] {
            let r = find(&mut parent, v);
            if label[r] == usize::MAX {
                label[r] = count;
                count += 1;
            }
            of[v] = label[r];
        }
    }
    Components { of, count }
}

/// A minimum spanning tree over the pieces, with the shortest-path distance
/// (in `g`, read as undirected) between two pieces as edge cost. Returns its
/// cost and its edges as `(from piece, vertex reached in the other piece)`.
pub(crate) fn connection_tree(g: &Multigraph, comps: &Components) -> (Cost, Vec<(usize, usize)>) {
    use rayon::prelude::*;
    let k = comps.count;
    if k <= 1 {
        return (0, Vec::new());
    }
    let members = comps.members();
    let (start, adj) = g.adjacency(false);
    // rows[c][c'] = (distance, closest vertex of c') from piece c.
    let rows: Vec<Vec<(Cost, usize)>> = members
        .par_iter()
        .map(|src| {
            let (d, _) = g.dijkstra_with(&start, &adj, src);
            let mut best = vec![(super::graph::FAR, usize::MAX); k];
            for (v, &c) in comps.of.iter().enumerate() {
                if c != usize::MAX && d[v] < best[c].0 {
                    best[c] = (d[v], v);
                }
            }
            best
        })
        .collect();
    // Prim on the complete graph of pieces.
    let mut in_tree = vec![false; k];
    let mut key: Vec<(Cost, usize)> = vec![(super::graph::FAR, usize::MAX); k];
    key[0] = (0, usize::MAX);
    let (mut total, mut edges) = (0, Vec::new());
    for _ in 0..k {
        let c = (0..k)
            .filter(|&c| !in_tree[c])
            .min_by_key(|&c| (key[c].0, c))
            .expect("a piece is left");
        in_tree[c] = true;
        if key[c].1 != usize::MAX {
            total += key[c].0;
            let from = key[c].1;
            edges.push((from, rows[from][c].1));
        }
        for c2 in 0..k {
            // Symmetric distance: the cheaper of the two searches (equal in an
            // undirected graph, kept symmetric for safety).
            let d = rows[c][c2].0.min(rows[c2][c].0);
            if !in_tree[c2] && d < key[c2].0 {
                key[c2] = (d, c);
            }
        }
    }
    (total, edges)
}

/// A rural postman tour of an instance.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct RuralTour {
    /// Service cost plus deadhead cost.
    pub cost: Cost,
    /// Sum of the tasks' service costs.
    pub service_cost: Cost,
    /// Sum of the deadhead costs of the links driven without serving.
    pub deadhead_cost: Cost,
    /// The walk from the depot and back, link by link; every task's link is
    /// served exactly once, in an allowed direction.
    pub steps: Vec<Step>,
}

/// A rural postman tour from the depot with the default matching solver.
///
/// Only for two-way networks whose tasks may be served in either direction
/// ([`PostmanError::Unsupported`] otherwise); an instance without tasks gets
/// the empty tour.
///
/// ```
/// use arcwright::model::{Fleet, Instance, Network};
/// use arcwright::postman::rural::rural_tour;
/// let mut net = Network::with_junctions(4);
/// net.add_edge(0, 1, 5);
/// net.add_required_edge(1, 2, 3, 1);
/// net.add_edge(2, 3, 1);
/// let inst = Instance::new("spur", net, Fleet::with_capacity(10), 0).unwrap();
/// let t = rural_tour(&inst).unwrap();
/// assert_eq!(t.cost, 5 + 3 + 3 + 5); // out, serve, back over 2-1, home
/// ```
///
/// # Errors
/// As [`rural_tour_with`].
pub fn rural_tour(inst: &Instance) -> Result<RuralTour, PostmanError> {
    rural_tour_with(inst, &DenseBlossom)
}

/// A rural postman tour from the depot with a chosen matching solver.
///
/// # Errors
/// [`PostmanError::Unsupported`] unless all links are two-way, without explicit times, and the
/// fleet is one truck without limits; errors of the matching solver.
pub fn rural_tour_with(
    inst: &Instance,
    matcher: &dyn PerfectMatching,
) -> Result<RuralTour, PostmanError> {
    let net = inst.network();
    if net.links.iter().any(|l| l.oneway) || inst.tasks().iter().any(|t| !t.either) {
        return Err(PostmanError::Unsupported(
            "rural tour needs a two-way network with tasks servable in either direction",
        ));
    }
    let g = Multigraph::from_network(net);
    g.validate()?;
    let service_cost = inst.total_service_cost();
    // Deadhead edges (indices into g): tree paths, then matching paths.
    let comps = components(inst);
    let (_, tree) = connection_tree(&g, &comps);
    let members = comps.members();
    let mut dead: Vec<usize> = Vec::new();
    {
        let (start, adj) = g.adjacency(false);
        for &(from, to) in &tree {
            let (_, pred) = g.dijkstra_with(&start, &adj, &members[from]);
            dead.extend(g.path_to(&pred, to).into_iter().map(|(e, _)| e));
        }
    }
    let mut deg = vec![0usize; g.n];
    for t in inst.tasks() {
        deg[t.tail] += 1;
        deg[t.head] += 1;
    }
    for &e in &dead {
        deg[g.edges[e].u] += 1;
        deg[g.edges[e].v] += 1;
    }
    let odd: Vec<usize> = (0..g.n).filter(|&v| deg[v] % 2 == 1).collect();
    let rows = distance_rows(&g, &odd, &odd, false);
    let mate = matcher.min_cost_perfect_matching(odd.len(), &|i, j| rows[i][j])?;
    let pairs: Vec<(usize, usize)> = (0..odd.len())
        .filter(|&i| i < mate[i])
        .map(|i| (odd[i], odd[mate[i]]))
        .collect();
    dead.extend(paths_between(&g, &pairs, false).concat());
    // Augmented graph: served links (id = task index) then deadheads
    // (id = tasks + edge index of g).
    let nt = inst.tasks().len();
    let mut aug = Multigraph::new(g.n);
    for (i, t) in inst.tasks().iter().enumerate() {
        aug.add_with_id(t.tail, t.head, t.cost, i);
    }
    for &e in &dead {
        let ed = g.edges[e];
        aug.add_with_id(ed.u, ed.v, ed.cost, nt + e);
    }
    if aug.edges.is_empty() {
        return Ok(RuralTour {
            cost: 0,
            service_cost: 0,
            deadhead_cost: 0,
            steps: Vec::new(),
        });
    }
    let tour = euler_tour(&aug, inst.depot())?;
    let steps = tour
        .into_iter()
        .map(|s| {
            if s.id < nt {
                Step {
                    link: inst.tasks()[s.id].link,
                    from: s.from,
                    to: s.to,
                    serve: true,
                }
            } else {
                Step {
                    link: g.edges[s.id - nt].id,
                    from: s.from,
                    to: s.to,
                    serve: false,
                }
            }
        })
        .collect();
    let deadhead_cost: Cost = dead.iter().map(|&e| g.edges[e].cost).sum();
    Ok(RuralTour {
        cost: service_cost + deadhead_cost,
        service_cost,
        deadhead_cost,
        steps,
    })
}

/// A lower bound on every closed walk from the depot serving all tasks
/// (capacity ignored): the largest of [`crate::bounds::odd_matching_bound`],
/// [`crate::bounds::connection_bound`] and the single-tour form of
/// [`crate::bounds::depot_cut_bound`] (each cut around the depot with work
/// beyond it is crossed at least twice). Valid for mixed networks too (all
/// three work on the undirected relaxation).
///
/// # Errors
/// As [`rural_tour_with`].
pub fn rural_lower_bound(inst: &Instance) -> Result<Cost, PostmanError> {
    let m = crate::bounds::odd_matching_bound(inst, &DenseBlossom)?;
    Ok(m.max(crate::bounds::connection_bound(inst))
        .max(crate::bounds::depot_cuts(inst, false)))
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::model::{Fleet, Link, Network};

    #[test]
    fn one_way_networks_are_refused_not_guessed() {
        let mut net = Network::with_junctions(2);
        net.add_required_edge(0, 1, 3, 1);
        net.add_link(Link {
            from: 1,
            to: 0,
            oneway: true,
            cost: 1,
            time: None,
            service: None,
            name: None,
            ..Link::default()
        });
        let inst = Instance::new("oneway", net, Fleet::with_capacity(5), 0).unwrap();
        assert!(matches!(
            rural_tour(&inst),
            Err(PostmanError::Unsupported(_))
        ));
        // The bound still applies (undirected relaxation): 3 + 1 back.
        assert_eq!(rural_lower_bound(&inst).unwrap(), 4);
    }

    #[test]
    fn depot_away_from_the_work() {
        // Depot 0 —(4)— 1; required triangle 1-2-3 (costs 1, 1, 1).
        let mut net = Network::with_junctions(4);
        net.add_edge(0, 1, 4);
        net.add_required_edge(1, 2, 1, 1);
        net.add_required_edge(2, 3, 1, 1);
        net.add_required_edge(3, 1, 1, 1);
        let inst = Instance::new("away", net, Fleet::with_capacity(5), 0).unwrap();
        let t = rural_tour(&inst).unwrap();
        assert_eq!(t.cost, 3 + 8);
        // Connection alone gives 3 + 4; the cuts around the depot give the
        // exact 3 + 8 (the 4-cost link is crossed out and back).
        assert_eq!(crate::bounds::connection_bound(&inst), 3 + 4);
        assert_eq!(rural_lower_bound(&inst).unwrap(), 3 + 8);
        assert_eq!(t.steps.first().unwrap().from, 0);
        assert_eq!(t.steps.last().unwrap().to, 0);
        assert_eq!(t.steps.iter().filter(|s| s.serve).count(), 3);
    }
}
