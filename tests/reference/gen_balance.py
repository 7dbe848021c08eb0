#!/usr/bin/env python3
"""Reference balances for stoik's equation balancer, computed with sympy.

Builds at least 200 equations (hand-picked textbook and redox equations
plus randomly generated ones with a fixed seed), each species as an explicit
structure (element counts, nested groups, hydrate parts, charge) whose
composition is computed here, rendered as formula text in one of several
spellings of the stoik notation (ASCII or Unicode subscript counts, `()` or
`[]` groups, `·` or `*` hydrate dots, `^2+`, `+2`, `²⁺` or monatomic
shorthand charges). The expected outcome comes from sympy's exact
`Matrix.nullspace()`; the classification of failures mirrors the one
documented in src/chem/balance.rs. The result goes to
tests/reference/data/balance_cases.json, which tests/chem_reference.rs reads.

    python tests/reference/gen_balance.py           # regenerate
    python tests/reference/gen_balance.py --check   # compare, exit 1 on a difference

Needs sympy and periodictable (PyPI); does not need stoik.
"""

import json
import pathlib
import random
import sys
from fractions import Fraction
from math import gcd, lcm

import periodictable
import sympy

OUT = pathlib.Path(__file__).resolve().parent / "data" / "balance_cases.json"
SUB = str.maketrans("0123456789", "₀₁₂₃₄₅₆₇₈₉")
SUP = str.maketrans("0123456789+-", "⁰¹²³⁴⁵⁶⁷⁸⁹⁺⁻")


def z_of(symbol):
    return periodictable.elements.symbol(symbol).number


# A species structure: {"kind", "parts": [(multiplier, units)], "charge"}.
# A unit is ("el", symbol, count) or ("group", units, count).


def tree(text):
    """Turns a plain neutral formula such as `K4[Fe(CN)6]` into units.

    Only a construction helper for the hand-picked species; the texts that
    stoik reads are rendered from the resulting structure.
    """
    pos = 0

    def number():
        nonlocal pos
        start = pos
        while pos < len(text) and text[pos].isdigit():
            pos += 1
        return int(text[start:pos]) if pos > start else 1

    def units(close):
        nonlocal pos
        out = []
        while pos < len(text) and text[pos] != close:
            c = text[pos]
            if c in "([":
                pos += 1
                inner = units(")" if c == "(" else "]")
                pos += 1
                out.append(("group", inner, number(), c))
            else:
                sym = c
                pos += 1
                if pos < len(text) and text[pos].islower():
                    sym += text[pos]
                    pos += 1
                z_of(sym)
                out.append(("el", sym, number()))
        return out

    return units(None)


def species(text, charge=0):
    parts = []
    for i, piece in enumerate(text.split("*")):
        mult = Fraction(1)
        j = 0
        while i > 0 and j < len(piece) and (piece[j].isdigit() or piece[j] == "."):
            j += 1
        if j:
            mult = Fraction(piece[:j])
        parts.append((mult, tree(piece[j:])))
    return {"kind": "compound", "parts": parts, "charge": charge}


ELECTRON = {"kind": "electron", "parts": [], "charge": -1}
THIRD_BODY = {"kind": "third_body", "parts": [], "charge": 0}
PHOTON = {"kind": "photon", "parts": [], "charge": 0}


def composition(sp):
    total = {}

    def walk(units, factor):
        for u in units:
            if u[0] == "el":
                total[u[1]] = total.get(u[1], 0) + factor * u[2]
            else:
                walk(u[1], factor * u[2])

    for mult, units in sp["parts"]:
        walk(units, Fraction(mult))
    return total


