"""Reading user environment tables: particle fluxes given per direction, speed and size.

Scope: parse and validate pockmark's own CSV format for an impact environment that the
built-in models do not cover (the output of another environment model, a test condition, a
stream). This module only reads and checks the file; it returns plain arrays and the header
(:class:`EnvironmentTable`). Units are not converted here: the builder
:func:`pockmark.environment.tables.table_fluxes` converts them and makes directional fluxes.
The format is also described, with examples, in ``docs/environment_tables.md``.

Format
------
UTF-8 text. Blank lines are ignored. Before the column header, lines of the form
``# key: value`` (a single-word key) are header entries; other ``#`` lines (for instance
``## free text``) are comments. After the column header every ``#`` line is a comment.

Header keys (values are case-insensitive except ``source``, ``description``, ``reference``):

==================== ========== ==========================================================
key                  required   meaning and accepted values
==================== ========== ==========================================================
``source``           yes        name of the source in the results: a letter or digit, then
                                letters, digits, ``_``, ``-``, ``.``
``frame``            yes        ``orbital`` (x̂ flight direction, ẑ zenith, ŷ = ẑ × x̂) or
                                ``body`` (the mesh's axes)
``area_convention``  yes        ``cross_section``: flux per unit area normal to the
                                particles' direction of travel; ``random_plate``: flux on a
                                one-sided randomly oriented flat plate (¼ of the former)
``flux_unit``        yes        ``m-2 yr-1`` or ``m-2 s-1``
``projectile_density`` yes      particle density [g cm⁻³], > 0
``directionality``   no         ``directional`` (default) or ``isotropic``
``speed_km_s``       no         isotropic tables only: the single impact speed [km s⁻¹]
``description``      no         free text
``reference``        no         free text: where the numbers come from
==================== ========== ==========================================================

Directional tables: one column-header line, then one row per (direction, speed, diameter):

``azimuth_deg, elevation_deg, speed_km_s, diameter_cm, cumulative_flux``

or, with the direction as a unit vector, ``x, y, z, speed_km_s, diameter_cm,
cumulative_flux`` (any column order). The direction points from the vehicle **toward where
the particles come from**: azimuth [°] in [−180, 360] from +x toward +y, elevation [°] in
[−90, 90] toward +z; vectors must have a norm within 0.001 of 1 (they are then normalised).
Rows with the same direction and speed values form a *cell*; ``cumulative_flux`` is the flux,
from that cell, of particles **at least** ``diameter_cm`` large (cumulative over size, per
direction cell and speed bin, not per steradian). Every cell must give the same set of at
least two diameters, and its flux must not increase with diameter.

Isotropic tables (``# directionality: isotropic``): a block ``diameter_cm, cumulative_flux``
giving the total flux (all directions), and the speed either as the header ``speed_km_s`` or
as a second block, started by its own column-header line ``speed_km_s, fraction``, whose
fractions sum to 1 (within 0.001; they are then normalised).

Every problem raises :class:`~pockmark.errors.FormatError` with one line:
``PATH:LINE: what is wrong; how to fix it``.
"""

import math
import re
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from pockmark.errors import FormatError

#: Header keys every table must state.
REQUIRED_KEYS = ("source", "frame", "area_convention", "flux_unit", "projectile_density")
#: Header keys a table may state.
OPTIONAL_KEYS = ("directionality", "speed_km_s", "description", "reference")
#: Accepted values of the enumerated header keys.
HEADER_CHOICES = {
    "frame": ("orbital", "body"),
    "area_convention": ("cross_section", "random_plate"),
    "flux_unit": ("m-2 yr-1", "m-2 s-1"),
    "directionality": ("directional", "isotropic"),
}
#: Column sets of the blocks, by table kind.
ANGLE_COLUMNS = ("azimuth_deg", "elevation_deg", "speed_km_s", "diameter_cm", "cumulative_flux")
VECTOR_COLUMNS = ("x", "y", "z", "speed_km_s", "diameter_cm", "cumulative_flux")
ISOTROPIC_COLUMNS = ("diameter_cm", "cumulative_flux")
SPEED_COLUMNS = ("speed_km_s", "fraction")

