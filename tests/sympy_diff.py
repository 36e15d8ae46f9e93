#!/usr/bin/env python3
"""Differential test of `couplet balance` against sympy's exact rational null space.

Usage: python3 tests/sympy_diff.py PATH/TO/couplet [COUNT] [SEED]
       python3 tests/sympy_diff.py --families [BENCH_BINARY]

Generates COUNT (default 2400, at least 2000) random balanceable reactions and half-reactions
from random formulas (seeded, so a failure can be replayed), balances each with
sympy.Matrix.nullspace() and with `couplet balance --json -` (one batch per medium and electron
mode), and fails on any difference. Prints the time each side took.

A generated skeleton is kept when sympy finds a one-dimensional null space in which every
written species has a nonzero coefficient; the written side of each species is then the side
its sign puts it on, so the skeleton is balanceable by construction. sympy is the reference
(a general-purpose computer algebra system, https://www.sympy.org).

With --families, the script times instead of comparing: it runs the balance benchmark's
`--sympy-families` mode (`cargo bench --bench balance -- --sympy-families`, or the given bench
binary), which prints every member of the alkane family (m alkanes burned together, a null
space of dimension m) and of the random dense family (k species) with couplet's time per
balance, times sympy's null space of the same matrices (converted to primitive integer
vectors, as couplet gives them), and prints the ratio per member. It checks nothing against
sympy beyond the dimension of the null space: the comparison of answers is the default mode.
"""

import re
import statistics

import json
import random
import subprocess
import sys
import time
from math import gcd

import sympy

ELEMENTS = ["H", "C", "N", "O", "S", "Cl", "Fe", "Mn", "Cu", "Na", "K", "P", "Cr", "Br", "Zn"]
# (formula as typed, element counts, charge)
WATER = ("H2O", {"H": 2, "O": 1}, 0)
PROTON = ("H+", {"H": 1}, 1)
HYDROXIDE = ("OH-", {"O": 1, "H": 1}, -1)
ELECTRON = ("e-", {}, -1)
RESERVED = [WATER, PROTON, HYDROXIDE, ELECTRON]


def key(counts, charge):
    return (tuple(sorted(counts.items())), charge)


def random_species(rng, elements):
    chosen = rng.sample(elements, rng.randint(1, min(3, len(elements))))
    counts = {e: rng.choice([1, 1, 1, 2, 2, 3, 4, 6]) for e in chosen}
    body = "".join(e + (str(n) if n > 1 else "") for e, n in counts.items())
    charge = rng.choice([0, 0, 0, 0, -1, -1, -2, 1, 2, 3])
    if charge > 0 and set(chosen) == {"H"}:
        charge = 0
    if charge == 0:
        text = body
    else:
        magnitude = abs(charge)
        text = body + "^" + (str(magnitude) if magnitude > 1 else "") + ("+" if charge > 0 else "-")
    return (text, counts, charge)


def added_species(medium, electrons):
    added = []
    if medium == "acid":
        added += [WATER, PROTON]
    elif medium == "base":
        added += [WATER, HYDROXIDE]
    if electrons:
        added.append(ELECTRON)
    return added


def nullspace_integer(columns):
    rows = []
    elements = []
    for _, counts, _ in columns:
        for e in counts:
            if e not in elements:
                elements.append(e)
    for e in elements:
        rows.append([c.get(e, 0) for _, c, _ in columns])
    if any(z != 0 for _, _, z in columns):
        rows.append([z for _, _, z in columns])
    basis = sympy.Matrix(rows).nullspace()
    if len(basis) != 1:
        return None
    return primitive_integers(basis[0])


