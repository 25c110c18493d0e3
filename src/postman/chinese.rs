//! Exact Chinese postman tours.
//!
//! - Undirected (Edmonds & Johnson 1973, "Matching, Euler tours and the
//!   Chinese postman", Math. Programming 5): pair the odd-degree vertices by a
//!   minimum-cost perfect matching on shortest-path distances, drive each
//!   pairing path a second time, and take an Euler tour.
//! - Directed (Edmonds & Johnson 1973; Beltrami & Bodin 1974): ship each
//!   vertex's surplus of in-arcs to the vertices with a surplus of out-arcs
//!   by a min-cost transportation on shortest-path distances, repeat the
//!   shipping paths, and take a directed Euler tour.

use rayon::prelude::*;

use super::euler::{euler_tour, euler_tour_directed, first_unreached};
use super::{
    DenseBlossom, Multigraph, PerfectMatching, PostmanError, SuccessiveShortestPaths, Transport,
    Traversal,
};
use crate::model::Cost;

/// A postman tour of a multigraph.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct PostmanTour {
    /// Total cost of the tour: `link_cost + extra_cost`.
    pub cost: Cost,
    /// Sum of the costs of all edges (each is driven at least once).
    pub link_cost: Cost,
    /// Cost of the repeated edges (the pairing or shipping paths).
    pub extra_cost: Cost,
    /// Indices of edges driven again, one entry per extra traversal.
    pub added: Vec<usize>,
    /// The tour, edge by edge, from the start vertex back to it. Each edge of
    /// the graph appears once plus once per entry in `added`.
    pub tour: Vec<Traversal>,
}

/// Exact undirected Chinese postman tour from `start` with the default
/// matching solver ([`DenseBlossom`]).
///
/// # Errors
/// As [`undirected_postman_with`].
pub fn undirected_postman(g: &Multigraph, start: usize) -> Result<PostmanTour, PostmanError> {
    undirected_postman_with(g, start, &DenseBlossom)
}

fn prepare(g: &Multigraph, start: usize) -> Result<(), PostmanError> {
    g.validate()?;
    if start >= g.n {
        return Err(PostmanError::StartOutOfRange { start, n: g.n });
    }
    Ok(())
}

/// Shortest-path cost rows from each of `from` to each of `to`.
pub(crate) fn distance_rows(
    g: &Multigraph,
    from: &[usize],
    to: &[usize],
    directed: bool,
) -> Vec<Vec<Cost>> {
    let (start, adj) = g.adjacency(directed);
    from.par_iter()
        .map(|&s| {
            let (d, _) = g.dijkstra_with(&start, &adj, &[s]);
            to.iter().map(|&t| d[t]).collect()
        })
        .collect()
}

/// Builds the augmented graph (original edges then copies, ids = original
/// edge indices), runs the Euler tour and maps it back onto `g`.
fn finish(
    g: &Multigraph,
    start: usize,
    added: Vec<usize>,
    directed: bool,
) -> Result<PostmanTour, PostmanError> {
    let mut aug = Multigraph::new(g.n);
    for (i, e) in g.edges.iter().enumerate() {
        aug.add_with_id(e.u, e.v, e.cost, i);
    }
    for &i in &added {
        let e = g.edges[i];
        aug.add_with_id(e.u, e.v, e.cost, i);
    }
    let t = if directed {
        euler_tour_directed(&aug, start)?
    } else {
        euler_tour(&aug, start)?
    };
    let tour = t
        .into_iter()
        .map(|t| Traversal {
            edge: t.id,
            id: g.edges[t.id].id,
            from: t.from,
            to: t.to,
        })
        .collect();
    let link_cost = g.total_cost();
    let extra_cost = added.iter().map(|&i| g.edges[i].cost).sum();
    Ok(PostmanTour {
        cost: link_cost + extra_cost,
        link_cost,
        extra_cost,
        added,
        tour,
    })
}

/// Exact undirected Chinese postman tour from `start`, with a chosen
/// matching solver.
///
/// # Errors
/// [`PostmanError::Disconnected`] when the edges are not connected
/// (or `start` is not on them); range and cost errors from validation. A
/// graph with no odd vertex gets its Euler tour; a graph without edges the
/// empty tour.
pub fn undirected_postman_with(
    g: &Multigraph,
    start: usize,
    matcher: &dyn PerfectMatching,
) -> Result<PostmanTour, PostmanError> {
    prepare(g, start)?;
    if g.edges.is_empty() {
        return finish(g, start, Vec::new(), false);
    }
    if let Some(vertex) = first_unreached(g, start, false) {
        return Err(PostmanError::Disconnected { start, vertex });
    }
    let odd = g.odd_vertices();
    let rows = distance_rows(g, &odd, &odd, false);
    let mate = matcher.min_cost_perfect_matching(odd.len(), &|i, j| rows[i][j])?;
    let pairs: Vec<(usize, usize)> = (0..odd.len())
        .filter(|&i| i < mate[i])
        .map(|i| (odd[i], odd[mate[i]]))
        .collect();
    let added = paths_between(g, &pairs, false).concat();
    finish(g, start, added, false)
}

