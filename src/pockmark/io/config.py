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

from pockmark.constants import DENSITY_LAW_NAMES
from pockmark.errors import ConfigError
from pockmark.geometry.frames import ATTITUDE_AXES
from pockmark.geometry.units import LENGTH_UNITS

_SECTIONS = {"title", "extends", "requirement", "uncertainty", "materials", "vehicle", "shields", "phases", "environment", "analysis", "components", "thin", "panels", "retag", "upgrades"}


@dataclass(frozen=True)
class Phase:
    """One mission phase: an orbit, its dates and the vehicle's attitude."""

    name: str
    perigee_altitude: float  # [km]; equal to the apogee for a circular orbit
    apogee_altitude: float  # [km]
    inclination: float  # [°]
    start: dt.date
    duration: float  # [yr]
    attitude: str  # fixed, tumbling or spinning
    flight_axis: str
    nadir_axis: str
    spin_axis: str | None = None
    spin_steps: int = 12

    @property
    def start_year(self):
        """Decimal year of the phase start [yr]."""
        year_start = dt.date(self.start.year, 1, 1)
        days = (dt.date(self.start.year + 1, 1, 1) - year_start).days
        return self.start.year + (self.start - year_start).days / days


@dataclass(frozen=True)
class DebrisSettings:
    model: str
    solar_flux: float | dict | None  # F10.7 [sfu], one value or {year: value}; None = model default
    projectile_density: float | str  # [g cm⁻³], or the name of a size law
    population: tuple | None = None  # ((inclination [°], weight, half-width [°]), ...)


@dataclass(frozen=True)
class MeteoroidSettings:
    model: str
    projectile_density: float | str  # [g cm⁻³], or the name of a size law
    focusing: str = "nasa_1994"
    vehicle_motion: bool = True  # seen from the moving vehicle (ram/wake asymmetry)


@dataclass(frozen=True)
class AnalysisSettings:
    directions: int  # meteoroid direction cells on the sphere
    debris_azimuth_bins: int
    samples_per_face: int
    seed: int
    threads: int  # 0 = all cores
    impact_diameter: float  # impacts are counted for particles at least this large [cm]
    orbit_samples: int = 8  # true-anomaly samples of an elliptical orbit


#: Roles a component can play: a penetration of a critical component counts as a failure of
#: the vehicle; a shadow-only component blocks particles, and its own penetrations are
#: reported separately.
COMPONENT_ROLES = ("critical", "shadow_only")


@dataclass(frozen=True)
class Component:
    """A named group of shield tags reported together."""

    name: str
    tags: tuple
    role: str = "critical"
    closed: bool = True  # the health check expects its parts to be closed surfaces
    pnp_requirement: float | None = None  # required probability of no penetration


@dataclass(frozen=True)
class Panel:
    """An extra mesh added to the vehicle (e.g. an enhancement panel); it also shadows."""

    path: Path
    length_unit: str
    tags_from: str
    tag: str | None  # when set, every face of the file gets this tag


@dataclass(frozen=True)
class Upgrade:
    """A candidate shield upgrade for ``pockmark trade``: one tag's shield changed."""

    index: int  # position in the case's [[upgrades]] list, for messages
    name: str
    tag: str
    definition: dict  # the tag's whole new shield definition (changes already applied)


@dataclass(frozen=True)
class Retag:
    """Give ``tag`` to the faces that meet every criterion that is set."""

    index: int  # position in the case's [[retag]] list, for messages
    tag: str
    tags: tuple | None = None
    components: tuple | None = None
    box: tuple | None = None  # ((xmin, ymin, zmin), (xmax, ymax, zmax)) [m]
    faces: tuple | None = None
    highest_risk_run: Path | None = None
    highest_risk_count: int | None = None


