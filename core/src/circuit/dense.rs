//! A small dense linear system on the stack: LU with partial pivoting.
//!
//! The loops index rows and columns as the textbook algorithms write them.
#![allow(clippy::needless_range_loop)]

/// The most unknowns a netlist may have (node voltages plus voltage-source
/// currents); a one-transistor stage has fewer than ten.
pub const MAX_UNKNOWNS: usize = 16;

/// A square system `A·x = b` of `n` unknowns on fixed-size buffers.
#[derive(Debug, Clone, Copy)]
pub(crate) struct Dense {
    pub(crate) n: usize,
    pub(crate) a: [[f64; MAX_UNKNOWNS]; MAX_UNKNOWNS],
    pub(crate) b: [f64; MAX_UNKNOWNS],
}

impl Dense {
    /// A zero system of `n` unknowns (`n` ≤ [`MAX_UNKNOWNS`]).
    pub(crate) fn new(n: usize) -> Dense {
        Dense {
            n,
            a: [[0.0; MAX_UNKNOWNS]; MAX_UNKNOWNS],
            b: [0.0; MAX_UNKNOWNS],
        }
    }

    /// Solves the system: LU with partial pivoting (Golub & Van Loan,
    /// *Matrix Computations*, §3.4), then `steps` steps of iterative refinement
    /// with the residual b − A·x summed in double-double arithmetic
    /// (Golub & Van Loan §3.5.3; the error-free products and sums of
    /// Ogita, Rump & Oishi, SIAM J. Sci. Comput. 26, 2005). The refinement
    /// matters here: node voltages near a rail, through a few ohms beside
    /// megohms, are resolved to about ε·|V| instead of ε·cond·|V|, so that
    /// a junction voltage, a difference of two of them, keeps its digits.
    /// Returns the solution, or `None` when the matrix is singular or the
    /// result is not finite. With `steps` = 0 it is the plain LU; 2 make
    /// the most of the residual's extra precision.
    pub(crate) fn solve_refined(self, steps: usize) -> Option<[f64; MAX_UNKNOWNS]> {
        let lu = Lu::factor(&self)?;
        self.solve_factored(&lu, steps)
    }

    /// [`Dense::solve_refined`] with the factorisation `lu` of this
    /// system's matrix already made.
    pub(crate) fn solve_factored(&self, lu: &Lu, steps: usize) -> Option<[f64; MAX_UNKNOWNS]> {
        let mut x = lu.solve(&self.b)?;
        for _ in 0..steps {
            let mut r = [0.0; MAX_UNKNOWNS];
            for (i, ri) in r.iter_mut().enumerate().take(self.n) {
                *ri = residual_row(&self.a[i][..self.n], &x[..self.n], self.b[i]);
            }
            let d = lu.solve(&r)?;
            for i in 0..self.n {
                x[i] += d[i];
            }
        }
        if x[..self.n].iter().all(|v| v.is_finite()) {
            Some(x)
        } else {
            None
        }
    }
}

/// b − a·x for one row, summed as a double-double (TwoProduct by fused
/// multiply–add, TwoSum), rounded once at the end.
fn residual_row(a: &[f64], x: &[f64], b: f64) -> f64 {
    let (mut hi, mut lo) = (b, 0.0);
    for (aij, xj) in a.iter().zip(x) {
        let p = -aij * xj;
        let pe = libm::fma(-aij, *xj, -p);
        // TwoSum(hi, p)
        let s = hi + p;
        let bb = s - hi;
        let e = (hi - (s - bb)) + (p - bb);
        hi = s;
        lo += e + pe;
    }
    hi + lo
}

/// An LU factorisation with its row pivots.
#[derive(Debug, Clone, Copy)]
pub(crate) struct Lu {
    n: usize,
    lu: [[f64; MAX_UNKNOWNS]; MAX_UNKNOWNS],
    pivot: [usize; MAX_UNKNOWNS],
}

