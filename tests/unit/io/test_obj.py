"""The OBJ reader keeps one tag per triangle in file order and rejects broken files clearly."""

import math

import numpy as np
import pytest
import trimesh
from hypothesis import given, settings
from hypothesis import strategies as st
from tests.conftest import SEED

from pockmark.errors import FormatError, MeshError, PockmarkError
from pockmark.io import load_mesh
from pockmark.io.obj import UNTAGGED, load_obj, write_obj

SAMPLE = """\
# interleaved groups and materials, a quad and negative indices
v 0 0 0
v 1 0 0
v 1 1 0
v 0 1 0
v 0 0 1
g bus
usemtl whipple
f 1 2 3
g panel
usemtl mli
f 1/1 3/2 4/3
g bus
usemtl bare
f 1//1 2//1 5//1 4//1
o boom
f -1 -2 -3
"""


@pytest.fixture
def sample(tmp_path):
    path = tmp_path / "sample.obj"
    path.write_text(SAMPLE, encoding="utf-8")
    return path


def test_group_tags_in_file_order(sample):
    mesh = load_obj(sample, tags_from="group")
    assert list(mesh.tag_of_faces()) == ["bus", "panel", "bus", "bus", "bus"]
    # The quad is split into two triangles that keep its polygon index.
    assert mesh.original_face_ids.tolist() == [0, 1, 2, 2, 3]
    assert mesh.faces[-1].tolist() == [4, 3, 2]


def test_material_and_object_tags(sample):
    assert list(load_obj(sample, tags_from="material").tag_of_faces()) == [
        "whipple",
        "mli",
        "bare",
        "bare",
        "bare",
    ]
    assert list(load_obj(sample, tags_from="object").tag_of_faces()) == [UNTAGGED] * 4 + ["boom"]


def test_length_unit_scales_to_metres(sample):
    mesh = load_mesh(sample, length_unit="mm")
    assert mesh.bounds[1].max() == pytest.approx(1e-3)


def test_round_trip_against_trimesh(tmp_path):
    """trimesh (an independent reader) sees the same triangles and area as our reader."""
    part = trimesh.creation.icosphere(subdivisions=2)
    path = tmp_path / "ball.obj"
    write_obj(path, part.vertices, part.faces, np.zeros(len(part.faces), int), ("hull",))
    ours = load_obj(path)
    theirs = trimesh.load(path, process=False, force="mesh")
    np.testing.assert_allclose(ours.vertices[ours.faces], theirs.vertices[theirs.faces], rtol=1e-8)
    assert ours.area == pytest.approx(theirs.area, rel=1e-9)


@pytest.mark.parametrize(
    ("content", "error", "words"),
    [
        (b"", MeshError, "empty"),
        (b"v 0 0 0\nv 1 0 0\nv 0 1 0\n", MeshError, "no faces"),
        (b"v 0 0 0\nv 1 0 0\nv 0 1 0\nf 1 2 4\n", MeshError, ":4: face refers to vertex 4"),
        (b"v 0 0 nan\nv 1 0 0\nv 0 1 0\nf 1 2 3\n", MeshError, ":1: vertex has a non-finite"),
        (b"v 0 0\n", MeshError, ":1: vertex needs three numbers"),
        (b"v 0 0 0\nv 1 0 0\nv 0 1 0\nf 1 2\n", MeshError, "at least 3 vertices"),
        (b"v 0 0 0\nv 1 0 0\nv 0 1 0\nf 1 a 3\n", MeshError, "must be integers"),
        (b"g \xff\xfe\nv 0 0 0\n", FormatError, ":1: bytes that are not UTF-8"),
    ],
)
def test_broken_files_give_one_line_errors(tmp_path, content, error, words):
    path = tmp_path / "broken.obj"
    path.write_bytes(content)
    with pytest.raises(error) as caught:
        load_obj(path)
    message = str(caught.value)
    assert words in message and str(path) in message and "\n" not in message