@dataclass(frozen=True)
class Case:
    """A validated case file."""

    path: Path
    text: str
    title: str
    sources: tuple  # ((path, text), ...): this file, then the files it extends
    mesh_paths: tuple  # one file, or one file per tag or component
    length_unit: str
    tags_from: str
    tags_file: Path | None
    shields: dict  # tag -> raw definition table
    phases: tuple
    debris: DebrisSettings | None
    meteoroid: MeteoroidSettings | None
    analysis: AnalysisSettings
    environment_tables: tuple = ()  # paths of user environment tables
    pnp_requirement: float | None = None  # required PNP of the vehicle (critical components)
    uncertainty_factors: dict = None  # source -> factor ≥ 1 on its flux, for the PNP band
    materials: dict = None  # user materials: name -> raw property table
    resolution_check: str = "coarse"  # "coarse": rerun at half resolution to estimate the error
    components: tuple = ()
    thin: dict = None  # front tag -> back tag of open sheets exposed on both sides
    panels: tuple = ()
    retags: tuple = ()
    upgrades: tuple = ()  # candidate shield upgrades (Upgrade) for `pockmark trade`
    ballistic_limit_factor: float | None = None  # ×/÷ on every critical diameter, for the PNP band

    @property
    def input_files(self):
        """Every file the case reads, for the manifest and so that no output replaces one."""
        files = [*(p for p, _ in self.sources), *self.mesh_paths, *(p.path for p in self.panels), *self.environment_tables]
        if self.tags_file is not None:
            files.append(self.tags_file)
        files += [r.highest_risk_run / "faces.csv" for r in self.retags if r.highest_risk_run]
        return files

    def component_of_tags(self, tag_names):
        """``(components, index)``: every component, and the component index of each tag.

        Tags that no ``[components.*]`` table lists form a critical component of their own,
        named after the tag; the back tag of a thin sheet joins its front tag's component.
        """
        components = list(self.components)
        index = {}
        for number, component in enumerate(components):
            for tag in component.tags:
                index[tag] = number
        thin = self.thin or {}
        for front, back in thin.items():
            if back not in index and front in index:
                index[back] = index[front]
        for tag in tag_names:
            if tag not in index:
                index[tag] = len(components)
                components.append(Component(name=tag, tags=(tag,), closed=tag not in thin))
        return tuple(components), [index[tag] for tag in tag_names]

    @property
    def sha256(self):
        return hashlib.sha256(self.text.encode("utf-8")).hexdigest()

    @property
    def duration(self):
        """Total mission duration [yr]."""
        return sum(phase.duration for phase in self.phases)

    def where(self, *keys):
        """``"file:line"`` of a key path such as ``("shields", "bus", "standoff")``."""
        return _Sources(self.sources).where(keys)


_HEADER = re.compile(r"^\s*(\[\[?)\s*([^\]]+?)\s*\]\]?\s*(#.*)?$")
_KEY = re.compile(r"^\s*([A-Za-z0-9_\-\"'.]+)\s*=")


def _split_dotted(name):
    return [part.strip().strip("\"'") for part in name.split(".")]


def _line_of(text, keys):
    """Best-effort line number of a key path in TOML text (1 if not found)."""
    return _find_line(text, keys)[0]


def _find_line(text, keys):
    """``(line, exact)``: line of a key path in TOML text, and whether the key itself was found.

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
                if depth == len(keys):
                    return number, True
            continue
        found = _KEY.match(line)
        if found:
            path = table + _split_dotted(found.group(1))
            if _matches(path, keys) == len(keys):
                if len(path) == len(keys):
                    return number, True
                if best_depth < len(keys):
                    best, best_depth = number, len(keys)
    return best, False


class _Sources:
    """The case file and the files it extends, for error locations: ``[(path, text), ...]``."""

    def __init__(self, entries):
        self.entries = list(entries)

    def where(self, keys):
        for path, text in self.entries:
            line, exact = _find_line(text, keys)
            if exact:
                return f"{path}:{line}"
        path, text = self.entries[0]
        return f"{path}:{_find_line(text, keys)[0]}"


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
        raise ConfigError(f"{self.text.where(path)}: {dotted}: {message}")

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


def _projectile_density(reader, source, default):
    """A density [g cm⁻³] > 0, or the name of a size law of the source's model."""
    laws = DENSITY_LAW_NAMES[source]

    def check(value):
        if isinstance(value, str):
            return None if value in laws else f"must be a density in g cm⁻³ or one of: {', '.join(laws)}"
        return _positive(value)

    return reader.get("projectile_density", (float, str), default=default, check=check)


def _probability(value):
    return None if 0 < value < 1 else "must be a probability between 0 and 1 (exclusive)"


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


def _existing_file(reader, key, name):
    resolved = (reader.case_path.parent / name).resolve()
    if not resolved.is_file():
        reader.fail(key, f"file {resolved} does not exist or is not a file; fix the path (relative to the case file)")
    return resolved


