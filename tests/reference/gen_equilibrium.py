#!/usr/bin/env python3
"""Reference equilibrium compositions for stoik's solver, computed with scipy.

Each random system (fixed seed) is built from a few components and secondary
species formed from them (one reaction per secondary species). The reference
solves it in its own formulation, independent of the Rust solver's: the
unknowns are ln n of the fluid components (plus ln of the total gas amount at
constant pressure, the ionic strength under Davies, and the amount of each
present solid); every secondary fluid species follows from its mass-action
law; the equations are the component totals and the solids' mass-action laws.
scipy.optimize.least_squares (Levenberg-Marquardt, tolerances 1e-15) solves
it. Solids are handled by trying every subset of present solids and keeping
the one where each present solid has a non-negative amount and each absent
one is undersaturated.

The Rust side receives the reactions scrambled (reversed, doubled, added to
one another, shuffled, sometimes with a dependent extra reaction) and the
species shuffled. The script verifies every reference result against the
scrambled problem: |ln Q - ln K| <= 1e-9 * max(1, |ln K|) for each reaction
whose species are all present, component totals to 1e-11 of their gross
amount, present solids >= 0, absent solids undersaturated.

Usage:
  gen_equilibrium.py           write tests/reference/data/equilibrium_scipy.json
  gen_equilibrium.py --check   regenerate and compare with the committed file
"""

import json
import math
import pathlib
import sys
import warnings

import numpy as np
import scipy
from scipy.optimize import least_squares

SEED = 20261201
OUT = pathlib.Path(__file__).resolve().parent / "data" / "equilibrium_scipy.json"
R_L_BAR = 0.08314462618  # CODATA 2018 gas constant, L bar / (mol K)
LN10 = math.log(10.0)


def water_permittivity(t_c):
    # Malmberg & Maryott, J. Res. NBS 56 (1956) 1 (from memory).
    return 87.740 - 0.40008 * t_c + 9.398e-4 * t_c**2 - 1.410e-6 * t_c**3


def davies_a(t_k):
    # A = 0.509 at 25 degC (from memory), carried as (eps T)^(-3/2).
    ref = water_permittivity(25.0) * 298.15
    here = water_permittivity(t_k - 273.15) * t_k
    return 0.509 * (ref / here) ** 1.5


def davies_ln_gamma(z, ionic, t_k):
    s = math.sqrt(max(ionic, 0.0))
    return -LN10 * davies_a(t_k) * z * z * (s / (1 + s) - 0.3 * ionic)


