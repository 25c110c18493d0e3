//! Minimum cuts in an undirected graph with non-negative real weights:
//! Dinic's maximum flow and Gusfield's (1990, SIAM J. Comput. 19) Gomory–Hu
//! cut tree (Gomory & Hu 1961).
//!
//! Floating point is fine here: separation only proposes junction sets; each
//! cut's right-hand side is computed exactly and the bound is made sound from
//! the duals ([`super::rounding`]). Cost: `n − 1` maximum flows, each
//! `O(n² m)` in the worst case and far less on street networks.

/// Residual capacities below this are treated as zero.
const EPS: f64 = 1e-9;

/// An undirected graph prepared for repeated maximum flows.
pub struct FlowGraph {
    n: usize,
    /// Arc `2i` is edge `i` forward, `2i + 1` backward; both hold the weight.
    to: Vec<u32>,
    weight: Vec<f64>,
    cap: Vec<f64>,
    adj: Vec<Vec<u32>>,
    level: Vec<i32>,
    iter: Vec<usize>,
}

impl FlowGraph {
    /// A graph on `n` vertices with the undirected edges `(u, v, weight)`.
    pub fn new(n: usize, edges: &[(usize, usize, f64)]) -> FlowGraph {
        let mut g = FlowGraph {
            n,
            to: Vec::with_capacity(2 * edges.len()),
            weight: Vec::with_capacity(2 * edges.len()),
            cap: Vec::new(),
            adj: vec![Vec::new(); n],
            level: vec![0; n],
            iter: vec![0; n],
        };
        for &(u, v, w) in edges {
            if u == v || w <= EPS {
                continue;
            }
            let a = g.to.len() as u32;
            g.to.push(v as u32);
            g.weight.push(w);
            g.adj[u].push(a);
            g.to.push(u as u32);
            g.weight.push(w);
            g.adj[v].push(a + 1);
        }
        g
    }

    /// Maximum flow from `s` to `t`, and the source side of a minimum cut
    /// (the vertices reachable from `s` in the residual graph).
    pub fn min_cut(&mut self, s: usize, t: usize) -> (f64, Vec<bool>) {
        self.cap.clone_from(&self.weight);
        let mut flow = 0.0;
        while self.bfs(s, t) {
            self.iter.iter_mut().for_each(|i| *i = 0);
            loop {
                let f = self.dfs(s, t, f64::INFINITY);
                if f <= EPS {
                    break;
                }
                flow += f;
            }
        }
        let side: Vec<bool> = self.level.iter().map(|&l| l >= 0).collect();
        (flow, side)
    }

    /// Levels from `s` over residual arcs; true when `t` is reached.
    fn bfs(&mut self, s: usize, t: usize) -> bool {
        self.level.iter_mut().for_each(|l| *l = -1);
        let mut queue = std::collections::VecDeque::from([s]);
        self.level[s] = 0;
        while let Some(v) = queue.pop_front() {
            for &a in &self.adj[v] {
                let w = self.to[a as usize] as usize;
                if self.cap[a as usize] > EPS && self.level[w] < 0 {
                    self.level[w] = self.level[v] + 1;
                    queue.push_back(w);
                }
            }
        }
        self.level[t] >= 0
    }

    /// One augmenting path in the level graph (recursion depth at most the
    /// number of levels).
    fn dfs(&mut self, v: usize, t: usize, limit: f64) -> f64 {
        if v == t {
            return limit;
        }
        while self.iter[v] < self.adj[v].len() {
            let a = self.adj[v][self.iter[v]] as usize;
            let w = self.to[a] as usize;
            if self.cap[a] > EPS && self.level[w] == self.level[v] + 1 {
                let f = self.dfs(w, t, limit.min(self.cap[a]));
                if f > EPS {
                    self.cap[a] -= f;
                    self.cap[a ^ 1] += f;
                    return f;
                }
            }
            self.iter[v] += 1;
        }
        0.0
    }

    /// Number of vertices.
    #[allow(clippy::len_without_is_empty)]
    pub fn len(&self) -> usize {
        self.n
    }
}