def render(sp, rng):
    """One spelling of the species, chosen at random among the valid ones."""
    if sp["kind"] == "electron":
        return rng.choice(["e-", "e^-", "e⁻"])
    if sp["kind"] == "third_body":
        return "M"
    if sp["kind"] == "photon":
        return "hv"
    subscript = rng.random() < 0.25
    dot = rng.choice(["·", "*"])

    def count(n):
        if n == 1:
            return ""
        return str(n).translate(SUB) if subscript else str(n)

    def units_text(units):
        out = ""
        for u in units:
            if u[0] == "el":
                out += u[1] + count(u[2])
            else:
                bracket = u[3] if rng.random() < 0.7 else rng.choice("([")
                close = ")" if bracket == "(" else "]"
                out += bracket + units_text(u[1]) + close + count(u[2])
        return out

    body = ""
    for i, (mult, units) in enumerate(sp["parts"]):
        if i:
            body += dot
            if mult != 1:
                body += str(mult.numerator) if mult.denominator == 1 else str(float(mult))
        body += units_text(units)
    q = sp["charge"]
    if q == 0:
        return body
    sign = "+" if q > 0 else "-"
    mag = abs(q)
    parts = sp["parts"]
    monatomic = len(parts) == 1 and len(parts[0][1]) == 1 and parts[0][1][0][0] == "el"
    last = parts[-1][1][-1]
    ends_with_ascii_count = not subscript and last[2] != 1
    styles = ["caret", "trailing", "super"]
    if monatomic and parts[0][1][0][2] == 1:
        styles.append("shorthand")
    style = rng.choice(styles)
    if style == "caret":
        return body + "^" + ("" if mag == 1 else str(mag)) + sign
    if style == "super":
        return body + (("" if mag == 1 else str(mag)) + sign).translate(SUP)
    if style == "shorthand":
        return body + ("" if mag == 1 else str(mag)) + sign
    # A bare trailing sign after the count of a lone element would read the
    # count as the charge, so the magnitude is always written there.
    if mag == 1 and not (monatomic and ends_with_ascii_count) and rng.random() < 0.6:
        return body + sign
    return body + sign + str(mag)