impl Lu {
    /// Factors `d`'s matrix; `None` when it is singular.
    pub(crate) fn factor(d: &Dense) -> Option<Lu> {
        let n = d.n;
        let mut lu = d.a;
        let mut pivot = [0usize; MAX_UNKNOWNS];
        for k in 0..n {
            let mut p = k;
            for i in k + 1..n {
                if libm::fabs(lu[i][k]) > libm::fabs(lu[p][k]) {
                    p = i;
                }
            }
            if lu[p][k] == 0.0 || !lu[p][k].is_finite() {
                return None;
            }
            pivot[k] = p;
            lu.swap(k, p);
            for i in k + 1..n {
                let m = lu[i][k] / lu[k][k];
                lu[i][k] = m;
                if m == 0.0 {
                    continue;
                }
                for j in k + 1..n {
                    lu[i][j] -= m * lu[k][j];
                }
            }
        }
        Some(Lu { n, lu, pivot })
    }

    /// Solves for the right-hand side `b`; `None` when the result is not finite.
    pub(crate) fn solve(&self, b: &[f64; MAX_UNKNOWNS]) -> Option<[f64; MAX_UNKNOWNS]> {
        let n = self.n;
        let mut x = *b;
        // The rows were swapped whole as the factorisation went (its L
        // entries with them), so every swap comes first, then L.
        for k in 0..n {
            x.swap(k, self.pivot[k]);
        }
        for k in 0..n {
            for i in k + 1..n {
                x[i] -= self.lu[i][k] * x[k];
            }
        }
        for i in (0..n).rev() {
            let mut s = x[i];
            for j in i + 1..n {
                s -= self.lu[i][j] * x[j];
            }
            x[i] = s / self.lu[i][i];
        }
        if x[..n].iter().all(|v| v.is_finite()) {
            Some(x)
        } else {
            None
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn solves_a_system_that_needs_pivoting() {
        // [0 2 1; 1 1 1; 2 1 0]·x = [5 4 4] has x = (1, 2, 1): checked by
        // hand (substitution); the zero pivot forces a row swap.
        let mut d = Dense::new(3);
        d.a[0][..3].copy_from_slice(&[0.0, 2.0, 1.0]);
        d.a[1][..3].copy_from_slice(&[1.0, 1.0, 1.0]);
        d.a[2][..3].copy_from_slice(&[2.0, 1.0, 0.0]);
        d.b[..3].copy_from_slice(&[5.0, 4.0, 4.0]);
        let x = d.solve_refined(2).expect("regular");
        for (got, want) in x[..3].iter().zip([1.0, 2.0, 1.0]) {
            assert!((got - want).abs() < 1e-14, "{got} vs {want}");
        }
        // Two row swaps at different steps (the case where L's entries
        // must follow their rows): a permuted upper-triangular system with
        // x = (1, −1, 2, 3), multiplied out by hand.
        let mut d = Dense::new(4);
        d.a[0][..4].copy_from_slice(&[0.0, 0.0, 1.0, 1.0]);
        d.a[1][..4].copy_from_slice(&[0.0, 3.0, 1.0, 0.0]);
        d.a[2][..4].copy_from_slice(&[1.0, 1.0, 1.0, 1.0]);
        d.a[3][..4].copy_from_slice(&[4.0, 0.0, 0.0, 2.0]);
        d.b[..4].copy_from_slice(&[5.0, -1.0, 5.0, 10.0]);
        let x = d.solve_refined(2).expect("regular");
        for (got, want) in x[..4].iter().zip([1.0, -1.0, 2.0, 3.0]) {
            assert!((got - want).abs() < 1e-14, "{got} vs {want}");
        }
        let mut s = Dense::new(2);
        s.a[0][..2].copy_from_slice(&[1.0, 2.0]);
        s.a[1][..2].copy_from_slice(&[2.0, 4.0]);
        assert!(s.solve_refined(2).is_none(), "singular");
    }
}