def test_directory_and_missing_file(tmp_path):
    folder = tmp_path / "dir.obj"
    folder.mkdir()
    with pytest.raises(FormatError, match="is a directory"):
        load_mesh(folder)
    with pytest.raises(FormatError, match="no such file"):
        load_mesh(tmp_path / "missing.obj")
    with pytest.raises(FormatError, match="no reader for .dae"):
        load_mesh(tmp_path / "vehicle.dae")


@settings(max_examples=150, deadline=None)
@given(st.binary(max_size=300))
def test_fuzzed_bytes_never_crash(tmp_path_factory, data):
    """Any byte string either loads or raises a PockmarkError, never anything else."""
    path = tmp_path_factory.mktemp("fuzz") / "fuzz.obj"
    path.write_bytes(data)
    try:
        mesh = load_obj(path)
    except PockmarkError:
        return
    assert np.all(np.isfinite(mesh.vertices))


_NUMBER = st.one_of(
    st.floats(allow_nan=True, allow_infinity=True, width=32).map(repr),
    st.text("0123456789-.e", max_size=6),
)
_RECORD = st.one_of(
    st.tuples(st.just("v"), st.lists(_NUMBER, max_size=4)).map(lambda r: "v " + " ".join(r[1])),
    st.lists(st.integers(-6, 8).map(str), max_size=5).map(lambda r: "f " + " ".join(r)),
    st.text(max_size=8).map(lambda name: "g " + name),
    st.text(max_size=12),
)


@settings(max_examples=200, deadline=None)
@given(st.lists(_RECORD, max_size=12))
def test_fuzzed_records_never_crash(tmp_path_factory, records):
    """Near-valid OBJ text: loads with finite, in-range data or raises a PockmarkError."""
    path = tmp_path_factory.mktemp("fuzz") / "fuzz.obj"
    path.write_bytes("\n".join(records).encode("utf-8", errors="replace"))
    try:
        mesh = load_obj(path)
    except PockmarkError:
        return
    assert np.all(np.isfinite(mesh.vertices))
    assert mesh.faces.min() >= 0 and mesh.faces.max() < len(mesh.vertices)
    assert len(mesh.face_tags) == len(mesh.faces) == len(mesh.original_face_ids)


# ---------------------------------------------------------------------------------------
# The vectorised reader against the line-by-line reader it replaced
# ---------------------------------------------------------------------------------------


def _reference_load_obj(path, scale=1.0, tags_from="group"):
    """The previous, line-by-line OBJ reader, kept verbatim as a regression oracle."""
    from pockmark.io.obj import TAG_SOURCES, _read_text

    if tags_from not in TAG_SOURCES:
        raise MeshError(f"tags_from must be one of {', '.join(TAG_SOURCES)}; got {tags_from!r}")
    text = _read_text(path)
    keyword = {"group": "g", "object": "o", "material": "usemtl"}[tags_from]
    vertices, triangles, original_ids, triangle_tags, tag_index = [], [], [], [], {}
    current_tag = UNTAGGED
    polygon = 0
    for number, line in enumerate(text.splitlines(), start=1):
        head, _, rest = line.strip().partition(" ")
        if head == "v":
            parts = rest.split()
            try:
                xyz = [float(p) for p in parts[:3]]
            except ValueError:
                xyz = []
            if len(xyz) != 3:
                raise MeshError(
                    f"{path}:{number}: vertex needs three numbers; got {line.strip()!r}"
                )
            if not all(math.isfinite(x) for x in xyz):
                raise MeshError(
                    f"{path}:{number}: vertex has a non-finite coordinate {line.strip()!r}; fix "
                    "the export"
                )
            vertices.append(xyz)
        elif head == "f":
            try:
                corners = [int(token.split("/", 1)[0]) for token in rest.split()]
            except ValueError:
                raise MeshError(
                    f"{path}:{number}: face indices must be integers; got {line.strip()!r}"
                ) from None
            if len(corners) < 3:
                raise MeshError(
                    f"{path}:{number}: a face needs at least 3 vertices; got {line.strip()!r}"
                )
            count = len(vertices)
            resolved = []
            for corner in corners:
                index = corner - 1 if corner > 0 else count + corner
                if corner == 0 or not 0 <= index < count:
                    raise MeshError(
                        f"{path}:{number}: face refers to vertex {corner} but only {count} "
                        "vertices "
                        "are defined before it; fix the face indices"
                    )
                resolved.append(index)
            code = tag_index.setdefault(current_tag, len(tag_index))
            for k in range(1, len(resolved) - 1):
                triangles.append((resolved[0], resolved[k], resolved[k + 1]))
                original_ids.append(polygon)
                triangle_tags.append(code)
            polygon += 1
        elif head == keyword:
            name = rest.strip()
            current_tag = name if name else UNTAGGED
    if not triangles:
        raise MeshError(f"{path}: no faces ('f' records) found; is this an OBJ mesh?")
    return (
        np.asarray(vertices, dtype=np.float64) * scale,
        np.asarray(triangles, dtype=np.int64),
        np.asarray(triangle_tags, dtype=np.int64),
        tuple(tag_index),
        np.asarray(original_ids, dtype=np.int64),
    )


