//! Naming the likely mistake behind a K that disagrees with what its data
//! imply.
//!
//! When a stated ln K and an expected ln K (from ΔG°, formation data, a
//! related reaction or a van 't Hoff carry) disagree, the factor between them
//! often gives the mistake away: a sign (the reverse reaction), a ratio of 2
//! or 1/2 (doubled or halved coefficients), ln 10 (log10 and ln mixed), 4.184
//! (kcal and kJ mixed), (RT/p°)^Δn (Kc and Kp mixed), 1.01325^Δn (atm taken
//! as bar), or 273.15 K missing from a temperature (°C read as K).
//!
//! # Tolerance
//!
//! Two ln K values agree when they differ by at most
//! `rel_tol · max(|expected|, LN_K_SCALE_FLOOR)`. The relative part is the
//! project-wide K tolerance (default 10% of ln K). The floor of 1 on the
//! scale keeps constants near K = 1, whose ln K is near zero, from demanding
//! impossible precision: under the default tolerance any two K within about
//! 10% of each other agree. Scaling the floor with `rel_tol` (rather than
//! fixing it in ln K) lets a caller who asks for a tight tolerance see small
//! factors too. A cause is named when
//! undoing that one mistake brings the two values into agreement and at
//! least halves their difference; among several, the one that leaves the
//! smallest difference wins.
//!
//! Some mistakes shift ln K by little: atm taken as bar changes ln K by
//! 0.0132 per unit of Δn(gas), so under the default tolerance it is never a
//! mismatch on its own, and it is only named with a tighter `rel_tol`.

use crate::units::constants::{
    ATMOSPHERE, CALORIE, CELSIUS_OFFSET, GAS_CONSTANT, STANDARD_CONCENTRATION, STANDARD_PRESSURE,
};

use super::gibbs::{ln_k_from_dg, ln_k_from_dh_ds};
use super::temperature::{ln_k_at, ln_k_at_cp};

/// The project-wide relative tolerance on ln K.
pub const DEFAULT_REL_TOL: f64 = 0.10;

/// The smallest |ln K| the relative tolerance is taken of: with the default
/// tolerance, ln K values always agree within 0.1 (K within about 10%).
pub const LN_K_SCALE_FLOOR: f64 = 1.0;

/// The largest temperature (K) that is read as a possible Celsius value: a
/// reaction datum "at 25" or "at 100" below the freezing point of water in
/// kelvin is far more often a Celsius temperature (common practice).
const CELSIUS_SUSPECT_BELOW: f64 = 273.15;

/// How the stated constant was written in the file.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum StatedForm {
    /// The thermodynamic K (dimensionless).
    K,
    /// A concentration-based Kc.
    Kc,
    /// A pressure-based Kp.
    Kp,
    /// log10 K or pK.
    LogK,
}

/// The energies the expected ln K was computed from, in SI units.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum EnergyBasis {
    /// ln K = -ΔG°/(RT), ΔG° in J/mol.
    Gibbs { dg: f64 },
    /// ln K = -(ΔH° - TΔS°)/(RT), ΔH° in J/mol and ΔS° in J/(mol K).
    EnthalpyEntropy { dh: f64, ds: f64 },
}

/// The expected ln K was carried from `t0` to the stated temperature by van
/// 't Hoff (constant ΔH°, or Kirchhoff when `dcp` is given).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct VantHoffCarry {
    pub ln_k0: f64,
    /// K.
    pub t0: f64,
    /// J/mol, at `t0`.
    pub dh: f64,
    /// J/(mol K).
    pub dcp: Option<f64>,
}

/// What the diagnosis needs to know about the two values.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct CauseContext {
    /// Sum of gas coefficients, products minus reactants.
    pub dn_gas: f64,
    /// Sum of solute coefficients, products minus reactants.
    pub dn_aq: f64,
    /// The temperature of the stated value as read (K).
    pub temperature: f64,
    /// Set when the expected ln K came from energies.
    pub expected_from: Option<EnergyBasis>,
    /// Set when the expected ln K was carried in temperature.
    pub carried: Option<VantHoffCarry>,
    /// How the stated value was written.
    pub stated_form: StatedForm,
}

impl CauseContext {
    /// A context for a thermodynamic K at `temperature` with Δn = 0 and no
    /// energies; fill in the rest with the `with_*` methods.
    pub fn new(temperature: f64) -> Self {
        CauseContext {
            dn_gas: 0.0,
            dn_aq: 0.0,
            temperature,
            expected_from: None,
            carried: None,
            stated_form: StatedForm::K,
        }
    }

