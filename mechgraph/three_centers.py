"""The three-centers (Aronhold-Kennedy) solver: every relative center the theorem can reach.

The theorem: the three relative centers of any three links in plane motion
lie on one straight line.  So when the centers of pairs (i, j) and (i, k) are
known, the center of (j, k) lies on the line through them.  Two such lines
that do not coincide locate it.

The solver is a worklist over link pairs (the "circle diagram"): joints seed
located centers (revolute, prismatic, rolling contact, gear pitch point) and
locus lines (the common normals of pin-in-slot and cam contacts).  Each newly
located center (i, j) is paired with every third link k; if (i, k) is known
and (j, k) is not, the line through the two known centers is added to the loci
of (j, k), and likewise the other way round.  A pair whose loci contain two
lines that do not coincide is located at their meeting point and joins the
worklist.  Each pair enters the worklist once and is paired with n - 2 third
links, so the run costs O(n^3) elementary steps for n links, with no repeated
sweeps.

All points and lines are homogeneous triples (:mod:`mechgraph.projective`),
so centers at infinity (sliders, parallel links) and parallel lines are
ordinary values.  Every located center keeps its derivation: which two lines,
each through which two centers, via which third link.
"""

from __future__ import annotations

from collections import deque
from dataclasses import dataclass, field
from functools import cached_property
from typing import Iterable, Sequence

from . import projective as pg
from .arithmetic import FloatArithmetic

__all__ = [
    "Locus",
    "Derivation",
    "ThreeCentersResult",
    "solve_three_centers",
    "pair_index",
    "pairs",
]


#: Derivations of centers that are pins by construction (joints, and compound pins).
PINNED = ("joint", "coincident")


def pair_index(i: int, j: int, n: int) -> int:
    """Index of the unordered link pair (i, j) among the n(n-1)/2 pairs, in row order.

    Examples
    --------
    >>> [pair_index(i, j, 4) for i, j in pairs(4)]
    [0, 1, 2, 3, 4, 5]
    >>> pair_index(3, 1, 4)
    4
    """
    if i > j:
        i, j = j, i
    return i * n - i * (i + 1) // 2 + (j - i - 1)


def pairs(n: int) -> list[tuple[int, int]]:
    """All link pairs (i, j), i < j, in the order of :func:`pair_index`."""
    return [(i, j) for i in range(n) for j in range(i + 1, n)]


@dataclass(frozen=True)
class Locus:
    """A line the center of a pair is known to lie on.

    Attributes
    ----------
    raw_line : tuple
        The homogeneous line in the solver's working coordinates, about
        ``offset`` (:attr:`line` gives it in the caller's coordinates).
    through : tuple of two pairs, or None
        For a three-centers line: the two known pairs whose centers it joins.
    via : int or None
        For a three-centers line: the third link.
    joint : str or None
        For a contact normal: the joint that gives it.
    note : str
        The joint's own words (contact normals only).
    offset : tuple
        Where the working origin lies in the caller's coordinates.
    """

    raw_line: tuple
    through: tuple[tuple[int, int], tuple[int, int]] | None = None
    via: int | None = None
    joint: str | None = None
    note: str = ""
    offset: tuple = field(default=(0.0, 0.0), compare=False)

    @cached_property
    def line(self) -> tuple:
        """The homogeneous line in the caller's coordinates."""
        ox, oy = self.offset
        return self.raw_line if (ox == 0 and oy == 0) else pg.translate_line(self.raw_line, ox, oy)


@dataclass(frozen=True)
class Derivation:
    """How a center was located.

    ``method`` is ``"joint"`` (a primary center: ``joint`` and ``note`` say
    which and why), ``"three-centers"`` (``loci`` holds the two lines that
    meet there, ``crossing`` their separation, 1 for well apart, near 0 for
    nearly coincident), or ``"coincident"`` (two primary centers of a link
    triple coincide, a compound pin, so the third is the same point: ``loci``
    is empty and ``through`` names the two pairs).
    """

    method: str
    joint: str | None = None
    note: str = ""
    loci: tuple[Locus, ...] = ()
    crossing: float = 1.0
    through: tuple[tuple[int, int], tuple[int, int]] | None = None


