"""STL reader: binary and ASCII, with one shield tag per triangle in the file's face order.

The encoding is decided by content, not by the suffix: a file whose size is exactly
``84 + 50 n`` bytes, with ``n`` the triangle count in bytes 80-83, is binary (some exporters
start binary headers with the word ``solid``); otherwise a file that starts with ``solid``
and holds no NUL byte is ASCII.

Tags:

* ASCII STL: the name after ``solid`` of the block each facet is in (several blocks may
  share a name; a block without a name is untagged);
* binary STL: the 16-bit attribute word of each triangle, as its decimal string (``"7"``).

Each triangle keeps its own three vertices, as the file stores them: vertices are not
merged, faces are neither reordered nor dropped (degenerate faces are kept for the mesh
check to flag). Both encodings are parsed with numpy over the whole file.
"""

import io
import warnings

import numpy as np

from pockmark.errors import FormatError, MeshError
from pockmark.geometry.mesh import Mesh
from pockmark.io.obj import (
    UNTAGGED,
    _codes_in_order,
    _read_bytes,
    _select_bytes,
    _split_lines,
)

#: Accepted values of ``tags_from``: STL has one tag source, the solid name (ASCII) or the
#: attribute word (binary), which "group" stands for.
TAG_SOURCES = ("group",)

#: One binary STL triangle record (50 bytes, little-endian).
STL_RECORD = np.dtype([("normal", "<f4", (3,)), ("vertices", "<f4", (3, 3)), ("attribute", "<u2")])

_HEADER_BYTES = 84

_BLANK, _SOLID, _ENDSOLID, _FACET, _OUTER, _VERTEX, _ENDLOOP, _ENDFACET, _OTHER = range(9)
_KEYWORDS = {
    "solid": _SOLID,
    "endsolid": _ENDSOLID,
    "facet": _FACET,
    "outer": _OUTER,
    "vertex": _VERTEX,
    "endloop": _ENDLOOP,
    "endfacet": _ENDFACET,
}
# A facet block is these seven lines.
_FACET_BLOCK = (_FACET, _OUTER, _VERTEX, _VERTEX, _VERTEX, _ENDLOOP, _ENDFACET)

# Eight bytes at a time (SWAR): constants for finding blank bytes in a uint64 word.
_LOW7 = np.uint64(0x7F7F7F7F7F7F7F7F)
_HIGH = np.uint64(0x8080808080808080)
_LOWER = np.uint64(0x2020202020202020)
_BLANKS = tuple(np.uint64(byte * 0x0101010101010101) for byte in (0x20, 0x09, 0x0D))
# Bytes that may follow a keyword: blank, newline, or 0 past the end of the file.
_ENDS_WORD = np.zeros(256, dtype=bool)
_ENDS_WORD[[0x00, 0x09, 0x0A, 0x0D, 0x20]] = True


def _key(word):
    return np.uint64(sum(byte << (8 * k) for k, byte in enumerate(word.encode("ascii"))))


def load_stl(path, scale=1.0, tags_from="group"):
    """Read a triangle mesh with per-face shield tags from a binary or ASCII STL file.

    Parameters
    ----------
    path : pathlib.Path
        The ``.stl`` file.
    scale : float
        Factor that converts the file's lengths to metres.
    tags_from : {"group"}
        STL has one tag source: the ``solid`` name of each block (ASCII) or the attribute
        word of each triangle (binary). Other values raise, rather than being ignored.

    Returns
    -------
    Mesh
        Three vertices per triangle [m]; faces in file order; ``original_face_ids`` number
        the triangles from 0.

    Raises
    ------
    FormatError, MeshError
        With the file, the line or triangle record and the fix, for truncated or malformed
        files, non-finite coordinates, undecodable names or a file without triangles.
    """
    return _read_stl(path, scale, tags_from)[0]


