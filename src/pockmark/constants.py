"""Physical constants and geometric tolerances, each with its source or reason."""

from dataclasses import dataclass

#: Seconds in a Julian year [s]. Used to turn fluxes per second into fluxes per year.
SECONDS_PER_YEAR = 3.15576e7

#: Earth's gravitational parameter [km³ s⁻²] (WGS-84 / IERS value).
EARTH_MU = 398600.4418

#: Earth's equatorial radius [km] (WGS-84).
EARTH_RADIUS = 6378.137

#: Thickness of the atmosphere that stops meteoroids, added to the Earth's radius when the
#: Earth-shielding cone is computed [km] (ECSS-E-ST-10-04C (2008), Annex C.1.3.1).
ATMOSPHERE_ALLOWANCE = 100.0

#: One ksi in MPa (exact from 1 lbf = 4.4482216152605 N and 1 in = 25.4 mm).
KSI_IN_MPA = 6.894757293168361

#: Names of the size-dependent particle density laws, by source
#: (:mod:`pockmark.environment.density` defines them; the case reader checks names here).
DENSITY_LAW_NAMES = {"debris": ("kessler_1991",), "meteoroid": ("ssp_30425",)}


@dataclass(frozen=True)
class Tolerances:
    """Geometric epsilons used across pockmark, with the reason for each."""

    #: Ray origins are lifted off their own face by this fraction of the mesh's bounding-box
    #: diagonal so that a ray does not hit the face it starts on through round-off.
    ray_offset: float = 1e-7
    #: Faces whose area is below this fraction of the mean face area count as degenerate.
    degenerate_area: float = 1e-12
    #: Unit vectors must have a norm within this of 1.
    unit_norm: float = 1e-6


tol = Tolerances()
