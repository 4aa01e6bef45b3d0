"""Directional fluxes from user environment tables.

Scope: turn the validated contents of a user environment table (read by
:func:`pockmark.io.environment_table.load_environment_table`; format in that module and in
``docs/environment_tables.md``) into :class:`~pockmark.environment.flux.DirectionalFlux`
objects with model ``"user_table"``, in canonical units: flux of particles at least a given
diameter per unit area normal to their direction of travel [m⁻² yr⁻¹].

Design: the risk integration evaluates :math:`\\sum_{jk} w_{jk}\\,\\Phi_0(\\ge d_c(V_k,
\\theta))` with one size distribution :math:`\\Phi_0` per flux. A table may give each
(direction, speed) cell its own size distribution, so a table becomes **one flux per distinct
size distribution**: cells whose cumulative fluxes are proportional (the same shape, to the
relative tolerance ``shape_rtol``) share a flux whose :math:`\\Phi_0` is their sum and whose
weights are each cell's share. This is exact (to ``shape_rtol``), needs no change in the risk
code, and gives one flux for the common case of a single size distribution scaled per cell. A
table whose every cell has its own shape gives as many fluxes as cells, which is correct but
slow (one ray-cast pass per flux); a warning is logged above ``MANY_SIZE_DISTRIBUTIONS``.

This module does not import :mod:`pockmark.io`: it accepts any object with the attributes of
:class:`pockmark.io.environment_table.EnvironmentTable` (or a mapping with those keys).
"""

import logging
from collections.abc import Mapping

import numpy as np

from pockmark.constants import SECONDS_PER_YEAR
from pockmark.environment.directions import fibonacci_directions
from pockmark.environment.flux import DirectionalFlux
from pockmark.errors import InputError

logger = logging.getLogger(__name__)

#: Relative tolerance within which two cells' size distributions count as the same shape.
SHAPE_RTOL = 1e-6
#: A table giving more distinct size distributions than this logs a warning about run time.
MANY_SIZE_DISTRIBUTIONS = 12
#: Flux conversion factors to m⁻² yr⁻¹ by the ``flux_unit`` header value.
FLUX_UNIT_FACTORS = {"m-2 yr-1": 1.0, "m-2 s-1": SECONDS_PER_YEAR}
#: Factors to the per-unit-cross-section convention by the ``area_convention`` header value:
#: a one-sided randomly oriented plate receives ¼ of the cross-sectional flux (the mean of
#: max(0, n·u) over random orientations).
AREA_CONVENTION_FACTORS = {"cross_section": 1.0, "random_plate": 4.0}

_FIELDS = ("path", "header", "diameters", "cumulative_flux", "directions", "speeds",
           "speed_fractions")


def _fields(table):
    if isinstance(table, Mapping):
        get = table.get
    else:
        def get(name, default=None):
            return getattr(table, name, default)
    missing = [name for name in _FIELDS[1:] if name not in ("directions", "speed_fractions")
               and get(name) is None]
    if missing:
        raise InputError(
            f"an environment table needs {', '.join(_FIELDS)}; {', '.join(missing)} missing "
            f"(read tables with pockmark.io.environment_table.load_environment_table)"
        )
    return {name: get(name) for name in _FIELDS}


def _conversion(header, path):
    try:
        unit = FLUX_UNIT_FACTORS[header["flux_unit"]]
        area = AREA_CONVENTION_FACTORS[header["area_convention"]]
    except KeyError as error:
        raise InputError(
            f"{path}: environment table header {error.args[0]!r} is missing or invalid; "
            f"flux_unit one of {', '.join(FLUX_UNIT_FACTORS)}, area_convention one of "
            f"{', '.join(AREA_CONVENTION_FACTORS)}"
        ) from None
    return unit * area


def _parameters(fields, factor, group, groups, diameters, flux):
    header = fields["header"]
    return {
        "table": str(fields["path"]),
        "table_source": header["source"],
        "table_frame": header["frame"],
        "directionality": header.get("directionality", "directional"),
        "area_convention": header["area_convention"],
        "flux_unit": header["flux_unit"],
        "conversion_factor": factor,
        "description": header.get("description", ""),
        "reference": header.get("reference", ""),
        "size_group": group,
        "size_groups": groups,
        "size_distribution": {
            "diameter_cm": [float(x) for x in diameters],
            "cumulative_flux": [float(x) for x in flux],
            "unit": "m-2 yr-1 per unit cross-section, particles >= diameter",
            "interpolation": "log-log inside; below: first interval's power law; above: held",
        },
        "frame": "orbital" if header["frame"] == "orbital" else "body",
    }


