"""Ballistic limits of honeycomb sandwich panels (two face sheets on a honeycomb core).

Models
------
ryan_2008_aluminium, ryan_2008_cfrp
    The published honeycomb-panel equation of Ryan, Schäfer, Destefanis and Lambert (2008):
    Christiansen's three-regime Whipple form re-fitted to sandwich-panel tests, with a
    channelling knock-down on the hypervelocity branch, for aluminium and for CFRP face
    sheets on an aluminium honeycomb core. Failure = perforation of the rear face sheet.
sandwich_summed_face_sheets
    Conservative bound: the two face sheets taken as one plate of their summed areal density,
    evaluated with the single-wall equation. Common practice, no source. Aluminium and CFRP
    face sheets (CFRP through an aluminium-equivalent plate).
sandwich_whipple_approximation
    The panel taken as a Whipple shield (front sheet = bumper, core thickness = spacing, rear
    sheet = rear wall), evaluated with the Whipple equation. Known to be NON-conservative:
    the cells channel the debris cloud and keep it from spreading.

The triple-wall form for equipment behind a panel is in
:mod:`pockmark.ballistics.triple_wall`. A modified Christiansen equation for CFRP/aluminium
honeycomb panels (Taylor et al., 1999) is not implemented: its constants could not be read
in any source.
"""

import numpy as np

from pockmark._validation import require_nonnegative, require_positive
from pockmark.ballistics._common import _finish, _impact_conditions, _three_regimes
from pockmark.ballistics.single_wall import cour_palais_1987
from pockmark.ballistics.whipple import christiansen_1993
from pockmark.constants import KSI_IN_MPA

# Constants of Ryan et al. (2008). Read in a second-hand transcription (an open-source
# library of ballistic-limit equations by S. Ryan, a co-author, which cites the paper), not
# on the printed pages; see the docstrings.
#: Hypervelocity knock-down K3D (Christiansen's rear-wall sizing constant 0.16 becomes 0.4).
RYAN_HYPERVELOCITY_FACTOR = 0.4
#: Low-speed rear-sheet factor K3S, by face-sheet material.
RYAN_REAR_SHEET_FACTOR = {"aluminium": 1.4, "cfrp": 1.1}
#: Regime limits on the normal speed component V cos θ [km s⁻¹], by face-sheet material.
RYAN_REGIME_LIMITS = {"aluminium": (3.0, 7.0), "cfrp": (4.2, 8.4)}
#: Reference aluminium (AA2024-T81) for CFRP sheets and for the MLI term: density [g cm⁻³]
#: and yield strength [ksi].
RYAN_REFERENCE_DENSITY = 2.78
RYAN_REFERENCE_YIELD_KSI = 59.5
#: Thermal-blanket (MLI) areal density counts this many times over as front-sheet
#: aluminium of the reference density.
RYAN_MLI_FACTOR = 3.0

__all__ = [
    "ryan_2008_aluminium",
    "ryan_2008_cfrp",
    "sandwich_summed_face_sheets",
    "sandwich_whipple_approximation",
]


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


def ryan_angle_exponent(cos_angle, material):
    """Exponent δ of cos θ in the equations of Ryan et al. (2008) (and the triple wall).

    4/3 for CFRP face sheets; for aluminium 5/4 between 45° and 65° and 4/3 elsewhere, as the
    source fits it (read second-hand). The switch makes d_c jump at 45° and 65°.
    """
    if material == "cfrp":
        return 4.0 / 3.0
    angle = np.degrees(np.arccos(np.clip(cos_angle, -1.0, 1.0)))
    return np.where((angle > 45.0) & (angle < 65.0), 5.0 / 4.0, 4.0 / 3.0)