#: Largest accepted deviation of a direction vector's norm (or of the speed fractions' sum)
#: from 1: rounding of values printed to about four significant digits.
UNIT_TOLERANCE = 1e-3

_SOURCE_PATTERN = r"[A-Za-z0-9][A-Za-z0-9_.\-]*"
_HEADER_LINE = re.compile(r"#\s*([A-Za-z_][A-Za-z0-9_]*)\s*:(.*)$")


@dataclass(frozen=True)
class EnvironmentTable:
    """Contents of a user environment table, validated but in the file's own units.

    Attributes
    ----------
    path : str
        The file read.
    header : dict
        ``source`` (str), ``frame``, ``area_convention``, ``flux_unit``, ``directionality``
        (lower-case str), ``projectile_density`` (float [g cm⁻³]), ``speed_km_s`` (float or
        ``None``), ``description`` and ``reference`` (str, possibly empty).
    diameters : (nd,) float
        Diameters [cm], strictly increasing, nd >= 2.
    cumulative_flux : (nc, nd) float
        Flux of particles at least as large as each diameter, per cell [flux_unit, in the
        table's area convention]; one row per cell (one row for an isotropic table).
    directions : (nc, 3) float or None
        Unit vector toward the source of each cell, in the table's frame; ``None`` for an
        isotropic table.
    speeds : (nc,) float or (ns,) float
        Impact speed of each cell [km s⁻¹]; for an isotropic table the speed bins.
    speed_fractions : (ns,) float or None
        Isotropic tables: fraction of the flux at each speed (sum 1); otherwise ``None``.
    cell_lines : (nc,) int
        Line of each cell's first row (the first data row for an isotropic table).
    """

    path: str
    header: dict
    diameters: np.ndarray
    cumulative_flux: np.ndarray
    directions: np.ndarray | None
    speeds: np.ndarray
    speed_fractions: np.ndarray | None
    cell_lines: np.ndarray


def _fail(path, line, message):
    where = f"{path}:{line}" if line else f"{path}"
    raise FormatError(f"{where}: {message}")


def _number(path, line, column, text):
    try:
        value = float(text)
    except ValueError:
        _fail(path, line, f"{column} must be a number; got {text.strip()!r}")
    if not math.isfinite(value):
        _fail(path, line, f"{column} must be a finite number; got {text.strip()!r}")
    return value


def _parse_header(path, entries):
    """Validate ``{key: (line, raw value)}`` into the typed header dict."""
    allowed = REQUIRED_KEYS + OPTIONAL_KEYS
    for key, (line, _) in entries.items():
        if key not in allowed:
            _fail(
                path,
                line,
                f"unknown header key {key!r}; valid keys: {', '.join(allowed)} (write free "
                f"text as '## ...' or in '# description: ...')",
            )
    missing = [key for key in REQUIRED_KEYS if key not in entries]
    if missing:
        _fail(
            path,
            1,
            f"missing header line(s) {', '.join(f'# {k}: ...' for k in missing)}; every table "
            f"states {', '.join(REQUIRED_KEYS)} before its column header",
        )
    header = {"description": "", "reference": "", "speed_km_s": None}
    for key, (line, raw) in entries.items():
        value = raw.strip()
        if key in HEADER_CHOICES:
            canonical = " ".join(value.lower().split())
            if canonical not in HEADER_CHOICES[key]:
                _fail(
                    path,
                    line,
                    f"{key} must be one of {', '.join(HEADER_CHOICES[key])}; got {value!r}",
                )
            header[key] = canonical
        elif key == "source":
            if not re.fullmatch(_SOURCE_PATTERN, value):
                _fail(
                    path,
                    line,
                    f"source must be a name of letters, digits, '_', '-' or '.' (e.g. "
                    f"'station_debris'); got {value!r}",
                )
            header[key] = value
        elif key in ("projectile_density", "speed_km_s"):
            number = _number(path, line, key, value)
            if number <= 0.0:
                unit = "g cm⁻³" if key == "projectile_density" else "km s⁻¹"
                _fail(path, line, f"{key} must be positive [{unit}]; got {value}")
            header[key] = number
        else:
            header[key] = value
    header.setdefault("directionality", "directional")
    if header["speed_km_s"] is not None and header["directionality"] != "isotropic":
        _fail(
            path,
            entries["speed_km_s"][0],
            "the speed_km_s header is only for isotropic tables; give the speed of each "
            "directional cell in the speed_km_s column",
        )
    return header