def _string_list(reader, key):
    values = reader.get(key, list, default=None)
    if values is not None and (not values or not all(isinstance(v, str) and v for v in values)):
        reader.fail(key, "must be a non-empty list of names, e.g. [\"bus_wall\"]")
    return None if values is None else tuple(values)


def _load_components(top, path, sources):
    table = _table(top, "components", required=False) or {}
    components = []
    seen = {}
    for name, body in table.items():
        if not isinstance(body, dict):
            top.fail("components", f"components.{name} must be a table ([components.{name}])")
        reader = _Reader(path, sources, body, ("components", name))
        tags = _string_list(reader, "tags")
        if tags is None:
            reader.fail("tags", 'missing; list the shield tags of this component, e.g. tags = ["tank"]')
        for tag in tags:
            if tag in seen:
                reader.fail("tags", f"tag {tag!r} is already in component {seen[tag]!r}; a tag belongs to one component")
            seen[tag] = name
        components.append(
            Component(
                name=name,
                tags=tags,
                role=reader.get("role", str, default="critical", check=_choice(COMPONENT_ROLES)),
                closed=reader.get("closed", bool, default=True),
                pnp_requirement=reader.get("pnp_requirement", float, default=None, check=_probability),
            )
        )
        reader.finish()
    return tuple(components)


def _load_thin(top, path, sources):
    table = _table(top, "thin", required=False) or {}
    thin = {}
    for tag, body in table.items():
        if not isinstance(body, dict):
            top.fail("thin", f"thin.{tag} must be a table ([thin.{tag}])")
        reader = _Reader(path, sources, body, ("thin", tag))
        thin[tag] = reader.get("back_tag", str, default=tag)
        reader.finish()
    return thin


def _load_panels(top, path, sources, default_unit):
    top.used.add("panels")
    entries = top.table.get("panels", [])
    if not isinstance(entries, list) or not all(isinstance(e, dict) for e in entries):
        top.fail("panels", "must be a list of [[panels]] tables")
    panels = []
    for index, body in enumerate(entries):
        reader = _Reader(path, sources, body, ("panels", index))
        panels.append(
            Panel(
                path=_existing_file(reader, "mesh", reader.get("mesh", str)),
                length_unit=reader.get("length_unit", str, default=default_unit, check=_choice(tuple(LENGTH_UNITS))),
                tags_from=reader.get("tags_from", str, default="group"),
                tag=reader.get("tag", str, default=None),
            )
        )
        reader.finish()
    return tuple(panels)


def _load_retags(top, path, sources):
    top.used.add("retag")
    entries = top.table.get("retag", [])
    if not isinstance(entries, list) or not all(isinstance(e, dict) for e in entries):
        top.fail("retag", "must be a list of [[retag]] tables")
    retags = []
    for index, body in enumerate(entries):
        reader = _Reader(path, sources, body, ("retag", index))
        box = reader.get("box", list, default=None)
        if box is not None:
            try:
                low, high = (tuple(float(v) for v in corner) for corner in box)
                valid = len(low) == len(high) == 3 and all(a <= b for a, b in zip(low, high))
            except (TypeError, ValueError):
                valid = False
            if not valid:
                reader.fail("box", "must be [[xmin, ymin, zmin], [xmax, ymax, zmax]] in metres with min <= max")
            box = (low, high)
        faces = reader.get("faces", list, default=None)
        if faces is not None and (not faces or not all(isinstance(f, int) and not isinstance(f, bool) and f >= 0 for f in faces)):
            reader.fail("faces", "must be a non-empty list of face indices (the `face` column of faces.csv)")
        run_dir = count = None
        risk = reader.get("highest_risk", dict, default=None)
        if risk is not None:
            risk_reader = _Reader(path, sources, risk, ("retag", index, "highest_risk"))
            run_dir = (path.parent / risk_reader.get("run", str)).resolve()
            if not (run_dir / "faces.csv").is_file() or not (run_dir / "summary.json").is_file():
                risk_reader.fail("run", f"{run_dir} holds no faces.csv and summary.json of an earlier run")
            count = risk_reader.get("count", int, check=_positive)
            risk_reader.finish()
        retag = Retag(
            index=index,
            tag=reader.get("tag", str, hint=" naming the new shield tag"),
            tags=_string_list(reader, "tags"),
            components=_string_list(reader, "components"),
            box=box,
            faces=None if faces is None else tuple(faces),
            highest_risk_run=run_dir,
            highest_risk_count=count,
        )
        if all(getattr(retag, k) is None for k in ("tags", "components", "box", "faces", "highest_risk_run")):
            reader.fail(None, "select faces with at least one of tags, components, box, faces, highest_risk")
        reader.finish()
        retags.append(retag)
    return tuple(retags)


