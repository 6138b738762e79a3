"""Reference kinematics computed without mechgraph's solver.

Three independent routes to the numbers mechgraph must reproduce:

* **closed forms** from the textbooks: the four-bar position by the half-angle
  solution of Freudenstein's equation and its angular velocities from the
  vector loop; the offset slider-crank (derived here, in-line as the special
  case ``e = 0``);
* a **plain sympy derivation**: write the loop-closure equations, differentiate
  them in time, solve the linear velocity equations (positions from sympy's
  own solution of the circle/line intersections);
* **instant centers by line intersection** of the joint positions with numpy.

Nothing here imports mechgraph.  Angles are in radians, measured
counter-clockwise from the +x axis; the four-bar ground pivots are
``O2 = (0, 0)`` and ``O4 = (d, 0)``; the slider-crank's crank pivot is the
origin and the slider pin runs on the line ``y = e``.

Link numbering (the textbooks' convention): 1 ground, 2 crank, 3 coupler (or
connecting rod), 4 rocker (or slider).
"""

from __future__ import annotations

import math
from functools import lru_cache
from typing import NamedTuple

import numpy as np

__all__ = [
    "FourBarState",
    "SliderCrankState",
    "fourbar_position",
    "freudenstein_residual",
    "fourbar_velocity",
    "fourbar_joints",
    "line_intersection",
    "fourbar_instant_centers",
    "slider_crank_position",
    "slider_crank_velocity",
    "inline_slider_velocity",
    "slider_crank_instant_centers",
    "sympy_fourbar",
    "sympy_slider_crank",
]

CIRCUITS = ("open", "crossed")


class FourBarState(NamedTuple):
    """Position and velocity of a four-bar: coupler and rocker angles and rates."""

    th3: float
    th4: float
    w3: float
    w4: float


class SliderCrankState(NamedTuple):
    """Position and velocity of a slider-crank: slider position, rod angle and rate, slider speed."""

    x: float
    th3: float
    w3: float
    v: float


def _wrap(angle: float) -> float:
    """Angle in (-pi, pi]."""
    return math.atan2(math.sin(angle), math.cos(angle))


def _circuit_sign(circuit: str) -> int:
    if circuit not in CIRCUITS:
        raise ValueError(f"circuit must be one of {CIRCUITS}, got {circuit!r}")
    return -1 if circuit == "open" else 1


# --------------------------------------------------------------------- four-bar
def fourbar_position(a: float, b: float, c: float, d: float, th2: float, circuit: str = "open") -> tuple[float, float]:
    """Coupler and rocker angles of a four-bar by the half-angle solution of Freudenstein's equation.

    Parameters
    ----------
    a, b, c, d : float
        Crank, coupler, rocker and ground lengths.
    th2 : float
        Crank angle (rad) from the ground line O2 -> O4.
    circuit : {"open", "crossed"}, default "open"
        Assembly: the minus (open) or plus (crossed) sign of the square root.

    Returns
    -------
    th3, th4 : float
        Coupler angle (direction A -> B) and rocker angle (direction O4 -> B),
        in (-pi, pi].

    Raises
    ------
    ValueError
        If the linkage cannot be assembled at ``th2`` (negative discriminant)
        or ``circuit`` is unknown.

    Examples
    --------
    >>> th3, th4 = fourbar_position(40, 120, 80, 100, math.radians(40))
    >>> round(math.degrees(th3), 3), round(math.degrees(th4), 3)
    (20.298, 57.325)

    Notes
    -----
    Freudenstein's equation ``K1 cos th4 - K2 cos th2 + K3 = cos(th2 - th4)``
    with ``K1 = d/a``, ``K2 = d/c``, ``K3 = (a^2 - b^2 + c^2 + d^2) / (2 a c)``
    becomes, with ``t = tan(th4 / 2)``, the quadratic ``A t^2 + B t + C = 0``,
    ``A = cos th2 - K1 - K2 cos th2 + K3``, ``B = -2 sin th2``,
    ``C = K1 - (K2 + 1) cos th2 + K3``; so
    ``th4 = 2 atan2(-B -/+ sqrt(B^2 - 4 A C), 2 A)``, minus for the open
    circuit.  The coupler angle then follows from the vector loop, as the
    direction of ``B - A``.  On a Grashof crank-rocker the open circuit has
    ``sin(th4 - th3) > 0`` at every crank angle (checked in the tests against
    the geometric choice made by :func:`sympy_fourbar`).

    References
    ----------
    Ghosal, A., "The Freudenstein Equation", *Resonance*, August 2010 (the
    equation and its constants).  Norton, R. L., *Design of Machinery*,
    McGraw-Hill, analytical position analysis of the fourbar (the half-angle
    solution and the open/crossed sign; from memory).
    """
    sigma = _circuit_sign(circuit)
    k1, k2 = d / a, d / c
    k3 = (a * a - b * b + c * c + d * d) / (2.0 * a * c)
    c2, s2 = math.cos(th2), math.sin(th2)
    qa = c2 - k1 - k2 * c2 + k3
    qb = -2.0 * s2
    qc = k1 - (k2 + 1.0) * c2 + k3
    disc = qb * qb - 4.0 * qa * qc
    if disc < 0.0:
        raise ValueError(f"the four-bar a={a}, b={b}, c={c}, d={d} cannot be assembled at th2={th2} rad")
    th4 = _wrap(2.0 * math.atan2(-qb + sigma * math.sqrt(disc), 2.0 * qa))
    ax, ay = a * c2, a * s2
    bx, by = d + c * math.cos(th4), c * math.sin(th4)
    th3 = math.atan2(by - ay, bx - ax)
    return th3, th4


