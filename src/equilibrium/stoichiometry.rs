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
            let coefficients = least_squares(&kept_t, &target).unwrap_or_else(|| vec![0.0; kept.len()]);
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
    let (rows, cols) = m.shape();
    let mut a = m.clone();
    let scale = a.iter().fold(0.0f64, |acc, x| acc.max(x.abs())).max(f64::MIN_POSITIVE);
    let tol = RANK_TOLERANCE * scale;
    let mut pivots: Vec<(usize, usize)> = Vec::new();
    let mut free = Vec::new();
    let mut row = 0;
    for col in 0..cols {
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

/// Marks the species that can be present: those given at the start and those
/// a reaction can make, in either direction, from species already marked.
/// A reaction runs only when every species it consumes is available, so a
/// species that only a cycle through absent intermediates could make stays
/// absent.
pub(crate) fn reachable(nu: &DMatrix<f64>, reactions: &[usize], initial: &[f64]) -> Vec<bool> {
    let mut available: Vec<bool> = initial.iter().map(|&x| x > 0.0).collect();
    let mut changed = true;
    while changed {
        changed = false;
        for &r in reactions {
            for direction in [1.0, -1.0] {
                let runs = (0..nu.ncols()).all(|i| direction * nu[(r, i)] >= 0.0 || available[i]);
                if runs {
                    for i in 0..nu.ncols() {
                        if direction * nu[(r, i)] > 0.0 && !available[i] {
                            available[i] = true;
                            changed = true;
                        }
                    }
                }
            }
        }
    }
    available
}
