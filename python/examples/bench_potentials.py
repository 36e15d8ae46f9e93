"""E over 10^6 lead–acid states three ways, side by side: couplet's compiled model through
numpy buffers, the same formula written in numpy, and (for reference) a Python loop over 10^4
states. The states are the ones `cargo bench --bench nernst` uses, so its hand-written Rust
figure compares directly.

    python3 python/examples/bench_potentials.py
"""

import time

import numpy as np

import couplet

STATES = 1_000_000
# CODATA 2018 exact constants.
FARADAY = 1.602176634e-19 * 6.02214076e23
GAS = 1.380649e-23 * 6.02214076e23


def best(fn, repeat=7):
    times = []
    for _ in range(repeat):
        start = time.perf_counter()
        fn()
        times.append(time.perf_counter() - start)
    return min(times), sorted(times)[len(times) // 2]


def main():
    cell = couplet.Cell("PbO2/PbSO4", "PbSO4/Pb")
    model = cell.model(water=True)
    order = {name: i for i, name in enumerate(model.species)}
    x = np.arange(STATES) / STATES
    columns = {"H+": 0.5 + 8.0 * x, "SO4^2-": 0.2 + 3.0 * x, "H2O(l)": 0.95 - 0.35 * x}
    activities = np.empty((STATES, 3))
    for name, values in columns.items():
        activities[:, order[name]] = values
    temperatures = 273.15 + 40.0 * x

    def by_couplet():
        return model.potentials(activities, temperatures)

    def by_numpy():
        h, so4, w = columns["H+"], columns["SO4^2-"], columns["H2O(l)"]
        if not (np.all(h > 0) and np.all(so4 > 0) and np.all(w > 0) and np.all(temperatures > 0)):
            raise ValueError("bad state")
        q = (w * w) / (h ** 4 * so4 * so4)
        return cell.e0 - GAS / (2 * FARADAY) * temperatures * np.log(q)

    assert np.allclose(by_couplet(), by_numpy(), rtol=0, atol=1e-12)
    c_best, c_median = best(by_couplet)
    n_best, n_median = best(by_numpy)
    loop_states = 10_000
    rows = [list(r) for r in activities[:loop_states]]
    temps = list(temperatures[:loop_states])
    l_best, _ = best(lambda: [model.potential(r, t) for r, t in zip(rows, temps)], repeat=3)
    print(f"couplet Model.potentials, 1e6 states: {c_best * 1e3:.1f} ms best, "
          f"{c_median * 1e3:.1f} ms median ({c_best / STATES * 1e9:.1f} ns/state)")
    print(f"numpy formula,            1e6 states: {n_best * 1e3:.1f} ms best, "
          f"{n_median * 1e3:.1f} ms median ({n_best / STATES * 1e9:.1f} ns/state)")
    print(f"Python loop over Model.potential: {l_best / loop_states * 1e9:.0f} ns/state")
    print(f"numpy / couplet: {n_best / c_best:.2f}x")


if __name__ == "__main__":
    main()
