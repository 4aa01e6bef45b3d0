"""Ballistic limits of equipment behind a sandwich-panel structure wall (triple wall).

Models
------
schafer_2008_aluminium, schafer_2008_cfrp
    The Schäfer–Ryan–Lambert (SRL) equation: a honeycomb sandwich panel (aluminium or CFRP
    face sheets) followed by a gap and an aluminium equipment wall (an electronics box, a
    tank, a harness cover). Failure = perforation of the equipment wall.
"""

import numpy as np

from pockmark._validation import require_nonnegative, require_positive
from pockmark.ballistics._common import _finish, _impact_conditions, _three_regimes
from pockmark.ballistics.sandwich import (
    RYAN_HYPERVELOCITY_FACTOR,
    RYAN_MLI_FACTOR,
    RYAN_REAR_SHEET_FACTOR,
    RYAN_REFERENCE_DENSITY,
    RYAN_REGIME_LIMITS,
    ryan_angle_exponent,
)
from pockmark.constants import KSI_IN_MPA

__all__ = ["schafer_2008_aluminium", "schafer_2008_cfrp"]

# Constants of the gap term, by face-sheet material: (K_S2, K_tw, β, γ). Read second-hand,
# as the rest of the equation (see the docstrings).
_GAP_TERM = {
    "aluminium": (0.1, 1.5, 2.0 / 3.0, 1.0 / 3.0),
    "cfrp": (1.0, 1.0, 1.0 / 3.0, 2.0 / 3.0),
}


def _gap_angle_exponent(cos_angle, material):
    """Exponent ε of 1/cos θ on the gap term: 0 for CFRP; 10/4 for aluminium between 45° and
    65°, 8/3 elsewhere (where δ = 4/3)."""
    if material == "cfrp":
        return 0.0
    delta = ryan_angle_exponent(cos_angle, material)
    return np.where(delta == 5.0 / 4.0, 10.0 / 4.0, 8.0 / 3.0)


def _triple_wall(velocity, angle, density, outer_thickness, inner_thickness, inner_density,
                 core_thickness, gap, wall_thickness, sigma_ksi, mli_areal_density, material):
    """SRL on aluminium(-equivalent) sheets; thicknesses in cm, σ (equipment wall) in ksi."""
    k_sheet = RYAN_REAR_SHEET_FACTOR[material]
    k_gap, k_wall, beta, gamma = _GAP_TERM[material]
    v_low, v_high = RYAN_REGIME_LIMITS[material]
    outer = outer_thickness + RYAN_MLI_FACTOR * mli_areal_density / RYAN_REFERENCE_DENSITY
    cos_angle = np.cos(np.radians(angle))
    delta = ryan_angle_exponent(cos_angle, material)
    epsilon = _gap_angle_exponent(cos_angle, material)

    def low_speed(v):
        resisting = (wall_thickness + inner_thickness) / k_sheet * np.sqrt(sigma_ksi / 40.0)
        return ((resisting + outer)
                / (0.6 * cos_angle**delta * np.sqrt(density) * v ** (2.0 / 3.0))) ** (18.0 / 19.0)

    def high_speed(v):
        spacing = (
            core_thickness ** (1.0 / 3.0)
            * (inner_thickness + k_wall * wall_thickness) ** (2.0 / 3.0)
            + k_gap * gap**beta * wall_thickness**gamma * cos_angle ** (-epsilon)
        )
        return (
            1.155 * spacing * (sigma_ksi / 70.0) ** (1.0 / 3.0)
            / (RYAN_HYPERVELOCITY_FACTOR ** (2.0 / 3.0) * density ** (1.0 / 3.0)
               * inner_density ** (1.0 / 9.0) * v ** (2.0 / 3.0) * cos_angle**delta)
        )

    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        critical = _three_regimes(velocity, v_low / cos_angle, v_high / cos_angle,
                                  low_speed, high_speed)
    return _finish(critical, velocity, angle)


