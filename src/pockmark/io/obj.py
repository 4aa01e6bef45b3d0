"""Wavefront OBJ reader that keeps one shield tag per triangle in the file's face order.

General-purpose loaders regroup OBJ faces by material or drop group names, so pockmark reads
OBJ itself: ``v`` and ``f`` records, with the tag of each face taken from the ``g`` group,
the ``o`` object or the ``usemtl`` material in force when the face is read. Polygons with
more than three corners are split into a fan of triangles that share the polygon's original
face index.

The reader is vectorised: the file is read once as bytes, every line is classified by its
keyword with numpy operations over the whole byte array, and the numbers of all ``v`` and
all ``f`` records are each converted in one call. Line-by-line Python code runs only to word
the message of a record already known to be bad, or when numpy cannot convert a number that
Python can (``1_000``, non-ASCII digits); the result is the same either way.

This module also holds the byte-level helpers the other text readers share (reading a file
with clear errors, splitting bytes into lines and tokens, fan triangulation).
"""

import math
import re
import warnings

import numpy as np

from pockmark.errors import FormatError, MeshError
from pockmark.geometry.mesh import Mesh

#: The OBJ statements a face tag can come from.
TAG_SOURCES = ("group", "object", "material")

#: Tag of faces that no statement of the file names.
UNTAGGED = "(untagged)"

_KEYWORDS = {"group": "g", "object": "o", "material": "usemtl"}

# Bytes that separate tokens in the fast path. Files with other whitespace (vertical tab,
# form feed, U+00A0, ...) or bare carriage returns are first normalised line by line.
_WHITESPACE = np.zeros(256, dtype=bool)
_WHITESPACE[[9, 10, 13, 32]] = True
_RARE_ASCII_SPACE = (b"\x0b", b"\x0c", b"\x1c", b"\x1d", b"\x1e", b"\x1f")
_RARE_UNICODE_SPACE = re.compile("[\x85\xa0\u1680\u2000-\u200a\u2028\u2029\u202f\u205f\u3000]")
# Face indices this large cannot be vertex numbers; they go through Python's exact int().
_HUGE_INDEX = 2**62


# --------------------------------------------------------------------------------------
# Reading files and splitting bytes, shared by the text readers
# --------------------------------------------------------------------------------------


def _read_bytes(path, suffix=".obj"):
    """Return the bytes of ``path``; one-line errors for missing, unreadable or empty files."""
    try:
        raw = path.read_bytes()
    except IsADirectoryError:
        raise FormatError(
            f"{path}: is a directory, not a mesh file; name the {suffix} file"
        ) from None
    except FileNotFoundError:
        raise FormatError(f"{path}: no such file; check the mesh path in the case file") from None
    except OSError as error:
        raise FormatError(f"{path}: cannot be read ({error.strerror}); check permissions") from None
    if not raw or raw.isspace():
        raise MeshError(f"{path}: the file is empty; export the mesh again")
    return raw


def _decode(path, raw, what="OBJ"):
    """Decode UTF-8 or raise a FormatError naming the first line with other bytes."""
    try:
        return raw.decode("utf-8")
    except UnicodeDecodeError as error:
        line = raw[: error.start].count(b"\n") + 1
        raise FormatError(
            f"{path}:{line}: bytes that are not UTF-8; save the {what} as UTF-8 text"
        ) from None


def _read_text(path):
    return _decode(path, _read_bytes(path))


def _split_lines(data):
    """(k,) int, (k,) int: start and end (exclusive, before the newline) of every line."""
    newlines = np.flatnonzero(data == 10)
    starts = np.concatenate(([0], newlines + 1))
    ends = np.concatenate((newlines, [len(data)]))
    return starts, ends


def _split_tokens(data):
    """(t,) int, (t,) int: start and end of every run of non-whitespace bytes."""
    space = _WHITESPACE[data]
    first = ~space
    first[1:] &= space[:-1]
    last = ~space
    last[:-1] &= space[1:]
    return np.flatnonzero(first), np.flatnonzero(last) + 1


