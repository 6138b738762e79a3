"""Homogeneous (projective) points and lines of the plane.

A point is a triple ``(x, y, w)``: the Cartesian point ``(x/w, y/w)`` when
``w != 0``, the point at infinity in direction ``(x, y)`` when ``w == 0``.
A line ``(a, b, c)`` is the set of points with ``a x + b y + c w = 0``.
The line through two points is their cross product, and so is the meeting
point of two lines; parallel lines meet at a point at infinity, and the line
through a finite point and a point at infinity is the parallel through the
finite point.  No case is special.

The functions here use only ``+``, ``-``, ``*`` (and ``abs`` / ``sqrt`` in the
float measures), so the constructions work on any number type: floats, exact
rationals, or multi-precision numbers.  Tests of "is zero" are never made
here: the caller passes a tolerance to the float measures
(:func:`point_separation`, :func:`line_separation`) or tests exact zero itself.
"""

from __future__ import annotations

import math
from typing import Sequence

__all__ = [
    "point",
    "direction",
    "cross",
    "dot",
    "join",
    "meet",
    "is_null",
    "to_cartesian",
    "normalized_point",
    "normalized_line",
    "point_separation",
    "line_separation",
    "line_angle_sine",
    "collinearity",
    "point_on_line",
    "translate_point",
    "translate_line",
]

Triple = tuple  # (x, y, w) of any number type

#: Points farther than this many units from the origin are kept in unit form
#: rather than as (x, y, 1): their squared coordinates would overflow doubles.
FAR_POINT = 1e100


def point(x, y) -> Triple:
    """Homogeneous form of the finite point ``(x, y)``.

    Parameters
    ----------
    x, y : number
        Cartesian coordinates, of any number type.

    Returns
    -------
    triple
        ``(x, y, 1)``, the ``1`` of the same number type as ``x``.

    Examples
    --------
    >>> point(2.0, 3.0)
    (2.0, 3.0, 1.0)

    Notes
    -----
    The weight is written ``x * 0 + 1`` so that it takes the number type of
    ``x`` (float, rational, multi-precision).  O(1).

    References
    ----------
    Homogeneous coordinates of the projective plane, with join and meet as
    cross products: Hartley, R. and Zisserman, A., *Multiple View Geometry in
    Computer Vision*, 2nd ed., Cambridge University Press, 2003, section 2.2
    (from memory).
    """
    return (x, y, x * 0 + 1)


def direction(dx, dy) -> Triple:
    """The point at infinity in direction ``(dx, dy)``.

    Parameters
    ----------
    dx, dy : number
        A direction, of any number type; its length and sign do not matter.

    Returns
    -------
    triple
        ``(dx, dy, 0)``, the ``0`` of the same number type as ``dx``.

    Examples
    --------
    >>> direction(0.0, 1.0)
    (0.0, 1.0, 0.0)

    Notes
    -----
    Every line parallel to ``(dx, dy)`` passes through this point.  O(1).

    References
    ----------
    Homogeneous coordinates of the projective plane, with join and meet as
    cross products: Hartley, R. and Zisserman, A., *Multiple View Geometry in
    Computer Vision*, 2nd ed., Cambridge University Press, 2003, section 2.2
    (from memory).
    """
    return (dx, dy, dx * 0)


def cross(p: Sequence, q: Sequence) -> Triple:
    """Cross product of two triples: the join of two points or the meet of two lines.

    Parameters
    ----------
    p, q : sequence of three numbers
        Two homogeneous points, or two homogeneous lines.

    Returns
    -------
    triple
        ``p x q``: the line through two points, or the point on two lines;
        the null triple when ``p`` and ``q`` are the same projective element.

    Examples
    --------
    >>> cross((1, 0, 0), (0, 1, 0))
    (0, 0, 1)

    Notes
    -----
    Three 2 x 2 minors: six products and three differences, O(1), in the
    number type of the inputs.

    References
    ----------
    Homogeneous coordinates of the projective plane, with join and meet as
    cross products: Hartley, R. and Zisserman, A., *Multiple View Geometry in
    Computer Vision*, 2nd ed., Cambridge University Press, 2003, section 2.2
    (from memory).
    """
    return (
        p[1] * q[2] - p[2] * q[1],
        p[2] * q[0] - p[0] * q[2],
        p[0] * q[1] - p[1] * q[0],
    )


