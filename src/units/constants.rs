//! Physical constants and conventional unit sizes that stoik converts with.
//!
//! Every value here is either exact by definition or a conventional exact
//! value, so conversions never depend on a measured constant:
//!
//! - The defining constants of the SI (N_A, k_B, e) are exact since the 2019
//!   revision: BIPM, *The International System of Units (SI)*, 9th edition
//!   (2019), Table 1. CODATA 2018 (Tiesinga et al., Rev. Mod. Phys. 93, 025010,
//!   2021) lists the same exact values and the derived R = N_A k_B.
//! - The standard pressure p° = 1 bar and the standard concentration
//!   c° = 1 mol/L are the IUPAC recommendations: IUPAC *Quantities, Units and
//!   Symbols in Physical Chemistry* (Green Book), 3rd edition (2007), §2.11.
//! - atm, Torr, mmHg, psi and the thermochemical calorie are the exact
//!   conversion factors of NIST Special Publication 811 (2008), Appendix B.8.

/// Avogadro constant, 1/mol (exact, SI 2019).
pub const AVOGADRO: f64 = 6.022_140_76e23;

/// Boltzmann constant, J/K (exact, SI 2019).
pub const BOLTZMANN: f64 = 1.380_649e-23;

/// Elementary charge, C (exact, SI 2019).
pub const ELEMENTARY_CHARGE: f64 = 1.602_176_634e-19;

/// Molar gas constant R = N_A k_B, J/(mol K).
///
/// The product of two exact constants is exact: 8.314 462 618 153 24. CODATA
/// 2018 prints it as 8.314 462 618... J/(mol K).
pub const GAS_CONSTANT: f64 = 8.314_462_618_153_24;

/// Faraday constant F = N_A e, C/mol (exact product, CODATA 2018).
pub const FARADAY: f64 = 96_485.332_123_310_01;

/// Standard pressure p° = 1 bar = 1e5 Pa (IUPAC Green Book).
pub const STANDARD_PRESSURE: f64 = 1.0e5;

/// Standard concentration c° = 1 mol/L = 1000 mol/m^3 (IUPAC Green Book).
pub const STANDARD_CONCENTRATION: f64 = 1000.0;

/// Standard atmosphere, Pa (exact, NIST SP 811 B.8).
pub const ATMOSPHERE: f64 = 101_325.0;

/// Torr = atm/760, Pa (exact by definition, NIST SP 811 B.8).
pub const TORR: f64 = 101_325.0 / 760.0;

/// Conventional millimetre of mercury, Pa (NIST SP 811 B.8: 1.333 224 E+02;
/// exactly 13.5951 g/cm^3 x 9.806 65 m/s^2 x 1 mm = 133.322 387 415 Pa).
pub const MILLIMETRE_OF_MERCURY: f64 = 133.322_387_415;

/// Pound-force per square inch, Pa (NIST SP 811 B.8; exactly
/// 0.453 592 37 kg x 9.806 65 m/s^2 / (0.0254 m)^2).
pub const PSI: f64 = 6_894.757_293_168_361;

/// Thermochemical calorie, J (exact, NIST SP 811 B.8).
pub const CALORIE: f64 = 4.184;

/// Electronvolt, J (exactly the elementary charge times one volt).
pub const ELECTRONVOLT: f64 = ELEMENTARY_CHARGE;

/// The offset between the Celsius and the Kelvin scales, K (exact, SI 2019).
pub const CELSIUS_OFFSET: f64 = 273.15;

/// The conventional reference temperature of thermochemical tables, K.
pub const STANDARD_TEMPERATURE: f64 = 298.15;

#[cfg(test)]
#[allow(clippy::unwrap_used)] // Tests may panic on a broken expectation.
mod tests {
    use super::*;

    #[test]
    fn gas_constant_is_the_product_of_the_defining_constants() {
        // CODATA 2018: R = N_A k = 8.314 462 618... J/(mol K), exact.
        let r = AVOGADRO * BOLTZMANN;
        assert!((r - GAS_CONSTANT).abs() / GAS_CONSTANT < 1e-15);
        assert!((GAS_CONSTANT - 8.314_462_618).abs() < 1e-9);
    }

    #[test]
    fn faraday_is_the_product_of_avogadro_and_charge() {
        // CODATA 2018: F = 96 485.332 12... C/mol, exact.
        let f = AVOGADRO * ELEMENTARY_CHARGE;
        assert!((f - FARADAY).abs() / FARADAY < 1e-15);
    }

    #[test]
    fn pressure_units_match_their_definitions() {
        // NIST SP 811 B.8 definitions, recomputed from their parts.
        assert!((MILLIMETRE_OF_MERCURY - 13_595.1 * 9.806_65 * 1e-3).abs() < 1e-9);
        assert!((PSI - 0.453_592_37 * 9.806_65 / (0.0254 * 0.0254)).abs() < 1e-9);
        assert!((TORR * 760.0 - ATMOSPHERE).abs() < 1e-9);
    }
}
