//! The rule catalogue: ids, default severities and the documentation that
//! `stoik explain` prints.
//!
//! Ids are a stable interface (CI configurations and suppression comments
//! name them); the catalogue may grow but an id never changes meaning.

use crate::diagnostic::Severity;

/// One rule of the catalogue.
#[derive(Debug)]
pub struct Rule {
    pub id: &'static str,
    pub default_severity: Severity,
    /// One line: what the rule finds.
    pub summary: &'static str,
    /// What it checks, why it matters, an example and how to fix it.
    pub doc: &'static str,
}

macro_rules! rule {
    ($id:literal, $sev:ident, $summary:literal, $doc:literal) => {
        Rule {
            id: $id,
            default_severity: Severity::$sev,
            summary: $summary,
            doc: $doc,
        }
    };
}

pub static RULES: &[Rule] = &[
    rule!(
        "syntax",
        Error,
        "text that does not parse",
        "What it finds: a line that is not a statement of the notation: an unknown
keyword, a missing `:` or arrow, a `+` without whitespace around it, an
unclosed string, a value that is not a number.

Why it matters: a line stoik cannot read is a line a simulator may read
differently, or not at all. The parser recovers at the next line, so every
error of the file is reported at once.

Example:
    reaction A + B <=> C        # missing `:` after `reaction`

Fix: follow the help line; `reaction: A + B <=> C`."
    ),
    rule!(
        "unknown-element",
        Error,
        "a symbol that is no element",
        "What it finds: a formula with a symbol that is none of the 118 elements.
Symbols are case-sensitive: `Co` is cobalt, `CO` carbon monoxide, `CL` nothing.

Why it matters: a mistyped symbol changes the composition, the molar mass and
the balance of every reaction that uses the species.

Example:
    reaction: H2 + CL2 <=> 2 HCl     # `CL2`: did you mean `Cl2`?

Fix: use the suggested symbol."
    ),
    rule!(
        "unknown-species",
        Error,
        "a name that is neither a declared alias nor a formula",
        "What it finds: a lowercase name in an equation or a mixture that no
`species ALIAS = FORMULA` declares.

Why it matters: stoik cannot know the composition of an undeclared name, so it
cannot check the balance or compute anything with it.

Example:
    reaction: glucose + 6 O2(g) -> 6 CO2(g) + 6 H2O(l)   # no `species glucose = ...`

Fix: declare the alias (`species glucose = C6H12O6(s)`) or write the formula."
    ),
    rule!(
        "unknown-attribute",
        Error,
        "an attribute name the statement does not take",
        "What it finds: an attribute that is not in the notation's tables for the
statement it belongs to (a species takes dHf, dGf, S, Cp, source; a reaction
takes K, Kc, Kp, logK, pK, dG, dH, dS, kf, kr, k, source).

Why it matters: a misspelt attribute is silently ignored by a lenient reader,
so its data never reaches the model.

Example:
    reaction: A <=> B
      dh = -41.2 kJ/mol      # did you mean `dH`?

Fix: use the suggested name."
    ),
    rule!(
        "element-balance",
        Error,
        "an element not conserved",
        "What it finds: an equation whose two sides hold different amounts of an
element. The message says which elements, by how much and on which side.

Why it matters: an unbalanced equation creates or destroys matter in every
simulation that uses it, and makes its K meaningless.

Example:
    reaction: H2(g) + O2(g) <=> H2O(g)    # O: 2 on the left, 1 on the right

Fix: when the species admit exactly one balance, the diagnostic carries it as
a fix (`2 H2(g) + O2(g) <=> 2 H2O(g)`); `stoik balance` prints it too."
    ),
    rule!(
        "charge-balance",
        Error,
        "charge not conserved (electrons count)",
        "What it finds: an equation whose two sides carry different total charge.
Electrons (`e-`) count as charge -1.

Why it matters: a reaction that creates charge violates electroneutrality and
breaks every aqueous or electrochemical calculation that uses it.

Example:
    reaction: Fe^3+ + e- <=> Fe^2+ + e-    # +2 on the left, +1 on the right

Fix: add the missing electrons or ions; the balance fix covers charge too."
    ),
    rule!(
        "third-body",
        Error,
        "`M` on one side only",
        "What it finds: the third body `M` written on one side of an equation but
not on the other.

Why it matters: `M` stands for any collision partner; it takes part in the
rate but is never consumed, so it must appear on both sides or neither.

Example:
    reaction: H + O2 + M -> HO2        # `M` missing on the right

Fix: write `H + O2 + M -> HO2 + M`."
    ),
    rule!(
        "resonance-arrow",
        Error,
        "`<->`/`↔` used as an equilibrium arrow",
        "What it finds: the resonance arrow `<->` or `↔` between two sides.

Why it matters: that arrow means resonance between structures, not a chemical
equilibrium; a reader cannot tell what was meant.

Example:
    reaction: N2O4(g) <-> 2 NO2(g)

Fix: use `<=>` (or `⇌`); the fix replaces the arrow."
    ),
    rule!(
        "unit-mismatch",
        Error,
        "a value whose dimension does not fit its attribute",
        "What it finds: a value whose unit has the wrong dimension for its
attribute: a Kc with pressure units, dH in J/(mol*K), a Kc whose unit is not
concentration^Δn or a Kp whose unit is not pressure^Δn(gas). The message spells
out the expected unit.

Why it matters: a unit of the wrong dimension means the number is not what the
attribute says; every conversion made from it is wrong.

Example:
    reaction: N2(g) + 3 H2(g) <=> 2 NH3(g)
      Kc = 0.5 bar^-2 at 700 K      # expected (mol/L)^-2, i.e. L^2/mol^2

Fix: give the value in the expected unit, or use the attribute that matches
(here `Kp`)."
    ),
    rule!(
        "missing-unit",
        Warning,
        "an energy, rate constant, concentration or temperature with no unit and no file default",
        "What it finds: a dimensional value written as a bare number where no
`units` statement gives a default for its kind.

Why it matters: kJ and kcal, K and °C, mol/L and mol/m3 differ by large factors;
a bare number invites the wrong one.

Example:
    reaction: A <=> B
      dH = -41.2                 # kJ/mol? kcal/mol?

Fix: add the unit (`dH = -41.2 kJ/mol`) or a file default
(`units energy = kJ/mol`)."
    ),
    rule!(
        "rate-units",
        Warning,
        "kf/kr unit not concentration^(1-order)/time for the reaction's order",
        "What it finds: a rate constant whose unit does not match the order of the
reaction, counted from the coefficients of the reactants (for kr, the
products), with `M` counted and pure condensed species and `hv` not.

Why it matters: a second-order constant given in 1/s is a different number
from the one a simulator expects.

Example:
    reaction: 2 NO2(g) -> 2 NO(g) + O2(g)
      k = 0.5 1/s                 # second order: expected L/(mol*s)

Fix: give the constant in the unit of its order."
    ),
    rule!(
        "lowercase-k",
        Warning,
        "a dimensionless `k` on a reversible reaction",
        "What it finds: a reversible reaction with a dimensionless `k`.

Why it matters: `k` is a rate constant and `K` an equilibrium constant; a
dimensionless `k` on an equilibrium is usually a K typed in lowercase, and would
be read as a forward rate constant.

Example:
    reaction: A <=> B
      k = 3.2

Fix: write `K = 3.2`, or give `k` its rate unit."
    ),
    rule!(
        "k-reverse-mismatch",
        Warning,
        "a reaction and its reverse whose K are not reciprocal",
        "What it finds: two reactions that are each other's reverse, with K values
whose product is not 1 (compared on ln K with the configured tolerance).

Why it matters: K of the reverse reaction is 1/K. One of the two values belongs
to the other direction, or is simply wrong.

Example:
    reaction f: A <=> B ; K = 10
    reaction r: B <=> A ; K = 10     # expected 0.1

Fix: invert one K (the fix offers it), or drop the redundant reaction."
    ),
    rule!(
        "k-scale-mismatch",
        Warning,
        "a reaction and a multiple of it whose K are not the matching power",
        "What it finds: a reaction that is a multiple of another (all coefficients
times n) whose K is not the other's K to the n-th power.

Why it matters: multiplying an equation by n raises K to the n: a K copied
from the equation with doubled coefficients is squared.

Example:
    reaction a: 2 SO2(g) + O2(g) <=> 2 SO3(g) ; K = 4.0e24
    reaction b: SO2(g) + 1/2 O2(g) <=> SO3(g) ; K = 4.0e24   # expected 2.0e12

Fix: raise K to the right power (the fix offers it)."
    ),
    rule!(
        "k-thermo-mismatch",
        Warning,
        "K disagrees with dG or with species formation data",
        "What it finds: a K that disagrees with ΔG° = -RT ln K, using the reaction's
own dG or the dGf (or dHf and S) of its species. When a common mistake explains
the factor, the message names it: reversed direction, coefficients scaled by 2,
3, 1/2 or 1/3, Kc given as Kp or the reverse, log10 read as ln, kcal/mol read as
kJ/mol, a °C temperature read as K, a 1 atm standard state used as 1 bar.

Why it matters: K and ΔG° are one fact said twice; when they disagree, at least
one of them is wrong, and the likely cause points at which.

Example:
    reaction: N2(g) + 3 H2(g) <=> 2 NH3(g)
      K  = 6.0e5 at 298.15 K
      dG = -33.0 kcal/mol    # ln K 55.7 from dG, 13.3 from K: kJ/mol written as kcal/mol

Fix: correct the value the cause names."
    ),
    rule!(
        "detailed-balance",
        Warning,
        "K ≠ kf/kr at the same temperature",
        "What it finds: a reversible reaction with kf, kr and K where kf/kr,
converted to the thermodynamic standard state, is not K.

Why it matters: a kinetic model whose rate constants contradict K drives a
mixture to the wrong equilibrium.

Example:
    reaction: A(aq) <=> B(aq)
      K  = 10
      kf = 2 1/s
      kr = 1 1/s        # kf/kr = 2, not 10

Fix: recompute kr from kf and K (or the reverse)."
    ),
    rule!(
        "cycle-inconsistent",
        Warning,
        "reactions that combine to zero whose K do not multiply out",
        "What it finds: a set of reactions whose equations, with multipliers, add up
to zero (or to another listed reaction), while their K do not combine the same
way (the Wegscheider condition). The message names the reactions, their
multipliers and the factor by which the cycle fails.

Where it points: one wrong K makes every cycle through it fail. The finding is
put on the reaction whose K the failing cycles agree on: if that one K were off
by the same factor in each of them, all of them would fail exactly as they do.
Such a reaction gets one finding, which writes out the shortest of its failing
cycles and counts (and points at) the others. A cycle that no shared error
explains is reported on the reaction that closes it, the last one read, since a
single cycle cannot tell which of its members is wrong.

Why it matters: around a closed cycle the product of the K (raised to their
multipliers) must be 1; otherwise the library implies a perpetual motion and no
set of concentrations satisfies every equilibrium at once.

Example:
    reaction r1: A <=> B ; K = 2
    reaction r2: B <=> C ; K = 3
    reaction r3: A <=> C ; K = 5     # r1 + r2 gives K = 6

Fix: correct the K that is wrong, or derive it from the others."
    ),
    rule!(
        "vant-hoff-mismatch",
        Warning,
        "K values at several temperatures that disagree with the stated dH",
        "What it finds: a K(T) table whose slope of ln K against 1/T implies a
reaction enthalpy different from the stated (or species-derived) dH.

Why it matters: van 't Hoff: d ln K / d(1/T) = -ΔH°/R. A table and a dH that
disagree cannot both be right, and K carried to other temperatures will differ.

Example:
    reaction: A <=> B
      K  = 10 at 300 K
      K  = 20 at 350 K
      dH = -50 kJ/mol    # the table implies +12.1 kJ/mol

Fix: check the sign and unit of dH, and the temperatures of the table."
    ),
    rule!(
        "k-temperature",
        Info,
        "K needed at a temperature it cannot be carried to",
        "What it finds: a reaction whose K is known at one temperature and needed at
another (a mixture's, or `stoik report --temperature`) with no dH, K(T) table
or species data to carry it there.

Why it matters: K depends on temperature; using it elsewhere unchanged is an
assumption that should be visible.

Fix: add `dH` (or species dHf), or a K at the needed temperature."
    ),
    rule!(
        "duplicate-reaction",
        Warning,
        "the same reaction stated twice",
        "What it finds: two reactions with the same equation, possibly reversed or
multiplied by a factor.

Why it matters: a simulator counts a duplicated reaction twice, doubling its
rate; and two copies drift apart when one is edited.

Fix: remove one, or merge their data."
    ),
    rule!(
        "use-error",
        Error,
        "a `use` path that is missing, outside the workspace, or cyclic",
        "What it finds: a `use \"path\"` whose file does not exist or cannot be read,
that leads outside the workspace root, or that closes a cycle of `use`.

Why it matters: the reactions and species of a missing file are silently
absent from the library.

Fix: correct the path (relative to the using file), or break the cycle."
    ),
    rule!(
        "unused-suppression",
        Info,
        "an allow comment that silences nothing",
        "What it finds: a `# stoik: allow RULE` comment whose statement (or file)
has no finding of that rule, or that names no known rule.

Why it matters: stale suppressions hide future findings that nobody has
looked at.

Fix: remove the comment, or the rule from it."
    ),
    rule!(
        "ambiguous-formula",
        Hint,
        "a species token that another reading could mean",
        "What it finds: a species written so that a chemist could read it two ways,
such as `SO42-` (read as SO42 with charge 1-, although sulfate SO4 with charge
2- may be meant). The message says how stoik read it.

Why it matters: a silently misread charge or count breaks the balance of every
reaction that uses the species, or worse, balances a wrong one.

Fix: write the charge with `^`: `SO4^2-`."
    ),
    rule!(
        "duplicate-label",
        Error,
        "a reaction label used twice",
        "What it finds: two reactions with the same label in a file and the files it
uses.

Why it matters: labels name reactions in reports, cycles and mixtures; two
reactions with one label make every such reference ambiguous.

Fix: rename one of them."
    ),
    rule!(
        "duplicate-species",
        Error,
        "a species or alias declared twice",
        "What it finds: a second `species` statement for the same alias or the same
formula and phase.

Why it matters: when two declarations disagree, which data is meant is
arbitrary.

Fix: merge the two declarations."
    ),
    rule!(
        "mixture",
        Error,
        "a mixture that cannot be solved as written",
        "What it finds: a mixture with no temperature, an amount without a volume, a
negative amount, a species no reaction uses, a unit that is neither
concentration, pressure nor amount, or no reaction whose K is known at its
temperature.

Why it matters: stoik cannot compute an equilibrium from a mixture it cannot
read, and says why instead of guessing.

Fix: follow the message; `temperature = 700 K` and every species with a unit."
    ),
];