def _select_bytes(data, starts, ends):
    """The bytes of the non-overlapping ranges ``[starts, ends)``, concatenated in order."""
    starts, ends = np.sort(starts), np.sort(ends)
    bounds = np.empty(2 * len(starts) + 2, dtype=np.int64)
    bounds[0], bounds[-1] = 0, len(data)
    bounds[1:-1:2], bounds[2:-1:2] = starts, ends
    keep = np.zeros(len(bounds) - 1, dtype=bool)
    keep[1::2] = True
    return data[np.repeat(keep, np.diff(bounds))]


def _parse_numbers(data, dtype, expected):
    """Convert blank-separated numbers in one call; ``None`` unless there are ``expected``."""
    if expected == 0:
        return np.empty(0, dtype=dtype)
    try:
        with warnings.catch_warnings():
            warnings.simplefilter("error", DeprecationWarning)
            values = np.fromstring(data.tobytes(), dtype=dtype, sep=" ")
    except (ValueError, DeprecationWarning):
        return None
    return values if values.size == expected else None


def _fan_triangulate(corner_counts, corners):
    """Split polygons into fans of triangles that keep the file's order.

    Parameters
    ----------
    corner_counts : (p,) int
        Number of corners of each polygon, each at least 3.
    corners : (sum(corner_counts),) int
        Vertex indices of all polygons, one after another.

    Returns
    -------
    faces : (m, 3) int
        Triangles ``(c0, cj, cj+1)`` of every polygon, polygon after polygon.
    polygon_of_face : (m,) int
        Index of the polygon each triangle comes from.
    """
    corner_counts = np.asarray(corner_counts, dtype=np.int64)
    corners = np.asarray(corners, dtype=np.int64)
    if corner_counts.size and np.all(corner_counts == 3):
        return corners.reshape(-1, 3), np.arange(len(corner_counts), dtype=np.int64)
    fan_sizes = corner_counts - 2
    polygon_of_face = np.repeat(np.arange(len(corner_counts), dtype=np.int64), fan_sizes)
    first_corner = np.cumsum(corner_counts) - corner_counts
    first_face = np.cumsum(fan_sizes) - fan_sizes
    step = np.arange(len(polygon_of_face), dtype=np.int64) - first_face[polygon_of_face] + 1
    base = first_corner[polygon_of_face]
    faces = np.column_stack([corners[base], corners[base + step], corners[base + step + 1]])
    return faces, polygon_of_face


def _codes_in_order(keys):
    """Dense codes for ``keys`` numbered in order of first appearance, and the distinct keys."""
    distinct, first, inverse = np.unique(keys, return_index=True, return_inverse=True)
    order = np.argsort(first, kind="stable")
    rank = np.empty(len(order), dtype=np.int64)
    rank[order] = np.arange(len(order))
    return rank[inverse.ravel()], distinct[order]


# --------------------------------------------------------------------------------------
# OBJ
# --------------------------------------------------------------------------------------


def _needs_normalising(raw, text):
    """True if the file has whitespace or line breaks other than space, tab, LF and CR LF."""
    if any(byte in raw for byte in _RARE_ASCII_SPACE):
        return True
    if raw.count(b"\r") != raw.count(b"\r\n"):
        return True
    return not raw.isascii() and _RARE_UNICODE_SPACE.search(text) is not None


def _normalise(lines, keyword):
    """Rewrite every line in the plain form the byte parser reads, keeping line numbers."""
    plain = []
    for line in lines:
        head, _, rest = line.strip().partition(" ")
        if head in ("v", "f"):
            plain.append(f"{head} {' '.join(rest.split())}")
        elif head == keyword:
            plain.append(f"{head} {rest.strip()}")
        else:
            plain.append("")
    return "\n".join(plain).encode("utf-8")