def _read_stl(path, scale=1.0, tags_from="group"):
    """:func:`load_stl`, also returning True for a binary file."""
    if tags_from not in TAG_SOURCES:
        raise MeshError(
            f"{path}: tags_from must be one of {', '.join(TAG_SOURCES)} for STL (the solid name or "
            f"the attribute word); got {tags_from!r}; leave tags_from out or use a side-car tag "
            "file"
        )
    raw = _read_bytes(path, suffix=".stl")
    size = len(raw)
    if size >= _HEADER_BYTES:
        declared = int(np.frombuffer(raw, dtype="<u4", count=1, offset=80)[0])
        if size == _HEADER_BYTES + STL_RECORD.itemsize * declared:
            return _binary(path, raw, declared, scale), True
    else:
        declared = None
    if raw[:4096].lstrip()[:5].lower() == b"solid" and b"\x00" not in raw:
        return _ascii(path, raw, scale), False
    if declared is None:
        raise FormatError(
            f"{path}: {size} bytes is too short for a binary STL (at least {_HEADER_BYTES}) and "
            "the "
            "file does not start with 'solid'; it is not an STL file: export it again"
        )
    expected = _HEADER_BYTES + STL_RECORD.itemsize * declared
    complete = max(size - _HEADER_BYTES, 0) // STL_RECORD.itemsize
    if size < expected:
        raise FormatError(
            f"{path}: truncated or not an STL: it does not start with 'solid', and as a binary STL "
            "its "
            f"header declares {declared} triangles ({expected} bytes) but the file has {size} "
            "bytes "
            f"({complete} complete triangle records); export the file again"
        )
    raise FormatError(
        f"{path}: not a valid STL: it does not start with 'solid', and as a binary STL its header "
        f"declares {declared} triangles ({expected} bytes) but the file has {size} bytes, "
        f"{size - expected} too many; export the file again"
    )


def _binary(path, raw, count, scale):
    if count == 0:
        raise MeshError(f"{path}: the binary STL declares 0 triangles; export the mesh again")
    records = np.frombuffer(raw, dtype=STL_RECORD, count=count, offset=_HEADER_BYTES)
    corners = records["vertices"].reshape(-1, 3).astype(np.float64)
    finite = np.isfinite(corners).all(axis=1)
    if not finite.all():
        bad = int(np.flatnonzero(~finite)[0]) // 3
        raise MeshError(
            f"{path}: triangle record {bad} (byte offset "
            f"{_HEADER_BYTES + STL_RECORD.itemsize * bad}) "
            f"has a non-finite vertex coordinate {records['vertices'][bad].tolist()}; fix the "
            "export"
        )
    codes, words = _codes_in_order(records["attribute"])
    return Mesh(
        vertices=corners * scale,
        faces=np.arange(3 * count, dtype=np.int64).reshape(-1, 3),
        face_tags=codes,
        tag_names=tuple(str(int(word)) for word in words),
        original_face_ids=np.arange(count, dtype=np.int64),
        source=str(path),
    )


_WORDS = tuple(_KEYWORDS)
_WORD_KIND = np.array([_KEYWORDS[w] for w in _WORDS], dtype=np.int8)
_WORD_SIZE = np.array([len(w) for w in _WORDS], dtype=np.int64)
_WORD_KEY = np.array([_key(w) for w in _WORDS], dtype=np.uint64)
_WORD_MASK = np.array([(1 << (8 * len(w))) - 1 for w in _WORDS], dtype=np.uint64)
_END = -2
_BY_FIRST = np.full(256, -1, dtype=np.int64)
_BY_FOURTH = np.full(256, -1, dtype=np.int64)
for _index, _word in enumerate(_WORDS):
    if _word.startswith("end"):
        _BY_FIRST[ord("e")] = _END
        _BY_FOURTH[ord(_word[3])] = _index
    else:
        _BY_FIRST[ord(_word[0])] = _index


def _words_at(raw, positions):
    """(k,) uint64: the eight bytes of ``raw`` from each position, little-endian; 0 past the end."""
    padded = raw if len(raw) >= 8 else raw + bytes(8 - len(raw))
    view = np.ndarray((len(padded) - 7,), dtype="<u8", buffer=padded, strides=(1,))
    if len(positions) == 0 or positions.max() < len(view):
        return view[positions]
    clipped = np.minimum(positions, len(view) - 1)
    shift = ((positions - clipped) * 8).astype(np.uint64)
    words = view[clipped] >> np.minimum(shift, np.uint64(63))
    return np.where(shift >= 64, np.uint64(0), words)


def _first_nonblank(words):
    """Index (0-8) of the first byte of each word that is not space, tab or CR; 8 if none is."""
    flags = np.full(words.shape, _HIGH)
    for blank in _BLANKS:
        x = words ^ blank
        flags &= ((x & _LOW7) + _LOW7) | x  # high bit of each byte set where the byte != blank
    # The lowest flag is bit 8 k + 7 of the first non-blank byte k: count the bits below it.
    below = (flags & (~flags + np.uint64(1))) - np.uint64(1)  # all 64 bits when no flag is set
    return np.bitwise_count(below).astype(np.int64) // 8


