"""Ballistic limits of honeycomb sandwich panels (two face sheets on a honeycomb core).

Models
------
sandwich_summed_face_sheets
    Conservative bound: the two face sheets taken as one plate of their summed areal density,
    evaluated with the single-wall equation. Common practice, no source. Aluminium and CFRP
    face sheets (CFRP through an aluminium-equivalent plate).
sandwich_whipple_approximation
    The panel taken as a Whipple shield (front sheet = bumper, core thickness = spacing, rear
    sheet = rear wall), evaluated with the Whipple equation. Known to be NON-conservative:
    the cells channel the debris cloud and keep it from spreading.

Neither is a published, fitted equation for sandwich panels. The published forms that exist
(a modified Christiansen equation for CFRP/aluminium-honeycomb panels, 1999; a three-regime
equation re-fitted for CFRP face sheets on aluminium honeycomb, 2008; triple-wall forms for
equipment behind a panel, 2008) are not implemented: their constants could not be read in a
source (shared reference note on ballistic limits, §2.6, §2.7). The true ballistic limit of
a panel lies between the two functions here.
"""

import numpy as np

from pockmark._validation import require_positive
from pockmark.ballistics._common import _impact_conditions
from pockmark.ballistics.single_wall import cour_palais_1987
from pockmark.ballistics.whipple import christiansen_1993

__all__ = ["sandwich_summed_face_sheets", "sandwich_whipple_approximation"]


def sandwich_summed_face_sheets(
    impact_velocity,
    impact_angle,
    projectile_density,
    face_sheets_areal_density,
    wall_density,
    brinell_hardness,
    sound_speed,
    failure_coefficient=1.8,
):
    r"""Critical diameter of a sandwich panel bounded by one wall of its summed face sheets.

    Parameters
    ----------
    impact_velocity : numeric
        Impact speed [km s⁻¹]. Values ≤ 0 mean no impact and give ``inf``.
    impact_angle : numeric
        Impact angle from the surface normal [°], in [0, 180]. Angles ≥ 90 give ``inf``.
    projectile_density : numeric
        Density of the (spherical) projectile [g cm⁻³].
    face_sheets_areal_density : numeric
        Areal density of the front plus the rear face sheet [g cm⁻²] (the core is not
        counted).
    wall_density : numeric
        Density of the metal the equivalent plate is made of [g cm⁻³]: the face-sheet alloy
        for aluminium sheets, an aluminium alloy for CFRP sheets.
    brinell_hardness : numeric
        Brinell hardness of that metal [HB].
    sound_speed : numeric
        Bar sound speed of that metal [km s⁻¹].
    failure_coefficient : numeric, default 1.8
        Failure thickness over crater depth [unitless]; 1.8 = perforation, see
        :data:`~pockmark.ballistics.FAILURE_COEFFICIENTS`.

    Returns
    -------
    numpy.ndarray
        Critical projectile diameter [cm] for failure of the equivalent plate; float64,
        broadcast shape of the arguments. ``inf`` where there is no impact, NaN where an
        impact condition is NaN.

    Raises
    ------
    InputError
        If a parameter or ``projectile_density`` is not positive and finite, if
        ``impact_angle`` is outside [0, 180] or if ``impact_velocity`` is infinite.

    Notes
    -----
    The face sheets are replaced by one plate of the same areal density,

    .. math::

        t_{\mathrm{eq}} = \frac{m_f + m_r}{\rho_{\mathrm{eq}}},

    and :math:`d_c` is the modified Cour-Palais single-wall value for that plate
    (:func:`~pockmark.ballistics.cour_palais_1987`, normal velocity component, no regimes).
    For two aluminium sheets of the same alloy this is exactly the plate of the summed
    thickness.

    **Status.** Common practice, no source: the core and the spacing are ignored, so the
    bound is conservative (it predicts failure by smaller particles than the panel really
    fails to) wherever the spacing helps, i.e. at hypervelocity. At low speed it is close to
    the Whipple approximation (illustration in the shared reference note, §2.6: a
    0.04/2.54/0.04 cm aluminium panel gives 0.0442 cm here and 0.0455 cm as a Whipple at
    3 km s⁻¹, 0.0259 and 0.090 cm at 7 km s⁻¹).

    The bound is conservative against the panel, not necessarily against
    :func:`sandwich_whipple_approximation`: for equal aluminium sheets it lies below the
    Whipple approximation, but a thick front sheet over a thin rear sheet and a small core
    can reverse the order, because the Whipple hypervelocity branch sees only the rear
    sheet.

    **CFRP face sheets** enter as the aluminium plate of the same areal density (areal
    density / aluminium density), a practice recalled from memory with low confidence
    (note, §5 item 10); material equivalencing of this kind has been reported to be off by
    up to 50 % in critical diameter. Treat CFRP results as an extrapolation.

    **Validity range.** That of :func:`~pockmark.ballistics.cour_palais_1987`: test data
    up to about 8 km s⁻¹, extrapolated above; evaluated without clipping outside it.

    See Also
    --------
    sandwich_whipple_approximation : The non-conservative counterpart.
    pockmark.ballistics.cour_palais_1987 : The single-wall equation used here.

    References
    ----------
    .. [1] R. Carriere and A. Cherniaev, "Hypervelocity impacts on satellite sandwich
       structures—a review of experimental findings and predictive models," Appl. Mech.,
       vol. 2, pp. 25–45, 2021. :doi:`10.3390/applmech2010003` (review of the published
       sandwich-panel equations that this bound stands in for).

    Examples
    --------
    >>> from pockmark.ballistics import sandwich_summed_face_sheets
    >>> m = 2 * 0.04 * 2.713  # two 0.4 mm aluminium sheets [g cm⁻²]
    >>> float(sandwich_summed_face_sheets(7.0, 0.0, 2.8, m, 2.713, 95.0, 5.1))
    ... # doctest: +ELLIPSIS
    0.0258...
    """
    m = require_positive("face_sheets_areal_density", face_sheets_areal_density, "g cm⁻²")
    rho = require_positive("wall_density", wall_density, "g cm⁻³")
    return cour_palais_1987(
        impact_velocity, impact_angle, projectile_density, m / rho, rho, brinell_hardness,
        sound_speed, failure_coefficient,
    )