/// A Gomory–Hu cut tree: vertex `i > 0` hangs below `parent[i]` with edge
/// weight `weight[i]`, and the vertices of the subtree of `i` form a minimum
/// cut between `i` and `parent[i]` of that weight. Vertex 0 is the root.
pub struct CutTree {
    /// Parent of each vertex (`parent[0] = 0`).
    pub parent: Vec<usize>,
    /// Weight of the edge to the parent (`weight[0]` unused). Separation
    /// re-evaluates each subtree's cut exactly, so only the tests read it.
    #[allow(dead_code)]
    pub weight: Vec<f64>,
}

impl CutTree {
    /// Gusfield's algorithm: `n − 1` minimum cuts on the graph itself.
    pub fn new(g: &mut FlowGraph) -> CutTree {
        let n = g.len();
        let mut parent = vec![0usize; n];
        let mut weight = vec![0.0; n];
        for s in 1..n {
            let t = parent[s];
            let (f, side) = g.min_cut(s, t);
            weight[s] = f;
            for j in 0..n {
                if j != s && side[j] && parent[j] == t {
                    parent[j] = s;
                }
            }
            if side[parent[t]] {
                parent[s] = parent[t];
                parent[t] = s;
                weight[s] = weight[t];
                weight[t] = f;
            }
        }
        CutTree { parent, weight }
    }

    /// The members of each vertex's subtree (the root's is everything), as
    /// lists; `O(n · depth)`.
    pub fn subtrees(&self) -> Vec<Vec<usize>> {
        let n = self.parent.len();
        let mut out: Vec<Vec<usize>> = vec![Vec::new(); n];
        for v in 0..n {
            let mut u = v;
            let mut guard = 0;
            loop {
                out[u].push(v);
                if u == 0 || guard > n {
                    break;
                }
                u = self.parent[u];
                guard += 1;
            }
        }
        out
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn brute_min_cut(n: usize, edges: &[(usize, usize, f64)], s: usize, t: usize) -> f64 {
        let mut best = f64::INFINITY;
        for mask in 0u32..(1 << n) {
            if mask & (1 << s) == 0 || mask & (1 << t) != 0 {
                continue;
            }
            let w: f64 = edges
                .iter()
                .filter(|&&(u, v, _)| ((mask >> u) & 1) != ((mask >> v) & 1))
                .map(|e| e.2)
                .sum();
            best = best.min(w);
        }
        best
    }

    /// Every tree edge's subtree is a cut of the tree edge's weight, and the
    /// weight is the brute-force minimum cut between its ends; the minimum
    /// over the tree path equals the brute-force minimum cut for every pair.
    #[test]
    fn cut_tree_matches_brute_force() {
        let mut seed = 0x9E37_79B9_7F4A_7C15u64;
        let mut rnd = move || {
            seed ^= seed << 13;
            seed ^= seed >> 7;
            seed ^= seed << 17;
            seed
        };
        for _ in 0..60 {
            let n = 2 + (rnd() % 8) as usize;
            let m = (rnd() % 16) as usize;
            let edges: Vec<(usize, usize, f64)> = (0..m)
                .map(|_| {
                    let u = (rnd() % n as u64) as usize;
                    let v = (rnd() % n as u64) as usize;
                    (u, v, (rnd() % 5) as f64 * 0.25)
                })
                .collect();
            let mut g = FlowGraph::new(n, &edges);
            let tree = CutTree::new(&mut g);
            let subs = tree.subtrees();
            for v in 1..n {
                let p = tree.parent[v];
                let want = brute_min_cut(n, &edges, v, p);
                assert!((tree.weight[v] - want).abs() < 1e-9);
                let inside: Vec<bool> = (0..n).map(|u| subs[v].contains(&u)).collect();
                assert!(inside[v] && !inside[p]);
                let w: f64 = edges
                    .iter()
                    .filter(|&&(a, b, _)| inside[a] != inside[b])
                    .map(|e| e.2)
                    .sum();
                assert!((w - want).abs() < 1e-9, "subtree of {v} is not a min cut");
            }
        }
    }
}
