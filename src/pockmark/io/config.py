"""The case file: a TOML document naming the vehicle, its shields, the mission and the settings.

:func:`load_case` parses and validates a case file into a frozen :class:`Case`. Every error
names the file, the line and the key, and says what is valid. Shield definitions are kept as
plain tables here and checked against the ballistic-limit library by the risk pipeline,
which reports problems at the line of the shield's table through :meth:`Case.where`.

The schema (units in brackets) is documented in README.md, "Case file reference".
"""

import datetime as dt
import hashlib
import re
import tomllib
from dataclasses import dataclass
from pathlib import Path

from pockmark.errors import ConfigError
from pockmark.geometry.frames import ATTITUDE_AXES
from pockmark.geometry.units import LENGTH_UNITS

_SECTIONS = {"title", "vehicle", "shields", "phases", "environment", "analysis"}


@dataclass(frozen=True)
class Phase:
    """One mission phase on a circular orbit with the body fixed in the local orbital frame."""

    name: str
    altitude: float  # [km]
    inclination: float  # [°]
    start: dt.date
    duration: float  # [yr]
    flight_axis: str
    nadir_axis: str

    @property
    def start_year(self):
        """Decimal year of the phase start [yr]."""
        year_start = dt.date(self.start.year, 1, 1)
        days = (dt.date(self.start.year + 1, 1, 1) - year_start).days
        return self.start.year + (self.start - year_start).days / days


@dataclass(frozen=True)
class DebrisSettings:
    model: str
    solar_flux: float  # 13-month smoothed F10.7 of the year before [sfu]
    projectile_density: float  # [g cm⁻³]


@dataclass(frozen=True)
class MeteoroidSettings:
    model: str
    projectile_density: float  # [g cm⁻³]


@dataclass(frozen=True)
class AnalysisSettings:
    directions: int  # meteoroid direction cells on the sphere
    debris_azimuth_bins: int
    samples_per_face: int
    seed: int
    threads: int  # 0 = all cores
    impact_diameter: float  # impacts are counted for particles at least this large [cm]


@dataclass(frozen=True)
class Case:
    """A validated case file."""

    path: Path
    text: str
    title: str
    mesh_path: Path
    length_unit: str
    tags_from: str
    shields: dict  # tag -> raw definition table
    phases: tuple
    debris: DebrisSettings | None
    meteoroid: MeteoroidSettings | None
    analysis: AnalysisSettings

    @property
    def sha256(self):
        return hashlib.sha256(self.text.encode("utf-8")).hexdigest()

    @property
    def duration(self):
        """Total mission duration [yr]."""
        return sum(phase.duration for phase in self.phases)

    def where(self, *keys):
        """``"file:line"`` of a key path such as ``("shields", "bus", "standoff")``."""
        return f"{self.path}:{_line_of(self.text, keys)}"


_HEADER = re.compile(r"^\s*(\[\[?)\s*([^\]]+?)\s*\]\]?\s*(#.*)?$")
_KEY = re.compile(r"^\s*([A-Za-z0-9_\-\"'.]+)\s*=")


def _split_dotted(name):
    return [part.strip().strip("\"'") for part in name.split(".")]


def _line_of(text, keys):
    """Best-effort line number of a key path in TOML text (1 if not found).

    Integers in ``keys`` index arrays of tables (``[[phases]]``). Tables and keys are found
    by a line scan, which covers the plain TOML that case files use.
    """
    keys = [str(k) if not isinstance(k, int) else k for k in keys]
    table = []
    counters = {}
    best, best_depth = 1, 0
    for number, line in enumerate(text.splitlines(), start=1):
        header = _HEADER.match(line)
        if header:
            parts = _split_dotted(header.group(2))
            if header.group(1) == "[[":
                name = ".".join(parts)
                counters[name] = counters.get(name, -1) + 1
                table = parts + [counters[name]]
            else:
                table = parts
            depth = _matches(table, keys)
            if depth == len(table) and depth > best_depth:
                best, best_depth = number, depth
            continue
        found = _KEY.match(line)
        if found:
            path = table + _split_dotted(found.group(1))
            if _matches(path, keys) == len(keys):
                if len(path) == len(keys):
                    return number
                if best_depth < len(keys):
                    best, best_depth = number, len(keys)
    return best