class System:
    """Components, secondaries and their formation constants."""

    def __init__(self, kind, temperature, vessel, activity):
        self.kind = kind
        self.t = temperature
        self.vessel = vessel  # ("V", litres) or ("P", bar)
        self.activity = activity
        self.comps = []  # dicts: name, phase, charge, n0
        self.secs = []  # dicts: name, phase, charge, n0, coef (per component), ln_k

    # --- helpers -----------------------------------------------------------
    def species(self):
        return self.comps + self.secs

    def water_index(self):
        for j, c in enumerate(self.comps):
            if c["phase"] == "condensed":
                return j
        return None

    def coef_matrix(self):
        """a[s][j]: amount of component j in species s."""
        nc = len(self.comps)
        rows = []
        for j in range(nc):
            rows.append([1.0 if k == j else 0.0 for k in range(nc)])
        for s in self.secs:
            rows.append([float(x) for x in s["coef"]])
        return np.array(rows)

    def ln_factor(self, sp, ln_ng):
        if sp["phase"] == "gas":
            if self.vessel[0] == "V":
                return math.log(R_L_BAR * self.t / self.vessel[1])
            return math.log(self.vessel[1]) - ln_ng
        if sp["phase"] == "solute":
            return -math.log(self.vessel[1])
        return 0.0

    # --- reference solve ----------------------------------------------------
    def amounts(self, x, present):
        """All species amounts (and ln amounts) from the unknown vector."""
        nc = len(self.comps)
        w = self.water_index()
        fluid = [j for j in range(nc) if j != w]
        solids = [k for k, s in enumerate(self.secs) if s["phase"] == "condensed"]
        pos = 0
        u = {}
        for j in fluid:
            u[j] = x[pos]
            pos += 1
        n_solid = {}
        for k in solids:
            if present[k]:
                n_solid[k] = x[pos]
                pos += 1
        ln_ng = 0.0
        if self.vessel[0] == "P":
            ln_ng = x[pos]
            pos += 1
        ionic = 0.0
        if self.activity == "davies":
            ionic = x[pos]
            pos += 1

        def ln_gamma(sp):
            if self.activity == "davies" and sp["phase"] == "solute":
                return davies_ln_gamma(sp["charge"], ionic, self.t)
            return 0.0

        ln_a_comp = [0.0] * nc
        ln_n = [None] * (nc + len(self.secs))
        for j in fluid:
            sp = self.comps[j]
            ln_a_comp[j] = u[j] + self.ln_factor(sp, ln_ng) + ln_gamma(sp)
            ln_n[j] = u[j]
        sat = {}
        for k, s in enumerate(self.secs):
            ln_a = s["ln_k"] + sum(s["coef"][j] * ln_a_comp[j] for j in range(nc))
            if s["phase"] == "condensed":
                sat[k] = ln_a  # the log of the activity the solid would need
                ln_n[nc + k] = math.log(n_solid[k]) if present[k] and n_solid[k] > 0 else -math.inf
            else:
                ln_n[nc + k] = ln_a - self.ln_factor(s, ln_ng) - ln_gamma(s)
        n = [math.exp(v) if v is not None else 0.0 for v in ln_n]
        for k in solids:
            n[nc + k] = n_solid[k] if present[k] else 0.0
        if w is not None:
            a = self.coef_matrix()
            total_w = sum(a[i][w] * sp["n0"] for i, sp in enumerate(self.species()))
            nw = total_w - sum(a[i][w] * n[i] for i in range(len(n)) if i != w)
            n[w] = nw
            ln_n[w] = math.log(nw) if nw > 0 else -math.inf
        return n, ln_n, sat, ln_ng, ionic

    def residuals(self, x, present):
        n, ln_n, sat, ln_ng, ionic = self.amounts(x, present)
        a = self.coef_matrix()
        nc = len(self.comps)
        w = self.water_index()
        res = []
        for j in range(nc):
            if j == w:
                continue
            total = sum(a[i][j] * sp["n0"] for i, sp in enumerate(self.species()))
            gross = sum(abs(a[i][j]) * sp["n0"] for i, sp in enumerate(self.species())) or 1.0
            res.append((sum(a[i][j] * n[i] for i in range(len(n))) - total) / gross)
        for k, s in enumerate(self.secs):
            if s["phase"] == "condensed" and present[k]:
                res.append(sat[k])
        if self.vessel[0] == "P":
            ng = sum(n[i] for i, sp in enumerate(self.species()) if sp["phase"] == "gas")
            res.append(ng / math.exp(ln_ng) - 1.0)
        if self.activity == "davies":
            v = self.vessel[1]
            i_calc = 0.5 * sum(sp["charge"] ** 2 * n[i] / v for i, sp in enumerate(self.species()) if sp["phase"] == "solute")
            res.append((ionic - i_calc) / max(i_calc, 1e-3))
        return np.array(res)

    def start(self, present, rng, attempt):
        nc = len(self.comps)
        w = self.water_index()
        a = self.coef_matrix()
        x = []
        for j in range(nc):
            if j == w:
                continue
            total = sum(a[i][j] * sp["n0"] for i, sp in enumerate(self.species()))
            guess = total if total > 0 else 1e-7
            if attempt > 0:
                guess *= math.exp(rng.uniform(-3 * attempt, 1))
            x.append(math.log(guess))
        for k, s in enumerate(self.secs):
            if s["phase"] == "condensed" and present[k]:
                x.append(max(s["n0"], 0.01))
        if self.vessel[0] == "P":
            x.append(math.log(sum(sp["n0"] for sp in self.species() if sp["phase"] == "gas")))
        if self.activity == "davies":
            x.append(0.05)
        return np.array(x)

    def solve_subset(self, present, rng):
        best = None
        for attempt in range(8):
            x0 = self.start(present, rng, attempt)
            try:
                r = least_squares(lambda x: self.residuals(x, present), x0, method="lm", xtol=1e-15, ftol=1e-15, gtol=1e-15, max_nfev=40000)
            except (ValueError, OverflowError, FloatingPointError):
                continue
            if not np.all(np.isfinite(r.fun)):
                continue
            err = float(np.max(np.abs(r.fun))) if len(r.fun) else 0.0
            if best is None or err < best[0]:
                best = (err, r.x)
            if err < 1e-13:
                break
        return best

    def solve(self, rng):
        solids = [k for k, s in enumerate(self.secs) if s["phase"] == "condensed"]
        found = []
        for mask in range(1 << len(solids)):
            present = {k: bool(mask >> b & 1) for b, k in enumerate(solids)}
            best = self.solve_subset(present, rng)
            if best is None or best[0] > 1e-12:
                continue
            n, ln_n, sat, _, _ = self.amounts(best[1], present)
            ok = all(n[len(self.comps) + k] >= 0 for k in solids if present[k])
            ok = ok and all(sat[k] <= 1e-9 for k in solids if not present[k])
            w = self.water_index()
            ok = ok and (w is None or n[w] > 0)
            if ok:
                found.append((present, n, ln_n))
        return found


