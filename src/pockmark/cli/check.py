"""``pockmark check``: say what is wrong with a mesh, on which faces, and repair what is safe."""

import logging
import sys
from pathlib import Path

import click

logger = logging.getLogger("pockmark.cli.check")

#: Face indices shown per finding in the text output (all of them are in --json).
_SHOWN_FACES = 10


def _length_unit(ctx, param, value):
    """Validate --length-unit against the library's table of units, importing it lazily."""
    if value is None:
        return None
    from pockmark.errors import InputError
    from pockmark.geometry.units import to_metres

    try:
        to_metres(value)
    except InputError as error:
        raise click.BadParameter(str(error), ctx=ctx, param=param) from None
    return value


@click.command()
@click.argument("source", metavar="MESH_OR_CASE", type=click.Path(path_type=Path))
@click.option(
    "--length-unit",
    default=None,
    callback=_length_unit,
    metavar="UNIT",
    help="Unit of a mesh file's coordinates: mm, cm, m, in or ft [default: m]. A case file "
    "declares its own ([vehicle] length_unit).",
)
@click.option(
    "--tags-from",
    default=None,
    metavar="SOURCE",
    help="Where a mesh file's shield tags come from; it depends on the format (OBJ: group, "
    "object or material; glTF: mesh, material or node; PLY: a face property) "
    "[default: group]. A case file declares its own ([vehicle] tags_from).",
)
@click.option(
    "--repair",
    "repair_path",
    type=click.Path(path_type=Path, dir_okay=False),
    default=None,
    metavar="OUT.obj",
    help="Write a repaired copy to OUT.obj (duplicates removed, winding made consistent, "
    "inside-out closed parts turned), in the input's length unit, then check it again.",
)
@click.option("--overwrite", is_flag=True, help="Let --repair replace an existing OUT.obj.")
@click.option("--json", "as_json", is_flag=True, help="Print the findings as JSON on stdout.")
@click.option(
    "-v", "--verbose", count=True, help="More detail: one line per listed face, logs on stderr."
)
@click.option("-q", "--quiet", count=True, help="Less output: errors and warnings only.")
def check(source, length_unit, tags_from, repair_path, overwrite, as_json, verbose, quiet):
    """Check the mesh of MESH_OR_CASE and say what is wrong, on which faces, and how to fix it.

    MESH_OR_CASE is a mesh file (.obj, .stl, .ply, .gltf, .glb), whose every part should
    be a closed surface, or a
    case file (.toml): its vehicle is assembled as `pockmark run` would (panels, back sides
    of thin sheets, re-tags) and parts are expected to be closed unless their component says
    `closed = false` or their tag is a [thin.*] sheet. Face numbers are those of the
    assembled mesh, the `face` column of a run's faces.csv.

    Checks: degenerate and duplicate faces, non-manifold edges, open boundaries of closed
    parts, inconsistent winding, inside-out closed parts, coplanar overlapping parts, a size
    implausible for the length unit; and the shield tags: untagged faces, tags without a
    shield, shields no face uses (case files).

    Exit status: 0 if no finding is an error, 1 if one is (with --repair: if the repaired
    mesh still has an error) or if the input cannot be read; 2 for a bad option.

    With a case file, --repair writes the assembled vehicle (panels included, back sides of
    thin sheets left out, tags after re-tagging); point [vehicle] mesh at it and drop the
    [[panels]], tags_file and faces-based [[retag]] entries it already contains.

    \b
    Examples:
      pockmark check models/imager_sat/case.toml
      pockmark check vehicle.obj --length-unit mm
      pockmark check vehicle.obj --repair vehicle_fixed.obj
      pockmark check case.toml --json > findings.json
    """
    from pockmark.cli._helpers import configure_logging
    from pockmark.errors import PockmarkError

    configure_logging(verbose - quiet)
    is_case = source.suffix.lower() == ".toml"
    if is_case:
        for flag, value in (("--length-unit", length_unit), ("--tags-from", tags_from)):
            if value is not None:
                raise click.BadParameter(
                    f"{flag} applies to a mesh file; "
                    f"the case file {source} declares it in [vehicle]",
                    param_hint=flag,
                )
    try:
        report = _check(
            source, is_case, length_unit or "m", tags_from or "group", repair_path, overwrite
        )
    except PockmarkError as error:
        if verbose >= 2:
            raise
        raise click.ClickException(str(error)) from None

    if as_json:
        import json

        click.echo(json.dumps(_as_json(report), indent=2, ensure_ascii=False))
    else:
        click.echo(_as_text(report, verbose, quiet))
    sys.stdout.flush()
    final = report["after_repair"] if report["after_repair"] is not None else report["findings"]
    if any(f.severity == "error" for f in final):
        click.get_current_context().exit(1)


