"""Runs PyBaMM's lead–acid LOQS model with an open-circuit voltage from couplet.

couplet's lead–acid cell (PbO2/PbSO4 against PbSO4/Pb, built-in cited E°) evaluated at the
electrolyte molality with published mean activity coefficients and water activity of H2SO4
(couplet's "table" activity model) is tabulated once and handed to PyBaMM as an interpolant
for the positive electrode; the negative electrode's OCP is set to 0 V so that the model's
open-circuit voltage is couplet's cell voltage (PyBaMM's own Bode 1977 fits are printed beside
it). Not run by CI (PyBaMM and its solvers are a large install). Set-up, from the repository
root:

    python3 -m venv /tmp/pybamm-venv
    /tmp/pybamm-venv/bin/pip install pybamm ./python
    /tmp/pybamm-venv/bin/python python/examples/pybamm_lead_acid.py
"""

import numpy as np
import pybamm

import couplet


def main():
    cell = couplet.Cell("PbO2/PbSO4", "PbSO4/Pb")
    ocv = cell.molality_ocv("H2SO4", model="table")
    # The molality range of the published H2SO4 coefficients couplet carries.
    molality = np.linspace(0.1, 10.0, 100)
    volts = ocv(molality)

    params = pybamm.ParameterValues("Sulzer2019")
    bode_negative = params["Negative electrode open-circuit potential [V]"]
    bode_positive = params["Positive electrode open-circuit potential [V]"]
    for m in (0.5, 1.0, 2.0, 5.0):
        bode = bode_positive(m) - bode_negative(m)
        print(f"m = {m:3.1f} mol/kg: couplet {ocv(m):.4f} V, PyBaMM's Bode 1977 fits {bode:.4f} V")

    experiment = pybamm.Experiment(["Discharge at 1 A for 1 hour"])
    reference = pybamm.Simulation(pybamm.lead_acid.LOQS(), parameter_values=params.copy(),
                                  experiment=experiment).solve()
    v_ref = reference["Voltage [V]"].entries
    print(f"LOQS with PyBaMM's own OCPs, 1 A for 1 h: voltage {v_ref[0]:.3f} V -> {v_ref[-1]:.3f} V")

    params.update({
        "Positive electrode open-circuit potential [V]":
            lambda m: pybamm.Interpolant(molality, volts, m, name="couplet OCV",
                                         extrapolate=True),
        "Negative electrode open-circuit potential [V]": lambda m: 0 * m,
    })
    model = pybamm.lead_acid.LOQS()
    sim = pybamm.Simulation(model, parameter_values=params,
                            experiment=experiment)
    solution = sim.solve()
    t = solution["Time [h]"].entries
    v = solution["Voltage [V]"].entries
    u = solution["Battery open-circuit voltage [V]"].entries \
        if "Battery open-circuit voltage [V]" in model.variables else None
    print(f"LOQS with the OCV from couplet, 1 A for 1 h: {len(t)} time points, voltage {v[0]:.3f} V -> {v[-1]:.3f} V")
    if u is not None:
        print(f"battery open-circuit voltage {u[0]:.3f} V -> {u[-1]:.3f} V")
    print(f"cells in the battery: {params['Number of cells connected in series to make a battery']}")


if __name__ == "__main__":
    main()
