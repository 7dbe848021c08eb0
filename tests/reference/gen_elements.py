#!/usr/bin/env python3
"""Dump reference atomic masses for stoik's element table.

Writes tests/reference/data/periodictable_masses.json with the mass that the
`periodictable` package (PyPI) gives for every element it knows, the molar
masses its formula parser gives for a list of compounds, and the electron
molar mass from `scipy.constants` (CODATA). tests/chem_reference.rs
compares stoik's CIAAW 2021 table against these values.

    python tests/reference/gen_elements.py           # regenerate
    python tests/reference/gen_elements.py --check   # compare, exit 1 on a difference
"""

import json
import pathlib
import sys

import periodictable
import scipy
import scipy.constants

OUT = pathlib.Path(__file__).resolve().parent / "data" / "periodictable_masses.json"


# Compounds as stoik writes them, and the same compound in periodictable's
# formula syntax (where `+` joins hydrate parts).
COMPOUNDS = [
    ("H2O", "H2O"), ("CO2", "CO2"), ("NaCl", "NaCl"), ("CuSO4·5H2O", "CuSO4+5H2O"),
    ("K4[Fe(CN)6]", "K4Fe(CN)6"), ("Ca3(PO4)2", "Ca3(PO4)2"), ("NH3", "NH3"), ("CH4", "CH4"),
    ("C6H12O6", "C6H12O6"), ("H2SO4", "H2SO4"), ("KMnO4", "KMnO4"), ("Fe2O3", "Fe2O3"),
    ("CaCO3", "CaCO3"), ("(NH4)2SO4", "(NH4)2SO4"), ("CaSO4·0.5H2O", "CaSO4+0.5H2O"),
    ("Al2(SO4)3", "Al2(SO4)3"), ("C2H5OH", "C2H5OH"), ("AgNO3", "AgNO3"), ("UF6", "UF6"),
    ("[Co(NH3)6]Cl3", "Co(NH3)6Cl3"), ("Na2CO3*10H2O", "Na2CO3+10H2O"), ("C12H22O11", "C12H22O11"),
]


def build():
    masses = {}
    for el in periodictable.elements:
        if el.number == 0:  # the neutron pseudo-element
            continue
        if el.mass is None:
            continue
        masses[el.symbol] = {"z": el.number, "mass": float(el.mass)}
    value, unit, _ = scipy.constants.physical_constants["electron molar mass"]
    assert unit == "kg mol^-1"
    return {
        "source": f"periodictable {periodictable.__version__} (PyPI); "
        f"electron molar mass from scipy {scipy.__version__} scipy.constants (CODATA)",
        "elements": masses,
        "electron_molar_mass_g_per_mol": value * 1000.0,
        "compounds": {stoik: periodictable.formula(pt).mass for stoik, pt in COMPOUNDS},
    }


def main():
    text = json.dumps(build(), indent=1, sort_keys=True) + "\n"
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
