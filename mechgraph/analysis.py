"""The whole job at one position: every relative center, how it was found, cross-checked.

:func:`analyse` runs the pipeline: primary centers from the joints, the
three-centers solver for every center the theorem can reach, the velocity
analysis for the twists (and for the centers the theorem cannot reach), and
the cross-check of both.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from . import projective as pg
from .crosscheck import DEFAULT_AGREE_TOL, CrossCheck, PairCheck, collinearity_residuals, compare_centers
from .model import Mechanism
from .three_centers import Derivation, Locus, ThreeCentersResult, pairs, solve_three_centers
from .velocity import VelocityState, analyse_velocities

__all__ = ["Center", "Analysis", "analyse", "locate_centers", "describe_derivation", "primary_seeds"]


@dataclass(frozen=True)
class Center:
    """One relative center in the final table.

    Attributes
    ----------
    i, j : int
        Link indices, i < j.
    pair : str
        ``"link-link"`` by name.
    point : tuple or None
        Unit homogeneous point (at the drawing scale), or None where neither
        method defines it.
    method : str
        ``"joint"``, ``"three-centers"``, ``"coincident"``, ``"velocity"`` or
        ``"unresolved"``.
    derivation : str
        How it was found, in words an engineer can redraw.
    velocity_point : tuple or None
        The velocity analysis' pole (None at relative rest or when not run).
    relative_rest : bool
        The two links have the same twist: the velocity method is indeterminate here.
    check : PairCheck or None
        Agreement of both methods, where both give the center.
    loci : tuple of Locus
        For a center the theorem could not reach: the lines it is known to lie on.
    crossing : float
        Separation of the two lines that located it (1 well apart, near 0
        nearly coincident); 1 for primary and velocity centers.
    ratio_line : tuple or None
        For a center of a two-input mechanism that depends on the ratio of the
        input rates: the homogeneous line it moves along as the ratio changes
        (through its positions under each input alone).
    """

    i: int
    j: int
    pair: str
    point: tuple | None
    method: str
    derivation: str
    velocity_point: tuple | None
    relative_rest: bool
    check: PairCheck | None
    loci: tuple = ()
    crossing: float = 1.0
    ratio_line: tuple | None = None

    def cartesian(self, scale: float, *, far: float = 1e12):
        """``(x, y)``, or None when the center lies at infinity (see :func:`~mechgraph.projective.to_cartesian`)."""
        if self.point is None:
            return None
        return pg.to_cartesian(self.point, scale=scale * far, tol=1.0)

    def direction(self):
        """Unit direction ``(dx, dy)`` of the point's ray (meaningful for a center at infinity)."""
        if self.point is None:
            return None
        x, y = self.point[0], self.point[1]
        n = float(np.hypot(x, y))
        return (x / n, y / n) if n > 0 else None