def _split(path):
    """Return (header entries, blocks); a block is (line, columns, [(line, fields), ...])."""
    try:
        text = Path(path).read_text(encoding="utf-8-sig")
    except FileNotFoundError:
        raise FormatError(f"{path}: environment table not found; check the path") from None
    except IsADirectoryError:
        raise FormatError(f"{path}: is a directory, not an environment table") from None
    except UnicodeDecodeError as error:
        raise FormatError(f"{path}: not UTF-8 text ({error.reason}); save it as UTF-8") from None
    entries = {}
    blocks = []
    for number, raw in enumerate(text.splitlines(), start=1):
        stripped = raw.strip()
        if not stripped:
            continue
        if stripped.startswith("#"):
            match = _HEADER_LINE.match(stripped)
            if not blocks and match and not stripped.startswith("##"):
                key = match.group(1).lower()
                if key in entries:
                    _fail(path, number, f"header key {key!r} given twice (first on line "
                                        f"{entries[key][0]}); keep one")
                entries[key] = (number, match.group(2))
            continue
        fields = [field.strip() for field in stripped.split(",")]
        try:
            float(fields[0])
            numeric = True
        except ValueError:
            numeric = fields[0].lower() in ("nan", "inf", "-inf", "+inf")
        if not numeric:
            blocks.append((number, [f.lower() for f in fields], []))
        elif not blocks:
            _fail(path, number, f"data row before the column header; start the data with a "
                                f"line such as '{', '.join(ANGLE_COLUMNS)}'")
        else:
            blocks[-1][2].append((number, fields))
    return entries, blocks


def _columns(path, block, choices, what):
    line, names, rows = block
    for choice in choices:
        if sorted(names) == sorted(choice):
            index = {name: names.index(name) for name in choice}
            break
    else:
        wanted = " or ".join(f"'{', '.join(c)}'" for c in choices)
        _fail(path, line, f"{what} columns must be {wanted} (any order); got '{', '.join(names)}'")
    if not rows:
        _fail(path, line, f"no data rows after the column header '{', '.join(names)}'")
    values = {}
    for name in index:
        values[name] = np.empty(len(rows))
    lines = np.empty(len(rows), dtype=np.int64)
    for r, (number, fields) in enumerate(rows):
        if len(fields) != len(names):
            _fail(path, number, f"expected {len(names)} values ({', '.join(names)}); got "
                                f"{len(fields)}")
        for name, column in index.items():
            values[name][r] = _number(path, number, name, fields[column])
        lines[r] = number
    return values, lines


def _check_range(path, lines, name, values, low, high, text):
    bad = ~((values >= low) & (values <= high)) if high is not None else ~(values > low)
    if np.any(bad):
        r = int(np.flatnonzero(bad)[0])
        _fail(path, lines[r], f"{name} must be {text}; got {values[r]:g}")


def _check_flux_column(path, lines, values):
    bad = values < 0.0
    if np.any(bad):
        r = int(np.flatnonzero(bad)[0])
        _fail(path, lines[r], f"cumulative_flux must be >= 0; got {values[r]:g}")