def _load_upgrades(top, path, sources, shields):
    top.used.add("upgrades")
    entries = top.table.get("upgrades", [])
    if not isinstance(entries, list) or not all(isinstance(e, dict) for e in entries):
        top.fail("upgrades", "must be a list of [[upgrades]] tables")
    upgrades = []
    names = set()
    for index, body in enumerate(entries):
        reader = _Reader(path, sources, body, ("upgrades", index))
        tag = reader.get("tag", str, hint=" naming the shield tag to upgrade")
        if tag not in shields:
            reader.fail("tag", f"no [shields.{tag}] table; choose one of: {', '.join(sorted(shields))}")
        changes = reader.get("changes", dict, default=None)
        shield = reader.get("shield", dict, default=None)
        if (changes is None) == (shield is None):
            reader.fail(None, "give either changes = { key = value, ... } (keys of the tag's shield to replace) "
                        "or shield = { equation = ..., ... } (a whole new definition), not both")
        if changes is not None and not changes:
            reader.fail("changes", "is empty; name at least one key of the shield to change")
        if changes is not None and "equation" in changes:
            reader.fail("changes", "cannot change 'equation'; give a whole shield = { ... } instead")
        definition = {**shields[tag], **changes} if changes is not None else dict(shield)
        described = ", ".join(f"{k} = {v}" for k, v in (changes or {}).items()) or shield.get("equation", "new shield")
        name = reader.get("name", str, default=f"{tag}: {described}")
        if name in names:
            reader.fail("name", f"repeats the upgrade name {name!r}; names must be unique")
        names.add(name)
        reader.finish()
        upgrades.append(Upgrade(index=index, name=name, tag=tag, definition=definition))
    return tuple(upgrades)


#: Keys whose values are file paths, resolved against the file that states them before a
#: variant is merged onto its base.
_PATH_KEYS = (("vehicle", "mesh"), ("vehicle", "tags_file"), ("environment", "tables"))


def _read_toml(path):
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
        return text, tomllib.loads(text)
    except UnicodeDecodeError:
        raise ConfigError(f"{path}: not UTF-8 text; save the case file as UTF-8") from None
    except tomllib.TOMLDecodeError as error:
        raise ConfigError(f"{path}: invalid TOML: {error}") from None


def _absolute_paths(document, folder):
    """Resolve the relative file paths of a base case against its own folder."""

    def resolve(value):
        if isinstance(value, str):
            return str((folder / value).resolve())
        if isinstance(value, list):
            return [resolve(v) for v in value]
        return value

    for section, key in _PATH_KEYS:
        table = document.get(section)
        if isinstance(table, dict) and key in table:
            table[key] = resolve(table[key])
    for panel in document.get("panels", []) if isinstance(document.get("panels"), list) else []:
        if isinstance(panel, dict) and "mesh" in panel:
            panel["mesh"] = resolve(panel["mesh"])
    for rule in document.get("retag", []) if isinstance(document.get("retag"), list) else []:
        risk = rule.get("highest_risk") if isinstance(rule, dict) else None
        if isinstance(risk, dict) and "run" in risk:
            risk["run"] = resolve(risk["run"])
    return document


def _merge(base, variant):
    """The variant's tables override the base's key by key; [[panels]], [[retag]] and
    [[upgrades]] add to the base's."""
    merged = dict(base)
    for key, value in variant.items():
        if key in ("panels", "retag", "upgrades") and isinstance(value, list) and isinstance(base.get(key), list):
            merged[key] = base[key] + value
        elif isinstance(value, dict) and isinstance(base.get(key), dict):
            merged[key] = _merge(base[key], value)
        else:
            merged[key] = value
    return merged


