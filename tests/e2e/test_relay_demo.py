"""The third demo, models/relay_sat/: its mesh is what the builder makes, and it runs (slow)."""

import importlib.util
import json
import tomllib
from pathlib import Path

import numpy as np
import pytest
from click.testing import CliRunner

from pockmark.cli.main import cli
from pockmark.io.obj import load_obj

pytestmark = pytest.mark.e2e

ROOT = Path(__file__).resolve().parents[2]
CASE = ROOT / "models/relay_sat/case.toml"
MESH = ROOT / "models/relay_sat/relay_sat.obj"


def run(*args):
    return CliRunner().invoke(cli, [str(a) for a in args], catch_exceptions=False)


def _builder():
    spec = importlib.util.spec_from_file_location(
        "build_demo_relay", ROOT / "scripts/build_demo_relay.py"
    )
    module = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(module)
    return module


def test_committed_mesh_is_what_the_builder_makes(tmp_path):
    """Rebuild the OBJ with scripts/build_demo_relay.py and compare it with the committed one."""
    rebuilt = tmp_path / "relay_sat.obj"
    _builder().write(rebuilt)
    committed, fresh = load_obj(MESH), load_obj(rebuilt)
    assert len(fresh.faces) == len(committed.faces)
    assert list(fresh.tag_names) == list(committed.tag_names)
    np.testing.assert_array_equal(fresh.face_tags, committed.face_tags)
    np.testing.assert_array_equal(fresh.faces, committed.faces)
    np.testing.assert_allclose(fresh.vertices, committed.vertices, rtol=0, atol=1e-6)


@pytest.mark.slow
def test_relay_demo_end_to_end(tmp_path):
    """The relay demo checks clean, runs, and gives plausible numbers for every shield."""
    checked = run("check", CASE)
    assert checked.exit_code == 0, checked.output
    assert "0 errors" in checked.output

    out = tmp_path / "relay"
    result = run("run", CASE, "--out", out, "-q")
    assert result.exit_code == 0, result.output
    summary = json.loads((out / "summary.json").read_text())
    # Plausibility only (common practice, no source).
    assert 0 < summary["pnp"] < 1
    shields = tomllib.loads(CASE.read_text(encoding="utf-8"))["shields"]
    assert set(shields) <= set(summary["by_tag"])
    assert summary["checks"]["passed"]