def _shape_keys(flux, rtol):
    """Integer keys equal for cells whose size distributions have the same shape."""
    with np.errstate(divide="ignore"):
        log_shape = np.log(flux / flux[:, :1])
    keys = np.round(log_shape / rtol)
    keys = np.where(np.isfinite(keys), keys, np.iinfo(np.int64).min)
    return keys.astype(np.int64)


def table_fluxes(table, directions=600, shape_rtol=SHAPE_RTOL):
    """Directional fluxes of a user environment table, one per distinct size distribution.

    Parameters
    ----------
    table : EnvironmentTable or mapping
        Output of :func:`pockmark.io.environment_table.load_environment_table`.
    directions : int
        Isotropic tables: number of directions of the Fibonacci grid over the sphere.
        Default 600. Unused for directional tables.
    shape_rtol : float
        Relative tolerance within which cells' size distributions are merged. Default 1e-6.

    Returns
    -------
    list of DirectionalFlux
        ``source`` = the table's source name, ``model="user_table"``, directions in the
        table's frame (``parameters["frame"]`` is ``"orbital"`` or ``"body"``). The weights of
        each flux sum to 1; the fluxes add.

    Raises
    ------
    InputError
        For a table object lacking fields or with an invalid header, or a table whose every
        cell has zero flux.

    Notes
    -----
    Units: ``m-2 s-1`` is multiplied by ``SECONDS_PER_YEAR``; the ``random_plate``
    convention by 4 (a one-sided randomly oriented plate receives ¼ of the flux per unit
    cross-section). A cell with flux :math:`F_c(d)` in group :math:`g` gets
    :math:`\\Phi_{0,g}(d) = \\sum_{c \\in g} F_c(d)` and weight
    :math:`w_c = F_c(d_1)/\\Phi_{0,g}(d_1)`; rows are the group's distinct directions and
    columns its distinct speeds. Isotropic tables give one flux with the directions of
    :func:`~pockmark.environment.directions.fibonacci_directions` over the **whole** sphere,
    each of weight :math:`1/n` times the speed fractions; no Earth shielding is applied (a
    flux already averaged over Earth shielding is thereby spread over all directions).
    :math:`\\Phi_0` between and beyond the tabulated diameters follows
    :func:`~pockmark.environment.flux.tabulated_cumulative_flux`.
    """
    fields = _fields(table)
    header, path = fields["header"], fields["path"]
    factor = _conversion(header, path)
    diameters = np.asarray(fields["diameters"], dtype=np.float64)
    flux = np.atleast_2d(np.asarray(fields["cumulative_flux"], dtype=np.float64)) * factor
    density = header["projectile_density"]
    source = header["source"]
    if fields["directions"] is None:
        units = fibonacci_directions(directions)
        fractions = np.asarray(fields["speed_fractions"], dtype=np.float64)
        weights = np.outer(np.full(len(units), 1.0 / len(units)), fractions / fractions.sum())
        parameters = _parameters(fields, factor, 0, 1, diameters, flux[0])
        parameters["directions"] = int(len(units))
        parameters["direction_grid"] = "fibonacci, whole sphere, no Earth shielding"
        return [DirectionalFlux(source, "user_table", units, fields["speeds"], weights, density,
                                parameters)]
    cell_directions = np.asarray(fields["directions"], dtype=np.float64)
    cell_speeds = np.asarray(fields["speeds"], dtype=np.float64)
    live = flux[:, 0] > 0.0
    if not np.any(live):
        raise InputError(f"{path}: every cell of the environment table has zero flux")
    flux, cell_directions, cell_speeds = flux[live], cell_directions[live], cell_speeds[live]
    _, first, group_of = np.unique(
        _shape_keys(flux, shape_rtol), axis=0, return_index=True, return_inverse=True
    )
    group_of = np.ravel(group_of)
    order = np.argsort(first)  # groups in order of their first cell in the file
    count = len(order)
    if count > MANY_SIZE_DISTRIBUTIONS:
        logger.warning(
            "%s: %d distinct size distributions across the table's cells give %d fluxes; the "
            "analysis ray-casts each flux's directions separately and will be slow",
            path, count, count,
        )
    fluxes = []
    for rank, g in enumerate(order):
        cells = np.flatnonzero(group_of == g)
        total = flux[cells].sum(axis=0)
        unit_rows, row_of = np.unique(cell_directions[cells], axis=0, return_inverse=True)
        speed_columns, column_of = np.unique(cell_speeds[cells], return_inverse=True)
        weights = np.zeros((len(unit_rows), len(speed_columns)))
        np.add.at(weights, (np.ravel(row_of), np.ravel(column_of)), flux[cells, 0] / total[0])
        parameters = _parameters(fields, factor, rank, count, diameters, total)
        parameters["cells"] = int(len(cells))
        fluxes.append(DirectionalFlux(source, "user_table", unit_rows, speed_columns, weights,
                                      density, parameters))
    return fluxes


__all__ = ["table_fluxes"]
