"""Particle density laws of the environment models, as classes of constant density.

A ballistic-limit equation needs the projectile's density as well as its diameter. Most
analyses take one density per source (orbital debris 2.8 g cm⁻³, meteoroids 1 g cm⁻³). The
models themselves state size-dependent densities; a flux can carry them as *density classes*:
each class ``(density, smallest, largest)`` holds the particles of diameter in
``[smallest, largest)`` [cm] and gives them one density. Within a class a particle
penetrates when its diameter reaches the critical diameter for that density, so the
penetrating flux is a sum over classes with no iteration (see
:meth:`pockmark.environment.flux.DirectionalFlux.penetrating_flux`).

Laws
----
kessler_1991
    Orbital debris of the 1991 model: :math:`\\rho = 2.8\\, d^{-0.74}` g cm⁻³ above 0.62 cm,
    4 g cm⁻³ below (continuous at 0.62 cm). Above 0.62 cm the law is split into classes of
    a tenth of a decade in diameter, each at the density of its geometric middle.
ssp_30425
    Meteoroids of the NASA space-station environment (SSP 30425): 2 g cm⁻³ below
    :math:`10^{-6}` g, 1 g cm⁻³ up to :math:`10^{-2}` g, 0.5 g cm⁻³ above. The mass classes
    become diameter classes at their own density.

Both laws are from memory (shared reference note on the environment, §1.6 and §2.6): the
0.62 cm break is consistent with continuity (2.8 × 0.62^−0.74 = 3.99), the value 4 g cm⁻³
below it is flagged there as not fully certain, and the SSP steps are recalled.
"""

import numpy as np

from pockmark.errors import InputError

__all__ = ["DENSITY_LAWS", "density_classes", "kessler_1991_density"]

#: Diameter [cm] above which the 1991 debris density falls with size.
KESSLER_1991_BREAK = 0.62
#: Density [g cm⁻³] of debris below the break (from memory; see the module docstring).
KESSLER_1991_SMALL_DENSITY = 4.0
#: Classes per decade of diameter above the break: the density changes by 18 % per class,
#: so a class's density is within ±9 % of the law's anywhere in it.
_CLASSES_PER_DECADE = 10
#: Largest class boundary [cm] (the top of the 1991 model's size range); the last class runs to
#: infinity.
_LARGEST_BOUNDARY = 100.0
#: SSP 30425 meteoroid mass steps: (density [g cm⁻³], smallest mass, largest mass [g]).
_SSP_30425_STEPS = ((2.0, 0.0, 1e-6), (1.0, 1e-6, 1e-2), (0.5, 1e-2, np.inf))


def kessler_1991_density(diameter):
    """Density of 1991-model debris of a given diameter.

    Parameters
    ----------
    diameter : numeric
        Diameter [cm], > 0.

    Returns
    -------
    numpy.ndarray
        :math:`2.8\\, d^{-0.74}` g cm⁻³ above 0.62 cm, 4 g cm⁻³ at and below it.
    """
    d = np.asarray(diameter, dtype=np.float64)
    with np.errstate(divide="ignore"):
        return np.where(d > KESSLER_1991_BREAK, 2.8 * d**-0.74, KESSLER_1991_SMALL_DENSITY)


def _kessler_1991_classes():
    count = int(round(_CLASSES_PER_DECADE * np.log10(_LARGEST_BOUNDARY / KESSLER_1991_BREAK)))
    edges = KESSLER_1991_BREAK * (_LARGEST_BOUNDARY / KESSLER_1991_BREAK) ** (
        np.arange(count + 1) / count)
    middles = np.sqrt(edges[:-1] * edges[1:])
    classes = [(KESSLER_1991_SMALL_DENSITY, 0.0, KESSLER_1991_BREAK)]
    classes += [(float(kessler_1991_density(m)), float(a), float(b))
                for m, a, b in zip(middles, edges[:-1], edges[1:], strict=True)]
    density, smallest, _ = classes[-1]
    classes[-1] = (density, smallest, np.inf)
    return classes


def _ssp_30425_classes():
    classes = []
    for density, low, high in _SSP_30425_STEPS:
        smallest = (6.0 * low / (np.pi * density)) ** (1.0 / 3.0)
        largest = (6.0 * high / (np.pi * density)) ** (1.0 / 3.0) if np.isfinite(high) else np.inf
        classes.append((density, float(smallest), float(largest)))
    return classes


#: Density laws by name: the source they belong to and their classes (names as listed in
#: :data:`pockmark.constants.DENSITY_LAW_NAMES`).
DENSITY_LAWS = {
    "kessler_1991": ("debris", _kessler_1991_classes),
    "ssp_30425": ("meteoroid", _ssp_30425_classes),
}


def density_classes(law, source):
    """Density classes ``[(density [g cm⁻³], smallest, largest [cm]), ...]`` of a named law.

    Raises
    ------
    InputError
        For an unknown law or one that belongs to another source.
    """
    known = [name for name, (owner, _) in DENSITY_LAWS.items() if owner == source]
    if law not in DENSITY_LAWS or DENSITY_LAWS[law][0] != source:
        raise InputError(
            f"unknown {source} density law {law!r}; give a density in g cm⁻³ or one of: "
            f"{', '.join(known)}"
        )
    return DENSITY_LAWS[law][1]()
