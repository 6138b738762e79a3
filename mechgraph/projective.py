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
]

Triple = tuple  # (x, y, w) of any number type


def point(x, y) -> Triple:
    """Homogeneous form of the finite point ``(x, y)``.

    Examples
    --------
    >>> point(2.0, 3.0)
    (2.0, 3.0, 1.0)
    """
    return (x, y, x * 0 + 1)


def direction(dx, dy) -> Triple:
    """The point at infinity in direction ``(dx, dy)``.

    Examples
    --------
    >>> direction(0.0, 1.0)
    (0.0, 1.0, 0.0)
    """
    return (dx, dy, dx * 0)


def cross(p: Sequence, q: Sequence) -> Triple:
    """Cross product of two triples: the join of two points or the meet of two lines.

    Examples
    --------
    >>> cross((1, 0, 0), (0, 1, 0))
    (0, 0, 1)
    """
    return (
        p[1] * q[2] - p[2] * q[1],
        p[2] * q[0] - p[0] * q[2],
        p[0] * q[1] - p[1] * q[0],
    )


def dot(p: Sequence, q: Sequence):
    """Scalar product of two triples (incidence of a point and a line when zero)."""
    return p[0] * q[0] + p[1] * q[1] + p[2] * q[2]


def join(p: Sequence, q: Sequence) -> Triple:
    """The line through points ``p`` and ``q`` (the null triple when they coincide).

    Examples
    --------
    The line through (0, 0) and (1, 1) is x - y = 0:

    >>> join((0.0, 0.0, 1.0), (1.0, 1.0, 1.0))
    (-1.0, 1.0, 0.0)

    A finite point and a point at infinity give the parallel through the point:

    >>> join((0.0, 2.0, 1.0), (1.0, 0.0, 0.0))
    (0.0, 1.0, -2.0)
    """
    return cross(p, q)


def meet(l: Sequence, m: Sequence) -> Triple:
    """The meeting point of lines ``l`` and ``m`` (the null triple when they coincide).

    Examples
    --------
    Two parallel lines y = 0 and y = 1 meet at infinity along x:

    >>> meet((0.0, 1.0, 0.0), (0.0, 1.0, -1.0))
    (-1.0, 0.0, 0.0)
    """
    return cross(l, m)