def _ryan_panel(velocity, angle, density, front_thickness, front_density, core_thickness,
                rear_thickness, sigma_ksi, mli_areal_density, material):
    """Ryan et al. (2008) on aluminium(-equivalent) sheets; thicknesses in cm, σ in ksi."""
    k_rear = RYAN_REAR_SHEET_FACTOR[material]
    v_low, v_high = RYAN_REGIME_LIMITS[material]
    front = front_thickness + RYAN_MLI_FACTOR * mli_areal_density / RYAN_REFERENCE_DENSITY
    cos_angle = np.cos(np.radians(angle))
    delta = ryan_angle_exponent(cos_angle, material)

    def low_speed(v):
        resisting = rear_thickness / k_rear * np.sqrt(sigma_ksi / 40.0) + front
        return (resisting / (0.6 * cos_angle**delta * np.sqrt(density) * v ** (2.0 / 3.0))
                ) ** (18.0 / 19.0)

    def high_speed(v):
        return (
            1.155 * core_thickness ** (1.0 / 3.0) * rear_thickness ** (2.0 / 3.0)
            * (sigma_ksi / 70.0) ** (1.0 / 3.0)
            / (RYAN_HYPERVELOCITY_FACTOR ** (2.0 / 3.0) * density ** (1.0 / 3.0)
               * front_density ** (1.0 / 9.0) * v ** (2.0 / 3.0) * cos_angle**delta)
        )

    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        critical = _three_regimes(velocity, v_low / cos_angle, v_high / cos_angle,
                                  low_speed, high_speed)
    return _finish(critical, velocity, angle)


_RYAN_NOTES = r"""
    With :math:`t_f, \rho_f` the front sheet's (aluminium-equivalent) thickness and density,
    :math:`t_r` the rear sheet's, :math:`S` the core thickness, :math:`\sigma` the rear
    sheet's yield strength in ksi and :math:`m_{\mathrm{MLI}}` the areal density of a
    thermal blanket on the outside, the front sheet counts as
    :math:`t_f' = t_f + 3\, m_{\mathrm{MLI}} / 2.78`, and

    .. math::

        d_{\mathrm{LV}} = \left[\frac{t_r (\sigma/40)^{1/2} / K_{3S} + t_f'}
            {0.6 \cos^{\delta}\theta\, \rho_p^{1/2} V^{2/3}}\right]^{18/19},
        \qquad
        d_{\mathrm{HV}} = \frac{1.155\, S^{1/3} t_r^{2/3} (\sigma/70)^{1/3}}
            {K_{3D}^{2/3} \rho_p^{1/3} \rho_f^{1/9} V^{2/3} \cos^{\delta}\theta}

    below :math:`V_{LV}/\cos\theta` and above :math:`V_{HV}/\cos\theta` (i.e. on the normal
    component), with a straight line in :math:`V` between the two end equations evaluated at
    the limits (continuous by construction). :math:`K_{3D} = 0.4`; 1.155 is Christiansen's
    3.918 times :math:`0.16^{2/3}`, so the hypervelocity branch is the Whipple one with the
    rear-wall sizing constant 0.16 replaced by 0.4: a factor :math:`(0.16/0.4)^{2/3} = 0.543`
    on :math:`d_c`, the knock-down for the channelling of the debris cloud by the cells.

    **Provenance.** The form and every constant (0.4, 1.1/1.4, 4.2/8.4 and 3/7 km s⁻¹, the
    exponent δ, 2.78 g cm⁻³, 59.5 ksi, the MLI factor 3) were read in a
    second-hand transcription: an open-source library of ballistic-limit equations written
    by S. Ryan, a co-author of [1]_, whose code cites [1]_ (pyBLOSSUM, MIT licence, commit
    c9aa929);
    not on the printed pages of [1]_. The check against published tests
    (tests/reference/test_ryan_2008.py) uses shots of [2]_ and [3]_.
"""


