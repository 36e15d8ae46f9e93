#!/usr/bin/env python3
"""Differential test of couplet's formation data against the PyPI package `chemicals` 1.5.2
(MIT), which ships the same CRC Handbook tables and reads them through its own Python API.

    python3 tests/formation_diff.py target/release/couplet

1. Every row of data/formation.csv from the CRC substance table must carry the values that
   chemicals' own reader gives for that CAS number and phase (chemicals.reaction.Hfs/Hfl/Hfg,
   S0s/S0l/S0g with method='CRC', and the CRC_standard_data frame for ΔfG° and Cp°).
2. Every ion row must equal the row of the aqueous-ion table file in chemicals' package folder
   (chemicals reads that file but exposes no function for it; pandas reads it here).
3. For a set of reactions, couplet's ΔrG°, ΔrH°, ΔrS° and E° (couplet thermo --json) must equal
   the same sums recomputed here from chemicals' values for the rows couplet names, with F from
   the exact SI constants (CODATA 2018).

Ends with a line 'N passed, N failed'; exit status 1 on any failure.
"""

import csv
import json
import math
import os
import subprocess
import sys

import chemicals
import chemicals.heat_capacity as heat_capacity
import chemicals.reaction as reaction
import pandas

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
F = 1.602176634e-19 * 6.02214076e23  # C/mol, exact product (SI 2019)

# Reactions checked end to end (half-reactions vs SHE, whole reactions with n from couplet).
REACTIONS = [
    "PbO2 + Pb + 4 H+ + 2 SO4^2- -> 2 PbSO4 + 2 H2O",     # lead–acid cell
    "Zn + Cu2+ -> Zn2+ + Cu",                               # Daniell cell
    "Zn + Ag2O -> ZnO + 2 Ag",                              # silver-oxide cell
    "Zn + 2 MnO2 -> ZnO + Mn2O3",                           # alkaline Zn/MnO2
    "Zn + HgO -> ZnO + Hg(l)",                              # zinc–mercuric oxide
    "2 H2(g) + O2(g) -> 2 H2O(l)",                          # hydrogen–oxygen
    "Cd + 2 NiOOH + 2 H2O -> Cd(OH)2 + 2 Ni(OH)2",          # nickel–cadmium (if data)
    "SnO2/Sn",
    "Fe3+ + e- -> Fe2+",
    "MnO4- + 8 H+ + 5 e- -> Mn2+ + 4 H2O",
    "AgCl + e- -> Ag + Cl-",
    "Hg2Cl2 + 2 e- -> 2 Hg(l) + 2 Cl-",
    "S + 2 H+ + 2 e- -> H2S(g)",
    "Cr2O7^2- + 14 H+ + 6 e- -> 2 Cr3+ + 7 H2O",
]

results = {"passed": 0, "failed": 0}


def verdict(ok, what):
    results["passed" if ok else "failed"] += 1
    if not ok:
        print(f"FAILED: {what}")


def close(a, b, tolerance):
    if a is None or b is None:
        return a is None and b is None
    return abs(a - b) <= tolerance


def number(value):
    return None if value is None or (isinstance(value, float) and math.isnan(value)) else float(value)


def chemicals_row(cas, phase):
    """(ΔfH°, ΔfG°, S°, Cp°) of a CRC substance row, read through chemicals."""
    frame = heat_capacity.CRC_standard_data
    if cas not in frame.index:
        return None
    row = frame.loc[cas]
    suffix = {"s": "s", "l": "l", "g": "g"}[phase]
    lookup = {"s": (reaction.Hfs, reaction.S0s), "l": (reaction.Hfl, reaction.S0l),
              "g": (reaction.Hfg, reaction.S0g)}[phase]
    enthalpy = number(lookup[0](cas, method="CRC")) if not math.isnan(row["Hf" + suffix]) else None
    entropy = number(lookup[1](cas, method="CRC")) if not math.isnan(row["S0" + suffix]) else None
    return enthalpy, number(row["Gf" + suffix]), entropy, number(row["Cp" + suffix])


def ion_table():
    path = os.path.join(os.path.dirname(chemicals.__file__), "Electrolytes",
                        "CRC Thermodynamic Properties of Aqueous Ions.tsv")
    frame = pandas.read_csv(path, sep="\t", dtype={"CAS": str})
    return {r["CAS"]: r for _, r in frame.iterrows()}