# --- random systems ----------------------------------------------------------
def gas_system(rng, idx, constant_pressure):
    if constant_pressure:
        sysm = System("gas_constant_pressure", float(rng.uniform(350, 1500)), ("P", float(rng.uniform(0.2, 30))), "ideal")
    else:
        sysm = System("gas_constant_volume", float(rng.uniform(350, 1500)), ("V", float(rng.uniform(0.5, 50))), "ideal")
    nc = int(rng.integers(2, 4))
    for j in range(nc):
        sysm.comps.append({"name": f"Q{idx}c{j}(g)", "phase": "gas", "charge": 0, "n0": float(rng.uniform(0.05, 3))})
    nsec = int(rng.integers(1, 5))
    for k in range(nsec):
        coef = [int(v) for v in rng.integers(0, 3, nc)]
        if sum(coef) == 0:
            coef[int(rng.integers(0, nc))] = 1
        if sum(coef) == 1:
            coef[int(rng.integers(0, nc))] += 1
        wide = rng.random() < 0.15
        ln_k = float(rng.uniform(-60, 60) if wide else rng.uniform(-12, 12))
        n0 = 0.0 if rng.random() < 0.5 else float(rng.uniform(0.01, 1))
        sysm.secs.append({"name": f"Q{idx}s{k}(g)", "phase": "gas", "charge": 0, "n0": n0, "coef": coef, "ln_k": ln_k})
    return sysm


