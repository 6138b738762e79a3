"""The built-in cross-check: both methods against each other, and every link triple against the theorem.

Two measures, both scale-free (see :func:`mechgraph.projective.point_separation`):

* for every pair located by both the three-centers solver and the velocity
  analysis, the separation of the two results (about distance / drawing size
  for finite centers, the sine of the angle between directions at infinity);
* for every triple of links, the collinearity residual of its three centers
  (Aronhold-Kennedy), the determinant of their unit representatives.

The two methods share the joint geometry, so agreement checks the code that
implements them; the physical checks against outside references live in
``tests/`` and ``validation/``.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from . import projective as pg

__all__ = ["PairCheck", "CrossCheck", "compare_centers", "collinearity_residuals", "DEFAULT_AGREE_TOL", "REPORT_FAR"]

#: Default agreement tolerance of the cross-check (scale-free separation).
#: Float results of well-conditioned constructions agree to about 1e-12;
#: 1e-6 of the drawing size (a micrometre on a metre-sized drawing) leaves room
#: for poorly conditioned ones while still catching any real error.
DEFAULT_AGREE_TOL = 1e-6

#: Default range, in drawing sizes from the drawing's centre, beyond which
#: :func:`compare_centers` reports a disagreement by angle instead of distance.
#: It is ``1 / DEFAULT_AGREE_TOL``: a finite center that far away and the point
#: at infinity in its direction are about ``1 / REPORT_FAR`` apart in the
#: scale-free separation, so there a distance says nothing the direction does not.
REPORT_FAR = 1e6


@dataclass(frozen=True)
class PairCheck:
    """Agreement of the two methods on one pair.

    Attributes
    ----------
    separation : float
        Scale-free separation of the two centers.
    distance : float or None
        Distance in drawing units when both are finite points.
    angle_deg : float or None
        Angle between directions when either lies at (or near) infinity.
    passed : bool
        True when the separation is within the tolerance.

    Examples
    --------
    >>> compare_centers((1.0, 2.0, 1.0), (1.0, 2.0, 1.0), scale=10.0)
    PairCheck(separation=0.0, distance=0.0, angle_deg=None, passed=True)

    Notes
    -----
    Built by :func:`compare_centers`; a frozen record.

    References
    ----------
    Common practice, no single source.
    """

    separation: float
    distance: float | None
    angle_deg: float | None
    passed: bool


def compare_centers(
    p, q, *, scale: float, origin=(0.0, 0.0), tol: float = DEFAULT_AGREE_TOL, far: float = REPORT_FAR
) -> PairCheck:
    """Compare two homogeneous centers of one pair.

    Parameters
    ----------
    p, q : triple
        The two centers.
    scale : float
        Drawing size.
    origin : (float, float), default (0, 0)
        Drawing centre, about which the separation is measured.
    tol : float, default :data:`DEFAULT_AGREE_TOL`
        Largest separation that passes.
    far : float, default :data:`REPORT_FAR` (1e6)
        A center farther than ``far * scale`` from the origin is compared by
        direction (angle) rather than distance in the report.

    Returns
    -------
    PairCheck
        The separation and whether it passes; the distance when both centers
        are within ``far * scale``, the angle between directions otherwise.

    Examples
    --------
    >>> c = compare_centers((1.0, 2.0, 1.0), (1.0, 2.0 + 1e-9, 1.0), scale=10.0)
    >>> c.passed, round(c.distance, 12)
    (True, 1e-09)

    Two centers at infinity a thousandth of a radian apart:

    >>> c = compare_centers((1.0, 0.0, 0.0), (1.0, 1e-3, 0.0), scale=10.0)
    >>> c.passed, c.distance, round(c.angle_deg, 6)
    (False, None, 0.057296)

    Notes
    -----
    One :func:`mechgraph.projective.point_separation` (the test) and two
    Cartesian read-offs (the report), O(1).  The pass or fail depends on the
    separation only; ``far`` changes what is reported, not the verdict.

    References
    ----------
    The measure is mechgraph's own (see :func:`mechgraph.projective.point_separation`);
    comparing two independent solutions of one problem: common practice, no
    single source.
    """
    sep = pg.point_separation(p, q, scale=scale, origin=origin)
    pc, qc = pg.translate_point(p, -origin[0], -origin[1]), pg.translate_point(q, -origin[0], -origin[1])
    # with tol=1.0 (a ratio of lengths, not an epsilon) "at infinity" means farther than far * scale
    cp = pg.to_cartesian(pc, scale=scale * far, tol=1.0)
    cq = pg.to_cartesian(qc, scale=scale * far, tol=1.0)
    if cp is not None and cq is not None:
        return PairCheck(sep, math.dist(cp, cq), None, sep <= tol)
    a = math.atan2(p[1], p[0])
    b = math.atan2(q[1], q[0])
    d = abs((a - b + math.pi / 2) % math.pi - math.pi / 2)  # directions, up to sign
    return PairCheck(sep, None, math.degrees(d), sep <= tol)


def collinearity_residuals(
    points: np.ndarray, n: int, *, scale: float = 1.0, origin=(0.0, 0.0)
) -> tuple[np.ndarray, np.ndarray]:
    """Collinearity residual of the three centers of every link triple.

    Parameters
    ----------
    points : ndarray, shape (n(n-1)/2, 3)
        Unit homogeneous centers per pair (order of
        :func:`mechgraph.three_centers.pair_index`); rows of NaN where a
        center is undefined.
    n : int
        Number of links.
    scale : float, default 1.0
        Drawing size: each point is sized as ``((x - ox w)/scale, (y - oy w)/scale, w)``
        and made a unit vector before the determinant is taken.
    origin : (float, float), default (0, 0)
        Drawing centre ``(ox, oy)``.

    Returns
    -------
    triples : ndarray of int, shape (t, 3)
        The link triples (i < j < k) whose three centers are all defined.
    residuals : ndarray, shape (t,)
        ``|det [P_ij, P_ik, P_jk]|`` of the sized unit vectors, 0 when collinear.

    Examples
    --------
    Three links whose centers P_01, P_02, P_12 lie on the x axis:

    >>> import numpy as np
    >>> pts = np.array([[0.0, 0.0, 1.0], [1.0, 0.0, 1.0], [2.0, 0.0, 1.0]])
    >>> collinearity_residuals(pts, 3)
    (array([[0, 1, 2]]), array([0.]))

    Notes
    -----
    Vectorised over all n(n-1)(n-2)/6 triples: O(n^3) time and memory.

    References
    ----------
    Aronhold-Kennedy theorem (the three centers of any three links in plane
    motion lie on one line): common practice, no single source.
    """
    if n < 3:
        return np.zeros((0, 3), dtype=int), np.zeros(0)
    i, j, k = (
        np.asarray(x) for x in zip(*[(a, b, c) for a in range(n) for b in range(a + 1, n) for c in range(b + 1, n)])
    )
    pts = np.asarray(points, dtype=float)
    sized = np.stack(
        [(pts[:, 0] - origin[0] * pts[:, 2]) / scale, (pts[:, 1] - origin[1] * pts[:, 2]) / scale, pts[:, 2]], axis=1
    )
    sized = sized / np.linalg.norm(sized, axis=1, keepdims=True)
    pid = lambda a, b: a * n - a * (a + 1) // 2 + (b - a - 1)  # noqa: E731 - vectorised pair_index
    pij, pik, pjk = sized[pid(i, j)], sized[pid(i, k)], sized[pid(j, k)]
    det = np.einsum("ti,ti->t", np.cross(pij, pik), pjk)
    ok = np.isfinite(det)
    return np.stack([i, j, k], axis=1)[ok], np.abs(det[ok])


@dataclass(frozen=True)
class CrossCheck:
    """Summary of the cross-check of one analysis.

    Attributes
    ----------
    n_compared : int
        Pairs located by both methods.
    max_separation : float
        Largest disagreement among them (0 when none compared).
    worst_pair : tuple or None
        The pair of that disagreement.
    n_triples : int
        Link triples whose three centers are all defined.
    max_collinearity : float
        Largest collinearity residual.
    worst_triple : tuple or None
        The triple of that residual.
    tol : float
        Tolerance of all three tests.
    max_locus_residual : float
        For centers the theorem could not locate but which lie on known lines
        (one three-centers line, a contact normal): the largest distance of the
        velocity analysis' center from those lines (scale-free).
    worst_locus_pair : tuple or None
        The pair of that residual.

    Examples
    --------
    >>> check = CrossCheck(n_compared=15, max_separation=2e-13, worst_pair=(0, 3), n_triples=20,
    ...                    max_collinearity=1e-12, worst_triple=(0, 1, 2), tol=DEFAULT_AGREE_TOL)
    >>> check.passed
    True

    Notes
    -----
    Built by :func:`mechgraph.analysis.analyse` from :func:`compare_centers`
    and :func:`collinearity_residuals`; a frozen record.

    References
    ----------
    Aronhold-Kennedy theorem: common practice, no single source.
    """

    n_compared: int
    max_separation: float
    worst_pair: tuple | None
    n_triples: int
    max_collinearity: float
    worst_triple: tuple | None
    tol: float
    max_locus_residual: float = 0.0
    worst_locus_pair: tuple | None = None

    @property
    def passed(self) -> bool:
        """True when the separation, collinearity and locus residuals are all within :attr:`tol`.

        Examples
        --------
        >>> CrossCheck(3, 1e-12, (0, 1), 1, 0.0, None, tol=1e-6).passed
        True
        """
        return max(self.max_separation, self.max_collinearity, self.max_locus_residual) <= self.tol