    pub fn with_dn(mut self, dn_gas: f64, dn_aq: f64) -> Self {
        self.dn_gas = dn_gas;
        self.dn_aq = dn_aq;
        self
    }

    pub fn with_energy(mut self, basis: EnergyBasis) -> Self {
        self.expected_from = Some(basis);
        self
    }

    pub fn with_carry(mut self, carry: VantHoffCarry) -> Self {
        self.carried = Some(carry);
        self
    }

    pub fn with_form(mut self, form: StatedForm) -> Self {
        self.stated_form = form;
        self
    }
}

/// The units a user might have had in mind when relating Kc and Kp by
/// Kp = Kc (RT)^Δn(gas).
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum RtConvention {
    /// Kc in mol/L, Kp in bar: RT in L·bar/mol (0.083 144 6 T).
    LitreBar,
    /// Kc in mol/L, Kp in atm: RT in L·atm/mol (0.082 057 4 T).
    LitreAtm,
    /// Kc in mol/m^3, Kp in Pa: RT in J/mol (8.314 T).
    Si,
}

impl RtConvention {
    const ALL: [RtConvention; 3] = [
        RtConvention::LitreBar,
        RtConvention::LitreAtm,
        RtConvention::Si,
    ];

    /// The number RT in this convention's units at `t` (K).
    pub fn rt(self, t: f64) -> f64 {
        let litre_mol = 1.0 / STANDARD_CONCENTRATION;
        match self {
            RtConvention::LitreBar => GAS_CONSTANT * t / (STANDARD_PRESSURE * litre_mol),
            RtConvention::LitreAtm => GAS_CONSTANT * t / (ATMOSPHERE * litre_mol),
            RtConvention::Si => GAS_CONSTANT * t,
        }
    }

    /// The units of RT in this convention.
    pub fn units(self) -> &'static str {
        match self {
            RtConvention::LitreBar => "L·bar/mol",
            RtConvention::LitreAtm => "L·atm/mol",
            RtConvention::Si => "J/mol",
        }
    }

    fn pair(self) -> (&'static str, &'static str) {
        match self {
            RtConvention::LitreBar => ("mol/L", "bar"),
            RtConvention::LitreAtm => ("mol/L", "atm"),
            RtConvention::Si => ("mol/m^3", "Pa"),
        }
    }
}

/// A mistake that explains the factor between a stated and an expected K.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum LikelyCause {
    /// The stated K belongs to the reverse reaction (ln K of opposite sign).
    Reversed,
    /// The stated K belongs to the equation with every coefficient
    /// multiplied by the factor (2, 3, 1/2 or 1/3): stated = expected^p.
    Scaled(f64),
    /// The reverse reaction, scaled: stated = expected^(-p).
    ReversedScaled(f64),
    /// A Kc value was taken as a pressure-based constant (Kp, or K with its
    /// 1 bar standard state). `rt` is RT in the convention's units at the
    /// stated temperature.
    KcGivenAsKp {
        convention: RtConvention,
        rt: f64,
        dn_gas: f64,
    },
    /// A Kp value was taken as a Kc.
    KpGivenAsKc {
        convention: RtConvention,
        rt: f64,
        dn_gas: f64,
    },
    /// A log10 K was taken as ln K.
    Log10ReadAsLn,
    /// An ln K was given where log10 K was expected.
    LnReadAsLog10,
    /// Energies in kcal/mol were read as kJ/mol.
    KcalReadAsKj,
    /// Energies in kJ/mol were read as kcal/mol.
    KjReadAsKcal,
    /// A Celsius temperature was read as kelvin; `written` is the number.
    CelsiusReadAsKelvin { written: f64 },
    /// A Kp in atm (or a K for a 1 atm standard state) was taken as bar.
    AtmAsBar { dn_gas: f64 },
}

fn fraction(p: f64) -> String {
    if (p - 0.5).abs() < 1e-12 {
        "1/2".to_string()
    } else if (p - 1.0 / 3.0).abs() < 1e-12 {
        "1/3".to_string()
    } else {
        format!("{p}")
    }
}

fn number(x: f64) -> String {
    format!("{}", (x * 1e4).round() / 1e4)
}

