"""How far to trust each center: sensitivity to the drawing, ill-conditioning flags, trustworthy digits.

Two questions an engineer asks of a center found from a drawing:

* *How far does it move if my joint positions are off by the drawing
  tolerance?*  :func:`assess` moves every drawn joint point in x and in y by a
  small step, re-solves, and takes central differences: the Jacobian ``J`` of
  the center's position with respect to the drawing points.  If each drawn
  coordinate carries an independent error of standard deviation ``delta``, the
  center's position error has RMS ``delta * ||J||_F`` (Frobenius norm); that is
  the reported uncertainty.  For a center at infinity the direction's angle is
  differentiated instead.
* *Are the floating-point numbers themselves sound?*  A center located by two
  nearly parallel lines, or a velocity system close to singular (near a dead
  point), loses digits to round-off.  Where either indicator trips, the
  analysis is repeated in high precision and the number of digits the float
  result shares with it is reported.

References
----------
Sensitivity by central differences and the Frobenius-norm error propagation
of independent input errors: common practice, no single source.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace

import numpy as np

from . import projective as pg
from .analysis import Analysis, analyse
from .joints import GearMesh
from .model import Mechanism

__all__ = [
    "DEFAULT_RELATIVE_INPUT_TOL",
    "CenterTrust",
    "Conditioning",
    "drawing_points",
    "move_point",
    "assess",
    "velocity_condition",
    "PrecisionRecheck",
    "sound_digits",
    "recheck_near_dead_point",
]

#: Default input tolerance, as a share of the drawing size: 0.5 mm on a drawing on
#: which the mechanism spans 250 mm, a usual accuracy of a careful pencil
#: construction (common practice, no source).
DEFAULT_RELATIVE_INPUT_TOL = 0.002


def drawing_points(mech: Mechanism, *, tol: float | None = None) -> list[tuple[tuple[float, float], list]]:
    """The distinct drawn points of the joints, each with the joint fields that use it.

    Joint points that coincide (within ``tol``, default the mechanism's
    coincidence tolerance times its size) are one drawn point: a compound pin
    drawn once is moved as one.

    Returns
    -------
    list of ((x, y), [(joint index, field, item)])
        ``field`` is ``"at"``, ``"centers"`` (``item`` 0 or 1) or ``"pitch_point"``.
    """
    tol = mech.coincidence_tol * mech.scale if tol is None else tol
    points: list[tuple[tuple[float, float], list]] = []

    def add(p, use):
        for q, uses in points:
            if math.dist(p, q) <= tol:
                uses.append(use)
                return
        points.append(((float(p[0]), float(p[1])), [use]))

    for k, j in enumerate(mech.joints):
        if isinstance(j, GearMesh):
            add(j.centers[0], (k, "centers", 0))
            add(j.centers[1], (k, "centers", 1))
            if j.radii is None:
                add(j.pitch_point, (k, "pitch_point", None))
        else:
            add(j.at, (k, "at", None))
    return points


def move_point(mech: Mechanism, uses, dx: float, dy: float) -> Mechanism:
    """The mechanism with one drawn point (all joint fields in ``uses``) moved by ``(dx, dy)``."""
    joints = list(mech.joints)
    for k, field, item in uses:
        j = joints[k]
        if field == "centers":
            cs = list(j.centers)
            cs[item] = (cs[item][0] + dx, cs[item][1] + dy)
            joints[k] = replace(j, centers=tuple(cs), pitch_point=None if j.radii is not None else j.pitch_point)
        else:
            x, y = getattr(j, field)
            joints[k] = replace(j, **{field: (x + dx, y + dy)})
    return replace(mech, joints=tuple(joints))


def velocity_condition(mech: Mechanism, poses=None) -> float:
    """Reciprocal condition number of the driven velocity system (1 well-conditioned, 0 singular).

    Examples
    --------
    >>> from mechgraph.casefile import demo_mechanism
    >>> 0.0 < velocity_condition(demo_mechanism()) <= 1.0
    True
    """
    from .arithmetic import FLOAT
    from .velocity import _frame, _rows, _scatter

    frame = _frame(mech, poses, FLOAT)
    rows, _, col, ncols, L = _rows(mech, frame, FLOAT)
    for d in mech.drivers:
        j = mech.joint_by_name[d.joint]
        a, b = (mech.index[x] for x in j.links)
        rows += _scatter([j.driver_row(frame[a], frame[b])], a, b, col, ncols, L, FLOAT)
    A = np.asarray(rows, dtype=float)
    norms = np.linalg.norm(A, axis=1)
    norms[norms == 0.0] = 1.0
    s = np.linalg.svd(A / norms[:, None], compute_uv=False)
    return float(s[-1] / s[0]) if s.size and s[0] > 0 and len(s) >= ncols else 0.0


@dataclass(frozen=True)
class CenterTrust:
    """How far to trust one center.

    Attributes
    ----------
    pair : str
    at_infinity : bool
    sensitivity : float
        ``||J||_F``: drawing units moved per drawing unit of input error (for
        a center at infinity: radians of direction per drawing unit).
    uncertainty : float
        ``input_tol * sensitivity``: in drawing units, or radians at infinity.
    flags : tuple of str
        Plain-words warnings (nearly parallel lines, near-singular velocity system).
    digits : float or None
        Decimal digits the float result shares with a high-precision
        recomputation, where one was made.
    """

    pair: str
    at_infinity: bool
    sensitivity: float
    uncertainty: float
    flags: tuple
    digits: float | None


@dataclass(frozen=True)
class Conditioning:
    """Trust in every center of one analysis.

    Attributes
    ----------
    input_tol : float
        Input (drawing) tolerance used, in drawing units.
    input_tol_is_default : bool
        True when it is :data:`DEFAULT_RELATIVE_INPUT_TOL` of the drawing size.
    velocity_condition : float or None
        Reciprocal condition number of the driven velocity system.
    rechecked_in_precision : bool
        Whether a high-precision recomputation was made (an indicator tripped, or asked).
    centers : tuple of CenterTrust
    velocity_digits : dict
        Link name -> decimal digits its float angular velocity shares with the
        high-precision one (empty when no recomputation was made).
    """

    input_tol: float
    input_tol_is_default: bool
    velocity_condition: float | None
    rechecked_in_precision: bool
    centers: tuple
    velocity_digits: dict

    def trust(self, pair: str) -> CenterTrust:
        return next(c for c in self.centers if c.pair == pair)


#: A center farther than this many drawing sizes from the drawing centre is
#: judged by its direction only (seen from the centre): small drawing errors can
#: move such a center anywhere far along that direction, on either side.
FAR_SIZES = 1e3


def _positions(a: Analysis, L: float):
    """Per center: ('finite', x, y), or ('infinite', angle seen from the drawing centre), or None."""
    out = []
    cx, cy = a.mechanism.centre
    for c in a.centers:
        if c.point is None:
            out.append(None)
            continue
        xy = c.cartesian(L)
        if xy is not None and math.hypot(xy[0] - cx, xy[1] - cy) <= FAR_SIZES * L:
            out.append(("finite", xy[0], xy[1]))
        elif xy is not None:
            out.append(("infinite", math.atan2(xy[1] - cy, xy[0] - cx)))
        else:
            d = c.direction()
            out.append(("infinite", math.atan2(d[1], d[0])))
    return out


def _crossing_sine(a: Analysis, c) -> float | None:
    """Sine of the angle between the two lines that located a finite center (None otherwise)."""
    if c.point is None or c.cartesian(a.mechanism.scale) is None:
        return None
    if c.method == "relaxation" and a.relaxation is not None:
        found = a.relaxation.found.get((c.i, c.j))
        lines = [x.line for x in found.lines if getattr(x, "line", None) is not None] if found is not None else []
        return pg.line_angle_sine(lines[0], lines[1]) if len(lines) == 2 else None
    d = a.three_centers.derivation(c.i, c.j)
    if d is None or len(d.loci) != 2:
        return None
    return pg.line_angle_sine(d.loci[0].line, d.loci[1].line)


def _angle_diff(a: float, b: float) -> float:
    """a - b for directions (lines at infinity are unsigned: modulo pi)."""
    return (a - b + math.pi / 2) % math.pi - math.pi / 2


def assess(
    mech: Mechanism,
    analysis: Analysis | None = None,
    *,
    input_tol: float | None = None,
    step: float = 1e-6,
    min_crossing: float = math.sin(math.radians(5.0)),
    min_condition: float = 1e-6,
    precision_digits: int = 50,
    always_precision: bool = False,
) -> Conditioning:
    """Sensitivity, uncertainty and trustworthy digits of every center.

    Parameters
    ----------
    mech : Mechanism
    analysis : Analysis, optional
        The float analysis to assess; made here when not given.
    input_tol : float, optional
        Drawing tolerance in the mechanism's unit; default
        :data:`DEFAULT_RELATIVE_INPUT_TOL` times the drawing size (common
        practice, no source).
    step : float, default 1e-6
        Finite-difference step, as a share of the drawing size.
    min_crossing : float, default sin 5 deg
        A finite center whose two locating lines cross at an angle of smaller
        sine is flagged as ill-conditioned (a crossing under about 5 degrees is
        taken as poor in a graphical construction: common practice, no source).
    min_condition : float, default 1e-6
        A reciprocal condition number of the velocity system below this flags
        the position as near-singular (near a dead point).
    precision_digits : int, default 50
        Digits of the high-precision recomputation.
    always_precision : bool, default False
        Recompute in high precision even when no indicator trips.

    Returns
    -------
    Conditioning

    Raises
    ------
    ValueError
        A non-positive ``input_tol`` or ``step``.

    Examples
    --------
    >>> from mechgraph.casefile import demo_mechanism
    >>> c = assess(demo_mechanism())
    >>> c.input_tol_is_default, len(c.centers)
    (True, 15)
    >>> round(c.trust("frame-crank").sensitivity, 6)    # a pin moves with its own point: |I|_F = sqrt 2
    1.414214

    Notes
    -----
    Two analyses per drawn point and direction (central differences):
    O(p n^3) for p drawn points and n links, plus one high-precision analysis
    where an indicator trips.
    """
    L = mech.scale
    if input_tol is None:
        tol, is_default = DEFAULT_RELATIVE_INPUT_TOL * L, True
    else:
        if not (input_tol > 0.0):
            raise ValueError(f"input_tol must be positive, got {input_tol!r}")
        tol, is_default = float(input_tol), False
    if not (step > 0.0):
        raise ValueError(f"step must be positive, got {step!r}")
    velocities = bool(mech.drivers)
    base = analysis if analysis is not None else analyse(mech, velocities=velocities)
    pos0 = _positions(base, L)
    h = step * L
    npairs = len(base.centers)
    jac: list[list[float]] = [[] for _ in range(npairs)]
    for _, uses in drawing_points(mech):
        for dx, dy in ((h, 0.0), (0.0, h)):
            plus = _positions(analyse(move_point(mech, uses, dx, dy), velocities=velocities), L)
            minus = _positions(analyse(move_point(mech, uses, -dx, -dy), velocities=velocities), L)
            for q in range(npairs):
                p0, pp, pm = pos0[q], plus[q], minus[q]
                if p0 is None or pp is None or pm is None or pp[0] != pm[0]:
                    jac[q].append(math.inf)
                    continue
                if pp[0] == "finite":
                    jac[q] += [(pp[1] - pm[1]) / (2 * h), (pp[2] - pm[2]) / (2 * h)]
                else:
                    jac[q].append(_angle_diff(pp[1], pm[1]) / (2 * h))
    cond = velocity_condition(mech) if velocities else None
    near_singular = cond is not None and cond < min_condition
    angles = [_crossing_sine(base, c) for c in base.centers]
    weak = [a is not None and a < min_crossing for a in angles]
    recheck = always_precision or near_singular or any(weak)
    digits: list[float | None] = [None] * npairs
    vdigits: dict[str, float] = {}
    if recheck and velocities:
        digits, vdigits = sound_digits(mech, base, digits=precision_digits)
    out = []
    for q, c in enumerate(base.centers):
        row = np.asarray(jac[q], dtype=float)
        sens = float(np.sqrt(np.sum(row**2))) if row.size and np.all(np.isfinite(row)) else math.inf
        flags = []
        if pos0[q] is not None and pos0[q][0] == "infinite":
            flags.append(
                "at or near infinity: only its direction is meaningful; drawing errors can move it anywhere far "
                "along that direction, on either side"
            )
        if weak[q]:
            flags.append(
                f"located by two lines crossing at {math.degrees(math.asin(min(1.0, angles[q]))):.3g} deg: "
                "ill-conditioned, small drawing errors move it far"
            )
        if near_singular and c.method in ("velocity",):
            flags.append("from a near-singular velocity system (close to a dead point)")
        if near_singular and not flags:
            flags.append("the position is close to a dead point (near-singular velocity system)")
        out.append(
            CenterTrust(
                pair=c.pair,
                at_infinity=pos0[q] is not None and pos0[q][0] == "infinite",
                sensitivity=sens,
                uncertainty=tol * sens,
                flags=tuple(flags),
                digits=digits[q],
            )
        )
    return Conditioning(
        input_tol=tol,
        input_tol_is_default=is_default,
        velocity_condition=cond,
        rechecked_in_precision=recheck and velocities,
        centers=tuple(out),
        velocity_digits=vdigits,
    )


@dataclass(frozen=True)
class PrecisionRecheck:
    """The float results compared with a high-precision recomputation (made near a dead point).

    Attributes
    ----------
    velocity_condition : float
        Reciprocal condition number that triggered it.
    digits : int
        Working digits of the recomputation.
    center_digits : dict
        Pair -> decimal digits the float center shares with it.
    velocity_digits : dict
        Link -> decimal digits the float angular velocity shares with it.
    """

    velocity_condition: float
    digits: int
    center_digits: dict
    velocity_digits: dict


def sound_digits(mech: Mechanism, base: Analysis, *, digits: int = 50):
    """Digits of each float center and angular velocity that a high-precision recomputation confirms.

    Parameters
    ----------
    mech : Mechanism
    base : Analysis
        The floating-point analysis.
    digits : int, default 50
        Working digits of the recomputation.

    Returns
    -------
    center_digits : list of float or None
        Per pair (None where a center is undefined).
    velocity_digits : dict
        Link name -> digits, relative to the largest angular velocity.

    Notes
    -----
    One analysis in ``digits``-digit arithmetic (:mod:`mechgraph.arithmetic`).
    """
    L = mech.scale
    precise = analyse(mech, arithmetic="precision", digits=digits)
    cdig: list[float | None] = [None] * len(base.centers)
    for q, (cf, cp) in enumerate(zip(base.centers, precise.centers)):
        if cf.point is not None and cp.point is not None:
            cdig[q] = _digits(pg.point_separation(cf.point, cp.point, scale=L, origin=mech.centre))
    vdig: dict[str, float] = {}
    ar = precise.velocity.arithmetic
    wmax = max((abs(ar.to_float(t[0])) for t in precise.velocity.kind_twists), default=0.0)
    for i, name in enumerate(mech.link_names):
        if i == mech.ground_index or wmax == 0.0:
            continue
        err = abs(ar.to_float(ar.num(float(base.velocity.twists[i, 0])) - precise.velocity.kind_twists[i][0])) / wmax
        vdig[name] = _digits(err)
    return cdig, vdig


def recheck_near_dead_point(
    mech: Mechanism, base: Analysis, *, min_condition: float = 1e-6, digits: int = 50
) -> PrecisionRecheck | None:
    """Recompute in high precision when the velocity system is near-singular; None when it is not.

    Parameters
    ----------
    mech : Mechanism
    base : Analysis
        The floating-point analysis (with velocities).
    min_condition : float, default 1e-6
        Reciprocal condition number below which the position counts as near a dead point.
    digits : int, default 50

    Returns
    -------
    PrecisionRecheck or None

    Examples
    --------
    >>> from mechgraph.analysis import analyse
    >>> from mechgraph.casefile import demo_mechanism
    >>> m = demo_mechanism()
    >>> recheck_near_dead_point(m, analyse(m)) is None     # well away from any dead point
    True

    Notes
    -----
    One SVD for the condition number; one high-precision analysis when it trips.
    """
    if base.velocity is None or not mech.drivers:
        return None
    cond = velocity_condition(mech)
    if cond >= min_condition:
        return None
    cdig, vdig = sound_digits(mech, base, digits=digits)
    return PrecisionRecheck(
        velocity_condition=cond,
        digits=digits,
        center_digits={c.pair: d for c, d in zip(base.centers, cdig) if d is not None},
        velocity_digits=vdig,
    )


def _digits(relative_error: float) -> float:
    """Decimal digits shared, from a relative error (16 for agreement to double precision)."""
    return 16.0 if relative_error <= 1e-16 else max(0.0, min(16.0, -math.log10(relative_error)))
