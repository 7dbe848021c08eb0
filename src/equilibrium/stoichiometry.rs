//! Linear algebra on the stoichiometric matrix: which reactions are
//! independent, which quantities every reaction conserves, and which species
//! can form at all from what the mixture holds.

use nalgebra::{DMatrix, DVector};

/// Relative tolerance for deciding that a vector is a combination of others.
pub(crate) const RANK_TOLERANCE: f64 = 1e-9;

/// The outcome of reducing the reactions to an independent subset.
pub(crate) struct Independent {
    /// Indices of the kept reactions, in input order.
    pub kept: Vec<usize>,
    /// Dropped reactions with the coefficients that express each as a
    /// combination of the kept ones (one coefficient per kept reaction).
    pub dropped: Vec<(usize, Vec<f64>)>,
    /// Reactions whose coefficients are all zero.
    pub empty: Vec<usize>,
}

/// Keeps each reaction that is not a combination of the ones kept before it
/// (modified Gram–Schmidt with re-orthogonalisation).
pub(crate) fn independent_reactions(nu: &DMatrix<f64>) -> Independent {
    let mut basis: Vec<DVector<f64>> = Vec::new();
    let mut kept = Vec::new();
    let mut dropped_rows = Vec::new();
    let mut empty = Vec::new();
    for r in 0..nu.nrows() {
        let row: DVector<f64> = nu.row(r).transpose();
        let norm = row.norm();
        if norm == 0.0 {
            empty.push(r);
            continue;
        }
        let mut v = row.clone();
        for _ in 0..2 {
            for q in &basis {
                let d = q.dot(&v);
                v -= q * d;
            }
        }
        let rest = v.norm();
        if rest > RANK_TOLERANCE * norm {
            basis.push(v / rest);
            kept.push(r);
        } else {
            dropped_rows.push(r);
        }
    }
    let mut dropped = Vec::new();
    if !dropped_rows.is_empty() {
        let kept_t = DMatrix::from_fn(nu.ncols(), kept.len(), |i, j| nu[(kept[j], i)]);
        for r in dropped_rows {
            let target: DVector<f64> = nu.row(r).transpose();
            let coefficients =
                least_squares(&kept_t, &target).unwrap_or_else(|| vec![0.0; kept.len()]);
            dropped.push((r, coefficients));
        }
    }
    Independent {
        kept,
        dropped,
        empty,
    }
}

/// Solves `m x = b` in the least-squares sense (minimum norm), if the SVD
/// succeeds.
pub(crate) fn least_squares(m: &DMatrix<f64>, b: &DVector<f64>) -> Option<Vec<f64>> {
    if m.ncols() == 0 {
        return Some(Vec::new());
    }
    let svd = m.clone().svd(true, true);
    let largest = svd.singular_values.iter().cloned().fold(0.0, f64::max);
    let x = svd.solve(b, largest * 1e-12).ok()?;
    Some(x.iter().copied().collect())
}

/// A basis of the null space {x : m x = 0}, from the reduced row echelon
/// form with partial pivoting. Each basis vector has a 1 at its free column.
pub(crate) fn null_space(m: &DMatrix<f64>) -> Vec<DVector<f64>> {
    let order: Vec<usize> = (0..m.ncols()).collect();
    null_space_ordered(m, &order)
}

/// As [`null_space`], trying the columns as pivots in the given order. The
/// columns tried first are eliminated; the later ones become the free
/// columns, each of which appears in only its own basis vector (besides
/// pivot columns). Putting the abundant species last keeps them out of the
/// conservation laws of the trace species, which would otherwise be resolved
/// only to rounding of the abundant amount.
pub(crate) fn null_space_ordered(m: &DMatrix<f64>, order: &[usize]) -> Vec<DVector<f64>> {
    let (rows, cols) = m.shape();
    let mut a = m.clone();
    let scale = a
        .iter()
        .fold(0.0f64, |acc, x| acc.max(x.abs()))
        .max(f64::MIN_POSITIVE);
    let tol = RANK_TOLERANCE * scale;
    let mut pivots: Vec<(usize, usize)> = Vec::new();
    let mut free = Vec::new();
    let mut row = 0;
    for &col in order {
        if row >= rows {
            free.push(col);
            continue;
        }
        let mut best = row;
        for r in row..rows {
            if a[(r, col)].abs() > a[(best, col)].abs() {
                best = r;
            }
        }
        if a[(best, col)].abs() <= tol {
            free.push(col);
            continue;
        }
        a.swap_rows(row, best);
        let p = a[(row, col)];
        for c in 0..cols {
            a[(row, c)] /= p;
        }
        for r in 0..rows {
            if r != row {
                let f = a[(r, col)];
                if f != 0.0 {
                    for c in 0..cols {
                        let v = a[(row, c)];
                        a[(r, c)] -= f * v;
                    }
                }
            }
        }
        pivots.push((row, col));
        row += 1;
    }
    free.iter()
        .map(|&f| {
            let mut v = DVector::zeros(cols);
            v[f] = 1.0;
            for &(pr, pc) in &pivots {
                v[pc] = -a[(pr, f)];
            }
            v
        })
        .collect()
}

/// Picks a maximal set of independent rows, in order.
pub(crate) fn independent_rows(rows: &[DVector<f64>]) -> Vec<usize> {
    let mut basis: Vec<DVector<f64>> = Vec::new();
    let mut kept = Vec::new();
    for (k, row) in rows.iter().enumerate() {
        let norm = row.norm();
        if norm == 0.0 {
            continue;
        }
        let mut v = row.clone();
        for _ in 0..2 {
            for q in &basis {
                let d = q.dot(&v);
                v -= q * d;
            }
        }
        let rest = v.norm();
        if rest > RANK_TOLERANCE * norm {
            basis.push(v / rest);
            kept.push(k);
        }
    }
    kept
}