def freudenstein_residual(a: float, b: float, c: float, d: float, th2: float, th4: float) -> float:
    """Residual of Freudenstein's equation, ``K1 cos th4 - K2 cos th2 + K3 - cos(th2 - th4)``.

    Parameters
    ----------
    a, b, c, d : float
        Crank, coupler, rocker and ground lengths.
    th2, th4 : float
        Crank and rocker angles (rad).

    Returns
    -------
    float
        Zero (to rounding) for an assembled position.

    Examples
    --------
    >>> th3, th4 = fourbar_position(40, 120, 80, 100, 0.7, "crossed")
    >>> abs(freudenstein_residual(40, 120, 80, 100, 0.7, th4)) < 1e-12
    True

    Notes
    -----
    Obtained by eliminating the coupler angle from the two scalar loop
    equations (square and add).

    References
    ----------
    Ghosal, A., "The Freudenstein Equation", *Resonance*, August 2010.
    """
    k1, k2 = d / a, d / c
    k3 = (a * a - b * b + c * c + d * d) / (2.0 * a * c)
    return k1 * math.cos(th4) - k2 * math.cos(th2) + k3 - math.cos(th2 - th4)


def fourbar_velocity(a: float, b: float, c: float, th2: float, th3: float, th4: float, w2: float) -> tuple[float, float]:
    """Coupler and rocker angular velocities of a four-bar from the vector loop.

    Parameters
    ----------
    a, b, c : float
        Crank, coupler and rocker lengths.
    th2, th3, th4 : float
        Crank, coupler and rocker angles (rad), e.g. from :func:`fourbar_position`.
    w2 : float
        Crank angular velocity (rad/s, counter-clockwise positive).

    Returns
    -------
    w3, w4 : float
        Coupler and rocker angular velocities (rad/s).

    Examples
    --------
    >>> th2 = math.radians(40)
    >>> th3, th4 = fourbar_position(40, 120, 80, 100, th2)
    >>> w3, w4 = fourbar_velocity(40, 120, 80, th2, th3, th4, 25.0)
    >>> round(w3, 4), round(w4, 4)
    (-4.1209, 6.998)

    Notes
    -----
    ``w3 = a w2 sin(th4 - th2) / (b sin(th3 - th4))`` and
    ``w4 = a w2 sin(th2 - th3) / (c sin(th4 - th3))``: the time derivative of
    the loop ``a e2 + b e3 - c e4 - d e1 = 0``, solved by Cramer's rule.
    Singular at the toggle positions (``sin(th3 - th4) = 0``).

    References
    ----------
    Norton, R. L., *Design of Machinery*, McGraw-Hill, analytical velocity
    analysis of the fourbar (from memory); Uicker, J. J., Pennock, G. R. and
    Shigley, J. E., *Theory of Machines and Mechanisms*, Oxford University
    Press (from memory).
    """
    w3 = a * w2 * math.sin(th4 - th2) / (b * math.sin(th3 - th4))
    w4 = a * w2 * math.sin(th2 - th3) / (c * math.sin(th4 - th3))
    return w3, w4