def dot(p: Sequence, q: Sequence):
    """Scalar product of two triples (incidence of a point and a line when zero).

    Parameters
    ----------
    p, q : sequence of three numbers
        Typically a homogeneous point and a homogeneous line.

    Returns
    -------
    number
        ``p[0] q[0] + p[1] q[1] + p[2] q[2]``, in the number type of the inputs.

    Examples
    --------
    The point (1, 1) lies on the line x - y = 0:

    >>> dot((1.0, 1.0, 1.0), (1.0, -1.0, 0.0))
    0.0

    Notes
    -----
    Three products, O(1).  Exact zero means incidence only in exact
    arithmetic; for floats use :func:`point_on_line` with a tolerance.

    References
    ----------
    Homogeneous coordinates of the projective plane, with join and meet as
    cross products: Hartley, R. and Zisserman, A., *Multiple View Geometry in
    Computer Vision*, 2nd ed., Cambridge University Press, 2003, section 2.2
    (from memory).
    """
    return p[0] * q[0] + p[1] * q[1] + p[2] * q[2]


def join(p: Sequence, q: Sequence) -> Triple:
    """The line through points ``p`` and ``q`` (the null triple when they coincide).

    Parameters
    ----------
    p, q : sequence of three numbers
        Homogeneous points, finite or at infinity.

    Returns
    -------
    triple
        The homogeneous line ``(a, b, c)`` through both points.

    Examples
    --------
    The line through (0, 0) and (1, 1) is x - y = 0:

    >>> join((0.0, 0.0, 1.0), (1.0, 1.0, 1.0))
    (-1.0, 1.0, 0.0)

    A finite point and a point at infinity give the parallel through the point:

    >>> join((0.0, 2.0, 1.0), (1.0, 0.0, 0.0))
    (0.0, 1.0, -2.0)

    Notes
    -----
    The cross product ``p x q`` (:func:`cross`), O(1).

    References
    ----------
    Homogeneous coordinates of the projective plane, with join and meet as
    cross products: Hartley, R. and Zisserman, A., *Multiple View Geometry in
    Computer Vision*, 2nd ed., Cambridge University Press, 2003, section 2.2
    (from memory).
    """
    return cross(p, q)


def meet(l: Sequence, m: Sequence) -> Triple:
    """The meeting point of lines ``l`` and ``m`` (the null triple when they coincide).

    Parameters
    ----------
    l, m : sequence of three numbers
        Homogeneous lines ``(a, b, c)``.

    Returns
    -------
    triple
        The homogeneous point on both lines; at infinity (``w == 0``) when
        the lines are parallel.

    Examples
    --------
    Two parallel lines y = 0 and y = 1 meet at infinity along x:

    >>> meet((0.0, 1.0, 0.0), (0.0, 1.0, -1.0))
    (-1.0, 0.0, 0.0)

    Notes
    -----
    The cross product ``l x m`` (:func:`cross`), O(1).

    References
    ----------
    Homogeneous coordinates of the projective plane, with join and meet as
    cross products: Hartley, R. and Zisserman, A., *Multiple View Geometry in
    Computer Vision*, 2nd ed., Cambridge University Press, 2003, section 2.2
    (from memory).
    """
    return cross(l, m)


def translate_point(p: Sequence, dx, dy) -> Triple:
    """The point moved by ``(dx, dy)``; a point at infinity stays where it is.

    Parameters
    ----------
    p : sequence of three numbers
        Homogeneous point ``(x, y, w)``.
    dx, dy : number
        The translation.

    Returns
    -------
    triple
        ``(x + dx w, y + dy w, w)``: the same weight, so the same
        representative scaling as ``p``.

    Examples
    --------
    >>> translate_point((2.0, 4.0, 2.0), 1.0, 0.0)
    (4.0, 4.0, 2.0)
    >>> translate_point((1.0, 0.0, 0.0), 5.0, 5.0)
    (1.0, 0.0, 0.0)

    Notes
    -----
    The translation matrix applied to the homogeneous point, O(1).

    References
    ----------
    Homogeneous coordinates of the projective plane, with join and meet as
    cross products: Hartley, R. and Zisserman, A., *Multiple View Geometry in
    Computer Vision*, 2nd ed., Cambridge University Press, 2003, section 2.2
    (from memory).
    """
    return (p[0] + dx * p[2], p[1] + dy * p[2], p[2])


