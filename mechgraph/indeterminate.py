"""Centers the three-centers theorem cannot reach, found geometrically by two-freedom relaxation.

In an indeterminate linkage (the double-butterfly and single-flier eight-bars
are the classic ones) the Aronhold-Kennedy theorem, applied to the joints
alone, stops before every relative center is located.  The velocity analysis
(:mod:`mechgraph.velocity`) still gives them as poles of relative twists; this
module finds them a second, purely geometric way, so the two can be compared.

The idea (Foster & Pennock's relaxation, see References):

1. **Relax.**  Remove one link whose removal leaves two freedoms (a binary
   link with its two lower pairs, in the usual case).  The true motion of the
   remaining links is one of the motions of this relaxed linkage.
2. **Two motions.**  Lock one joint of the relaxed linkage: a locked revolute
   (or slider) welds its two links into one rigid body, and the welded linkage
   has one freedom again.  Locking another joint gives a second, different
   motion.  In each, the wanted center is located by the three-centers theorem
   alone, usually without trouble (the welded linkages are six-bars and
   four-bars).
3. **One line.**  The relative pole of a pair is linear in the motion, so in
   every motion of the two-freedom linkage the center lies on the straight
   line through its positions in the two locked motions; the true center is
   on that line.
4. **Two lines.**  Another relaxation (another link removed) gives a second
   line; the center is where the two lines meet, in homogeneous coordinates
   (so it may lie at infinity).  A line the theorem itself already knows for
   the pair serves as well.
5. **Propagate.**  Every center found so is fed back into the three-centers
   solver as a point seed, and the theorem locates the rest.

Which links move as one rigid body once a joint is locked, and how many
freedoms are left, is decided by counting (a (3, 3) pebble game on the link
graph, each lower pair two constraints, each higher pair one), never by the
velocity analysis: the whole construction can be redrawn with a straight edge.

See :func:`locate_by_relaxation` for an example.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field, replace
from itertools import combinations
from typing import Sequence

import numpy as np

from . import projective as pg
from .analysis import describe_derivation, primary_seeds
from .crosscheck import collinearity_residuals
from .errors import IncompleteRelaxationError, MechgraphError, RelaxationError  # noqa: F401
from .joints import GearMesh, Joint
from .model import Link, Mechanism
from .three_centers import Locus, ThreeCentersResult, pair_index, pairs, solve_three_centers

__all__ = [
    "RelaxationError",
    "IncompleteRelaxationError",
    "WeldedLinkage",
    "MotionPosition",
    "RelaxationLine",
    "Motion",
    "Relaxation",
    "RelaxationDerivation",
    "RelaxationResult",
    "counted_freedoms",
    "weld_linkage",
    "relax_linkage",
    "locate_by_relaxation",
]

#: Points farther than this many drawing sizes are written "at infinity" in derivations.
_FAR = 1e12


# ------------------------------------------------------------------ counting
class _Pebbles:
    """(3, 3) pebble game on rigid bodies joined by scalar constraints ("bars").

    Each body starts with three pebbles (its three planar freedoms).  A bar is
    independent when four pebbles can be gathered on its two bodies; it then
    takes one.  Free pebbles minus three are the freedoms of the whole; two
    bodies are relatively rigid when four pebbles cannot be gathered on them.

    Source: the counting is the Gruebler-Kutzbach count applied to every
    sub-chain (common practice, no source); that it decides generic rigidity
    of bodies joined by pins, each pin counted as two constraints, is Tay,
    "Rigidity of multigraphs I", J. Combin. Theory B 36, 1984 (from memory);
    the pebble game that decides it in polynomial time is Jacobs &
    Hendrickson, J. Comput. Phys. 137, 1997, and Lee & Streinu, Discrete
    Math. 308, 2008 (from memory).  Generic geometry is assumed (no compound
    pins, no loops of sliders only).
    """

    __slots__ = ("free", "out")

    def __init__(self, n: int):
        self.free = [3] * n
        self.out: list[dict[int, int]] = [dict() for _ in range(n)]

    def copy(self) -> "_Pebbles":
        g = _Pebbles(0)
        g.free = list(self.free)
        g.out = [dict(d) for d in self.out]
        return g

    def _fetch(self, u: int, keep: tuple[int, int]) -> bool:
        """Bring one free pebble to ``u`` along directed bars, not taking it from ``keep``."""
        parent = {u: None}
        stack = [u]
        while stack:
            x = stack.pop()
            for y, c in self.out[x].items():
                if c == 0 or y in parent:
                    continue
                parent[y] = x
                if y not in keep and self.free[y] > 0:
                    w = y
                    while parent[w] is not None:  # reverse the path u -> ... -> y
                        p = parent[w]
                        self.out[p][w] -= 1
                        self.out[w][p] = self.out[w].get(p, 0) + 1
                        w = p
                    self.free[y] -= 1
                    self.free[u] += 1
                    return True
                stack.append(y)
        return False

    def gather(self, u: int, v: int, target: int) -> bool:
        keep = (u, v)
        while self.free[u] + self.free[v] < target:
            if self.free[u] < 3 and self._fetch(u, keep):
                continue
            if self.free[v] < 3 and self._fetch(v, keep):
                continue
            return False
        return True

    def add(self, u: int, v: int) -> bool:
        """Insert one bar between bodies u and v; False when it is redundant."""
        if not self.gather(u, v, 4):
            return False
        s, t = (u, v) if self.free[u] > 0 else (v, u)
        self.free[s] -= 1
        self.out[s][t] = self.out[s].get(t, 0) + 1
        return True

    def rigid(self, u: int, v: int) -> bool:
        return not self.gather(u, v, 4)

    @property
    def freedoms(self) -> int:
        return sum(self.free) - 3


def _game(mech: Mechanism, removed: str | None = None, locked: Sequence[str] = ()):
    names = [x for x in mech.link_names if x != removed]
    idx = {x: k for k, x in enumerate(names)}
    g = _Pebbles(len(names))
    for j in mech.joints:
        if removed is not None and removed in j.links:
            continue
        a, b = idx[j.links[0]], idx[j.links[1]]
        bars = j.constraints + (j.freedoms if j.name in locked else 0)
        for _ in range(bars):
            g.add(a, b)
    return g, names


def _lock(g: _Pebbles, names, mech: Mechanism, joint: Joint) -> _Pebbles:
    g = g.copy()
    idx = {x: k for k, x in enumerate(names)}
    a, b = idx[joint.links[0]], idx[joint.links[1]]
    for _ in range(joint.freedoms):
        g.add(a, b)
    return g


def _bodies(g: _Pebbles, n: int) -> list[list[int]]:
    """Rigid bodies (lists of link indices) of a counted linkage."""
    body = [-1] * n
    out: list[list[int]] = []
    for u in range(n):
        if body[u] >= 0:
            continue
        body[u] = len(out)
        members = [u]
        for v in range(u + 1, n):
            if body[v] < 0 and g.rigid(u, v):
                body[v] = body[u]
                members.append(v)
        out.append(members)
    return out


def _connected(mech: Mechanism, removed: str | None) -> bool:
    names = [x for x in mech.link_names if x != removed]
    if not names:
        return False
    adj: dict[str, set[str]] = {x: set() for x in names}
    for j in mech.joints:
        if removed in j.links:
            continue
        a, b = j.links
        adj[a].add(b)
        adj[b].add(a)
    seen, stack = {names[0]}, [names[0]]
    while stack:
        for y in adj[stack.pop()] - seen:
            seen.add(y)
            stack.append(y)
    return len(seen) == len(names)


def counted_freedoms(mech: Mechanism, removed: str | None = None, locked: Sequence[str] = ()) -> int:
    """Freedoms of a linkage by counting, with one link removed and some joints locked.

    The Gruebler-Kutzbach count made exact for every sub-chain: redundant
    constraints (a sub-chain with more constraints than freedoms) are not
    counted twice.  Generic geometry is assumed.

    Parameters
    ----------
    mech : Mechanism
    removed : str, optional
        A link taken out together with its joints.
    locked : sequence of str, optional
        Joints whose remaining freedom is locked (their two links welded).

    Returns
    -------
    int
        Freedoms of the whole linkage relative to any one of its links; for a
        linkage that falls apart, each loose piece adds three.

    Raises
    ------
    RelaxationError
        An unknown link or joint name.

    Examples
    --------
    >>> from mechgraph.casefile import demo_mechanism
    >>> m = demo_mechanism()
    >>> counted_freedoms(m), counted_freedoms(m, locked=["O2"])
    (1, 0)

    Notes
    -----
    Pebble game over ``sum(3 - freedoms)`` constraints; each insertion is one
    graph search, so O(j (n + j)) for n links and j joints.

    References
    ----------
    Gruebler-Kutzbach count: common practice, no source.  Pebble game:
    Jacobs & Hendrickson, J. Comput. Phys. 137, 1997 (from memory).
    """
    _check_names(mech, removed, locked)
    g, _ = _game(mech, removed, locked)
    return g.freedoms


def _check_names(mech: Mechanism, removed, locked) -> None:
    if removed is not None and removed not in mech.index:
        raise RelaxationError(f"link '{removed}' is not a link of '{mech.name}'; links are: {', '.join(mech.link_names)}")
    for name in locked:
        if name not in mech.joint_by_name:
            raise RelaxationError(
                f"joint '{name}' is not a joint of '{mech.name}'; joints are: {', '.join(j.name for j in mech.joints)}"
            )
        j = mech.joint_by_name[name]
        if removed is not None and removed in j.links:
            raise RelaxationError(f"{j.label()} goes with the removed link '{removed}'; it cannot be locked")
        if j.freedoms != 1:
            raise RelaxationError(
                f"{j.label()} leaves {j.freedoms} freedoms; locking it would take away more than one. "
                "Lock a revolute, prismatic or rolling joint"
            )


# -------------------------------------------------------------- welded linkage
@dataclass(frozen=True)
class WeldedLinkage:
    """A linkage with one link removed and joints locked, its rigid bodies merged into links.

    Attributes
    ----------
    mechanism : Mechanism
        The welded linkage: one link per rigid body (a merged body is named by
        its links joined with ``+``), the joints between different bodies.
    removed : str or None
        The link taken out.
    locked : tuple of str
        The joints locked.
    bodies : tuple of tuple of str
        Links of each body, in the order of ``mechanism.links``.  A body of
        several links is welded: by the locked joints, and by any sub-chain
        the locks make rigid.
    body_of : dict
        Original link name -> index of its body (the removed link is absent).
    freedoms : int
        Counted freedoms of the welded linkage.
    joint_links : dict
        Joint name -> the two original links it joins.  A joint's geometry
        stays in its original links' frames: ``mechanism`` is drawn in the
        case's own position, and at other link poses each joint is placed by
        its original links' poses.
    """

    mechanism: Mechanism
    removed: str | None
    locked: tuple[str, ...]
    bodies: tuple[tuple[str, ...], ...]
    body_of: dict = field(compare=False)
    freedoms: int
    joint_links: dict = field(default_factory=dict, compare=False, repr=False)

    def welded_text(self) -> str:
        """The merged bodies in words, e.g. ``'frame' and 'beam' welded``."""
        parts = []
        for b in self.bodies:
            if len(b) == 2:
                parts.append(f"'{b[0]}' and '{b[1]}' welded")
            elif len(b) > 2:
                parts.append(", ".join(f"'{x}'" for x in b[:-1]) + f" and '{b[-1]}' welded into one body")
        return "; ".join(parts) if parts else "no links welded"


def _weld(mech: Mechanism, removed: str | None, locked: tuple[str, ...], members: list[list[int]], names, freedoms) -> WeldedLinkage:
    bodies = [tuple(names[k] for k in sorted(b, key=lambda k: mech.index[names[k]])) for b in members]
    bodies.sort(key=lambda b: mech.index[b[0]])
    body_of = {x: k for k, b in enumerate(bodies) for x in b}
    used: set[str] = set()
    body_names = []
    for b in bodies:
        nm = "+".join(b)
        while nm in used or (len(b) > 1 and nm in mech.index):
            nm += "'"
        used.add(nm)
        body_names.append(nm)
    ground_link = mech.ground if mech.ground != removed else names[0]
    gb = body_of[ground_link]
    links = tuple(Link(nm, ground=(k == gb)) for k, nm in enumerate(body_names))
    joints, joint_links = [], {}
    for j in mech.joints:
        if removed is not None and removed in j.links:
            continue
        a, b = body_of[j.links[0]], body_of[j.links[1]]
        if a == b:
            continue
        joint_links[j.name] = j.links
        kw = {"links": (body_names[a], body_names[b])}
        if isinstance(j, GearMesh) and j.carrier is not None:
            c = j.carrier
            kw["carrier"] = None if c == removed or body_of.get(c) in (a, b) else body_names[body_of[c]]
        joints.append(replace(j, **kw))
    what = f"link '{removed}' removed" if removed is not None else "nothing removed"
    if locked:
        what += ", joint(s) " + ", ".join(f"'{x}'" for x in locked) + " locked"
    try:
        wm = Mechanism(
            links=links,
            joints=tuple(joints),
            name=f"{mech.name} ({what})",
            unit=mech.unit,
            max_coordinate=mech.max_coordinate,
            coincidence_tol=mech.coincidence_tol,
        )
    except MechgraphError as e:
        raise RelaxationError(f"'{mech.name}' with {what} is not a linkage mechgraph can draw: {e}") from None
    return WeldedLinkage(wm, removed, tuple(locked), tuple(bodies), body_of, freedoms, joint_links)


def weld_linkage(mech: Mechanism, removed: str | None = None, locked: Sequence[str] = ()) -> WeldedLinkage:
    """The linkage with one link removed and some joints locked, as a new mechanism.

    A locked joint welds its two links into one rigid link.  Links that the
    locks make rigid together (a four-bar loop with one pin locked, say) are
    welded too, so that every link of the result can still move relative to
    the others.

    Parameters
    ----------
    mech : Mechanism
    removed : str, optional
        Link taken out with its joints.
    locked : sequence of str, optional
        One-freedom joints (revolute, prismatic, rolling) to lock.

    Returns
    -------
    WeldedLinkage

    Raises
    ------
    RelaxationError
        An unknown link or joint, a higher pair asked to be locked, a joint of
        the removed link asked to be locked, a linkage that falls apart when
        the link is removed, or a welded linkage that is not a valid mechanism.

    Examples
    --------
    >>> from mechgraph.casefile import demo_mechanism
    >>> w = weld_linkage(demo_mechanism(), removed="pusher", locked=["O6"])
    >>> w.bodies[0], w.freedoms
    (('frame', 'pad arm'), 1)
    >>> w.mechanism.link_names
    ('frame+pad arm', 'crank', 'coupler', 'rocker')

    Notes
    -----
    One pebble game and one rigidity test per pair of links: O(n^2 (n + j)).
    """
    locked = tuple(locked)
    _check_names(mech, removed, locked)
    if not _connected(mech, removed):
        raise RelaxationError(f"removing link '{removed}' splits '{mech.name}' into pieces; remove another link")
    g, names = _game(mech, removed, locked)
    return _weld(mech, removed, locked, _bodies(g, len(names)), names, g.freedoms)


# -------------------------------------------------------------- link poses
def _poses(mech: Mechanism, poses) -> np.ndarray:
    """Checked link poses, shape (n_links, 3); the case's own position (zeros) by default."""
    if poses is None:
        return mech.reference_poses()
    try:
        P = np.asarray(poses, dtype=float)
    except (TypeError, ValueError):
        P = np.zeros(0)
    if P.shape != (mech.n_links, 3) or not np.all(np.isfinite(P)):
        raise RelaxationError(
            f"poses must be a finite array of shape ({mech.n_links}, 3), one (x, y, theta) per link of '{mech.name}', "
            f"got shape {P.shape}"
        )
    return P