def _first_words(raw, data, starts, ends):
    """Position of the first non-blank byte of each line, and the kind of its first word."""
    position = starts.copy()
    todo = np.arange(len(starts))
    for _ in range(32):  # up to 256 leading blanks, eight at a time
        skip = _first_nonblank(_words_at(raw, position[todo]))
        position[todo] += skip
        todo = todo[skip == 8]
        if len(todo) == 0:
            break
    for line in todo:  # even more leading blanks: rare enough for Python
        text = raw[position[line] : ends[line]]
        position[line] = ends[line] - len(text.lstrip())
    position = np.minimum(position, ends)
    kind = np.full(len(starts), _OTHER, dtype=np.int8)
    kind[position >= ends] = _BLANK
    lines = np.flatnonzero(position < ends)
    at = position[lines]
    words = _words_at(raw, at)
    lowered = words | _LOWER
    # The first letter, and the fourth after "end", tell the seven keywords apart; then check
    # the whole word and that a blank, a newline or the end of the file follows it.
    word = _BY_FIRST[(lowered & np.uint64(0xFF)).astype(np.uint8)]
    ending = np.flatnonzero(word == _END)
    word[ending] = _BY_FOURTH[
        ((lowered[ending] >> np.uint64(24)) & np.uint64(0xFF)).astype(np.uint8)
    ]
    known = word >= 0
    word[~known] = 0
    size = _WORD_SIZE[word]
    match = known & ((lowered & _WORD_MASK[word]) == _WORD_KEY[word])
    after = ((words >> (np.minimum(size, 7) * 8).astype(np.uint64)) & np.uint64(0xFF)).astype(
        np.uint8
    )
    long = np.flatnonzero(size == 8)
    after[long] = np.where(
        at[long] + 8 < len(data), data[np.minimum(at[long] + 8, len(data) - 1)], 0
    )
    match &= _ENDS_WORD[after]
    kind[lines[match]] = _WORD_KIND[word[match]]
    return position, kind


_KEYWORD_SIZE = {kind: len(word) for word, kind in _KEYWORDS.items()}


def _ascii(path, raw, scale):
    if b"\n" not in raw and b"\r" in raw:
        raw = raw.replace(b"\r", b"\n")  # classic Mac line ends
    data = np.frombuffer(raw, dtype=np.uint8)
    starts, ends = _split_lines(data)
    position, kind = _first_words(raw, data, starts, ends)
    length = np.array([0] + [_KEYWORD_SIZE.get(k, 0) for k in range(1, 9)], dtype=np.int64)[kind]
    lines = np.flatnonzero(kind != _BLANK)
    kinds = kind[lines]

    def text(line, limit=60):
        words = raw[position[line] : ends[line]].decode("utf-8", errors="replace").strip()
        return repr(words if len(words) <= limit else words[:limit] + "...")

    other = np.flatnonzero(kinds == _OTHER)
    if len(other):
        line = lines[other[0]]
        raise FormatError(
            f"{path}:{line + 1}: unexpected {text(line)} in ASCII STL; each line must start with "
            "solid, "
            "facet normal, outer loop, vertex, endloop, endfacet or endsolid; fix or export the "
            "file again"
        )

    # solid / endsolid must alternate, starting with solid and ending with endsolid.
    brackets = np.flatnonzero((kinds == _SOLID) | (kinds == _ENDSOLID))
    opening = kinds[brackets] == _SOLID
    expected = np.arange(len(brackets)) % 2 == 0
    wrong = np.flatnonzero(opening != expected)
    if len(wrong):
        at = wrong[0]
        line = lines[brackets[at]]
        if opening[at]:
            before = lines[brackets[at - 1]]
            raise FormatError(
                f"{path}:{line + 1}: 'solid' begins before the solid opened on line {before + 1} "
                "has its 'endsolid'; fix or export the file again"
            )
        raise FormatError(
            f"{path}:{line + 1}: 'endsolid' without a 'solid'; fix or export the file again"
        )

    facets = np.flatnonzero(kinds == _FACET)
    depth = np.cumsum(kinds == _SOLID) - np.cumsum(kinds == _ENDSOLID)
    outside = np.flatnonzero(depth[facets] != 1)
    if len(outside):
        line = lines[facets[outside[0]]]
        raise FormatError(
            f"{path}:{line + 1}: facet outside any solid ... endsolid block; fix the file"
        )
    at = facets[:, None] + np.arange(1, len(_FACET_BLOCK))
    beyond = at >= len(kinds)
    found = np.where(beyond, -1, kinds[np.minimum(at, len(kinds) - 1)])
    mismatch = found != np.array(_FACET_BLOCK[1:])
    if mismatch.any():
        facet, step = (int(i[0]) for i in np.nonzero(mismatch))
        opened = lines[facets[facet]]
        if beyond[facet, step]:
            raise FormatError(
                f"{path}: the file ends inside the facet that starts on line {opened + 1}; the "
                "file is "
                "truncated: export it again"
            )
        line = lines[at[facet, step]]
        raise FormatError(
            f"{path}:{line + 1}: the facet that starts on line {opened + 1} needs outer loop, "
            "three vertex "
            f"lines, endloop and endfacet, but line {line + 1} has {text(line)}; fix the file"
        )
    if len(brackets) % 2:
        line = lines[brackets[-1]]
        raise FormatError(
            f"{path}: the solid opened on line {line + 1} has no 'endsolid'; the file is "
            "truncated: "
            "export it again"
        )
    covered = np.zeros(len(kinds), dtype=bool)
    covered[brackets] = True
    covered[(facets[:, None] + np.arange(len(_FACET_BLOCK))).ravel()] = True
    if not covered.all():
        line = lines[np.flatnonzero(~covered)[0]]
        raise FormatError(f"{path}:{line + 1}: {text(line)} outside a facet block; fix the file")
    if len(facets) == 0:
        raise MeshError(f"{path}: the ASCII STL has no facets; export the mesh again")

    vertex_lines = lines[(facets[:, None] + np.arange(2, 5)).ravel()]
    corners = _vertex_coordinates(path, raw, data, vertex_lines, position, length, ends)

    # Tag of each facet: the name of the solid it is in.
    solid_lines = lines[brackets[0::2]]
    names = [_solid_name(path, raw, data, line, position, length, ends) for line in solid_lines]
    solid_of_facet = np.cumsum(kinds == _SOLID)[facets] - 1
    distinct = {}
    name_code = np.array(
        [distinct.setdefault(name, len(distinct)) for name in names], dtype=np.int64
    )
    codes, used = _codes_in_order(name_code[solid_of_facet])
    tag_of_code = list(distinct)
    count = len(facets)
    return Mesh(
        vertices=corners * scale,
        faces=np.arange(3 * count, dtype=np.int64).reshape(-1, 3),
        face_tags=codes,
        tag_names=tuple(tag_of_code[c] for c in used),
        original_face_ids=np.arange(count, dtype=np.int64),
        source=str(path),
    )


