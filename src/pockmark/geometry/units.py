"""Length units of mesh files, resolved once when a mesh is loaded."""

from pockmark.errors import InputError

#: Metres per unit for every length unit a mesh file may be declared in.
LENGTH_UNITS = {"mm": 1e-3, "cm": 1e-2, "m": 1.0, "in": 0.0254, "ft": 0.3048}


def to_metres(unit):
    """Return the factor that converts lengths in ``unit`` to metres.

    Raises
    ------
    InputError
        If ``unit`` is not one of :data:`LENGTH_UNITS`.
    """
    try:
        return LENGTH_UNITS[unit]
    except (KeyError, TypeError):
        choices = ", ".join(LENGTH_UNITS)
        raise InputError(f"unknown length unit {unit!r}; use one of: {choices}") from None