def ryan_2008_aluminium(
    impact_velocity,
    impact_angle,
    projectile_density,
    front_sheet_thickness,
    front_sheet_density,
    core_thickness,
    rear_sheet_thickness,
    rear_sheet_yield_strength,
    mli_areal_density=0.0,
):
    r"""Critical diameter of an aluminium honeycomb sandwich panel (Ryan et al., 2008).

    Parameters
    ----------
    impact_velocity : numeric
        Impact speed [km s⁻¹]. Values ≤ 0 mean no impact and give ``inf``.
    impact_angle : numeric
        Impact angle from the surface normal [°], in [0, 180]. Angles ≥ 90 give ``inf``.
    projectile_density : numeric
        Density of the (spherical) projectile [g cm⁻³].
    front_sheet_thickness : numeric
        Front (outer) aluminium face-sheet thickness [cm].
    front_sheet_density : numeric
        Front face-sheet density [g cm⁻³].
    core_thickness : numeric
        Honeycomb core thickness, the spacing between the sheets [cm].
    rear_sheet_thickness : numeric
        Rear aluminium face-sheet thickness [cm].
    rear_sheet_yield_strength : numeric
        Rear face-sheet yield strength, 0.2 % offset [MPa].
    mli_areal_density : numeric, default 0
        Areal density of a thermal blanket (MLI) on the front sheet [g cm⁻²]; 0 for none.

    Returns
    -------
    numpy.ndarray
        Critical projectile diameter [cm] for perforation of the rear face sheet; float64,
        broadcast shape of the arguments. ``inf`` where there is no impact, NaN where an
        impact condition is NaN.

    Raises
    ------
    InputError
        If a sheet or core parameter or ``projectile_density`` is not positive and finite, if
        ``mli_areal_density`` is negative, if ``impact_angle`` is outside [0, 180] or if
        ``impact_velocity`` is infinite.

    Notes
    -----
    Aluminium face sheets: :math:`K_{3S} = 1.4`, :math:`V_{LV} = 3`,
    :math:`V_{HV} = 7` km s⁻¹, :math:`\delta = 5/4` for 45° < θ < 65° and 4/3 elsewhere, so
    :math:`d_c` jumps where δ changes (by about −3 % at 45° and +7 % at 65° in the
    end branches); the source fits it so.
{ryan}
    **Validity range.** Aluminium projectiles on panels of a few tenths of a millimetre to
    about 2 mm face sheets and 1–5 cm cores, test speeds up to about 7–8 km s⁻¹, angles up to
    about 60–70° (test base of [1]_–[3]_, from the shots listed with the transcription).
    At low speed (below about 3 km s⁻¹) the equation is very conservative: a shot of [3]_
    that did not perforate at 1.56 km s⁻¹ was 1.5 times the predicted d_c. Outside the range
    the formulas are evaluated without clipping; :meth:`pockmark.ballistics.Shield.out_of_range`
    flags such impacts.

    See Also
    --------
    ryan_2008_cfrp : The same equation for CFRP face sheets.
    sandwich_summed_face_sheets : A conservative bound without a fitted equation.
    pockmark.ballistics.schafer_2008_aluminium : A panel with equipment behind it.

    References
    ----------
    .. [1] S. Ryan, F. Schäfer, R. Destefanis and M. Lambert, "A ballistic limit equation for
       hypervelocity impacts on composite honeycomb sandwich panel satellite structures,"
       Adv. Space Res., vol. 41, pp. 1152–1166, 2008. :doi:`10.1016/j.asr.2007.02.032`
    .. [2] M. Lambert, F. K. Schäfer and T. Geyer, "Impact damage on sandwich panels and
       multi-layer insulation," Int. J. Impact Eng., vol. 26, pp. 369–380, 2001.
    .. [3] B. Turner et al., test series on aluminium honeycomb panels, Int. J. Impact Eng.,
       2001 (shots as compiled with the transcription; full citation not read).

    Examples
    --------
    >>> from pockmark.ballistics import ryan_2008_aluminium
    >>> float(ryan_2008_aluminium(7.0, 0.0, 2.8, 0.04, 2.7, 2.54, 0.04, 275.8))
    ... # doctest: +ELLIPSIS
    0.048...
    """
    velocity, angle, density = _impact_conditions(
        impact_velocity, impact_angle, projectile_density
    )
    t_f = require_positive("front_sheet_thickness", front_sheet_thickness, "cm")
    rho_f = require_positive("front_sheet_density", front_sheet_density, "g cm⁻³")
    s = require_positive("core_thickness", core_thickness, "cm")
    t_r = require_positive("rear_sheet_thickness", rear_sheet_thickness, "cm")
    sigma = require_positive("rear_sheet_yield_strength", rear_sheet_yield_strength, "MPa")
    mli = require_nonnegative("mli_areal_density", mli_areal_density, "g cm⁻²")
    return _ryan_panel(velocity, angle, density, t_f, rho_f, s, t_r, sigma / KSI_IN_MPA, mli,
                       "aluminium")