/// Edge indices of a shortest path for each pair `(from, to)`.
pub(crate) fn paths_between(
    g: &Multigraph,
    pairs: &[(usize, usize)],
    directed: bool,
) -> Vec<Vec<usize>> {
    let (start, adj) = g.adjacency(directed);
    pairs
        .par_iter()
        .map(|&(a, b)| {
            let (_, pred) = g.dijkstra_with(&start, &adj, &[a]);
            g.path_to(&pred, b).into_iter().map(|(e, _)| e).collect()
        })
        .collect()
}

/// Exact directed Chinese postman tour from `start` (edges read as arcs
/// `u -> v`), with the default transportation solver.
///
/// # Errors
/// As [`directed_postman_with`].
pub fn directed_postman(g: &Multigraph, start: usize) -> Result<PostmanTour, PostmanError> {
    directed_postman_with(g, start, &SuccessiveShortestPaths)
}

/// Exact directed Chinese postman tour from `start` with a chosen
/// transportation solver.
///
/// # Errors
/// [`PostmanError::NotStronglyConnected`] when some arc end cannot
/// be reached from `start` or cannot reach it.
pub fn directed_postman_with(
    g: &Multigraph,
    start: usize,
    solver: &dyn Transport,
) -> Result<PostmanTour, PostmanError> {
    prepare(g, start)?;
    if g.edges.is_empty() {
        return finish(g, start, Vec::new(), true);
    }
    if let Some(vertex) = first_unreached(g, start, true) {
        return Err(PostmanError::NotStronglyConnected { start, vertex });
    }
    let (ind, outd) = g.in_out_degrees();
    // More arcs in than out: extra paths must leave; more out: extra paths arrive.
    let src: Vec<usize> = (0..g.n).filter(|&v| ind[v] > outd[v]).collect();
    let dst: Vec<usize> = (0..g.n).filter(|&v| outd[v] > ind[v]).collect();
    let supply: Vec<Cost> = src.iter().map(|&v| (ind[v] - outd[v]) as Cost).collect();
    let demand: Vec<Cost> = dst.iter().map(|&v| (outd[v] - ind[v]) as Cost).collect();
    let rows = distance_rows(g, &src, &dst, true);
    let ship = solver.min_cost_transport(&supply, &demand, &|i, j| Some(rows[i][j]))?;
    let pairs: Vec<(usize, usize)> = ship.iter().map(|f| (src[f.from], dst[f.to])).collect();
    let paths = paths_between(g, &pairs, true);
    let mut added = Vec::new();
    for (f, p) in ship.iter().zip(paths) {
        for _ in 0..f.amount {
            added.extend_from_slice(&p);
        }
    }
    finish(g, start, added, true)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::postman::euler::check_tour;

    #[test]
    fn undirected_errors_and_empty_graphs() {
        let mut g = Multigraph::new(4);
        assert_eq!(undirected_postman(&g, 3).unwrap().cost, 0);
        g.add(0, 1, 2);
        g.add(2, 3, 2);
        assert!(matches!(
            undirected_postman(&g, 0),
            Err(PostmanError::Disconnected { .. })
        ));
        g.add(1, 2, 1);
        // Path 0-1-2-3: odd ends 0 and 3, distance 5.
        assert_eq!(undirected_postman(&g, 0).unwrap().cost, 10);
        // Start off the edges.
        let mut h = g.clone();
        h.n = 5;
        assert!(matches!(
            undirected_postman(&h, 4),
            Err(PostmanError::Disconnected { .. })
        ));
        h.add(0, 9, 1);
        assert!(matches!(
            undirected_postman(&h, 0),
            Err(PostmanError::VertexOutOfRange { .. })
        ));
    }

    #[test]
    fn directed_triangle_with_chord() {
        // Cycle 0->1->2->0 (cost 1 each) plus chord 0->2 (cost 5): vertex 2
        // has one arc in too many, so 2->0 (cost 1) is repeated.
        let mut g = Multigraph::new(3);
        g.add(0, 1, 1);
        g.add(1, 2, 1);
        g.add(2, 0, 1);
        g.add(0, 2, 5);
        let t = directed_postman(&g, 0).unwrap();
        assert_eq!(t.cost, 9);
        assert_eq!(t.added, vec![2]);
        let mut aug = g.clone();
        aug.edges.push(g.edges[2]);
        let tour: Vec<Traversal> = t.tour.clone();
        // Map second use of edge 2 to the copy for the check.
        let mut seen2 = false;
        let tour: Vec<Traversal> = tour
            .into_iter()
            .map(|mut s| {
                if s.edge == 2 {
                    if seen2 {
                        s.edge = 4;
                    }
                    seen2 = true;
                }
                s
            })
            .collect();
        check_tour(&aug, &tour, 0, true, true).unwrap();
        g.add(2, 1, 1);
        let mut h = Multigraph::new(3);
        h.add(0, 1, 1);
        assert!(matches!(
            directed_postman(&h, 0),
            Err(PostmanError::NotStronglyConnected { .. })
        ));
    }
}