def read_formation_csv():
    with open(os.path.join(ROOT, "data", "formation.csv"), encoding="utf-8") as f:
        lines = [line for line in f if not line.startswith("#")]
    return list(csv.DictReader(lines))


def optional(text):
    return float(text) if text.strip() else None


def check_rows():
    ions = ion_table()
    for row in read_formation_csv():
        ours = (optional(row["dfh_j"]), optional(row["dfg_j"]), optional(row["s_j_k"]),
                optional(row["cp_j_k"]))
        label = f"{row['formula']}({row['state']}) CAS {row['cas']} [{row['table']}]"
        if row["table"] == "crc-substances":
            theirs = chemicals_row(row["cas"], row["state"])
            if theirs is None:
                verdict(False, f"{label}: chemicals has no CRC row")
                continue
            if row["note"].startswith("element in its reference state"):
                # The table leaves ΔfG° blank there; zero by definition.
                theirs = (theirs[0], 0.0, theirs[2], theirs[3])
            verdict(all(close(a, b, 1e-9) for a, b in zip(ours, theirs)),
                    f"{label}: ours {ours}, chemicals {theirs}")
        elif row["table"] == "crc-ions":
            r = ions.get(row["cas"])
            theirs = None if r is None else (number(r["Hf(aq)"]), number(r["Gf(aq)"]),
                                             number(r["S(aq)"]), number(r["Cp(aq)"]))
            verdict(theirs is not None and all(close(a, b, 1e-9) for a, b in zip(ours, theirs)),
                    f"{label}: ours {ours}, file {theirs}")


def value_of(row, key):
    """The row's (ΔfH°, ΔfG°, S°, Cp°) as chemicals gives it, for the row couplet used."""
    if row["table"] == "crc-substances":
        values = chemicals_row(row["cas"], row["phase"])
        if values[1] is None:  # element in its reference state
            values = (values[0], 0.0, values[2], values[3])
    elif row["table"] == "crc-ions":
        r = ion_table_cache[row["cas"]]
        values = (number(r["Hf(aq)"]), number(r["Gf(aq)"]), number(r["S(aq)"]), number(r["Cp(aq)"]))
    else:  # by definition: an element in its reference state
        values = (0.0, 0.0, None, None)
    return values[key]


def check_reactions(couplet):
    h2_entropy = chemicals_row("1333-74-0", "g")[2]
    for text in REACTIONS:
        run = subprocess.run([couplet, "thermo", "--json", text], capture_output=True, text=True)
        out = json.loads(run.stdout)
        if "error" in out:
            print(f"skipped (no data in couplet): {text}: {out['error']['message']}")
            continue
        dg = dh = ds = 0.0
        for term in out["rows"]:
            nu = term["nu"]
            if term["row"] is None:  # the electron, SHE convention
                ds = None if ds is None else ds + nu * h2_entropy / 2
                continue
            dg += nu * value_of(term["row"], 1)
            h = value_of(term["row"], 0)
            dh = None if dh is None or h is None else dh + nu * h
            s = value_of(term["row"], 2)
            ds = None if ds is None or s is None else ds + nu * s
        verdict(close(out["delta_g0_kJ_per_mol"] * 1000, dg, 1e-6), f"{text}: ΔrG° {out['delta_g0_kJ_per_mol']} kJ vs {dg / 1000}")
        if dh is not None:
            verdict(close(out["delta_h0_kJ_per_mol"] * 1000, dh, 1e-6), f"{text}: ΔrH°")
        if ds is not None:
            verdict(close(out["delta_s0_J_per_mol_K"], ds, 1e-9), f"{text}: ΔrS°")
        if out["n"]:
            verdict(close(out["e0_V"], -dg / (out["n"] * F), 1e-12), f"{text}: E°")


if __name__ == "__main__":
    if len(sys.argv) != 2:
        sys.exit("usage: formation_diff.py PATH/TO/couplet")
    ion_table_cache = ion_table()
    check_rows()
    check_reactions(sys.argv[1])
    print(f"{results['passed']} passed, {results['failed']} failed")
    sys.exit(1 if results["failed"] else 0)
