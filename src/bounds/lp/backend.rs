//! The linear-programming solver behind the bound, behind a small trait.
//!
//! The problem is always `min c·x` subject to `Σ_{j ∈ row} x_j ≥ rhs` for
//! every row and `x ≥ 0`. A backend returns a primal point (used only to
//! separate cuts) and row duals (used only by the sound rounding, which
//! accepts any non-negative vector): neither needs to be exact.
//!
//! The default backend is Clarabel (Goulart & Chen 2024, interior point, pure
//! Rust; crate `clarabel`), which gives duals; each solve starts afresh.

use std::time::Instant;

use clarabel::algebra::CscMatrix;
use clarabel::solver::{
    DefaultSettingsBuilder, DefaultSolver, IPSolver, NonnegativeConeT, SolverStatus,
};

/// A solved point: primal values per column, duals per row, objective.
#[derive(Clone, Debug, Default)]
pub struct LpPoint {
    /// Primal values, one per column.
    pub x: Vec<f64>,
    /// Row duals (non-negative in theory; callers clamp).
    pub duals: Vec<f64>,
    /// Objective value `c·x` as the solver reports it.
    pub objective: f64,
}

/// Why a backend gave no point.
#[derive(Clone, Debug, PartialEq, Eq, thiserror::Error)]
#[error("LP solver: {0}")]
pub struct BackendError(pub String);

/// A linear-programming solver for covering problems with 0/1 rows.
pub trait LpBackend: Send {
    /// Solves `min costs·x` s.t. `Σ_{j ∈ rows[i].0} x_j ≥ rows[i].1`, `x ≥ 0`,
    /// stopping at `deadline` if given.
    ///
    /// # Errors
    ///
    /// When the solver fails or runs out of time without a usable point.
    fn solve(
        &mut self,
        costs: &[f64],
        rows: &[(&[u32], f64)],
        deadline: Option<Instant>,
    ) -> Result<LpPoint, BackendError>;
}

/// The default backend: Clarabel's interior-point method.
#[derive(Clone, Debug, Default)]
pub struct ClarabelBackend;

impl LpBackend for ClarabelBackend {
    fn solve(
        &mut self,
        costs: &[f64],
        rows: &[(&[u32], f64)],
        deadline: Option<Instant>,
    ) -> Result<LpPoint, BackendError> {
        let n = costs.len();
        let m = rows.len();
        // Clarabel form: A x + s = b, s ≥ 0. Row i: −Σ x_j + s = −rhs;
        // then x_j ≥ 0 as −x_j + s = 0.
        let mut per_col: Vec<Vec<usize>> = vec![Vec::new(); n];
        for (i, (cols, _)) in rows.iter().enumerate() {
            for &j in cols.iter() {
                per_col[j as usize].push(i);
            }
        }
        let mut colptr = Vec::with_capacity(n + 1);
        let mut rowval = Vec::new();
        colptr.push(0);
        for (j, rs) in per_col.iter_mut().enumerate() {
            rs.sort_unstable();
            rs.dedup();
            rowval.extend(rs.iter().copied());
            rowval.push(m + j);
            colptr.push(rowval.len());
        }
        let nzval = vec![-1.0; rowval.len()];
        let a = CscMatrix::new(m + n, n, colptr, rowval, nzval);
        let mut b: Vec<f64> = rows.iter().map(|r| -r.1).collect();
        b.extend(std::iter::repeat_n(0.0, n));
        let p = CscMatrix::zeros((n, n));
        let cones = [NonnegativeConeT(m + n)];
        let mut settings = DefaultSettingsBuilder::default();
        settings.verbose(false).max_iter(400);
        if let Some(d) = deadline {
            let left = d.saturating_duration_since(Instant::now()).as_secs_f64();
            settings.time_limit(left.max(0.001));
        }
        let settings = settings.build().map_err(|e| BackendError(e.to_string()))?;
        let mut solver = DefaultSolver::new(&p, costs, &a, &b, &cones, settings)
            .map_err(|e| BackendError(format!("{e:?}")))?;
        solver.solve();
        let sol = &solver.solution;
        match sol.status {
            SolverStatus::Solved
            | SolverStatus::AlmostSolved
            | SolverStatus::MaxIterations
            | SolverStatus::MaxTime => {}
            other => return Err(BackendError(format!("{other:?}"))),
        }
        if sol.x.iter().any(|v| !v.is_finite()) {
            return Err(BackendError(format!("{:?} without a point", sol.status)));
        }
        Ok(LpPoint {
            x: sol.x.clone(),
            duals: sol.z[..m].to_vec(),
            objective: sol.obj_val,
        })
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// min x0 + 2 x1 + 3 x2 s.t. x0 + x1 ≥ 1, x1 + x2 ≥ 1, x0 + x2 ≥ 1.
    /// By hand: x = (1, 1, 0) costs 3, and the dual point y = (0, 2, 1)
    /// (column sums 1 ≤ 1, 2 ≤ 2, 3 ≤ 3) proves 3 optimal.
    #[test]
    fn small_covering_lp() {
        let rows: Vec<(&[u32], f64)> = vec![(&[0, 1], 1.0), (&[1, 2], 1.0), (&[0, 2], 1.0)];
        let p = ClarabelBackend
            .solve(&[1.0, 2.0, 3.0], &rows, None)
            .unwrap();
        assert!((p.objective - 3.0).abs() < 1e-6, "{}", p.objective);
        let dual: f64 = p.duals.iter().sum();
        assert!((dual - 3.0).abs() < 1e-6);
    }
}