def translate_line(l: Sequence, dx, dy) -> Triple:
    """The line moved by ``(dx, dy)`` (every point of it moved so).

    Parameters
    ----------
    l : sequence of three numbers
        Homogeneous line ``(a, b, c)``.
    dx, dy : number
        The translation.

    Returns
    -------
    triple
        ``(a, b, c - a dx - b dy)``; the line at infinity stays where it is.

    Examples
    --------
    The line y = 1 moved up by 2 is y = 3:

    >>> translate_line((0.0, 1.0, -1.0), 0.0, 2.0)
    (0.0, 1.0, -3.0)

    Notes
    -----
    Lines transform by the inverse transpose of the point transformation;
    for a translation that changes ``c`` only.  O(1).

    References
    ----------
    Homogeneous coordinates of the projective plane, with join and meet as
    cross products: Hartley, R. and Zisserman, A., *Multiple View Geometry in
    Computer Vision*, 2nd ed., Cambridge University Press, 2003, section 2.2
    (from memory).
    """
    return (l[0], l[1], l[2] - l[0] * dx - l[1] * dy)


def is_null(t: Sequence) -> bool:
    """True when every coordinate of ``t`` is exactly zero (exact arithmetic).

    Parameters
    ----------
    t : sequence of three numbers
        A homogeneous point or line.

    Returns
    -------
    bool
        True for the null triple, which is neither a point nor a line (the
        join of a point with itself, the meet of a line with itself).

    Examples
    --------
    >>> is_null((0, 0, 0)), is_null((0, 0, 1))
    (True, False)

    Notes
    -----
    Three exact comparisons with zero, O(1); no tolerance, so for floats it
    is true only of exact zeros.  Float tests use the scale-free measures
    (:func:`point_separation`, :func:`line_separation`) with a tolerance.

    References
    ----------
    Common practice, no single source.
    """
    return t[0] == 0 and t[1] == 0 and t[2] == 0


def to_cartesian(p: Sequence, *, scale: float = 1.0, tol: float = 1e-12):
    """Cartesian coordinates of a float point, or ``None`` when it lies at infinity.

    Parameters
    ----------
    p : triple of float
        Homogeneous point.
    scale : float, default 1.0
        Size of the drawing; a point is at infinity when
        ``|w| * scale <= tol * hypot(x, y)``.
    tol : float, default 1e-12
        Relative tolerance of that test.

    Returns
    -------
    tuple of float or None
        ``(x / w, y / w)``, or ``None`` for a point at (or numerically at)
        infinity.

    Examples
    --------
    >>> to_cartesian((2.0, 4.0, 2.0))
    (1.0, 2.0)
    >>> to_cartesian((1.0, 0.0, 0.0)) is None
    True

    Notes
    -----
    One comparison and two divisions, O(1).  The test compares the
    point's distance from the origin with ``scale / tol``, so ``tol`` and
    ``scale`` together say how far is "at infinity".

    References
    ----------
    Common practice, no single source.
    """
    x, y, w = (float(c) for c in p)
    if abs(w) * scale <= tol * math.hypot(x, y):
        return None
    return (x / w, y / w)