def _welded_seeds(mech: Mechanism, w: WeldedLinkage, P: np.ndarray):
    """Primary centers and loci of the welded linkage's joints at the original links' poses ``P``.

    Each joint keeps its geometry in the frames of its original links, so its
    primary at those links' poses is what it says in the welded linkage too;
    only the link indices are the welded bodies'.  At the case's own position
    this is :func:`~mechgraph.analysis.primary_seeds` of ``w.mechanism``.
    """
    pts, lines = [], []
    wm = w.mechanism
    for jt in wm.joints:
        a0, b0 = w.joint_links[jt.name]
        pr = jt.primary(P[mech.index[a0]], P[mech.index[b0]])
        A, B = wm.index[jt.links[0]], wm.index[jt.links[1]]
        if pr.point is not None:
            pts.append((A, B, pr.point, jt.name, pr.note))
        else:
            lines.append((A, B, pr.line, jt.name, pr.note))
    return pts, lines


# ---------------------------------------------------------------- geometry
class _Frame:
    """Coordinates about the drawing centre, at the drawing scale (as the solver works)."""

    def __init__(self, scale: float, centre):
        self.L = float(scale)
        self.ox, self.oy = float(centre[0]), float(centre[1])

    def pin(self, p):
        """Caller point -> canonical point about the centre."""
        return pg.normalized_point(pg.translate_point(p, -self.ox, -self.oy), scale=self.L)

    def unpin(self, p):
        """Point about the centre -> canonical caller point."""
        return pg.normalized_point(pg.translate_point(p, self.ox, self.oy), scale=self.L, origin=(self.ox, self.oy))

    def pin_line(self, l):
        return pg.normalized_line(pg.translate_line(l, -self.ox, -self.oy), scale=self.L)

    def unpin_line(self, l):
        return pg.normalized_line(pg.translate_line(l, self.ox, self.oy), scale=self.L, origin=(self.ox, self.oy))

    def sep(self, p, q) -> float:
        return pg.point_separation(p, q, scale=self.L)

    def line_sep(self, l, m) -> float:
        return pg.line_separation(l, m, scale=self.L)

    def text(self, p) -> str:
        """A caller point in words: ``(x, y)`` or ``at infinity in direction (dx, dy)``."""
        c = pg.to_cartesian(p, scale=self.L * _FAR, tol=1.0)
        if c is None:
            d = math.hypot(p[0], p[1])
            return f"at infinity in direction ({p[0] / d:.6g}, {p[1] / d:.6g})"
        return f"({c[0]:.6g}, {c[1]:.6g})"