/// Marks the species that can be present: those given at the start and
/// those some combination of reactions can make without consuming a species
/// that is absent.
///
/// A species j absent at the start can form exactly when there is a
/// direction d = νᵀξ of change with d ≥ 0 on every species absent at the start
/// and d_j > 0 (a small step along d keeps every amount non-negative). Such
/// directions form a cone, so one linear programme finds them all: maximise
/// Σ s_j subject to 0 ≤ s_j ≤ 1 and s_j ≤ d_j for the absent species; the
/// species with s_j = 1 at the optimum are the ones that can form. The
/// programme is solved by the simplex method with Bland's rule (Bland,
/// Math. Oper. Res. 2 (1977) 103), which cannot cycle on these degenerate
/// problems.
pub(crate) fn reachable(nu: &DMatrix<f64>, reactions: &[usize], initial: &[f64]) -> Vec<bool> {
    let mut available = propagate(nu, reactions, initial);
    let absent: Vec<usize> = (0..nu.ncols())
        .filter(|&j| !available[j] && reactions.iter().any(|&r| nu[(r, j)] != 0.0))
        .collect();
    if absent.is_empty() {
        return available;
    }
    let r = reactions.len();
    let a = absent.len();
    // Variables: ξ⁺ (r), ξ⁻ (r), s (a). Rows: s_j - d_j ≤ 0, s_j ≤ 1.
    let vars = 2 * r + a;
    let rows = 2 * a;
    let mut matrix = DMatrix::zeros(rows, vars);
    let mut rhs = DVector::zeros(rows);
    for (k, &j) in absent.iter().enumerate() {
        for (q, &rx) in reactions.iter().enumerate() {
            matrix[(k, q)] = -nu[(rx, j)];
            matrix[(k, r + q)] = nu[(rx, j)];
        }
        matrix[(k, 2 * r + k)] = 1.0;
        matrix[(a + k, 2 * r + k)] = 1.0;
        rhs[a + k] = 1.0;
    }
    let objective =
        DVector::from_iterator(vars, (0..vars).map(|v| if v >= 2 * r { 1.0 } else { 0.0 }));
    match simplex_max(&matrix, &rhs, &objective) {
        Some(x) => {
            for (k, &j) in absent.iter().enumerate() {
                if x[2 * r + k] > 0.5 {
                    available[j] = true;
                }
            }
        }
        // Without an answer, assume every species can form; the Newton
        // solve then reports if one cannot.
        None => absent.iter().for_each(|&j| available[j] = true),
    }
    available
}

/// A quick first pass: a reaction whose consumed species are all available
/// (in one direction or the other) makes its products available. Every
/// species it marks can form; the linear programme then decides only the
/// rest, which are few in practice.
fn propagate(nu: &DMatrix<f64>, reactions: &[usize], initial: &[f64]) -> Vec<bool> {
    let mut available: Vec<bool> = initial.iter().map(|&x| x > 0.0).collect();
    let mut changed = true;
    while changed {
        changed = false;
        for &r in reactions {
            for direction in [1.0, -1.0] {
                let runs = (0..nu.ncols()).all(|i| direction * nu[(r, i)] >= 0.0 || available[i]);
                if runs {
                    for (i, a) in available.iter_mut().enumerate() {
                        if direction * nu[(r, i)] > 0.0 && !*a {
                            *a = true;
                            changed = true;
                        }
                    }
                }
            }
        }
    }
    available
}

/// Maximises cᵀx subject to A x ≤ b, x ≥ 0, with b ≥ 0 (so the slack basis
/// is feasible), by the tableau simplex method with Bland's rule. Returns
/// None when the iteration limit is hit or the problem is unbounded.
fn simplex_max(a: &DMatrix<f64>, b: &DVector<f64>, c: &DVector<f64>) -> Option<Vec<f64>> {
    const TOL: f64 = 1e-9;
    let (m, n) = a.shape();
    let width = n + m + 1;
    let mut t = DMatrix::zeros(m + 1, width);
    for i in 0..m {
        for j in 0..n {
            t[(i, j)] = a[(i, j)];
        }
        t[(i, n + i)] = 1.0;
        t[(i, width - 1)] = b[i];
    }
    for j in 0..n {
        t[(m, j)] = -c[j];
    }
    let mut basis: Vec<usize> = (n..n + m).collect();
    for _ in 0..(50 * (m + n) + 100) {
        let Some(enter) = (0..n + m).find(|&j| t[(m, j)] < -TOL) else {
            let mut x = vec![0.0; n];
            for (i, &v) in basis.iter().enumerate() {
                if v < n {
                    x[v] = t[(i, width - 1)];
                }
            }
            return Some(x);
        };
        let mut leave: Option<(usize, f64)> = None;
        for i in 0..m {
            let p = t[(i, enter)];
            if p > TOL {
                let ratio = t[(i, width - 1)] / p;
                let better = match leave {
                    None => true,
                    Some((l, best)) => {
                        ratio < best - TOL || (ratio <= best + TOL && basis[i] < basis[l])
                    }
                };
                if better {
                    leave = Some((i, ratio));
                }
            }
        }
        let (row, _) = leave?;
        let p = t[(row, enter)];
        for j in 0..width {
            t[(row, j)] /= p;
        }
        for i in 0..=m {
            if i != row {
                let f = t[(i, enter)];
                if f != 0.0 {
                    for j in 0..width {
                        let v = t[(row, j)];
                        t[(i, j)] -= f * v;
                    }
                }
            }
        }
        basis[row] = enter;
    }
    None
}
