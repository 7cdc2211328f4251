//! A small dense complex solver: LU with partial pivoting for the handful of panel nodes.

use num_complex::Complex64;

/// Largest system the engine builds: L1, L2, L3 and the panel neutral.
pub const MAX_NODES: usize = 4;

/// Solves A·x = b in place for an n × n system (n ≤ [`MAX_NODES`]).
///
/// Returns `None` when a pivot is smaller than 1e-13 times the largest entry of A: the network has a
/// node with no path to a defined voltage.
pub fn solve_dense(
    a: &mut [[Complex64; MAX_NODES]; MAX_NODES],
    b: &mut [Complex64; MAX_NODES],
    n: usize,
) -> Option<[Complex64; MAX_NODES]> {
    let scale = (0..n)
        .flat_map(|i| (0..n).map(move |j| (i, j)))
        .map(|(i, j)| a[i][j].norm())
        .fold(0.0, f64::max);
    if scale == 0.0 || !scale.is_finite() {
        return (n == 0).then_some([Complex64::new(0.0, 0.0); MAX_NODES]);
    }
    for col in 0..n {
        let pivot = (col..n).max_by(|&i, &j| a[i][col].norm().total_cmp(&a[j][col].norm()))?;
        if a[pivot][col].norm() < 1e-13 * scale {
            return None;
        }
        a.swap(col, pivot);
        b.swap(col, pivot);
        for row in col + 1..n {
            let f = a[row][col] / a[col][col];
            let pivot_row = a[col];
            for (dst, src) in a[row][col..n].iter_mut().zip(&pivot_row[col..n]) {
                *dst -= f * src;
            }
            let t = b[col];
            b[row] -= f * t;
        }
    }
    let mut x = [Complex64::new(0.0, 0.0); MAX_NODES];
    for row in (0..n).rev() {
        let mut s = b[row];
        for k in row + 1..n {
            s -= a[row][k] * x[k];
        }
        x[row] = s / a[row][row];
    }
    x.iter()
        .all(|v| v.re.is_finite() && v.im.is_finite())
        .then_some(x)
}

/// Inverts a k × k complex matrix held in the top-left of a 3 × 3 array (k ≤ 3).
pub fn invert3(m: &[[Complex64; 3]; 3], k: usize) -> Option<[[Complex64; 3]; 3]> {
    let mut out = [[Complex64::new(0.0, 0.0); 3]; 3];
    for col in 0..k {
        let mut a = [[Complex64::new(0.0, 0.0); MAX_NODES]; MAX_NODES];
        let mut b = [Complex64::new(0.0, 0.0); MAX_NODES];
        for i in 0..k {
            for j in 0..k {
                a[i][j] = m[i][j];
            }
        }
        b[col] = Complex64::new(1.0, 0.0);
        let x = solve_dense(&mut a, &mut b, k)?;
        for i in 0..k {
            out[i][col] = x[i];
        }
    }
    Some(out)
}