# ------------------------------------------------------------------ results
@dataclass(frozen=True)
class MotionPosition:
    """Where a pair's center is in one locked motion of a relaxed linkage.

    Attributes
    ----------
    locked : str
        The joint locked for this motion.
    welded : str
        Which links that welds, in words.
    point : tuple or None
        The center in this motion (canonical homogeneous point, caller
        coordinates); None when the two links are welded together (``at_rest``).
    at_rest : bool
        The lock welds the pair's two links into one body: they do not move
        relative to each other in this motion.
    derivation : str
        How the three-centers theorem locates it in the welded linkage.
    centred : tuple or None
        ``point`` about the drawing centre at the drawing scale.
    """

    locked: str
    welded: str
    point: tuple | None
    at_rest: bool
    derivation: str
    centred: tuple | None = field(default=None, repr=False, compare=False)


@dataclass(frozen=True)
class RelaxationLine:
    """What one relaxation says of one pair's center: a line it lies on, or the point itself.

    Attributes
    ----------
    i, j : int
        The pair (link indices, i < j).
    removed : str
        The link removed (the linkage left has two freedoms).
    positions : tuple of MotionPosition
        The two positions used (two locked motions).
    line : tuple or None
        Homogeneous line through the two positions (caller coordinates); None
        when the positions coincide and ``point`` is set.
    point : tuple or None
        Set when the center is the same in every motion the removal leaves
        free (the two positions coincide, or one lock welds the pair's links
        together): then it is the center.
    spread : float
        Separation of the two positions (scale-free; small means a poorly
        defined line).
    residual : float
        Largest incidence residual of the positions in the other locked
        motions (a free consistency check; 0 with only two motions).
    centred : tuple
        ``line`` (or ``point``) about the drawing centre at the drawing scale,
        as the constructions use it.
    """

    i: int
    j: int
    removed: str
    positions: tuple
    line: tuple | None
    point: tuple | None
    spread: float
    residual: float
    centred: tuple | None = field(default=None, repr=False, compare=False)

    def describe(self, mech: Mechanism) -> str:
        """The construction in words (coordinates in ``mech``'s drawing units)."""
        return self._text(_Frame(mech.scale, mech.centre))

    def _text(self, fr: "_Frame") -> str:
        head = f"with link '{self.removed}' removed (two freedoms left)"
        a, b = self.positions
        if self.point is not None and (a.at_rest or b.at_rest):
            rest, moving = (a, b) if a.at_rest else (b, a)
            return (
                f"{head}, locking joint '{rest.locked}' ({rest.welded}) stops the two links moving relative to each "
                f"other, so in every other motion left free the center stays where locking joint '{moving.locked}' "
                f"({moving.welded}) puts it: {fr.text(self.point)}"
            )
        if self.point is not None:
            return (
                f"{head}, locking joint '{a.locked}' ({a.welded}) and locking joint '{b.locked}' ({b.welded}) put the "
                f"center at the same point {fr.text(self.point)}: it does not depend on the motion left free, so it is "
                "the center"
            )
        return (
            f"{head}, the center lies on the line through {fr.text(a.point)}, where locking joint '{a.locked}' "
            f"({a.welded}) puts it, and {fr.text(b.point)}, where locking joint '{b.locked}' ({b.welded}) puts it"
        )