impl LikelyCause {
    /// A sentence for the user, saying what seems to have happened and what
    /// to change (no trailing period).
    pub fn message(&self) -> String {
        match *self {
            LikelyCause::Reversed => {
                "K matches the reverse reaction (ln K has the opposite sign): invert K or flip the equation".to_string()
            }
            LikelyCause::Scaled(p) => format!(
                "K matches the equation with every coefficient multiplied by {f} (K raised to the power {f}): scale the coefficients or take K^(1/{f})",
                f = fraction(p)
            ),
            LikelyCause::ReversedScaled(p) => format!(
                "K matches the reverse reaction with every coefficient multiplied by {f} (1/K raised to the power {f}): flip and scale the equation, or convert K",
                f = fraction(p)
            ),
            LikelyCause::KcGivenAsKp { convention, rt, dn_gas } => {
                let (c, p) = convention.pair();
                format!(
                    "the value looks like Kc (in {c}) given as a pressure-based Kp (in {p}): Kp = Kc·(RT)^Δn with RT = {} {} and Δn(gas) = {}, a factor of {}",
                    number(rt),
                    convention.units(),
                    number(dn_gas),
                    factor_text(rt.powf(dn_gas))
                )
            }
            LikelyCause::KpGivenAsKc { convention, rt, dn_gas } => {
                let (c, p) = convention.pair();
                format!(
                    "the value looks like Kp (in {p}) given as Kc (in {c}): Kc = Kp/(RT)^Δn with RT = {} {} and Δn(gas) = {}, a factor of {}",
                    number(rt),
                    convention.units(),
                    number(dn_gas),
                    factor_text(rt.powf(dn_gas))
                )
            }
            LikelyCause::Log10ReadAsLn => {
                "the value looks like log10 K used as ln K: ln K = 2.3026·log10 K".to_string()
            }
            LikelyCause::LnReadAsLog10 => {
                "the value looks like ln K given as log10 K: log10 K = ln K / 2.3026".to_string()
            }
            LikelyCause::KcalReadAsKj => {
                "the energies look like kcal/mol written as kJ/mol (1 kcal = 4.184 kJ): check their unit".to_string()
            }
            LikelyCause::KjReadAsKcal => {
                "the energies look like kJ/mol written as kcal/mol (1 kcal = 4.184 kJ): check their unit".to_string()
            }
            LikelyCause::CelsiusReadAsKelvin { written } => format!(
                "the temperature {w} K looks like {w} °C ({k} K): write `{w} degC` if Celsius was meant",
                w = number(written),
                k = number(written + CELSIUS_OFFSET)
            ),
            LikelyCause::AtmAsBar { dn_gas } => format!(
                "the value looks like Kp in atm (or K for a 1 atm standard state) used as bar: K(1 bar) = K(1 atm)·1.01325^Δn with Δn(gas) = {}",
                number(dn_gas)
            ),
        }
    }
}

fn factor_text(f: f64) -> String {
    if (1e-3..1e4).contains(&f.abs()) {
        number(f)
    } else {
        format!("{f:.3e}")
    }
}

/// The tolerance on ln K around `reference`.
fn tolerance(reference: f64, rel_tol: f64) -> f64 {
    rel_tol * reference.abs().max(LN_K_SCALE_FLOOR)
}

/// The single most likely cause of a mismatch, or `None` when the values
/// agree or no single known mistake explains the difference.
pub fn likely_cause(
    stated: f64,
    expected: f64,
    ctx: &CauseContext,
    rel_tol: f64,
) -> Option<LikelyCause> {
    likely_causes(stated, expected, ctx, rel_tol)
        .into_iter()
        .next()
        .map(|(cause, _)| cause)
}

/// Every known mistake that explains the mismatch, best first, each with
/// the ln K difference left after undoing it.
pub fn likely_causes(
    stated: f64,
    expected: f64,
    ctx: &CauseContext,
    rel_tol: f64,
) -> Vec<(LikelyCause, f64)> {
    if !(stated.is_finite() && expected.is_finite()) {
        return Vec::new();
    }
    let gap = (stated - expected).abs();
    if gap <= tolerance(expected, rel_tol) {
        return Vec::new();
    }
    let mut found: Vec<(LikelyCause, f64)> = Vec::new();
    for (cause, s, e) in candidates(stated, expected, ctx) {
        if !(s.is_finite() && e.is_finite()) {
            continue;
        }
        let left = (s - e).abs();
        if left <= tolerance(e, rel_tol) && left <= 0.5 * gap {
            found.push((cause, left));
        }
    }
    found.sort_by(|a, b| a.1.total_cmp(&b.1));
    found
}