@dataclass(frozen=True)
class Analysis:
    """Everything :func:`analyse` found at one position.

    Attributes
    ----------
    mechanism : Mechanism
    centers : tuple of Center
        All n(n-1)/2 relative centers, pairs in row order.
    velocity : VelocityState or None
    three_centers : ThreeCentersResult
    crosscheck : CrossCheck
    """

    mechanism: Mechanism
    centers: tuple
    velocity: VelocityState | None
    three_centers: ThreeCentersResult
    crosscheck: CrossCheck

    def center(self, a: str, b: str) -> Center:
        """The center of the two named links.

        Raises
        ------
        KeyError
            If either name is not a link.
        """
        m = self.mechanism
        i, j = sorted((m.index[a], m.index[b]))
        n = m.n_links
        return self.centers[i * n - i * (i + 1) // 2 + (j - i - 1)]

    @property
    def unresolved_by_theorem(self) -> list[Center]:
        return [c for c in self.centers if c.method in ("velocity", "unresolved")]

    @property
    def passed(self) -> bool:
        return self.crosscheck.passed


def primary_seeds(mech: Mechanism, poses=None):
    """Primary centers and locus lines of every joint, as seeds of the three-centers solver.

    Returns
    -------
    points, lines : list of (i, j, triple, joint name, note)
    """
    if poses is None:
        poses = mech.reference_poses()
    pts, lines = [], []
    for jt in mech.joints:
        a, b = (mech.index[x] for x in jt.links)
        pr = jt.primary(poses[a], poses[b])
        if pr.point is not None:
            pts.append((a, b, pr.point, jt.name, pr.note))
        else:
            lines.append((a, b, pr.line, jt.name, pr.note))
    return pts, lines


def locate_centers(mech: Mechanism, poses=None, *, tol: float = 1e-9) -> ThreeCentersResult:
    """Every relative center the three-centers theorem reaches, from the joints alone.

    Parameters
    ----------
    mech : Mechanism
    poses : ndarray, optional
        Link poses; the case's own position by default.
    tol : float, default 1e-9
        Coincidence tolerance (see :func:`~mechgraph.three_centers.solve_three_centers`).

    Returns
    -------
    ThreeCentersResult

    Examples
    --------
    >>> from mechgraph.casefile import demo_mechanism
    >>> r = locate_centers(demo_mechanism())
    >>> r.n_located, len(r.unresolved)
    (15, 0)
    """
    pts, lines = primary_seeds(mech, poses)
    return solve_three_centers(mech.n_links, pts, lines, scale=mech.scale, origin=mech.centre, tol=tol)


def _pair_text(mech: Mechanism, p) -> str:
    return mech.pair_names(*sorted(p))


def _locus_text(mech: Mechanism, loc: Locus) -> str:
    if loc.through is None:
        return loc.note or f"contact normal of '{loc.joint}'"
    a, b = loc.through
    return f"line {_pair_text(mech, a)}/{_pair_text(mech, b)}"


def describe_derivation(mech: Mechanism, d: Derivation | None) -> str:
    """The derivation of a center in words, e.g. ``from line frame-crank/frame-ram and line ...``.

    Examples
    --------
    >>> from mechgraph.casefile import demo_mechanism
    >>> m = demo_mechanism()
    >>> r = locate_centers(m)
    >>> describe_derivation(m, r.derivation(m.index["frame"], m.index["coupler"]))
    'from line frame-crank/crank-coupler and line coupler-rocker/frame-rocker'
    """
    if d is None:
        return "not reached by the three-centers theorem"
    if d.method == "joint":
        return d.note
    if d.method == "coincident":
        a, b = d.through
        return f"coincides with {_pair_text(mech, a)} and {_pair_text(mech, b)}, which are the same point"
    l1, l2 = d.loci
    return f"from {_locus_text(mech, l1)} and {_locus_text(mech, l2)}"


def _ratio_line(vel: VelocityState, i: int, j: int):
    """Line through the poles of pair (i, j) under each of two inputs alone (None if one is undefined)."""
    p1, p2 = (vel.basis[k, i] - vel.basis[k, j] for k in range(2))
    q1, q2 = ((-t[2], t[1], t[0]) for t in (p1, p2))
    line = pg.join(q1, q2)
    try:
        return pg.normalized_line(line, scale=vel.scale, origin=vel.centre)
    except ValueError:
        return None


def analyse(
    mech: Mechanism,
    poses=None,
    *,
    tol: float = 1e-9,
    agree_tol: float = DEFAULT_AGREE_TOL,
    rank_tol: float = 1e-9,
    rest_tol: float = 1e-9,
    velocities: bool = True,
) -> Analysis:
    """Find all n(n-1)/2 relative centers at one position, with derivations and cross-check.

    Parameters
    ----------
    mech : Mechanism
    poses : ndarray, shape (n_links, 3), optional
        Link poses; the case's own position by default.
    tol : float, default 1e-9
        Coincidence tolerance of the three-centers solver.
    agree_tol : float, default :data:`~mechgraph.crosscheck.DEFAULT_AGREE_TOL`
        Cross-check tolerance (both methods, and collinearity of every triple).
    rank_tol : float, default 1e-9
        Rank threshold of the velocity analysis.
    rest_tol : float, default 1e-9
        Relative-rest threshold of the velocity analysis.
    velocities : bool, default True
        Run the velocity analysis.  Without it (``False``) only the centers
        the theorem reaches are given and nothing is cross-checked.

    Returns
    -------
    Analysis

    Raises
    ------
    DriverError, SingularPositionError
        From the velocity analysis (drivers that do not match the freedoms; a
        dead point).

    Examples
    --------
    >>> from mechgraph.casefile import demo_mechanism
    >>> a = analyse(demo_mechanism())
    >>> len(a.centers), a.passed
    (15, True)
    >>> a.center("frame", "crank").derivation
    "pin of revolute 'O2'"

    Notes
    -----
    Three-centers worklist O(n^3), one SVD and least-squares solve O(n^3), and
    the vectorised triple check O(n^3).

    References
    ----------
    Aronhold-Kennedy theorem; relative centers as poles of relative twists
    (common practice, no single source).
    """
    tc = locate_centers(mech, poses, tol=tol)
    vel = analyse_velocities(mech, poses, rank_tol=rank_tol, rest_tol=rest_tol) if velocities else None
    L, O = mech.scale, mech.centre
    n = mech.n_links
    centers = []
    final = np.full((mech.n_pairs, 3), np.nan)
    worst_sep, worst_pair, compared = 0.0, None, 0
    worst_locus, worst_locus_pair = 0.0, None
    ratio_lines: dict[int, tuple | None] = {}
    all_pairs = pairs(n)
    if vel is not None:
        ii, jj = (np.array(x, dtype=int) for x in zip(*all_pairs))
        rel = vel.twists[ii] - vel.twists[jj]
        rest_all = vel.twist_size(rel) <= vel.rest_tol * vel.reference_size if vel.reference_size > 0 else np.ones(len(ii), bool)
        poles = np.stack([-rel[:, 2], rel[:, 1], rel[:, 0]], axis=1)
    for q, (i, j) in enumerate(all_pairs):
        geo = tc.points[q]
        d = tc.derivations[q]
        vp, rest = None, False
        if vel is not None:
            rest = bool(rest_all[q])
            if not rest:
                vp = pg.normalized_point(poles[q], scale=L, origin=O)
        check = None
        if geo is not None:
            point, method, text = geo, d.method, describe_derivation(mech, d)
            if vp is not None:
                check = compare_centers(geo, vp, scale=L, origin=O, tol=agree_tol)
                compared += 1
                if check.separation > worst_sep or worst_pair is None:
                    worst_sep, worst_pair = max(worst_sep, check.separation), (i, j)
            elif rest:
                text += "; the velocity method is indeterminate here (the two links are at relative rest)"
        elif vp is not None:
            point, method = vp, "velocity"
            text = "pole of the relative twist (velocity analysis): not reachable by the three-centers theorem"
            if len(vel.driver_joints) == 2:
                names = " and ".join(f"'{d}'" for d in vel.driver_joints)
                text += (
                    f"; it depends on the ratio of the input rates of {names} and moves along the line through its "
                    "positions under each input alone as that ratio changes"
                )
                ratio_lines[q] = _ratio_line(vel, i, j)
            for loc in tc.loci[q]:
                r = pg.point_on_line(vp, loc.line, scale=L, origin=O)
                if r > worst_locus:
                    worst_locus, worst_locus_pair = r, (i, j)
        else:
            point, method = None, "unresolved"
            text = (
                "not reachable by the three-centers theorem, and the velocity method is indeterminate "
                "(the two links are at relative rest)"
                if rest
                else "not reachable by the three-centers theorem; run the velocity analysis for it"
            )
        if point is not None:
            final[q] = point
        centers.append(
            Center(
                i=i,
                j=j,
                pair=mech.pair_names(i, j),
                point=point,
                method=method,
                derivation=text,
                velocity_point=vp,
                relative_rest=rest,
                check=check,
                loci=tc.loci[q] if geo is None else (),
                crossing=d.crossing if d is not None else 1.0,
                ratio_line=ratio_lines.get(q),
            )
        )
    triples, res = collinearity_residuals(final, n, scale=L, origin=O)
    if len(res):
        t = int(np.argmax(res))
        worst_t, max_c = tuple(int(x) for x in triples[t]), float(res[t])
    else:
        worst_t, max_c = None, 0.0
    cc = CrossCheck(
        n_compared=compared,
        max_separation=worst_sep,
        worst_pair=worst_pair,
        n_triples=len(res),
        max_collinearity=max_c,
        worst_triple=worst_t,
        tol=agree_tol,
        max_locus_residual=worst_locus,
        worst_locus_pair=worst_locus_pair,
    )
    return Analysis(mechanism=mech, centers=tuple(centers), velocity=vel, three_centers=tc, crosscheck=cc)
