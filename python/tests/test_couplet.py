"""The Python package against the same published and common-practice checks as the Rust suite.

Sources are named beside each check. Nothing here asserts merely what the code prints.
"""

import math
from fractions import Fraction

import numpy as np
import pytest

import couplet
from couplet.errors import ChemistryError, CoupletError, InputError

# CODATA 2018 / SI 2019 exact constants (e, N_A, k); F and R are their products.
E_CHARGE = 1.602176634e-19
AVOGADRO = 6.02214076e23
BOLTZMANN = 1.380649e-23
FARADAY = E_CHARGE * AVOGADRO
GAS = BOLTZMANN * AVOGADRO


def test_daniell_cell_is_1_10_volt():
    # Daniell cell Cu2+/Cu against Zn2+/Zn: 1.10 V (common practice).
    cell = couplet.Cell("Cu2+/Cu", "Zn2+/Zn")
    assert cell.electrons == 2 and isinstance(cell.electrons, int)
    assert round(cell.e0, 2) == 1.10
    assert cell.runs_as_written
    # ΔG° = −nFE°, log10 K = nFE°/(RT ln 10) (IUPAC Green Book relations).
    assert cell.delta_g0 == pytest.approx(-2 * FARADAY * cell.e0 / 1000, rel=1e-12)
    assert cell.log10_k == pytest.approx(2 * FARADAY * cell.e0 / (GAS * 298.15 * math.log(10)),
                                         rel=1e-12)
    assert dict(cell.reactants) == {"Cu2+": 1, "Zn(s)": 1}
    assert dict(cell.products) == {"Cu(s)": 1, "Zn2+": 1}


def test_lead_acid_cell_is_2_04_volt():
    # E°cell = 1.685 − (−0.355) = 2.040 V (Harris, Quantitative Chemical Analysis, App. H);
    # about 2 V per cell, six make the 12 V battery (common practice).
    cell = couplet.Cell("PbO2/PbSO4", "PbSO4/Pb")
    assert cell.electrons == 2
    assert round(cell.e0, 2) == 2.04
    assert cell.caution is not None  # lead: the usual caution is shown


def test_nernst_slope_is_59_16_millivolt_per_decade():
    # (RT/F) ln 10 at 298.15 K from the CODATA exact constants: 59.16 mV/decade.
    assert couplet.nernst_slope(298.15) == pytest.approx(GAS * 298.15 / FARADAY * math.log(10),
                                                         rel=1e-15)
    assert round(couplet.nernst_slope() * 1000, 2) == 59.16


def test_nernst_decade_shifts_daniell_by_half_slope():
    # Zn2+ ten times more dilute raises E by (RT/2F) ln 10 (Nernst equation, n = 2).
    cell = couplet.Cell("Cu2+/Cu", "Zn2+/Zn")
    e1 = cell.potential(activities={"Cu2+": 1.0, "Zn2+": 1.0})
    e2 = cell.potential(activities={"Cu2+": 1.0, "Zn2+": 0.1})
    assert e1 == pytest.approx(cell.e0, abs=1e-15)
    assert e2 - e1 == pytest.approx(couplet.nernst_slope() / 2, rel=1e-12)


def test_zinc_capacity_is_820_mah_per_gram():
    # q = n·F/(3.6·M) with M(Zn) = 65.38 g/mol (CIAAW 2021 abridged): about 820 mAh/g.
    expected = 2 * FARADAY / (3.6 * 65.38)
    assert couplet.specific_capacity("Zn", 2) == pytest.approx(expected, rel=1e-12)
    assert round(expected) == 820
    assert dict(couplet.couple("Zn2+/Zn").capacities())["Zn(s)"] == pytest.approx(expected)


def test_balance_gives_exact_integers():
    # MnO4- + 5 Fe2+ + 8 H+ -> Mn2+ + 5 Fe3+ + 4 H2O (any general chemistry text).
    balanced = couplet.balance("MnO4- + Fe2+ -> Mn2+ + Fe3+", medium="acid")
    assert str(balanced) == "MnO4- + 5 Fe2+ + 8 H+ -> Mn2+ + 5 Fe3+ + 4 H2O"
    assert all(type(c) is int for _, c in balanced.reactants + balanced.products)
    assert balanced.electrons == 5
    redox = balanced.redox()
    assert redox.kind == "redox" and redox.n == 5
    assert [(c.element, c.before, c.after) for c in redox.reduced] == [("Mn", 7, 2)]