@dataclass(frozen=True)
class Motion:
    """One locked motion of a relaxed linkage: the welded linkage and its three-centers solution."""

    locked: str
    welded: WeldedLinkage
    three_centers: ThreeCentersResult


@dataclass(frozen=True)
class Relaxation:
    """One relaxation: the link removed, its distinct locked motions, and what they say of each center.

    Attributes
    ----------
    removed : str
    motions : tuple of Motion
        One per distinct motion (locks that give the same motion are kept once).
    passed_over : tuple of (str, str)
        Joints not used as locks, each with the reason.
    lines : dict
        ``(i, j)`` -> :class:`RelaxationLine`, for every pair not involving the
        removed link that at least two motions locate (or one locates and
        another holds at rest).
    """

    removed: str
    motions: tuple
    passed_over: tuple
    lines: dict = field(default_factory=dict, compare=False, repr=False)

    def line(self, i: int, j: int) -> RelaxationLine | None:
        """What this relaxation says of pair (i, j), or None."""
        return self.lines.get((min(i, j), max(i, j)))


@dataclass(frozen=True)
class RelaxationDerivation:
    """How a center was found by relaxation.

    Attributes
    ----------
    i, j : int
    pair : str
    point : tuple
        The center (canonical homogeneous point, caller coordinates).
    lines : tuple
        The :class:`RelaxationLine` objects used and, where one was used, the
        three-centers :class:`~mechgraph.three_centers.Locus`: two lines that
        meet at the center, or one :class:`RelaxationLine` that gives the point.
    crossing : float
        Separation of the two lines (1 well apart, near 0 nearly coincident); 1
        when one relaxation gives the point.
    text : str
        The construction in words an engineer can redraw.
    steps : tuple of str
        How each position used was located by the theorem in its welded linkage.
    """

    i: int
    j: int
    pair: str
    point: tuple
    lines: tuple
    crossing: float
    text: str
    steps: tuple

    @property
    def details(self) -> str:
        """``text`` followed by the theorem steps in each welded linkage, one per line."""
        return "\n".join((self.text,) + tuple(f"  - {s}" for s in self.steps))