def ryan_2008_cfrp(
    impact_velocity,
    impact_angle,
    projectile_density,
    front_sheet_thickness,
    front_sheet_density,
    core_thickness,
    rear_sheet_thickness,
    rear_sheet_density,
    mli_areal_density=0.0,
):
    r"""Critical diameter of a CFRP / aluminium-honeycomb sandwich panel (Ryan et al., 2008).

    Parameters
    ----------
    impact_velocity : numeric
        Impact speed [km s⁻¹]. Values ≤ 0 mean no impact and give ``inf``.
    impact_angle : numeric
        Impact angle from the surface normal [°], in [0, 180]. Angles ≥ 90 give ``inf``.
    projectile_density : numeric
        Density of the (spherical) projectile [g cm⁻³].
    front_sheet_thickness, rear_sheet_thickness : numeric
        CFRP face-sheet thicknesses [cm].
    front_sheet_density, rear_sheet_density : numeric
        CFRP face-sheet densities [g cm⁻³].
    core_thickness : numeric
        Honeycomb core thickness [cm].
    mli_areal_density : numeric, default 0
        Areal density of a thermal blanket (MLI) on the front sheet [g cm⁻²]; 0 for none.

    Returns
    -------
    numpy.ndarray
        Critical projectile diameter [cm] for perforation of the rear face sheet; float64,
        broadcast shape of the arguments. ``inf`` where there is no impact, NaN where an
        impact condition is NaN.

    Raises
    ------
    InputError
        As :func:`ryan_2008_aluminium`.

    Notes
    -----
    CFRP sheets enter as aluminium of the reference alloy (AA2024-T81, 2.78 g cm⁻³,
    59.5 ksi) of the same areal density: :math:`t = t_{\mathrm{CFRP}}\rho_{\mathrm{CFRP}}
    / 2.78`, :math:`\rho_f = 2.78`, :math:`\sigma = 59.5` ksi. :math:`K_{3S} = 1.1`,
    :math:`V_{LV} = 4.2`, :math:`V_{HV} = 8.4` km s⁻¹ and :math:`\delta = 4/3`.
{ryan}
    **Validity range.** Aluminium projectiles on CFRP sheets of about 0.4–2 mm over 2–5 cm
    aluminium cores, test speeds up to about 7 km s⁻¹ (the hypervelocity branch, above
    8.4 km s⁻¹ normal, rests on no test), angles up to about 60–75°. Evaluated without
    clipping outside it.

    See Also
    --------
    ryan_2008_aluminium : The same equation for aluminium face sheets.

    References
    ----------
    .. [1] S. Ryan, F. Schäfer, R. Destefanis and M. Lambert, "A ballistic limit equation for
       hypervelocity impacts on composite honeycomb sandwich panel satellite structures,"
       Adv. Space Res., vol. 41, pp. 1152–1166, 2008. :doi:`10.1016/j.asr.2007.02.032`
    .. [2] E. A. Taylor et al., CFRP/aluminium-honeycomb impact tests, Int. J. Impact Eng.,
       vol. 23, pp. 883–893, 1999 (citation details from memory).
    .. [3] M. Lambert, F. K. Schäfer and T. Geyer, "Impact damage on sandwich panels and
       multi-layer insulation," Int. J. Impact Eng., vol. 26, pp. 369–380, 2001.

    Examples
    --------
    >>> from pockmark.ballistics import ryan_2008_cfrp
    >>> float(ryan_2008_cfrp(5.0, 0.0, 2.8, 0.162, 1.83, 4.5, 0.162, 1.83))
    ... # doctest: +ELLIPSIS
    0.10...
    """
    velocity, angle, density = _impact_conditions(
        impact_velocity, impact_angle, projectile_density
    )
    t_f = require_positive("front_sheet_thickness", front_sheet_thickness, "cm")
    rho_f = require_positive("front_sheet_density", front_sheet_density, "g cm⁻³")
    s = require_positive("core_thickness", core_thickness, "cm")
    t_r = require_positive("rear_sheet_thickness", rear_sheet_thickness, "cm")
    rho_r = require_positive("rear_sheet_density", rear_sheet_density, "g cm⁻³")
    mli = require_nonnegative("mli_areal_density", mli_areal_density, "g cm⁻²")
    reference = RYAN_REFERENCE_DENSITY
    return _ryan_panel(velocity, angle, density, t_f * rho_f / reference, reference, s,
                       t_r * rho_r / reference, RYAN_REFERENCE_YIELD_KSI, mli, "cfrp")

# The two panels share one statement of the equation and its provenance.
for _function in (ryan_2008_aluminium, ryan_2008_cfrp):
    _function.__doc__ = _function.__doc__.replace("{ryan}\n", _RYAN_NOTES.lstrip("\n"))
del _function
