#!/usr/bin/env python3
"""Reference SI factors and dimensions of unit expressions, computed with pint.

stoik's unit parser (src/units/) is checked against these values by
tests/units_reference.rs. pint (PyPI) is an independent implementation with
its own unit definitions; where its spelling differs from stoik's (cm3 is
cm**3 in pint, Torr is torr), the table below gives both spellings.

Also writes the factor (c° R T / p°)^Δn that turns Kc in (mol/L)^Δn into the
dimensionless K of a gas-phase reaction, computed with pint's exact R.

Usage:
    python tests/reference/gen_units.py           # (re)write the JSON
    python tests/reference/gen_units.py --check   # compare, exit 1 on change

Needs: pip install pint   (checked with pint 0.25)
"""

import json
import math
import sys
from pathlib import Path

import pint

OUT = Path(__file__).resolve().parent / "data" / "units_pint.json"

# (stoik spelling, pint spelling)
UNITS = [
    ("mol", "mol"),
    ("mmol", "mmol"),
    ("molecule", "molecule"),
    ("L", "L"),
    ("mL", "mL"),
    ("m3", "m**3"),
    ("cm3", "cm**3"),
    ("cm^3", "cm**3"),
    ("dm3", "dm**3"),
    ("mol/m3", "mol/m**3"),
    ("M", "M"),
    ("mM", "mM"),
    ("uM", "uM"),
    ("µM", "micromolar"),
    ("μM", "micromolar"),
    ("nM", "nM"),
    ("mmol/L", "mmol/L"),
    ("Pa", "Pa"),
    ("kPa", "kPa"),
    ("MPa", "MPa"),
    ("bar", "bar"),
    ("mbar", "mbar"),
    ("atm", "atm"),
    ("Torr", "torr"),
    ("mmHg", "mmHg"),
    ("psi", "psi"),
    ("J", "J"),
    ("kJ", "kJ"),
    ("cal", "cal"),
    ("kcal", "kcal"),
    ("eV", "eV"),
    ("K", "K"),
    ("s", "s"),
    ("min", "min"),
    ("h", "hour"),
    ("g", "g"),
    ("kg", "kg"),
    ("m", "m"),
    ("cm", "cm"),
    ("µm", "micrometer"),
    ("um", "um"),
    ("L/(mol*s)", "L/(mol*s)"),
    ("cm3/(molecule*s)", "cm**3/(molecule*s)"),
    ("cm^6/(molecule^2*s)", "cm**6/(molecule**2*s)"),
    ("cm3·molecule^-1·s^-1", "cm**3*molecule**-1*s**-1"),
    ("kcal/mol", "kcal/mol"),
    ("kJ/mol", "kJ/mol"),
    ("J/(mol*K)", "J/(mol*K)"),
    ("cal/(mol*K)", "cal/(mol*K)"),
    ("kJ/(mol*K)", "kJ/(mol*K)"),
    ("J·mol^-1·K^-1", "J*mol**-1*K**-1"),
    ("eV/molecule", "eV/molecule"),
    ("M^-1*s^-1", "M**-1*s**-1"),
    ("M^-2 * s^-1", "M**-2*s**-1"),
    ("1/s", "1/s"),
    ("s^-1", "s**-1"),
    ("min^-1", "min**-1"),
    ("1/(mol*s)", "1/(mol*s)"),
    ("mol/(L*s)", "mol/(L*s)"),
    ("uM/min", "uM/min"),
    ("(mol/L)^2", "(mol/L)**2"),
    ("L/mol", "L/mol"),
    ("(L/mol)^2", "(L/mol)**2"),
    ("M^3", "M**3"),
    ("bar^-2", "bar**-2"),
    ("atm^2", "atm**2"),
    ("1/bar", "1/bar"),
    ("Torr^-1", "torr**-1"),
    ("kPa*L/(mol*K)", "kPa*L/(mol*K)"),
    ("L*atm/(mol*K)", "L*atm/(mol*K)"),
    ("g/mol", "g/mol"),
    ("dm3/mol", "dm**3/mol"),
    ("degC", "degC"),
    ("°C", "degC"),
]

PINT_DIMS = {
    "[mass]": "mass",
    "[length]": "length",
    "[time]": "time",
    "[substance]": "amount",
    "[temperature]": "temperature",
}

# Temperatures (K) and Δn(gas) for the Kc -> K factors.
KC_KP_CASES = [(t, dn) for t in (298.15, 500.0, 1000.0) for dn in (-2, -1, 1, 2, 0.5)]


