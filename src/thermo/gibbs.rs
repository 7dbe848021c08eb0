//! The relation ΔG° = -RT ln K between a standard reaction Gibbs energy and
//! the thermodynamic equilibrium constant, and ΔG° = ΔH° - TΔS°.

use crate::units::constants::GAS_CONSTANT;

/// ln K from a standard reaction Gibbs energy (J/mol) at temperature `t_k`
/// (K): ln K = -ΔG°/(RT).
///
/// `t_k` must be positive; the caller checks temperatures when it reads them.
pub fn ln_k_from_dg(dg_j_per_mol: f64, t_k: f64) -> f64 {
    -dg_j_per_mol / (GAS_CONSTANT * t_k)
}

/// The standard reaction Gibbs energy (J/mol) that gives `ln_k` at `t_k`.
pub fn dg_from_ln_k(ln_k: f64, t_k: f64) -> f64 {
    -GAS_CONSTANT * t_k * ln_k
}

/// ln K from ΔH° (J/mol) and ΔS° (J/(mol K)) taken at temperature `t_k`:
/// ln K = -(ΔH° - TΔS°)/(RT).
pub fn ln_k_from_dh_ds(dh: f64, ds: f64, t_k: f64) -> f64 {
    -(dh - t_k * ds) / (GAS_CONSTANT * t_k)
}

#[cfg(test)]
#[allow(clippy::unwrap_used)] // Tests may panic on a broken expectation.
mod tests {
    use super::*;

    #[test]
    fn gibbs_and_ln_k_round_trip() {
        let ln_k = ln_k_from_dg(-28_644.0, 298.15);
        assert!((dg_from_ln_k(ln_k, 298.15) + 28_644.0).abs() < 1e-9);
        // RT at 298.15 K is 2478.957 J/mol (CODATA 2018 R).
        assert!((ln_k_from_dg(-2_478.957, 298.15) - 1.0).abs() < 1e-6);
    }

    #[test]
    fn enthalpy_and_entropy_combine() {
        let t = 500.0;
        let (dh, ds) = (-92_000.0, -198.0);
        assert!((ln_k_from_dh_ds(dh, ds, t) - ln_k_from_dg(dh - t * ds, t)).abs() < 1e-12);
    }
}
