//! Carrying ln K from one temperature to another.
//!
//! The van 't Hoff equation d ln K / d(1/T) = -ΔH°/R gives, for constant
//! ΔH°, ln K(T) = ln K(T0) - ΔH°/R (1/T - 1/T0). With a constant ΔCp°
//! (Kirchhoff's law ΔH°(T) = ΔH°(T0) + ΔCp°(T - T0)) the integral gains the
//! term ΔCp°/R (ln(T/T0) + T0/T - 1). A table of K at several temperatures
//! is interpolated linearly in ln K against 1/T, which is exact for constant
//! ΔH° between the nodes.

use crate::units::constants::GAS_CONSTANT;

/// ln K at `t` from ln K at `t0` with a constant ΔH° (J/mol).
pub fn ln_k_at(ln_k0: f64, t0: f64, dh: f64, t: f64) -> f64 {
    ln_k0 - dh / GAS_CONSTANT * (1.0 / t - 1.0 / t0)
}

/// ln K at `t` from ln K at `t0`, ΔH° at `t0` (J/mol) and a constant ΔCp°
/// (J/(mol K)).
pub fn ln_k_at_cp(ln_k0: f64, t0: f64, dh0: f64, dcp: f64, t: f64) -> f64 {
    ln_k_at(ln_k0, t0, dh0, t) + dcp / GAS_CONSTANT * ((t / t0).ln() + t0 / t - 1.0)
}

/// ΔH° at `t` from ΔH° at `t0` and a constant ΔCp° (Kirchhoff's law).
pub fn dh_at(dh0: f64, t0: f64, dcp: f64, t: f64) -> f64 {
    dh0 + dcp * (t - t0)
}

/// Why a K(T) table could not be built.
#[derive(Clone, Debug, PartialEq)]
pub enum KTableError {
    /// Fewer than two points: a table needs a slope.
    TooFewPoints,
    /// A temperature that is not finite and positive, or an ln K that is
    /// not finite, at this index of the input.
    BadPoint(usize),
    /// Two points at the same temperature (indices into the input).
    DuplicateTemperature(usize, usize),
}

impl std::fmt::Display for KTableError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            KTableError::TooFewPoints => {
                f.write_str("a K(T) table needs K at two or more temperatures")
            }
            KTableError::BadPoint(i) => write!(
                f,
                "point {} of the K(T) table needs a positive temperature and a finite K",
                i + 1
            ),
            KTableError::DuplicateTemperature(a, b) => write!(
                f,
                "points {} and {} of the K(T) table have the same temperature",
                a + 1,
                b + 1
            ),
        }
    }
}

impl std::error::Error for KTableError {}

/// K at several temperatures, interpolated linearly in ln K against 1/T and
/// extrapolated with the slope of the nearest end segment.
#[derive(Clone, Debug, PartialEq)]
pub struct KTable {
    /// (1/T, ln K), sorted by increasing 1/T (decreasing T).
    nodes: Vec<(f64, f64)>,
}

impl KTable {
    /// Builds a table from (T in K, ln K) points in any order.
    pub fn new(points: &[(f64, f64)]) -> Result<KTable, KTableError> {
        if points.len() < 2 {
            return Err(KTableError::TooFewPoints);
        }
        for (i, &(t, ln_k)) in points.iter().enumerate() {
            if !(t.is_finite() && t > 0.0 && ln_k.is_finite()) {
                return Err(KTableError::BadPoint(i));
            }
        }
        let mut order: Vec<usize> = (0..points.len()).collect();
        order.sort_by(|&a, &b| points[b].0.total_cmp(&points[a].0));
        for w in order.windows(2) {
            if points[w[0]].0 == points[w[1]].0 {
                let (a, b) = (w[0].min(w[1]), w[0].max(w[1]));
                return Err(KTableError::DuplicateTemperature(a, b));
            }
        }
        let nodes = order
            .iter()
            .map(|&i| (1.0 / points[i].0, points[i].1))
            .collect();
        Ok(KTable { nodes })
    }

    /// The (T, ln K) points, by decreasing temperature.
    pub fn points(&self) -> Vec<(f64, f64)> {
        self.nodes.iter().map(|&(x, y)| (1.0 / x, y)).collect()
    }

    /// The lowest and highest tabulated temperature.
    pub fn range(&self) -> (f64, f64) {
        let hottest = self.nodes.first().map_or(f64::NAN, |n| 1.0 / n.0);
        let coldest = self.nodes.last().map_or(f64::NAN, |n| 1.0 / n.0);
        (coldest, hottest)
    }

    /// True when `t` lies within the tabulated range (no extrapolation).
    pub fn covers(&self, t: f64) -> bool {
        let (lo, hi) = self.range();
        t >= lo && t <= hi
    }

    /// The segment (pair of neighbouring nodes) used at 1/T = `x`.
    fn segment(&self, x: f64) -> ((f64, f64), (f64, f64)) {
        let n = self.nodes.len();
        let i = self.nodes[1..n - 1]
            .iter()
            .take_while(|node| node.0 <= x)
            .count();
        (self.nodes[i], self.nodes[i + 1])
    }

    /// ln K at `t` (K).
    pub fn ln_k(&self, t: f64) -> f64 {
        let x = 1.0 / t;
        let ((x0, y0), (x1, y1)) = self.segment(x);
        y0 + (y1 - y0) / (x1 - x0) * (x - x0)
    }

    /// The ΔH° (J/mol) the table implies at `t`: -R d ln K / d(1/T) of the
    /// segment used there.
    pub fn dh(&self, t: f64) -> f64 {
        let ((x0, y0), (x1, y1)) = self.segment(1.0 / t);
        -GAS_CONSTANT * (y1 - y0) / (x1 - x0)
    }
}