@dataclass(frozen=True)
class RelaxationResult:
    """Outcome of :func:`locate_by_relaxation`.

    Attributes
    ----------
    mechanism : Mechanism
    points : tuple
        Per pair (order of :func:`~mechgraph.three_centers.pair_index`): the
        canonical homogeneous center, or None where nothing located it.
    methods : tuple of str
        Per pair: ``"joint"``, ``"three-centers"``, ``"coincident"`` (by the
        theorem, possibly from relaxation seeds), ``"relaxation"`` or
        ``"unresolved"``.
    derivations : tuple of str
        Per pair, in words.
    found : dict
        ``(i, j)`` -> :class:`RelaxationDerivation`, for each center found by relaxation.
    theorem_alone : tuple of (int, int)
        Pairs the theorem reached from the joints alone.
    three_centers : ThreeCentersResult
        The final theorem run, seeded with the joints and the relaxation centers.
    relaxations : tuple of Relaxation
        The relaxations tried, in order.
    rounds : int
        Theorem runs with relaxation seeds.
    max_line_residual : float
        Largest incidence residual of any relaxation line (and theorem locus)
        of a found pair at its center, and of any extra locked-motion position
        on its line: 0 for exact, consistent constructions.
    max_collinearity : float
        Largest collinearity residual of the three centers of any link triple
        (see :func:`~mechgraph.crosscheck.collinearity_residuals`).
    """

    mechanism: Mechanism
    points: tuple
    methods: tuple
    derivations: tuple
    found: dict
    theorem_alone: tuple
    three_centers: ThreeCentersResult
    relaxations: tuple
    rounds: int
    max_line_residual: float
    max_collinearity: float

    def _q(self, a: str, b: str) -> int:
        m = self.mechanism
        try:
            i, j = m.index[a], m.index[b]
        except KeyError as e:
            raise RelaxationError(f"link {e} is not a link of '{m.name}'; links are: {', '.join(m.link_names)}") from None
        if i == j:
            raise RelaxationError(f"a center needs two different links, got '{a}' twice")
        return pair_index(i, j, m.n_links)

    def point(self, a: str, b: str):
        """The center of the two named links (None if not located)."""
        return self.points[self._q(a, b)]

    def method(self, a: str, b: str) -> str:
        return self.methods[self._q(a, b)]

    def derivation(self, a: str, b: str) -> str:
        return self.derivations[self._q(a, b)]

    @property
    def unresolved(self) -> list[tuple[int, int]]:
        """Pairs located by nothing."""
        return [p for p, pt in zip(pairs(self.mechanism.n_links), self.points) if pt is None]

    @property
    def complete(self) -> bool:
        return not self.unresolved

    def require_complete(self) -> "RelaxationResult":
        """This result, or :class:`IncompleteRelaxationError` naming the pairs left."""
        left = tuple(self.mechanism.pair_names(i, j) for i, j in self.unresolved)
        if left:
            tried = ", ".join(f"'{r.removed}'" for r in self.relaxations) or "none"
            raise IncompleteRelaxationError(
                f"'{self.mechanism.name}': center(s) {', '.join(left)} were reached neither by the three-centers "
                f"theorem nor by relaxation (links removed: {tried}); use the velocity analysis for them",
                pairs=left,
            )
        return self