def normalized_point(p: Sequence, *, scale: float = 1.0, origin=(0.0, 0.0)) -> tuple[float, float, float]:
    """Canonical representative of a float point.

    A finite point becomes ``(x/w, y/w, 1)``, so its Cartesian coordinates are
    read off exactly; a point at infinity (``w == 0``), or one farther than
    :data:`FAR_POINT` units, becomes the unit vector ``(x, y, w) / |(x, y, w)|``
    with its first non-zero coordinate of ``(w, x, y)`` positive.  Points that are the same projective point
    give the same triple.

    Parameters
    ----------
    p : sequence of three floats
        Homogeneous point.
    scale : float, default 1.0
        Accepted for symmetry with the other measures; does not change the result.
    origin : (float, float), default (0, 0)
        Accepted for symmetry with the other measures; does not change the result.

    Returns
    -------
    tuple of float
        ``(x/w, y/w, 1.0)`` or ``(dx, dy, 0.0)``.

    Raises
    ------
    ValueError
        If ``p`` is the null triple (not a point) or not finite.

    Examples
    --------
    >>> normalized_point((20.0, 0.0, 2.0))
    (10.0, 0.0, 1.0)
    >>> normalized_point((0.0, -3.0, 0.0))
    (0.0, 1.0, 0.0)

    Notes
    -----
    Two divisions (finite) or one ``hypot`` (at infinity), O(1).  Adding
    ``0.0`` turns a negative zero into a positive one, so equal points
    print alike.

    References
    ----------
    Common practice, no single source.
    """
    x, y, w = float(p[0]), float(p[1]), float(p[2])
    if not (math.isfinite(x) and math.isfinite(y) and math.isfinite(w)):
        raise ValueError(f"not a point: {tuple(p)!r}")
    if w != 0.0 and max(abs(x), abs(y)) <= FAR_POINT * abs(w):
        return (x / w + 0.0, y / w + 0.0, 1.0)
    # at, or numerically at, infinity: the unit representative keeps the (tiny) w
    n = math.sqrt(x * x + y * y + w * w)
    if n == 0.0:
        raise ValueError(f"not a point: {tuple(p)!r}")
    if (w if w != 0.0 else (x if x != 0.0 else y)) < 0.0:
        n = -n
    return (x / n + 0.0, y / n + 0.0, w / n + 0.0)


def normalized_line(l: Sequence, *, scale: float = 1.0, origin=(0.0, 0.0)) -> tuple[float, float, float]:
    """Canonical representative of a float line at a drawing scale (dual of :func:`normalized_point`).

    The line about ``origin``, its direction part times ``scale``, is a unit vector.

    Parameters
    ----------
    l : sequence of three floats
        Homogeneous line ``(a, b, c)``.
    scale : float, default 1.0
        Drawing size: the triple is divided by the norm of
        ``(a * scale, b * scale, c + a ox + b oy)``.
    origin : (float, float), default (0, 0)
        Drawing centre ``(ox, oy)``.

    Returns
    -------
    tuple of float
        ``l`` divided by that norm, signed so that its first non-zero
        coordinate is positive.

    Raises
    ------
    ValueError
        If ``l`` is the null triple (not a line) or not finite.

    Examples
    --------
    The line y = 2, written two ways:

    >>> normalized_line((0.0, 2.0, -4.0)) == normalized_line((0.0, -1.0, 2.0))
    True

    Notes
    -----
    One norm and three divisions, O(1).  The result may hold a negative
    zero (``-0.0``), which compares equal to ``0.0``.

    References
    ----------
    Common practice, no single source.
    """
    a, b, c = float(l[0]), float(l[1]), float(l[2])
    u = _sized_line_at((a, b, c), scale, origin)
    n = math.sqrt(dot(u, u))
    if n == 0.0 or not math.isfinite(n):
        raise ValueError(f"not a line: {tuple(l)!r}")
    key = a if a != 0.0 else (b if b != 0.0 else c)
    if key < 0.0:
        n = -n
    return (a / n, b / n, c / n)


def _sine(u: Sequence, v: Sequence) -> float:
    """Sine of the angle between two float triples (0 when either is null)."""
    c = cross(u, v)
    nu = math.sqrt(dot(u, u))
    nv = math.sqrt(dot(v, v))
    if nu == 0.0 or nv == 0.0:
        return 0.0
    return math.sqrt(dot(c, c)) / (nu * nv)


