//! Physical dimensions as integer exponents over the five base quantities
//! chemistry needs: mass, length, time, amount of substance and temperature.
//!
//! A count of molecules is an amount (one molecule is 1/N_A mol), so
//! `cm3/(molecule*s)` and `L/(mol*s)` share a dimension. Dimensions are
//! spelled for messages in the units a chemist would write (`L/(mol*s)`,
//! `(mol/L)^2`, `J/(mol*K)`), not in SI base units.

use std::fmt;

/// Exponents over mass, length, time, amount and temperature.
///
/// Arithmetic saturates rather than overflowing; the unit parser keeps
/// exponents far below the limits with its own checks.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq, Hash)]
pub struct Dimension {
    pub mass: i32,
    pub length: i32,
    pub time: i32,
    pub amount: i32,
    pub temperature: i32,
}

impl Dimension {
    /// Builds a dimension from its exponents (mass, length, time, amount,
    /// temperature).
    pub const fn new(mass: i32, length: i32, time: i32, amount: i32, temperature: i32) -> Self {
        Dimension {
            mass,
            length,
            time,
            amount,
            temperature,
        }
    }

    pub const DIMENSIONLESS: Dimension = Dimension::new(0, 0, 0, 0, 0);
    pub const MASS: Dimension = Dimension::new(1, 0, 0, 0, 0);
    pub const LENGTH: Dimension = Dimension::new(0, 1, 0, 0, 0);
    pub const TIME: Dimension = Dimension::new(0, 0, 1, 0, 0);
    pub const AMOUNT: Dimension = Dimension::new(0, 0, 0, 1, 0);
    pub const TEMPERATURE: Dimension = Dimension::new(0, 0, 0, 0, 1);
    pub const VOLUME: Dimension = Dimension::new(0, 3, 0, 0, 0);
    pub const ENERGY: Dimension = Dimension::new(1, 2, -2, 0, 0);
    pub const PRESSURE: Dimension = Dimension::new(1, -1, -2, 0, 0);
    pub const CONCENTRATION: Dimension = Dimension::new(0, -3, 0, 1, 0);
    /// Energy per amount, as for ΔG°, ΔH° and activation energies.
    pub const MOLAR_ENERGY: Dimension = Dimension::new(1, 2, -2, -1, 0);
    /// Energy per amount and temperature, as for S° and Cp.
    pub const MOLAR_ENTROPY: Dimension = Dimension::new(1, 2, -2, -1, -1);

    /// True when every exponent is zero.
    pub const fn is_dimensionless(&self) -> bool {
        self.mass == 0
            && self.length == 0
            && self.time == 0
            && self.amount == 0
            && self.temperature == 0
    }

    /// The exponents in a fixed order: mass, length, time, amount, temperature.
    pub const fn exponents(&self) -> [i32; 5] {
        [
            self.mass,
            self.length,
            self.time,
            self.amount,
            self.temperature,
        ]
    }

    const fn from_exponents(e: [i32; 5]) -> Self {
        Dimension::new(e[0], e[1], e[2], e[3], e[4])
    }

    /// The largest absolute exponent, used to keep parsed units sane.
    pub fn max_abs_exponent(&self) -> i32 {
        self.exponents()
            .iter()
            .map(|e| e.saturating_abs())
            .max()
            .unwrap_or(0)
    }

    /// The product of two dimensions, or `None` on exponent overflow.
    pub fn checked_mul(self, other: Dimension) -> Option<Dimension> {
        let (a, b) = (self.exponents(), other.exponents());
        let mut out = [0; 5];
        for i in 0..5 {
            out[i] = a[i].checked_add(b[i])?;
        }
        Some(Dimension::from_exponents(out))
    }

    /// The quotient of two dimensions, or `None` on exponent overflow.
    pub fn checked_div(self, other: Dimension) -> Option<Dimension> {
        let (a, b) = (self.exponents(), other.exponents());
        let mut out = [0; 5];
        for i in 0..5 {
            out[i] = a[i].checked_sub(b[i])?;
        }
        Some(Dimension::from_exponents(out))
    }