# --------------------------------------------------------------- the method
def _relax(work: Mechanism, P: np.ndarray, removed: str, frame: _Frame, tol: float) -> Relaxation | None:
    """One relaxation: its motions, and a line (or point) per pair not involving the removed link.

    None when removing the link does not leave a connected linkage of two freedoms.
    """
    if not _connected(work, removed):
        return None
    g0, names = _game(work, removed)
    if g0.freedoms != 2:
        return None
    # Source: Foster & Pennock, ASME IDETC 2004 (abstract, as recorded in
    # references.md): remove a binary link, two freedoms are left, and in a
    # two-freedom linkage each secondary center lies on a unique straight line.
    # A locked joint welds its two links (common practice, no source); two
    # locks whose welded bodies differ give two different motions, since the
    # same motion makes the same links move as one (common practice, no source).
    motions: list[Motion] = []
    passed: list[tuple[str, str]] = []
    seen: dict[frozenset, str] = {}
    for jt in work.joints:
        if removed in jt.links:
            continue
        if jt.freedoms != 1:
            passed.append((jt.name, f"a {jt.kind} joint leaves {jt.freedoms} freedoms; locking it takes more than one"))
            continue
        g = _lock(g0, names, work, jt)
        if g.freedoms != 1:
            passed.append((jt.name, f"locking it leaves {g.freedoms} freedoms, not one"))
            continue
        members = _bodies(g, len(names))
        key = frozenset(frozenset(b) for b in members)
        if key in seen:
            passed.append((jt.name, f"locking it gives the same motion as locking '{seen[key]}'"))
            continue
        seen[key] = jt.name
        try:
            w = _weld(work, removed, (jt.name,), members, names, g.freedoms)
        except RelaxationError as e:
            passed.append((jt.name, str(e)))
            continue
        pts, lines = _welded_seeds(work, w, P)
        tcw = solve_three_centers(w.mechanism.n_links, pts, lines, scale=frame.L, origin=(frame.ox, frame.oy), tol=tol)
        motions.append(Motion(jt.name, w, tcw))
    out: dict[tuple[int, int], RelaxationLine] = {}
    relax = Relaxation(removed, tuple(motions), tuple(passed), out)
    if len(motions) < 2:
        return relax
    n = work.n_links
    r = work.index[removed]
    texts = [m.welded.welded_text() for m in motions]
    for i, j in pairs(n):
        if r in (i, j):
            continue  # the removed link's own centers say nothing in this relaxation
        a, b = work.link_names[i], work.link_names[j]
        located, rest = [], []
        for m, wt in zip(motions, texts):
            A, B = m.welded.body_of[a], m.welded.body_of[b]
            if A == B:
                rest.append(MotionPosition(m.locked, wt, None, True, f"locking '{m.locked}' welds '{a}' and '{b}' together"))
                continue
            p = m.three_centers.point(A, B)
            if p is None:
                continue
            d = describe_derivation(m.welded.mechanism, m.three_centers.derivation(A, B))
            step = f"with '{removed}' removed and '{m.locked}' locked, center {m.welded.mechanism.pair_names(*sorted((A, B)))}: {d}"
            located.append(MotionPosition(m.locked, wt, p, False, step, centred=frame.pin(p)))
        if not located:
            continue
        if len(located) < 2:
            if rest:
                # P = alpha P_rest + beta P_other with P_rest = 0: every motion but the
                # welded one puts the center at the same point (poles are linear in
                # the motion; common practice, no source).
                out[(i, j)] = RelaxationLine(i, j, removed, (rest[0], located[0]), None, located[0].point, 0.0, 0.0,
                                             centred=located[0].centred)
            continue
        s, u, v = max(((frame.sep(x.centred, y.centred), x, y) for x, y in combinations(located, 2)), key=lambda t: t[0])
        if s <= tol:
            # the same point in two different motions: by linearity, in every motion
            out[(i, j)] = RelaxationLine(i, j, removed, (u, v), None, u.point, s, s, centred=u.centred)
            continue
        if rest:
            continue  # a welded motion says the point is fixed, two others differ: non-generic, say nothing
        # Poles are linear in the motion, P = alpha P_u + beta P_v, so every motion of
        # the relaxed linkage (the true one too) puts the center on the join of the
        # two positions (common practice, no source).
        lc = pg.normalized_line(pg.join(u.centred, v.centred), scale=frame.L)
        res = max((pg.point_on_line(x.centred, lc, scale=frame.L) for x in located if x is not u and x is not v), default=0.0)
        out[(i, j)] = RelaxationLine(i, j, removed, (u, v), frame.unpin_line(lc), None, s, res, centred=lc)
    return relax


def _locus_text(mech: Mechanism, loc: Locus) -> str:
    if loc.through is None:
        return f"the {loc.note or 'contact normal of joint ' + repr(loc.joint)}"
    a, b = loc.through
    return (
        f"the three-centers line through centers {mech.pair_names(*sorted(a))} and {mech.pair_names(*sorted(b))} "
        f"(via link '{mech.link_names[loc.via]}')"
        if loc.via is not None
        else f"the three-centers line {mech.pair_names(*sorted(a))}/{mech.pair_names(*sorted(b))}"
    )


def _line_text(mech: Mechanism, frame: _Frame, x) -> str:
    return x._text(frame) if isinstance(x, RelaxationLine) else _locus_text(mech, x)


def _try_locate(mech: Mechanism, tc: ThreeCentersResult, rlines: dict, frame: _Frame, tol: float, theorem_lines: bool) -> dict:
    """Centers located by the lines known so far (relaxation lines and theorem loci)."""
    new = {}
    n = mech.n_links
    for q, (i, j) in enumerate(pairs(n)):
        if tc.points[q] is not None or not rlines.get(q):
            continue
        cands = rlines[q]
        pair = mech.pair_names(i, j)
        direct = [c for c in cands if c.point is not None]
        if direct:
            c = min(direct, key=lambda c: c.residual)
            text = f"by relaxation: {c._text(frame)}"
            steps = tuple(p.derivation for p in c.positions if not p.at_rest)
            new[q] = (c.centred, RelaxationDerivation(i, j, pair, c.point, (c,), 1.0, text, steps))
            continue
        options = [(c, c.centred) for c in cands]
        if theorem_lines:
            options += [(loc, frame.pin_line(loc.line)) for loc in tc.loci[q]]
        best, best_s = None, 0.0
        for (x, lx), (y, ly) in combinations(options, 2):
            if not (isinstance(x, RelaxationLine) or isinstance(y, RelaxationLine)):
                continue
            s = frame.line_sep(lx, ly)
            if s > best_s:
                best, best_s = ((x, lx), (y, ly)), s
        if best is None or best_s <= tol:
            continue  # one line only, or lines that coincide: wait for another relaxation
        (x, lx), (y, ly) = best
        pc = pg.normalized_point(pg.meet(lx, ly), scale=frame.L)
        p = frame.unpin(pc)
        text = (
            f"by relaxation: [line 1] {_line_text(mech, frame, x)}; [line 2] {_line_text(mech, frame, y)}; "
            f"the two lines meet at {frame.text(p)}"
        )
        steps = tuple(s.derivation for z in (x, y) if isinstance(z, RelaxationLine) for s in z.positions)
        new[q] = (pc, RelaxationDerivation(i, j, pair, p, (x, y), best_s, text, steps))
    return new


def _removal_order(work: Mechanism) -> list[str]:
    """Links to try removing: fewest joints first (binary links), then in the order given."""
    degree = {x: 0 for x in work.link_names}
    for jt in work.joints:
        for x in jt.links:
            degree[x] += 1
    return sorted(work.link_names, key=lambda x: (degree[x], work.index[x]))