/// A least-squares van 't Hoff fit ln K = ΔS°/R - ΔH°/(RT).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct VantHoffFit {
    /// ΔH°, J/mol.
    pub dh: f64,
    /// ΔS°, J/(mol K).
    pub ds: f64,
    /// Root-mean-square residual in ln K.
    pub rms_residual: f64,
}

/// Fits ln K against 1/T by least squares over (T in K, ln K) points.
///
/// Returns `None` with fewer than two distinct temperatures or any
/// temperature that is not finite and positive or ln K that is not finite.
pub fn vant_hoff_dh(points: &[(f64, f64)]) -> Option<VantHoffFit> {
    if points
        .iter()
        .any(|&(t, y)| !(t.is_finite() && t > 0.0 && y.is_finite()))
    {
        return None;
    }
    let n = points.len() as f64;
    if points.len() < 2 {
        return None;
    }
    let mean_x = points.iter().map(|p| 1.0 / p.0).sum::<f64>() / n;
    let mean_y = points.iter().map(|p| p.1).sum::<f64>() / n;
    let sxx: f64 = points.iter().map(|p| (1.0 / p.0 - mean_x).powi(2)).sum();
    let sxy: f64 = points
        .iter()
        .map(|p| (1.0 / p.0 - mean_x) * (p.1 - mean_y))
        .sum();
    if sxx <= 0.0 || sxx.is_nan() {
        return None;
    }
    let slope = sxy / sxx;
    let intercept = mean_y - slope * mean_x;
    let ss: f64 = points
        .iter()
        .map(|p| (p.1 - (intercept + slope / p.0)).powi(2))
        .sum();
    Some(VantHoffFit {
        dh: -GAS_CONSTANT * slope,
        ds: GAS_CONSTANT * intercept,
        rms_residual: (ss / n).sqrt(),
    })
}

#[cfg(test)]
#[allow(clippy::unwrap_used)] // Tests may panic on a broken expectation.
mod tests {
    use super::*;

    #[test]
    fn constant_dh_round_trip() {
        let y = ln_k_at(2.0, 298.15, -50_000.0, 400.0);
        assert!((ln_k_at(y, 400.0, -50_000.0, 298.15) - 2.0).abs() < 1e-12);
        assert!((ln_k_at_cp(2.0, 298.15, -50_000.0, 0.0, 400.0) - y).abs() < 1e-12);
    }

    #[test]
    fn kirchhoff_matches_numerical_integration() {
        // Integrate d ln K/dT = ΔH(T)/(RT^2) with Simpson's rule as an
        // independent check of the closed form.
        let (t0, t1, dh0, dcp) = (298.15, 900.0, -90_000.0, -30.0);
        let n = 2000;
        let h = (t1 - t0) / n as f64;
        let f = |t: f64| dh_at(dh0, t0, dcp, t) / (GAS_CONSTANT * t * t);
        let mut s = f(t0) + f(t1);
        for i in 1..n {
            let w = if i % 2 == 1 { 4.0 } else { 2.0 };
            s += w * f(t0 + h * i as f64);
        }
        let integral = s * h / 3.0;
        assert!((ln_k_at_cp(0.0, t0, dh0, dcp, t1) - integral).abs() < 1e-9);
    }

    #[test]
    fn table_interpolates_and_reports_dh() {
        let dh = -40_000.0;
        let pts: Vec<(f64, f64)> = [300.0, 500.0, 400.0]
            .iter()
            .map(|&t| (t, ln_k_at(1.0, 300.0, dh, t)))
            .collect();
        let table = KTable::new(&pts).unwrap();
        for t in [250.0, 350.0, 450.0, 700.0] {
            assert!((table.ln_k(t) - ln_k_at(1.0, 300.0, dh, t)).abs() < 1e-9);
            assert!((table.dh(t) - dh).abs() < 1e-6);
        }
        assert_eq!(table.range(), (300.0, 500.0));
        assert!(table.covers(400.0) && !table.covers(600.0));
        let fit = vant_hoff_dh(&pts).unwrap();
        assert!((fit.dh - dh).abs() < 1e-6 && fit.rms_residual < 1e-9);
    }

    #[test]
    fn table_segments_differ() {
        // Two different slopes: each side uses its own.
        let table = KTable::new(&[(300.0, 0.0), (400.0, 1.0), (500.0, 1.5)]).unwrap();
        let slope_cold = -GAS_CONSTANT * (0.0 - 1.0) / (1.0 / 300.0 - 1.0 / 400.0);
        assert!((table.dh(320.0) - slope_cold).abs() < 1e-6);
        assert!((table.dh(250.0) - slope_cold).abs() < 1e-6);
        assert!((table.ln_k(400.0) - 1.0).abs() < 1e-12);
    }

    #[test]
    fn bad_tables_are_errors() {
        assert_eq!(KTable::new(&[(300.0, 1.0)]), Err(KTableError::TooFewPoints));
        assert_eq!(
            KTable::new(&[(300.0, 1.0), (300.0, 2.0)]),
            Err(KTableError::DuplicateTemperature(0, 1))
        );
        assert_eq!(
            KTable::new(&[(300.0, 1.0), (-1.0, 2.0)]),
            Err(KTableError::BadPoint(1))
        );
        assert!(vant_hoff_dh(&[(300.0, 1.0), (300.0, 2.0)]).is_none());
        assert!(vant_hoff_dh(&[(300.0, f64::NAN), (400.0, 2.0)]).is_none());
    }
}
