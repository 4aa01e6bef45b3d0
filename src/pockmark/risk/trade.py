"""Shield trade study: how much risk each candidate upgrade removes, and at what mass.

A run keeps, per tag and per flux, the visible exposure × area at the angle nodes of the
penetration tables (:attr:`Assessment.exposures`). The expected penetrations of a tag are
that exposure times its shield's penetration table, summed; so any other shield can be put
on the tag and its penetrations computed exactly as a full rerun would (same directions,
same shadowing, same angle interpolation), without tracing a ray. From that come, per
candidate, the penetrations it removes, the mass it adds (areal density × the tag's area),
the PNP it gives, and a plan that adds candidates by risk removed per added kilogram until
the requirement is met.
"""

import math
import warnings
from dataclasses import dataclass

import numpy as np

from pockmark.ballistics import make_shield
from pockmark.ballistics.shields import layer_thicknesses
from pockmark.errors import ConfigError, InputError, ModelRangeWarning
from pockmark.risk.assess import case_materials
from pockmark.risk.impacts import penetration_table

__all__ = ["Candidate", "candidates", "tag_components", "tag_penetrations", "trade_study",
           "DEFAULT_STEPS"]

#: Factors on each resisting layer's thickness tried when the case lists no [[upgrades]].
DEFAULT_STEPS = (1.25, 1.5, 2.0, 3.0)


@dataclass(frozen=True)
class Candidate:
    """One candidate upgrade: a tag's shield replaced by ``shield``."""

    name: str
    tag: str
    shield: object  # pockmark.ballistics.Shield
    origin: str  # "case" ([[upgrades]] table) or "step" (a layer thickness scaled)


def candidates(case, shields, tags, steps=DEFAULT_STEPS):
    """The case's ``[[upgrades]]`` and, for each tag in ``tags``, its layers scaled by ``steps``.

    Parameters
    ----------
    case : pockmark.io.config.Case
    shields : dict
        Tag → the run's :class:`~pockmark.ballistics.Shield`.
    tags : iterable of str
        Tags whose layer thicknesses are stepped (the tags that count toward a requirement).
    steps : sequence of float
        Factors > 1 on each thickness in :func:`~pockmark.ballistics.shields.layer_thicknesses`;
        empty for the case's upgrades only.

    Returns
    -------
    list of Candidate

    Raises
    ------
    ConfigError
        If an ``[[upgrades]]`` definition is not a valid shield, naming its file and line.
    """
    materials = case_materials(case)
    found = []
    with warnings.catch_warnings():
        # The run has already warned about each equation's notices and ranges.
        warnings.simplefilter("ignore", ModelRangeWarning)
        for upgrade in case.upgrades:
            try:
                shield = make_shield(upgrade.tag, upgrade.definition, materials=materials)
            except InputError as error:
                raise ConfigError(f"{case.where('upgrades', upgrade.index)}: {error}") from None
            found.append(Candidate(upgrade.name, upgrade.tag, shield, "case"))
        for tag in tags:
            definition = case.shields[tag]
            for key in layer_thicknesses(shields[tag].equation):
                value = definition.get(key)
                if not isinstance(value, (int, float)) or isinstance(value, bool):
                    continue
                for factor in steps:
                    new = {**definition, key: value * factor}
                    shield = make_shield(tag, new, materials=materials)
                    name = f"{tag}: {key} {value:g} -> {value * factor:.4g} cm"
                    found.append(Candidate(name, tag, shield, "step"))
    return found


def tag_penetrations(assessment, tag, shield):
    """Expected penetrations of the faces of ``tag`` over the mission if they had ``shield``.

    Exact with respect to the run: the same sum the run made face by face, regrouped by the
    angle nodes of the penetration tables.
    """
    index = assessment.mesh.tag_names.index(tag)
    total = 0.0
    for entry in assessment.exposures:
        exposure = entry["angle_exposure"][index]
        if exposure.any():
            table = penetration_table(shield, entry["flux"])
            total += entry["duration"] * float(np.sum(exposure * table))
    return total