def fourbar_joints(a: float, c: float, d: float, th2: float, th4: float) -> dict[str, np.ndarray]:
    """Joint positions of a four-bar with ``O2 = (0, 0)`` and ``O4 = (d, 0)``.

    Parameters
    ----------
    a, c, d : float
        Crank, rocker and ground lengths.
    th2, th4 : float
        Crank and rocker angles (rad).

    Returns
    -------
    dict of str to ndarray
        ``"O2"``, ``"A"`` (crank-coupler pin), ``"B"`` (coupler-rocker pin),
        ``"O4"``, each shape (2,).

    Examples
    --------
    >>> j = fourbar_joints(1.0, 1.0, 2.0, math.pi / 2, math.pi / 2)
    >>> [float(v) for v in j["B"]]
    [2.0, 1.0]

    Notes
    -----
    ``A = a (cos th2, sin th2)``, ``B = O4 + c (cos th4, sin th4)``.

    References
    ----------
    Vector-loop setup of any kinematics text, e.g. Norton, R. L., *Design of
    Machinery*, McGraw-Hill (from memory).
    """
    return {
        "O2": np.array([0.0, 0.0]),
        "A": np.array([a * math.cos(th2), a * math.sin(th2)]),
        "B": np.array([d + c * math.cos(th4), c * math.sin(th4)]),
        "O4": np.array([float(d), 0.0]),
    }


def line_intersection(p1, p2, q1, q2, *, parallel_tol: float = 1e-12) -> np.ndarray:
    """Meeting point of the line through ``p1, p2`` and the line through ``q1, q2``.

    Parameters
    ----------
    p1, p2, q1, q2 : array_like, shape (2,)
        Two distinct points on each line.
    parallel_tol : float, default 1e-12
        Lines whose direction sine is below this count as parallel.

    Returns
    -------
    ndarray, shape (2,)

    Raises
    ------
    ValueError
        If the lines are parallel (no finite meeting point).

    Examples
    --------
    >>> [float(v) for v in line_intersection((0, 0), (1, 1), (2, 0), (2, 5))]
    [2.0, 2.0]

    Notes
    -----
    Solves ``p1 + s (p2 - p1) = q1 + u (q2 - q1)`` for ``s, u`` with
    :func:`numpy.linalg.solve`.

    References
    ----------
    Elementary analytic geometry (common practice, no source).
    """
    p1, p2, q1, q2 = (np.asarray(v, dtype=float) for v in (p1, p2, q1, q2))
    u, v = p2 - p1, q2 - q1
    sine = (u[0] * v[1] - u[1] * v[0]) / (np.linalg.norm(u) * np.linalg.norm(v))
    if abs(sine) < parallel_tol:
        raise ValueError("the two lines are parallel; they meet at infinity")
    s = np.linalg.solve(np.column_stack([u, -v]), q1 - p1)[0]
    return p1 + s * u


