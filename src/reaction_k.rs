//! What a reaction's data imply for its equilibrium constant.
//!
//! A reaction can state K in many ways (K, Kc, Kp, logK, pK, dG, dH with dS,
//! kf with kr) and its species can imply it through formation data. This
//! module gathers every such source, converts each to the thermodynamic
//! ln K° at its own temperature (standard states: gases at 1 bar, solutes at
//! 1 mol/L, pure condensed phases at activity 1), and carries K to other
//! temperatures with the van 't Hoff equation (constant ΔH°, or constant ΔCp°
//! when every species has a heat capacity). The checks compare the sources
//! with one another; `report`, `solve` and the language server ask it for K
//! at the temperatures they need.

use crate::chem::formula::{Formula, Phase, SpeciesKind};
use crate::model::{KForm, Library, Loc, RateKind, RateLaw, Reaction, Side, SpeciesId};
use crate::thermo::{
    KTable, ln_k_at, ln_k_at_cp, ln_k_from_dg, ln_k_from_dh_ds, ln_k_from_kc, ln_k_from_kp,
};
use crate::units::Dimension;
use crate::units::constants::{GAS_CONSTANT, STANDARD_TEMPERATURE};

mod facts;
pub use facts::{Facts, FactsTable};

/// How a species enters the thermodynamic K.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Standard {
    /// Activity p/p°.
    Gas,
    /// Activity c/c°.
    Solute,
    /// A pure solid or liquid, or a photon, electron or third body:
    /// activity 1, not part of K.
    Unity,
}

/// The standard state of a species as stoik reads it: the phase tag when
/// written; otherwise a charged species is a solute and a neutral one a gas
/// (common practice in gas-phase and aqueous libraries respectively).
pub fn standard_of(lib: &Library, id: crate::model::SpeciesId) -> Standard {
    standard_of_formula(&lib.species(id).formula)
}

/// [`standard_of`] for a formula.
fn standard_of_formula(f: &Formula) -> Standard {
    match f.kind {
        SpeciesKind::Electron | SpeciesKind::ThirdBody | SpeciesKind::Photon => {
            return Standard::Unity;
        }
        SpeciesKind::Compound => {}
    }
    match f.phase {
        Some(Phase::Gas) => Standard::Gas,
        Some(Phase::Aqueous) => Standard::Solute,
        Some(Phase::Solid) | Some(Phase::Liquid) => Standard::Unity,
        None if f.charge != 0 => Standard::Solute,
        None => Standard::Gas,
    }
}

/// Δn over gases and over solutes (products minus reactants).
pub fn delta_n(lib: &Library, r: &Reaction) -> (f64, f64) {
    delta_n_with(r, &|s| standard_of(lib, s))
}

/// [`delta_n`] with each species' standard state from `standard`.
fn delta_n_with(r: &Reaction, standard: &impl Fn(SpeciesId) -> Standard) -> (f64, f64) {
    let mut gas = 0.0;
    let mut aq = 0.0;
    for &(s, c) in r.net() {
        let c = *c.numer() as f64 / *c.denom() as f64;
        match standard(s) {
            Standard::Gas => gas += c,
            Standard::Solute => aq += c,
            Standard::Unity => {}
        }
    }
    (gas, aq)
}

/// Where a value of ln K came from.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum Origin {
    Stated(KForm),
    Gibbs,
    EnthalpyEntropy,
    Rates,
    /// Species formation Gibbs energies.
    SpeciesGibbs,
    /// Species formation enthalpies and entropies.
    SpeciesEnthalpyEntropy,
}

impl Origin {
    pub fn describe(self) -> &'static str {
        match self {
            Origin::Stated(KForm::K) => "K",
            Origin::Stated(KForm::Kc) => "Kc",
            Origin::Stated(KForm::Kp) => "Kp",
            Origin::Stated(KForm::LogK) => "logK",
            Origin::Stated(KForm::PK) => "pK",
            Origin::Gibbs => "dG",
            Origin::EnthalpyEntropy => "dH and dS",
            Origin::Rates => "kf/kr",
            Origin::SpeciesGibbs => "species dGf",
            Origin::SpeciesEnthalpyEntropy => "species dHf and S",
        }
    }
}

/// One value of ln K° at one temperature.
#[derive(Clone, Copy, Debug)]
pub struct Point {
    pub t: f64,
    pub ln_k: f64,
    pub origin: Origin,
    /// The attribute it came from (the reaction header for species data).
    pub loc: Loc,
    /// For stated K values, the index into `Reaction::k`.
    pub k_index: Option<usize>,
}

