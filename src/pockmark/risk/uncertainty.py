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