def fourbar_instant_centers(O2, A, B, O4) -> dict[str, np.ndarray]:
    """All six instant centers of a four-bar from its joint positions.

    Parameters
    ----------
    O2, A, B, O4 : array_like, shape (2,)
        Ground pivot of the crank, crank-coupler pin, coupler-rocker pin,
        ground pivot of the rocker.

    Returns
    -------
    dict of str to ndarray
        ``"I12"``, ``"I23"``, ``"I34"``, ``"I14"`` (the pins) and the
        secondary centers ``"I13" = line O2A x line O4B`` and
        ``"I24" = line O2O4 x line AB``.

    Raises
    ------
    ValueError
        If a secondary center lies at infinity (parallel lines).

    Examples
    --------
    >>> ic = fourbar_instant_centers((0, 0), (0, 1), (3, 2), (2, 0))
    >>> [float(v) for v in ic["I13"]], [float(v) for v in ic["I24"]]
    ([0.0, -4.0], [-3.0, 0.0])

    Notes
    -----
    By the three-centers theorem I13 lies on the line I12-I23 and on the line
    I14-I34; I24 lies on the line I12-I14 and on the line I23-I34.

    References
    ----------
    Aronhold-Kennedy theorem (common practice, no source); e.g. Uicker, J. J.,
    Pennock, G. R. and Shigley, J. E., *Theory of Machines and Mechanisms*,
    Oxford University Press (from memory).
    """
    O2, A, B, O4 = (np.asarray(v, dtype=float) for v in (O2, A, B, O4))
    return {
        "I12": O2,
        "I23": A,
        "I34": B,
        "I14": O4,
        "I13": line_intersection(O2, A, O4, B),
        "I24": line_intersection(O2, O4, A, B),
    }


# --------------------------------------------------------------- slider-crank
def slider_crank_position(r: float, l: float, th: float, e: float = 0.0) -> tuple[float, float]:
    """Slider position and rod angle of an offset slider-crank.

    Parameters
    ----------
    r, l : float
        Crank and connecting-rod lengths.
    th : float
        Crank angle (rad) from +x; the crank pivot is the origin.
    e : float, default 0.0
        Offset: the slider pin runs on the line ``y = e`` (in-line when 0).

    Returns
    -------
    x : float
        Slider-pin abscissa, on the branch with the slider on the +x side of
        the crank pin (``cos th3 > 0``).
    th3 : float
        Rod angle (direction crank pin -> slider pin), in (-pi/2, pi/2).

    Raises
    ------
    ValueError
        If the rod cannot reach the guide line (``|e - r sin th| > l``).

    Examples
    --------
    >>> x, th3 = slider_crank_position(10, 20, math.radians(45))
    >>> round(x, 3)
    25.779

    Notes
    -----
    Loop closure ``r e(th) + l e(th3) = (x, e)``: ``sin th3 = (e - r sin th) / l``
    and ``x = r cos th + l cos th3``; with ``e = 0`` this is the textbook
    ``x = r cos th + sqrt(l^2 - r^2 sin^2 th)``.  Derived here; checked in
    the tests against :func:`sympy_slider_crank`.

    References
    ----------
    In-line case: Uicker, J. J., Pennock, G. R. and Shigley, J. E., *Theory of
    Machines and Mechanisms*, Oxford University Press (from memory).  Offset
    case: derived here from the loop closure.
    """
    s3 = (e - r * math.sin(th)) / l
    if abs(s3) > 1.0:
        raise ValueError(f"the rod l={l} cannot reach the guide y={e} at crank angle {th} rad")
    c3 = math.sqrt(1.0 - s3 * s3)
    return r * math.cos(th) + l * c3, math.atan2(s3, c3)


def slider_crank_velocity(r: float, l: float, th: float, w: float, e: float = 0.0) -> tuple[float, float]:
    """Rod angular velocity and slider velocity of an offset slider-crank.

    Parameters
    ----------
    r, l : float
        Crank and connecting-rod lengths.
    th : float
        Crank angle (rad).
    w : float
        Crank angular velocity (rad/s, counter-clockwise positive).
    e : float, default 0.0
        Offset of the guide line ``y = e``.

    Returns
    -------
    w3 : float
        Rod angular velocity (rad/s).
    v : float
        Slider velocity along +x (length units per second).

    Examples
    --------
    >>> w3, v = slider_crank_velocity(10, 20, math.radians(45), 1.0)
    >>> round(abs(w3), 3), round(abs(v), 3)
    (0.378, 9.744)

    Notes
    -----
    Differentiating ``r sin th + l sin th3 = e`` and ``x = r cos th + l cos th3``:
    ``w3 = -r w cos th / (l cos th3)`` and
    ``v = -r w sin(th - th3) / cos th3`` (branch of :func:`slider_crank_position`).
    Derived here; the in-line case agrees with :func:`inline_slider_velocity`.

    References
    ----------
    Derived here from the loop closure; in-line form in Uicker, J. J.,
    Pennock, G. R. and Shigley, J. E., *Theory of Machines and Mechanisms*,
    Oxford University Press (from memory).
    """
    _, th3 = slider_crank_position(r, l, th, e)
    c3 = math.cos(th3)
    w3 = -r * w * math.cos(th) / (l * c3)
    v = -r * w * math.sin(th - th3) / c3
    return w3, v


