"""How far a result can be trusted: discretisation error and environment uncertainty bands.

Two separate things bound a PNP:

* **discretisation**: the finite number of arrival directions, debris azimuth bins and ray
  samples per face. It is estimated by rerunning the case at half resolution (or, as a
  convergence check, at double resolution) and taking the change in the expected number of
  penetrations as the error scale; halving the resolution roughly doubles the error of a
  quadrature that converges at first order, so the change is a conservative estimate.
* **environment**: the flux models themselves are uncertain, by factors an engineer states
  per source (e.g. 3 on debris, 2 on meteoroids, common practice, no source). The PNP band
  takes every source's expected penetrations up and down by its factor.
* **ballistic limits**: the equations are fits with scatter (published shots fail up to
  several per cent on the wrong side of the curves). The PNP band scales every critical
  diameter up and down by a stated factor and recomputes the penetrations exactly from the
  run's stored exposure.
"""

import dataclasses
import math


def resolution_variant(case, scale):
    """The case at ``scale`` × the direction resolution and sampling (0.5 coarser, 2 finer)."""
    settings = case.analysis
    bins = max(4, 2 * int(round(settings.debris_azimuth_bins * scale / 2)))
    samples = max(1, int(round(settings.samples_per_face * scale * scale)))
    return dataclasses.replace(
        case,
        analysis=dataclasses.replace(
            settings,
            directions=max(20, int(round(settings.directions * scale))),
            debris_azimuth_bins=bins,
            samples_per_face=samples,
        ),
    )


def discretisation_estimate(penetrations, other_penetrations, other_scale):
    """Error scale of ``penetrations`` from a run at ``other_scale`` × the resolution."""
    change = abs(penetrations - other_penetrations)
    return {
        "method": f"rerun at {other_scale:g} × the direction resolution and sampling",
        "expected_penetrations_other": other_penetrations,
        "estimated_error": change,
        "relative_error": change / penetrations if penetrations > 0 else 0.0,
        "pnp_range": [math.exp(-(penetrations + change)), math.exp(-max(0.0, penetrations - change))],
    }


def environment_band(by_source, factors):
    """PNP range with every source's expected penetrations scaled up and down by its factor."""
    low = sum(n * factors.get(source, 1.0) for source, n in by_source.items())
    high = sum(n / factors.get(source, 1.0) for source, n in by_source.items())
    return {
        "factors": {source: factors.get(source, 1.0) for source in by_source},
        "expected_penetrations_range": [high, low],
        "pnp_range": [math.exp(-low), math.exp(-high)],
    }


class _ScaledShield:
    """A shield whose critical diameters are all multiplied by ``factor``."""

    def __init__(self, shield, factor):
        self.shield = shield
        self.factor = factor

    def critical_diameter(self, impact_velocity, impact_angle, projectile_density):
        return self.factor * self.shield.critical_diameter(impact_velocity, impact_angle,
                                                          projectile_density)


def ballistic_limit_band(assessment, factor):
    """PNP range with every critical diameter of the critical tags ×/÷ ``factor`` (≥ 1).

    Exact for the run's discretisation: each tag's penetrations are recomputed from the
    exposure the run stored (:func:`pockmark.risk.trade.tag_penetrations`).
    """
    from pockmark.risk.trade import tag_components, tag_penetrations

    tags = [tag for tag, c in tag_components(assessment).items() if c.role == "critical"]
    shields = assessment.shields
    weaker = sum(tag_penetrations(assessment, t, _ScaledShield(shields[t], 1.0 / factor))
                 for t in tags)
    stronger = sum(tag_penetrations(assessment, t, _ScaledShield(shields[t], factor))
                   for t in tags)
    return {
        "factor": factor,
        "expected_penetrations_range": [stronger, weaker],
        "pnp_range": [math.exp(-weaker), math.exp(-stronger)],
    }
