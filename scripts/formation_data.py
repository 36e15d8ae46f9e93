#!/usr/bin/env python3
"""Regenerates couplet's formation data and densities from the CRC Handbook tables that the
MIT-licensed PyPI package `chemicals` 1.5.2 ships inside its wheel.

    python3 scripts/formation_data.py            # downloads the pinned wheel with pip
    python3 scripts/formation_data.py WHEEL.whl  # or reads a wheel already on disk

Writes, from the repository root:
  data/formation.csv          one row per species and phase with a ΔfG° (see its header)
  data/formation_skipped.csv  every row of the source tables left out, with the reason
  data/densities.toml         the electrode-material densities couplet's volumetric figures use

Only the standard library is used: the wheel is a zip file, read in place, never imported.
Formulas of the aqueous ions are the CRC table's own (rewritten into couplet's notation);
substances are keyed by CAS number only in that table, so their formulas come from the
identifier databases in the same wheel (chemicals/Identifiers). Nothing here needs a network
at couplet's run time: the generated files are committed.
"""

import csv
import io
import re
import subprocess
import sys
import tempfile
import zipfile
from pathlib import Path

WHEEL = "chemicals==1.5.2"
ROOT = Path(__file__).resolve().parent.parent
IONS = "chemicals/Electrolytes/CRC Thermodynamic Properties of Aqueous Ions.tsv"
SUBSTANCES = "chemicals/Heat Capacity/CRC Standard Thermodynamic Properties of Chemical Substances.tsv"
PHYSICAL = "chemicals/Misc/Physical Constants of Inorganic Compounds.csv"
SOLID_VM = "chemicals/Density/CRC Solid Inorganic Constant Densities.tsv"
IDENTIFIERS = [  # in the order chemicals itself prefers them
    "chemicals/Identifiers/Inorganic db.tsv",
    "chemicals/Identifiers/chemical identifiers pubchem small.tsv",
    "chemicals/Identifiers/chemical identifiers pubchem large.tsv",
]
CRC = "CRC Handbook of Chemistry and Physics, 95th ed. (W. M. Haynes, ed., CRC Press, 2014)"
TABLES = {
    "crc-ions": f"{CRC}, section 5, 'Thermodynamic Properties of Aqueous Ions' "
    f"(file {IONS} of the PyPI package chemicals 1.5.2, MIT licence)",
    "crc-substances": f"{CRC}, section 5, 'Standard Thermodynamic Properties of Chemical "
    f"Substances' (file {SUBSTANCES} of the PyPI package chemicals 1.5.2, MIT licence); "
    "formula from the identifier databases of the same package, keyed by CAS number, or "
    "the element's symbol where the name is an element's",
    "by-definition": "zero by definition: an element in its reference state (common practice; "
    "IUPAC Green Book, 3rd ed., 2007, §2.11)",
}

HYDRATE_WORDS = {
    "hemihydrate": 0.5, "monohydrate": 1, "sesquihydrate": 1.5, "dihydrate": 2,
    "trihydrate": 3, "tetrahydrate": 4, "pentahydrate": 5, "hexahydrate": 6,
    "heptahydrate": 7, "octahydrate": 8, "nonahydrate": 9, "decahydrate": 10,
    "dodecahydrate": 12,
}

# Electrode materials whose density couplet carries (species as couplet writes it, CAS).
DENSITY_MATERIALS = [
    ("Li(s)", "7439-93-2"), ("Mg(s)", "7439-95-4"), ("Zn(s)", "7440-66-6"),
    ("Cd(s)", "7440-43-9"), ("Pb(s)", "7439-92-1"), ("Ag(s)", "7440-22-4"),
    ("Cu(s)", "7440-50-8"), ("Ni(s)", "7440-02-0"), ("Hg(l)", "7439-97-6"),
    ("ZnO(s)", "1314-13-2"), ("HgO(s)", "21908-53-2"), ("Ag2O(s)", "20667-12-3"),
    ("PbO2(s)", "1309-60-0"), ("PbSO4(s)", "7446-14-2"), ("MnO2(s)", "1313-13-9"),
    ("H2O(l)", "7732-18-5"),
]


def wheel_path(argv):
    if len(argv) > 1:
        return Path(argv[1])
    folder = Path(tempfile.mkdtemp(prefix="couplet-chemicals-"))
    subprocess.run(
        [sys.executable, "-m", "pip", "download", "--quiet", "--no-deps",
         "--disable-pip-version-check", "-d", str(folder), WHEEL],
        check=True,
    )
    return next(folder.glob("chemicals-*.whl"))