def _closed_mask(case, mesh):
    """Faces of components declared closed, leaving out thin-sheet tags and their back tags."""
    import numpy as np

    components, tag_component = case.component_of_tags(mesh.tag_names)
    thin = case.thin or {}
    thin_tags = set(thin) | set(thin.values())
    closed_of_tag = np.array(
        [
            components[c].closed and name not in thin_tags
            for name, c in zip(mesh.tag_names, tag_component, strict=True)
        ],
        dtype=bool,
    )
    return closed_of_tag[mesh.face_tags]


def _check_output_path(out, inputs, overwrite):
    """Refuse an output that is an input or that exists without --overwrite (before any work)."""
    if out.suffix.lower() != ".obj":
        raise click.BadParameter(
            f"{out} must be an .obj file; --repair writes OBJ", param_hint="--repair"
        )
    resolved = out.resolve()
    for path in inputs:
        if Path(path).resolve() == resolved:
            raise click.ClickException(f"--repair {out} is an input of this check; name a new file")
    if out.exists() and not overwrite:
        raise click.ClickException(
            f"{out} exists; it won't be overwritten without use of the --overwrite option"
        )
    if not resolved.parent.is_dir():
        raise click.ClickException(
            f"--repair {out}: folder {resolved.parent} does not exist; create it first"
        )


def _check(source, is_case, length_unit, tags_from, repair_path, overwrite):
    from pockmark.geometry.health import check_mesh, check_tags
    from pockmark.io import UNTAGGED

    if is_case:
        from pockmark.io.config import load_case
        from pockmark.risk.vehicle import build_vehicle

        case = load_case(source)
        if repair_path is not None:
            _check_output_path(repair_path, case.input_files, overwrite)
        mesh = build_vehicle(case).mesh
        closed, unit = _closed_mask(case, mesh), case.length_unit
    else:
        from pockmark.io import load_mesh

        if repair_path is not None:
            _check_output_path(repair_path, [source], overwrite)
        case, closed, unit = None, None, length_unit
        mesh = load_mesh(source, length_unit, tags_from)
    shields = case.shields if case is not None else None

    def run_checks(target, target_closed):
        return check_mesh(target, target_closed, unit) + check_tags(
            target, shields, untagged=UNTAGGED
        )

    report = {
        "source": source,
        "mesh": mesh,
        "case": case,
        "findings": run_checks(mesh, closed),
        "repair": None,
        "after_repair": None,
        "repaired_mesh": None,
    }
    if repair_path is not None:
        changes, repaired = _repair(mesh, closed, case, unit, repair_path, source)
        report["repair"] = {"output": repair_path, "changes": changes}
        report["repaired_mesh"] = repaired
        report["after_repair"] = run_checks(
            repaired, None if case is None else _closed_mask(case, repaired)
        )
    return report


def _repair(mesh, closed, case, unit, out, source):
    """Repair the front faces and write them to ``out`` atomically.

    Returns the changes and the mesh to check again (with the back sides of thin sheets).
    """
    import os
    import tempfile

    from pockmark.geometry.assembly import with_back_sides
    from pockmark.geometry.mesh import Mesh
    from pockmark.geometry.repair import repair
    from pockmark.geometry.units import to_metres
    from pockmark.io.obj import write_obj

    front = mesh.face_sides == 0
    if not front.all():
        mesh = Mesh(
            vertices=mesh.vertices,
            faces=mesh.faces[front],
            face_tags=mesh.face_tags[front],
            tag_names=mesh.tag_names,
            original_face_ids=mesh.original_face_ids[front],
            source=mesh.source,
            face_origins=mesh.face_origins[front],
            face_sides=mesh.face_sides[front],
        )
        closed = None if closed is None else closed[front]
    repaired, changes = repair(mesh, closed)
    header = "\n".join(
        [f"repaired by pockmark check from {source}", f"length unit: {unit}"]
        + [f"- {change}" for change in changes or ["nothing needed repair"]]
    )
    try:
        handle = tempfile.NamedTemporaryFile(
            dir=out.resolve().parent, prefix=f".{out.name}.", suffix=".tmp", delete=False
        )
    except OSError as error:
        raise click.ClickException(
            f"--repair {out}: cannot write ({error.strerror}); check the folder"
        ) from None
    handle.close()
    temporary = Path(handle.name)
    try:
        write_obj(
            temporary,
            repaired.vertices / to_metres(unit),
            repaired.faces,
            repaired.face_tags,
            repaired.tag_names,
            header=header,
        )
        umask = os.umask(0)
        os.umask(umask)
        os.chmod(temporary, 0o666 & ~umask)  # the temporary file was private (0600)
        os.replace(temporary, out)
    except OSError as error:
        raise click.ClickException(
            f"--repair {out}: cannot write ({error.strerror}); check the folder"
        ) from None
    finally:
        temporary.unlink(missing_ok=True)  # gone already once replaced
    logger.info("wrote %s (%d faces)", out, repaired.n_faces)
    if case is not None:
        repaired = with_back_sides(repaired, case.thin)
    return changes, repaired


