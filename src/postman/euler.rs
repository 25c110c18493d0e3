//! Eulerian tests and Euler tours by Hierholzer's algorithm (Hierholzer 1873).
//!
//! The tour builder is iterative (an explicit stack, no recursion) and runs
//! in time linear in the number of edges. Tours are written out edge by edge
//! as [`Traversal`]s (edge index, id and driving direction).

use super::{Multigraph, PostmanError, Traversal};

/// True when every vertex has even degree (undirected reading). Connectivity
/// is not checked: see [`euler_tour`].
pub fn all_degrees_even(g: &Multigraph) -> bool {
    g.degrees().iter().all(|d| d % 2 == 0)
}

/// True when exactly two vertices have odd degree (an open Euler trail
/// exists between them if the edges are connected).
pub fn exactly_two_odd(g: &Multigraph) -> bool {
    g.odd_vertices().len() == 2
}

/// True when every vertex has in-degree equal to out-degree (directed reading).
pub fn balanced(g: &Multigraph) -> bool {
    let (i, o) = g.in_out_degrees();
    i == o
}

/// Undirected: even degrees and all edges in one connected piece.
pub fn is_eulerian(g: &Multigraph) -> bool {
    all_degrees_even(g) && edges_connected(g, false)
}

/// Directed: balanced and all arcs in one strongly connected piece.
pub fn is_eulerian_directed(g: &Multigraph) -> bool {
    balanced(g) && edges_connected(g, true)
}

/// Whether all non-isolated vertices are connected (strongly, when `directed`).
pub(crate) fn edges_connected(g: &Multigraph, directed: bool) -> bool {
    let Some(s) = g.edges.first().map(|e| e.u) else {
        return true;
    };
    first_unreached(g, s, directed).is_none()
}

/// A non-isolated vertex not (strongly) connected with `s`, if any.
pub(crate) fn first_unreached(g: &Multigraph, s: usize, directed: bool) -> Option<usize> {
    let fwd = g.reach(s, directed, false);
    let bwd = if directed {
        g.reach(s, true, true)
    } else {
        Vec::new()
    };
    g.edges
        .iter()
        .flat_map(|e| [e.u, e.v])
        .find(|&x| !fwd[x] || (directed && !bwd[x]))
}

fn check_start(g: &Multigraph, start: usize) -> Result<(), PostmanError> {
    g.validate()?;
    if start >= g.n {
        return Err(PostmanError::StartOutOfRange { start, n: g.n });
    }
    Ok(())
}

/// An Euler tour (closed walk using every edge exactly once) from `start`,
/// reading edges as undirected.
///
/// # Errors
/// [`PostmanError::OddDegree`] when some degree is odd,
/// [`PostmanError::Disconnected`] when the edges are not all connected to
/// `start`. A graph without edges gives the empty tour.
///
/// ```
/// use arcwright::postman::{euler::euler_tour, Multigraph};
/// let mut g = Multigraph::new(3);
/// g.add(0, 1, 1);
/// g.add(1, 2, 1);
/// g.add(2, 0, 1);
/// let t = euler_tour(&g, 1).unwrap();
/// assert_eq!(t.len(), 3);
/// assert_eq!((t[0].from, t[2].to), (1, 1));
/// ```
pub fn euler_tour(g: &Multigraph, start: usize) -> Result<Vec<Traversal>, PostmanError> {
    check_start(g, start)?;
    let odd = g.odd_vertices();
    if let Some(&first) = odd.first() {
        return Err(PostmanError::OddDegree {
            odd: odd.len(),
            first,
        });
    }
    walk(g, start, false)
}

/// An open Euler trail from `start` when exactly two vertices (one of them
/// `start`) have odd degree, or a closed tour when all degrees are even.
///
/// # Errors
/// [`PostmanError::OddDegree`] unless exactly `start` and one other vertex have odd degree (or
/// none), [`PostmanError::Disconnected`] when the edges are not all connected to `start`,
/// [`PostmanError::StartOutOfRange`].
pub fn euler_trail(g: &Multigraph, start: usize) -> Result<Vec<Traversal>, PostmanError> {
    check_start(g, start)?;
    let odd = g.odd_vertices();
    if !(odd.is_empty() || (odd.len() == 2 && odd.contains(&start))) {
        return Err(PostmanError::OddDegree {
            odd: odd.len(),
            first: odd.iter().copied().find(|&v| v != start).unwrap_or(start),
        });
    }
    walk(g, start, false)
}

/// A directed Euler tour from `start` (edges read as arcs `u -> v`).
///
/// # Errors
/// [`PostmanError::Unbalanced`] when some in-degree differs from the
/// out-degree, [`PostmanError::Disconnected`] when some arc cannot be reached
/// from `start`.
pub fn euler_tour_directed(g: &Multigraph, start: usize) -> Result<Vec<Traversal>, PostmanError> {
    check_start(g, start)?;
    let (i, o) = g.in_out_degrees();
    if let Some(v) = (0..g.n).find(|&v| i[v] != o[v]) {
        return Err(PostmanError::Unbalanced {
            vertex: v,
            indeg: i[v],
            outdeg: o[v],
        });
    }
    walk(g, start, true)
}

