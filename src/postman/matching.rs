//! Minimum-cost perfect matching, behind the [`PerfectMatching`] trait.
//!
//! The postman and bound code only see the trait, so a sparse method (for
//! very many odd vertices) can be added later without touching them.
//! [`DenseBlossom`] is Edmonds' blossom algorithm (Edmonds 1965) on the
//! complete graph, as implemented by the crate `integer-blossom` (MIT,
//! pinned at 1.2.1): `O(n³)` time and `O(n²)` memory.

use super::{PostmanError, COST_LIMIT};
use crate::model::Cost;

/// A solver of the minimum-cost perfect matching problem on a complete graph.
pub trait PerfectMatching {
    /// Pairs `0..n` (`n` even) so that the sum of `cost(i, mate[i])` over the
    /// pairs is least. `cost` must be symmetric and non-negative; only
    /// `cost(i, j)` with `i < j` is read. Returns `mate` (`mate[mate[i]] == i`).
    ///
    /// # Errors
    /// [`PostmanError::Solver`] for an odd number of vertices or a negative cost,
    /// [`PostmanError::CostTooLarge`] for a cost beyond [`crate::postman::COST_LIMIT`].
    fn min_cost_perfect_matching(
        &self,
        n: usize,
        cost: &dyn Fn(usize, usize) -> Cost,
    ) -> Result<Vec<usize>, PostmanError>;
}

/// Dense Edmonds blossom (crate `integer-blossom` 1.2.1).
#[derive(Clone, Copy, Debug, Default)]
pub struct DenseBlossom;

impl PerfectMatching for DenseBlossom {
    fn min_cost_perfect_matching(
        &self,
        n: usize,
        cost: &dyn Fn(usize, usize) -> Cost,
    ) -> Result<Vec<usize>, PostmanError> {
        if n % 2 == 1 {
            return Err(PostmanError::Solver(format!(
                "a perfect matching needs an even number of vertices, got {n}"
            )));
        }
        let mut m = vec![0 as Cost; n * n];
        for i in 0..n {
            for j in i + 1..n {
                let c = cost(i, j);
                if !(0..=COST_LIMIT).contains(&c) {
                    return Err(if c < 0 {
                        PostmanError::Solver(format!(
                            "negative matching cost {c} for pair ({i}, {j})"
                        ))
                    } else {
                        PostmanError::CostTooLarge {
                            value: c,
                            limit: COST_LIMIT,
                        }
                    });
                }
                m[i * n + j] = c;
            }
        }
        let mate = integer_blossom::min_weight_perfect_matching(&m, n);
        // Defensive: the result must be a perfect matching.
        if mate.len() != n || (0..n).any(|i| mate[i] >= n || mate[mate[i]] != i || mate[i] == i) {
            return Err(PostmanError::Solver(
                "matching solver returned an invalid matching".into(),
            ));
        }
        Ok(mate)
    }
}

/// Sum of `cost(i, mate[i])` over the pairs `i < mate[i]`.
pub fn matching_cost(mate: &[usize], cost: &dyn Fn(usize, usize) -> Cost) -> Cost {
    (0..mate.len())
        .filter(|&i| i < mate[i])
        .map(|i| cost(i, mate[i]))
        .sum()
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Brute force over all perfect matchings (n ≤ 10).
    fn brute(n: usize, c: &dyn Fn(usize, usize) -> Cost) -> Cost {
        fn rec(free: &mut Vec<usize>, c: &dyn Fn(usize, usize) -> Cost) -> Cost {
            if free.is_empty() {
                return 0;
            }
            let a = free.remove(0);
            let mut best = Cost::MAX;
            for k in 0..free.len() {
                let b = free.remove(k);
                best = best.min(c(a.min(b), a.max(b)) + rec(free, c));
                free.insert(k, b);
            }
            free.insert(0, a);
            best
        }
        rec(&mut (0..n).collect(), c)
    }

    #[test]
    fn agrees_with_brute_force() {
        let mut seed = 7u64;
        let mut rnd = move || {
            seed = seed
                .wrapping_mul(6364136223846793005)
                .wrapping_add(1442695040888963407);
            (seed >> 33) as Cost % 50
        };
        for n in [0, 2, 4, 6, 8, 10] {
            for _ in 0..20 {
                let w: Vec<Cost> = (0..n * n).map(|_| rnd()).collect();
                let c = |i: usize, j: usize| w[i.min(j) * n + i.max(j)];
                let mate = DenseBlossom.min_cost_perfect_matching(n, &c).unwrap();
                assert_eq!(matching_cost(&mate, &c), brute(n, &c));
            }
        }
        assert!(DenseBlossom
            .min_cost_perfect_matching(3, &|_, _| 1)
            .is_err());
        assert!(DenseBlossom
            .min_cost_perfect_matching(2, &|_, _| -1)
            .is_err());
    }
}