/// Where ΔH° came from.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum EnthalpyOrigin {
    Stated,
    Species,
    Table,
}

/// Every source of K of one reaction, in thermodynamic form.
#[derive(Clone, Debug)]
pub struct ReactionK {
    pub dn_gas: f64,
    pub dn_aq: f64,
    /// Stated K, Kc, Kp, logK, pK values.
    pub stated: Vec<Point>,
    /// From the reaction's dG values.
    pub gibbs: Vec<Point>,
    /// From dH and dS at the dH temperature.
    /// Boxed, as is `species`: most reactions of a large library have
    /// neither, and inline they made every K model 80 bytes larger.
    pub enthalpy_entropy: Option<Box<Point>>,
    /// From kf/kr pairs.
    pub rates: Vec<Point>,
    /// From species formation data at 298.15 K.
    pub species: Option<Box<Point>>,
    /// ΔH° (J/mol) at `dh_t`, and where it came from.
    pub dh: Option<(f64, f64, EnthalpyOrigin)>,
    /// ΔrH° from species dHf alone, when every species has it.
    pub species_dh: Option<f64>,
    /// ΔrS° from the stated dS or species S°.
    pub ds: Option<f64>,
    /// ΔCp° (J/(mol K)) when every species has Cp.
    pub dcp: Option<f64>,
    /// Stated dS: kept to carry ΔG with ΔH.
    pub stated_ds: Option<f64>,
}

/// Why K cannot be given at a temperature.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum Unknown {
    /// The reaction has no K data at all.
    NoData,
    /// K is known only at `known_t` and nothing carries it elsewhere.
    NoTemperatureDependence { known_t: f64 },
}

/// How K at a temperature was obtained.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Estimate {
    pub ln_k: f64,
    pub origin: Origin,
    /// True when carried from another temperature.
    pub carried: bool,
}

fn ratio_f64(r: num_rational::Ratio<i64>) -> f64 {
    *r.numer() as f64 / *r.denom() as f64
}

/// A sum over the species of ν·value, using the formation conventions for
/// reference elements, H+(aq) and the electron; `None` when a value is missing.
fn species_sum(
    r: &Reaction,
    facts: &impl Fn(SpeciesId) -> Facts,
    get: impl Fn(&Facts) -> Option<f64>,
    reference_zero: impl Fn(&Facts) -> bool,
) -> Option<f64> {
    let mut total = 0.0;
    for &(s, nu) in r.net() {
        let nu = ratio_f64(nu);
        let f = facts(s);
        if !f.counted {
            continue;
        }
        let v = match get(&f) {
            Some(v) => v,
            None if reference_zero(&f) => 0.0,
            None => return None,
        };
        total += nu * v;
    }
    Some(total)
}

/// True for an element in its standard reference state (ΔfH° = ΔfG° = 0).
pub fn is_reference_element(sp: &crate::model::Species) -> bool {
    let f = &sp.formula;
    if f.kind == SpeciesKind::Electron {
        return true;
    }
    if f.kind != SpeciesKind::Compound || f.charge != 0 || f.composition.len() != 1 {
        return false;
    }
    let (z, n) = f.composition[0];
    let n = ratio_f64(n);
    let phase = f.phase;
    // Diatomic gases, the two liquids, iodine, and every other element as its
    // stable solid (atoms counted one).
    match (z, n, phase) {
        (1 | 7 | 8 | 9 | 17, 2.0, Some(Phase::Gas) | None) => true,
        (35, 2.0, Some(Phase::Liquid)) => true,
        (53, 2.0, Some(Phase::Solid)) => true,
        (80, 1.0, Some(Phase::Liquid)) => true,
        (2 | 10 | 18 | 36 | 54 | 86, 1.0, Some(Phase::Gas) | None) => true,
        (1 | 7 | 8 | 9 | 17 | 35 | 53 | 80 | 2 | 10 | 18 | 36 | 54 | 86, _, _) => false,
        (_, 1.0, Some(Phase::Solid)) => true,
        _ => false,
    }
}

/// True for H+(aq), whose ΔfG° and ΔfH° are zero by convention.
fn is_proton(sp: &crate::model::Species) -> bool {
    let f = &sp.formula;
    f.kind == SpeciesKind::Compound
        && f.charge == 1
        && f.composition.len() == 1
        && f.composition[0].0 == 1
        && ratio_f64(f.composition[0].1) == 1.0
        && matches!(f.phase, Some(Phase::Aqueous) | None)
}