def _outcome(reader, path, tags_from):
    """Arrays and tags of a load, or the error class and message."""
    try:
        result = reader(path, tags_from=tags_from)
    except PockmarkError as error:
        return type(error).__name__, str(error)
    if not isinstance(result, tuple):
        result = (
            result.vertices,
            result.faces,
            result.face_tags,
            result.tag_names,
            result.original_face_ids,
        )
    return result


def assert_same_as_reference(path, tags_from="group"):
    ours, theirs = (
        _outcome(load_obj, path, tags_from),
        _outcome(_reference_load_obj, path, tags_from),
    )
    assert type(ours[0]) is type(theirs[0]), (ours, theirs)
    if isinstance(ours[0], str):
        assert ours == theirs
        return
    for mine, reference in zip(ours, theirs, strict=True):
        if isinstance(reference, tuple):
            assert mine == reference
        else:
            assert mine.dtype == reference.dtype and mine.shape == reference.shape
            np.testing.assert_array_equal(mine, reference)


@pytest.mark.parametrize("tags_from", ["group", "object", "material"])
def test_vectorised_reader_matches_reference_on_sample(sample, tags_from):
    assert_same_as_reference(sample, tags_from)


def test_vectorised_reader_matches_reference_on_mixed_polygons(tmp_path):
    """Quads, pentagons, hexagons, negative and v/vt/vn indices, CRLF, tabs and comments."""
    rng = np.random.default_rng(SEED)
    lines = ["# generated", "mtllib parts.mtl"]
    count = 0
    for block in range(40):
        for _ in range(rng.integers(3, 9)):
            x, y, z = rng.normal(size=3).tolist()
            lines.append(f"v {x:.17g}\t{y:.6e}  {z!r}" if block % 2 else f"v {x} {y} {z} 1.0")
            count += 1
        lines.append(
            rng.choice(["g bus", "g panel", "o boom", "usemtl mli", "g  radiator wing ", "s off"])
        )
        for _ in range(rng.integers(1, 6)):
            corners = rng.integers(1, count + 1, size=rng.choice([3, 4, 5, 6]))
            tokens = []
            for corner in corners:
                index = corner if rng.random() < 0.5 else corner - count - 1
                tokens.append(f"{index}{rng.choice(['', '/1', '//2', '/1/2'])}")
            lines.append("f " + " ".join(tokens))
    path = tmp_path / "mixed.obj"
    path.write_bytes("\r\n".join(lines).encode("utf-8"))
    for tags_from in ("group", "object", "material"):
        assert_same_as_reference(path, tags_from)
    mesh = load_obj(path)
    assert {4, 5, 6} & set(np.bincount(mesh.original_face_ids) + 2)