def registry():
    ureg = pint.UnitRegistry()
    # stoik's calorie is the thermochemical one (4.184 J, NIST SP 811 B.8);
    # make sure pint agrees before trusting any energy factor.
    cal = ureg.Quantity(1, "cal").to("J").magnitude
    if abs(cal - 4.184) > 1e-15:
        sys.exit(f"pint's cal is {cal} J, not the thermochemical 4.184 J")
    # pint defines molecule as 1/N_A mol; check rather than assume.
    molecule = ureg.Quantity(1, "molecule").to("mol").magnitude
    if abs(molecule * 6.02214076e23 - 1) > 1e-15:
        sys.exit(f"pint's molecule is {molecule} mol, not 1/N_A")
    return ureg


def unit_row(ureg, ours, theirs):
    if theirs == "degC":
        factor = ureg.Quantity(1, "delta_degC").to("K").magnitude
        offset = ureg.Quantity(0, "degC").to("K").magnitude
        dim_source = ureg.Quantity(1, "K")
    else:
        q = ureg.Quantity(1, theirs).to_base_units()
        factor = q.magnitude
        offset = 0.0
        dim_source = q
    dims = {name: 0 for name in PINT_DIMS.values()}
    for key, power in dim_source.dimensionality.items():
        if key not in PINT_DIMS or power != int(power):
            sys.exit(f"{theirs}: unexpected dimension {key}^{power}")
        dims[PINT_DIMS[key]] = int(power)
    return {
        "unit": ours,
        "pint": theirs,
        "factor": float(factor),
        "offset": float(offset),
        "dim": dims,
    }


def kc_row(ureg, t, dn):
    q = ureg.Quantity(1, "mol/L") * ureg.Quantity(1, "molar_gas_constant") * ureg.Quantity(
        t, "K"
    ) / ureg.Quantity(1, "bar")
    base = q.to("dimensionless").magnitude
    return {"t": t, "dn_gas": dn, "kc_molar_to_k": float(base**dn)}


def generate():
    ureg = registry()
    return {
        "generator": "tests/reference/gen_units.py",
        "pint_version": pint.__version__,
        "units": [unit_row(ureg, a, b) for a, b in UNITS],
        "kc_to_k": [kc_row(ureg, t, dn) for t, dn in KC_KP_CASES],
    }


def close(a, b):
    return abs(a - b) <= 1e-12 * max(abs(a), abs(b), 1e-300)


def compare(new, old):
    problems = []
    old_units = {r["unit"]: r for r in old.get("units", [])}
    new_units = {r["unit"]: r for r in new["units"]}
    for name in sorted(set(old_units) | set(new_units)):
        a, b = new_units.get(name), old_units.get(name)
        if a is None or b is None:
            problems.append(f"unit {name!r} only in {'committed' if a is None else 'new'} data")
        elif a["dim"] != b["dim"] or not close(a["factor"], b["factor"]) or not close(
            a["offset"], b["offset"]
        ):
            problems.append(f"unit {name!r}: committed {b}, now {a}")
    old_kc = {(r["t"], r["dn_gas"]): r for r in old.get("kc_to_k", [])}
    new_kc = {(r["t"], r["dn_gas"]): r for r in new["kc_to_k"]}
    if set(old_kc) != set(new_kc):
        problems.append("the Kc -> K cases differ")
    for key in set(old_kc) & set(new_kc):
        if not close(old_kc[key]["kc_molar_to_k"], new_kc[key]["kc_molar_to_k"]):
            problems.append(f"Kc -> K factor at {key}: committed {old_kc[key]}, now {new_kc[key]}")
    return problems


def main(argv):
    new = generate()
    if "--check" in argv:
        if not OUT.exists():
            print(f"{OUT} is missing: run without --check", file=sys.stderr)
            return 1
        old = json.loads(OUT.read_text(encoding="utf-8"))
        problems = compare(new, old)
        for p in problems:
            print(p, file=sys.stderr)
        if problems:
            return 1
        print(f"{OUT.name}: {len(new['units'])} units and {len(new['kc_to_k'])} Kc->K factors match")
        return 0
    OUT.parent.mkdir(parents=True, exist_ok=True)
    OUT.write_text(json.dumps(new, indent=1, ensure_ascii=False) + "\n", encoding="utf-8")
    print(f"wrote {OUT}")
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
