"""Impact environment: orbital-debris and meteoroid fluxes as directional distributions.

Models (registry ``MODELS``, keys identical to the function names):

* ``kessler_1991`` — 1991 NASA analytic orbital-debris model: cumulative flux of debris of
  diameter >= d on a randomly tumbling surface [m⁻² yr⁻¹]; diameters 0.001–100 cm, circular
  orbits up to 2000 km (stated range below 1000 km), inclination factor tabulated for
  28.5°–120° (clamped outside), dates from 1988 on.
* ``grun_1985`` — Grün et al. (1985) interplanetary meteoroid flux at 1 AU: cumulative flux of
  meteoroids of mass >= m on a randomly oriented one-sided plate [m⁻² yr⁻¹]; masses
  10⁻¹⁸–10² g.

Directional builders (:mod:`pockmark.environment.flux`) turn them into a
:class:`DirectionalFlux` over arrival directions and speeds in the local orbital frame
(:math:`\\hat x` flight direction, :math:`\\hat z` zenith, :math:`\\hat y = \\hat z \\times
\\hat x`; directions point toward where the particles come from):

* :func:`debris_flux` — magnitude from ``kessler_1991``; horizontal directions and speeds from
  circular-orbit crossing geometry with an assumed debris inclination population
  (:mod:`pockmark.environment.debris_directions`);
* :func:`meteoroid_flux` — magnitude from ``grun_1985`` with one of two gravitational
  focusing conventions (``"nasa_1994"``, ``"ecss_2008"``), isotropic directions on a Fibonacci
  grid with the Earth's disc cut exactly, and the corresponding speed distribution
  (:mod:`pockmark.environment.meteoroid_speed`);
* :func:`table_fluxes` — user environment tables (:mod:`pockmark.environment.tables`).

:func:`phase_fluxes` (:mod:`pockmark.environment.phase`) assembles everything for one mission
phase — debris epochs and solar activity, elliptical orbits, attitude (fixed, tumbling,
spinning), user tables — as lists of fluxes in the body frame, memoised on disk.

Earth-orbit helpers are in :mod:`pockmark.environment.orbit` and direction grids in
:mod:`pockmark.environment.directions`.
"""

from pockmark.environment.directions import fibonacci_directions
from pockmark.environment.flux import DirectionalFlux, debris_flux, meteoroid_flux
from pockmark.environment.grun_1985 import grun_1985
from pockmark.environment.kessler_1991 import kessler_1991
from pockmark.environment.orbit import circular_speed
from pockmark.environment.phase import (
    DEFAULT_SOLAR_FLUX,
    Attitude,
    DebrisSpec,
    MeteoroidSpec,
    PhaseSpec,
    phase_fluxes,
)
from pockmark.environment.tables import table_fluxes

#: Cumulative flux models by name; the key is the function name (and the CLI choice string).
MODELS = {"kessler_1991": kessler_1991, "grun_1985": grun_1985}

__all__ = [
    "DEFAULT_SOLAR_FLUX",
    "MODELS",
    "Attitude",
    "DebrisSpec",
    "DirectionalFlux",
    "MeteoroidSpec",
    "PhaseSpec",
    "circular_speed",
    "debris_flux",
    "fibonacci_directions",
    "grun_1985",
    "kessler_1991",
    "meteoroid_flux",
    "phase_fluxes",
    "table_fluxes",
]