/// Each candidate mistake with the (stated, expected) pair after undoing it.
fn candidates(s: f64, e: f64, ctx: &CauseContext) -> Vec<(LikelyCause, f64, f64)> {
    let mut out = vec![(LikelyCause::Reversed, -s, e)];
    for p in [2.0, 3.0, 0.5, 1.0 / 3.0] {
        out.push((LikelyCause::Scaled(p), s / p, e));
        out.push((LikelyCause::ReversedScaled(p), -s / p, e));
    }
    let ln10 = std::f64::consts::LN_10;
    out.push((LikelyCause::Log10ReadAsLn, s * ln10, e));
    out.push((LikelyCause::LnReadAsLog10, s / ln10, e));

    let t = ctx.temperature;
    if ctx.dn_gas != 0.0 && t.is_finite() && t > 0.0 {
        for convention in RtConvention::ALL {
            let rt = convention.rt(t);
            let shift = ctx.dn_gas * rt.ln();
            match ctx.stated_form {
                StatedForm::Kc => out.push((
                    LikelyCause::KpGivenAsKc {
                        convention,
                        rt,
                        dn_gas: ctx.dn_gas,
                    },
                    s - shift,
                    e,
                )),
                StatedForm::K | StatedForm::Kp | StatedForm::LogK => out.push((
                    LikelyCause::KcGivenAsKp {
                        convention,
                        rt,
                        dn_gas: ctx.dn_gas,
                    },
                    s + shift,
                    e,
                )),
            }
        }
        let atm_shift = ctx.dn_gas * (ATMOSPHERE / STANDARD_PRESSURE).ln();
        out.push((
            LikelyCause::AtmAsBar { dn_gas: ctx.dn_gas },
            s + atm_shift,
            e,
        ));
    }

    if let Some(basis) = ctx.expected_from {
        for (cause, f) in [
            (LikelyCause::KcalReadAsKj, CALORIE),
            (LikelyCause::KjReadAsKcal, 1.0 / CALORIE),
        ] {
            match basis {
                EnergyBasis::Gibbs { dg } => out.push((cause, s, ln_k_from_dg(dg * f, t))),
                EnergyBasis::EnthalpyEntropy { dh, ds } => {
                    out.push((cause, s, ln_k_from_dh_ds(dh * f, ds, t)));
                    out.push((cause, s, ln_k_from_dh_ds(dh * f, ds * f, t)));
                }
            }
        }
    }

    if t > 0.0 && t < CELSIUS_SUSPECT_BELOW {
        let meant = t + CELSIUS_OFFSET;
        let cause = LikelyCause::CelsiusReadAsKelvin { written: t };
        match ctx.expected_from {
            Some(EnergyBasis::Gibbs { dg }) => out.push((cause, s, ln_k_from_dg(dg, meant))),
            Some(EnergyBasis::EnthalpyEntropy { dh, ds }) => {
                out.push((cause, s, ln_k_from_dh_ds(dh, ds, meant)));
            }
            None => {}
        }
        if let Some(c) = ctx.carried {
            let carried = match c.dcp {
                Some(dcp) => ln_k_at_cp(c.ln_k0, c.t0, c.dh, dcp, meant),
                None => ln_k_at(c.ln_k0, c.t0, c.dh, meant),
            };
            out.push((cause, s, carried));
        }
    }
    out
}

#[cfg(test)]
#[allow(clippy::unwrap_used)] // Tests may panic on a broken expectation.
mod tests {
    use super::*;
    use crate::thermo::standard_state::{ln_k_from_kc, ln_k_from_kp, ln_kc_molar_from_ln_k};

    const T: f64 = 298.15;
    // ΔrG° of N2 + 3 H2 ⇌ 2 NH3 from NIST-JANAF 4th ed. ΔfG°(NH3, g) =
    // -16.367 kJ/mol (from memory); only a realistic size is needed here.
    const DG_NH3: f64 = -32_734.0;

    fn ammonia() -> (f64, CauseContext) {
        let e = ln_k_from_dg(DG_NH3, T);
        let ctx = CauseContext::new(T)
            .with_dn(-2.0, 0.0)
            .with_energy(EnergyBasis::Gibbs { dg: DG_NH3 });
        (e, ctx)
    }

    fn named(stated: f64, expected: f64, ctx: &CauseContext) -> Option<LikelyCause> {
        likely_cause(stated, expected, ctx, DEFAULT_REL_TOL)
    }