def point_separation(p: Sequence, q: Sequence, *, scale: float = 1.0, origin=(0.0, 0.0)) -> float:
    """Scale-free separation of two float points, finite or at infinity.

    It is the sine of the angle between the rays of ``(x/scale, y/scale, w)``
    and the same of ``q``.  For two finite points near the drawing it is close
    to their distance divided by ``scale``; for two points at infinity it is the
    sine of the angle between their directions; it is 0 only for the same
    projective point.  A null triple has separation 0 from everything.
    The measure is taken about ``origin`` (the drawing's centre), so it does
    not change when the whole drawing is moved together with its origin.

    Parameters
    ----------
    p, q : sequence of three floats
        Homogeneous points, finite or at infinity.
    scale : float, default 1.0
        Drawing size.
    origin : (float, float), default (0, 0)
        Drawing centre.

    Returns
    -------
    float
        In ``[0, 1]``; 0 for the same projective point.

    Examples
    --------
    >>> round(point_separation((0.0, 0.0, 1.0), (0.001, 0.0, 1.0), scale=1.0), 9)
    0.001
    >>> point_separation((1.0, 0.0, 0.0), (-2.0, 0.0, 0.0))
    0.0

    Notes
    -----
    ``|u x v| / (|u| |v|)`` of the two sized triples, O(1).  Being a sine,
    it does not depend on the sign or size of either representative.

    References
    ----------
    The sine of the angle between two vectors from the norm of their cross
    product: common practice, no single source.  The sizing about the
    drawing's centre is mechgraph's own.
    """
    return _sine(_sized_at(p, scale, origin), _sized_at(q, scale, origin))


def _sized_at(p: Sequence, scale: float, origin) -> tuple[float, float, float]:
    """``((x - ox w) / scale, (y - oy w) / scale, w)`` of a float point."""
    w = float(p[2])
    return ((float(p[0]) - origin[0] * w) / scale, (float(p[1]) - origin[1] * w) / scale, w)


def _sized_line_at(l: Sequence, scale: float, origin) -> tuple[float, float, float]:
    """The line about ``origin``, its direction part multiplied by ``scale``."""
    a, b = float(l[0]), float(l[1])
    c = float(l[2]) + a * origin[0] + b * origin[1]
    return (a * scale, b * scale, c)


def line_separation(l: Sequence, m: Sequence, *, scale: float = 1.0, origin=(0.0, 0.0)) -> float:
    """Scale-free separation of two float lines (0 when they coincide).

    The dual of :func:`point_separation`: the lines are rescaled to the drawing
    (``(a*scale, b*scale, c)``, about ``origin``) and the sine of the angle
    between the triples is returned.  Callers treat two lines whose separation
    is within their tolerance as one line, which locates no point.

    Parameters
    ----------
    l, m : sequence of three floats
        Homogeneous lines ``(a, b, c)``.
    scale : float, default 1.0
        Drawing size.
    origin : (float, float), default (0, 0)
        Drawing centre.

    Returns
    -------
    float
        In ``[0, 1]``; 0 for the same line.

    Examples
    --------
    >>> line_separation((0.0, 1.0, 0.0), (0.0, 2.0, 0.0))
    0.0
    >>> round(line_separation((0.0, 1.0, 0.0), (0.0, 1.0, -1e-3)), 9)
    0.001

    Notes
    -----
    ``|u x v| / (|u| |v|)`` of the two sized triples, O(1).

    References
    ----------
    The sine of the angle between two vectors from the norm of their cross
    product: common practice, no single source.  The sizing about the
    drawing's centre is mechgraph's own.
    """
    return _sine(_sized_line_at(l, scale, origin), _sized_line_at(m, scale, origin))


