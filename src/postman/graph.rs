//! A plain multigraph (vertex count and edge list) with shortest paths.

use std::cmp::Reverse;
use std::collections::BinaryHeap;

use super::PostmanError;
use crate::model::{Cost, Network};

/// One edge (or arc, when the graph is read as directed: `u -> v`).
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct Edge {
    /// First end (tail when directed).
    pub u: usize,
    /// Second end (head when directed).
    pub v: usize,
    /// Traversal cost (non-negative).
    pub cost: Cost,
    /// The caller's identifier (e.g. the link index of a network).
    pub id: usize,
}

/// One edge driven in a tour.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct Traversal {
    /// Index of the edge in the graph's `edges`.
    pub edge: usize,
    /// The edge's `id`.
    pub id: usize,
    /// Vertex the traversal starts at.
    pub from: usize,
    /// Vertex it ends at.
    pub to: usize,
}

impl Traversal {
    /// Whether the edge is driven from its `u` to its `v` end (for a loop: true).
    pub fn forward(&self, g: &Multigraph) -> bool {
        g.edges[self.edge].u == self.from
    }
}

/// A multigraph: `n` vertices `0..n` and a list of edges (parallel edges and
/// loops allowed). The same value is read as undirected or directed by the
/// functions that use it.
#[derive(Clone, Debug, Default, PartialEq, Eq)]
pub struct Multigraph {
    /// Number of vertices.
    pub n: usize,
    /// The edges.
    pub edges: Vec<Edge>,
}

/// Unreachable distance marker of [`Multigraph::dijkstra`].
pub const FAR: Cost = Cost::MAX / 4;

impl Multigraph {
    /// An edgeless graph on `n` vertices.
    pub fn new(n: usize) -> Self {
        Multigraph {
            n,
            edges: Vec::new(),
        }
    }

    /// Adds an edge whose id is its index; returns the index.
    pub fn add(&mut self, u: usize, v: usize, cost: Cost) -> usize {
        let id = self.edges.len();
        self.add_with_id(u, v, cost, id)
    }

    /// Adds an edge with a given id; returns its index.
    pub fn add_with_id(&mut self, u: usize, v: usize, cost: Cost, id: usize) -> usize {
        self.edges.push(Edge { u, v, cost, id });
        self.edges.len() - 1
    }

    /// Every link of a network as an edge `(from, to, deadhead cost, link index)`.
    /// One-way links keep their orientation in `u -> v`; whether the graph is
    /// then read as directed is the caller's choice.
    pub fn from_network(net: &Network) -> Self {
        let mut g = Multigraph::new(net.junctions.len());
        for (i, l) in net.links.iter().enumerate() {
            g.add_with_id(l.from, l.to, l.cost, i);
        }
        g
    }

    /// Checks vertex ranges and costs.
    ///
    /// # Errors
    /// [`PostmanError::VertexOutOfRange`], [`PostmanError::NegativeCost`] or
    /// [`PostmanError::CostTooLarge`] for the first bad edge.
    pub fn validate(&self) -> Result<(), PostmanError> {
        for (i, e) in self.edges.iter().enumerate() {
            for x in [e.u, e.v] {
                if x >= self.n {
                    return Err(PostmanError::VertexOutOfRange {
                        edge: i,
                        vertex: x,
                        n: self.n,
                    });
                }
            }
            if e.cost < 0 {
                return Err(PostmanError::NegativeCost {
                    edge: i,
                    cost: e.cost,
                });
            }
            if e.cost > super::COST_LIMIT {
                return Err(PostmanError::CostTooLarge {
                    value: e.cost,
                    limit: super::COST_LIMIT,
                });
            }
        }
        Ok(())
    }

    /// Sum of all edge costs.
    pub fn total_cost(&self) -> Cost {
        self.edges.iter().map(|e| e.cost).sum()
    }

    /// Undirected degree of every vertex (a loop counts twice).
    pub fn degrees(&self) -> Vec<usize> {
        let mut d = vec![0; self.n];
        for e in &self.edges {
            d[e.u] += 1;
            d[e.v] += 1;
        }
        d
    }

    /// Vertices of odd undirected degree, in increasing order.
    pub fn odd_vertices(&self) -> Vec<usize> {
        self.degrees()
            .iter()
            .enumerate()
            .filter(|(_, &d)| d % 2 == 1)
            .map(|(v, _)| v)
            .collect()
    }