/// Hierholzer's algorithm with an explicit stack. The caller has checked the
/// degree conditions; this checks that every edge was used.
fn walk(g: &Multigraph, start: usize, directed: bool) -> Result<Vec<Traversal>, PostmanError> {
    let m = g.edges.len();
    if m == 0 {
        return Ok(Vec::new());
    }
    let (adj_start, adj) = g.adjacency(directed);
    let mut next = adj_start.clone();
    let mut used = vec![false; m];
    // Stack of (vertex, edge used to arrive there).
    let mut stack: Vec<(usize, usize)> = vec![(start, usize::MAX)];
    let mut out: Vec<Traversal> = Vec::with_capacity(m);
    while let Some(&(v, _)) = stack.last() {
        let end = adj_start[v + 1];
        while next[v] < end && used[adj[next[v]].0] {
            next[v] += 1;
        }
        if next[v] < end {
            let (e, w) = adj[next[v]];
            next[v] += 1;
            used[e] = true;
            stack.push((w, e));
        } else {
            let (to, e) = stack.pop().expect("stack is not empty");
            if e != usize::MAX {
                let from = stack.last().expect("an arrival has a predecessor").0;
                out.push(Traversal {
                    edge: e,
                    id: g.edges[e].id,
                    from,
                    to,
                });
            }
        }
    }
    if out.len() < m {
        let vertex = used
            .iter()
            .position(|&u| !u)
            .map(|e| g.edges[e].u)
            .unwrap_or(start);
        return Err(PostmanError::Disconnected { start, vertex });
    }
    out.reverse();
    Ok(out)
}

/// Checks that `tour` is a walk that starts and ends at `start` (when
/// `closed`), moves from each traversal's end to the next one's start, uses
/// every edge of `g` exactly once, and drives each edge between its ends
/// (along its direction when `directed`). Returns a description of the first
/// problem found.
///
/// # Errors
/// A message saying which step does not follow the graph, which edge is used twice or not at
/// all, or where the walk ends.
pub fn check_tour(
    g: &Multigraph,
    tour: &[Traversal],
    start: usize,
    closed: bool,
    directed: bool,
) -> Result<(), String> {
    let mut seen = vec![false; g.edges.len()];
    let mut at = start;
    for (k, t) in tour.iter().enumerate() {
        let e = g
            .edges
            .get(t.edge)
            .ok_or(format!("step {k}: no edge {}", t.edge))?;
        if t.from != at {
            return Err(format!(
                "step {k} starts at {} but the walk is at {at}",
                t.from
            ));
        }
        let ok = (e.u == t.from && e.v == t.to) || (!directed && e.v == t.from && e.u == t.to);
        if !ok || e.id != t.id {
            return Err(format!("step {k} does not drive edge {} as given", t.edge));
        }
        if std::mem::replace(&mut seen[t.edge], true) {
            return Err(format!("edge {} used twice", t.edge));
        }
        at = t.to;
    }
    if let Some(e) = seen.iter().position(|&s| !s) {
        return Err(format!("edge {e} not used"));
    }
    if closed && at != start {
        return Err(format!("walk ends at {at}, not at {start}"));
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn figure_eight_with_loop() {
        let mut g = Multigraph::new(5);
        for (u, v) in [(0, 1), (1, 2), (2, 0), (0, 3), (3, 4), (4, 0), (2, 2)] {
            g.add(u, v, 1);
        }
        let t = euler_tour(&g, 0).unwrap();
        check_tour(&g, &t, 0, true, false).unwrap();
        let t = euler_tour_directed(&g, 3).unwrap();
        check_tour(&g, &t, 3, true, true).unwrap();
    }

    #[test]
    fn errors_are_typed() {
        let mut g = Multigraph::new(4);
        g.add(0, 1, 1);
        assert!(matches!(
            euler_tour(&g, 0),
            Err(PostmanError::OddDegree { odd: 2, .. })
        ));
        assert_eq!(euler_trail(&g, 0).unwrap().len(), 1);
        g.add(1, 0, 1);
        g.add(2, 3, 1);
        g.add(3, 2, 1);
        assert!(matches!(
            euler_tour(&g, 0),
            Err(PostmanError::Disconnected { .. })
        ));
        assert!(!is_eulerian(&g));
        assert!(matches!(
            euler_tour(&g, 9),
            Err(PostmanError::StartOutOfRange { .. })
        ));
    }

    #[test]
    fn long_path_does_not_overflow_the_stack() {
        let n = 200_000;
        let mut g = Multigraph::new(n);
        for v in 0..n {
            g.add(v, (v + 1) % n, 1);
        }
        let t = euler_tour_directed(&g, 0).unwrap();
        assert_eq!(t.len(), n);
        check_tour(&g, &t, 0, true, true).unwrap();
    }
}
