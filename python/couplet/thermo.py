"""E° from formation data (the CRC tables compiled into couplet): ΔrG° = −nFE°."""

from ._couplet import FormationE0, e0_from_formation

__all__ = ["FormationE0", "e0_from_formation", "e0"]


def e0(query: str, medium: "str | None" = None) -> FormationE0:
    """E° (V vs SHE at 298.15 K) of a half-reaction or ``Ox/Red`` from formation data.

    ``medium`` ("acid" or "base") is used when couplet has to balance an ``Ox/Red``.
    """
    return e0_from_formation(query, medium)
