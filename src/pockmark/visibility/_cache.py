"""On-disk cache of visibility counts (private; the public face is :class:`VisibilityCache`).

One file per result, ``<sha256 key>.pmv``, in ``$POCKMARK_CACHE_DIR`` (default
``~/.cache/pockmark/visibility``). The key covers the engine's settings, the vertex and face
arrays (and user layers), the direction set and the source code of the visibility package, so
a rerun that changes only shield tags or the flux model's weights on the same directions reads
the counts back without tracing a ray.

**Layout.** ``b"PMVIS\\x01\\n\\0"``, the length of a JSON header (8 bytes, little endian), the
header, then a payload of zlib-compressed blobs listed in the header with their offsets and the
payload's sha256. For each chunk of directions the counts are stored as a bit per (face,
direction) entry for "wholly visible" plus the list of partly visible entries (position
deltas and counts); entries are enumerated direction by direction with the faces in the
engine's Morton order, so the bits come in long runs. Faces turned away, wholly shadowed
faces and faces wholly lit cost about a bit each before compression. The payload also holds,
per face, a fingerprint of its corner coordinates, its layer and flags, which lets a later run
on a mesh with added faces reuse every (face, direction) entry the added faces cannot change.

**Safety.** Files are written to a temporary name and renamed into place (atomic on POSIX and
Windows); a file whose magic, header, checksum or layout does not match is ignored with a
warning and overwritten by the next result. After each write the oldest entries (by last use)
are deleted until the directory holds at most ``max_bytes`` of ``*.pmv`` files.
"""

import hashlib
import json
import logging
import os
import tempfile
import zlib
from pathlib import Path

import numpy as np

from pockmark.errors import InputError
from pockmark.visibility import _kernels

logger = logging.getLogger(__name__)

#: Environment variable naming the cache directory.
CACHE_DIR_VARIABLE = "POCKMARK_CACHE_DIR"
#: Environment variable with the size cap of the visibility cache [bytes].
CACHE_SIZE_VARIABLE = "POCKMARK_VISIBILITY_CACHE_BYTES"
#: Default size cap [bytes].
DEFAULT_MAX_BYTES = 4 * 1024**3
#: Layout version of the files; part of every key.
CACHE_FORMAT = 1
_MAGIC = b"PMVIS\x01\n\x00"
_SUFFIX = ".pmv"
#: Most boxes the changed region of an incremental run is described by.
_MAX_CHANGE_BOXES = 64
_SOURCE_FILES = ("raycast.py", "_kernels.py", "_topology.py", "bvh.py", "_cache.py")


def default_cache_dir():
    """``$POCKMARK_CACHE_DIR`` or ``~/.cache/pockmark/visibility``."""
    value = os.environ.get(CACHE_DIR_VARIABLE)
    if value:
        return Path(value).expanduser()
    return Path.home() / ".cache" / "pockmark" / "visibility"


def _code_digest():
    """sha256 of the visibility package's source, so code changes invalidate the cache."""
    root = Path(__file__).resolve().parent
    digest = hashlib.sha256()
    for name in _SOURCE_FILES:
        digest.update(name.encode())
        digest.update((root / name).read_bytes())
    return digest.hexdigest()


