"""The whole job at one position: every relative center, how it was found, cross-checked.

:func:`analyse` runs the pipeline: primary centers from the joints, the
three-centers solver for every center the theorem can reach, the velocity
analysis for the twists (and for the centers the theorem cannot reach), and
the cross-check of both.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from . import projective as pg
from .arithmetic import FLOAT
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
        ``"joint"``, ``"three-centers"``, ``"coincident"``, ``"relaxation"``
        (an indeterminate chain's center, located geometrically by the
        relaxation method), ``"velocity"`` or ``"unresolved"``.
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
    kind_point : tuple or None
        In exact or high-precision runs: the center in that arithmetic's numbers.
    arithmetic : object or None
        The arithmetic of ``kind_point``.
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
    kind_point: tuple | None = None
    arithmetic: object = None

    def exact_text(self):
        """``(x, y)`` as text in the run's arithmetic (fractions or surds when exact), ``("inf", "inf")``
        style ``None`` at infinity, or None when the run was in floating point or the center is undefined.
        """
        if self.kind_point is None or self.arithmetic is None:
            return None
        ar = self.arithmetic
        x, y, w = self.kind_point
        if w == ar.zero:
            return None
        return (ar.text(x / w), ar.text(y / w))

    def exact_direction_text(self):
        """For a center at infinity in an exact or high-precision run: its direction ``(dx, dy)`` as text."""
        if self.kind_point is None or self.arithmetic is None or self.kind_point[2] != self.arithmetic.zero:
            return None
        return (self.arithmetic.text(self.kind_point[0]), self.arithmetic.text(self.kind_point[1]))

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
    arithmetic : str
        ``"float"``, ``"exact"`` or ``"precision"``.
    relaxation : RelaxationResult or None
        Where the relaxation method ran (indeterminate chains): its result.
    """

    mechanism: Mechanism
    centers: tuple
    velocity: VelocityState | None
    three_centers: ThreeCentersResult
    crosscheck: CrossCheck
    arithmetic: str = "float"
    relaxation: object = None

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


def primary_seeds(mech: Mechanism, poses=None, arithmetic=FLOAT):
    """Primary centers and locus lines of every joint, as seeds of the three-centers solver.

    Parameters
    ----------
    mech : Mechanism
    poses : ndarray, optional
        Link poses; the case's own position by default.
    arithmetic : optional
        Number kind of the triples; floating point by default.

    Returns
    -------
    points, lines : list of (i, j, triple, joint name, note)
    """
    if poses is None:
        poses = mech.reference_poses()
    pts, lines = [], []
    for jt in mech.joints:
        a, b = (mech.index[x] for x in jt.links)
        pr = jt.primary(poses[a], poses[b], arithmetic)
        if pr.point is not None:
            pts.append((a, b, pr.point, jt.name, pr.note))
        else:
            lines.append((a, b, pr.line, jt.name, pr.note))
    return pts, lines


