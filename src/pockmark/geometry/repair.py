"""Safe repairs of a tagged triangle mesh: duplicate faces, winding, inside-out closed parts.

:func:`repair` fixes the problems of :func:`pockmark.geometry.health.check_mesh` that have
one right answer: it removes later copies of duplicate faces, flips faces wound opposite to
the rest of their part, and turns closed parts with negative signed volume outside out.
It never deletes any other face and never moves a vertex; holes, non-manifold edges,
degenerate faces, overlapping parts and wrong units need a decision, so they are only
reported by the check.
"""

import logging

import numpy as np

from pockmark.geometry.health import (
    _analyse,
    _as_closed_mask,
    _inside_out_parts,
    _list_faces,
    _plural,
)
from pockmark.geometry.mesh import Mesh

logger = logging.getLogger(__name__)


def _flipped(faces, mask):
    """Copy of ``faces`` with the corners of the faces in ``mask`` in reverse order."""
    faces = faces.copy()
    faces[mask] = faces[mask][:, [0, 2, 1]]
    return faces


def repair(mesh, closed=None):
    """Fix duplicate faces, inconsistent winding and inside-out closed parts.

    Steps, on the analysis of :func:`~pockmark.geometry.health.check_mesh` (coincident
    vertex positions merged):

    1. within each part joined by manifold edges, flip the faces wound opposite to the
       majority (orientation propagated breadth-first over the shared edges);
    2. flip every closed part whose signed volume is then negative;
    3. remove every later copy of a duplicate face, keeping the first.

    Back sides of thin sheets (``face_sides == 1``) are left as they are; repair a mesh
    before its back sides are added.

    Parameters
    ----------
    mesh : Mesh
    closed : (m,) bool, optional
        Faces of parts declared closed; only these parts are turned outside out. Default:
        every face.

    Returns
    -------
    repaired : Mesh
        Same vertices and tag names; faces, ``face_tags``, ``original_face_ids``,
        ``face_origins`` and ``face_sides`` with the duplicates left out, in step.
    changes : list of str
        One line per kind of change made, naming the faces by their index in ``mesh``;
        empty if nothing was changed.

    Raises
    ------
    InputError
        If ``closed`` is not a boolean mask with one entry per face.
    """
    closed = _as_closed_mask(closed, mesh.n_faces)
    analysis = _analyse(mesh, closed)
    changes = []

    flip = analysis.flip.copy()
    if flip.any():
        faces = np.flatnonzero(flip)
        changes.append(
            f"flipped {_plural(len(faces), 'face')} wound opposite to the rest of their part: "
            f"faces {_list_faces(faces, 10)}"
        )
    if analysis.conflicts.any():
        logger.warning(
            "%s: %s still inconsistent after the repair: their parts cannot be oriented "
            "(Möbius-like); fix them in the CAD model",
            mesh.source,
            _plural(int(analysis.conflicts.sum()), "edge"),
        )

    inside_out, volume = _inside_out_parts(analysis, flip)
    if len(inside_out):
        turned = analysis.in_closed[np.isin(analysis.closed_labels, inside_out)]
        flip[turned] ^= True
        changes.append(
            f"turned {_plural(len(inside_out), 'closed part')} outside out (signed volume "
            f"{', '.join(f'{v:.4g}' for v in volume[inside_out][:5])} m³): "
            f"{_plural(len(turned), 'face')}, {_list_faces(turned, 10)}"
        )

    keep = ~analysis.duplicate
    if not keep.all():
        removed = np.flatnonzero(~keep)
        changes.append(
            f"removed {_plural(len(removed), 'duplicate face')}, keeping the first copy of each: "
            f"faces {_list_faces(removed, 10)}"
        )
        n_reversed = int(analysis.reversed_copy.sum())
        if n_reversed:
            logger.warning(
                "%s: %s removed had reversed winding; if one was the back of a two-sided sheet, "
                "declare the sheet in the case file ([thin.TAG]) so that its back stays exposed",
                mesh.source,
                _plural(n_reversed, "duplicate"),
            )

    if not changes:
        return mesh, changes
    faces = _flipped(mesh.faces, flip)
    repaired = Mesh(
        vertices=mesh.vertices,
        faces=faces[keep],
        face_tags=mesh.face_tags[keep],
        tag_names=mesh.tag_names,
        original_face_ids=mesh.original_face_ids[keep],
        source=mesh.source,
        face_origins=mesh.face_origins[keep],
        face_sides=mesh.face_sides[keep],
    )
    for change in changes:
        logger.info("%s: %s", mesh.source, change)
    return repaired, changes