@dataclass(frozen=True)
class ThreeCentersResult:
    """Outcome of :func:`solve_three_centers`.

    Attributes
    ----------
    n_links : int
    points : tuple
        Per pair (see :func:`pair_index`): the located center as a
        homogeneous triple (canonical, see
        :func:`~mechgraph.projective.normalized_point`), or ``None``.
    derivations : tuple
        Per pair: its :class:`Derivation`, or ``None`` when not located.
    loci : tuple
        Per pair: for an unresolved pair, every locus line collected (the
        lines it is known to lie on); for a located pair, the lines that
        located it.
    order : tuple of int
        Pair indices in the order they were located.
    """

    n_links: int
    points: tuple
    derivations: tuple
    loci: tuple
    order: tuple

    def point(self, i: int, j: int):
        """Located center of links i and j, or None."""
        return self.points[pair_index(i, j, self.n_links)]

    def derivation(self, i: int, j: int) -> Derivation | None:
        return self.derivations[pair_index(i, j, self.n_links)]

    @property
    def unresolved(self) -> list[tuple[int, int]]:
        """Pairs the theorem could not reach."""
        return [p for p, pt in zip(pairs(self.n_links), self.points) if pt is None]

    @property
    def n_located(self) -> int:
        return sum(pt is not None for pt in self.points)