def read_tsv(wheel, name, delimiter="\t"):
    text = wheel.read(name).decode("utf-8")
    return list(csv.DictReader(io.StringIO(text), delimiter=delimiter))


def number(text):
    text = (text or "").strip()
    return None if text == "" else float(text)


def plain(value):
    """A value as the table prints it: integers without a decimal point."""
    if value is None:
        return ""
    return str(int(value)) if value == int(value) else repr(value)


def ion_formula(crc):
    """The CRC ion notation (`CO3-2`, `Fe(CN)6-3`, `Hg2+2`, `N3-`) in couplet's (`CO3^2-`)."""
    match = re.fullmatch(r"(.+?)([+-])(\d*)", crc)
    if not match:
        raise ValueError(f"no charge in '{crc}'")
    body, sign, digits = match.groups()
    return f"{body}^{digits}{sign}" if digits else f"{body}^{sign}"


def identifiers(wheel):
    """CAS number -> (formula, molar mass) from the identifier databases, first one wins."""
    found = {}
    for name in IDENTIFIERS:
        for line in wheel.read(name).decode("utf-8").splitlines():
            cells = line.split("\t")
            if len(cells) > 3 and cells[1] not in found:
                found[cells[1]] = (cells[2], cells[3])
    return found


def element_counts(formula):
    counts = {}
    for symbol, digits in re.findall(r"([A-Z][a-z]?)(\d*)", formula):
        counts[symbol] = counts.get(symbol, 0) + (int(digits) if digits else 1)
    return counts


def element_symbols():
    """Element name (lower case, IUPAC and US spellings) -> symbol, from data/elements.csv."""
    names = {}
    lines = [l for l in (ROOT / "data/elements.csv").read_text(encoding="utf-8").splitlines()
             if l and not l.startswith("#")]
    for row in csv.DictReader(lines):
        names[row["name"].lower()] = row["symbol"]
    names.update({"aluminum": "Al", "cesium": "Cs"})  # the CRC table's US spellings
    return names


# Elements whose name in the table means the molecule of their standard state (common
# practice: the diatomic gases); a qualifier such as "(atomic)" means the atom.
DIATOMIC = {"H", "N", "O", "F", "Cl", "Br", "I"}

# Reference states that the CRC substance table does not print as a row of zeros. ΔfH° and
# ΔfG° of an element in its reference state are zero by definition (common practice); the
# entropy is left blank rather than recalled.
REFERENCE_ROWS = [
    ("Sn", "s", "Tin (white)", "7440-31-5",
     "reference state of the element (white tin): ΔfH° = ΔfG° = 0 by definition; "
     "not a row of the table, which lists only gray tin"),
]


def element_formula(name, symbols):
    """The formula an element's name means, or None when the name is no element's."""
    match = re.fullmatch(r"([A-Za-z]+)(?: \(([^)]*)\))?", name.strip())
    if not match or match.group(1).lower() not in symbols:
        return None
    symbol = symbols[match.group(1).lower()]
    qualifier = (match.group(2) or "").lower()
    if symbol in DIATOMIC and qualifier != "atomic":
        return symbol + "2"
    return symbol


HYDROGEN_WORDS = ("hydr", "acid", "ammon", "hydrogen", "water", "bi", "phosphin", "borane",
                  "methyl", "ethyl", "amine", "amide", "hydrate")


def hydrogen_problem(name, formula):
    """Why an identifier formula with H cannot be the inorganic substance a name with an
    oxidation state in Roman numerals says (magnetite, 'Iron(II,III) oxide', is stored as
    Fe3H8O4 in one identifier database), or None."""
    if "H" not in element_counts(formula):
        return None
    if not re.search(r"\((?:I|II|III|IV|V|VI|VII|VIII)(?:,(?:I|II|III|IV))*\)", name):
        return None
    if any(word in name.lower() for word in HYDROGEN_WORDS):
        return None
    return (f"the identifier formula {formula} holds hydrogen, which the inorganic name "
            f"'{name}' does not")


def named_formula(name):
    """A formula the CRC name itself writes, in brackets or parentheses (`Silver[II] oxide
    [Ag2O2]`, `Aluminum oxide (Al2O)`), or None."""
    for token in re.findall(r"[\[(]([A-Z][A-Za-z0-9]*)[\])]", name):
        counts = element_counts(token)
        # A formula with a digit in it, not a Roman numeral (`(IV)` would read as I and V).
        if (re.fullmatch(r"(?:[A-Z][a-z]?\d*)+", token) and re.search(r"\d", token)
                and not re.fullmatch(r"[IVX]+", token) and counts):
            return token
    return None