_SRL_NOTES = r"""
    With :math:`t_o, t_i` the outer and inner face sheets' (aluminium-equivalent)
    thicknesses, :math:`\rho_i` the inner sheet's density, :math:`S_1` the core thickness,
    :math:`S_2` the gap from the panel's inner sheet to the equipment wall, :math:`t_w` and
    :math:`\sigma` (ksi) the equipment wall's thickness and yield strength and
    :math:`m_{\mathrm{MLI}}` an outer blanket's areal density,
    :math:`t_o' = t_o + 3\, m_{\mathrm{MLI}} / 2.78`, and

    .. math::

        d_{\mathrm{LV}} = \left[\frac{(t_w + t_i)(\sigma/40)^{1/2} / K_{3S} + t_o'}
            {0.6 \cos^{\delta}\theta\, \rho_p^{1/2} V^{2/3}}\right]^{18/19}

        d_{\mathrm{HV}} = \frac{1.155 \left[S_1^{1/3} (t_i + K_{tw} t_w)^{2/3}
            + K_{S2} S_2^{\beta} t_w^{\gamma} \cos^{-\varepsilon}\theta\right]
            (\sigma/70)^{1/3}}
            {K_{3D}^{2/3} \rho_p^{1/3} \rho_i^{1/9} V^{2/3} \cos^{\delta}\theta}

    below :math:`V_{LV}/\cos\theta` and above :math:`V_{HV}/\cos\theta`, a straight line in
    :math:`V` between the end equations at the limits (continuous by construction). With no
    gap the hypervelocity branch is that of the panel alone
    (:func:`~pockmark.ballistics.ryan_2008_aluminium` or
    :func:`~pockmark.ballistics.ryan_2008_cfrp`) with a rear sheet of
    :math:`t_i + K_{tw} t_w` and the inner sheet's density in place of the front sheet's.
    The source caps the obliquity at 65°; shields built with
    :func:`~pockmark.ballistics.make_shield` apply that cap by default.

    **Provenance.** Form and constants (:math:`K_{3D} = 0.4`; aluminium / CFRP:
    :math:`K_{3S}` 1.4 / 1.1, :math:`K_{S2}` 0.1 / 1, :math:`K_{tw}` 1.5 / 1, β 2/3 / 1/3,
    γ 1/3 / 2/3, δ as in :func:`~pockmark.ballistics.ryan_2008_aluminium`, ε 8/3 (10/4
    between 45° and 65°) / 0, limits 3/7 and 4.2/8.4 km s⁻¹, the 65° cap) were read in a
    second-hand transcription: an open-source library of ballistic-limit equations written
    by S. Ryan, a co-author of [1]_, whose code cites [1]_ (pyBLOSSUM, MIT licence, commit
    c9aa929), not on the printed pages. **One deviation:** that transcription writes the
    equipment wall's term in the low-speed branch as :math:`t_w^{1/2}`, which adds
    cm\ :sup:`1/2` to cm; we take it for a typo and use :math:`t_w`, as every other
    low-speed branch of this family does (from memory, low confidence). The low-speed
    branch therefore carries more doubt than the high-speed one.
"""