    /// `(in-degree, out-degree)` of every vertex, reading edges as arcs `u -> v`.
    pub fn in_out_degrees(&self) -> (Vec<usize>, Vec<usize>) {
        let mut i = vec![0; self.n];
        let mut o = vec![0; self.n];
        for e in &self.edges {
            o[e.u] += 1;
            i[e.v] += 1;
        }
        (i, o)
    }

    /// Compact adjacency: for each vertex, the `(edge index, other end)` pairs.
    /// Undirected: both ends list the edge (a loop is listed twice at its vertex).
    pub(crate) fn adjacency(&self, directed: bool) -> (Vec<usize>, Vec<(usize, usize)>) {
        let mut start = vec![0usize; self.n + 1];
        for e in &self.edges {
            start[e.u + 1] += 1;
            if !directed {
                start[e.v + 1] += 1;
            }
        }
        for v in 0..self.n {
            start[v + 1] += start[v];
        }
        let mut fill = start.clone();
        let mut adj = vec![(0, 0); start[self.n]];
        for (i, e) in self.edges.iter().enumerate() {
            adj[fill[e.u]] = (i, e.v);
            fill[e.u] += 1;
            if !directed {
                adj[fill[e.v]] = (i, e.u);
                fill[e.v] += 1;
            }
        }
        (start, adj)
    }

    /// Vertices reachable from `s` (undirected, or along arcs when `directed`;
    /// `reverse` follows arcs backwards).
    pub(crate) fn reach(&self, s: usize, directed: bool, reverse: bool) -> Vec<bool> {
        let g;
        let src = if reverse {
            g = Multigraph {
                n: self.n,
                edges: self
                    .edges
                    .iter()
                    .map(|e| Edge {
                        u: e.v,
                        v: e.u,
                        ..*e
                    })
                    .collect(),
            };
            &g
        } else {
            self
        };
        let (start, adj) = src.adjacency(directed);
        let mut seen = vec![false; self.n];
        let mut stack = vec![s];
        seen[s] = true;
        while let Some(v) = stack.pop() {
            for &(_, w) in &adj[start[v]..start[v + 1]] {
                if !seen[w] {
                    seen[w] = true;
                    stack.push(w);
                }
            }
        }
        seen
    }

    /// Shortest-path costs from `sources` (all at distance 0) and the edge
    /// used to reach each vertex (`usize::MAX` for sources and unreached
    /// vertices). Unreached vertices get [`FAR`].
    pub fn dijkstra(&self, sources: &[usize], directed: bool) -> (Vec<Cost>, Vec<usize>) {
        let (start, adj) = self.adjacency(directed);
        self.dijkstra_with(&start, &adj, sources)
    }

    pub(crate) fn dijkstra_with(
        &self,
        start: &[usize],
        adj: &[(usize, usize)],
        sources: &[usize],
    ) -> (Vec<Cost>, Vec<usize>) {
        let mut dist = vec![FAR; self.n];
        let mut pred = vec![usize::MAX; self.n];
        let mut heap = BinaryHeap::new();
        for &s in sources {
            dist[s] = 0;
            heap.push(Reverse((0, s)));
        }
        while let Some(Reverse((d, v))) = heap.pop() {
            if d != dist[v] {
                continue;
            }
            for &(e, w) in &adj[start[v]..start[v + 1]] {
                let nd = d + self.edges[e].cost;
                if nd < dist[w] {
                    dist[w] = nd;
                    pred[w] = e;
                    heap.push(Reverse((nd, w)));
                }
            }
        }
        (dist, pred)
    }

    /// Follows `pred` (from [`Multigraph::dijkstra`]) back from `t` to a
    /// source: the edge indices of the path, in driving order, with the
    /// vertex each one starts at.
    pub fn path_to(&self, pred: &[usize], t: usize) -> Vec<(usize, usize)> {
        let mut out = Vec::new();
        let mut w = t;
        while pred[w] != usize::MAX {
            let e = &self.edges[pred[w]];
            let from = if e.v == w { e.u } else { e.v };
            out.push((pred[w], from));
            w = from;
        }
        out.reverse();
        out
    }
}