def is_null(t: Sequence) -> bool:
    """True when every coordinate of ``t`` is exactly zero (exact arithmetic)."""
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
    """
    x, y, w = (float(c) for c in p)
    if abs(w) * scale <= tol * math.hypot(x, y):
        return None
    return (x / w, y / w)


def normalized_point(p: Sequence, *, scale: float = 1.0) -> tuple[float, float, float]:
    """Canonical representative of a float point, sized at a drawing scale.

    Returns the same projective point, divided so that ``(x/scale, y/scale, w)``
    is a unit vector and signed so that its first non-zero coordinate of
    ``(w, x, y)`` is positive.  Points that are the same projective point give
    the same triple, whether finite or at infinity, and the coordinates stay of
    drawing size however far the point lies.

    Raises
    ------
    ValueError
        If ``p`` is the null triple (not a point) or not finite.

    Examples
    --------
    >>> normalized_point((20.0, 0.0, 2.0), scale=10.0)
    (7.071067811865475, 0.0, 0.7071067811865475)
    """
    x, y, w = float(p[0]), float(p[1]), float(p[2])
    n = math.sqrt((x / scale) ** 2 + (y / scale) ** 2 + w * w)
    if n == 0.0 or not math.isfinite(n):
        raise ValueError(f"not a point: {tuple(p)!r}")
    key = w if w != 0.0 else (x if x != 0.0 else y)
    if key < 0.0:
        n = -n
    return (x / n, y / n, w / n)


def normalized_line(l: Sequence, *, scale: float = 1.0) -> tuple[float, float, float]:
    """Canonical representative of a float line at a drawing scale (dual of :func:`normalized_point`).

    ``(a*scale, b*scale, c)`` of the result is a unit vector.
    """
    a, b, c = float(l[0]), float(l[1]), float(l[2])
    n = math.sqrt((a * scale) ** 2 + (b * scale) ** 2 + c * c)
    if n == 0.0 or not math.isfinite(n):
        raise ValueError(f"not a line: {tuple(l)!r}")
    key = a if a != 0.0 else (b if b != 0.0 else c)
    if key < 0.0:
        n = -n
    return (a / n, b / n, c / n)


def _sine(u: Sequence, v: Sequence) -> float:
    c = cross(u, v)
    nu = math.sqrt(dot(u, u))
    nv = math.sqrt(dot(v, v))
    if nu == 0.0 or nv == 0.0:
        return 0.0
    return math.sqrt(dot(c, c)) / (nu * nv)


def point_separation(p: Sequence, q: Sequence, *, scale: float = 1.0) -> float:
    """Scale-free separation of two float points, finite or at infinity.

    It is the sine of the angle between the rays of ``(x/scale, y/scale, w)``
    and the same of ``q``.  For two finite points near the drawing it is close
    to their distance divided by ``scale``; for two points at infinity it is the
    sine of the angle between their directions; it is 0 only for the same
    projective point.  A null triple has separation 0 from everything.

    Examples
    --------
    >>> round(point_separation((0.0, 0.0, 1.0), (0.001, 0.0, 1.0), scale=1.0), 9)
    0.001
    >>> point_separation((1.0, 0.0, 0.0), (-2.0, 0.0, 0.0))
    0.0
    """
    u = (float(p[0]) / scale, float(p[1]) / scale, float(p[2]))
    v = (float(q[0]) / scale, float(q[1]) / scale, float(q[2]))
    return _sine(u, v)


def line_separation(l: Sequence, m: Sequence, *, scale: float = 1.0) -> float:
    """Scale-free separation of two float lines (0 when they coincide).

    The dual of :func:`point_separation`: the lines are rescaled to the drawing
    (``(a*scale, b*scale, c)``) and the sine of the angle between the triples is
    returned.  Two lines that coincide within ``tol`` locate no point.
    """
    u = (float(l[0]) * scale, float(l[1]) * scale, float(l[2]))
    v = (float(m[0]) * scale, float(m[1]) * scale, float(m[2]))
    return _sine(u, v)


def line_angle_sine(l: Sequence, m: Sequence) -> float:
    """Sine of the angle at which two finite float lines cross (0 for parallel lines).

    The line at infinity has no direction; against it the result is 1.
    """
    a1, b1 = float(l[0]), float(l[1])
    a2, b2 = float(m[0]), float(m[1])
    n1 = math.hypot(a1, b1)
    n2 = math.hypot(a2, b2)
    if n1 == 0.0 or n2 == 0.0:
        return 1.0
    return abs(a1 * b2 - a2 * b1) / (n1 * n2)


def collinearity(p: Sequence, q: Sequence, r: Sequence, *, scale: float = 1.0) -> float:
    """Scale-free collinearity residual of three float points (0 when collinear).

    The determinant of the three points sized at the drawing scale (each
    ``(x/scale, y/scale, w)`` a unit vector): the volume of the parallelepiped
    they span, at most 1.  A null triple (undefined point) gives 0.

    Examples
    --------
    >>> collinearity((0.0, 0.0, 1.0), (1.0, 1.0, 1.0), (1.0, 1.0, 0.0))
    0.0
    """
    try:
        u, v, w = (_sized(normalized_point(t, scale=scale), scale) for t in (p, q, r))
    except ValueError:
        return 0.0
    return abs(dot(cross(u, v), w))


def _sized(p, scale):
    return (p[0] / scale, p[1] / scale, p[2])


def point_on_line(p: Sequence, l: Sequence, *, scale: float = 1.0) -> float:
    """Scale-free incidence residual of a float point and line (0 when the point is on the line)."""
    try:
        u = _sized(normalized_point(p, scale=scale), scale)
        a, b, c = normalized_line(l, scale=scale)
    except ValueError:
        return 0.0
    return abs(u[0] * a * scale + u[1] * b * scale + u[2] * c)