fn zero_by_convention(sp: &crate::model::Species) -> bool {
    is_reference_element(sp) || is_proton(sp)
}

/// The concentration dimension a Kc must have, and the pressure-based one
/// a Kp must have, for this reaction.
pub fn kc_dimension(dn_gas: f64, dn_aq: f64) -> Option<Dimension> {
    let n = dn_gas + dn_aq;
    (n.fract() == 0.0).then(|| Dimension::CONCENTRATION.powi(n as i32))
}

pub fn kp_dimension(dn_gas: f64, dn_aq: f64) -> Option<Dimension> {
    if dn_gas.fract() != 0.0 || dn_aq.fract() != 0.0 {
        return None;
    }
    Some(
        Dimension::PRESSURE
            .powi(dn_gas as i32)
            .checked_mul(Dimension::CONCENTRATION.powi(dn_aq as i32))
            .unwrap_or(Dimension::DIMENSIONLESS),
    )
}

/// The rate constant of a law at a temperature, SI.
pub fn rate_at(law: &RateLaw, t: f64) -> f64 {
    match *law {
        RateLaw::Constant(k) => k,
        RateLaw::Arrhenius { a, n, ea } => a * t.powf(n) * (-ea / (GAS_CONSTANT * t)).exp(),
    }
}

/// The order of a reaction in one direction: the sum of the coefficients
/// of that side, third bodies counted, condensed species, photons and
/// electrons not.
pub fn order(lib: &Library, r: &Reaction, side: Side) -> f64 {
    r.terms
        .iter()
        .filter(|t| t.side == side)
        .filter(|t| {
            let sp = lib.species(t.species);
            match sp.formula.kind {
                SpeciesKind::ThirdBody => true,
                SpeciesKind::Photon | SpeciesKind::Electron => false,
                SpeciesKind::Compound => standard_of(lib, t.species) != Standard::Unity,
            }
        })
        .map(|t| ratio_f64(t.coefficient))
        .sum()
}

impl ReactionK {
    /// Gather every K source of reaction `r`. Bare Kc and Kp numbers are read
    /// in mol/L and bar (the caller reports their missing units).
    pub fn of(lib: &Library, r: &Reaction) -> ReactionK {
        Self::of_with(r, &|s| Facts::of(lib.species(s)))
    }

    /// [`ReactionK::of`] with the species' facts from a table made once
    /// for the whole library, for gathering the sources of every reaction.
    pub fn of_packed(r: &Reaction, table: &FactsTable) -> ReactionK {
        Self::of_with(r, &|s| table.get(s))
    }