def _counts(findings):
    errors = sum(f.severity == "error" for f in findings)
    warnings = sum(f.severity == "warning" for f in findings)
    return errors, warnings


def _origin_name(case, source, origin):
    """The file a face came from: the mesh, the case's vehicle mesh or one of its panels."""
    if case is None:
        return Path(source).name
    if origin == 0:
        return case.mesh_paths[0].name if len(case.mesh_paths) == 1 else "vehicle mesh"
    if origin <= len(case.panels):
        return case.panels[origin - 1].path.name
    return f"input {origin}"


def _format_findings(findings, mesh, case, source, verbose, quiet):
    lines = []
    order = {"info": 0, "error": 1, "warning": 2}
    for finding in sorted(findings, key=lambda f: order[f.severity]):
        if quiet and finding.severity == "info":
            continue
        lines.append(f"{finding.severity.upper():8s}{finding.check} ({finding.count})")
        if len(finding.faces):
            shown = ", ".join(str(int(k)) for k in finding.faces[:_SHOWN_FACES])
            more = len(finding.faces) - _SHOWN_FACES
            lines.append(f"        faces: {shown}" + (f" … and {more} more" if more > 0 else ""))
            if verbose:
                tags = mesh.tag_of_faces()
                for k in finding.faces[:_SHOWN_FACES]:
                    x, y, z = mesh.face_centroids[k]
                    side = ", back side" if mesh.face_sides[k] else ""
                    lines.append(
                        f"          face {k}: tag {tags[k]!r}, "
                        f"{_origin_name(case, source, mesh.face_origins[k])} "
                        f"face {mesh.original_face_ids[k]} of the file (from 0){side}, "
                        f"centroid ({x:.4g}, {y:.4g}, {z:.4g}) m"
                    )
        lines.append(f"        {finding.message}")
        if finding.hint:
            lines.append(
                f"        {'note' if finding.severity == 'info' else 'fix'}: {finding.hint}"
            )
    errors, warnings = _counts(findings)
    lines.append(f"{errors} error{'s' * (errors != 1)}, {warnings} warning{'s' * (warnings != 1)}")
    return lines


def _as_text(report, verbose, quiet):
    lines = [f"pockmark check {report['source']}"]
    lines += _format_findings(
        report["findings"], report["mesh"], report["case"], report["source"], verbose, quiet
    )
    if report["repair"] is not None:
        repair = report["repair"]
        lines.append("")
        lines.append(f"repair: wrote {repair['output']}")
        for change in repair["changes"] or ["nothing needed repair"]:
            lines.append(f"  - {change}")
        lines.append(f"check of {repair['output']}:")
        lines += _format_findings(
            report["after_repair"],
            report["repaired_mesh"],
            report["case"],
            repair["output"],
            verbose,
            quiet,
        )
    return "\n".join(lines)


def _as_json(report):
    def block(findings):
        errors, warnings = _counts(findings)
        return {"errors": errors, "warnings": warnings, "findings": [f.to_dict() for f in findings]}

    document = {
        "input": str(report["source"]),
        "faces": report["mesh"].n_faces,
        **block(report["findings"]),
    }
    if report["repair"] is not None:
        document["repair"] = {
            "output": str(report["repair"]["output"]),
            "changes": report["repair"]["changes"],
            "after_repair": block(report["after_repair"]),
        }
    return document