def _check_size_distribution(path, diameters, fluxes, lines, label):
    """Sorted (by diameter) rows of one cell: at least two, non-increasing flux."""
    if len(diameters) < 2:
        _fail(path, lines[0], f"{label} gives only diameter {diameters[0]:g} cm; give at least "
                              f"two diameters (e.g. add a larger one with cumulative_flux 0)")
    rises = np.flatnonzero(np.diff(fluxes) > 0.0)
    if rises.size:
        k = int(rises[0])
        _fail(
            path,
            lines[k + 1],
            f"cumulative_flux rises from {fluxes[k]:g} at {diameters[k]:g} cm (line "
            f"{lines[k]}) to {fluxes[k + 1]:g} at {diameters[k + 1]:g} cm in {label}; it counts "
            f"particles at least that large and must not increase with diameter (convert a "
            f"per-bin flux to a cumulative one)",
        )


def _directional(path, header, block):
    values, lines = _columns(path, block, (ANGLE_COLUMNS, VECTOR_COLUMNS), "directional table")
    _check_range(path, lines, "speed_km_s", values["speed_km_s"], 0.0, None, "positive [km s⁻¹]")
    _check_range(path, lines, "diameter_cm", values["diameter_cm"], 0.0, None, "positive [cm]")
    _check_flux_column(path, lines, values["cumulative_flux"])
    if "azimuth_deg" in values:
        _check_range(path, lines, "azimuth_deg", values["azimuth_deg"], -180.0, 360.0,
                     "in [−180, 360]°")
        _check_range(path, lines, "elevation_deg", values["elevation_deg"], -90.0, 90.0,
                     "in [−90, 90]°")
        key_columns = ("azimuth_deg", "elevation_deg", "speed_km_s")
        az, el = np.radians(values["azimuth_deg"]), np.radians(values["elevation_deg"])
        vectors = np.column_stack((np.cos(el) * np.cos(az), np.cos(el) * np.sin(az), np.sin(el)))
    else:
        key_columns = ("x", "y", "z", "speed_km_s")
        vectors = np.column_stack((values["x"], values["y"], values["z"]))
        norm = np.linalg.norm(vectors, axis=1)
        bad = np.abs(norm - 1.0) > UNIT_TOLERANCE
        if np.any(bad):
            r = int(np.flatnonzero(bad)[0])
            _fail(path, lines[r], f"direction (x, y, z) must be a unit vector (norm within "
                                  f"{UNIT_TOLERANCE:g} of 1); got norm {norm[r]:.6g}; divide by "
                                  f"the norm")
        vectors = vectors / norm[:, None]
    keys = list(zip(*(values[c] for c in key_columns), strict=True))
    cells = {}
    for r, key in enumerate(keys):
        cells.setdefault(key, []).append(r)
    diameters = np.unique(values["diameter_cm"])
    table = np.empty((len(cells), len(diameters)))
    directions = np.empty((len(cells), 3))
    speeds = np.empty(len(cells))
    cell_lines = np.empty(len(cells), dtype=np.int64)
    for c, (key, rows) in enumerate(cells.items()):
        rows = np.array(rows)
        named = zip(key_columns, key, strict=True)
        label = "cell (" + ", ".join(f"{n} {v:g}" for n, v in named) + ")"
        d = values["diameter_cm"][rows]
        order = np.argsort(d, kind="stable")
        rows, d = rows[order], d[order]
        repeated = np.flatnonzero(np.diff(d) == 0.0)
        if repeated.size:
            k = int(repeated[0])
            _fail(path, lines[rows[k + 1]], f"{label} gives diameter {d[k]:g} cm twice (also on "
                                            f"line {lines[rows[k]]}); keep one row")
        if len(d) != len(diameters):
            missing = np.setdiff1d(diameters, d)
            listed = ", ".join(f"{x:g}" for x in missing[:5]) + (" …" if len(missing) > 5 else "")
            _fail(path, lines[rows[0]], f"{label} has no row for diameter(s) {listed} cm that "
                                        f"other cells give; every (direction, speed) cell must "
                                        f"list the same diameters")
        _check_size_distribution(path, d, values["cumulative_flux"][rows], lines[rows], label)
        table[c] = values["cumulative_flux"][rows]
        directions[c] = vectors[rows[0]]
        speeds[c] = values["speed_km_s"][rows[0]]
        cell_lines[c] = lines[rows[0]]
    return EnvironmentTable(
        str(path), header, diameters, table, directions, speeds, None, cell_lines
    )