    fn of_with(r: &Reaction, facts: &impl Fn(SpeciesId) -> Facts) -> ReactionK {
        let (dn_gas, dn_aq) = delta_n_with(r, &|s| facts(s).standard);
        let mut stated = Vec::new();
        for (i, k) in r.k.iter().enumerate() {
            let Some(ln_si) = k.ln_si else { continue };
            let ln_k = match k.form {
                KForm::K | KForm::LogK | KForm::PK => ln_si,
                KForm::Kc => {
                    let ln = match k.dimension {
                        Some(_) => ln_si,
                        // (mol/L)^Δn in SI: one mol/L is 1000 mol/m3.
                        None => ln_si + (dn_gas + dn_aq) * 1000f64.ln(),
                    };
                    ln_k_from_kc(ln, dn_gas, dn_aq, k.at_k)
                }
                KForm::Kp => {
                    let ln = match k.dimension {
                        Some(_) => ln_si,
                        // bar^Δn(gas) (mol/L)^Δn(aq) in SI.
                        None => ln_si + dn_gas * 1e5f64.ln() + dn_aq * 1000f64.ln(),
                    };
                    ln_k_from_kp(ln, dn_gas, dn_aq)
                }
            };
            if ln_k.is_finite() {
                stated.push(Point {
                    t: k.at_k,
                    ln_k,
                    origin: Origin::Stated(k.form),
                    loc: k.loc,
                    k_index: Some(i),
                });
            }
        }
        let gibbs =
            r.dg.iter()
                .map(|d| Point {
                    t: d.at_k,
                    ln_k: ln_k_from_dg(d.value, d.at_k),
                    origin: Origin::Gibbs,
                    loc: d.loc,
                    k_index: None,
                })
                .collect();
        let stated_ds = r.ds.first().map(|d| d.value);
        let species_dh = species_sum(r, facts, |f| f.dhf, |f| f.zero_formation);
        let species_dg = species_sum(r, facts, |f| f.dgf, |f| f.zero_formation);
        // Entropies of elements are not zero, so every species needs S
        // (the electron and H+(aq) are zero by convention).
        let species_s = species_sum(r, facts, |f| f.s, |f| f.zero_entropy);
        let dcp = species_sum(r, facts, |f| f.cp, |f| f.zero_heat_capacity)
            .filter(|_| r.terms.iter().all(|t| facts(t.species).heat_capacity_known));
        let dh = match r.dh.first() {
            Some(d) => Some((d.value, d.at_k, EnthalpyOrigin::Stated)),
            None => species_dh.map(|v| (v, STANDARD_TEMPERATURE, EnthalpyOrigin::Species)),
        };
        let enthalpy_entropy = match (r.dh.first(), stated_ds) {
            (Some(h), Some(s)) => Some(Box::new(Point {
                t: h.at_k,
                ln_k: ln_k_from_dh_ds(h.value, s, h.at_k),
                origin: Origin::EnthalpyEntropy,
                loc: h.loc,
                k_index: None,
            })),
            _ => None,
        };
        let species = match (species_dg, species_dh, species_s) {
            (Some(g), _, _) => Some((ln_k_from_dg(g, STANDARD_TEMPERATURE), Origin::SpeciesGibbs)),
            (None, Some(h), Some(s)) => Some((
                ln_k_from_dh_ds(h, s, STANDARD_TEMPERATURE),
                Origin::SpeciesEnthalpyEntropy,
            )),
            _ => None,
        }
        // Only when some species carries formation data, so that reactions
        // of reference elements alone do not count as "from species".
        .filter(|_| {
            r.terms.iter().any(|t| {
                let f = facts(t.species);
                f.dgf.is_some() || f.dhf.is_some()
            })
        })
        .map(|(ln_k, origin)| {
            Box::new(Point {
                t: STANDARD_TEMPERATURE,
                ln_k,
                origin,
                loc: r.loc,
                k_index: None,
            })
        });
        let mut rates = Vec::new();
        let forward: Vec<_> = r
            .rates
            .iter()
            .filter(|x| x.kind == RateKind::Forward)
            .collect();
        let reverse: Vec<_> = r
            .rates
            .iter()
            .filter(|x| x.kind == RateKind::Reverse)
            .collect();
        if r.reversible() {
            for f in &forward {
                for b in &reverse {
                    // Compare at the temperature they share; an Arrhenius law
                    // holds at any temperature.
                    let t = match (&f.law, &b.law) {
                        (RateLaw::Constant(_), RateLaw::Constant(_)) if f.at_k != b.at_k => {
                            continue;
                        }
                        (RateLaw::Constant(_), _) => f.at_k,
                        (_, RateLaw::Constant(_)) => b.at_k,
                        _ => r.k.first().map(|k| k.at_k).unwrap_or(STANDARD_TEMPERATURE),
                    };
                    let kf = rate_at(&f.law, t);
                    let kr = rate_at(&b.law, t);
                    if kf > 0.0 && kr > 0.0 {
                        // Rate constants are concentration-based: kf/kr is Kc.
                        let mut ln_kc = (kf / kr).ln();
                        if f.dimension.is_none() && b.dimension.is_none() {
                            ln_kc += (dn_gas + dn_aq) * 1000f64.ln();
                        }
                        rates.push(Point {
                            t,
                            ln_k: ln_k_from_kc(ln_kc, dn_gas, dn_aq, t),
                            origin: Origin::Rates,
                            loc: b.loc,
                            k_index: None,
                        });
                    }
                }
            }
        }
        let ds = stated_ds.or(species_s);
        // One K model is kept per reaction; pushing left room to spare.
        stated.shrink_to_fit();
        rates.shrink_to_fit();
        ReactionK {
            dn_gas,
            dn_aq,
            stated,
            gibbs,
            enthalpy_entropy,
            rates,
            species,
            dh,
            species_dh,
            ds,
            dcp,
            stated_ds,
        }
    }

    /// True when nothing gives K.
    pub fn is_empty(&self) -> bool {
        self.stated.is_empty()
            && self.gibbs.is_empty()
            && self.enthalpy_entropy.is_none()
            && self.rates.is_empty()
            && self.species.is_none()
    }

    /// ln K carried from a point to `t` with ΔH° (and ΔCp°), if possible.
    pub fn carry(&self, p: &Point, t: f64) -> Option<f64> {
        if (p.t - t).abs() < 1e-9 {
            return Some(p.ln_k);
        }
        let (dh, dh_t, _) = self.dh?;
        let dh_at_p = match self.dcp {
            Some(dcp) => crate::thermo::dh_at(dh, dh_t, dcp, p.t),
            None => dh,
        };
        Some(match self.dcp {
            Some(dcp) => ln_k_at_cp(p.ln_k, p.t, dh_at_p, dcp, t),
            None => ln_k_at(p.ln_k, p.t, dh_at_p, t),
        })
    }

