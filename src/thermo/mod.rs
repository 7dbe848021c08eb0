//! Thermodynamic numerics for equilibrium constants: K from Gibbs energies,
//! standard-state conversions between K, Kc and Kp, K carried in
//! temperature (van 't Hoff, Kirchhoff, tabulated K(T)), and the diagnosis
//! of the usual mistakes behind a K that disagrees with its data.
//!
//! Every function takes and returns SI values (J/mol, J/(mol K), K, Pa,
//! mol/m^3) and works on ln K, which keeps very large and very small
//! constants exact enough and never overflows. Nothing here knows about
//! syntax, spans or diagnostics.

pub mod gibbs;
pub mod likely_cause;
pub mod standard_state;
pub mod temperature;

pub use gibbs::{dg_from_ln_k, ln_k_from_dg, ln_k_from_dh_ds};
pub use likely_cause::{
    CauseContext, DEFAULT_REL_TOL, EnergyBasis, LN_K_SCALE_FLOOR, LikelyCause, RtConvention,
    StatedForm, VantHoffCarry, likely_cause, likely_causes,
};
pub use standard_state::{
    kc_from_ln_k, kc_si_to_molar, kp_from_ln_k, kp_si_to_bar, ln_k_from_kc, ln_k_from_kp,
    ln_kc_from_ln_k, ln_kc_molar_from_ln_k, ln_kp_bar_from_ln_k, ln_kp_from_ln_k,
};
pub use temperature::{KTable, KTableError, VantHoffFit, dh_at, ln_k_at, ln_k_at_cp, vant_hoff_dh};