def _vertex_coordinates(path, raw, data, vertex_lines, position, length, ends):
    """(3 f, 3) float: the numbers of the vertex lines, three per line."""
    begin = position[vertex_lines] + length[vertex_lines]
    stop = np.minimum(ends[vertex_lines] + 1, len(data))
    numbers = _select_bytes(data, begin, stop)
    try:
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")  # loadtxt warns about input without data
            corners = np.loadtxt(
                io.BytesIO(numbers.tobytes()), dtype=np.float64, comments=None, ndmin=2
            )
    except ValueError:  # a word that is not a number, or a line with more or fewer numbers
        corners = None
    if corners is not None and corners.shape == (len(vertex_lines), 3):
        finite = np.isfinite(corners).all(axis=1)
        if finite.all():
            return corners
        line = vertex_lines[np.flatnonzero(~finite)[0]]
        raise MeshError(
            f"{path}:{line + 1}: vertex has a non-finite coordinate "
            f"{raw[position[line] : ends[line]].decode('ascii', 'replace').strip()!r}; "
            "fix the export"
        )
    # Read the lines as Python does, to name the first bad one.
    corners = np.empty((len(vertex_lines), 3))
    for k, line in enumerate(vertex_lines):
        words = raw[position[line] : ends[line]].decode("utf-8", errors="replace").split()
        try:
            xyz = [float(word) for word in words[1:]]
        except ValueError:
            xyz = []
        if len(xyz) != 3:
            raise FormatError(
                f"{path}:{line + 1}: a vertex line needs three numbers; got {' '.join(words)!r}; "
                "fix the file"
            )
        if not all(np.isfinite(xyz)):
            raise MeshError(
                f"{path}:{line + 1}: vertex has a non-finite coordinate {' '.join(words)!r}; fix "
                "the export"
            )
        corners[k] = xyz
    return corners


def _solid_name(path, raw, data, line, position, length, ends):
    name = raw[position[line] + length[line] : ends[line]].strip()
    try:
        return name.decode("utf-8") or UNTAGGED
    except UnicodeDecodeError:
        raise FormatError(
            f"{path}:{line + 1}: the solid name {name!r} is not UTF-8 text; rename the solid or "
            "save the "
            "file as UTF-8"
        ) from None


_loaders = {".stl": load_stl}
