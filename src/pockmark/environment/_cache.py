"""On-disk memo of discretised phase environments (private).

One file per result, ``<sha256 key>.npz``, holding every flux's arrays and a JSON document
with the fluxes' scalar fields, parameters and the warnings the build emitted. Files are
written to a temporary name and renamed into place (atomic on POSIX and Windows), so a reader
never sees a half-written file; a file that cannot be read back is ignored and rewritten.
"""

import hashlib
import json
import logging
import os
import tempfile
from pathlib import Path

import numpy as np

logger = logging.getLogger(__name__)

#: Environment variable naming the cache directory.
CACHE_DIR_VARIABLE = "POCKMARK_CACHE_DIR"
#: Layout version of the cache files; part of every key.
CACHE_FORMAT = 1

_SOURCE_FILES = ("environment", "geometry/frames.py")


def cache_dir():
    """Cache directory: ``$POCKMARK_CACHE_DIR`` or ``~/.cache/pockmark/environment``."""
    value = os.environ.get(CACHE_DIR_VARIABLE)
    if value:
        return Path(value).expanduser()
    return Path.home() / ".cache" / "pockmark" / "environment"


def _code_digest():
    """sha256 of the source of the environment package and the frame helpers.

    Part of the key, so a change to the models invalidates the cache even when the package
    version is unchanged (as in a development checkout).
    """
    root = Path(__file__).resolve().parents[1]
    digest = hashlib.sha256()
    for entry in _SOURCE_FILES:
        path = root / entry
        files = sorted(path.rglob("*.py")) if path.is_dir() else [path]
        for file in files:
            digest.update(str(file.relative_to(root)).encode())
            digest.update(file.read_bytes())
    return digest.hexdigest()


def cache_key(inputs, version):
    """sha256 hex digest of a canonical JSON of ``inputs``, the version and the code."""
    document = {
        "format": CACHE_FORMAT,
        "pockmark_version": version,
        "code": _code_digest(),
        "inputs": inputs,
    }
    text = json.dumps(document, sort_keys=True, separators=(",", ":"), allow_nan=False)
    return hashlib.sha256(text.encode("utf-8")).hexdigest()


def load(key, make_flux):
    """Return ``(fluxes by source, warnings)`` from the cache, or ``None`` if absent/unusable.

    ``make_flux(source, model, directions, speeds, weights, projectile_density, parameters)``
    rebuilds one flux.
    """
    path = cache_dir() / f"{key}.npz"
    if not path.is_file():
        return None
    try:
        with np.load(path, allow_pickle=False) as data:
            meta = json.loads(str(data["meta"][()]))
            result = {}
            for s, (source, entries) in enumerate(meta["sources"]):
                result[source] = [
                    make_flux(
                        entry["source"],
                        entry["model"],
                        data[f"s{s}_f{f}_directions"],
                        data[f"s{s}_f{f}_speeds"],
                        data[f"s{s}_f{f}_weights"],
                        entry["projectile_density"],
                        entry["parameters"],
                    )
                    for f, entry in enumerate(entries)
                ]
        return result, [tuple(w) for w in meta["warnings"]]
    except Exception as error:  # noqa: BLE001 - any unreadable file is rebuilt
        logger.warning("ignoring unreadable environment cache file %s (%s); rebuilding it", path,
                       error)
        return None


def store(key, fluxes, warnings_seen, inputs):
    """Write a result atomically; failures to write are logged, never raised."""
    directory = cache_dir()
    arrays = {}
    sources = []
    for s, (source, entries) in enumerate(fluxes.items()):
        described = []
        for f, flux in enumerate(entries):
            arrays[f"s{s}_f{f}_directions"] = np.asarray(flux.directions)
            arrays[f"s{s}_f{f}_speeds"] = np.asarray(flux.speeds)
            arrays[f"s{s}_f{f}_weights"] = np.asarray(flux.weights)
            described.append({
                "source": flux.source,
                "model": flux.model,
                "projectile_density": flux.projectile_density,
                "parameters": flux.parameters,
            })
        sources.append([source, described])
    meta = {"sources": sources, "warnings": [list(w) for w in warnings_seen], "inputs": inputs}
    arrays["meta"] = np.array(json.dumps(meta, sort_keys=True))
    temporary = None
    try:
        directory.mkdir(parents=True, exist_ok=True)
        handle, temporary = tempfile.mkstemp(prefix=f".{key}.", suffix=".tmp", dir=directory)
        with os.fdopen(handle, "wb") as stream:
            np.savez(stream, **arrays)
        os.replace(temporary, directory / f"{key}.npz")
        temporary = None
    except OSError as error:
        logger.warning("could not write the environment cache in %s (%s); continuing without it",
                       directory, error)
    finally:
        if temporary is not None:
            try:
                os.unlink(temporary)
            except OSError:
                pass
