//! Activities of species from their amounts, and the Davies activity
//! coefficient for aqueous ions.
//!
//! Standard states: p° = 1 bar for gases, c° = 1 mol/L for solutes, the pure
//! substance for condensed species (activity 1 while present).
//!
//! The Davies equation (C. W. Davies, "Ion Association", Butterworths, 1962)
//! is log10 γ = -A z² (√I / (1 + √I) - 0.3 I), with I the ionic strength in
//! mol/L. A is 0.509 at 25 °C (the value used in most analytical chemistry
//! texts, e.g. Stumm & Morgan, "Aquatic Chemistry"; from memory). Away from
//! 25 °C it is carried with the Debye–Hückel dependence A ∝ (ε T)^(-3/2)
//! (water density neglected), where the relative permittivity of water is
//! ε(t) = 87.740 - 0.40008 t + 9.398e-4 t² - 1.410e-6 t³ (t in °C; Malmberg
//! & Maryott, J. Res. NBS 56 (1956) 1, valid 0-100 °C; from memory).

use super::problem::{ActivityModel, Phase, Problem, Vessel};

/// The gas constant in L·bar/(mol·K) (CODATA 2018: R = 8.314462618 J/(mol·K), exact).
pub const GAS_CONSTANT_L_BAR: f64 = 0.083_144_626_18;

/// Ionic strength above which the Davies model is usually not trusted, mol/L
/// (common practice).
pub const DAVIES_LIMIT_MOL_PER_L: f64 = 0.5;

/// The relative permittivity of liquid water at `t_c` °C (Malmberg & Maryott 1956; from memory).
fn water_permittivity(t_c: f64) -> f64 {
    87.740 - 0.40008 * t_c + 9.398e-4 * t_c * t_c - 1.410e-6 * t_c * t_c * t_c
}

/// The Davies (Debye–Hückel) constant A for log10 γ at `temperature_k`.
pub fn davies_a(temperature_k: f64) -> f64 {
    let reference = water_permittivity(25.0) * 298.15;
    let here = water_permittivity(temperature_k - 273.15) * temperature_k;
    0.509 * (reference / here).powf(1.5)
}

/// The shape function of the Davies equation, √I / (1 + √I) - 0.3 I.
fn davies_shape(ionic_strength: f64) -> f64 {
    let s = ionic_strength.max(0.0).sqrt();
    s / (1.0 + s) - 0.3 * ionic_strength.max(0.0)
}

/// The derivative of [`davies_shape`] with respect to I.
fn davies_shape_slope(ionic_strength: f64) -> f64 {
    let s = ionic_strength.max(1e-300).sqrt();
    1.0 / (2.0 * s * (1.0 + s) * (1.0 + s)) - 0.3
}

/// The Davies activity coefficient γ of an ion of charge `z` at ionic
/// strength `ionic_strength` (mol/L) and `temperature_k`.
pub fn davies_gamma(z: i32, ionic_strength: f64, temperature_k: f64) -> f64 {
    let zz = f64::from(z).powi(2);
    10f64.powf(-davies_a(temperature_k) * zz * davies_shape(ionic_strength))
}

/// The activity part of the state: natural logs of activities, activity
/// coefficients, the ionic strength, and what the Jacobian needs.
#[derive(Debug, Clone)]
pub(crate) struct Activities {
    pub ln_a: Vec<f64>,
    pub gamma: Vec<f64>,
    pub ionic_strength: Option<f64>,
    /// Total gas amount (constant pressure only).
    pub gas_total: f64,
    /// d ln γ_i / d I divided by z_i² (the same for every ion), Davies only.
    pub davies_slope: f64,
}

/// Computes the activity of each species from amounts `n` and their logs
/// `ln_n` (kept separately so that trace amounts keep their precision).
/// Condensed species get activity 1 whether present or not; the caller
/// decides which of them take part.
pub(crate) fn activities(problem: &Problem, n: &[f64], ln_n: &[f64]) -> Activities {
    let count = problem.species.len();
    let mut ln_a = vec![0.0; count];
    let mut gamma = vec![1.0; count];
    let t = problem.temperature_k;
    let mut gas_total = 0.0;
    let mut ionic_strength = None;
    let mut davies_slope = 0.0;
    match problem.vessel {
        Vessel::ConstantVolume { volume_l } => {
            let ln_gas = (GAS_CONSTANT_L_BAR * t / volume_l).ln();
            let ln_sol = -volume_l.ln();
            let mut ln_gamma_per_z2 = 0.0;
            if problem.activity == ActivityModel::Davies {
                let i: f64 = problem
                    .species
                    .iter()
                    .zip(n)
                    .filter(|(s, _)| s.phase == Phase::Solute)
                    .map(|(s, &ni)| 0.5 * f64::from(s.charge).powi(2) * ni / volume_l)
                    .sum();
                let a = davies_a(t);
                ln_gamma_per_z2 = -std::f64::consts::LN_10 * a * davies_shape(i);
                davies_slope = -std::f64::consts::LN_10 * a * davies_shape_slope(i);
                ionic_strength = Some(i);
            } else if problem.species.iter().any(|s| s.phase == Phase::Solute) {
                let i: f64 = problem
                    .species
                    .iter()
                    .zip(n)
                    .filter(|(s, _)| s.phase == Phase::Solute)
                    .map(|(s, &ni)| 0.5 * f64::from(s.charge).powi(2) * ni / volume_l)
                    .sum();
                ionic_strength = Some(i);
            }
            for (k, s) in problem.species.iter().enumerate() {
                match s.phase {
                    Phase::Gas => ln_a[k] = ln_n[k] + ln_gas,
                    Phase::Solute => {
                        let lg = ln_gamma_per_z2 * f64::from(s.charge).powi(2);
                        gamma[k] = lg.exp();
                        ln_a[k] = ln_n[k] + lg + ln_sol;
                    }
                    Phase::Condensed => ln_a[k] = 0.0,
                }
            }
        }
        Vessel::ConstantPressure { pressure_bar } => {
            gas_total = problem
                .species
                .iter()
                .zip(n)
                .filter(|(s, _)| s.phase == Phase::Gas)
                .map(|(_, &ni)| ni)
                .sum();
            let ln_p = pressure_bar.ln() - gas_total.ln();
            for (k, s) in problem.species.iter().enumerate() {
                match s.phase {
                    Phase::Gas | Phase::Solute => ln_a[k] = ln_n[k] + ln_p,
                    Phase::Condensed => ln_a[k] = 0.0,
                }
            }
        }
    }
    Activities {
        ln_a,
        gamma,
        ionic_strength,
        gas_total,
        davies_slope,
    }
}