def tag_components(assessment):
    """Tag name → its component (every face of a tag is in the same component)."""
    vehicle = assessment.vehicle
    mesh = assessment.mesh
    found = {}
    for t, name in enumerate(mesh.tag_names):
        faces = np.flatnonzero(mesh.face_tags == t)
        if len(faces):
            found[name] = vehicle.components[int(vehicle.face_components[faces[0]])]
    return found


def _pnp(n):
    return math.exp(-n)


def trade_study(assessment, steps=DEFAULT_STEPS):
    """Evaluate every candidate upgrade of a run and plan the lightest way to the requirement.

    Parameters
    ----------
    assessment : pockmark.risk.assess.Assessment
        The run of the case, as returned by :func:`~pockmark.risk.assess.assess`.
    steps : sequence of float
        Thickness factors for the automatic candidates (see :func:`candidates`).

    Returns
    -------
    dict
        ``requirement`` (the case's PNP requirement or None), ``component_requirements``
        (component → required PNP), ``baseline`` (critical expected penetrations, PNP, shield
        mass), ``tags`` (per traded tag: component, area, mass, expected penetrations and
        share of the critical total), ``candidates`` (one dict each, best first: name, tag,
        component, origin, equation, expected penetrations of the tag before and after,
        penetrations removed, mass added [kg], removed per kg, vehicle PNP with that upgrade
        alone, whether that alone meets every requirement), ``plan`` (steps in order with
        cumulative mass and vehicle PNP, the PNP of every requirement's target at the end and
        whether all are met) and ``notes`` (upgrades that could not be traded).

    Notes
    -----
    Candidates that remove risk without adding mass come first; the rest are ranked by
    expected penetrations removed per added kilogram. The plan is greedy: it repeatedly
    takes the candidate with the most penetrations removed per added kilogram relative to
    what its tag has at that point (so a heavier option on an already upgraded tag counts
    only its extra mass and gain), among the tags of requirements not yet met (the vehicle's
    and each component's ``pnp_requirement``), and stops when all are met or no candidate
    removes more risk. Greedy plans are good, not always optimal. Masses are the build-ups'
    areal densities times the tag's area; supports, standoff volume and attachments are not
    counted.
    """
    mesh = assessment.mesh
    shields = assessment.shields
    case = assessment.case
    component_of = tag_components(assessment)
    critical_tags = [tag for tag, c in component_of.items() if c.role == "critical"]
    targets = [("vehicle", tuple(critical_tags), case.pnp_requirement)]
    targets += [(f"component {c.name}", tuple(t for t in c.tags if t in component_of),
                 c.pnp_requirement)
                for c in assessment.vehicle.components if c.pnp_requirement is not None]
    traded = sorted({tag for _, tags, _ in targets for tag in tags})
    areas = np.bincount(mesh.face_tags, weights=mesh.face_areas, minlength=len(mesh.tag_names))
    area_of = {name: float(areas[t]) for t, name in enumerate(mesh.tag_names)}
    current = {tag: tag_penetrations(assessment, tag, shields[tag]) for tag in traded}
    baseline_n = sum(current[tag] for tag in critical_tags)
    mass_of = {tag: shields[tag].areal_density * area_of[tag] for tag in component_of}
    required = case.pnp_requirement
    notes = []

    evaluated = []
    for candidate in candidates(case, shields, traded, steps):
        if candidate.tag not in current:
            why = ("no face of the mesh uses it" if candidate.tag not in component_of
                   else "its component is shadow-only and has no requirement")
            notes.append(f"upgrade {candidate.name!r}: tag {candidate.tag!r} does not count "
                         f"toward any requirement ({why})")
            continue
        after = tag_penetrations(assessment, candidate.tag, candidate.shield)
        removed = current[candidate.tag] - after
        added = candidate.shield.areal_density * area_of[candidate.tag] - mass_of[candidate.tag]
        critical = candidate.tag in critical_tags
        pnp = _pnp(baseline_n - (removed if critical else 0.0))
        met = [_pnp(sum(current[t] for t in tags)
                    - (removed if candidate.tag in tags else 0.0)) >= need
               for _, tags, need in targets if need is not None]
        evaluated.append({
            "name": candidate.name,
            "tag": candidate.tag,
            "component": component_of[candidate.tag].name,
            "origin": candidate.origin,
            "equation": candidate.shield.equation,
            "tag_penetrations_before": current[candidate.tag],
            "tag_penetrations_after": after,
            "penetrations_removed": removed,
            "mass_added_kg": added,
            "removed_per_kg": removed / added if added > 0 else None,
            "pnp_alone": pnp,
            "meets_requirement_alone": all(met) if met else None,
        })
    evaluated.sort(key=_rank)
    plan = _greedy_plan(evaluated, current, targets)
    return {
        "requirement": required,
        "component_requirements": {name.removeprefix("component "): need
                                   for name, _, need in targets[1:]},
        "baseline": {
            "expected_penetrations": baseline_n,
            "pnp": _pnp(baseline_n),
            "shield_mass_kg": float(sum(mass_of.values())),
            "critical_shield_mass_kg": float(sum(mass_of[t] for t in critical_tags)),
        },
        "tags": [
            {"tag": tag, "component": component_of[tag].name, "area_m2": area_of[tag],
             "shield_mass_kg": mass_of[tag], "equation": shields[tag].equation,
             "expected_penetrations": current[tag],
             "share": current[tag] / baseline_n if baseline_n > 0 and tag in critical_tags
             else None}
            for tag in sorted(traded, key=lambda t: -current[t])
        ],
        "candidates": evaluated,
        "plan": plan,
        "steps": list(steps),
        "notes": notes,
    }


