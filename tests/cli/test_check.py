"""`pockmark check`: exit codes, face indices in the output, --json, --repair and its refusals."""

import json

import numpy as np
import trimesh
from click.testing import CliRunner
from tests.conftest import box, make_case_text, write_parts

from pockmark.cli.main import cli
from pockmark.io import load_mesh
from pockmark.io.obj import write_obj


def run(*args):
    return CliRunner().invoke(cli, ["check", *[str(a) for a in args]], catch_exceptions=False)


def _broken_obj(path):
    """A box (tag hull) with face 3 flipped and face 7 repeated as face 12."""
    part = trimesh.creation.box(extents=[1.0, 1.0, 1.0])
    faces = part.faces.copy()
    faces[3] = faces[3, ::-1]
    faces = np.vstack([faces, faces[7]])
    write_obj(path, part.vertices, faces, np.zeros(len(faces), dtype=np.int64), ["hull"])
    return path


def test_clean_mesh_exits_0(tmp_path):
    mesh = write_parts(tmp_path / "clean.obj", [("hull", box([1, 1, 1], [0, 0, 0]))])
    result = run(mesh)
    assert result.exit_code == 0, result.output
    assert "0 errors, 0 warnings" in result.output and "12 faces" in result.output


def test_broken_mesh_exits_1_and_names_the_faces(tmp_path):
    result = run(_broken_obj(tmp_path / "broken.obj"))
    assert result.exit_code == 1
    assert "ERROR   inconsistent_winding (3)\n        faces: 3\n" in result.output
    assert "ERROR   duplicate_faces (1)\n        faces: 12\n" in result.output
    assert "face 12 duplicates face 7" in result.output and "fix: " in result.output
    assert "2 errors, 0 warnings" in result.output


def test_long_face_lists_are_cut_with_a_count(tmp_path):
    sphere = trimesh.creation.icosphere(subdivisions=1)
    path = tmp_path / "inverted.obj"
    write_obj(path, sphere.vertices, sphere.faces[:, ::-1], np.zeros(80, dtype=np.int64), ["hull"])
    result = run(path)
    assert result.exit_code == 1
    assert "faces: 0, 1, 2, 3, 4, 5, 6, 7, 8, 9 … and 70 more" in result.output


def test_verbose_lists_each_face_with_its_tag_and_record(tmp_path):
    result = run(_broken_obj(tmp_path / "broken.obj"), "-v")
    assert "face 12: tag 'hull', broken.obj face 12 of the file (from 0)" in result.output


def test_json_parses_and_holds_every_face(tmp_path):
    result = run(_broken_obj(tmp_path / "broken.obj"), "--json")
    assert result.exit_code == 1
    document = json.loads(result.stdout)
    assert document["errors"] == 2 and document["faces"] == 13
    by_check = {f["check"]: f for f in document["findings"]}
    assert by_check["inconsistent_winding"]["faces"] == [3]
    assert by_check["duplicate_faces"]["faces"] == [12]
    assert set(by_check["summary"]) == {"check", "severity", "count", "faces", "message", "hint"}


def test_wrong_unit_is_reported_and_the_right_one_is_quiet(tmp_path):
    mesh = write_parts(tmp_path / "bus_mm.obj", [("hull", box([2000, 1000, 1000], [0, 0, 0]))])
    result = run(mesh)
    assert (
        result.exit_code == 0
        and "implausible_size" in result.output
        and "--length-unit mm" in result.output
    )
    assert "implausible_size" not in run(mesh, "--length-unit", "mm").output


def test_repair_writes_a_new_file_that_checks_clean(tmp_path):
    source = _broken_obj(tmp_path / "broken.obj")
    before = source.read_bytes()
    out = tmp_path / "fixed.obj"
    result = run(source, "--repair", out)
    assert result.exit_code == 0, result.output
    assert "flipped 1 face" in result.output and "removed 1 duplicate face" in result.output
    assert f"check of {out}" in result.output and result.output.rstrip().endswith(
        "0 errors, 0 warnings"
    )
    assert source.read_bytes() == before
    fixed = load_mesh(out)
    reference = trimesh.Trimesh(fixed.vertices, fixed.faces, process=False)
    assert fixed.n_faces == 12 and reference.is_winding_consistent and reference.volume > 0
    assert not list(tmp_path.glob(".*.tmp"))  # the temporary file was renamed


def test_repair_keeps_the_length_unit_of_the_input(tmp_path):
    source = write_parts(tmp_path / "bus_mm.obj", [("hull", box([2000, 1000, 1000], [0, 0, 0]))])
    out = tmp_path / "fixed.obj"
    assert run(source, "--length-unit", "mm", "--repair", out).exit_code == 0
    np.testing.assert_allclose(np.ptp(load_mesh(out, "mm").vertices, axis=0), [2, 1, 1])


def test_repair_refuses_to_overwrite_the_input(tmp_path):
    source = _broken_obj(tmp_path / "broken.obj")
    before = source.read_bytes()
    result = run(source, "--repair", source, "--overwrite")
    assert result.exit_code == 1
    assert (
        "is an input of this check" in result.output
        and len(result.output.strip().splitlines()) == 1
    )
    assert source.read_bytes() == before


def test_repair_refuses_an_existing_file_without_overwrite(tmp_path):
    source = _broken_obj(tmp_path / "broken.obj")
    out = tmp_path / "fixed.obj"
    out.write_text("keep me\n")
    result = run(source, "--repair", out)
    assert result.exit_code == 1 and "--overwrite" in result.output
    assert out.read_text() == "keep me\n"
    assert run(source, "--repair", out, "--overwrite").exit_code == 0
    assert load_mesh(out).n_faces == 12


