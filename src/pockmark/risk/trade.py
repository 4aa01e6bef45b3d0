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

__all__ = ["Candidate", "candidates", "tag_penetrations", "trade_study", "DEFAULT_STEPS"]

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
        Tags whose layer thicknesses are stepped (the critical tags of the vehicle).
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


def _tag_roles(assessment):
    """Per tag: "critical", "shadow_only" or "mixed" (faces in components of both roles)."""
    vehicle = assessment.vehicle
    critical = np.array([c.role == "critical" for c in vehicle.components])[vehicle.face_components]
    roles = {}
    for t, name in enumerate(assessment.mesh.tag_names):
        faces = assessment.mesh.face_tags == t
        if not faces.any():
            continue
        share = critical[faces]
        roles[name] = "critical" if share.all() else "shadow_only" if not share.any() else "mixed"
    return roles


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
        ``requirement`` (the case's PNP requirement or None), ``baseline`` (critical expected
        penetrations, PNP, shield mass), ``tags`` (per critical tag: area, mass, expected
        penetrations and share), ``candidates`` (one dict each, best first: name, tag, origin,
        equation, expected penetrations of the tag before and after, penetrations removed,
        mass added [kg], removed per kg, PNP with that upgrade alone, whether that meets the
        requirement), ``plan`` (steps in order with cumulative mass and PNP, and whether the
        requirement is met at the end) and ``notes`` (tags that could not be traded).

    Notes
    -----
    Candidates that remove risk without adding mass come first; the rest are ranked by
    expected penetrations removed per added kilogram. The plan is greedy: it repeatedly
    takes the candidate with the most penetrations removed per added kilogram relative to
    what its tag has at that point (so a heavier option on an already upgraded tag counts
    only its extra mass and gain), and stops when the requirement is met or no candidate
    removes more risk. Greedy plans are good, not always optimal. Masses are the build-ups'
    areal densities times the tag's area; supports, standoff volume and attachments are not
    counted.
    """
    mesh = assessment.mesh
    shields = assessment.shields
    case = assessment.case
    roles = _tag_roles(assessment)
    critical_tags = [tag for tag, role in roles.items() if role == "critical"]
    notes = [f"tag {tag!r} has faces in both critical and shadow-only components; not traded"
             for tag, role in roles.items() if role == "mixed"]
    areas = np.bincount(mesh.face_tags, weights=mesh.face_areas, minlength=len(mesh.tag_names))
    area_of = {name: float(areas[t]) for t, name in enumerate(mesh.tag_names)}
    current = {tag: tag_penetrations(assessment, tag, shields[tag]) for tag in critical_tags}
    baseline_n = sum(current.values())
    mass_of = {tag: shields[tag].areal_density * area_of[tag] for tag in roles}
    required = case.pnp_requirement

    evaluated = []
    for candidate in candidates(case, shields, critical_tags, steps):
        role = roles.get(candidate.tag)
        if role != "critical":
            why = ("no face of the mesh uses it" if role is None
                   else f"its faces are {role.replace('_', '-')}")
            notes.append(f"upgrade {candidate.name!r}: tag {candidate.tag!r} does not count "
                         f"toward PNP ({why})")
            continue
        after = tag_penetrations(assessment, candidate.tag, candidate.shield)
        removed = current[candidate.tag] - after
        added = candidate.shield.areal_density * area_of[candidate.tag] - mass_of[candidate.tag]
        pnp = _pnp(baseline_n - removed)
        evaluated.append({
            "name": candidate.name,
            "tag": candidate.tag,
            "origin": candidate.origin,
            "equation": candidate.shield.equation,
            "tag_penetrations_before": current[candidate.tag],
            "tag_penetrations_after": after,
            "penetrations_removed": removed,
            "mass_added_kg": added,
            "removed_per_kg": removed / added if added > 0 else None,
            "pnp_alone": pnp,
            "meets_requirement_alone": None if required is None else pnp >= required,
            "_shield": candidate.shield,
        })
    evaluated.sort(key=_rank)

    plan = _greedy_plan(evaluated, current, baseline_n, required)
    for entry in evaluated:
        del entry["_shield"]
    total_n = baseline_n
    return {
        "requirement": required,
        "baseline": {
            "expected_penetrations": total_n,
            "pnp": _pnp(total_n),
            "shield_mass_kg": float(sum(mass_of.values())),
            "critical_shield_mass_kg": float(sum(mass_of[t] for t in critical_tags)),
        },
        "tags": [
            {"tag": tag, "area_m2": area_of[tag], "shield_mass_kg": mass_of[tag],
             "equation": shields[tag].equation, "expected_penetrations": current[tag],
             "share": current[tag] / total_n if total_n > 0 else 0.0}
            for tag in sorted(critical_tags, key=lambda t: -current[t])
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


def _greedy_plan(evaluated, current, baseline_n, required):
    chosen = {}  # tag -> candidate entry in force
    tag_n = dict(current)
    mass = 0.0
    n = baseline_n
    steps = []
    while required is None or _pnp(n) < required:
        best = best_key = None
        for entry in evaluated:
            tag = entry["tag"]
            if chosen.get(tag) is entry:
                continue
            gain = tag_n[tag] - entry["tag_penetrations_after"]
            in_force = chosen.get(tag)
            extra = entry["mass_added_kg"] - (in_force["mass_added_kg"] if in_force else 0.0)
            if gain <= 1e-12 * max(baseline_n, 1e-300):
                continue
            key = (0, -gain) if extra <= 0 else (1, -gain / extra)
            if best_key is None or key < best_key:
                best, best_key, best_gain, best_extra = entry, key, gain, extra
        if best is None:
            break
        chosen[best["tag"]] = best
        tag_n[best["tag"]] = best["tag_penetrations_after"]
        n -= best_gain
        mass += best_extra
        steps.append({"name": best["name"], "tag": best["tag"], "penetrations_removed": best_gain,
                      "mass_added_kg": best_extra, "cumulative_mass_added_kg": mass,
                      "expected_penetrations": n, "pnp": _pnp(n)})
    return {"steps": steps, "met": None if required is None else _pnp(n) >= required,
            "pnp": _pnp(n), "mass_added_kg": mass}