def locate_centers(mech: Mechanism, poses=None, *, tol: float = 1e-9, arithmetic=None) -> ThreeCentersResult:
    """Every relative center the three-centers theorem reaches, from the joints alone.

    Parameters
    ----------
    mech : Mechanism
    poses : ndarray, optional
        Link poses; the case's own position by default.
    tol : float, default 1e-9
        Coincidence tolerance (see :func:`~mechgraph.three_centers.solve_three_centers`).
    arithmetic : optional
        Number kind (:mod:`mechgraph.arithmetic`); floating point with ``tol`` by default.

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
    pts, lines = primary_seeds(mech, poses, arithmetic if arithmetic is not None else FLOAT)
    return solve_three_centers(
        mech.n_links, pts, lines, scale=mech.scale, origin=mech.centre, tol=tol, arithmetic=arithmetic
    )


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


def resolve_arithmetic(arithmetic, mech: Mechanism, *, tol: float = 1e-9, digits: int = 50):
    """The arithmetic object for ``arithmetic`` (a kind name, an object, or None for floating point)."""
    from .arithmetic import make_arithmetic

    if arithmetic is None:
        return None
    if isinstance(arithmetic, str):
        # floating point: the solver takes ``tol`` itself, so no arithmetic object is needed
        return None if arithmetic == "float" else make_arithmetic(arithmetic, mech, tol=tol, digits=digits)
    return arithmetic


def analyse(
    mech: Mechanism,
    poses=None,
    *,
    tol: float = 1e-9,
    agree_tol: float = DEFAULT_AGREE_TOL,
    rank_tol: float = 1e-9,
    rest_tol: float = 1e-9,
    velocities: bool = True,
    geometric: bool = True,
    arithmetic=None,
    digits: int = 50,
) -> Analysis:
    """Find all n(n-1)/2 relative centers at one position, with derivations and cross-check.

    Parameters
    ----------
    mech : Mechanism
    poses : ndarray, shape (n_links, 3), optional
        Link poses; the case's own position by default.
    tol : float, default 1e-9
        Coincidence tolerance of the three-centers solver (floating point).
    agree_tol : float, default :data:`~mechgraph.crosscheck.DEFAULT_AGREE_TOL`
        Cross-check tolerance (both methods, collinearity of every triple,
        velocity centers on their known lines).  In exact arithmetic every
        test is exact (tolerance 0); in high precision the tolerance is at
        most ``10**-(digits // 2)``.
    rank_tol : float, default 1e-9
        Rank threshold of the velocity analysis.
    rest_tol : float, default 1e-9
        Relative-rest threshold of the velocity analysis.
    velocities : bool, default True
        Run the velocity analysis.  Without it (``False``) only the centers
        the theorem reaches are given and nothing is cross-checked.
    geometric : bool, default True
        For a single-freedom linkage the theorem leaves incomplete (an
        indeterminate chain), locate the rest geometrically by the relaxation
        method (:mod:`mechgraph.indeterminate`), floating point only; the
        velocity analysis then cross-checks them.
    arithmetic : {None, "float", "exact", "precision"} or arithmetic object, optional
        Number kind of the whole analysis (:mod:`mechgraph.arithmetic`);
        floating point by default.  Exact and high precision work at the
        case's own position.
    digits : int, default 50
        Working digits of ``"precision"``.

    Returns
    -------
    Analysis

    Raises
    ------
    DriverError, SingularPositionError
        From the velocity analysis (drivers that do not match the freedoms; a
        dead point).
    NumberKindError
        The inputs do not fit the chosen arithmetic.

    Examples
    --------
    >>> from mechgraph.casefile import demo_mechanism
    >>> a = analyse(demo_mechanism())
    >>> len(a.centers), a.passed
    (15, True)
    >>> a.center("frame", "crank").derivation
    "pin of revolute 'O2'"
    >>> e = analyse(demo_mechanism(), arithmetic="exact")
    >>> e.center("frame", "coupler").exact_text()
    ('5600/33', '7840/33')

    Notes
    -----
    Three-centers worklist O(n^3), one SVD and least-squares solve O(n^3), and
    the vectorised triple check O(n^3).  Exact arithmetic replaces the SVD by
    exact row reduction in the smallest number field of the inputs.

    References
    ----------
    Aronhold-Kennedy theorem; relative centers as poles of relative twists
    (common practice, no single source).
    """
    if poses is not None:
        from .position import check_assembled

        check_assembled(mech, poses)
    ar = resolve_arithmetic(arithmetic, mech, tol=tol, digits=digits)
    kind = FLOAT if ar is None else ar
    is_float = kind.name == "float"
    if kind.exact:
        agree_eff = 0.0
    elif not is_float:
        agree_eff = min(agree_tol, 10.0 ** -(kind.digits // 2))
    else:
        agree_eff = agree_tol
    tc = locate_centers(mech, poses, tol=tol, arithmetic=ar)
    relax = _relaxation(mech, poses, tol, agree_tol) if geometric and is_float and tc.unresolved else None
    vel = analyse_velocities(mech, poses, rank_tol=rank_tol, rest_tol=rest_tol, arithmetic=kind) if velocities else None
    L, O = mech.scale, mech.centre
    n = mech.n_links
    centers = []
    final = np.full((mech.n_pairs, 3), np.nan)
    kind_final: list = [None] * mech.n_pairs
    worst_sep, worst_pair, compared = 0.0, None, 0
    worst_locus, worst_locus_pair = 0.0, None
    ratio_lines: dict[int, tuple | None] = {}
    all_pairs = pairs(n)
    if vel is not None and is_float:
        ii, jj = (np.array(x, dtype=int) for x in zip(*all_pairs))
        rel = vel.twists[ii] - vel.twists[jj]
        rest_all = vel.twist_size(rel) <= vel.rest_tol * vel.reference_size if vel.reference_size > 0 else np.ones(len(ii), bool)
        poles = np.stack([-rel[:, 2], rel[:, 1], rel[:, 0]], axis=1)

    def as_float(t):
        return None if t is None else (t if is_float else pg.normalized_point([kind.to_float(c) for c in t], scale=L, origin=O))

    for q, (i, j) in enumerate(all_pairs):
        vp, rest = None, False
        if vel is not None:
            rest = bool(rest_all[q]) if is_float else vel.is_relative_rest(i, j)
            if not rest:
                pole = poles[q] if is_float else vel.kind_pole(i, j)
                vp = kind.normalize_point(pole, scale=L, origin=O)
        geo = tc.points[q]
        d = tc.derivations[q]
        relaxed_text, crossing = None, (d.crossing if d is not None else 1.0)
        if geo is None and relax is not None and relax.points[q] is not None and not rest:
            # not reached by the theorem from the joints: found by the relaxation method
            geo, d = relax.points[q], relax.three_centers.derivations[q]
            relaxed_text = relax.derivations[q]
            found = relax.found.get((i, j))
            crossing = found.crossing if found is not None else (d.crossing if d is not None else 1.0)
        check = None
        if geo is not None:
            if relaxed_text is not None:
                point, method, text = geo, "relaxation", relaxed_text
            else:
                point, method, text = geo, d.method, describe_derivation(mech, d)
            if vp is not None:
                check = compare_centers(as_float(geo), as_float(vp), scale=L, origin=O, tol=agree_eff)
                if not is_float:
                    gap = kind.point_gap(geo, vp, scale=L, origin=O)
                    check = PairCheck(gap, check.distance, check.angle_deg, gap <= agree_eff)
                compared += 1
                sep = check.separation if check.separation == check.separation else math.inf  # NaN fails
                if sep > worst_sep or worst_pair is None:
                    worst_sep, worst_pair = max(worst_sep, sep), (i, j)
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
                r = kind.on_line(vp, loc.line, scale=L, origin=O)
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
        fpoint = as_float(point)
        if point is not None and not rest:
            # the theorem holds for poles; a pair at relative rest has none, so its triples are not checked
            final[q] = fpoint
            kind_final[q] = point
        centers.append(
            Center(
                i=i,
                j=j,
                pair=mech.pair_names(i, j),
                point=fpoint,
                method=method,
                derivation=text,
                velocity_point=as_float(vp),
                relative_rest=rest,
                check=check,
                loci=tc.loci[q] if geo is None else (),
                crossing=crossing,
                ratio_line=ratio_lines.get(q),
                kind_point=None if is_float else point,
                arithmetic=None if is_float else kind,
            )
        )
    if is_float:
        triples, res = collinearity_residuals(final, n, scale=L, origin=O)
    else:
        triples, res = _kind_collinearity(kind, kind_final, n, L, O)
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
        tol=agree_eff,
        max_locus_residual=worst_locus,
        worst_locus_pair=worst_locus_pair,
    )
    return Analysis(
        mechanism=mech,
        centers=tuple(centers),
        velocity=vel,
        three_centers=tc,
        crosscheck=cc,
        arithmetic=kind.name,
        relaxation=relax,
    )


def _relaxation(mech: Mechanism, poses, tol: float, agree_tol: float):
    """The relaxation method's result for a single-freedom linkage the theorem leaves incomplete, else None.

    A result whose own lines do not pass through the centers they located
    (``max_line_residual`` above ``agree_tol``: a degenerate relaxation, e.g.
    at a pause) is not used; the velocity analysis then stands alone.
    """
    from .indeterminate import RelaxationError, counted_freedoms, locate_by_relaxation

    try:
        if counted_freedoms(mech) != 1:
            return None
        res = locate_by_relaxation(mech, poses, tol=tol)
    except RelaxationError:
        return None
    return res if res.max_line_residual <= agree_tol else None


def _kind_collinearity(ar, pts, n: int, L, O):
    """Collinearity residual of every link triple, in the arithmetic's own numbers."""
    from .three_centers import pair_index

    triples, res = [], []
    for i in range(n):
        for j in range(i + 1, n):
            for k in range(j + 1, n):
                p, q, r = pts[pair_index(i, j, n)], pts[pair_index(i, k, n)], pts[pair_index(j, k, n)]
                if p is None or q is None or r is None:
                    continue
                triples.append((i, j, k))
                res.append(ar.collinearity(p, q, r, scale=L, origin=O))
    return np.array(triples, dtype=int).reshape(-1, 3), np.array(res, dtype=float)