    /// The dimension raised to an integer power, or `None` on overflow.
    pub fn checked_powi(self, n: i32) -> Option<Dimension> {
        let a = self.exponents();
        let mut out = [0; 5];
        for i in 0..5 {
            out[i] = a[i].checked_mul(n)?;
        }
        Some(Dimension::from_exponents(out))
    }

    /// The dimension raised to an integer power (saturating).
    pub fn powi(self, n: i32) -> Dimension {
        let a = self.exponents();
        Dimension::from_exponents(a.map(|e| e.saturating_mul(n)))
    }

    /// Concentration to the power `n`: the unit of Kc for Δn = `n`.
    pub fn concentration_pow(n: i32) -> Dimension {
        Dimension::CONCENTRATION.powi(n)
    }

    /// Pressure to the power `n`: the unit of Kp for Δn(gas) = `n`.
    pub fn pressure_pow(n: i32) -> Dimension {
        Dimension::PRESSURE.powi(n)
    }

    /// The dimension of a rate constant of overall order `order`:
    /// concentration^(1 - order) / time.
    pub fn rate_constant(order: i32) -> Dimension {
        Dimension::concentration_pow(1i32.saturating_sub(order)) / Dimension::TIME
    }

    /// The dimension in chemists' units, for messages: `(mol/L)^2`, `L/mol`,
    /// `L/(mol*s)`, `J/(mol*K)`, `bar^2`, `1/s`, `dimensionless`.
    ///
    /// Mass is explained as energy (J) or pressure (bar), whichever spells
    /// shorter; amount with length^-3 per mole as concentration (mol/L);
    /// remaining lengths in steps of three as L, otherwise as m.
    pub fn spell(&self) -> String {
        if self.is_dimensionless() {
            return "dimensionless".to_string();
        }
        let mut best: Option<Vec<(&'static str, i32)>> = None;
        for basis in [Basis::None, Basis::Energy, Basis::Pressure] {
            if let Some(factors) = self.factors(basis) {
                let better = match &best {
                    None => true,
                    Some(b) => factors.len() < b.len(),
                };
                if better {
                    best = Some(factors);
                }
            }
        }
        match best {
            Some(factors) => spell_factors(&factors),
            None => "dimensionless".to_string(),
        }
    }

    /// Splits the dimension into named unit factors under one basis for mass.
    fn factors(&self, basis: Basis) -> Option<Vec<(&'static str, i32)>> {
        let m = i64::from(self.mass);
        let mut length = i64::from(self.length);
        let mut time = i64::from(self.time);
        let amount = i64::from(self.amount);
        let mut named: Vec<(&'static str, i64)> = Vec::new();
        match basis {
            Basis::None => named.push(("kg", m)),
            Basis::Energy => {
                if m == 0 {
                    return None;
                }
                named.push(("J", m));
                length -= 2 * m;
                time += 2 * m;
            }
            Basis::Pressure => {
                if m == 0 {
                    return None;
                }
                named.push(("bar", m));
                length += m;
                time += 2 * m;
            }
        }
        if amount != 0 && length == -3 * amount {
            named.push(("mol", amount));
            named.push(("L", -amount));
        } else {
            named.push(("mol", amount));
            if length % 3 == 0 {
                named.push(("L", length / 3));
            } else {
                named.push(("m", length));
            }
        }
        named.push(("K", i64::from(self.temperature)));
        named.push(("s", time));
        let out: Vec<(&'static str, i32)> = named
            .into_iter()
            .filter(|(_, e)| *e != 0)
            .map(|(n, e)| (n, i32::try_from(e).unwrap_or(i32::MAX)))
            .collect();
        Some(out)
    }
}

#[derive(Clone, Copy)]
enum Basis {
    None,
    Energy,
    Pressure,
}

/// Writes factors as `num/den`, with the pure-concentration forms
/// `(mol/L)^n` and `(L/mol)^n` spelled as chemists write Kc units.
fn spell_factors(factors: &[(&'static str, i32)]) -> String {
    if let [("mol", a), ("L", l)] = factors
        && *a == -*l
    {
        return match *a {
            1 => "mol/L".to_string(),
            -1 => "L/mol".to_string(),
            n if n > 0 => format!("(mol/L)^{n}"),
            n => format!("(L/mol)^{}", -n),
        };
    }
    let power = |name: &str, e: i32| {
        if e == 1 {
            name.to_string()
        } else {
            format!("{name}^{e}")
        }
    };
    let num: Vec<String> = factors
        .iter()
        .filter(|(_, e)| *e > 0)
        .map(|(n, e)| power(n, *e))
        .collect();
    let den: Vec<String> = factors
        .iter()
        .filter(|(_, e)| *e < 0)
        .map(|(n, e)| power(n, -*e))
        .collect();
    let num_text = if num.is_empty() {
        "1".to_string()
    } else {
        num.join("*")
    };
    match den.len() {
        0 => num_text,
        1 => format!("{num_text}/{}", den[0]),
        _ => format!("{num_text}/({})", den.join("*")),
    }
}

impl fmt::Display for Dimension {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(&self.spell())
    }
}

impl std::ops::Mul for Dimension {
    type Output = Dimension;
    fn mul(self, rhs: Dimension) -> Dimension {
        let (a, b) = (self.exponents(), rhs.exponents());
        let mut out = [0; 5];
        for i in 0..5 {
            out[i] = a[i].saturating_add(b[i]);
        }
        Dimension::from_exponents(out)
    }
}

impl std::ops::Div for Dimension {
    type Output = Dimension;
    fn div(self, rhs: Dimension) -> Dimension {
        let (a, b) = (self.exponents(), rhs.exponents());
        let mut out = [0; 5];
        for i in 0..5 {
            out[i] = a[i].saturating_sub(b[i]);
        }
        Dimension::from_exponents(out)
    }
}

#[cfg(test)]
#[allow(clippy::unwrap_used)] // Tests may panic on a broken expectation.
mod tests {
    use super::*;

    #[test]
    fn kc_units_are_spelled_as_chemists_write_them() {
        // Common practice: Kc for Δn = 2 is quoted in (mol/L)^2, for Δn = -1
        // in L/mol.
        assert_eq!(Dimension::concentration_pow(2).spell(), "(mol/L)^2");
        assert_eq!(Dimension::concentration_pow(1).spell(), "mol/L");
        assert_eq!(Dimension::concentration_pow(-1).spell(), "L/mol");
        assert_eq!(Dimension::concentration_pow(-2).spell(), "(L/mol)^2");
        assert_eq!(Dimension::concentration_pow(0).spell(), "dimensionless");
    }

    #[test]
    fn rate_constant_units_follow_the_order() {
        // Common practice: first order 1/s, second order L/(mol*s).
        assert_eq!(Dimension::rate_constant(1).spell(), "1/s");
        assert_eq!(Dimension::rate_constant(2).spell(), "L/(mol*s)");
        assert_eq!(Dimension::rate_constant(3).spell(), "L^2/(mol^2*s)");
        assert_eq!(Dimension::rate_constant(0).spell(), "mol/(L*s)");
    }

    #[test]
    fn energies_and_pressures_are_named() {
        assert_eq!(Dimension::MOLAR_ENERGY.spell(), "J/mol");
        assert_eq!(Dimension::MOLAR_ENTROPY.spell(), "J/(mol*K)");
        assert_eq!(Dimension::pressure_pow(2).spell(), "bar^2");
        assert_eq!(Dimension::pressure_pow(-1).spell(), "1/bar");
        assert_eq!(Dimension::TEMPERATURE.spell(), "K");
        assert_eq!(Dimension::MASS.spell(), "kg");
        assert_eq!(Dimension::LENGTH.spell(), "m");
        assert_eq!(Dimension::VOLUME.spell(), "L");
    }

    #[test]
    fn arithmetic_adds_exponents() {
        let energy = Dimension::ENERGY;
        assert_eq!(energy / Dimension::AMOUNT, Dimension::MOLAR_ENERGY);
        assert_eq!(Dimension::LENGTH.checked_powi(3), Some(Dimension::VOLUME));
        assert_eq!(
            Dimension::AMOUNT * Dimension::VOLUME.powi(-1),
            Dimension::CONCENTRATION
        );
        assert_eq!(
            Dimension::new(i32::MAX, 0, 0, 0, 0).checked_mul(Dimension::MASS),
            None
        );
    }
}