def mixed_valence_problem(name, formula):
    """A name with two oxidation states of one metal ('Titanium(III,IV) oxide') cannot be a
    formula with one atom of it."""
    if re.search(r"\([IV]+,[IV]+\)", name):
        metals = [n for e, n in element_counts(formula).items() if e not in ("O", "H")]
        if metals and max(metals) == 1:
            return f"the identifier formula {formula} has one metal atom, the name '{name}' two states"
    return None


def hydrate_problem(name, formula):
    """Why an identifier formula cannot be the hydrate the CRC name says, or None."""
    for word, waters in HYDRATE_WORDS.items():
        if word in name.lower():
            counts = element_counts(formula)
            if counts.get("H", 0) < 2 * waters or counts.get("O", 0) < waters:
                return (f"the identifier formula {formula} lacks the {plain(waters)} H2O "
                        f"of the {word}")
    return None


def main(argv):
    wheel = zipfile.ZipFile(wheel_path(argv))
    rows, skipped = [], []

    for row in read_tsv(wheel, IONS):
        gibbs = number(row["Gf(aq)"])
        if gibbs is None:
            skipped.append((row["CAS"], row["Name"], "aq", "crc-ions", "no ΔfG° in the table"))
            continue
        rows.append({
            "formula": ion_formula(row["Formula"]), "state": "aq", "name": row["Name"],
            "cas": row["CAS"], "table": "crc-ions",
            "dfh": number(row["Hf(aq)"]), "dfg": gibbs, "s": number(row["S(aq)"]),
            "cp": number(row["Cp(aq)"]), "mw": row["MW"], "note": "",
        })

    ids = identifiers(wheel)
    symbols = element_symbols()
    for row in read_tsv(wheel, SUBSTANCES):
        cas, name = row["CAS"], row["Chemical"]
        known = ids.get(cas)
        as_element = element_formula(name, symbols)
        if as_element and (known is None or known[0] != as_element):
            # An element's name fixes its formula; the identifier databases lack some
            # elements (sulfur) and give others another formula.
            known = (as_element, known[1] if known and known[0] == as_element else "")
        for state, suffix in (("s", "s"), ("l", "l"), ("g", "g")):
            enthalpy, gibbs = number(row["Hf" + suffix]), number(row["Gf" + suffix])
            entropy, heat = number(row["S0" + suffix]), number(row["Cp" + suffix])
            if all(v is None for v in (enthalpy, gibbs, entropy, heat)):
                continue
            note = ""
            if gibbs is None and enthalpy == 0:
                # The table prints ΔfH° = 0 and leaves ΔfG° blank for an element in its
                # reference state, where both are zero by definition.
                gibbs, note = 0.0, "element in its reference state: ΔfG° = 0 by definition"
            reason = None
            if gibbs is None:
                reason = "no ΔfG° in the table"
            elif known is None:
                reason = "CAS number not in the identifier databases: no formula"
            elif named_formula(name) and element_counts(named_formula(name)) != element_counts(known[0]):
                # The table's own name writes the formula: it wins over the identifier's.
                known = (named_formula(name), "")
                note = (note + "; " if note else "") + "formula as the table's name writes it"
                reason = None
            elif re.search(r"[-+.]", known[0]):
                reason = (f"the identifier formula {known[0]} carries a charge or a dot: "
                          "not the neutral substance the table lists")
            else:
                reason = (hydrate_problem(name, known[0]) or hydrogen_problem(name, known[0])
                          or mixed_valence_problem(name, known[0]))
            if reason:
                skipped.append((cas, name, state, "crc-substances", reason))
                continue
            rows.append({
                "formula": known[0], "state": state, "name": name, "cas": cas,
                "table": "crc-substances", "dfh": enthalpy, "dfg": gibbs, "s": entropy,
                "cp": heat, "mw": known[1], "note": note,
            })

    for formula, state, name, cas, note in REFERENCE_ROWS:
        rows.append({
            "formula": formula, "state": state, "name": name, "cas": cas,
            "table": "by-definition", "dfh": 0.0, "dfg": 0.0, "s": None, "cp": None, "mw": "",
            "note": note,
        })

    write_formation(rows)
    write_skipped(skipped)
    write_densities(wheel, ids)
    print(f"formation.csv: {len(rows)} rows "
          f"({sum(r['state'] == 'aq' for r in rows)} aqueous); {len(skipped)} skipped")