def solve_three_centers(
    n_links: int,
    point_seeds: Iterable[tuple[int, int, Sequence, str | None, str]],
    line_seeds: Iterable[tuple[int, int, Sequence, str | None, str]] = (),
    *,
    scale: float = 1.0,
    origin=(0.0, 0.0),
    tol: float = 1e-9,
    arithmetic=None,
) -> ThreeCentersResult:
    """Locate every relative center the three-centers theorem can reach.

    Parameters
    ----------
    n_links : int
        Number of links (ground included).
    point_seeds : iterable of (i, j, point, joint, note)
        Primary centers: link indices, homogeneous point, the joint that gives
        it and a note in words.
    line_seeds : iterable of (i, j, line, joint, note), optional
        Primary locus lines (contact normals).
    scale : float, default 1.0
        Size of the drawing, used to make the tolerance scale-free.
    origin : (float, float), default (0, 0)
        Centre of the drawing.  The constructions are made in coordinates about
        it, so that results and tolerances do not depend on where the drawing
        lies; the results are given back in the caller's coordinates.
    tol : float, default 1e-9
        Two centers closer than this (in :func:`~mechgraph.projective.point_separation`,
        about distance / scale) count as one, and so they give no line; two
        lines closer than this (:func:`~mechgraph.projective.line_separation`)
        coincide, and so they locate nothing.  Used by the default float
        arithmetic; an ``arithmetic`` passed in brings its own.
    arithmetic : optional
        Number kind (:mod:`mechgraph.arithmetic`): seeds and results are
        triples of its numbers, and it decides coincidence (exactly, in exact
        arithmetic).  Floating point with ``tol`` by default.

    Returns
    -------
    ThreeCentersResult

    Raises
    ------
    ValueError
        If ``tol`` is not positive, ``scale`` is not positive, or a seed names
        a link index out of range or a pair of one link.

    Examples
    --------
    A four-bar 0-1-2-3 (0 ground) with pins at (0,0), (0,1), (2,1), (2,0):
    the parallelogram puts center 0-2 at infinity, along y (the coupler translates).

    >>> pins = {(0, 1): (0, 0), (1, 2): (0, 1), (2, 3): (2, 1), (0, 3): (2, 0)}
    >>> seeds = [(i, j, (x, y, 1.0), f"{i}{j}", "pin") for (i, j), (x, y) in pins.items()]
    >>> r = solve_three_centers(4, seeds, scale=2.0)
    >>> r.n_located
    6
    >>> [round(c, 9) + 0.0 for c in r.point(0, 2)]
    [0.0, 1.0, 0.0]

    Notes
    -----
    Worklist over link pairs; each located pair is combined once with every
    third link that closes a triple with one known and one unknown center
    (found by set intersection), so the cost is at most O(n^3) for n links,
    and much less where most triples close early; memory O(n^2).  Lines
    through two coincident centers carry no direction.  When two *primary*
    centers of a link triple coincide (a compound pin) the third is the same
    point (the relative poles add: P_jk = P_ji + P_ik); an accidental
    coincidence of a secondary center with another center gives nothing, as
    the third pair may then be at relative rest, its center undefined.

    References
    ----------
    Aronhold-Kennedy theorem (common practice, no single source); the worklist
    form follows the circle-diagram procedure of the standard texts, e.g.
    Uicker, Pennock and Shigley, *Theory of Machines and Mechanisms* (from memory).
    """
    if not (tol > 0.0):
        raise ValueError(f"tol must be positive, got {tol!r}")
    ar = arithmetic if arithmetic is not None else FloatArithmetic(tol)
    if not (scale > 0.0):
        raise ValueError(f"scale must be positive, got {scale!r}")
    n = int(n_links)
    npairs = n * (n - 1) // 2
    pid = [[-1] * n for _ in range(n)]
    for i in range(n):
        for j in range(i + 1, n):
            pid[i][j] = pid[j][i] = pair_index(i, j, n)
    points: list = [None] * npairs
    derivs: list = [None] * npairs
    loci: list[list[Locus]] = [[] for _ in range(npairs)]
    seen_through: list[set] = [set() for _ in range(npairs)]
    order: list[int] = []
    queue: deque[tuple[int, int]] = deque()
    same_point = ar.same_point
    separation = ar.separation
    norm = ar.normalize_point
    limit = ar.tol

    def check(i, j):
        if not (0 <= i < n and 0 <= j < n) or i == j:
            raise ValueError(f"seed pair ({i}, {j}) is not a pair of two links among {n}")

    # known[i]: links whose center with i is located; unknown[i]: the others.
    known: list[set[int]] = [set() for _ in range(n)]
    unknown: list[set[int]] = [set(range(n)) - {i} for i in range(n)]

    def locate(i, j, p, d):
        q = pid[i][j]
        points[q] = norm(p, scale=scale)
        derivs[q] = d
        order.append(q)
        known[i].add(j)
        known[j].add(i)
        unknown[i].discard(j)
        unknown[j].discard(i)
        queue.append((i, j) if i < j else (j, i))

    def add_locus(i, j, loc: Locus):
        q = pid[i][j]
        if points[q] is not None:
            return
        if loc.through is not None:
            key = frozenset(loc.through)
            if key in seen_through[q]:
                return  # the same line, met again from its other known center
            seen_through[q].add(key)
        best, best_s = None, 0.0
        for other in loci[q]:
            s = separation(other.raw_line, loc.raw_line, scale=scale)
            if s > best_s:
                best, best_s = other, s
        loci[q].append(loc)
        if best is not None and best_s > limit:
            p = pg.meet(best.raw_line, loc.raw_line)
            locate(i, j, p, Derivation("three-centers", loci=(best, loc), crossing=best_s))

    ox, oy = ar.num(origin[0]), ar.num(origin[1])
    given: dict[int, tuple] = {}  # primary centers as given, reported without round-off
    for i, j, p, joint, note in point_seeds:
        check(i, j)
        if points[pid[i][j]] is None:
            given[pid[i][j]] = norm(p, scale=scale, origin=origin)
            locate(i, j, pg.translate_point(p, -ox, -oy), Derivation("joint", joint=joint, note=note))
    for i, j, line, joint, note in line_seeds:
        check(i, j)
        a, b = (i, j) if i < j else (j, i)
        add_locus(a, b, Locus(pg.translate_line(line, -ox, -oy), joint=joint, note=note, offset=(ox, oy)))

    while queue:
        i, j = queue.popleft()
        pij = points[pid[i][j]]
        # (i, k) known, (j, k) not: the line through P_ij and P_ik is a locus of (j, k);
        # (j, k) known, (i, k) not: the line through P_ij and P_jk is a locus of (i, k).
        for shared, other in ((i, j), (j, i)):
            for k in sorted(known[shared] & unknown[other]):
                if points[pid[other][k]] is not None:
                    continue  # located meanwhile, in this same sweep
                known_pt = points[pid[shared][k]]
                target = (other, k) if other < k else (k, other)
                kp = (shared, k) if shared < k else (k, shared)
                if same_point(pij, known_pt, scale=scale):
                    # Two coinciding centers give no line.  Where both are joints
                    # (a compound pin: several links pinned at one point), the
                    # third center is that point too; an accidental coincidence
                    # says nothing (the third pair may be at relative rest).
                    if derivs[pid[i][j]].method in PINNED and derivs[pid[shared][k]].method in PINNED:
                        locate(target[0], target[1], pij, Derivation("coincident", through=((i, j), kp)))
                    continue
                add_locus(
                    target[0], target[1], Locus(pg.join(pij, known_pt), through=((i, j), kp), via=shared, offset=(ox, oy))
                )

    # back from coordinates about the drawing centre to the caller's
    def back_point(q, p):
        if p is None:
            return None
        return given[q] if q in given else norm(pg.translate_point(p, ox, oy), scale=scale, origin=origin)

    return ThreeCentersResult(
        n_links=n,
        points=tuple(back_point(q, p) for q, p in enumerate(points)),
        derivations=tuple(derivs),
        loci=tuple(tuple(ls) if points[q] is None else derivs[q].loci for q, ls in enumerate(loci)),
        order=tuple(order),
    )