def test_half_reaction_gets_electrons():
    half = couplet.balance("MnO4- -> Mn2+", medium="acid", half=True)
    assert str(half) == "MnO4- + 8 H+ + 5 e- -> Mn2+ + 4 H2O"
    assert half.is_half_reaction and half.electrons == 5


def test_oxidation_numbers_are_fractions():
    # Fe3O4: Fe +8/3 on average; S4O6^2-: S +5/2 (IUPAC 2016 definition, DOMAIN examples).
    assert couplet.oxidation_numbers("Fe3O4") == {"Fe": Fraction(8, 3), "O": -2}
    assert couplet.oxidation_numbers("S4O6^2-")["S"] == Fraction(5, 2)
    assert all(isinstance(v, Fraction) for v in couplet.oxidation_numbers("NH4NO3").values())


def test_round_trips():
    for text in ["SO4^2-", "Fe3+", "CuSO4*5H2O", "[Fe(CN)6]4-", "O2(g)"]:
        once = couplet.species(text)
        assert couplet.species(once.ascii) == once
    eq = couplet.equation("MnO4- + 8 H+ + 5 e- -> Mn2+ + 4 H2O(l)")
    assert couplet.equation(eq.ascii).ascii == eq.ascii
    assert eq.has_electrons and eq.is_balanced
    assert eq.reactants[1][0] == Fraction(8)


def test_species_composition():
    water = couplet.species("H2O")
    assert dict(water.elements) == {"H": 2, "O": 1}
    # 2·1.008 + 15.999 g/mol (CIAAW 2021 abridged)
    assert water.molar_mass == pytest.approx(2 * 1.008 + 15.999)


def test_quotient_expression():
    assert couplet.Cell("Cu2+/Cu", "Zn2+/Zn").quotient() == "Q = a(Zn2+) / a(Cu2+)"


def test_errors_carry_kind_and_place():
    with pytest.raises(InputError) as caught:
        couplet.species("MnXx4")
    e = caught.value
    assert (e.kind, e.line, e.column) == ("unknown_element", 1, 3)
    assert isinstance(e, CoupletError) and isinstance(e, ValueError)
    with pytest.raises(ChemistryError) as caught:
        couplet.balance("H2 + O2 -> H2O + H2O2")
    assert caught.value.kind == "not_unique" and caught.value.line is None
    with pytest.raises(ChemistryError) as caught:
        couplet.Cell("Xe2+/Xe", "Zn2+/Zn")
    assert caught.value.kind == "not_found"
    with pytest.raises(InputError) as caught:
        couplet.Cell("Cu2+/Cu", "Zn2+/Zn").potential(activities={"Cu2+": -1.0, "Zn2+": 1.0})
    assert caught.value.kind == "usage"


def test_model_arrays_match_single_states():
    cell = couplet.Cell("PbO2/PbSO4", "PbSO4/Pb")
    model = cell.model(water=True)
    rng = np.random.default_rng(7)
    states = rng.uniform(0.1, 5.0, size=(1000, len(model.species)))
    temps = rng.uniform(273.15, 323.15, size=1000)
    batch = model.potentials(states, temps)
    for i in range(0, 1000, 97):
        assert batch[i] == model.potential(list(states[i]), temps[i])
    # The same through the cell's own Nernst evaluation (water activity given).
    names = model.species
    one = cell.potential(activities=dict(zip(names, states[3])), temperature=temps[3])
    assert batch[3] == pytest.approx(one, abs=1e-12)


def test_model_array_errors_name_the_state():
    model = couplet.Cell("Cu2+/Cu", "Zn2+/Zn").model()
    states = np.ones((5, 2))
    states[3, 0] = 0.0
    with pytest.raises(InputError, match="state 3"):
        model.potentials(states, 298.15)
    with pytest.raises(InputError):
        model.potentials(np.ones((5, 3)), 298.15)