def aqueous_system(rng, idx, with_solid):
    davies = rng.random() < 0.4
    t = 298.15 if rng.random() < 0.7 else float(rng.uniform(283, 333))
    v = float(rng.uniform(0.5, 2.0))
    kind = "aqueous_solid" if with_solid else "aqueous"
    sysm = System(kind, t, ("V", v), "davies" if davies else "ideal")
    sysm.comps.append({"name": "H2O(l)", "phase": "condensed", "charge": 0, "n0": 55.5 * v})
    sysm.comps.append({"name": "H+", "phase": "solute", "charge": 1, "n0": 0.0})
    nl = int(rng.integers(1, 3))
    ligands = []
    for j in range(nl):
        z = -1 if rng.random() < 0.6 else -2
        ligands.append(len(sysm.comps))
        sysm.comps.append({"name": f"L{idx}x{j}^{-z}-", "phase": "solute", "charge": z, "n0": 0.0})
    metal = None
    if with_solid or rng.random() < 0.5:
        zm = 2 if rng.random() < 0.6 else 1
        metal = len(sysm.comps)
        sysm.comps.append({"name": f"M{idx}^{zm}+", "phase": "solute", "charge": zm, "n0": 0.0})
    nc = len(sysm.comps)

    def add(name, phase, coef, ln_k, n0=0.0):
        charge = int(sum(c * sysm.comps[j]["charge"] for j, c in enumerate(coef)))
        sysm.secs.append({"name": name, "phase": phase, "charge": charge, "n0": n0, "coef": coef, "ln_k": ln_k})

    coef = [0] * nc
    coef[0], coef[1] = 1, -1
    add("OH-", "solute", coef, math.log(1e-14))
    # Weak acids: protonation of each ligand (log K 2..12).
    for j in ligands:
        coef = [0] * nc
        coef[1], coef[j] = 1, 1
        add(f"H{sysm.comps[j]['name']}", "solute", coef, float(rng.uniform(2, 12)) * LN10)
    if metal is not None and not with_solid:
        coef = [0] * nc
        coef[metal], coef[ligands[0]] = 1, 1
        add(f"M{idx}L", "solute", coef, float(rng.uniform(1, 6)) * LN10)
    if with_solid:
        zm = sysm.comps[metal]["charge"]
        zl = sysm.comps[ligands[0]]["charge"]
        # A neutral salt M_p L_q (s) with log K of formation 3..12.
        p, q = (-zl, zm) if (-zl) != zm else (1, 1)
        g = math.gcd(p, q)
        p, q = p // g, q // g
        coef = [0] * nc
        coef[metal], coef[ligands[0]] = p, q
        add(f"M{idx}L(s)", "condensed", coef, float(rng.uniform(3, 12)) * LN10)
    # Initial amounts: an electroneutral recipe of acids, salts and base.
    for j in ligands:
        k = next(i for i, s in enumerate(sysm.secs) if s["coef"][j] == 1 and s["coef"][1] == 1)
        acid = rng.random() < 0.6
        salt = rng.random() < 0.5
        if acid or not salt:
            sysm.secs[k]["n0"] = float(rng.uniform(0.001, 0.3)) * v  # the acid HL
        if salt:
            # The base of a salt whose spectator cation the solver needs not see.
            sysm.comps[j]["n0"] = float(rng.uniform(0.001, 0.3)) * v
    if metal is not None:
        sysm.comps[metal]["n0"] = float(rng.uniform(0.0005, 0.2)) * v
    if with_solid:
        solid = sysm.secs[-1]
        if rng.random() < 0.5:
            # A sparingly soluble salt, little of it, no common ion: it may
            # dissolve completely.
            sysm.comps[metal]["n0"] = 0.0
            sysm.comps[ligands[0]]["n0"] = 0.0
            solid["ln_k"] = float(rng.uniform(2, 7)) * LN10
            solid["n0"] = float(10 ** rng.uniform(-4, -1.5)) * v
        else:
            solid["n0"] = 0.0 if rng.random() < 0.3 else float(10 ** rng.uniform(-4, -0.5)) * v
    if rng.random() < 0.3:
        sysm.comps[1]["n0"] = float(rng.uniform(0.0001, 0.1)) * v
    if rng.random() < 0.3:
        sysm.secs[0]["n0"] = float(rng.uniform(0.0001, 0.1)) * v
    return sysm


def gas_solid_system(rng, idx):
    sysm = System("gas_solid", float(rng.uniform(350, 900)), ("V", float(rng.uniform(1, 20))), "ideal")
    nc = int(rng.integers(2, 4))
    for j in range(nc):
        sysm.comps.append({"name": f"Q{idx}c{j}(g)", "phase": "gas", "charge": 0, "n0": float(rng.uniform(0.01, 1))})
    coef = [1] * 2 + [0] * (nc - 2)
    sysm.secs.append({"name": f"Q{idx}p(s)", "phase": "condensed", "charge": 0, "n0": float(rng.choice([0.0, rng.uniform(0.001, 0.5)])), "coef": coef, "ln_k": float(rng.uniform(-2, 8))})
    if rng.random() < 0.5:
        # Little of the solid and one of its gases absent: it may decompose fully.
        sysm.comps[0]["n0"] = 0.0
        sysm.secs[-1]["n0"] = float(rng.uniform(0.001, 0.05))
        sysm.secs[-1]["ln_k"] = float(rng.uniform(-4, 3))
    if nc == 3 or rng.random() < 0.5:
        coef = [0] * nc
        coef[0], coef[nc - 1] = 1, 1
        if nc == 2:
            coef = [2, 1]
        sysm.secs.append({"name": f"Q{idx}r(g)", "phase": "gas", "charge": 0, "n0": 0.0, "coef": coef, "ln_k": float(rng.uniform(-5, 5))})
    return sysm