class VisibilityCache:
    """A directory of cached visibility results with a size cap.

    Parameters
    ----------
    directory : str or os.PathLike, optional
        Where the files live; default ``$POCKMARK_CACHE_DIR`` or
        ``~/.cache/pockmark/visibility``. Created on first write.
    max_bytes : int, optional
        Size cap of the ``*.pmv`` files in the directory [bytes]; default
        ``$POCKMARK_VISIBILITY_CACHE_BYTES`` or 4 GiB. The entries used least recently are
        deleted first.
    incremental : bool, default True
        Whether a miss may reuse an entry of a mesh that the current one extends (faces
        added, none removed or moved; see :class:`~pockmark.visibility.VisibilityEngine`).
    """

    def __init__(self, directory=None, max_bytes=None, incremental=True):
        if directory is not None and not isinstance(directory, str | os.PathLike):
            raise TypeError(f"directory must be a path; got {directory!r}")
        self.directory = Path(directory).expanduser() if directory is not None else (
            default_cache_dir())
        if max_bytes is None:
            value = os.environ.get(CACHE_SIZE_VARIABLE)
            try:
                max_bytes = int(value) if value else DEFAULT_MAX_BYTES
            except ValueError:
                raise InputError(f"${CACHE_SIZE_VARIABLE} must be a whole number of bytes; "
                                 f"got {value!r}") from None
        if isinstance(max_bytes, bool) or not isinstance(max_bytes, int) or max_bytes < 0:
            raise InputError(f"max_bytes must be a non-negative integer; got {max_bytes!r}")
        self.max_bytes = max_bytes
        self.incremental = bool(incremental)
        self._code = _code_digest()

    def __repr__(self):
        return f"VisibilityCache({str(self.directory)!r}, max_bytes={self.max_bytes})"

    # --- keys ----------------------------------------------------------------------------

    def context(self, settings, directions_digest):
        """Digest of everything but the geometry: settings, directions, format and code."""
        document = {"format": CACHE_FORMAT, "code": self._code, "settings": settings,
                    "directions": directions_digest}
        text = json.dumps(document, sort_keys=True, separators=(",", ":"))
        return hashlib.sha256(text.encode()).hexdigest()

    def key(self, settings, geometry_digest, directions_digest):
        """Key of a result: the context and the geometry digest."""
        context = self.context(settings, directions_digest)
        return hashlib.sha256(f"{context}:{geometry_digest}".encode()).hexdigest()

    def path(self, key):
        return self.directory / f"{key}{_SUFFIX}"

    # --- reading -------------------------------------------------------------------------

    def load(self, key, n_faces):
        """The entry stored under ``key`` for a mesh of ``n_faces`` faces, or None."""
        path = self.path(key)
        if not path.is_file():
            return None
        try:
            entry = _Entry.read(path)
            if entry.header.get("key") != key or entry.header["n_faces"] != n_faces:
                raise ValueError("header does not match the request")
        except (OSError, ValueError, KeyError, TypeError, zlib.error) as error:
            logger.warning("ignoring unreadable visibility cache file %s (%s); it will be "
                           "recomputed", path, error)
            return None
        try:
            os.utime(path)  # mark as recently used
        except OSError:
            pass
        logger.info("visibility read from cache %s", path)
        return entry

    def discard(self, key):
        try:
            self.path(key).unlink()
        except OSError:
            pass

    def _headers(self):
        """(path, header) of every readable entry, most recently used first."""
        if not self.directory.is_dir():
            return []
        found = []
        for path in self.directory.glob(f"*{_SUFFIX}"):
            try:
                found.append((path.stat().st_mtime, path, _Entry.read_header(path)))
            except (OSError, ValueError, KeyError, TypeError):
                continue
        found.sort(key=lambda item: item[0], reverse=True)
        return [(path, header) for _, path, header in found]

    def find_base(self, engine, directions):
        """An incremental plan from an entry of a mesh that this one extends, or None."""
        if not self.incremental:
            return None
        from pockmark.visibility.raycast import _directions_digest

        context = self.context(engine._settings(), _directions_digest(directions))
        for path, header in self._headers():
            if header.get("context") != context or header.get("n_faces", 0) >= engine.n_faces:
                continue
            try:
                entry = _Entry.read(path)
                plan = _IncrementalPlan.build(entry, engine, directions)
            except (OSError, ValueError, KeyError, TypeError, zlib.error) as error:
                logger.debug("cache entry %s not usable as a base (%s)", path, error)
                continue
            if plan is not None:
                logger.info("visibility: reusing %s for the faces the added ones cannot change",
                            path)
                return plan
        return None

    # --- writing -------------------------------------------------------------------------

    def writer(self, key, engine, directions):
        """A :class:`_Writer` collecting the chunks of a new entry."""
        from pockmark.visibility.raycast import _directions_digest

        header = {
            "format": CACHE_FORMAT,
            "key": key,
            "context": self.context(engine._settings(), _directions_digest(directions)),
            "geometry": engine.geometry_digest(),
            "settings": engine._settings(),
            "n_faces": engine.n_faces,
            "n_directions": int(directions.shape[0]),
            "full": engine.full_count,
        }
        return _Writer(self, key, header, engine)

    def _write(self, key, header, blobs):
        """Write header and payload atomically, then evict; failures are logged."""
        payload = b"".join(blobs)
        header = dict(header, payload_sha256=hashlib.sha256(payload).hexdigest(),
                      payload_bytes=len(payload))
        text = json.dumps(header, sort_keys=True, separators=(",", ":")).encode()
        temporary = None
        try:
            self.directory.mkdir(parents=True, exist_ok=True)
            handle, temporary = tempfile.mkstemp(prefix=f".{key}.", suffix=".tmp",
                                                 dir=self.directory)
            with os.fdopen(handle, "wb") as stream:
                stream.write(_MAGIC)
                stream.write(len(text).to_bytes(8, "little"))
                stream.write(text)
                stream.write(payload)
            os.replace(temporary, self.path(key))
            temporary = None
            logger.info("visibility stored in cache %s (%.1f MB)", self.path(key),
                        (len(payload) + len(text)) / 1e6)
        except OSError as error:
            logger.warning("could not write the visibility cache in %s (%s); continuing "
                           "without it", self.directory, error)
            return
        finally:
            if temporary is not None:
                try:
                    os.unlink(temporary)
                except OSError:
                    pass
        self.evict(keep=self.path(key))

    def evict(self, keep=None):
        """Delete the least recently used entries until the total size is within the cap."""
        try:
            entries = []
            for path in self.directory.glob(f"*{_SUFFIX}"):
                stat = path.stat()
                entries.append((stat.st_mtime, stat.st_size, path))
        except OSError:
            return
        total = sum(size for _, size, _ in entries)
        entries.sort(key=lambda item: (item[2] == keep, item[0]))
        for _, size, path in entries:
            if total <= self.max_bytes:
                break
            if path == keep:
                logger.warning("visibility cache entry %s (%d bytes) alone exceeds the cache "
                               "size cap of %d bytes; not keeping it", path, size,
                               self.max_bytes)
            try:
                path.unlink()
                total -= size
            except OSError:
                continue