def primitive_integers(vector):
    """A rational vector scaled to integers with gcd 1 (its direction kept)."""
    denominators = 1
    for x in vector:
        denominators = sympy.ilcm(denominators, sympy.Rational(x).q)
    ints = [int(sympy.Rational(x) * denominators) for x in vector]
    common = 0
    for x in ints:
        common = gcd(common, x)
    return [x // common for x in ints]


def generate(rng, medium, electrons_written, electrons_added):
    """One balanceable case, or None."""
    elements = rng.sample(ELEMENTS, rng.randint(2, 3))
    # Oxygen (and hydrogen) make the solvent species take part, as in real aqueous redox.
    if medium != "none" and rng.random() < 0.8:
        elements = [e for e in elements if e not in ("O", "H")][:2] + ["O"] + (["H"] if rng.random() < 0.3 else [])
    user = []
    for _ in range(rng.randint(2, 4)):
        s = random_species(rng, elements)
        if key(s[1], s[2]) in {key(r[1], r[2]) for r in RESERVED + user}:
            return None
        user.append(s)
    if electrons_written:
        user.append(ELECTRON)
    columns = user + added_species(medium, electrons_added)
    vector = nullspace_integer(columns)
    if vector is None or any(x == 0 for x in vector[: len(user)]):
        return None
    if electrons_written and vector[len(user) - 1] == 0:
        return None
    if vector[0] > 0:
        vector = [-x for x in vector]
    left = [(s, -x) for s, x in zip(user, vector) if x < 0]
    right = [(s, x) for s, x in zip(user, vector) if x > 0]
    if not left or not right:
        return None
    # The electron goes last on its side, as chemists write it.
    left.sort(key=lambda t: t[0] is ELECTRON)
    right.sort(key=lambda t: t[0] is ELECTRON)
    added = list(zip(added_species(medium, electrons_added), vector[len(user):]))
    text = " + ".join(s[0] for s, _ in left) + " -> " + " + ".join(s[0] for s, _ in right)
    return {"text": text, "columns": columns, "left": left, "right": right, "added": added}


def expected(case):
    """Reactants and products as couplet lists them: written species in order, then the
    added ones that are not zero, in the fixed order."""
    reactants = [("*", c) for _, c in case["left"]]
    products = [("*", c) for _, c in case["right"]]
    for (name, _, _), x in case["added"]:
        if x < 0:
            reactants.append((name, -x))
        elif x > 0:
            products.append((name, x))
    return reactants, products


def formula_counts(formula):
    """Element counts of a formula written as symbols and whole subscripts (as the families are)."""
    counts = {}
    for symbol, digits in re.findall(r"([A-Z][a-z]?)(\d*)", formula):
        counts[symbol] = counts.get(symbol, 0) + (int(digits) if digits else 1)
    return counts


def integer_nullspace(columns):
    """sympy's null space of the conservation matrix, each vector as primitive integers."""
    elements = []
    for counts in columns:
        for e in counts:
            if e not in elements:
                elements.append(e)
    matrix = sympy.Matrix([[c.get(e, 0) for c in columns] for e in elements])
    return [primitive_integers(vector) for vector in matrix.nullspace()]


def median_seconds(run, budget=0.3):
    times = []
    start = time.perf_counter()
    while len(times) < 3 or (time.perf_counter() - start < budget and len(times) < 200):
        t = time.perf_counter()
        run()
        times.append(time.perf_counter() - t)
    return statistics.median(times)


def families(bench_binary):
    command = [bench_binary, "--sympy-families"] if bench_binary else ["cargo", "bench", "--quiet", "--bench", "balance", "--", "--sympy-families"]
    run = subprocess.run(command, capture_output=True, text=True, check=True)
    print(f"{'family':8} {'size':>4} {'couplet':>12} {'sympy':>12} {'sympy/couplet':>14}")
    slower = 0
    for line in run.stdout.splitlines():
        family, size, nanoseconds, text = line.split("\t")
        left, right = text.split(" -> ")
        columns = [formula_counts(f) for f in left.split(" + ") + right.split(" + ")]
        basis = integer_nullspace(columns)
        # Alkanes: m fuels, so a family of dimension m; dense: one balance.
        want = int(size) if family == "alkanes" else 1
        if len(basis) != want:
            sys.exit(f"{family} {size}: sympy finds a null space of dimension {len(basis)}, not {want}")
        sympy_s = median_seconds(lambda: integer_nullspace(columns))
        couplet_s = int(nanoseconds) * 1e-9
        ratio = sympy_s / couplet_s
        slower += ratio < 1
        print(f"{family:8} {size:>4} {couplet_s * 1e6:>9.1f} us {sympy_s * 1e6:>9.1f} us {ratio:>13.1f}x")
    print(f"members where couplet is slower than sympy: {slower}")


def main():
    if len(sys.argv) < 2:
        sys.exit(__doc__)
    if sys.argv[1] == "--families":
        families(sys.argv[2] if len(sys.argv) > 2 else None)
        return
    binary = sys.argv[1]
    count = int(sys.argv[2]) if len(sys.argv) > 2 else 2400
    seed = int(sys.argv[3]) if len(sys.argv) > 3 else 20261202
    if count < 2000:
        sys.exit("at least 2000 cases")
    rng = random.Random(seed)
    # (medium, e- written in the input, --half): whole reactions, half-reactions with e-
    # written, and half-reactions where couplet must add e- itself.
    groups = [(m, w, h) for m in ("none", "acid", "base") for (w, h) in ((False, False), (True, False), (False, True))]
    per_group = -(-count // len(groups))
    cases = {g: [] for g in groups}
    for group in groups:
        medium, written, half = group
        while len(cases[group]) < per_group:
            case = generate(rng, medium, written, half)
            if case is not None:
                cases[group].append(case)

    start = time.perf_counter()
    for group in groups:
        for case in cases[group]:
            nullspace_integer(case["columns"])
    sympy_seconds = time.perf_counter() - start

    failures = 0
    total = 0
    couplet_seconds = 0.0
    for group in groups:
        medium, _, half = group
        batch = "".join(c["text"] + "\n" for c in cases[group])
        command = [binary, "balance", "--json", "--medium", medium] + (["--half"] if half else []) + ["-"]
        start = time.perf_counter()
        run = subprocess.run(command, input=batch, capture_output=True, text=True)
        couplet_seconds += time.perf_counter() - start
        results = [json.loads(line) for line in run.stdout.splitlines()]
        if len(results) != len(cases[group]):
            print(f"{group}: {len(results)} results for {len(cases[group])} lines\n{run.stderr}")
            sys.exit(1)
        for case, result in zip(cases[group], results):
            total += 1
            want_reactants, want_products = expected(case)
            if "error" in result:
                failures += 1
                print(f"FAIL {medium} half={half}: {case['text']}: {result['error']}")
                continue
            got_reactants = [(r["species"], r["coefficient"]) for r in result["reactants"]]
            got_products = [(r["species"], r["coefficient"]) for r in result["products"]]

            def same(want, got):
                return len(want) == len(got) and all(
                    w[1] == g[1] and (w[0] == "*" or w[0] == g[0]) for w, g in zip(want, got)
                )

            if not (same(want_reactants, got_reactants) and same(want_products, got_products)):
                failures += 1
                print(f"FAIL {medium} half={half}: {case['text']}\n  sympy:   {want_reactants} -> {want_products}\n  couplet: {result['balanced']}")

    with_solvent = sum(1 for g in groups for c in cases[g] if any(x != 0 and s is not ELECTRON for s, x in c["added"]))
    print(f"{total} cases (seed {seed}), {with_solvent} with H2O/H+/OH- added; {failures} differences")
    print(f"sympy nullspace:  {sympy_seconds:.3f} s ({sympy_seconds / total * 1e6:.0f} us/equation)")
    print(f"couplet (9 batch runs, process start included): {couplet_seconds:.3f} s ({couplet_seconds / total * 1e6:.1f} us/equation)")
    print(f"ratio sympy/couplet: {sympy_seconds / couplet_seconds:.0f}x (end to end; see DEVELOPERS.md)")
    print(f"sympy comparison: {total - failures} passed, {failures} failed")
    sys.exit(1 if failures else 0)


if __name__ == "__main__":
    main()