def scramble(sysm, rng):
    """The problem as the Rust solver sees it: shuffled species and reactions."""
    specs = sysm.species()
    order = [int(i) for i in rng.permutation(len(specs))]
    where = {old: new for new, old in enumerate(order)}
    nc = len(sysm.comps)
    rows = []
    for k, s in enumerate(sysm.secs):
        nu = np.zeros(len(specs))
        for j in range(nc):
            nu[j] -= s["coef"][j]
        nu[nc + k] += 1
        rows.append((nu, s["ln_k"]))
    # Reverse, double, and add reactions to one another (span unchanged).
    for i in range(len(rows)):
        nu, lk = rows[i]
        if rng.random() < 0.4:
            nu, lk = -nu, -lk
        if rng.random() < 0.2:
            nu, lk = 2 * nu, 2 * lk
        rows[i] = (nu, lk)
    if len(rows) >= 2 and rng.random() < 0.5:
        i, j = (int(v) for v in rng.choice(len(rows), 2, replace=False))
        rows[i] = (rows[i][0] + rows[j][0], rows[i][1] + rows[j][1])
    extra = False
    if len(rows) >= 2 and len(rows) < 6 and rng.random() < 0.25:
        i, j = (int(v) for v in rng.choice(len(rows), 2, replace=False))
        rows.append((rows[i][0] - rows[j][0], rows[i][1] - rows[j][1]))
        extra = True
    perm = [int(i) for i in rng.permutation(len(rows))]
    reactions = []
    for label_no, r in enumerate(perm):
        nu, lk = rows[r]
        stoich = [[where[i], float(nu[i])] for i in range(len(specs)) if nu[i] != 0]
        stoich.sort()
        reactions.append({"label": f"r{label_no}", "stoich": stoich, "ln_k": float(lk)})
    species = [None] * len(specs)
    for old, sp in enumerate(specs):
        species[where[old]] = {"name": sp["name"], "phase": sp["phase"], "charge": int(sp["charge"]), "initial_mol": float(sp["n0"])}
    return species, reactions, where, extra


def verify(species, reactions, vessel, activity, t, n, ln_n):
    """Checks the reference against the scrambled problem; returns residuals."""
    ln_ng = 0.0
    if vessel[0] == "P":
        ln_ng = math.log(sum(n[i] for i, s in enumerate(species) if s["phase"] == "gas"))
    ionic = 0.0
    if activity == "davies":
        ionic = 0.5 * sum(s["charge"] ** 2 * n[i] / vessel[1] for i, s in enumerate(species) if s["phase"] == "solute")
    ln_a = []
    for i, s in enumerate(species):
        if s["phase"] == "condensed":
            ln_a.append(0.0)
        elif s["phase"] == "gas":
            f = math.log(R_L_BAR * t / vessel[1]) if vessel[0] == "V" else math.log(vessel[1]) - ln_ng
            ln_a.append(ln_n[i] + f)
        else:
            g = davies_ln_gamma(s["charge"], ionic, t) if activity == "davies" else 0.0
            ln_a.append(ln_n[i] - math.log(vessel[1]) + g)
    worst_action = 0.0
    for r in reactions:
        if any(species[i]["phase"] == "condensed" and n[i] == 0.0 for i, _ in r["stoich"]):
            continue
        ln_q = sum(c * ln_a[i] for i, c in r["stoich"])
        worst_action = max(worst_action, abs(ln_q - r["ln_k"]) / max(1.0, abs(r["ln_k"])))
    # Conservation: n - n0 must lie in the span of the reaction vectors.
    nu = np.zeros((len(reactions), len(species)))
    for k, r in enumerate(reactions):
        for i, c in r["stoich"]:
            nu[k, i] += c
    delta = np.array(n) - np.array([s["initial_mol"] for s in species])
    null = scipy.linalg.null_space(nu)
    gross = np.abs(null.T) @ (np.array(n) + np.array([s["initial_mol"] for s in species]))
    worst_balance = float(np.max(np.abs(null.T @ delta) / np.maximum(gross, 1e-300))) if null.size else 0.0
    return worst_action, worst_balance