def _check_tol(tol) -> None:
    if isinstance(tol, bool) or not isinstance(tol, (int, float)) or not (tol > 0.0) or not math.isfinite(tol):
        raise RelaxationError(f"tol must be a positive, finite number, got {tol!r}")


def relax_linkage(mech: Mechanism, removed: str, poses=None, *, tol: float = 1e-9) -> Relaxation:
    """The line each relative center lies on once one link is removed (two freedoms left).

    Each one-freedom joint of the relaxed linkage is locked in turn; the locks
    that leave one freedom give its motions (kept once per distinct motion).
    In each, the three-centers theorem alone locates what it can; per pair,
    the line through its positions in two motions is the line it lies on in
    every motion of the relaxed linkage, the true one included.

    Parameters
    ----------
    mech : Mechanism
    removed : str
        The link to remove (with its joints).
    poses : ndarray, shape (n_links, 3), optional
        Link poses; the case's own position by default.
    tol : float, default 1e-9
        Coincidence tolerance (see :func:`locate_by_relaxation`).

    Returns
    -------
    Relaxation

    Raises
    ------
    RelaxationError
        ``removed`` is not a link; removing it does not leave a connected
        linkage of exactly two freedoms (by count); ``tol`` or ``poses`` invalid.

    Examples
    --------
    >>> from mechgraph.casefile import demo_mechanism
    >>> m = demo_mechanism()
    >>> rel = relax_linkage(m, "pusher")
    >>> [x.locked for x in rel.motions]
    ['O2', 'O6']
    >>> i, j = m.index["frame"], m.index["pad arm"]
    >>> rel.line(i, j).point is not None       # the pad arm pivot: the same in every motion
    True

    Notes
    -----
    One pebble game and rigid-body search per lockable joint, O(n^2 (n + j)),
    and one three-centers run per distinct motion, O(n^3).

    References
    ----------
    Foster & Pennock, ASME IDETC 2004 (abstract, as recorded in references.md).
    """
    _check_tol(tol)
    P = _poses(mech, poses)
    if removed is None:
        raise RelaxationError("relax_linkage needs the name of the link to remove")
    _check_names(mech, removed, ())
    out = _relax(mech, P, removed, _Frame(mech.scale, mech.centre), tol)
    if out is None:
        if not _connected(mech, removed):
            why = "the linkage falls apart"
        else:
            why = f"{counted_freedoms(mech, removed)} freedom(s) are left, not two"
        raise RelaxationError(f"removing link '{removed}' from '{mech.name}' is no relaxation: {why}")
    return out