def inline_slider_velocity(r: float, l: float, th: float, w: float) -> float:
    """Slider velocity of an in-line slider-crank in the textbook form.

    Parameters
    ----------
    r, l : float
        Crank and connecting-rod lengths.
    th : float
        Crank angle (rad).
    w : float
        Crank angular velocity (rad/s).

    Returns
    -------
    float
        ``dx/dt = -r w (sin th + r sin 2th / (2 sqrt(l^2 - r^2 sin^2 th)))``.

    Examples
    --------
    >>> round(inline_slider_velocity(10, 20, math.radians(45), 1.0), 3)
    -9.744

    Notes
    -----
    The time derivative of ``x = r cos th + sqrt(l^2 - r^2 sin^2 th)``.

    References
    ----------
    Uicker, J. J., Pennock, G. R. and Shigley, J. E., *Theory of Machines and
    Mechanisms*, Oxford University Press (from memory).
    """
    root = math.sqrt(l * l - (r * math.sin(th)) ** 2)
    return -r * w * (math.sin(th) + r * math.sin(2.0 * th) / (2.0 * root))


def slider_crank_instant_centers(r: float, l: float, th: float, e: float = 0.0) -> dict[str, np.ndarray]:
    """Finite instant centers of an offset slider-crank by line intersection.

    Parameters
    ----------
    r, l : float
        Crank and connecting-rod lengths.
    th : float
        Crank angle (rad).
    e : float, default 0.0
        Offset of the guide line ``y = e`` (the guide runs along x).

    Returns
    -------
    dict of str to ndarray
        ``"I12"`` (crank pivot), ``"I23"`` (crank pin), ``"I34"`` (slider pin),
        ``"I13"`` and ``"I24"``.  ``I14`` lies at infinity in the direction
        perpendicular to the guide, here ``(0, 1)``, and is not listed.

    Raises
    ------
    ValueError
        If a secondary center lies at infinity (crank perpendicular to the guide).

    Examples
    --------
    >>> ic = slider_crank_instant_centers(10, 20, math.radians(45))
    >>> [round(float(v), 3) for v in ic["I13"]]
    [25.779, 25.779]

    Notes
    -----
    I13 lies on the line I12-I23 (the crank line) and on the line through I34
    toward I14, the perpendicular to the guide through the slider pin; I24
    lies on the perpendicular to the guide through I12 and on the line
    I23-I34 (the rod line).

    References
    ----------
    Aronhold-Kennedy theorem; a prismatic joint's center at infinity
    perpendicular to its axis (common practice, no source).
    """
    x, _ = slider_crank_position(r, l, th, e)
    O2 = np.array([0.0, 0.0])
    A = np.array([r * math.cos(th), r * math.sin(th)])
    B = np.array([x, float(e)])
    up = np.array([0.0, 1.0])
    return {
        "I12": O2,
        "I23": A,
        "I34": B,
        "I13": line_intersection(O2, A, B, B + up),
        "I24": line_intersection(O2, O2 + up, A, B),
    }