/// The rule with this id, if any.
pub fn lookup(id: &str) -> Option<&'static Rule> {
    RULES.iter().find(|r| r.id == id)
}

/// The nearest rule ids to a misspelt one.
pub fn suggest(id: &str) -> Option<&'static str> {
    RULES
        .iter()
        .map(|r| (strsim::levenshtein(r.id, id), r.id))
        .min()
        .filter(|(d, _)| *d <= 3)
        .map(|(_, id)| id)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn every_rule_of_the_design_catalogue_exists() {
        // The ids of the design reference's catalogue (a stable interface).
        for id in [
            "syntax",
            "unknown-element",
            "unknown-species",
            "unknown-attribute",
            "element-balance",
            "charge-balance",
            "third-body",
            "resonance-arrow",
            "unit-mismatch",
            "missing-unit",
            "rate-units",
            "lowercase-k",
            "k-reverse-mismatch",
            "k-scale-mismatch",
            "k-thermo-mismatch",
            "detailed-balance",
            "cycle-inconsistent",
            "vant-hoff-mismatch",
            "k-temperature",
            "duplicate-reaction",
            "use-error",
            "unused-suppression",
        ] {
            assert!(lookup(id).is_some(), "{id} missing");
        }
    }

    #[test]
    fn ids_are_unique() {
        for (i, a) in RULES.iter().enumerate() {
            assert!(
                RULES[i + 1..].iter().all(|b| b.id != a.id),
                "{} twice",
                a.id
            );
        }
    }
}