def _matches(path, keys):
    count = 0
    for a, b in zip(path, keys):
        if a != b:
            break
        count += 1
    return count


class _Reader:
    """Typed access to one table of the case, raising ConfigError with the line."""

    def __init__(self, case_path, text, table, keys):
        self.case_path, self.text, self.table, self.keys = case_path, text, table, tuple(keys)
        self.used = set()

    def fail(self, key, message):
        path = self.keys + ((key,) if key is not None else ())
        dotted = ".".join(str(k) for k in path) or "(top level)"
        line = _line_of(self.text, path)
        raise ConfigError(f"{self.case_path}:{line}: {dotted}: {message}")

    def get(self, key, kind, default=..., check=None, hint=""):
        self.used.add(key)
        if key not in self.table:
            if default is ...:
                self.fail(key, f"missing; add `{key} = ...`{hint}")
            return default
        value = self.table[key]
        if kind is float and isinstance(value, int) and not isinstance(value, bool):
            value = float(value)
        if kind is int and isinstance(value, bool) or not isinstance(value, kind):
            names = kind.__name__ if isinstance(kind, type) else " or ".join(k.__name__ for k in kind)
            self.fail(key, f"must be a {names}; got {value!r}")
        if check is not None:
            problem = check(value)
            if problem:
                self.fail(key, f"{problem}; got {value!r}")
        return value

    def finish(self, allowed=None):
        allowed = self.used if allowed is None else allowed
        unknown = sorted(set(self.table) - set(allowed))
        if unknown:
            self.fail(unknown[0], f"unknown key; valid keys here: {', '.join(sorted(allowed))}")


def _positive(value):
    return None if value > 0 else "must be > 0"


def _choice(options):
    def check(value):
        return None if value in options else f"must be one of {', '.join(options)}"

    return check


def _table(reader, key, required=True):
    reader.used.add(key)
    value = reader.table.get(key)
    if value is None:
        if required:
            reader.fail(key, "missing table; add it (see README, 'Case file reference')")
        return None
    if not isinstance(value, dict):
        reader.fail(key, f"must be a table ([{key}]); got {type(value).__name__}")
    return value