def _vertex_record(line):
    """Python's reading of one ``v`` line: ((3,) list of float, None) or (None, problem)."""
    parts = line.strip().partition(" ")[2].split()
    try:
        xyz = [float(p) for p in parts[:3]]
    except ValueError:
        xyz = []
    if len(xyz) != 3:
        return None, "count"
    if not all(math.isfinite(x) for x in xyz):
        return None, "finite"
    return xyz, None


def _face_record(line, count):
    """Python's reading of one ``f`` line: (list of int, None) or (None, (problem, corner))."""
    rest = line.strip().partition(" ")[2]
    try:
        corners = [int(token.split("/", 1)[0]) for token in rest.split()]
    except ValueError:
        return None, ("integers", None)
    if len(corners) < 3:
        return None, ("few", None)
    for corner in corners:
        index = corner - 1 if corner > 0 else count + corner
        if corner == 0 or not 0 <= index < count:
            return None, ("range", corner)
    return corners, None


def _vertex_message(path, number, line, problem):
    if problem == "count":
        return f"{path}:{number}: vertex needs three numbers; got {line.strip()!r}"
    return f"{path}:{number}: vertex has a non-finite coordinate {line.strip()!r}; fix the export"


def _face_message(path, number, line, problem, count):
    kind, corner = problem
    if kind == "integers":
        return f"{path}:{number}: face indices must be integers; got {line.strip()!r}"
    if kind == "few":
        return f"{path}:{number}: a face needs at least 3 vertices; got {line.strip()!r}"
    return (
        f"{path}:{number}: face refers to vertex {corner} but only {count} vertices "
        "are defined before it; fix the face indices"
    )


class _ObjLines:
    """The lines of an OBJ file as byte ranges, with their tokens and keywords."""

    def __init__(self, raw, lines=None):
        self.raw = raw
        self.lines = lines  # original text lines when the bytes were normalised
        self.data = np.frombuffer(raw, dtype=np.uint8)
        self.starts, self.ends = _split_lines(self.data)
        self.token_starts, self.token_ends = _split_tokens(self.data)
        self.first = np.searchsorted(self.token_starts, self.starts)
        self.count = np.searchsorted(self.token_starts, self.ends) - self.first

    def text(self, line):
        """The original text of line index ``line`` (0-based)."""
        if self.lines is not None:
            return self.lines[line]
        return self.raw[self.starts[line] : self.ends[line]].decode("utf-8")

    def with_head(self, word):
        """(k,) int: the lines whose keyword (the text before the first space) is ``word``."""
        lines = np.flatnonzero(self.count > 0)
        token = self.first[lines]
        begin = self.token_starts[token]
        end = self.token_ends[token]
        match = (end - begin) == len(word)
        for offset, byte in enumerate(word.encode("ascii")):
            candidates = np.flatnonzero(match)
            match[candidates] = self.data[begin[candidates] + offset] == byte
        # A keyword followed by a tab and more text is not that keyword ("v\t1" is one word).
        following = self.data[np.minimum(end, len(self.data) - 1)]
        match &= (self.count[lines] == 1) | (following == 32)
        return lines[match]

    def arguments(self, lines, drop_after_slash=False):
        """Bytes of the records' arguments (after the keyword), one line after another."""
        begin = self.token_ends[self.first[lines]]
        end = np.minimum(self.ends[lines] + 1, len(self.data))
        if not drop_after_slash:
            return _select_bytes(self.data, begin, end), True
        # Keep the vertex index of "v/vt/vn": drop each token from its first slash on.
        slashes = np.flatnonzero(self.data == 47)
        if len(slashes) == 0:
            return _select_bytes(self.data, begin, end), True
        inside = np.zeros(len(self.data) + 1, dtype=np.int8)
        inside[begin] += 1
        inside[end] -= 1
        np.cumsum(inside, out=inside)
        slashes = slashes[inside[slashes].astype(bool)]
        token = np.searchsorted(self.token_starts, slashes, side="right") - 1
        first_slash = (
            np.concatenate(([True], token[1:] != token[:-1])) if len(token) else token.astype(bool)
        )
        slashes, token = slashes[first_slash], token[first_slash]
        if np.any(self.token_starts[token] == slashes):
            return None, False  # a token with no index before its slash
        # Kept ranges: [begin, first slash), [token end, next first slash), ..., [token end, end).
        # In the function below the starts and the ends are each sorted; the ranges do not overlap.
        starts = np.concatenate((begin, self.token_ends[token]))
        stops = np.concatenate((slashes, end))
        return _select_bytes(self.data, starts, stops), True


