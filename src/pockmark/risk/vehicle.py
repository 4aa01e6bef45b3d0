"""The vehicle a case describes: its mesh with panels, thin sheets and re-tags, and components."""

import logging
from dataclasses import dataclass

import numpy as np

from pockmark.errors import ConfigError, InputError
from pockmark.geometry.assembly import concatenate, retag, select_faces, with_back_sides
from pockmark import io as mesh_io
from pockmark.io.results import read_run

logger = logging.getLogger(__name__)


@dataclass(frozen=True)
class Vehicle:
    """The assembled mesh, its components and the hashes that identify it."""

    mesh: object
    components: tuple  # pockmark.io.config.Component
    face_components: np.ndarray  # (m,) index into components
    base_geometry_hash: str  # of the vehicle mesh file's geometry alone
    assembled_geometry_hash: str  # after panels and back sides, before re-tagging

    def component_of_tag(self):
        """(n_tags,) component index of each tag of the mesh."""
        lookup = np.full(len(self.mesh.tag_names), -1, dtype=np.int64)
        lookup[self.mesh.face_tags] = self.face_components
        return lookup


def build_vehicle(case):
    """Load and assemble the vehicle of ``case``.

    Order: the vehicle mesh (one file or one per tag), its side-car tags, the added panels,
    the back sides of thin sheets, then each ``[[retag]]`` in turn.
    """
    if len(case.mesh_paths) == 1:
        mesh = mesh_io.load_mesh(case.mesh_paths[0], case.length_unit, case.tags_from)
    else:
        mesh = mesh_io.load_mesh_list(case.mesh_paths, case.length_unit)
    if case.tags_file is not None:
        from pockmark.io.sidecar import apply_sidecar

        mesh = apply_sidecar(mesh, case.tags_file)
    base_hash = mesh.geometry_hash()
    if case.panels:
        panels = []
        for panel in case.panels:
            part = mesh_io.load_mesh(panel.path, panel.length_unit, panel.tags_from)
            if panel.tag is not None:
                part = retag(part, np.ones(part.n_faces, dtype=bool), panel.tag)
            panels.append(part)
        mesh = concatenate([mesh, *panels], source=mesh.source)
    mesh = with_back_sides(mesh, case.thin)
    assembled_hash = mesh.geometry_hash()
    for rule in case.retags:
        mesh = retag(mesh, _selection(case, rule, mesh, assembled_hash), rule.tag)
    components, tag_component = case.component_of_tags(mesh.tag_names)
    return Vehicle(
        mesh=mesh,
        components=components,
        face_components=np.asarray(tag_component, dtype=np.int64)[mesh.face_tags],
        base_geometry_hash=base_hash,
        assembled_geometry_hash=assembled_hash,
    )


def _selection(case, rule, mesh, assembled_hash):
    where = case.where("retag", rule.index)
    tags = set(rule.tags or ())
    if rule.components is not None:
        components, tag_component = case.component_of_tags(mesh.tag_names)
        names = [c.name for c in components]
        unknown = [c for c in rule.components if c not in names]
        if unknown:
            raise ConfigError(f"{where}: unknown component {unknown[0]!r}; components are: {', '.join(names)}")
        wanted = {names.index(c) for c in rule.components}
        component_tags = {tag for tag, c in zip(mesh.tag_names, tag_component) if c in wanted}
        tags = component_tags if rule.tags is None else tags & component_tags
    if rule.tags is not None:
        unknown = sorted(set(rule.tags) - set(mesh.tag_names))
        if unknown:
            raise ConfigError(f"{where}: no face has tag {unknown[0]!r}; tags are: {', '.join(mesh.tag_names)}")
    faces = rule.faces
    if rule.highest_risk_run is not None:
        summary, columns = read_run(rule.highest_risk_run, ["face", "expected_penetrations", "critical"])
        earlier = summary.get("inputs", {}).get("mesh", {}).get("assembled_geometry_sha256")
        if earlier != assembled_hash:
            raise ConfigError(
                f"{where}: the run in {rule.highest_risk_run} was made on a different mesh "
                "(geometry hash differs); rerun it on this vehicle or select faces another way"
            )
        risk = columns["expected_penetrations"] * columns["critical"]
        order = np.argsort(-risk, kind="stable")[: rule.highest_risk_count]
        ranked = columns["face"][order].astype(np.int64)
        faces = ranked if faces is None else np.intersect1d(ranked, faces)
    try:
        selected = select_faces(
            mesh,
            tags=tags if (rule.tags is not None or rule.components is not None) else None,
            box=rule.box,
            faces=faces,
        )
    except InputError as error:
        raise ConfigError(f"{where}: {error}") from None
    if not selected.any():
        raise ConfigError(f"{where}: the selection matches no face; check the criteria")
    logger.info("retag %d: %d faces -> %r", rule.index, int(selected.sum()), rule.tag)
    return selected