def locate_by_relaxation(mech: Mechanism, poses=None, *, tol: float = 1e-9, theorem_lines: bool = True) -> RelaxationResult:
    """Every relative center, the ones the three-centers theorem cannot reach found by relaxation.

    First the theorem runs on the joints alone.  For the centers it leaves,
    links are removed one at a time so that two freedoms are left; two locked
    motions of each relaxed linkage, each solved by the theorem alone, put
    each wanted center on a straight line; two such lines (or one and a line
    the theorem already knows) meet at the center.  The centers so found are
    fed back to the theorem as seeds, and it propagates the rest.  This is
    repeated, one relaxation more at a time, until every center is located or
    no relaxation is left.  No velocity analysis is used.

    Parameters
    ----------
    mech : Mechanism
        A single-freedom linkage (any joint kinds; locks are only put on
        revolute, prismatic and rolling joints).
    poses : ndarray, shape (n_links, 3), optional
        Link poses; the case's own position by default.
    tol : float, default 1e-9
        Coincidence tolerance, scale-free (about distance / drawing size, see
        :func:`~mechgraph.projective.point_separation`): of the three-centers
        solver, of two positions of a center in two motions (then the center
        does not depend on the motion), and of two lines (then they locate
        nothing and another relaxation is tried).
    theorem_lines : bool, default True
        Also meet a relaxation line with a line the three-centers theorem
        already knows for the pair (fewer relaxations).  With False only two
        relaxation lines locate a center, as in the published method.

    Returns
    -------
    RelaxationResult
        With every center located, or the pairs left in ``unresolved`` (see
        :meth:`RelaxationResult.require_complete`).  A determinate linkage
        returns at once, with ``relaxations == ()``.

    Raises
    ------
    RelaxationError
        ``tol`` not a positive number; ``poses`` not of shape (n_links, 3); a
        linkage the theorem leaves incomplete that has not one freedom by count
        (two inputs: its other centers depend on the ratio of the input rates,
        and no single point exists; none: a structure).
    ModelError
        From a joint that cannot say where it is at ``poses`` (a contact whose
        profiles are not modelled, away from the drawn position).

    Examples
    --------
    >>> from mechgraph.casefile import demo_mechanism
    >>> r = locate_by_relaxation(demo_mechanism())      # determinate: nothing to relax
    >>> r.complete, r.relaxations, r.rounds
    (True, (), 0)

    An eight-bar the theorem alone cannot finish (a four-bar loop with a
    ternary link hung from three of its links by three binary links):

    >>> from mechgraph.generate import _pin
    >>> from mechgraph.model import Link, Mechanism
    >>> pins = [("frame", "L1", (0, 0)), ("L1", "L2", (40, 80)), ("L2", "L3", (230, 120)),
    ...         ("frame", "L3", (250, -20)), ("frame", "B1", (-120, 60)), ("L1", "B2", (-40, 60)),
    ...         ("L2", "B3", (140, 200)), ("B1", "F", (-100, 260)), ("B2", "F", (20, 300)),
    ...         ("B3", "F", (120, 380))]
    >>> links = [Link("frame", ground=True)] + [Link(x) for x in ("L1", "L2", "L3", "F", "B1", "B2", "B3")]
    >>> m = Mechanism(links=links, joints=[_pin(f"J{k}", a, b, p) for k, (a, b, p) in enumerate(pins)])
    >>> r = locate_by_relaxation(m)
    >>> r.complete, sorted(set(r.methods))
    (True, ['joint', 'relaxation', 'three-centers'])
    >>> d = next(iter(r.found.values()))
    >>> d.text.startswith("by relaxation: [line 1] with link")
    True

    Notes
    -----
    Method (References): remove a link so that two freedoms are left; lock
    each one-freedom joint in turn and keep the locks that leave one freedom,
    once per distinct motion; weld the bodies each lock makes rigid (found by
    the pebble-game count, no velocity analysis) and run the three-centers
    solver on the welded linkage; per wanted pair, join the two positions
    farthest apart (the other positions must lie on that line: see
    ``max_line_residual``).  A pair's two links welded together in one motion,
    or the same position in two motions, give the point itself.  The lines of
    different relaxations, and the theorem's own loci, are met pairwise, the
    best-crossing pair chosen.

    Cost: for r relaxations tried, each with j joints to lock and n links,
    r j pebble games (O(n^2 (n + j)) each, for the rigid bodies) and r j
    three-centers runs (O(n^3) each), plus one theorem run per round of
    seeding.  Measured on the two eight-bar cases in cases/: one relaxation
    (eight locked motions) completes each, about 5 ms per call; with
    ``theorem_lines=False`` two relaxations, about 9 ms (the theorem alone on
    the joints takes about 0.2 ms, the whole velocity analysis about 0.8 ms).

    Limitations: the counting assumes generic geometry (no compound pins at
    one point, no loop of sliders alone); a welded linkage that is itself
    indeterminate gives no position, and another lock or relaxation is tried.

    References
    ----------
    Foster, D. E. and Pennock, G. R., "A Graphical Method to Find the Secondary
    Instantaneous Centers of Zero Velocity for the Double Butterfly Linkage",
    ASME J. Mech. Des. 125(2):268-274, 2003; and their two-freedom relaxation,
    ASME IDETC 2004 (abstract, as recorded in references.md).  Indeterminate
    linkages: Di Gregorio, ASME J. Mech. Des. 130(4):042303, 2008 (abstract).
    """
    _check_tol(tol)
    P = _poses(mech, poses)
    frame = _Frame(mech.scale, mech.centre)
    origin = (frame.ox, frame.oy)
    n = mech.n_links
    pts, lines = primary_seeds(mech, P)
    tc = solve_three_centers(n, pts, lines, scale=frame.L, origin=origin, tol=tol)
    alone = tuple(p for p, pt in zip(pairs(n), tc.points) if pt is not None)
    found: dict[int, tuple] = {}
    relaxations: list[Relaxation] = []
    rlines: dict[int, list[RelaxationLine]] = {}
    rounds = 0
    if tc.unresolved:
        dof = counted_freedoms(mech)
        if dof != 1:
            what = (
                "its centers the theorem cannot reach depend on the ratio of the input rates, so no single point exists"
                if dof > 1
                else "it is a structure"
            )
            raise RelaxationError(
                f"'{mech.name}' has {dof} freedom(s) by count; {what}. The relaxation method needs a single-freedom linkage"
            )
        for removed in _removal_order(mech):
            if not tc.unresolved:
                break
            relax = _relax(mech, P, removed, frame, tol)
            if relax is None:
                continue
            relaxations.append(relax)
            for (i, j), line in relax.lines.items():
                rlines.setdefault(pair_index(i, j, n), []).append(line)
            while tc.unresolved:
                new = _try_locate(mech, tc, rlines, frame, tol, theorem_lines)
                if not new:
                    break
                found.update(new)
                rounds += 1
                seeds = [(d.i, d.j, d.point, None, d.text) for _, d in (found[q] for q in sorted(found))]
                tc = solve_three_centers(n, list(pts) + seeds, lines, scale=frame.L, origin=origin, tol=tol)
    return _result(mech, tc, alone, found, rlines, tuple(relaxations), rounds, frame)


def _result(mech, tc, alone, found, rlines, relaxations, rounds, frame) -> RelaxationResult:
    n = mech.n_links
    methods, texts = [], []
    by_pair = {}
    worst = 0.0
    for q, (i, j) in enumerate(pairs(n)):
        if q in found:
            pc, d = found[q]
            by_pair[(i, j)] = d
            methods.append("relaxation")
            texts.append(d.text)
            for x in rlines.get(q, ()):
                worst = max(worst, x.residual)
                if x.line is not None:
                    worst = max(worst, pg.point_on_line(pc, x.centred, scale=frame.L))
                else:
                    worst = max(worst, frame.sep(pc, x.centred))
            for loc in (x for x in d.lines if isinstance(x, Locus)):
                worst = max(worst, pg.point_on_line(pc, frame.pin_line(loc.line), scale=frame.L))
        elif tc.points[q] is not None:
            d = tc.derivations[q]
            methods.append(d.method)
            texts.append(describe_derivation(mech, d))
        else:
            methods.append("unresolved")
            ls = len(rlines.get(q, ()))
            texts.append(
                "not reached by the three-centers theorem nor by relaxation"
                + (f" (one relaxation line only: {rlines[q][0]._text(frame)})" if ls == 1 else "")
            )
    final = np.array([p if p is not None else (np.nan,) * 3 for p in tc.points], dtype=float).reshape(-1, 3)
    _, res = collinearity_residuals(final, n, scale=frame.L, origin=(frame.ox, frame.oy))
    return RelaxationResult(
        mechanism=mech,
        points=tuple(tc.points),
        methods=tuple(methods),
        derivations=tuple(texts),
        found=by_pair,
        theorem_alone=alone,
        three_centers=tc,
        relaxations=relaxations,
        rounds=rounds,
        max_line_residual=float(worst),
        max_collinearity=float(res.max()) if len(res) else 0.0,
    )
