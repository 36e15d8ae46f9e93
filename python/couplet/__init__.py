"""couplet: electrode reactions and cell figures from ordinary chemical notation.

Balancing is exact (``int`` coefficients, oxidation numbers as ``fractions.Fraction``), the
potentials come from couplet's cited built-in table (or from formation data for couples it does
not list), and every error is a :class:`couplet.errors.CoupletError` with ``kind``,
``message``, ``line`` and ``column``.

>>> import couplet
>>> str(couplet.balance("MnO4- + Fe2+ -> Mn2+ + Fe3+", medium="acid"))
'MnO4- + 5 Fe2+ + 8 H+ -> Mn2+ + 5 Fe3+ + 4 H2O'
>>> round(couplet.Cell("Cu2+/Cu", "Zn2+/Zn").e0, 2)
1.1
"""

from typing import Dict, Optional

from . import errors, thermo
from ._couplet import (
    Balanced,
    Capacity,
    Couple,
    ElementChange,
    Finding,
    Model,
    ParsedEquation,
    ParsedSpecies,
    Redox,
    balance,
    check,
    couple,
    equation,
    nernst_slope,
    oxidation_numbers,
    quotient,
    redox,
    species,
    specific_capacity,
)
from ._couplet import Cell as _Cell
from .errors import ChemistryError, CoupletError, FileError, InputError
from .ocv import ConcentrationOCV, MolalityOCV, StoichiometryOCV

__all__ = [
    "Balanced", "Capacity", "Cell", "ChemistryError", "ConcentrationOCV", "Couple",
    "CoupletError", "ElementChange", "MolalityOCV", "FileError", "Finding", "InputError", "Model",
    "ParsedEquation", "ParsedSpecies", "Redox", "StoichiometryOCV", "balance", "check",
    "couple", "equation", "errors", "nernst_slope", "oxidation_numbers", "quotient", "redox",
    "species", "specific_capacity", "thermo",
]


class Cell(_Cell):
    """A cell ``cathode | anode`` from two couples (table ids, ``Ox/Red`` or half-reactions).

    >>> cell = Cell("PbO2/PbSO4", "PbSO4/Pb")
    >>> cell.electrons, round(cell.e0, 2)
    (2, 2.04)
    """

    def ocv(self, species: str, fixed: Optional[Dict[str, float]] = None,
            water: bool = False) -> ConcentrationOCV:
        """An OCV callable ``f(a, T)``: E as the activity of ``species`` varies, the other
        species of Q held at ``fixed`` activities."""
        return ConcentrationOCV(self, species, fixed, water)

    def molality_ocv(self, electrolyte: str, model: str = "table",
                     force: bool = False) -> MolalityOCV:
        """An OCV callable ``f(m, T)`` of the electrolyte molality (mol/kg) with an
        activity model; for tabulating curves."""
        return MolalityOCV(self, electrolyte, model, force)

    def stoichiometry_ocv(self, **discharge: object) -> StoichiometryOCV:
        """An OCV callable ``f(x, T)`` of the state of charge x along the open-circuit
        discharge; keyword arguments are those of :meth:`discharge`."""
        return StoichiometryOCV(self, self.discharge(**discharge))