    /// The best estimate of ln K° at `t`.
    ///
    /// Stated constants come first (interpolated in ln K against 1/T when
    /// there are several temperatures), then the reaction's energies, then
    /// species data, then rate constants.
    pub fn ln_k_at(&self, t: f64) -> Result<Estimate, Unknown> {
        let groups: [&[Point]; 3] = [&self.stated, &self.gibbs, &self.rates];
        // A value stated at the very temperature wins over any carried one.
        for points in &groups[..2] {
            if let Some(p) = points.iter().find(|p| (p.t - t).abs() < 1e-9) {
                return Ok(Estimate {
                    ln_k: p.ln_k,
                    origin: p.origin,
                    carried: false,
                });
            }
        }
        let mut first_known: Option<f64> = None;
        for (i, points) in groups.iter().enumerate() {
            if i == 2 {
                // Energies of other kinds come before rate constants.
                if let Some(e) = self.energies_at(t) {
                    return Ok(e);
                }
            }
            if points.is_empty() {
                continue;
            }
            if let Some(p) = points.iter().find(|p| (p.t - t).abs() < 1e-9) {
                return Ok(Estimate {
                    ln_k: p.ln_k,
                    origin: p.origin,
                    carried: false,
                });
            }
            let mut temps: Vec<(f64, f64)> = Vec::new();
            for p in points.iter() {
                if !temps.iter().any(|(pt, _)| (pt - p.t).abs() < 1e-9) {
                    temps.push((p.t, p.ln_k));
                }
            }
            // A table of several temperatures is the data itself: interpolate
            // it in ln K against 1/T; otherwise carry the nearest point.
            if temps.len() >= 2
                && let Ok(table) = KTable::new(&temps)
            {
                return Ok(Estimate {
                    ln_k: table.ln_k(t),
                    origin: points[0].origin,
                    carried: true,
                });
            }
            let nearest = points
                .iter()
                .min_by(|a, b| (a.t - t).abs().total_cmp(&(b.t - t).abs()));
            if let Some(p) = nearest
                && let Some(ln_k) = self.carry(p, t)
            {
                return Ok(Estimate {
                    ln_k,
                    origin: p.origin,
                    carried: true,
                });
            }
            first_known.get_or_insert(points[0].t);
        }
        match first_known {
            Some(known_t) => Err(Unknown::NoTemperatureDependence { known_t }),
            None => Err(Unknown::NoData),
        }
    }

    fn energies_at(&self, t: f64) -> Option<Estimate> {
        if let Some(p) = &self.enthalpy_entropy {
            let (dh, _, _) = self.dh?;
            let ds = self.stated_ds?;
            let _ = p;
            return Some(Estimate {
                ln_k: ln_k_from_dh_ds(dh, ds, t),
                origin: Origin::EnthalpyEntropy,
                carried: true,
            });
        }
        let p = *self.species.as_deref()?;
        if let (Some((dh, _, EnthalpyOrigin::Species)), Some(ds)) = (self.dh, self.ds)
            && p.origin == Origin::SpeciesEnthalpyEntropy
        {
            let ln_k = match self.dcp {
                Some(dcp) => ln_k_at_cp(p.ln_k, p.t, dh, dcp, t),
                None => ln_k_from_dh_ds(dh, ds, t),
            };
            return Some(Estimate {
                ln_k,
                origin: p.origin,
                carried: (t - p.t).abs() > 1e-9,
            });
        }
        let ln_k = self.carry(&p, t)?;
        Some(Estimate {
            ln_k,
            origin: p.origin,
            carried: (t - p.t).abs() > 1e-9,
        })
    }

    /// ΔrH° at `t` in J/mol, when known.
    pub fn dh_at(&self, t: f64) -> Option<f64> {
        if let Some((dh, t0, _)) = self.dh {
            return Some(match self.dcp {
                Some(dcp) => crate::thermo::dh_at(dh, t0, dcp, t),
                None => dh,
            });
        }
        let mut temps: Vec<(f64, f64)> = self.stated.iter().map(|p| (p.t, p.ln_k)).collect();
        temps.dedup_by(|a, b| (a.0 - b.0).abs() < 1e-9);
        KTable::new(&temps).ok().map(|table| table.dh(t))
    }
}