def _read_vertices(path, obj, lines):
    """(n, 3) float coordinates of the ``v`` lines and the first bad line as (line, message)."""
    numbers = obj.count[lines] - 1
    data, _ = obj.arguments(lines)
    values = _parse_numbers(data, np.float64, int(numbers.sum()))
    if values is not None:
        offsets = np.cumsum(numbers) - numbers
        short = numbers < 3
        take = np.minimum(offsets[:, None] + np.arange(3), len(values) - 1) if len(values) else None
        xyz = values[take] if take is not None else np.zeros((len(lines), 3))
        flagged = np.flatnonzero(short | ~np.isfinite(xyz).all(axis=1))
        for k in flagged:  # the first flagged line is bad; Python words its message
            line = obj.text(lines[k])
            _, problem = _vertex_record(line)
            if problem is not None:
                return xyz, (int(lines[k]), _vertex_message(path, lines[k] + 1, line, problem))
        return xyz, None
    # numpy could not convert some number: read the records as Python does.
    xyz = np.zeros((len(lines), 3))
    for k, line_index in enumerate(lines):
        line = obj.text(line_index)
        record, problem = _vertex_record(line)
        if problem is not None:
            return xyz, (int(line_index), _vertex_message(path, line_index + 1, line, problem))
        xyz[k] = record
    return xyz, None


def _read_faces(path, obj, lines, vertex_lines):
    """Corner counts and 0-based corner indices of the ``f`` lines, and the first bad line."""
    corner_counts = obj.count[lines] - 1
    defined = np.searchsorted(vertex_lines, lines)  # vertices defined before each face
    data, ok = obj.arguments(lines, drop_after_slash=True)
    corners = _parse_numbers(data, np.int64, int(corner_counts.sum())) if ok else None
    if corners is not None and corners.size and np.abs(corners).max() >= _HUGE_INDEX:
        corners = None
    if corners is None:
        # numpy could not convert some index: read the records as Python does.
        parsed = []
        for k, line_index in enumerate(lines):
            line = obj.text(line_index)
            record, problem = _face_record(line, int(defined[k]))
            if problem is not None:
                message = _face_message(path, line_index + 1, line, problem, int(defined[k]))
                return None, None, (int(line_index), message)
            parsed.extend(record)
        corners = np.asarray(parsed, dtype=np.int64)
    count_of_corner = np.repeat(defined, corner_counts)
    resolved = np.where(corners > 0, corners - 1, count_of_corner + corners)
    bad_corner = (corners == 0) | (resolved < 0) | (resolved >= count_of_corner)
    polygon_of_corner = np.repeat(np.arange(len(lines)), corner_counts)
    bad = corner_counts < 3
    bad[polygon_of_corner[bad_corner]] = True
    for k in np.flatnonzero(bad):  # the first flagged line is bad; Python words its message
        line = obj.text(lines[k])
        _, problem = _face_record(line, int(defined[k]))
        if problem is not None:
            return (
                None,
                None,
                (int(lines[k]), _face_message(path, lines[k] + 1, line, problem, int(defined[k]))),
            )
    return corner_counts, resolved, None