# ------------------------------------------------------------------- sympy
@lru_cache(maxsize=None)
def _fourbar_velocity_solution():
    """Symbolic w3, w4 from the time derivative of the four-bar loop closure (cached)."""
    import sympy as sp

    t = sp.Symbol("t")
    a, b, c, d = sp.symbols("a b c d", positive=True)
    q2, q3, q4, w2, w3, w4 = sp.symbols("q2 q3 q4 w2 w3 w4", real=True)
    f2, f3, f4 = (sp.Function(n)(t) for n in ("theta2", "theta3", "theta4"))
    loop = [
        a * sp.cos(f2) + b * sp.cos(f3) - c * sp.cos(f4) - d,
        a * sp.sin(f2) + b * sp.sin(f3) - c * sp.sin(f4),
    ]
    rates = {sp.Derivative(f2, t): w2, sp.Derivative(f3, t): w3, sp.Derivative(f4, t): w4}
    angles = {f2: q2, f3: q3, f4: q4}
    eqs = [sp.diff(g, t).subs(rates).subs(angles) for g in loop]
    sol = sp.solve(eqs, [w3, w4], dict=True)[0]
    return (a, b, c, d, q2, q3, q4, w2), (sol[w3], sol[w4])


@lru_cache(maxsize=None)
def _slider_velocity_solution():
    """Symbolic w3, dx/dt from the time derivative of the slider-crank loop closure (cached)."""
    import sympy as sp

    t = sp.Symbol("t")
    r, l = sp.symbols("r l", positive=True)
    e, q, q3, w, w3, v = sp.symbols("e q q3 w w3 v", real=True)
    f, f3, fx = (sp.Function(n)(t) for n in ("theta", "theta3", "x"))
    loop = [r * sp.cos(f) + l * sp.cos(f3) - fx, r * sp.sin(f) + l * sp.sin(f3) - e]
    rates = {sp.Derivative(f, t): w, sp.Derivative(f3, t): w3, sp.Derivative(fx, t): v}
    eqs = [sp.diff(g, t).subs(rates).subs({f: q, f3: q3}) for g in loop]
    sol = sp.solve(eqs, [w3, v], dict=True)[0]
    return (r, l, e, q, q3, w), (sol[w3], sol[v])


def sympy_fourbar(a: float, b: float, c: float, d: float, th2: float, w2: float, circuit: str = "open") -> FourBarState:
    """Four-bar position and velocity by a plain sympy loop-closure derivation.

    Parameters
    ----------
    a, b, c, d : float
        Crank, coupler, rocker and ground lengths.
    th2 : float
        Crank angle (rad).
    w2 : float
        Crank angular velocity (rad/s).
    circuit : {"open", "crossed"}, default "open"
        Open: the assembly with ``sin(th4 - th3) > 0`` (the rocker turned
        counter-clockwise from the coupler); crossed: the other one.

    Returns
    -------
    FourBarState
        ``th3, th4, w3, w4`` as floats.

    Raises
    ------
    ValueError
        If the linkage cannot be assembled at ``th2`` or ``circuit`` is unknown.

    Examples
    --------
    >>> s = sympy_fourbar(40, 120, 80, 100, math.radians(40), 25.0)
    >>> round(s.w3, 4), round(s.w4, 4)
    (-4.1209, 6.998)

    Notes
    -----
    Position: sympy solves the intersection of the circle of radius ``b``
    about ``A = a (cos th2, sin th2)`` with the circle of radius ``c`` about
    ``O4 = (d, 0)`` exactly (the inputs converted to exact rationals) and the
    assembly is chosen geometrically by the sign of the cross product of the
    coupler and rocker directions.  Velocity: the loop closure
    ``a e(th2) + b e(th3) - c e(th4) - d e(0) = 0`` is differentiated in time
    with sympy and the two linear equations solved for ``w3, w4`` (derived
    once, cached).  No closed form of this module is used.

    References
    ----------
    Loop-closure method of any kinematics text, e.g. Uicker, J. J., Pennock,
    G. R. and Shigley, J. E., *Theory of Machines and Mechanisms*, Oxford
    University Press (from memory); the algebra by sympy.
    """
    import sympy as sp

    sign = -_circuit_sign(circuit)  # +1 open, -1 crossed
    A = (sp.Rational(a * math.cos(th2)), sp.Rational(a * math.sin(th2)))
    aa, bb, cc, dd = (sp.Rational(v) for v in (a, b, c, d))
    x, y = sp.symbols("x y", real=True)
    sols = sp.solve([(x - A[0]) ** 2 + (y - A[1]) ** 2 - bb**2, (x - dd) ** 2 + y**2 - cc**2], [x, y], dict=True)
    chosen = None
    for s in sols:
        bx, by = sp.N(s[x], 30), sp.N(s[y], 30)
        if not (bx.is_real and by.is_real):
            continue
        # sin(th4 - th3) is the cross product of e3 = (B - A)/b and e4 = (B - O4)/c
        cross = (bx - A[0]) * by - (by - A[1]) * (bx - dd)
        if sp.sign(cross) == sign:
            chosen = (bx, by)
    if chosen is None:
        raise ValueError(f"the four-bar a={a}, b={b}, c={c}, d={d} cannot be assembled ({circuit}) at th2={th2} rad")
    bx, by = chosen
    q3 = sp.atan2(by - A[1], bx - A[0])
    q4 = sp.atan2(by, bx - dd)
    syms, (ew3, ew4) = _fourbar_velocity_solution()
    values = dict(zip(syms, (aa, bb, cc, dd, sp.Rational(th2), q3, q4, sp.Rational(w2))))
    return FourBarState(
        th3=float(sp.N(q3, 30)),
        th4=float(sp.N(q4, 30)),
        w3=float(sp.N(ew3.subs(values), 30)),
        w4=float(sp.N(ew4.subs(values), 30)),
    )