def load_case(path):
    """Read and validate a case file.

    Parameters
    ----------
    path : str or pathlib.Path
        The TOML case file. Relative paths inside it are relative to its folder.

    Returns
    -------
    Case

    Raises
    ------
    ConfigError
        Naming the file, line and key of the first problem and what is valid there.
    """
    path = Path(path)
    if path.is_dir():
        raise ConfigError(f"{path}: is a directory; name the case file (.toml) inside it")
    try:
        raw = path.read_bytes()
    except FileNotFoundError:
        raise ConfigError(f"{path}: no such case file; check the path") from None
    except OSError as error:
        raise ConfigError(f"{path}: cannot be read ({error.strerror})") from None
    try:
        text = raw.decode("utf-8")
        document = tomllib.loads(text)
    except UnicodeDecodeError:
        raise ConfigError(f"{path}: not UTF-8 text; save the case file as UTF-8") from None
    except tomllib.TOMLDecodeError as error:
        raise ConfigError(f"{path}: invalid TOML: {error}") from None

    top = _Reader(path, text, document, ())
    title = top.get("title", str, default=path.stem)

    vehicle = _Reader(path, text, _table(top, "vehicle"), ("vehicle",))
    mesh_name = vehicle.get("mesh", str, hint=' naming the mesh file, e.g. mesh = "vehicle.obj"')
    mesh_path = (path.parent / mesh_name).resolve()
    if not mesh_path.is_file():
        vehicle.fail("mesh", f"file {mesh_path} does not exist or is not a file; fix the path (relative to the case file)")
    length_unit = vehicle.get("length_unit", str, check=_choice(tuple(LENGTH_UNITS)))
    tags_from = vehicle.get("tags_from", str, default="group", check=_choice(("group", "object", "material")))
    vehicle.finish()

    shields_table = _table(top, "shields")
    if not shields_table:
        top.fail("shields", "define at least one shield: [shields.TAG] with an equation")
    shields = {}
    for tag, definition in shields_table.items():
        if not isinstance(definition, dict):
            top.fail("shields", f"shields.{tag} must be a table ([shields.{tag}])")
        shields[tag] = dict(definition)

    top.used.add("phases")
    phase_list = document.get("phases")
    if not isinstance(phase_list, list) or not phase_list or not all(isinstance(p, dict) for p in phase_list):
        top.fail("phases", "missing; add at least one [[phases]] table")
    phases = []
    for index, table in enumerate(phase_list):
        reader = _Reader(path, text, table, ("phases", index))
        start = reader.get("start", dt.date, hint=" as a TOML date, e.g. start = 2030-01-01")
        if isinstance(start, dt.datetime):
            start = start.date()
        phases.append(
            Phase(
                name=reader.get("name", str, default=f"phase {index + 1}"),
                altitude=reader.get("altitude", float, check=_positive),
                inclination=reader.get(
                    "inclination", float, check=lambda v: None if 0 <= v <= 180 else "must be in [0, 180] degrees"
                ),
                start=start,
                duration=reader.get("duration", float, check=_positive),
                flight_axis=reader.get("flight_axis", str, default="+x", check=_choice(tuple(ATTITUDE_AXES))),
                nadir_axis=reader.get("nadir_axis", str, default="-z", check=_choice(tuple(ATTITUDE_AXES))),
            )
        )
        if phases[-1].flight_axis[1] == phases[-1].nadir_axis[1]:
            reader.fail("nadir_axis", "must be perpendicular to flight_axis; pick another body axis")
        reader.finish()

    environment = _Reader(path, text, _table(top, "environment"), ("environment",))
    debris = meteoroid = None
    debris_table = _table(environment, "debris", required=False)
    if debris_table is not None:
        reader = _Reader(path, text, debris_table, ("environment", "debris"))
        debris = DebrisSettings(
            model=reader.get("model", str, default="kessler_1991", check=_choice(("kessler_1991",))),
            solar_flux=reader.get("solar_flux", float, check=_positive),
            projectile_density=reader.get("projectile_density", float, default=2.8, check=_positive),
        )
        reader.finish()
    meteoroid_table = _table(environment, "meteoroid", required=False)
    if meteoroid_table is not None:
        reader = _Reader(path, text, meteoroid_table, ("environment", "meteoroid"))
        meteoroid = MeteoroidSettings(
            model=reader.get("model", str, default="grun_1985", check=_choice(("grun_1985",))),
            projectile_density=reader.get("projectile_density", float, default=1.0, check=_positive),
        )
        reader.finish()
    if debris is None and meteoroid is None:
        environment.fail(None, "name at least one source: [environment.debris] or [environment.meteoroid]")
    environment.finish()

    analysis_table = _table(top, "analysis", required=False) or {}
    reader = _Reader(path, text, analysis_table, ("analysis",))
    analysis = AnalysisSettings(
        directions=reader.get("directions", int, default=600, check=lambda v: None if v >= 20 else "must be >= 20"),
        debris_azimuth_bins=reader.get(
            "debris_azimuth_bins", int, default=90, check=lambda v: None if v >= 4 else "must be >= 4"
        ),
        samples_per_face=reader.get("samples_per_face", int, default=4, check=_positive),
        seed=reader.get("seed", int, default=0, check=lambda v: None if v >= 0 else "must be >= 0"),
        threads=reader.get("threads", int, default=0, check=lambda v: None if v >= 0 else "must be >= 0 (0 = all cores)"),
        impact_diameter=reader.get("impact_diameter", float, default=0.01, check=_positive),
    )
    reader.finish()
    top.finish(_SECTIONS)

    return Case(
        path=path.resolve(),
        text=text,
        title=title,
        mesh_path=mesh_path,
        length_unit=length_unit,
        tags_from=tags_from,
        shields=shields,
        phases=tuple(phases),
        debris=debris,
        meteoroid=meteoroid,
        analysis=analysis,
    )