def _face_tag_codes(obj, tag_lines, face_lines):
    """Tag code of every face line, numbered in order of first use, and the tag names."""
    names = [UNTAGGED]
    for line in tag_lines:
        first, count = obj.first[line], obj.count[line]
        name = b""
        if count > 1:
            name = obj.raw[obj.token_starts[first + 1] : obj.token_ends[first + count - 1]]
        names.append(name.decode("utf-8") or UNTAGGED)
    distinct = {}
    slot_code = np.array(
        [distinct.setdefault(name, len(distinct)) for name in names], dtype=np.int64
    )
    slot = np.searchsorted(tag_lines, face_lines)  # 0 = before any tag statement
    codes, used = _codes_in_order(slot_code[slot])
    tag_of_code = list(distinct)
    return codes, tuple(tag_of_code[c] for c in used)


def load_obj(path, scale=1.0, tags_from="group"):
    """Read a triangle mesh with per-face shield tags from an OBJ file.

    Parameters
    ----------
    path : pathlib.Path
        The ``.obj`` file.
    scale : float
        Factor that converts the file's lengths to metres.
    tags_from : {"group", "object", "material"}
        Which OBJ statement names the shield tag of the faces that follow it.

    Returns
    -------
    Mesh
        Vertices in metres; faces with tags in file order; ``original_face_ids`` numbering
        the file's polygons from 0.

    Raises
    ------
    FormatError, MeshError
        With the file, line and the fix, for unreadable text, malformed records, face
        indices out of range, non-finite coordinates or a file without faces.
    """
    if tags_from not in TAG_SOURCES:
        raise MeshError(f"tags_from must be one of {', '.join(TAG_SOURCES)}; got {tags_from!r}")
    raw = _read_bytes(path)
    text = _decode(path, raw)
    keyword = _KEYWORDS[tags_from]
    if _needs_normalising(raw, text):
        lines = text.splitlines()
        obj = _ObjLines(_normalise(lines, keyword), lines)
    else:
        obj = _ObjLines(raw)

    vertex_lines = obj.with_head("v")
    face_lines = obj.with_head("f")
    tag_lines = obj.with_head(keyword)
    vertices, vertex_error = _read_vertices(path, obj, vertex_lines)
    corner_counts, corners, face_error = _read_faces(path, obj, face_lines, vertex_lines)
    errors = [error for error in (vertex_error, face_error) if error is not None]
    if errors:
        raise MeshError(min(errors)[1])
    if len(face_lines) == 0:
        raise MeshError(f"{path}: no faces ('f' records) found; is this an OBJ mesh?")

    polygon_codes, tag_names = _face_tag_codes(obj, tag_lines, face_lines)
    faces, polygon_of_face = _fan_triangulate(corner_counts, corners)
    return Mesh(
        vertices=vertices * scale,
        faces=faces,
        face_tags=polygon_codes[polygon_of_face],
        tag_names=tag_names,
        original_face_ids=polygon_of_face,
        source=str(path),
    )


def write_obj(path, vertices, faces, face_tags, tag_names, header=""):
    """Write a triangle mesh as OBJ with one ``g`` group per run of faces sharing a tag."""
    faces = np.asarray(faces, dtype=np.int64)
    face_tags = np.asarray(face_tags, dtype=np.int64)
    lines = [f"# {row}" for row in header.splitlines()]
    lines += [
        f"v {x:.9g} {y:.9g} {z:.9g}" for x, y, z in np.asarray(vertices, dtype=np.float64).tolist()
    ]
    breaks = np.flatnonzero(np.diff(face_tags)) + 1
    for begin, end in zip(
        np.concatenate(([0], breaks)), np.concatenate((breaks, [len(faces)])), strict=True
    ):
        if begin == end:
            continue
        lines.append(f"g {tag_names[face_tags[begin]]}")
        lines += [f"f {a} {b} {c}" for a, b, c in (faces[begin:end] + 1).tolist()]
    path.write_text("\n".join(lines) + "\n", encoding="utf-8")


_loaders = {".obj": load_obj}