def _read_with_bases(path, chain):
    """``([(path, text), ...], merged document)`` for a case and the cases it extends."""
    resolved = path.resolve()
    if resolved in chain:
        raise ConfigError(f"{path}: extends itself through {' -> '.join(str(p) for p in chain)}; remove the loop")
    text, document = _read_toml(path)
    extends = document.pop("extends", None)
    if extends is None:
        return [(resolved, text)], document
    if not isinstance(extends, str):
        line = _line_of(text, ("extends",))
        raise ConfigError(f"{path}:{line}: extends: must name the base case file, e.g. extends = \"baseline.toml\"")
    base_path = path.parent / extends
    if not base_path.is_file():
        line = _line_of(text, ("extends",))
        raise ConfigError(f"{path}:{line}: extends: {base_path} does not exist or is not a file; fix the path")
    base_entries, base_document = _read_with_bases(base_path, chain + (resolved,))
    base_document = _absolute_paths(base_document, base_path.resolve().parent)
    return [(resolved, text), *base_entries], _merge(base_document, document)


def parse_override(text):
    """``"phases.0.altitude=500"`` → ``(("phases", 0, "altitude"), 500)``.

    The key is a dotted path (integers index arrays of tables); the value is read as a TOML
    value (numbers, ``true``, ``"text"``, ``[1, 2]``); a bare word is taken as a string.

    Raises
    ------
    ConfigError
        For a text without ``=`` or with an empty key.
    """
    key, sep, value = str(text).partition("=")
    key = key.strip()
    if not sep or not key or any(not part for part in key.split(".")):
        raise ConfigError(f"override {text!r}: write KEY=VALUE with a dotted key, e.g. "
                          f"phases.0.altitude=500")
    try:
        parsed = tomllib.loads(f"v = {value.strip()}")["v"]
    except tomllib.TOMLDecodeError:
        parsed = value.strip()
    keys = tuple(int(part) if part.isdigit() else part for part in key.split("."))
    # Integers stay integers: the case reader takes them where a float is wanted.
    return keys, parsed


def _apply_override(document, keys, value, path):
    """Set ``document[keys...] = value`` in the merged case document."""
    where = ".".join(str(k) for k in keys)
    table = document
    for depth, key in enumerate(keys[:-1]):
        if isinstance(table, list):
            if not isinstance(key, int) or not 0 <= key < len(table):
                raise ConfigError(f"{path}: override {where}: {'.'.join(map(str, keys[:depth]))} "
                                  f"has {len(table)} entries; use an index from 0 to {len(table) - 1}")
            table = table[key]
        elif isinstance(table, dict):
            table = table.setdefault(key, {})
        else:
            raise ConfigError(f"{path}: override {where}: {'.'.join(map(str, keys[:depth]))} "
                              f"is a value, not a table")
    if not isinstance(table, dict):
        raise ConfigError(f"{path}: override {where}: the parent is not a table")
    table[keys[-1]] = value