def _isotropic(path, header, blocks):
    values, lines = _columns(path, blocks[0], (ISOTROPIC_COLUMNS,), "isotropic table")
    _check_range(path, lines, "diameter_cm", values["diameter_cm"], 0.0, None, "positive [cm]")
    _check_flux_column(path, lines, values["cumulative_flux"])
    order = np.argsort(values["diameter_cm"], kind="stable")
    d, f, row_lines = values["diameter_cm"][order], values["cumulative_flux"][order], lines[order]
    repeated = np.flatnonzero(np.diff(d) == 0.0)
    if repeated.size:
        k = int(repeated[0])
        _fail(path, row_lines[k + 1], f"diameter {d[k]:g} cm given twice (also on line "
                                      f"{row_lines[k]}); keep one row")
    _check_size_distribution(path, d, f, row_lines, "the table")
    if len(blocks) > 2:
        _fail(path, blocks[2][0], "an isotropic table has at most two blocks (sizes, then "
                                  "'speed_km_s, fraction'); remove the extra column header")
    if len(blocks) == 2:
        if header["speed_km_s"] is not None:
            _fail(path, blocks[1][0], "speeds given both as the speed_km_s header and as a "
                                      "block; keep one")
        speed_values, speed_lines = _columns(path, blocks[1], (SPEED_COLUMNS,), "speed block")
        speeds, fractions = speed_values["speed_km_s"], speed_values["fraction"]
        _check_range(path, speed_lines, "speed_km_s", speeds, 0.0, None, "positive [km s⁻¹]")
        _check_range(path, speed_lines, "fraction", fractions, 0.0, 1.0, "in [0, 1]")
        seen = {}
        for v, line in zip(speeds, speed_lines, strict=True):
            if v in seen:
                _fail(path, line, f"speed {v:g} km s⁻¹ given twice (also on line {seen[v]}); "
                                  f"merge the two fractions")
            seen[v] = line
        total = float(fractions.sum())
        if abs(total - 1.0) > UNIT_TOLERANCE:
            _fail(path, blocks[1][0], f"speed fractions must sum to 1 (within "
                                      f"{UNIT_TOLERANCE:g}); they sum to {total:.6g}")
        fractions = fractions / total
    elif header["speed_km_s"] is not None:
        speeds, fractions = np.array([header["speed_km_s"]]), np.array([1.0])
    else:
        _fail(path, blocks[0][0], "an isotropic table needs its speed: a header line "
                                  "'# speed_km_s: 10.0' or a block 'speed_km_s, fraction'")
    return EnvironmentTable(str(path), header, d, f[None, :], None, speeds, fractions,
                            np.array([row_lines[0]], dtype=np.int64))


def load_environment_table(path):
    """Read and validate a user environment table.

    Parameters
    ----------
    path : str or pathlib.Path
        CSV file in the format of this module's documentation.

    Returns
    -------
    EnvironmentTable
        Validated contents, in the file's own units and frame.

    Raises
    ------
    FormatError
        For a missing or unreadable file, and for any problem of format or content, with
        the file, the line and the fix in one line.
    """
    entries, blocks = _split(path)
    header = _parse_header(path, entries)
    if not blocks:
        _fail(path, None, "no column header and no data; see docs/environment_tables.md")
    if header["directionality"] == "isotropic":
        return _isotropic(path, header, blocks)
    if len(blocks) > 1:
        _fail(path, blocks[1][0], "a directional table has one column header; remove this "
                                  "line or declare '# directionality: isotropic'")
    return _directional(path, header, blocks[0])


__all__ = ["EnvironmentTable", "load_environment_table"]