def test_repair_needs_an_obj_name(tmp_path):
    result = run(_broken_obj(tmp_path / "broken.obj"), "--repair", tmp_path / "fixed.stl")
    assert result.exit_code == 2 and "--repair" in result.output


def test_unreadable_input_is_one_line_and_exit_1(tmp_path):
    result = run(tmp_path / "missing.obj")
    assert result.exit_code == 1
    assert (
        result.output.strip()
        == f"Error: {tmp_path / 'missing.obj'}: no such file; check the mesh path in the case file"
    )


def test_unknown_length_unit_names_the_flag_and_the_choices(tmp_path):
    result = run(_broken_obj(tmp_path / "broken.obj"), "--length-unit", "furlong")
    assert (
        result.exit_code == 2
        and "--length-unit" in result.output
        and "mm, cm, m, in, ft" in result.output
    )


def test_help_lists_every_length_unit_and_the_exit_status():
    from pockmark.geometry.units import LENGTH_UNITS

    result = CliRunner().invoke(cli, ["check", "--help"])
    assert result.exit_code == 0
    for unit in LENGTH_UNITS:
        assert f" {unit}" in result.output
    assert (
        "Exit status: 0 if no finding is an error, 1 if one is" in result.output
        and "Examples:" in result.output
    )


def test_case_checks_the_assembled_vehicle_and_its_shields(shadowed_box_case):
    result = run(shadowed_box_case)
    assert result.exit_code == 0, result.output
    assert "24 faces" in result.output and "0 errors, 0 warnings" in result.output


def test_case_with_a_misnamed_shield(shadowed_box_case):
    text = shadowed_box_case.read_text().replace("[shields.panel]", "[shields.plate]")
    shadowed_box_case.write_text(text)
    result = run(shadowed_box_case, "--json")
    assert result.exit_code == 1
    by_check = {f["check"]: f for f in json.loads(result.stdout)["findings"]}
    assert by_check["tags_without_shield"]["faces"] == list(range(12, 24))
    assert "'panel' (12 faces)" in by_check["tags_without_shield"]["message"]
    assert "'plate'" in by_check["unused_shields"]["message"]


def test_case_thin_sheet_is_open_and_its_back_side_is_not_a_duplicate(tmp_path):
    wing = trimesh.Trimesh(
        [[1, -0.5, 0], [3, -0.5, 0], [3, 0.5, 0], [1, 0.5, 0]], [[0, 1, 2], [0, 2, 3]]
    )
    write_parts(tmp_path / "vehicle.obj", [("hull", box([1, 1, 1], [0, 0, 0])), ("panel", wing)])
    case = tmp_path / "case.toml"
    case.write_text(
        make_case_text(**{"[[phases]]": '[thin.panel]\nback_tag = "panel"\n\n[[phases]]'}).format(
            mesh="vehicle.obj"
        )
    )
    result = run(case, "--json")
    assert result.exit_code == 0, result.output
    document = json.loads(result.stdout)
    assert document["faces"] == 16 and document["errors"] == document["warnings"] == 0
    # Declared closed, the same sheet is an open boundary.
    flat = tmp_path / "flat.obj"
    write_parts(flat, [("hull", box([1, 1, 1], [0, 0, 0])), ("panel", wing)])
    result = run(flat)
    assert result.exit_code == 1 and "open_boundary (4)\n        faces: 12, 13\n" in result.output


def test_case_repair_refuses_an_input_of_the_case(shadowed_box_case):
    mesh = shadowed_box_case.parent / "vehicle.obj"
    before = mesh.read_bytes()
    result = run(shadowed_box_case, "--repair", mesh, "--overwrite")
    assert result.exit_code == 1 and "is an input of this check" in result.output
    assert mesh.read_bytes() == before


def test_case_repair_writes_the_assembled_front_faces(tmp_path):
    inverted = box([1, 1, 1], [0, 0, 0])
    inverted.invert()
    write_parts(
        tmp_path / "vehicle.obj",
        [("hull", inverted), ("panel", box([0.02, 0.6, 0.6], [0.8, 0, 0]))],
    )
    case = tmp_path / "case.toml"
    case.write_text(make_case_text().format(mesh="vehicle.obj"))
    out = tmp_path / "fixed.obj"
    result = run(case, "--repair", out)
    assert result.exit_code == 0, result.output
    assert (
        "inward_normals (1)" in result.output
        and "turned 1 closed part outside out" in result.output
    )
    assert trimesh.Trimesh(*_arrays(load_mesh(out)), process=False).volume > 0


def test_length_unit_is_refused_with_a_case(shadowed_box_case):
    result = run(shadowed_box_case, "--length-unit", "mm")
    assert (
        result.exit_code == 2 and "--length-unit" in result.output and "[vehicle]" in result.output
    )


def _arrays(mesh):
    return mesh.vertices, mesh.faces


def test_case_panel_lying_on_the_hull_is_a_warning_named_by_file(tmp_path):
    write_parts(tmp_path / "vehicle.obj", [("hull", box([1, 1, 1], [0, 0, 0]))])
    write_parts(tmp_path / "doubler.obj", [("panel", box([0.02, 0.6, 0.6], [0.51, 0, 0]))])
    case = tmp_path / "case.toml"
    panels = '[[panels]]\nmesh = "doubler.obj"\n\n[[phases]]'
    case.write_text(make_case_text(**{"[[phases]]": panels}).format(mesh="vehicle.obj"))
    result = run(case, "-v")
    assert result.exit_code == 0, result.output
    assert "WARNING coincident_overlap (4)" in result.output
    assert "tag 'panel', doubler.obj face 2 of the file (from 0)" in result.output
    assert "tag 'hull', vehicle.obj face" in result.output