@pytest.mark.parametrize(
    "content",
    [
        "v 1_0 0 0\nv 1 0 0\nv 0 1 0\nf 1 2 3\n",  # Python float() accepts underscores
        "v 0 0 0\nv 1 0 0\nv 0 1 0\nf \u0661 2 3\n",  # and int() non-ASCII digits
        "v 0 0 0\nv 1 0 0\nv 0 1 0\nf 1 2 99999999999999999999999\n",
        "v 0 0 0\nv 1 0 nan(1)\nv 0 1 0\nf 1 2 3\n",
        "v 0 0 0\u00a0\nv 1 0 0\nv\t0 1 0\nv 0 1 0\nf 1 2 4\ng\u2003x\u2003y \nf 1 2 4\n",
        "v 0 0 0\rv 1 0 0\rv 0 1 0\rf 1 2 3\x0cf 3 2 1\n",
        "v 0 0 0\nv 1 0 0\nv 0 1 0\nf 1/ 2/x 3//\nf /1 2 3\n",
        "v 0 0 0\nv 1 0 0\nv 0 1 0\nv 1 1 x\nf 1 2 5\n",
        "v 0 0 0 junk\nv 1 0 0\nv 0 1 0\nf 1 2 -3\nf -1 -2 -4\n",
    ],
)
def test_vectorised_reader_matches_reference_on_odd_records(tmp_path, content):
    path = tmp_path / "odd.obj"
    path.write_bytes(content.encode("utf-8"))
    for tags_from in ("group", "object"):
        assert_same_as_reference(path, tags_from)


@st.composite
def _obj_texts(draw):
    """Mostly valid OBJ text with odd spacing, line ends, indices and names mixed in."""
    blank = st.sampled_from([" "] * 8 + ["  ", "\t", " \t", "\u00a0", "\x1f"])
    number = st.one_of(
        st.floats(-1e3, 1e3).map(repr),
        st.integers(-5, 5).map(str),
        st.sampled_from(["1e2", "+.5", "-0.", "1_0"] * 20 + ["nan", "inf", "x", ""]),
    )
    lines, count = [], 0
    for _ in range(draw(st.integers(1, 20))):
        kind = draw(st.sampled_from(["v", "v", "f", "f", "tag", "other"]))
        if kind == "v":
            size = draw(st.sampled_from([3] * 20 + [2, 4, 6]))
            lines.append("v" + "".join(draw(blank) + draw(number) for _ in range(size)))
            count += 1
        elif kind == "f" and count:
            tokens = []
            for _ in range(draw(st.sampled_from([3] * 10 + [4, 4, 5, 7, 2]))):
                index = draw(st.integers(1, count + draw(st.sampled_from([0] * 50 + [1]))))
                index = index if draw(st.booleans()) else index - count - 1
                tokens.append(f"{index}{draw(st.sampled_from(['', '', '/1', '//3', '/2/3', '/']))}")
            lines.append(
                draw(st.sampled_from(["", " ", "\t"]))
                + "f"
                + "".join(draw(blank) + t for t in tokens)
            )
        elif kind == "tag":
            name = draw(
                st.sampled_from(["", "bus", "a b", " x ", "\u00e9", UNTAGGED, "p\tq", "t\u2003z"])
            )
            lines.append(
                draw(st.sampled_from(["g", "o", "usemtl"]))
                + draw(st.sampled_from([" ", "\t"]))
                + name
            )
        else:
            lines.append(
                draw(st.sampled_from(["# c", "", "vt 0 1", "vn 0 0 1", "v\t1 2 3", "f\t1 2 3"]))
            )
    ends = st.sampled_from(["\n"] * 30 + ["\r\n"] * 5 + ["\r", "\x0c", "\u2028"])
    return "".join(line + draw(ends) for line in lines)


@settings(max_examples=250, deadline=None)
@given(_obj_texts(), st.sampled_from(["group", "object", "material"]))
def test_vectorised_reader_matches_reference_fuzzed(tmp_path_factory, text, tags_from):
    """Same arrays, tags or error message as the line-by-line reader on near-valid files."""
    path = tmp_path_factory.mktemp("same") / "fuzz.obj"
    path.write_bytes(text.encode("utf-8"))
    assert_same_as_reference(path, tags_from)