def sympy_slider_crank(r: float, l: float, th: float, w: float, e: float = 0.0) -> SliderCrankState:
    """Offset slider-crank position and velocity by a plain sympy loop-closure derivation.

    Parameters
    ----------
    r, l : float
        Crank and connecting-rod lengths.
    th : float
        Crank angle (rad); the crank pivot is the origin.
    w : float
        Crank angular velocity (rad/s).
    e : float, default 0.0
        Offset: the slider pin runs on ``y = e``.

    Returns
    -------
    SliderCrankState
        ``x, th3, w3, v`` as floats: slider-pin abscissa (the root on the +x
        side of the crank pin), rod angle and rate, slider velocity along +x.

    Raises
    ------
    ValueError
        If the rod cannot reach the guide line.

    Examples
    --------
    >>> s = sympy_slider_crank(10, 20, math.radians(45), 1.0)
    >>> round(s.x, 3), round(abs(s.w3), 3), round(abs(s.v), 3)
    (25.779, 0.378, 9.744)

    Notes
    -----
    Position: sympy solves ``(x - r cos th)^2 + (e - r sin th)^2 = l^2`` for
    ``x`` exactly (inputs as exact rationals).  Velocity: the loop closure
    ``r e(th) + l e(th3) - (x, e) = 0`` differentiated in time and solved for
    ``w3`` and ``dx/dt`` (derived once, cached).  No closed form of this
    module is used.

    References
    ----------
    Loop-closure method, e.g. Uicker, J. J., Pennock, G. R. and Shigley, J. E.,
    *Theory of Machines and Mechanisms*, Oxford University Press (from memory);
    the algebra by sympy.
    """
    import sympy as sp

    A = (sp.Rational(r * math.cos(th)), sp.Rational(r * math.sin(th)))
    rr, ll, ee = sp.Rational(r), sp.Rational(l), sp.Rational(e)
    x = sp.Symbol("x", real=True)
    roots = [sp.N(s, 30) for s in sp.solve((x - A[0]) ** 2 + (ee - A[1]) ** 2 - ll**2, x)]
    roots = [s for s in roots if s.is_real]
    if not roots:
        raise ValueError(f"the rod l={l} cannot reach the guide y={e} at crank angle {th} rad")
    xs = max(roots)
    q3 = sp.atan2(ee - A[1], xs - A[0])
    syms, (ew3, ev) = _slider_velocity_solution()
    values = dict(zip(syms, (rr, ll, ee, sp.Rational(th), q3, sp.Rational(w))))
    return SliderCrankState(
        x=float(xs),
        th3=float(sp.N(q3, 30)),
        w3=float(sp.N(ew3.subs(values), 30)),
        v=float(sp.N(ev.subs(values), 30)),
    )