def test_concentration_ocv_is_vectorised_nernst():
    cell = couplet.Cell("Cu2+/Cu", "Zn2+/Zn")
    ocv = cell.ocv("Cu2+", fixed={"Zn2+": 1.0})
    a = np.array([1.0, 0.1, 0.01])
    e = ocv(a, 298.15)
    assert e[0] == pytest.approx(cell.e0, abs=1e-15)
    assert np.diff(e) == pytest.approx(-couplet.nernst_slope() / 2, rel=1e-12)
    assert isinstance(ocv(0.5), float)


def test_stoichiometry_ocv_follows_the_discharge():
    cell = couplet.Cell("Cu2+/Cu", "Zn2+/Zn")
    args = dict(moles={"Cu2+": 0.1, "Zn2+": 0.01, "Zn": 1.0}, solvent_kg=1.0, steps=50)
    curve = cell.discharge(**args)
    ocv = cell.stoichiometry_ocv(**args)
    # At the curve's own points the callable gives the curve's E.
    assert ocv(curve["state_of_charge"], 298.15) == pytest.approx(curve["e_V"], abs=1e-12)
    # Cells that consume dissolved species lose voltage as Q grows (common practice).
    assert np.all(np.diff(curve["e_V"]) < 0)
    # Charge: n F ξ / 3600 (Faraday's law).
    assert curve["charge_Ah"][-1] == pytest.approx(2 * FARADAY * curve["extent_mol"][-1] / 3600)


def test_capacity_of_lead_acid():
    cap = couplet.Cell("PbO2/PbSO4", "PbSO4/Pb").capacity("with-electrolyte")
    # Per mole of reaction: 2 F over the mass of PbO2 + Pb + 2 H2SO4 (CIAAW 2021 masses).
    mass = (207.2 + 2 * 15.999) + 207.2 + 2 * (2 * 1.008 + 32.06 + 4 * 15.999)
    assert cap.mass_g_per_mol == pytest.approx(mass, rel=1e-4)
    assert cap.amp_hours_per_kg == pytest.approx(2 * FARADAY / 3.6 / mass, rel=1e-4)


def test_check_returns_findings(tmp_path):
    path = tmp_path / "ours.toml"
    # Permanganate written with one water too few (invented entry of our own).
    path.write_text('[[couple]]\nid = "mn-test"\n'
                    'reaction = "MnO4- + 8 H+ + 5 e- -> Mn2+ + 3 H2O(l)"\n'
                    'e0 = 1.507\nsource = "invented for this test"\n')
    findings = couplet.check([str(path)])
    codes = [f.code for f in findings]
    assert "CPL201" in codes
    f = findings[codes.index("CPL201")]
    assert (f.line, f.column, f.severity) == (3, 12, "error")
    assert f.suggestion == "MnO4- + 8 H+ + 5 e- -> Mn2+ + 4 H2O(l)"
    with pytest.raises(couplet.FileError):
        couplet.check([str(tmp_path / "missing.toml")])


def test_e0_from_formation_data():
    # Cu2+ + 2 e- -> Cu: +0.34 V vs SHE (Harris App. H table value 0.339 V; within 10 mV of
    # the CRC formation data couplet carries). E° = −ΔrG°/(2F) is the definition (DOMAIN).
    found = couplet.thermo.e0("Cu2+/Cu")
    assert found.e0 == pytest.approx(0.34, abs=0.01)
    assert found.e0 == pytest.approx(-found.delta_g * 1000 / (2 * FARADAY), rel=1e-12)
    assert found.rows


def test_check_on_a_directory_skips_other_files(tmp_path):
    # A directory is searched for couple files; an unrelated CSV in it is not one.
    (tmp_path / "notes.csv").write_text("name,value\nx,1\n")
    (tmp_path / "ours.toml").write_text('[[couple]]\nid = "cu-test"\n'
                                        'reaction = "Cu2+ + 2 e- -> Cu(s)"\n'
                                        'e0 = 0.34\nsource = "invented for this test"\n')
    findings = couplet.check([str(tmp_path)])
    assert all(f.file.endswith("ours.toml") for f in findings)