    #[test]
    fn agreement_names_nothing() {
        let (e, ctx) = ammonia();
        assert_eq!(named(e * 1.05, e, &ctx), None);
        assert_eq!(named(e, e, &ctx), None);
        // Near K = 1 the floor applies: ln K 0.01 against 0.08 agree.
        assert_eq!(named(0.01, 0.08, &CauseContext::new(T)), None);
    }

    #[test]
    fn reversed_is_named() {
        let (e, ctx) = ammonia();
        assert_eq!(named(-e, e, &ctx), Some(LikelyCause::Reversed));
    }

    #[test]
    fn each_scale_is_named() {
        let (e, ctx) = ammonia();
        for p in [2.0, 3.0, 0.5, 1.0 / 3.0] {
            assert_eq!(
                named(p * e, e, &ctx),
                Some(LikelyCause::Scaled(p)),
                "p = {p}"
            );
            assert_eq!(
                named(-p * e, e, &ctx),
                Some(LikelyCause::ReversedScaled(p)),
                "p = {p}"
            );
        }
    }

    #[test]
    fn kc_given_as_kp_is_named() {
        // The user has Kc in mol/L and writes it as Kp in bar.
        let (e, ctx) = ammonia();
        let kc_molar = ln_kc_molar_from_ln_k(e, -2.0, 0.0, T);
        let kp_bar_as_read = kc_molar;
        let stated = ln_k_from_kp(kp_bar_as_read + (-2.0) * 1e5f64.ln(), -2.0, 0.0);
        let ctx = ctx.with_form(StatedForm::Kp);
        match named(stated, e, &ctx) {
            Some(LikelyCause::KcGivenAsKp { convention, rt, .. }) => {
                assert_eq!(convention, RtConvention::LitreBar);
                // RT at 298.15 K = 24.79 L·bar/mol (IUPAC Green Book R).
                assert!((rt - 24.7896).abs() < 1e-3);
            }
            other => panic!("{other:?}"),
        }
        // The same value written as a bare K is the same mistake.
        let ctx = ctx.with_form(StatedForm::K);
        assert!(matches!(
            named(kc_molar, e, &ctx),
            Some(LikelyCause::KcGivenAsKp {
                convention: RtConvention::LitreBar,
                ..
            })
        ));
    }

    #[test]
    fn kp_given_as_kc_is_named_in_each_convention() {
        // N2O4 ⇌ 2 NO2, Δn(gas) = 1, K = 0.148 (NIST-JANAF ΔfG°, from memory).
        let e = 0.148f64.ln();
        let ctx = CauseContext::new(T)
            .with_dn(1.0, 0.0)
            .with_form(StatedForm::Kc);
        // Kp in bar written as Kc in mol/L.
        let kp_bar = e;
        let stated = ln_k_from_kc(kp_bar + 1000f64.ln(), 1.0, 0.0, T);
        assert!(matches!(
            named(stated, e, &ctx),
            Some(LikelyCause::KpGivenAsKc {
                convention: RtConvention::LitreBar,
                ..
            })
        ));
        // Kp in Pa written as Kc in mol/m^3.
        let kp_pa = e + 1e5f64.ln();
        let stated = ln_k_from_kc(kp_pa, 1.0, 0.0, T);
        assert!(matches!(
            named(stated, e, &ctx),
            Some(LikelyCause::KpGivenAsKc {
                convention: RtConvention::Si,
                ..
            })
        ));
        // Kp in atm written as Kc in mol/L: K = Kp(atm)·1.01325 for Δn = 1.
        let kp_atm = e - (101_325.0f64 / 1e5).ln();
        let stated = ln_k_from_kc(kp_atm + 1000f64.ln(), 1.0, 0.0, T);
        let tight = likely_cause(stated, e, &ctx, 1e-3);
        assert!(matches!(
            tight,
            Some(LikelyCause::KpGivenAsKc {
                convention: RtConvention::LitreAtm,
                ..
            })
        ));
    }

    #[test]
    fn log_confusions_are_named() {
        let (e, ctx) = ammonia();
        let ln10 = std::f64::consts::LN_10;
        assert_eq!(named(e / ln10, e, &ctx), Some(LikelyCause::Log10ReadAsLn));
        assert_eq!(named(e * ln10, e, &ctx), Some(LikelyCause::LnReadAsLog10));
    }