def schafer_2008_aluminium(
    impact_velocity,
    impact_angle,
    projectile_density,
    outer_sheet_thickness,
    core_thickness,
    inner_sheet_thickness,
    inner_sheet_density,
    gap,
    wall_thickness,
    wall_yield_strength,
    mli_areal_density=0.0,
):
    r"""Critical diameter for equipment behind an aluminium sandwich panel (SRL, 2008).

    Parameters
    ----------
    impact_velocity : numeric
        Impact speed [km s⁻¹]. Values ≤ 0 mean no impact and give ``inf``.
    impact_angle : numeric
        Impact angle from the surface normal [°], in [0, 180]. Angles ≥ 90 give ``inf``.
    projectile_density : numeric
        Density of the (spherical) projectile [g cm⁻³].
    outer_sheet_thickness : numeric
        Outer aluminium face-sheet thickness of the structure panel [cm].
    core_thickness : numeric
        Honeycomb core thickness [cm].
    inner_sheet_thickness : numeric
        Inner aluminium face-sheet thickness [cm].
    inner_sheet_density : numeric
        Inner face-sheet density [g cm⁻³].
    gap : numeric
        Distance from the panel's inner sheet to the equipment wall [cm].
    wall_thickness : numeric
        Equipment (aluminium) wall thickness [cm].
    wall_yield_strength : numeric
        Equipment wall yield strength, 0.2 % offset [MPa].
    mli_areal_density : numeric, default 0
        Areal density of a thermal blanket (MLI) on the outer sheet [g cm⁻²]; 0 for none.

    Returns
    -------
    numpy.ndarray
        Critical projectile diameter [cm] for perforation of the equipment wall; float64,
        broadcast shape of the arguments. ``inf`` where there is no impact, NaN where an
        impact condition is NaN.

    Raises
    ------
    InputError
        If a sheet, core, gap or wall parameter or ``projectile_density`` is not positive and
        finite, if ``mli_areal_density`` is negative, if ``impact_angle`` is outside
        [0, 180] or if ``impact_velocity`` is infinite.

    Notes
    -----
{srl}
    **Validity range.** Aluminium projectiles; panels and equipment walls of the test base
    of [1]_ (about 0.4–1 mm sheets, 2–5 cm cores, gaps up to about 30 cm, 1–3 mm walls), test
    speeds up to about 7–8 km s⁻¹, angles up to 65° (beyond it the source evaluates at
    65°). Evaluated without clipping outside it.

    See Also
    --------
    schafer_2008_cfrp : The same equation behind a CFRP-sheet panel.
    pockmark.ballistics.ryan_2008_aluminium : The panel alone.

    References
    ----------
    .. [1] F. Schäfer, S. Ryan, M. Lambert and R. Putzar, "Ballistic limit equation for
       equipment placed behind satellite structure walls," Int. J. Impact Eng., vol. 35,
       pp. 1784–1791, 2008. :doi:`10.1016/j.ijimpeng.2008.07.074`

    Examples
    --------
    >>> from pockmark.ballistics import schafer_2008_aluminium
    >>> float(schafer_2008_aluminium(7.0, 0.0, 2.7, 0.041, 3.5, 0.041, 2.7, 30.0, 0.15,
    ...                              250.0, 0.0447))  # doctest: +ELLIPSIS
    0.34...
    """
    velocity, angle, density = _impact_conditions(
        impact_velocity, impact_angle, projectile_density
    )
    t_o = require_positive("outer_sheet_thickness", outer_sheet_thickness, "cm")
    s1 = require_positive("core_thickness", core_thickness, "cm")
    t_i = require_positive("inner_sheet_thickness", inner_sheet_thickness, "cm")
    rho_i = require_positive("inner_sheet_density", inner_sheet_density, "g cm⁻³")
    s2 = require_positive("gap", gap, "cm")
    t_w = require_positive("wall_thickness", wall_thickness, "cm")
    sigma = require_positive("wall_yield_strength", wall_yield_strength, "MPa")
    mli = require_nonnegative("mli_areal_density", mli_areal_density, "g cm⁻²")
    return _triple_wall(velocity, angle, density, t_o, t_i, rho_i, s1, s2, t_w,
                        sigma / KSI_IN_MPA, mli, "aluminium")