def sandwich_whipple_approximation(
    impact_velocity,
    impact_angle,
    projectile_density,
    front_sheet_thickness,
    front_sheet_density,
    core_thickness,
    rear_sheet_thickness,
    rear_sheet_yield_strength,
):
    r"""Critical diameter of a sandwich panel treated as a Whipple shield (non-conservative).

    Parameters
    ----------
    impact_velocity : numeric
        Impact speed [km s⁻¹]. Values ≤ 0 mean no impact and give ``inf``.
    impact_angle : numeric
        Impact angle from the surface normal [°], in [0, 180]. Angles ≥ 90 give ``inf``.
    projectile_density : numeric
        Density of the (spherical) projectile [g cm⁻³].
    front_sheet_thickness : numeric
        Front (outer) face-sheet thickness, used as the bumper [cm].
    front_sheet_density : numeric
        Front face-sheet density [g cm⁻³].
    core_thickness : numeric
        Honeycomb core thickness, used as the spacing [cm].
    rear_sheet_thickness : numeric
        Rear face-sheet thickness, used as the rear wall [cm].
    rear_sheet_yield_strength : numeric
        Rear face-sheet yield strength, 0.2 % offset [MPa].

    Returns
    -------
    numpy.ndarray
        Critical projectile diameter [cm] for perforation or detached spall of the rear
        sheet by the Whipple equation; float64, broadcast shape of the arguments.

    Raises
    ------
    InputError
        If a parameter or ``projectile_density`` is not positive and finite, if
        ``impact_angle`` is outside [0, 180] or if ``impact_velocity`` is infinite.

    Notes
    -----
    :math:`d_c` = :func:`~pockmark.ballistics.christiansen_1993` with
    :math:`t_b = t_f`, :math:`\rho_b = \rho_f`, :math:`S = t_c` (the core thickness, as in
    the illustration of the shared reference note, §2.6; adding the front-sheet thickness
    changes :math:`d_c` by under 1 % for thin sheets), :math:`t_w = t_r` and
    :math:`\sigma = \sigma_r`. Regimes, velocity definition (normal component) and angle
    dependence are those of the Whipple equation.

    **Status: known NON-conservative** (note, §2.6 item 1 and §5 item 15): the honeycomb
    cells channel the debris cloud and keep it from spreading, so a panel fails to smaller
    particles than a Whipple shield of the same sheets and spacing. It is provided for
    comparison with :func:`sandwich_summed_face_sheets`, which bounds the panel from the
    other side; it is not a published sandwich-panel equation. For CFRP sheets the Whipple
    equation is used outside the all-aluminium build-up it was fitted to, and the rear
    sheet needs an explicit (aluminium-equivalent) yield strength.

    **Validity range.** That of the Whipple equation (test data up to about 7–8 km s⁻¹);
    a honeycomb panel is outside its build-up by construction.

    See Also
    --------
    sandwich_summed_face_sheets : The conservative counterpart.
    pockmark.ballistics.christiansen_1993 : The Whipple equation used here.

    References
    ----------
    .. [1] R. Carriere and A. Cherniaev, "Hypervelocity impacts on satellite sandwich
       structures—a review of experimental findings and predictive models," Appl. Mech.,
       vol. 2, pp. 25–45, 2021. :doi:`10.3390/applmech2010003`.
    .. [2] E. L. Christiansen, "Design and performance equations for advanced meteoroid and
       debris shields," Int. J. Impact Eng., vol. 14, pp. 145–156, 1993.

    Examples
    --------
    >>> from pockmark.ballistics import sandwich_whipple_approximation
    >>> float(sandwich_whipple_approximation(7.0, 0.0, 2.8, 0.04, 2.713, 2.54, 0.04, 275.79))
    ... # doctest: +ELLIPSIS
    0.0900...
    """
    _impact_conditions(impact_velocity, impact_angle, projectile_density)
    t_f = require_positive("front_sheet_thickness", front_sheet_thickness, "cm")
    rho_f = require_positive("front_sheet_density", front_sheet_density, "g cm⁻³")
    t_c = require_positive("core_thickness", core_thickness, "cm")
    t_r = require_positive("rear_sheet_thickness", rear_sheet_thickness, "cm")
    sigma = require_positive("rear_sheet_yield_strength", rear_sheet_yield_strength, "MPa")
    return np.asarray(
        christiansen_1993(
            impact_velocity, impact_angle, projectile_density, t_f, rho_f, t_c, t_r, sigma
        ),
        dtype=np.float64,
    )