def generate():
    rng = np.random.default_rng(SEED)
    plan = [("gas_v", 30), ("gas_p", 25), ("aq", 30), ("aq_solid", 22), ("gas_solid", 15)]
    systems = []
    idx = 0
    for kind, count in plan:
        made = 0
        tries = 0
        while made < count and tries < count * 5:
            tries += 1
            idx += 1
            if kind == "gas_v":
                sysm = gas_system(rng, idx, False)
            elif kind == "gas_p":
                sysm = gas_system(rng, idx, True)
            elif kind == "aq":
                sysm = aqueous_system(rng, idx, False)
            elif kind == "aq_solid":
                sysm = aqueous_system(rng, idx, True)
            else:
                sysm = gas_solid_system(rng, idx)
            found = sysm.solve(rng)
            if len(found) != 1:
                continue
            present, n, ln_n = found[0]
            species, reactions, where, extra = scramble(sysm, rng)
            n_new = [0.0] * len(n)
            ln_new = [0.0] * len(n)
            for old, new in where.items():
                n_new[new] = float(n[old])
                ln_new[new] = float(ln_n[old])
            act, bal = verify(species, reactions, sysm.vessel, sysm.activity, sysm.t, n_new, ln_new)
            if act > 1e-9 or bal > 1e-11:
                continue
            vanished = [i for i, s in enumerate(species) if s["phase"] == "condensed" and s["initial_mol"] > 0 and n_new[i] == 0.0]
            vessel = {"constant_volume_l": sysm.vessel[1]} if sysm.vessel[0] == "V" else {"constant_pressure_bar": sysm.vessel[1]}
            systems.append({
                "name": f"{sysm.kind}-{idx}",
                "kind": sysm.kind,
                "temperature_k": sysm.t,
                "vessel": vessel,
                "activity": sysm.activity,
                "species": species,
                "reactions": reactions,
                "has_dependent_reaction": extra,
                "equilibrium_mol": n_new,
                "ln_equilibrium_mol": [v if math.isfinite(v) else None for v in ln_new],
                "vanished": vanished,
                "reference_action_residual": act,
                "reference_balance_residual": bal,
            })
            made += 1
    return {
        "generator": "tests/reference/gen_equilibrium.py",
        "seed": SEED,
        "scipy": scipy.__version__,
        "numpy": np.__version__,
        "systems": systems,
    }


def close(a, b):
    if isinstance(a, dict):
        return isinstance(b, dict) and a.keys() == b.keys() and all(close(a[k], b[k]) for k in a if k not in ("scipy", "numpy", "reference_action_residual", "reference_balance_residual"))
    if isinstance(a, list):
        return isinstance(b, list) and len(a) == len(b) and all(close(x, y) for x, y in zip(a, b))
    if isinstance(a, float) or isinstance(b, float):
        if a is None or b is None:
            return a is b
        return abs(a - b) <= 1e-8 * max(abs(a), abs(b)) + 1e-300
    return a == b


def main():
    # Trial points of the Levenberg-Marquardt search may overflow; those are
    # rejected by the search itself and every kept result is verified.
    warnings.filterwarnings("ignore", category=RuntimeWarning)
    data = generate()
    kinds = {}
    for s in data["systems"]:
        kinds[s["kind"]] = kinds.get(s["kind"], 0) + 1
    vanished = {}
    for s in data["systems"]:
        if s["vanished"]:
            vanished[s["kind"]] = vanished.get(s["kind"], 0) + 1
    print(f"{len(data['systems'])} systems {kinds}; solid used up in {vanished}", file=sys.stderr)
    if "--check" in sys.argv[1:]:
        committed = json.loads(OUT.read_text())
        if not close(data, committed):
            print("the regenerated reference differs from the committed file", file=sys.stderr)
            sys.exit(1)
        print("the committed reference matches", file=sys.stderr)
        return
    OUT.parent.mkdir(parents=True, exist_ok=True)
    OUT.write_text(json.dumps(data, indent=1) + "\n")


if __name__ == "__main__":
    main()