    #[test]
    fn kcal_kj_confusions_are_named() {
        // dG = -10 kcal/mol written as -10 kJ/mol: the expected K is computed
        // from -10 kJ/mol, the stated K is right.
        let read = -10_000.0;
        let ctx = CauseContext::new(T).with_energy(EnergyBasis::Gibbs { dg: read });
        let e = ln_k_from_dg(read, T);
        let s = ln_k_from_dg(read * 4.184, T);
        assert_eq!(named(s, e, &ctx), Some(LikelyCause::KcalReadAsKj));
        let s = ln_k_from_dg(read / 4.184, T);
        assert_eq!(named(s, e, &ctx), Some(LikelyCause::KjReadAsKcal));
        // Only ΔH° in kcal, ΔS° in J/(mol K).
        let (dh, ds) = (-20_000.0, -30.0);
        let ctx = CauseContext::new(T).with_energy(EnergyBasis::EnthalpyEntropy { dh, ds });
        let e = ln_k_from_dh_ds(dh, ds, T);
        let s = ln_k_from_dh_ds(dh * 4.184, ds, T);
        assert_eq!(named(s, e, &ctx), Some(LikelyCause::KcalReadAsKj));
        // Energies that did not produce the expected K cannot be blamed.
        let none = CauseContext::new(T);
        let s = ln_k_from_dg(-10_000.0 * 4.184, T);
        assert_eq!(named(s, ln_k_from_dg(-10_000.0, T), &none), None);
    }

    #[test]
    fn celsius_read_as_kelvin_is_named() {
        // K from ΔG°: "at 25" was meant as 25 °C.
        let dg = 20_000.0;
        let ctx = CauseContext::new(25.0).with_energy(EnergyBasis::Gibbs { dg });
        let s = ln_k_from_dg(dg, 298.15);
        let e = ln_k_from_dg(dg, 25.0);
        assert_eq!(
            named(s, e, &ctx),
            Some(LikelyCause::CelsiusReadAsKelvin { written: 25.0 })
        );
        // K carried by van 't Hoff to "100" that meant 100 °C.
        let carry = VantHoffCarry {
            ln_k0: 5.0,
            t0: 298.15,
            dh: -50_000.0,
            dcp: None,
        };
        let ctx = CauseContext::new(100.0).with_carry(carry);
        let s = ln_k_at(5.0, 298.15, -50_000.0, 373.15);
        let e = ln_k_at(5.0, 298.15, -50_000.0, 100.0);
        assert_eq!(
            named(s, e, &ctx),
            Some(LikelyCause::CelsiusReadAsKelvin { written: 100.0 })
        );
        // A plausible kelvin temperature is never suspected.
        let ctx = CauseContext::new(400.0).with_carry(carry);
        let e = ln_k_at(5.0, 298.15, -50_000.0, 400.0);
        let s = ln_k_at(5.0, 298.15, -50_000.0, 673.15);
        assert_eq!(named(s, e, &ctx), None);
    }

    #[test]
    fn atm_as_bar_is_named_under_a_tight_tolerance() {
        // K for a 1 atm standard state: K(bar) = K(atm)·1.01325^Δn.
        let (e, ctx) = ammonia();
        let stated = e - (-2.0) * (101_325.0f64 / 1e5).ln();
        assert_eq!(named(stated, e, &ctx), None, "below the default tolerance");
        assert_eq!(
            likely_cause(stated, e, &ctx, 1e-4),
            Some(LikelyCause::AtmAsBar { dn_gas: -2.0 })
        );
    }

    #[test]
    fn unrelated_factors_name_no_cause() {
        let (e, ctx) = ammonia();
        for stated in [
            e + 7f64.ln(),
            e * 1.6,
            e * 5.0,
            -0.7 * e,
            e + 1e4f64.ln(),
            0.0,
        ] {
            assert_eq!(named(stated, e, &ctx), None, "stated {stated}");
        }
        assert_eq!(named(f64::NAN, e, &ctx), None);
        assert_eq!(named(f64::INFINITY, e, &ctx), None);
    }

    #[test]
    fn messages_read_well() {
        assert!(LikelyCause::Scaled(0.5).message().contains("1/2"));
        let m = LikelyCause::KcGivenAsKp {
            convention: RtConvention::LitreBar,
            rt: 24.79,
            dn_gas: -2.0,
        }
        .message();
        assert!(m.contains("L·bar/mol") && m.contains("mol/L"), "{m}");
        let m = LikelyCause::CelsiusReadAsKelvin { written: 25.0 }.message();
        assert!(m.contains("298.15"), "{m}");
        for cause in [
            LikelyCause::Reversed,
            LikelyCause::KcalReadAsKj,
            LikelyCause::Log10ReadAsLn,
        ] {
            assert!(!cause.message().ends_with('.'));
        }
    }
}