def line_angle_sine(l: Sequence, m: Sequence) -> float:
    """Sine of the angle at which two finite float lines cross (0 for parallel lines).

    The line at infinity has no direction; against it the result is 1.

    Parameters
    ----------
    l, m : sequence of three floats
        Homogeneous lines ``(a, b, c)``; only the normals ``(a, b)`` are used.

    Returns
    -------
    float
        ``|a1 b2 - a2 b1| / (|(a1, b1)| |(a2, b2)|)``, in ``[0, 1]``.

    Examples
    --------
    The lines x = 0 and x + y = 0 cross at 45 degrees:

    >>> round(line_angle_sine((1.0, 0.0, 0.0), (1.0, 1.0, 0.0)), 12)
    0.707106781187

    Notes
    -----
    Two ``hypot`` and one division, O(1).  Unlike :func:`line_separation` it
    does not depend on where the lines are, only on their directions.

    References
    ----------
    Common practice, no single source.
    """
    a1, b1 = float(l[0]), float(l[1])
    a2, b2 = float(m[0]), float(m[1])
    n1 = math.hypot(a1, b1)
    n2 = math.hypot(a2, b2)
    if n1 == 0.0 or n2 == 0.0:
        return 1.0
    return abs(a1 * b2 - a2 * b1) / (n1 * n2)


def collinearity(p: Sequence, q: Sequence, r: Sequence, *, scale: float = 1.0, origin=(0.0, 0.0)) -> float:
    """Scale-free collinearity residual of three float points (0 when collinear).

    The determinant of the three points sized at the drawing scale about
    ``origin`` (each ``((x - ox w)/scale, (y - oy w)/scale, w)`` made a unit
    vector): the volume of the parallelepiped they span, at most 1.  A null
    triple (undefined point) gives 0.

    Parameters
    ----------
    p, q, r : sequence of three floats
        Homogeneous points, finite or at infinity.
    scale : float, default 1.0
        Drawing size.
    origin : (float, float), default (0, 0)
        Drawing centre ``(ox, oy)``.

    Returns
    -------
    float
        In ``[0, 1]``; 0 when the three points lie on one line.

    Examples
    --------
    >>> collinearity((0.0, 0.0, 1.0), (1.0, 1.0, 1.0), (1.0, 1.0, 0.0))
    0.0

    Notes
    -----
    Three normalisations and one 3 x 3 determinant, O(1).  Three points are
    collinear exactly when the determinant of their homogeneous coordinates
    vanishes.

    References
    ----------
    Collinearity as a vanishing determinant: Hartley, R. and Zisserman, A.,
    *Multiple View Geometry in Computer Vision*, 2nd ed., Cambridge University
    Press, 2003, section 2.2 (from memory).  The unit sizing is mechgraph's own.
    """
    vs = [_unit(_sized_at(t, scale, origin)) for t in (p, q, r)]
    if any(v is None for v in vs):
        return 0.0
    return abs(dot(cross(vs[0], vs[1]), vs[2]))


def _unit(v):
    """``v`` divided by its norm, or ``None`` when the norm is zero or not finite."""
    n = math.sqrt(dot(v, v))
    if n == 0.0 or not math.isfinite(n):
        return None
    return (v[0] / n, v[1] / n, v[2] / n)


def point_on_line(p: Sequence, l: Sequence, *, scale: float = 1.0, origin=(0.0, 0.0)) -> float:
    """Scale-free incidence residual of a float point and line (0 when the point is on the line).

    Taken about ``origin`` like :func:`point_separation`.

    Parameters
    ----------
    p : sequence of three floats
        Homogeneous point.
    l : sequence of three floats
        Homogeneous line.
    scale : float, default 1.0
        Drawing size: the point is sized as in :func:`point_separation`, the
        line as in :func:`line_separation`.
    origin : (float, float), default (0, 0)
        Drawing centre.

    Returns
    -------
    float
        ``|u . v|`` of the two sized unit triples, in ``[0, 1]``; 0 also when
        either is null.

    Examples
    --------
    >>> point_on_line((1.0, 1.0, 1.0), (1.0, -1.0, 0.0))
    0.0

    Notes
    -----
    Two normalisations and a scalar product, O(1).  For a finite point near
    the drawing's centre and a line through the drawing, it is about the
    point's distance from the line divided by ``scale``.

    References
    ----------
    Incidence as a vanishing scalar product: common practice, no single source.
    """
    u = _unit(_sized_at(p, scale, origin))
    v = _unit(_sized_line_at(l, scale, origin))
    if u is None or v is None:
        return 0.0
    return abs(dot(u, v))
