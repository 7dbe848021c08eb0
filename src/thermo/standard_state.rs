//! Conversions between the thermodynamic K and the concentration- and
//! pressure-based constants Kc and Kp.
//!
//! K is a product of activities. Relative to the standard states (IUPAC
//! Green Book, 3rd ed., §2.11): a gas has activity p/p° = cRT/p° with
//! p° = 1 bar, a solute c/c° with c° = 1 mol/L, a pure solid or liquid 1.
//! So with Δn_gas and Δn_aq the coefficient sums (products minus reactants)
//! over gaseous and dissolved species:
//!
//! - K = Kc · (RT/p°)^Δn_gas · (1/c°)^Δn_aq, Kc in (mol/m^3)^(Δn_gas+Δn_aq);
//! - K = Kp · (1/p°)^Δn_gas · (1/c°)^Δn_aq, Kp in Pa^Δn_gas (mol/m^3)^Δn_aq.
//!
//! Everything is in ln form and SI; the `*_molar`/`*_bar` helpers express the
//! constants in the units chemists quote them in (mol/L and bar).

use crate::units::constants::{GAS_CONSTANT, STANDARD_CONCENTRATION, STANDARD_PRESSURE};

/// SI size of 1 mol/L, in mol/m^3.
const MOLAR: f64 = 1000.0;
/// SI size of 1 bar, in Pa.
const BAR: f64 = 1.0e5;

/// ln K from ln Kc (Kc in SI, (mol/m^3)^(Δn_gas + Δn_aq)) at `t` (K).
pub fn ln_k_from_kc(ln_kc_si: f64, dn_gas: f64, dn_aq: f64, t: f64) -> f64 {
    ln_kc_si + dn_gas * (GAS_CONSTANT * t / STANDARD_PRESSURE).ln()
        - dn_aq * STANDARD_CONCENTRATION.ln()
}

/// ln Kc (SI) from ln K at `t` (K): the inverse of [`ln_k_from_kc`].
pub fn ln_kc_from_ln_k(ln_k: f64, dn_gas: f64, dn_aq: f64, t: f64) -> f64 {
    ln_k - dn_gas * (GAS_CONSTANT * t / STANDARD_PRESSURE).ln()
        + dn_aq * STANDARD_CONCENTRATION.ln()
}

/// ln K from ln Kp (Kp in SI: Pa^Δn_gas, times (mol/m^3)^Δn_aq for any
/// solutes).
pub fn ln_k_from_kp(ln_kp_si: f64, dn_gas: f64, dn_aq: f64) -> f64 {
    ln_kp_si - dn_gas * STANDARD_PRESSURE.ln() - dn_aq * STANDARD_CONCENTRATION.ln()
}

/// ln Kp (SI) from ln K: the inverse of [`ln_k_from_kp`].
pub fn ln_kp_from_ln_k(ln_k: f64, dn_gas: f64, dn_aq: f64) -> f64 {
    ln_k + dn_gas * STANDARD_PRESSURE.ln() + dn_aq * STANDARD_CONCENTRATION.ln()
}

/// Kc in SI, (mol/m^3)^(Δn_gas + Δn_aq), from ln K. May overflow to
/// infinity or underflow to zero for extreme K; keep ln values where that
/// matters.
pub fn kc_from_ln_k(ln_k: f64, dn_gas: f64, dn_aq: f64, t: f64) -> f64 {
    ln_kc_from_ln_k(ln_k, dn_gas, dn_aq, t).exp()
}

/// Kp in SI, Pa^Δn_gas (mol/m^3)^Δn_aq, from ln K.
pub fn kp_from_ln_k(ln_k: f64, dn_gas: f64, dn_aq: f64) -> f64 {
    ln_kp_from_ln_k(ln_k, dn_gas, dn_aq).exp()
}

/// ln Kc in (mol/L)^(Δn_gas + Δn_aq), the unit Kc is usually quoted in.
pub fn ln_kc_molar_from_ln_k(ln_k: f64, dn_gas: f64, dn_aq: f64, t: f64) -> f64 {
    ln_kc_from_ln_k(ln_k, dn_gas, dn_aq, t) - (dn_gas + dn_aq) * MOLAR.ln()
}

/// ln Kp in bar^Δn_gas (mol/L)^Δn_aq, the unit Kp is usually quoted in.
pub fn ln_kp_bar_from_ln_k(ln_k: f64, dn_gas: f64, dn_aq: f64) -> f64 {
    ln_kp_from_ln_k(ln_k, dn_gas, dn_aq) - dn_gas * BAR.ln() - dn_aq * MOLAR.ln()
}

/// Re-expresses an SI Kc ((mol/m^3)^dn) in (mol/L)^dn.
pub fn kc_si_to_molar(kc_si: f64, dn: f64) -> f64 {
    kc_si * MOLAR.powf(-dn)
}

/// Re-expresses an SI Kp (Pa^Δn_gas (mol/m^3)^Δn_aq) in bar^Δn_gas
/// (mol/L)^Δn_aq.
pub fn kp_si_to_bar(kp_si: f64, dn_gas: f64, dn_aq: f64) -> f64 {
    kp_si * BAR.powf(-dn_gas) * MOLAR.powf(-dn_aq)
}

#[cfg(test)]
#[allow(clippy::unwrap_used)] // Tests may panic on a broken expectation.
mod tests {
    use super::*;

    #[test]
    fn conversions_invert() {
        let (ln_k, dng, dna, t) = (3.7, -2.0, 1.0, 650.0);
        let back = ln_k_from_kc(ln_kc_from_ln_k(ln_k, dng, dna, t), dng, dna, t);
        assert!((back - ln_k).abs() < 1e-12);
        let back = ln_k_from_kp(ln_kp_from_ln_k(ln_k, dng, dna), dng, dna);
        assert!((back - ln_k).abs() < 1e-12);
    }

    #[test]
    fn gas_only_k_equals_kp_in_bar() {
        // With p° = 1 bar, K is numerically Kp in bar (IUPAC Green Book §2.11).
        let ln_k = -1.9;
        assert!((ln_kp_bar_from_ln_k(ln_k, 1.0, 0.0) - ln_k).abs() < 1e-12);
        let kp = kp_from_ln_k(ln_k, 1.0, 0.0);
        assert!((kp_si_to_bar(kp, 1.0, 0.0) - ln_k.exp()).abs() < 1e-12);
    }

    #[test]
    fn solution_k_equals_kc_in_molar() {
        // With c° = 1 mol/L, K of a solution reaction is Kc in mol/L.
        let ln_k = (1.0e-14f64).ln();
        let kc = kc_from_ln_k(ln_k, 0.0, 2.0, 298.15);
        assert!((kc_si_to_molar(kc, 2.0) / 1.0e-14 - 1.0).abs() < 1e-12);
        assert!((ln_kc_molar_from_ln_k(ln_k, 0.0, 2.0, 298.15) - ln_k).abs() < 1e-12);
    }
}