def schafer_2008_cfrp(
    impact_velocity,
    impact_angle,
    projectile_density,
    outer_sheet_thickness,
    outer_sheet_density,
    core_thickness,
    inner_sheet_thickness,
    inner_sheet_density,
    gap,
    wall_thickness,
    wall_yield_strength,
    mli_areal_density=0.0,
):
    r"""Critical diameter for equipment behind a CFRP sandwich panel (SRL, 2008).

    Parameters
    ----------
    impact_velocity : numeric
        Impact speed [km s⁻¹]. Values ≤ 0 mean no impact and give ``inf``.
    impact_angle : numeric
        Impact angle from the surface normal [°], in [0, 180]. Angles ≥ 90 give ``inf``.
    projectile_density : numeric
        Density of the (spherical) projectile [g cm⁻³].
    outer_sheet_thickness, inner_sheet_thickness : numeric
        CFRP face-sheet thicknesses of the structure panel [cm].
    outer_sheet_density, inner_sheet_density : numeric
        CFRP face-sheet densities [g cm⁻³].
    core_thickness : numeric
        Honeycomb core thickness [cm].
    gap : numeric
        Distance from the panel's inner sheet to the equipment wall [cm].
    wall_thickness : numeric
        Equipment (aluminium) wall thickness [cm].
    wall_yield_strength : numeric
        Equipment wall yield strength, 0.2 % offset [MPa].
    mli_areal_density : numeric, default 0
        Areal density of a thermal blanket (MLI) on the outer sheet [g cm⁻²]; 0 for none.

    Returns
    -------
    numpy.ndarray
        Critical projectile diameter [cm] for perforation of the equipment wall; float64,
        broadcast shape of the arguments.

    Raises
    ------
    InputError
        As :func:`schafer_2008_aluminium`.

    Notes
    -----
    CFRP sheets enter as AA2024-T81 aluminium (2.78 g cm⁻³) of the same areal density, and
    the inner sheet's density in the hypervelocity branch is 2.78 g cm⁻³.
{srl}
    **Validity range.** As :func:`schafer_2008_aluminium`, for CFRP sheets of about
    0.4–2 mm; the hypervelocity branch starts at 8.4 km s⁻¹ normal, above every test.

    See Also
    --------
    schafer_2008_aluminium : The same equation behind an aluminium-sheet panel.
    pockmark.ballistics.ryan_2008_cfrp : The panel alone.

    References
    ----------
    .. [1] F. Schäfer, S. Ryan, M. Lambert and R. Putzar, "Ballistic limit equation for
       equipment placed behind satellite structure walls," Int. J. Impact Eng., vol. 35,
       pp. 1784–1791, 2008. :doi:`10.1016/j.ijimpeng.2008.07.074`

    Examples
    --------
    >>> from pockmark.ballistics import schafer_2008_cfrp
    >>> float(schafer_2008_cfrp(7.0, 0.0, 2.8, 0.1, 1.6, 3.0, 0.1, 1.6, 20.0, 0.15, 276.0))
    ... # doctest: +ELLIPSIS
    0.26...
    """
    velocity, angle, density = _impact_conditions(
        impact_velocity, impact_angle, projectile_density
    )
    t_o = require_positive("outer_sheet_thickness", outer_sheet_thickness, "cm")
    rho_o = require_positive("outer_sheet_density", outer_sheet_density, "g cm⁻³")
    s1 = require_positive("core_thickness", core_thickness, "cm")
    t_i = require_positive("inner_sheet_thickness", inner_sheet_thickness, "cm")
    rho_i = require_positive("inner_sheet_density", inner_sheet_density, "g cm⁻³")
    s2 = require_positive("gap", gap, "cm")
    t_w = require_positive("wall_thickness", wall_thickness, "cm")
    sigma = require_positive("wall_yield_strength", wall_yield_strength, "MPa")
    mli = require_nonnegative("mli_areal_density", mli_areal_density, "g cm⁻²")
    reference = RYAN_REFERENCE_DENSITY
    return _triple_wall(velocity, angle, density, t_o * rho_o / reference,
                        t_i * rho_i / reference, reference, s1, s2, t_w, sigma / KSI_IN_MPA,
                        mli, "cfrp")


# Both variants share one statement of the equation and its provenance.
for _function in (schafer_2008_aluminium, schafer_2008_cfrp):
    _function.__doc__ = _function.__doc__.replace("{srl}\n", _SRL_NOTES.lstrip("\n"))
del _function