def classify(specs, n_left):
    n = len(specs)
    active = [i for i in range(n) if specs[i]["kind"] not in ("third_body", "photon")]
    for side, test in (("left", lambda i: i < n_left), ("right", lambda i: i >= n_left)):
        if not any(test(i) for i in active):
            return {"kind": "empty_side", "side": side}
    comps = [composition(s) for s in specs]
    symbols = sorted({e for i in active for e in comps[i]}, key=z_of)
    for sym in symbols:
        left = any(i < n_left and comps[i].get(sym, 0) != 0 for i in active)
        right = any(i >= n_left and comps[i].get(sym, 0) != 0 for i in active)
        if left != right:
            return {"kind": "one_sided", "z": z_of(sym), "side": "left" if left else "right"}

    def sign(i):
        return 1 if i < n_left else -1

    rows = [[sympy.Rational(comps[i].get(sym, 0).numerator, comps[i].get(sym, 0).denominator) * sign(i)
             if isinstance(comps[i].get(sym, 0), Fraction) else comps[i].get(sym, 0) * sign(i)
             for i in active] for sym in symbols]
    charge_row = [specs[i]["charge"] * sign(i) for i in active]
    basis = sympy.Matrix(rows + [charge_row]).nullspace()
    if len(basis) == 0:
        elements_only = sympy.Matrix(rows).nullspace() if rows else [None] * len(active)
        return {"kind": "charge" if elements_only else "none"}
    if len(basis) >= 2:
        return {"kind": "not_unique", "independent": len(basis)}
    v = list(basis[0])
    den = lcm(*[int(sympy.fraction(x)[1]) for x in v])
    ints = [int(x * den) for x in v]
    g = 0
    for x in ints:
        g = gcd(g, x)
    ints = [x // g for x in ints]
    zero = [active[k] for k, x in enumerate(ints) if x == 0]
    if zero:
        return {"kind": "left_out", "species": zero}
    neg = sum(1 for x in ints if x < 0)
    pos = len(ints) - neg
    flip = neg > pos or (neg == pos and ints[0] < 0)
    wrong = [active[k] for k, x in enumerate(ints) if (x < 0) != flip]
    if wrong:
        return {"kind": "wrong_side", "species": wrong}
    coefficients = [1] * n
    for k, i in enumerate(active):
        coefficients[i] = abs(ints[k])
    return {"kind": "unique", "coefficients": coefficients}


S = species
HAND = [
    # The ferrocyanide-permanganate equation (from memory: 10, 122, 299,
    # 162, 5, 122, 60, 60, 188).
    ([S("K4[Fe(CN)6]"), S("KMnO4"), S("H2SO4")],
     [S("KHSO4"), S("Fe2(SO4)3"), S("MnSO4"), S("HNO3"), S("CO2"), S("H2O")]),
    ([S("Fe"), S("O2")], [S("Fe2O3")]),
    ([S("C3H8"), S("O2")], [S("CO2"), S("H2O")]),
    ([S("C8H18"), S("O2")], [S("CO2"), S("H2O")]),
    ([S("C6H12O6"), S("O2")], [S("CO2"), S("H2O")]),
    ([S("NH3"), S("O2")], [S("NO"), S("H2O")]),
    ([S("N2"), S("H2")], [S("NH3")]),
    ([S("Ca3(PO4)2"), S("SiO2"), S("C")], [S("CaSiO3"), S("P4"), S("CO")]),
    ([S("Cu"), S("HNO3")], [S("Cu(NO3)2"), S("NO"), S("H2O")]),
    ([S("KMnO4"), S("HCl")], [S("KCl"), S("MnCl2"), S("Cl2"), S("H2O")]),
    ([S("K2Cr2O7"), S("HCl")], [S("KCl"), S("CrCl3"), S("Cl2"), S("H2O")]),
    ([S("(NH4)2Cr2O7")], [S("Cr2O3"), S("N2"), S("H2O")]),
    ([S("Al"), S("H2SO4")], [S("Al2(SO4)3"), S("H2")]),
    ([S("[Co(NH3)5Cl]Cl2"), S("AgNO3")], [S("[Co(NH3)5Cl](NO3)2"), S("AgCl")]),
    # Hydrates.
    ([S("CuSO4*5H2O")], [S("CuSO4"), S("H2O")]),
    ([S("CaSO4*0.5H2O"), S("H2O")], [S("CaSO4*2H2O")]),
    ([S("Na2CO3*10H2O")], [S("Na2CO3*H2O"), S("H2O")]),
    ([S("MgSO4*7H2O")], [S("MgSO4"), S("H2O")]),
    ([S("CoCl2*6H2O")], [S("CoCl2*2H2O"), S("H2O")]),
    # Redox half-reactions with electrons and ionic equations.
    ([S("MnO4", -1), S("H", 1), ELECTRON], [S("Mn", 2), S("H2O")]),
    ([S("Cr2O7", -2), S("H", 1), ELECTRON], [S("Cr", 3), S("H2O")]),
    ([S("Fe", 2)], [S("Fe", 3), ELECTRON]),
    ([S("Cr2O7", -2), S("Fe", 2), S("H", 1)], [S("Cr", 3), S("Fe", 3), S("H2O")]),
    ([S("MnO4", -1), S("C2O4", -2), S("H", 1)], [S("Mn", 2), S("CO2"), S("H2O")]),
    ([S("Cu"), S("NO3", -1), S("H", 1)], [S("Cu", 2), S("NO"), S("H2O")]),
    ([S("S2O3", -2), S("I2")], [S("S4O6", -2), S("I", -1)]),
    ([S("O2"), S("H", 1), ELECTRON], [S("H2O")]),
    ([S("Cl2"), S("OH", -1)], [S("Cl", -1), S("ClO3", -1), S("H2O")]),
    ([S("H2O2"), S("MnO4", -1), S("H", 1)], [S("O2"), S("Mn", 2), S("H2O")]),
    ([S("[Fe(CN)6]", -3), ELECTRON], [S("[Fe(CN)6]", -4)]),
    ([S("Hg2", 2)], [S("Hg"), S("Hg", 2)]),
    ([S("NH4", 1), S("OH", -1)], [S("NH3"), S("H2O")]),
    ([S("Ag", 1), S("Cl", -1)], [S("AgCl")]),
    ([S("Ca", 2), S("PO4", -3)], [S("Ca3(PO4)2")]),
    ([S("Al", 3), S("OH", -1)], [S("Al(OH)4", -1)]),
    ([S("Fe", 3), S("SCN", -1)], [S("[Fe(SCN)]", 2)]),
    ([S("Cu", 2), S("NH3")], [S("[Cu(NH3)4]", 2)]),
    # Gas-phase steps with third bodies and photons.
    ([S("H"), S("O2"), THIRD_BODY], [S("HO2"), THIRD_BODY]),
    ([S("NO2"), PHOTON], [S("NO"), S("O")]),
    ([S("O3"), PHOTON], [S("O2"), S("O")]),
    ([S("H"), S("H"), THIRD_BODY], [S("H2"), THIRD_BODY]),
    # Equations that cannot be balanced, or not uniquely.
    ([S("H2"), S("O2"), S("N2")], [S("H2O")]),
    ([S("H2O")], [S("H2"), S("O2"), S("C")]),
    ([S("H2O2"), S("O2")], [S("H2O")]),
    ([S("Fe", 3)], [S("Fe", 2)]),
    ([S("H2"), S("O2")], [S("H2O"), S("H2O2")]),
    ([S("O"), S("O2"), THIRD_BODY], [S("O3"), THIRD_BODY]),
    ([S("O2"), S("NaCl")], [S("Cl2"), S("NaClO")]),
    ([S("NaCl"), S("H2")], [S("NaCl"), S("H2"), S("H")]),
    ([THIRD_BODY], [THIRD_BODY]),
    # Large counts: exact coefficients above 10^9.
    ([S("H1000000007")], [S("H999999937")]),
    ([S("H1000000007O999999937")], [S("H2O"), S("O2")]),
]

POOL = ["H", "C", "N", "O", "S", "Cl", "Na", "K", "Ca", "Fe", "Cu", "Mn", "P", "Al", "Mg", "Br"]


def random_species(rng, elements, charged):
    units = []
    chosen = rng.sample(elements, rng.randint(1, min(3, len(elements))))
    for sym in chosen:
        units.append(("el", sym, rng.choice([1, 1, 2, 3, 4, 6])))
    if len(units) >= 2 and rng.random() < 0.3:
        # Wrap the tail in a group with a count, sometimes nested.
        k = rng.randint(1, len(units) - 1)
        inner = units[k:]
        if len(inner) >= 2 and rng.random() < 0.3:
            inner = [inner[0], ("group", inner[1:], rng.randint(2, 3), "(")]
        units = units[:k] + [("group", inner, rng.randint(2, 4), rng.choice("(["))]
    parts = [(Fraction(1), units)]
    if rng.random() < 0.1:
        parts.append((rng.choice([Fraction(1), Fraction(2), Fraction(5), Fraction(1, 2)]),
                      [("el", "H", 2), ("el", "O", 1)]))
    charge = rng.choice([-3, -2, -1, 1, 2, 3]) if charged and rng.random() < 0.5 else 0
    return {"kind": "compound", "parts": parts, "charge": charge}


def random_equation(rng):
    m = rng.randint(2, 4)
    elements = rng.sample(POOL, m)
    charged = rng.random() < 0.35
    extra = rng.choice([1, 1, 1, 1, 2])
    count = m + extra + (1 if charged else 0)
    specs = [random_species(rng, elements, charged) for _ in range(count)]
    if charged and rng.random() < 0.4:
        specs[rng.randrange(count)] = ELECTRON
    # Put species on the side the balance wants, most of the time.
    order = list(range(count))
    rng.shuffle(order)
    specs = [specs[i] for i in order]
    n_left = rng.randint(1, count - 1)
    probe = classify(specs, n_left)
    if probe["kind"] == "wrong_side" and rng.random() < 0.8:
        moved = set(probe["species"])
        left = [s for i, s in enumerate(specs) if (i < n_left) != (i in moved)]
        right = [s for i, s in enumerate(specs) if (i >= n_left) != (i in moved)]
        if left and right:
            return left, right
    return specs[:n_left], specs[n_left:]


def encode(value):
    value = Fraction(value)
    return str(value.numerator) if value.denominator == 1 else f"{value.numerator}/{value.denominator}"


def build():
    rng = random.Random(20260101)
    equations = list(HAND)
    while len(equations) < 240:
        # Most random equations use each element on both sides; a few
        # one-sided ones are kept.
        for _ in range(100):
            left, right = random_equation(rng)
            if classify(left + right, len(left))["kind"] != "one_sided" or rng.random() < 0.05:
                break
        equations.append((left, right))
    cases = []
    for left, right in equations:
        specs = left + right
        cases.append({
            "species": [{
                "text": render(s, rng),
                "kind": s["kind"],
                "charge": s["charge"],
                "composition": {k: encode(v) for k, v in sorted(composition(s).items(), key=lambda kv: z_of(kv[0]))},
            } for s in specs],
            "n_reactants": len(left),
            "expected": classify(specs, len(left)),
        })
    return {
        "source": f"sympy {sympy.__version__} Matrix.nullspace(); generated by tests/reference/gen_balance.py",
        "cases": cases,
    }


def main():
    text = json.dumps(build(), indent=1, ensure_ascii=False) + "\n"
    if "--check" in sys.argv[1:]:
        if not OUT.exists() or OUT.read_text(encoding="utf-8") != text:
            print(f"{OUT} is out of date: run {sys.argv[0]} and commit the result", file=sys.stderr)
            return 1
        return 0
    OUT.parent.mkdir(parents=True, exist_ok=True)
    OUT.write_text(text, encoding="utf-8")
    return 0


if __name__ == "__main__":
    sys.exit(main())