def _rank(entry):
    """Free gains first (most removed first), then removed per kg, then the rest."""
    removed, added = entry["penetrations_removed"], entry["mass_added_kg"]
    if removed > 0 and added <= 0:
        return (0, -removed)
    if removed > 0:
        return (1, -removed / added)
    return (2, -removed)


def _greedy_plan(evaluated, current, targets):
    """Add candidates by gain per added kg until every requirement is met (see trade_study).

    Without any requirement the plan goes on while some candidate removes risk from the
    vehicle's critical tags."""
    chosen = {}  # tag -> candidate entry in force
    tag_n = dict(current)
    mass = 0.0
    steps = []

    def unmet():
        return [(name, tags) for name, tags, need in targets
                if need is not None and _pnp(sum(tag_n[t] for t in tags)) < need]

    open_ended = all(need is None for _, _, need in targets)
    scale = max(sum(current.values()), 1e-300)
    while True:
        wanted = [("vehicle", targets[0][1])] if open_ended else unmet()
        if not wanted:
            break
        useful = {tag for _, tags in wanted for tag in tags}
        best = best_key = None
        for entry in evaluated:
            tag = entry["tag"]
            if tag not in useful or chosen.get(tag) is entry:
                continue
            gain = tag_n[tag] - entry["tag_penetrations_after"]
            in_force = chosen.get(tag)
            extra = entry["mass_added_kg"] - (in_force["mass_added_kg"] if in_force else 0.0)
            if gain <= 1e-12 * scale:
                continue
            key = (0, -gain) if extra <= 0 else (1, -gain / extra)
            if best_key is None or key < best_key:
                best, best_key, best_gain, best_extra = entry, key, gain, extra
        if best is None:
            break
        chosen[best["tag"]] = best
        tag_n[best["tag"]] = best["tag_penetrations_after"]
        mass += best_extra
        vehicle_n = sum(tag_n[t] for t in targets[0][1])
        steps.append({"name": best["name"], "tag": best["tag"], "penetrations_removed": best_gain,
                      "mass_added_kg": best_extra, "cumulative_mass_added_kg": mass,
                      "expected_penetrations": vehicle_n, "pnp": _pnp(vehicle_n)})
    outcome = [{"target": name, "required": need, "pnp": _pnp(sum(tag_n[t] for t in tags)),
                "met": None if need is None else _pnp(sum(tag_n[t] for t in tags)) >= need}
               for name, tags, need in targets]
    vehicle_n = sum(tag_n[t] for t in targets[0][1])
    return {"steps": steps, "targets": outcome,
            "met": None if open_ended else not unmet(),
            "pnp": _pnp(vehicle_n), "mass_added_kg": mass}
