//! Sound rounding: a deadhead bound from any dual vector, in exact integers.
//!
//! Let the rows be valid inequalities `a_i·x ≥ b_i` (integer `a_i`, `b_i`)
//! for the deadhead vector `x*` of some optimal plan, which also satisfies
//! `0 ≤ x* ≤ U` (see [`super::Formulation::upper`]). For any `y ≥ 0`:
//!
//! ```text
//! c·x* ≥ c·x* − y·(A x* − b) = b·y + Σ_e (c − Aᵀy)_e x*_e
//!      ≥ b·y + Σ_e min(0, (c − Aᵀy)_e) · U          (Lagrangian bound)
//! ```
//!
//! The solver's duals are floats and only approximately dual feasible, so
//! they are first truncated to multiples of `2^-SCALE_BITS` (still `≥ 0`):
//! `y_i = Y_i / 2^SCALE_BITS` with integer `Y_i`. Then every term above is
//! an integer divided by `2^SCALE_BITS`, and the value is computed exactly
//! in `i128` with overflow checks. The deadhead cost of a plan is an integer,
//! so the bound is the ceiling of that exact rational (and at least 0, since
//! costs are non-negative). No floating-point result enters the bound: a poor
//! dual vector gives a weaker bound, never a wrong one.

/// Duals are truncated to multiples of `2^-SCALE_BITS`.
pub const SCALE_BITS: u32 = 30;

/// The exact Lagrangian deadhead bound for the rows `(cols, rhs)` (0/1
/// coefficients), the integer column costs, the float duals (negative or
/// non-finite entries taken as 0) and the upper bound `upper` on every
/// variable. `None` when an intermediate value overflows `i128`.
pub fn lagrangian_bound(
    costs: &[i64],
    rows: &[(&[u32], i64)],
    duals: &[f64],
    upper: i64,
) -> Option<i64> {
    let scale = 1i128 << SCALE_BITS;
    // Reduced costs, scaled: c_e·2^S − Σ_{i ∋ e} Y_i.
    let mut red: Vec<i128> = costs
        .iter()
        .map(|&c| (c as i128).checked_mul(scale))
        .collect::<Option<_>>()?;
    let mut total: i128 = 0;
    for ((cols, rhs), &y) in rows.iter().zip(duals) {
        let yi = scaled(y)?;
        if yi == 0 {
            continue;
        }
        total = total.checked_add((*rhs as i128).checked_mul(yi)?)?;
        for &j in cols.iter() {
            let r = red.get_mut(j as usize)?;
            *r = r.checked_sub(yi)?;
        }
    }
    for r in red {
        if r < 0 {
            total = total.checked_add(r.checked_mul(upper as i128)?)?;
        }
    }
    // Ceiling of total / 2^S, at least 0.
    let q = total.div_euclid(scale) + i128::from(total.rem_euclid(scale) != 0);
    i64::try_from(q.max(0)).ok()
}

/// `floor(y · 2^SCALE_BITS)` for finite `y > 0`, else 0; `None` if too large.
fn scaled(y: f64) -> Option<i128> {
    if !y.is_finite() || y <= 0.0 {
        return Some(0);
    }
    let s = (y * (1u64 << SCALE_BITS) as f64).floor();
    // Multiplying by a power of two is exact; floor only lowers the value.
    if s >= 1e36 {
        return None;
    }
    Some(s as i128)
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The LP of the backend test (optimum 3, dual (0, 2, 1)).
    #[test]
    fn exact_dual_gives_the_optimum() {
        let rows: Vec<(&[u32], i64)> = vec![(&[0, 1], 1), (&[1, 2], 1), (&[0, 2], 1)];
        assert_eq!(
            lagrangian_bound(&[1, 2, 3], &rows, &[0.0, 2.0, 1.0], 10),
            Some(3)
        );
    }

    /// A dual slightly too large is penalised through the upper bound, never
    /// rounded up past the optimum.
    #[test]
    fn infeasible_dual_is_penalised() {
        let rows: Vec<(&[u32], i64)> = vec![(&[0, 1], 1), (&[1, 2], 1), (&[0, 2], 1)];
        // y = (0, 2 + 1e-7, 1): column 1 reduced cost −1e-7 (times U = 10),
        // value 3 + 1e-7 − 1e-6 < 3, so the ceiling is 3.
        let b = lagrangian_bound(&[1, 2, 3], &rows, &[0.0, 2.0 + 1e-7, 1.0], 10);
        assert_eq!(b, Some(3));
        // Far too large duals: y = (0, 3, 2) gives 5 − 10 − 10 − 20 < 0 → 0.
        let b = lagrangian_bound(&[1, 2, 3], &rows, &[0.0, 3.0, 2.0], 10);
        assert_eq!(b, Some(0));
        // Negative and NaN duals count as zero.
        let b = lagrangian_bound(&[1, 2, 3], &rows, &[-5.0, f64::NAN, 1.0], 10);
        assert_eq!(b, Some(1));
    }
}
