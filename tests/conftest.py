"""Shared fixtures: tiny tagged meshes written as OBJ and case files around them."""

import textwrap

import numpy as np
import pytest
import trimesh

from pockmark.io.obj import write_obj

SEED = 20261201


@pytest.fixture(autouse=True)
def _private_environment_cache(tmp_path_factory, monkeypatch):
    """Keep the on-disk environment cache of the tests out of the user's home."""
    monkeypatch.setenv("POCKMARK_CACHE_DIR", str(tmp_path_factory.getbasetemp() / "environment-cache"))


def write_parts(path, parts):
    """Write ``[(tag, trimesh.Trimesh), ...]`` as one OBJ with a group per part."""
    tag_names = sorted({tag for tag, _ in parts})
    vertices, faces, tags, offset = [], [], [], 0
    for tag, part in parts:
        vertices.append(part.vertices)
        faces.append(part.faces + offset)
        tags.append(np.full(len(part.faces), tag_names.index(tag)))
        offset += len(part.vertices)
    write_obj(path, np.vstack(vertices), np.vstack(faces), np.concatenate(tags), tag_names)
    return path


def box(extents, centre):
    part = trimesh.creation.box(extents=extents)
    part.apply_translation(centre)
    return part


CASE_TEMPLATE = """\
title = "test case"

[vehicle]
mesh = "{mesh}"
length_unit = "m"

[shields.hull]
equation = "christiansen_1993"
bumper_thickness = 0.1
bumper_material = "Al6061-T6"
standoff = 10.0
rear_wall_thickness = 0.3
rear_wall_material = "Al2219-T87"

[shields.panel]
equation = "cour_palais_1987"
wall_thickness = 0.1
wall_material = "Al6061-T6"
failure = "perforation"

[[phases]]
name = "low orbit"
altitude = 400.0
inclination = 51.6
start = 2030-01-01
duration = 2.0
flight_axis = "+x"
nadir_axis = "-z"

[environment.debris]
solar_flux = 100.0

[environment.meteoroid]
projectile_density = 1.0

[analysis]
directions = 200
debris_azimuth_bins = 36
samples_per_face = 1
seed = 3
"""


@pytest.fixture
def shadowed_box_case(tmp_path):
    """A box hull with a plate standing off its ram face, which shadows part of it."""
    mesh = write_parts(
        tmp_path / "vehicle.obj",
        [("hull", box([1.0, 1.0, 1.0], [0, 0, 0])), ("panel", box([0.02, 0.6, 0.6], [0.8, 0, 0]))],
    )
    case = tmp_path / "case.toml"
    case.write_text(CASE_TEMPLATE.format(mesh=mesh.name), encoding="utf-8")
    return case


def make_case_text(**replacements):
    """The template case with some lines replaced: ``{old_line: new_line}``."""
    text = CASE_TEMPLATE
    for old, new in replacements.items():
        text = text.replace(old, new)
    return textwrap.dedent(text)