def write_formation(rows):
    rows.sort(key=lambda r: (r["table"], r["formula"], r["state"], r["cas"]))
    with open(ROOT / "data/formation.csv", "w", newline="", encoding="utf-8") as out:
        out.write(
            "# Standard formation data of species, for couplet's E° from thermodynamics.\n"
            "# Generated by scripts/formation_data.py; do not edit by hand (rerun the script).\n"
            "# Lines starting with '#' are comments; then one header row.\n#\n"
            "# Standard state: p° = 1 bar, m° = 1 mol/kg, T° = 298.15 K (the CRC tables' own).\n"
            "# Convention of the ion table: ΔfH°, ΔfG°, S° and Cp° of H+(aq) are zero.\n#\n"
            "# Columns:\n"
            "# formula   in couplet's notation (ions: the CRC table's formula; substances: the\n"
            "#           identifier database's formula for the CAS number, Hill order)\n"
            "# state     s, l, g or aq\n"
            "# name      the CRC table's name\n"
            "# cas       CAS registry number as the CRC table gives it\n"
            "# table     which source table (keys below)\n"
            "# dfh_j     ΔfH° / (J/mol), blank where the table has none\n"
            "# dfg_j     ΔfG° / (J/mol)\n"
            "# s_j_k     S° / (J/(mol·K)) (ions: the partial molar entropy)\n"
            "# cp_j_k    Cp° / (J/(mol·K))\n"
            "# mw        molar mass / (g/mol) as the source gives it: a check on the formula\n"
            "# note      why a value is not the table's own print\n#\n# Tables:\n")
        for key, text in TABLES.items():
            out.write(f"# {key}: {text}\n")
        writer = csv.writer(out, lineterminator="\n")
        writer.writerow(["formula", "state", "name", "cas", "table", "dfh_j", "dfg_j",
                         "s_j_k", "cp_j_k", "mw", "note"])
        for r in rows:
            writer.writerow([r["formula"], r["state"], r["name"], r["cas"], r["table"],
                             plain(r["dfh"]), plain(r["dfg"]), plain(r["s"]),
                             plain(r["cp"]), r["mw"], r["note"]])


def write_skipped(skipped):
    with open(ROOT / "data/formation_skipped.csv", "w", newline="", encoding="utf-8") as out:
        out.write("# Rows of the source tables that scripts/formation_data.py left out of\n"
                  "# data/formation.csv, one per species and phase, with the reason.\n")
        writer = csv.writer(out, lineterminator="\n")
        writer.writerow(["cas", "name", "state", "table", "reason"])
        for row in sorted(skipped):
            writer.writerow(row)


def write_densities(wheel, ids):
    physical = {r["CAS"]: r for r in read_tsv(wheel, PHYSICAL)}
    volumes = {r["CAS"]: r for r in read_tsv(wheel, SOLID_VM)}
    lines = [
        "# Densities of electrode materials at room temperature, for couplet's volumetric",
        "# figures (mAh/cm3, Wh/L). Generated by scripts/formation_data.py; do not edit by",
        "# hand. One [[density]] table per material:",
        "#   species   = formula with state label, as couplet's notation reads it",
        "#   g_per_cm3 = density of the bulk material (not of a porous electrode)",
        "#   source    = where the value comes from",
        "#",
        "# They are crystal (or liquid) densities: a real electrode is porous and holds less per",
        "# volume. Replace any of them with --density SPECIES=G_PER_CM3 when you have a better",
        "# value.",
    ]
    for species, cas in DENSITY_MATERIALS:
        row = physical[cas]
        rho = float(row["rho"]) / 1000.0  # kg/m3 -> g/cm3
        source = (f"{CRC}, section 4, 'Physical Constants of Inorganic Compounds', "
                  f"{row['Chemical']} (CAS {cas}), density column (file {PHYSICAL} of "
                  "chemicals 1.5.2)")
        if cas in volumes and cas in ids:
            from_volume = float(ids[cas][1]) / float(volumes[cas]["Vm"]) / 1e6
            if abs(from_volume - rho) > 0.01 * rho:
                raise SystemExit(f"{species}: density {rho} disagrees with M/Vm {from_volume}")
            source += "; agrees within 1 % with M/Vm of the CRC solid densities table"
        lines += ["", "[[density]]", f'species = "{species}"', f"g_per_cm3 = {rho:g}",
                  f'source = "{source}"']
    (ROOT / "data/densities.toml").write_text("\n".join(lines) + "\n", encoding="utf-8")


if __name__ == "__main__":
    main(sys.argv)
