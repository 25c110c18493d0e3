//! Minimum-cost transportation (balancing supplies and demands), behind the
//! [`Transport`] trait.
//!
//! [`SuccessiveShortestPaths`] builds the transportation network (source,
//! supply vertices, demand vertices, sink) and solves it with the
//! successive-shortest-path min-cost flow of the crate `ac-library-rs`
//! (CC0, pinned at 0.2.0, `ac_library::MinCostFlowGraph`).

use ac_library::MinCostFlowGraph;

use super::{PostmanError, COST_LIMIT};
use crate::model::Cost;

/// An amount shipped from supply `from` to demand `to`.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct FlowArc {
    /// Index into the supplies.
    pub from: usize,
    /// Index into the demands.
    pub to: usize,
    /// Units shipped.
    pub amount: Cost,
}

/// A solver of the transportation problem.
pub trait Transport {
    /// Ships every unit of `supply` to `demand` (equal totals) at least total
    /// cost; `cost(i, j)` is the unit cost from supply `i` to demand `j`, or
    /// `None` when `i` cannot ship to `j`. Costs must be non-negative.
    ///
    /// # Errors
    /// [`PostmanError::Solver`] when supplies and demands do not balance, an arc refers to a
    /// missing node, or the demands cannot be met.
    fn min_cost_transport(
        &self,
        supply: &[Cost],
        demand: &[Cost],
        cost: &dyn Fn(usize, usize) -> Option<Cost>,
    ) -> Result<Vec<FlowArc>, PostmanError>;
}

/// Successive shortest paths (crate `ac-library-rs` 0.2.0).
#[derive(Clone, Copy, Debug, Default)]
pub struct SuccessiveShortestPaths;

impl Transport for SuccessiveShortestPaths {
    fn min_cost_transport(
        &self,
        supply: &[Cost],
        demand: &[Cost],
        cost: &dyn Fn(usize, usize) -> Option<Cost>,
    ) -> Result<Vec<FlowArc>, PostmanError> {
        let total: Cost = supply.iter().sum();
        if total != demand.iter().sum::<Cost>() || supply.iter().chain(demand).any(|&x| x < 0) {
            return Err(PostmanError::Solver(
                "supplies and demands must be non-negative with equal totals".into(),
            ));
        }
        let (a, b) = (supply.len(), demand.len());
        let (s, t) = (a + b, a + b + 1);
        let mut g = MinCostFlowGraph::<Cost>::new(a + b + 2);
        for (i, &x) in supply.iter().enumerate() {
            g.add_edge(s, i, x, 0);
        }
        for (j, &x) in demand.iter().enumerate() {
            g.add_edge(a + j, t, x, 0);
        }
        let mut arcs = Vec::new();
        for i in 0..a {
            for j in 0..b {
                if let Some(c) = cost(i, j) {
                    if !(0..=COST_LIMIT).contains(&c) {
                        return Err(PostmanError::Solver(format!(
                            "transport cost {c} out of range for ({i}, {j})"
                        )));
                    }
                    arcs.push((i, j, g.add_edge(i, a + j, total, c)));
                }
            }
        }
        let (shipped, _) = g.flow(s, t, total);
        if shipped != total {
            return Err(PostmanError::Solver(format!(
                "only {shipped} of {total} units can be shipped"
            )));
        }
        Ok(arcs
            .into_iter()
            .filter_map(|(i, j, e)| {
                let f = g.get_edge(e).flow;
                (f > 0).then_some(FlowArc {
                    from: i,
                    to: j,
                    amount: f,
                })
            })
            .collect())
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn small_transport() {
        // Two sources (2, 1), two sinks (1, 2); crossing is cheap.
        let c = [[5, 1], [1, 5]];
        let arcs = SuccessiveShortestPaths
            .min_cost_transport(&[2, 1], &[1, 2], &|i, j| Some(c[i][j]))
            .unwrap();
        let total: Cost = arcs.iter().map(|f| f.amount * c[f.from][f.to]).sum();
        // Best: 0->1 two units (2), 1->0 one unit (1).
        assert_eq!(total, 3);
        assert!(SuccessiveShortestPaths
            .min_cost_transport(&[1], &[1], &|_, _| None)
            .is_err());
    }
}