class _Writer:
    """Collects compressed chunks; :meth:`close` writes the entry."""

    def __init__(self, cache, key, header, engine):
        self.cache = cache
        self.key = key
        self.header = header
        self.face_order = engine._trace_order
        self.full = engine.full_count
        self.blobs = []
        self.offset = 0
        self.chunks = []
        order = np.asarray(engine._trace_order, dtype=np.int64)
        flags = (engine.closed_faces.astype(np.uint8)
                 | (engine.degenerate_faces.astype(np.uint8) << 1))
        self.faces = {
            "order": self._add(order.astype(np.int32).tobytes()),
            "fingerprints": self._add(engine.face_fingerprints().tobytes()),
            "layers": self._add(engine.face_layers.astype(np.int64).tobytes()),
            "flags": self._add(flags.tobytes()),
        }

    def _add(self, raw):
        blob = zlib.compress(raw, 1)
        self.blobs.append(blob)
        location = [self.offset, len(blob), len(raw)]
        self.offset += len(blob)
        return location

    def add(self, start, stop, counts):
        n_partial = _kernels._count_partial(counts, self.full)
        lit_bits = np.zeros((counts.size + 7) // 8, dtype=np.uint8)
        partial_index = np.empty(n_partial, dtype=np.int64)
        partial_value = np.empty(n_partial, dtype=np.uint16)
        _kernels._encode_counts(counts, self.full, self.face_order, lit_bits, partial_index,
                                partial_value)
        deltas = np.diff(partial_index, prepend=0).astype(np.uint32)
        values = partial_value.astype(np.uint8 if self.full <= 255 else np.uint16)
        self.chunks.append([start, stop, n_partial, self._add(lit_bits.tobytes()),
                            self._add(deltas.tobytes()), self._add(values.tobytes())])

    def close(self):
        header = dict(self.header, chunks=self.chunks, faces=self.faces)
        self.cache._write(self.key, header, self.blobs)


class _Entry:
    """A verified cache file in memory."""

    def __init__(self, header, payload):
        self.header = header
        self.payload = payload

    @staticmethod
    def read_header(path):
        with open(path, "rb") as stream:
            if stream.read(len(_MAGIC)) != _MAGIC:
                raise ValueError("not a pockmark visibility cache file")
            length = int.from_bytes(stream.read(8), "little")
            if not 0 < length < 1 << 30:
                raise ValueError("bad header length")
            header = json.loads(stream.read(length).decode())
        if not isinstance(header, dict) or header.get("format") != CACHE_FORMAT:
            raise ValueError("unknown cache format")
        return header

    @classmethod
    def read(cls, path):
        with open(path, "rb") as stream:
            data = stream.read()
        if data[: len(_MAGIC)] != _MAGIC:
            raise ValueError("not a pockmark visibility cache file")
        length = int.from_bytes(data[len(_MAGIC): len(_MAGIC) + 8], "little")
        start = len(_MAGIC) + 8
        header = json.loads(data[start: start + length].decode())
        if not isinstance(header, dict) or header.get("format") != CACHE_FORMAT:
            raise ValueError("unknown cache format")
        payload = data[start + length:]
        if len(payload) != header["payload_bytes"]:
            raise ValueError("truncated payload")
        if hashlib.sha256(payload).hexdigest() != header["payload_sha256"]:
            raise ValueError("checksum mismatch")
        entry = cls(header, payload)
        entry._check_layout()
        return entry

    def _check_layout(self):
        header = self.header
        k = header["n_directions"]
        expected = 0
        for start, stop, n_partial, *blobs in header["chunks"]:
            if start != expected or not start < stop <= k or n_partial < 0:
                raise ValueError("chunk list does not tile the directions")
            expected = stop
            for offset, size, _raw in blobs:
                if offset < 0 or size < 0 or offset + size > len(self.payload):
                    raise ValueError("blob outside the payload")
        if expected != k:
            raise ValueError("chunk list does not cover the directions")

    def blob(self, location, dtype, count=None):
        offset, size, raw = location
        data = zlib.decompress(self.payload[offset: offset + size])
        if len(data) != raw:
            raise ValueError("blob has the wrong size")
        array = np.frombuffer(data, dtype=dtype)
        if count is not None and len(array) != count:
            raise ValueError("blob has the wrong length")
        return array

    def face_array(self, name, dtype, count=None):
        return self.blob(self.header["faces"][name], dtype, count)

    @property
    def chunks(self):
        return [(start, stop) for start, stop, *_ in self.header["chunks"]]

    def decode(self, index, face_order):
        """Counts (m, stop - start) of chunk ``index``."""
        start, stop, n_partial, bits, deltas, values = self.header["chunks"][index]
        m = self.header["n_faces"]
        full = self.header["full"]
        n_entries = m * (stop - start)
        lit_bits = self.blob(bits, np.uint8, (n_entries + 7) // 8)
        partial_index = np.cumsum(self.blob(deltas, np.uint32, n_partial), dtype=np.int64)
        partial_value = self.blob(values, np.uint8 if full <= 255 else np.uint16,
                                  n_partial).astype(np.uint16)
        counts = np.empty((m, stop - start), dtype=np.uint16)
        decoded = _kernels._decode_counts(lit_bits, partial_index, partial_value, full,
                                          face_order, counts)
        if decoded != n_partial:
            raise ValueError("partial entries out of order")
        return counts

    def iter_counts(self):
        order = self.face_array("order", np.int32, self.header["n_faces"]).astype(np.int64)
        for index, (start, stop) in enumerate(self.chunks):
            yield start, stop, self.decode(index, order)


class _IncrementalPlan:
    """Reuse of an entry of mesh A for a mesh B that contains every face of A.

    Exact: a (face, direction) result of a face common to A and B is taken from A only if
    the face, its flags (closed part, degenerate) and the order of its layer among the common
    faces are unchanged, and the box of the face swept along the direction (extended behind
    it by the coincidence tolerance and the ray offset) misses every box around the added
    faces; every ray that decides the face's result in that direction (its corner probes,
    its lattice or sample points) lies inside that swept box, so it cannot meet an added face.
    All other entries are traced again.
    """

    def __init__(self, entry, engine, directions, a_of_b, reuse, boxes):
        self.entry = entry
        self.engine = engine
        self.directions = directions
        self.a_of_b = a_of_b
        self.reuse = reuse.astype(np.uint8)
        self.boxes = boxes
        corners = engine._vertices[engine._faces]
        self.face_low = np.ascontiguousarray(corners.min(axis=1))
        self.face_high = np.ascontiguousarray(corners.max(axis=1))
        self.behind = engine.coincidence_tolerance + 2.0 * engine.ray_offset
        self.chunks = entry.chunks
        self.base_order = entry.face_array("order", np.int32,
                                           entry.header["n_faces"]).astype(np.int64)
        self.matched = np.flatnonzero(a_of_b >= 0)

    @classmethod
    def build(cls, entry, engine, directions):
        header = entry.header
        m_a = header["n_faces"]
        if header["full"] != engine.full_count or header["n_directions"] != len(directions):
            return None
        finger_a = entry.face_array("fingerprints", np.uint64, 2 * m_a).reshape(m_a, 2)
        finger_b = engine.face_fingerprints()
        key_a = finger_a.view([("h0", np.uint64), ("h1", np.uint64)]).reshape(-1)
        key_b = np.ascontiguousarray(finger_b).view(
            [("h0", np.uint64), ("h1", np.uint64)]).reshape(-1)
        order_a = np.argsort(key_a, kind="stable")
        sorted_a = key_a[order_a]
        if len(sorted_a) > 1 and np.any(sorted_a[1:] == sorted_a[:-1]):
            return None  # duplicate faces in A: matching would be ambiguous
        if len(np.unique(key_b)) != len(key_b):
            return None
        where = np.minimum(np.searchsorted(sorted_a, key_b), m_a - 1)
        found = sorted_a[where] == key_b
        a_of_b = np.where(found, order_a[where], -1).astype(np.int64)
        if int(found.sum()) != m_a:
            return None  # faces of A were removed or moved: not an extension
        layers_a = entry.face_array("layers", np.int64, m_a)
        flags_a = entry.face_array("flags", np.uint8, m_a)
        flags_b = (engine.closed_faces.astype(np.uint8)
                   | (engine.degenerate_faces.astype(np.uint8) << 1))
        common = np.flatnonzero(found)
        reuse = np.zeros(engine.n_faces, dtype=bool)
        reuse[common] = flags_a[a_of_b[common]] == flags_b[common]
        # Faces that are new, or whose part changed (closed/open) or which changed from or to
        # degenerate, may block differently: rays that can meet them are traced again.
        changed = np.flatnonzero(~reuse & ~(engine.degenerate_faces & ~found))
        # The layer order among the common faces must be the same in A and B.
        la = layers_a[a_of_b[common]]
        lb = engine.face_layers[common]
        order = np.lexsort((lb, la))
        la, lb = la[order], lb[order]
        if len(la) > 1:
            step_a = np.diff(la)
            step_b = np.diff(lb)
            if np.any(step_b < 0) or np.any((step_a == 0) != (step_b == 0)):
                return None
        if not reuse.any():
            return None
        boxes = _change_boxes(engine, changed)
        return cls(entry, engine, directions, a_of_b, reuse, boxes)

    def prefill(self, start, stop, counts, threads):
        """Copy A's counts of the reusable faces into ``counts``; return the entries to trace."""
        index = self.chunks.index((start, stop))
        base = self.entry.decode(index, self.base_order)
        counts[self.matched] = base[self.a_of_b[self.matched]]
        need = np.empty(counts.shape, dtype=np.uint8)
        from pockmark.visibility.raycast import _numba_threads

        with _numba_threads(threads):
            _kernels._affected_pairs(self.face_low, self.face_high, self.engine.face_normals,
                                     self.reuse, self.directions, start, self.behind,
                                     self.boxes, need)
        counts[need != 0] = 0
        return need


def _change_boxes(engine, added):
    """At most ``_MAX_CHANGE_BOXES`` boxes (min xyz, max xyz) around the faces ``added``
    (grouped by layer, i.e. by part), grown by the tolerances."""
    if len(added) == 0:
        return np.zeros((0, 6))
    corners = engine._vertices[engine._faces[added]]
    low = corners.min(axis=1)
    high = corners.max(axis=1)
    groups = engine.face_layers[added]
    labels, group = np.unique(groups, return_inverse=True)
    if len(labels) > _MAX_CHANGE_BOXES:
        group = np.zeros(len(added), dtype=np.int64)
        labels = labels[:1]
    boxes = np.empty((len(labels), 6))
    for g in range(len(labels)):
        mine = group == g
        boxes[g, :3] = low[mine].min(axis=0)
        boxes[g, 3:] = high[mine].max(axis=0)
    pad = engine.coincidence_tolerance + 2.0 * engine.ray_offset + 1e-9 * engine.diagonal
    boxes[:, :3] -= pad
    boxes[:, 3:] += pad
    return np.ascontiguousarray(boxes)
