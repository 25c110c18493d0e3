//! Postman tours: Euler tours, Chinese and rural postman.
//!
//! The functions here work on a small multigraph of our own, [`Multigraph`]
//! (a vertex count and a list of edges `(u, v, cost, id)`), so the same code
//! serves the model's [`Network`](crate::model::Network) and the augmented
//! graphs built while solving:
//!
//! - [`euler`]: Eulerian tests and Euler tours by Hierholzer's algorithm
//!   (iterative, linear time);
//! - [`matching`] and [`flow`]: the two exact sub-solvers, each behind a
//!   trait of ours ([`PerfectMatching`], [`Transport`]);
//! - [`chinese`]: exact undirected (Edmonds & Johnson 1973) and directed
//!   Chinese postman tours;
//! - [`rural`]: a rural postman tour from the depot (Frederickson 1979 style)
//!   and its lower bound.
//!
//! ```
//! use arcwright::postman::{chinese::undirected_postman, Multigraph};
//! // A path 0-1-2 of costs 3 and 4: the postman drives it there and back.
//! let mut g = Multigraph::new(3);
//! g.add(0, 1, 3);
//! g.add(1, 2, 4);
//! let t = undirected_postman(&g, 0).unwrap();
//! assert_eq!(t.cost, 14);
//! assert_eq!(t.tour.len(), 4);
//! ```

pub mod chinese;
pub mod euler;
pub mod flow;
pub mod graph;
pub mod matching;
pub mod rural;

pub use chinese::PostmanTour;
pub use flow::{FlowArc, SuccessiveShortestPaths, Transport};
pub use graph::{Edge, Multigraph, Traversal};
pub use matching::{DenseBlossom, PerfectMatching};

use crate::model::Cost;

/// Why a postman tour or Euler tour could not be built.
#[derive(Clone, Debug, PartialEq, Eq, thiserror::Error)]
#[non_exhaustive]
pub enum PostmanError {
    /// The edges do not form one connected piece (or the start vertex is not on it).
    #[error("the links are not connected: vertex {vertex} cannot be reached from vertex {start}")]
    Disconnected {
        /// The start vertex.
        start: usize,
        /// The vertex as the problem names it.
        vertex: usize,
    },
    /// Directed: some vertex cannot be reached, or cannot reach back.
    #[error("the arcs are not strongly connected: vertex {vertex} and vertex {start} are not mutually reachable")]
    NotStronglyConnected {
        /// The start vertex.
        start: usize,
        /// The vertex as the problem names it.
        vertex: usize,
    },
    /// Undirected Euler tour asked for, but some vertices have odd degree.
    #[error("not Eulerian: {odd} vertices have odd degree (first: {first})")]
    OddDegree {
        /// The number of odd-degree vertices.
        odd: usize,
        /// The first odd-degree vertex.
        first: usize,
    },
    /// Directed Euler tour asked for, but some vertex has in-degree != out-degree.
    #[error("not Eulerian: vertex {vertex} has in-degree {indeg} and out-degree {outdeg}")]
    Unbalanced {
        /// The vertex as the problem names it.
        vertex: usize,
        /// Its in-degree.
        indeg: usize,
        /// Its out-degree.
        outdeg: usize,
    },
    /// A vertex or edge end is out of range.
    #[error("edge {edge} refers to vertex {vertex}, but the graph has {n}")]
    VertexOutOfRange {
        /// The edge index.
        edge: usize,
        /// The vertex as the problem names it.
        vertex: usize,
        /// The number of vertices.
        n: usize,
    },
    /// The start vertex is out of range.
    #[error("start vertex {start} is out of range (the graph has {n})")]
    StartOutOfRange {
        /// The start vertex.
        start: usize,
        /// The number of vertices.
        n: usize,
    },
    /// An edge cost is negative.
    #[error("edge {edge} has negative cost {cost}")]
    NegativeCost {
        /// The edge index.
        edge: usize,
        /// The cost found.
        cost: Cost,
    },
    /// Costs too large for exact arithmetic in the sub-solvers.
    #[error("a cost of {value} is too large for the exact sub-solvers (limit {limit})")]
    CostTooLarge {
        /// The value found.
        value: Cost,
        /// The limit.
        limit: Cost,
    },
    /// The instance has features this method does not handle.
    #[error("unsupported: {0}")]
    Unsupported(&'static str),
    /// A sub-solver failed (it reports why).
    #[error("sub-solver: {0}")]
    Solver(String),
}

/// Largest cost accepted by the exact sub-solvers (sums of path costs stay
/// far from `i64` overflow, including the blossom solver's doubled duals).
pub const COST_LIMIT: Cost = 1 << 40;
