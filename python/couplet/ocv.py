"""Open-circuit-voltage callables for simulation codes, made from a couplet cell.

Both kinds are plain Python callables ``f(x, T)`` that accept floats or numpy arrays and
evaluate through the library's compiled model (one call into Rust per array, none per
element).
"""

import re
from typing import Dict, Optional, Union

import numpy as np

from ._couplet import Cell, Model
from ._couplet import species as _species
from .errors import InputError

_STATE = re.compile(r"\((s|l|g|aq|cr)\)$")


def _key(name: str) -> str:
    """Canonical ASCII without a state label, so "H2O" finds "H2O(l)"."""
    return _STATE.sub("", _species(name).ascii)

__all__ = ["ConcentrationOCV", "MolalityOCV", "StoichiometryOCV"]

ArrayLike = Union[float, np.ndarray]


def _result(values: np.ndarray, scalar: bool) -> ArrayLike:
    return float(values[0]) if scalar else values


class ConcentrationOCV:
    """E(c, T) of a cell as one species' activity (or ideal molality, a = m/m°) varies and
    the others stay fixed. Build with :meth:`couplet.Cell.ocv`."""

    def __init__(self, cell: Cell, species: str, fixed: Optional[Dict[str, float]] = None,
                 water: bool = False) -> None:
        self.model: Model = cell.model(water=water)
        names = [_key(n) for n in self.model.species]
        wanted = _key(species)
        if wanted not in names:
            raise InputError("usage", f"{species} does not enter Q of {cell.net}; "
                             f"Q takes {', '.join(self.model.species)}")
        fixed = {_key(k): float(v) for k, v in (fixed or {}).items()}
        missing = [n for n in names if n != wanted and n not in fixed]
        if missing:
            raise InputError("usage", f"give fixed activities for {', '.join(missing)}")
        self.species = self.model.species[names.index(wanted)]
        self._column = names.index(wanted)
        self._row = np.array([fixed.get(n, 1.0) for n in names], dtype=np.float64)

    def __call__(self, c: ArrayLike, T: ArrayLike = 298.15) -> ArrayLike:
        scalar = np.ndim(c) == 0 and np.ndim(T) == 0
        c, T = np.broadcast_arrays(np.atleast_1d(np.asarray(c, dtype=np.float64)),
                                   np.atleast_1d(np.asarray(T, dtype=np.float64)))
        rows = np.repeat(self._row[None, :], c.size, axis=0)
        rows[:, self._column] = c.ravel()
        temperatures = np.ascontiguousarray(T.ravel())
        values = self.model.potentials(rows, temperatures).reshape(c.shape)
        return _result(values.ravel(), scalar) if scalar else values


class StoichiometryOCV:
    """E(x, T) along the open-circuit discharge of a cell: x is the state of charge
    (1 charged, 0 when the limiting reactant is used up). ln Q is interpolated linearly in x
    on the discharge curve couplet computed; E at T follows from the cell's E°(T) and n through
    the library's model (ln Q is taken from the curve, computed at the cell's temperature).
    Build with :meth:`couplet.Cell.stoichiometry_ocv`."""

    def __init__(self, cell: Cell, curve: dict) -> None:
        soc = np.asarray(curve["state_of_charge"])
        order = np.argsort(soc)
        self.state_of_charge = soc[order]
        self.ln_q = np.asarray(curve["ln_q"])[order]
        self.curve = curve
        # Q itself is the one "activity" of this model: E = E°(T) − (RT/nF)·ln Q.
        self.model = Model(["Q"], [1.0], cell.e0, float(cell.electrons), cell.de0_dt or 0.0)

    def __call__(self, x: ArrayLike, T: ArrayLike = 298.15) -> ArrayLike:
        scalar = np.ndim(x) == 0 and np.ndim(T) == 0
        x, T = np.broadcast_arrays(np.atleast_1d(np.asarray(x, dtype=np.float64)),
                                   np.atleast_1d(np.asarray(T, dtype=np.float64)))
        if np.any((x < 0.0) | (x > 1.0)):
            raise InputError("usage", "state of charge must be within 0 and 1")
        q = np.exp(np.interp(x.ravel(), self.state_of_charge, self.ln_q))
        values = self.model.potentials(np.ascontiguousarray(q[:, None]),
                                       np.ascontiguousarray(T.ravel())).reshape(x.shape)
        return _result(values.ravel(), scalar) if scalar else values


class MolalityOCV:
    """E(m, T) of a cell whose electrolyte (a neutral salt or acid such as ``H2SO4``) has
    molality m in mol/kg, through the cell's full Nernst evaluation with an activity model
    (``"table"``: published mean activity coefficients and water activity). Each state is one
    call into the library, so use it to tabulate a curve (an interpolant for a simulation
    framework), not inside a time loop. Build with :meth:`couplet.Cell.molality_ocv`."""

    def __init__(self, cell: Cell, electrolyte: str, model: str = "table",
                 force: bool = False) -> None:
        self.cell = cell
        self.electrolyte = electrolyte
        self.activity_model = model
        self.force = force

    def __call__(self, m: ArrayLike, T: ArrayLike = 298.15) -> ArrayLike:
        scalar = np.ndim(m) == 0 and np.ndim(T) == 0
        m, T = np.broadcast_arrays(np.atleast_1d(np.asarray(m, dtype=np.float64)),
                                   np.atleast_1d(np.asarray(T, dtype=np.float64)))
        values = np.array([
            self.cell.potential(molalities={self.electrolyte: float(mi)}, temperature=float(ti),
                                model=self.activity_model, force=self.force)
            for mi, ti in zip(m.ravel(), T.ravel())
        ]).reshape(m.shape)
        return _result(values.ravel(), scalar) if scalar else values
