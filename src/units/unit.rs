//! A unit of measurement: a factor to SI, an affine offset (only for degrees
//! Celsius) and a dimension.

use super::dimension::Dimension;

/// A unit: a value `x` in this unit is `x * factor + offset` in SI.
///
/// `offset` is zero for every unit except degrees Celsius, which is a point
/// on a temperature scale rather than a multiple of kelvin.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Unit {
    /// The SI value of one of this unit (for degC, of one degree of
    /// difference).
    pub factor: f64,
    /// Added after scaling; 273.15 for degC, zero otherwise.
    pub offset: f64,
    pub dim: Dimension,
}

impl Unit {
    /// The unit of a pure number.
    pub const DIMENSIONLESS: Unit = Unit::linear(1.0, Dimension::DIMENSIONLESS);

    /// A unit that is a plain multiple of the SI unit of `dim`.
    pub const fn linear(factor: f64, dim: Dimension) -> Self {
        Unit {
            factor,
            offset: 0.0,
            dim,
        }
    }

    /// Converts a value in this unit to SI.
    pub fn to_si(&self, x: f64) -> f64 {
        x * self.factor + self.offset
    }

    /// Converts an SI value to this unit.
    pub fn from_si(&self, y: f64) -> f64 {
        (y - self.offset) / self.factor
    }

    /// True for a unit with an offset (degC), which cannot be multiplied,
    /// divided or raised to a power.
    pub fn is_affine(&self) -> bool {
        self.offset != 0.0
    }

    /// The product of two linear units; `None` if either is affine or the
    /// result overflows.
    pub fn checked_mul(&self, other: &Unit) -> Option<Unit> {
        if self.is_affine() || other.is_affine() {
            return None;
        }
        let factor = self.factor * other.factor;
        let dim = self.dim.checked_mul(other.dim)?;
        finite_unit(factor, dim)
    }

    /// The quotient of two linear units; `None` if either is affine or the
    /// result overflows.
    pub fn checked_div(&self, other: &Unit) -> Option<Unit> {
        if self.is_affine() || other.is_affine() {
            return None;
        }
        let factor = self.factor / other.factor;
        let dim = self.dim.checked_div(other.dim)?;
        finite_unit(factor, dim)
    }

    /// A linear unit to an integer power; `None` if the unit is affine or
    /// the result overflows.
    pub fn checked_powi(&self, n: i32) -> Option<Unit> {
        if self.is_affine() {
            return None;
        }
        let factor = self.factor.powi(n);
        let dim = self.dim.checked_powi(n)?;
        finite_unit(factor, dim)
    }
}

fn finite_unit(factor: f64, dim: Dimension) -> Option<Unit> {
    if factor.is_finite() && factor > 0.0 {
        Some(Unit::linear(factor, dim))
    } else {
        None
    }
}

#[cfg(test)]
#[allow(clippy::unwrap_used)] // Tests may panic on a broken expectation.
mod tests {
    use super::*;

    #[test]
    fn celsius_converts_with_its_offset() {
        // SI Brochure 9th ed. §2.3.1: t/°C = T/K - 273.15.
        let degc = Unit {
            factor: 1.0,
            offset: 273.15,
            dim: Dimension::TEMPERATURE,
        };
        assert!((degc.to_si(25.0) - 298.15).abs() < 1e-12);
        assert!((degc.from_si(373.15) - 100.0).abs() < 1e-12);
        assert!(degc.checked_mul(&Unit::DIMENSIONLESS).is_none());
    }

    #[test]
    fn products_overflow_to_none() {
        let big = Unit::linear(1e200, Dimension::LENGTH);
        assert!(big.checked_mul(&big).is_none());
        assert!(big.checked_powi(-2).is_none());
    }
}