def load_case(path, overrides=()):
    """Read and validate a case file.

    Parameters
    ----------
    path : str or pathlib.Path
        The TOML case file. Relative paths inside it are relative to its folder. A case may
        ``extends = "base.toml"``: it then states only what changes; its tables override the
        base's key by key, and its ``[[panels]]`` and ``[[retag]]`` are added to the base's.
    overrides : sequence of (keys, value)
        Values set on top of the file before validation (see :func:`parse_override`), e.g.
        ``[(("phases", 0, "altitude"), 500.0)]``; they are checked like the file's own.

    Returns
    -------
    Case

    Raises
    ------
    ConfigError
        Naming the file, line and key of the first problem and what is valid there.
    """
    path = Path(path)
    entries, document = _read_with_bases(path, chain=())
    for keys, value in overrides:
        _apply_override(document, tuple(keys), value, path)
    text = entries[0][1]
    sources = _Sources(entries)
    top = _Reader(path, sources, document, ())
    top.used.add("extends")
    title = top.get("title", str, default=path.stem)

    vehicle = _Reader(path, sources, _table(top, "vehicle"), ("vehicle",))
    mesh_names = vehicle.get(
        "mesh", (str, list), hint=' naming the mesh file, e.g. mesh = "vehicle.obj", or a list of files'
    )
    if isinstance(mesh_names, str):
        mesh_names = [mesh_names]
    if not mesh_names or not all(isinstance(name, str) for name in mesh_names):
        vehicle.fail("mesh", "must be a file name or a non-empty list of file names")
    mesh_paths = tuple(_existing_file(vehicle, "mesh", name) for name in mesh_names)
    length_unit = vehicle.get("length_unit", str, check=_choice(tuple(LENGTH_UNITS)))
    tags_from = vehicle.get("tags_from", str, default="group")
    tags_file = vehicle.get("tags_file", str, default=None)
    if tags_file is not None:
        tags_file = _existing_file(vehicle, "tags_file", tags_file)
    vehicle.finish()

    shields_table = _table(top, "shields")
    if not shields_table:
        top.fail("shields", "define at least one shield: [shields.TAG] with an equation")
    materials = {}
    for name, properties in (_table(top, "materials", required=False) or {}).items():
        if not isinstance(properties, dict):
            top.fail("materials", f"materials.{name} must be a table ([materials.{name}]) of properties")
        materials[name] = dict(properties)
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
        reader = _Reader(path, sources, table, ("phases", index))
        start = reader.get("start", dt.date, hint=" as a TOML date, e.g. start = 2030-01-01")
        if isinstance(start, dt.datetime):
            start = start.date()
        if "altitude" in table:
            altitude = reader.get("altitude", float, check=_positive)
            perigee = apogee = altitude
            for key in ("perigee_altitude", "apogee_altitude"):
                if key in table:
                    reader.fail(key, "give either altitude (circular orbit) or perigee_altitude and apogee_altitude")
        else:
            perigee = reader.get("perigee_altitude", float, check=_positive, hint=" or altitude = ... for a circular orbit")
            apogee = reader.get("apogee_altitude", float, check=_positive)
            if apogee < perigee:
                reader.fail("apogee_altitude", f"must be >= perigee_altitude ({perigee:g} km)")
        attitude = reader.get("attitude", str, default="fixed", check=_choice(("fixed", "tumbling", "spinning")))
        axes = tuple(ATTITUDE_AXES)
        phase = Phase(
            name=reader.get("name", str, default=f"phase {index + 1}"),
            perigee_altitude=perigee,
            apogee_altitude=apogee,
            inclination=reader.get(
                "inclination", float, check=lambda v: None if 0 <= v <= 180 else "must be in [0, 180] degrees"
            ),
            start=start,
            duration=reader.get("duration", float, check=_positive),
            attitude=attitude,
            flight_axis=reader.get("flight_axis", str, default="+x", check=_choice(axes)),
            nadir_axis=reader.get("nadir_axis", str, default="-z", check=_choice(axes)),
            spin_axis=reader.get("spin_axis", str, default=None, check=_choice(axes))
            if attitude == "spinning"
            else None,
            spin_steps=reader.get("spin_steps", int, default=12, check=_positive) if attitude == "spinning" else 12,
        )
        if phase.flight_axis[1] == phase.nadir_axis[1]:
            reader.fail("nadir_axis", "must be perpendicular to flight_axis; pick another body axis")
        if attitude == "spinning" and phase.spin_axis is None:
            reader.fail("spin_axis", 'missing; a spinning phase names the body spin axis, e.g. spin_axis = "+z"')
        phases.append(phase)
        reader.finish()

    environment = _Reader(path, sources, _table(top, "environment"), ("environment",))
    debris = meteoroid = None
    debris_table = _table(environment, "debris", required=False)
    if debris_table is not None:
        reader = _Reader(path, sources, debris_table, ("environment", "debris"))
        solar_flux = reader.get("solar_flux", (int, float, dict), default=None)
        if isinstance(solar_flux, bool) or (isinstance(solar_flux, (int, float)) and not solar_flux > 0):
            reader.fail("solar_flux", "must be a positive number [sfu] or a table {year = value}")
        if isinstance(solar_flux, dict):
            try:
                solar_flux = {int(year): float(value) for year, value in solar_flux.items()}
                valid = all(v > 0 for v in solar_flux.values())
            except (TypeError, ValueError):
                valid = False
            if not valid:
                reader.fail("solar_flux", 'a table must map years to positive values, e.g. { 2030 = 150.0, "2031" = 120.0 }')
        population = reader.get("inclination_population", list, default=None)
        if population is not None:
            rows = []
            for row in population:
                if not (isinstance(row, list) and len(row) in (2, 3) and all(isinstance(v, (int, float)) and not isinstance(v, bool) for v in row)):
                    reader.fail("inclination_population", "must be a list of [inclination, weight] or [inclination, weight, half_width] rows")
                rows.append(tuple(float(v) for v in row))
            population = tuple(rows)
        debris = DebrisSettings(
            model=reader.get("model", str, default="kessler_1991", check=_choice(("kessler_1991",))),
            solar_flux=float(solar_flux) if isinstance(solar_flux, int) else solar_flux,
            projectile_density=_projectile_density(reader, "debris", 2.8),
            population=population,
        )
        reader.finish()
    meteoroid_table = _table(environment, "meteoroid", required=False)
    if meteoroid_table is not None:
        reader = _Reader(path, sources, meteoroid_table, ("environment", "meteoroid"))
        meteoroid = MeteoroidSettings(
            model=reader.get("model", str, default="grun_1985", check=_choice(("grun_1985",))),
            projectile_density=_projectile_density(reader, "meteoroid", 1.0),
            vehicle_motion=reader.get("vehicle_motion", bool, default=True),
        )
        reader.finish()
    environment.used.add("tables")
    table_names = environment.table.get("tables", [])
    if not isinstance(table_names, list) or not all(isinstance(name, str) for name in table_names):
        environment.fail("tables", 'must be a list of environment table files, e.g. tables = ["debris.csv"]')
    environment_tables = tuple(_existing_file(environment, "tables", name) for name in table_names)
    if debris is None and meteoroid is None and not environment_tables:
        environment.fail(
            None, "name at least one source: [environment.debris], [environment.meteoroid] or tables = [...]"
        )
    environment.finish()

    analysis_table = _table(top, "analysis", required=False) or {}
    reader = _Reader(path, sources, analysis_table, ("analysis",))
    analysis = AnalysisSettings(
        directions=reader.get("directions", int, default=600, check=lambda v: None if v >= 20 else "must be >= 20"),
        debris_azimuth_bins=reader.get(
            "debris_azimuth_bins", int, default=90, check=lambda v: None if v >= 4 else "must be >= 4"
        ),
        samples_per_face=reader.get("samples_per_face", int, default=4, check=_positive),
        seed=reader.get("seed", int, default=0, check=lambda v: None if v >= 0 else "must be >= 0"),
        threads=reader.get("threads", int, default=0, check=lambda v: None if v >= 0 else "must be >= 0 (0 = all cores)"),
        impact_diameter=reader.get("impact_diameter", float, default=0.01, check=_positive),
        orbit_samples=reader.get("orbit_samples", int, default=8, check=lambda v: None if v >= 2 else "must be >= 2"),
    )
    reader.finish()
    requirement = _table(top, "requirement", required=False)
    pnp_requirement = None
    if requirement is not None:
        reader = _Reader(path, sources, requirement, ("requirement",))
        pnp_requirement = reader.get("pnp", float, check=_probability)
        reader.finish()
    uncertainty = _table(top, "uncertainty", required=False) or {}
    reader = _Reader(path, sources, uncertainty, ("uncertainty",))
    resolution_check = reader.get("resolution_check", str, default="coarse", check=_choice(("coarse", "none")))
    ballistic_limit_factor = reader.get(
        "ballistic_limit", float, default=None,
        check=lambda v: None if v >= 1 else "must be a factor >= 1 on every critical diameter")
    factors = {}
    for key in uncertainty:
        if key not in ("resolution_check", "ballistic_limit"):
            factors[key] = reader.get(key, float, check=lambda v: None if v >= 1 else "must be a factor >= 1 on the source's flux")
    reader.finish()
    components = _load_components(top, path, sources)
    thin = _load_thin(top, path, sources)
    panels = _load_panels(top, path, sources, length_unit)
    retags = _load_retags(top, path, sources)
    upgrades = _load_upgrades(top, path, sources, shields)
    top.finish(_SECTIONS)

    return Case(
        path=path.resolve(),
        text=text,
        title=title,
        sources=tuple(sources.entries),
        mesh_paths=mesh_paths,
        length_unit=length_unit,
        tags_from=tags_from,
        tags_file=tags_file,
        components=components,
        thin=thin,
        panels=panels,
        retags=retags,
        upgrades=upgrades,
        shields=shields,
        phases=tuple(phases),
        debris=debris,
        meteoroid=meteoroid,
        analysis=analysis,
        environment_tables=environment_tables,
        pnp_requirement=pnp_requirement,
        uncertainty_factors=factors,
        materials=materials,
        resolution_check=resolution_check,
        ballistic_limit_factor=ballistic_limit_factor,
    )
