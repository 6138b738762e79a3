"""Mechanisms of several topologies built from joint coordinates or from a random generator.

For an instantaneous velocity analysis any placement of the joint points is
a valid position: each link is the rigid body that contains its joint points.
So every function here that takes coordinates accepts any coordinates, and
the ``random_*`` functions (and :func:`ladder`) draw them from a
:class:`numpy.random.Generator`, rejecting only draws that are nearly
degenerate (points nearly coinciding, a loop with three nearly collinear
pins, a slider-crank coupler nearly square to the guide).  That rejection is
what keeps random mechanisms away from dead points and change points; it is
not a tuning of the geometry.

Link names are ``"frame"`` (ground), then ``"L1"``, ``"L2"``, ...; link
``"L1"`` is always the input crank, driven at ``rate`` (rad/s) by the revolute
``"O2"`` between the frame and the crank.

Examples
--------
>>> import numpy as np
>>> from mechgraph.generate import four_bar, ladder
>>> four_bar((0, 0), (30, 40), (120, 60), (100, 0)).link_names
('frame', 'L1', 'L2', 'L3')
>>> ladder(10, np.random.default_rng(1)).n_links
10
"""

from __future__ import annotations

import math
from typing import Callable, Sequence

import numpy as np

from .joints import Prismatic, Revolute
from .model import Driver, Link, Mechanism

__all__ = [
    "four_bar",
    "slider_crank",
    "watt_six_bar",
    "stephenson_six_bar",
    "ladder",
    "random_four_bar",
    "random_slider_crank",
    "random_watt_six_bar",
    "random_stephenson_six_bar",
    "random_mechanism",
    "TOPOLOGIES",
]

Point = Sequence[float]

#: Default size of a random drawing (side of the box the points are drawn in).
DEFAULT_SIZE = 100.0
#: Default smallest distance between two joint points, as a fraction of ``size``.
DEFAULT_MIN_SEPARATION = 0.05
#: Default smallest sine of the angle at any pin of a checked triangle (and
#: between a slider-crank coupler and the normal of its guide).
DEFAULT_MIN_SINE = 0.1
#: Draws tried before giving up.
MAX_TRIES = 10_000


# --------------------------------------------------------------------- helpers
def _xy(p: Point) -> tuple[float, float]:
    x, y = p
    return (float(x), float(y))


def _links(n: int) -> tuple[Link, ...]:
    return (Link("frame", ground=True),) + tuple(Link(f"L{i}") for i in range(1, n))


def _pin(name: str, a: str, b: str, at: Point) -> Revolute:
    return Revolute(name, (a, b), at=_xy(at))


def _triangle_sine(p: Point, q: Point, r: Point) -> float:
    """Smallest sine of the three angles of triangle pqr (0 when degenerate).

    Examples
    --------
    >>> round(_triangle_sine((0, 0), (1, 0), (0, 1)), 6)
    0.707107
    >>> _triangle_sine((0, 0), (1, 0), (2, 0))
    0.0
    """
    p, q, r = (np.asarray(v, dtype=float) for v in (p, q, r))
    sides = (np.linalg.norm(q - p), np.linalg.norm(r - q), np.linalg.norm(p - r))
    if min(sides) == 0.0:
        return 0.0
    area2 = abs((q[0] - p[0]) * (r[1] - p[1]) - (q[1] - p[1]) * (r[0] - p[0]))
    # sine of the angle opposite side s_k is area2 / (product of the other two sides)
    a, b, c = sides
    return float(min(area2 / (a * c), area2 / (a * b), area2 / (b * c)))


def _spread_enough(points: np.ndarray, min_dist: float) -> bool:
    d = points[:, None, :] - points[None, :, :]
    dist = np.hypot(d[..., 0], d[..., 1])
    np.fill_diagonal(dist, np.inf)
    return bool(dist.min() >= min_dist)


def _loop_ok(points: Sequence[Point], min_sine: float) -> bool:
    """Every triple of the loop's pins spans a proper triangle."""
    k = len(points)
    return all(
        _triangle_sine(points[i], points[j], points[l]) >= min_sine
        for i in range(k)
        for j in range(i + 1, k)
        for l in range(j + 1, k)
    )


def _draw(
    rng: np.random.Generator,
    n_points: int,
    accept: Callable[[np.ndarray], bool],
    *,
    size: float,
    min_separation: float,
    low: tuple[float, float] = (0.0, 0.0),
) -> np.ndarray:
    """Draw ``n_points`` uniform points in a box until ``accept`` and the spacing hold."""
    lo = np.asarray(low, dtype=float)
    for _ in range(MAX_TRIES):
        pts = lo + rng.uniform(0.0, size, size=(n_points, 2))
        if _spread_enough(pts, min_separation * size) and accept(pts):
            return pts
    raise RuntimeError(
        f"no acceptable draw of {n_points} points in {MAX_TRIES} tries; "
        "lower min_separation or min_sine"
    )


def _dyad_twists(held, p, m, g):
    """Twists ``(w, vx, vy)`` of a dyad's two links for a given twist of the link it hangs on.

    The dyad's first link is pinned at ``p`` to the held link, its second
    link at ``g`` to the frame, and the two to each other at ``m``.  Returns
    ``None`` when the three pins are collinear (the dyad cannot follow).

    Examples
    --------
    A crank turning at 1 rad/s about the origin, a square dyad to (1, 1):

    >>> first, second = _dyad_twists((1.0, 0.0, 0.0), (1.0, 0.0), (1.0, 1.0), (0.0, 1.0))
    >>> [round(float(c), 12) + 0.0 for c in first], [round(float(c), 12) + 0.0 for c in second]
    ([0.0, 0.0, 1.0], [1.0, 1.0, 0.0])
    """
    w, vx, vy = held
    px, py = p
    vp = np.array([vx - w * py, vy + w * px])
    mp = np.asarray(m, dtype=float) - np.asarray(p, dtype=float)
    mg = np.asarray(m, dtype=float) - np.asarray(g, dtype=float)
    # w1 J(m - p) - w2 J(m - g) = -v(p), J(d) = (-d_y, d_x)
    jac = np.array([[-mp[1], mg[1]], [mp[0], -mg[0]]])
    if abs(np.linalg.det(jac)) == 0.0:
        return None
    w1, w2 = np.linalg.solve(jac, -vp)
    first = np.array([w1, vp[0] + w1 * py, vp[1] - w1 * px])
    second = np.array([w2, w2 * g[1], -w2 * g[0]])
    return first, second


def _speeds_ok(twists, max_ratio: float) -> bool:
    return all(1.0 / max_ratio <= abs(t[0]) <= max_ratio for t in twists)


# ------------------------------------------------------------- fixed topologies
def four_bar(o2: Point, a: Point, b: Point, o4: Point, *, rate: float = 1.0, name: str = "four-bar") -> Mechanism:
    """A four-bar linkage: frame, crank L1, coupler L2, rocker L3, all pins.

    Parameters
    ----------
    o2, a, b, o4 : (x, y)
        Pins frame-L1, L1-L2, L2-L3 and frame-L3.
    rate : float, default 1.0
        Crank rate (rad/s) of the driver on ``"O2"``.
    name : str, default "four-bar"

    Returns
    -------
    Mechanism

    Examples
    --------
    >>> m = four_bar((0, 0), (30, 40), (120, 60), (100, 0), rate=10.0)
    >>> [j.name for j in m.joints], m.drivers[0].joint
    (['O2', 'A', 'B', 'O4'], 'O2')
    """
    return Mechanism(
        name=name,
        links=_links(4),
        joints=(
            _pin("O2", "frame", "L1", o2),
            _pin("A", "L1", "L2", a),
            _pin("B", "L2", "L3", b),
            _pin("O4", "frame", "L3", o4),
        ),
        drivers=(Driver("O2", rate=float(rate)),),
    )


def slider_crank(
    o2: Point, a: Point, b: Point, axis: Point = (1.0, 0.0), *, rate: float = 1.0, name: str = "slider-crank"
) -> Mechanism:
    """A slider-crank: frame, crank L1, connecting rod L2, slider L3 on a straight guide of the frame.

    Parameters
    ----------
    o2, a, b : (x, y)
        Pins frame-L1, L1-L2 and L2-L3 (the slider's wrist pin).
    axis : (dx, dy), default (1, 0)
        Direction of the guide, which passes through ``b`` (any offset from
        ``o2`` is allowed).
    rate : float, default 1.0
        Crank rate (rad/s) of the driver on ``"O2"``.
    name : str, default "slider-crank"

    Returns
    -------
    Mechanism
        Joints ``"O2"``, ``"A"``, ``"B"`` (revolutes) and ``"S"`` (prismatic
        frame-L3 at ``b`` along ``axis``).

    Examples
    --------
    >>> m = slider_crank((0, 0), (20, 30), (90, 10), axis=(1, 0))
    >>> m.joint_by_name["S"].kind, m.joint_by_name["S"].links
    ('prismatic', ('frame', 'L3'))
    """
    return Mechanism(
        name=name,
        links=_links(4),
        joints=(
            _pin("O2", "frame", "L1", o2),
            _pin("A", "L1", "L2", a),
            _pin("B", "L2", "L3", b),
            Prismatic("S", ("frame", "L3"), at=_xy(b), axis=_xy(axis)),
        ),
        drivers=(Driver("O2", rate=float(rate)),),
    )


def watt_six_bar(
    o2: Point,
    a: Point,
    b: Point,
    o4: Point,
    c: Point,
    d: Point,
    o6: Point,
    *,
    rate: float = 1.0,
    name: str = "watt-six-bar",
) -> Mechanism:
    """A Watt six-bar: two four-bars in series sharing the ternary rocker L3.

    The ternary links are the frame (O2, O4, O6) and L3 (B, O4, C); they are
    joined directly (at O4), which makes the chain a Watt chain.

    Parameters
    ----------
    o2, a, b, o4 : (x, y)
        First loop: pins frame-L1, L1-L2, L2-L3, frame-L3.
    c, d, o6 : (x, y)
        Second loop: pins L3-L4, L4-L5, frame-L5.
    rate : float, default 1.0
        Crank rate (rad/s) on ``"O2"``.
    name : str, default "watt-six-bar"

    Returns
    -------
    Mechanism

    Examples
    --------
    >>> m = watt_six_bar((0, 0), (10, 30), (60, 50), (50, 0), (90, 40), (130, 60), (120, 0))
    >>> m.n_links, len(m.joints)
    (6, 7)
    """
    return _six_bar("L3", (o2, a, b, o4, c, d, o6), rate, name)


def stephenson_six_bar(
    o2: Point,
    a: Point,
    b: Point,
    o4: Point,
    c: Point,
    d: Point,
    o6: Point,
    *,
    rate: float = 1.0,
    name: str = "stephenson-six-bar",
) -> Mechanism:
    """A Stephenson six-bar: a four-bar whose ternary coupler L2 drives a dyad to the frame.

    The ternary links are the frame (O2, O4, O6) and the coupler L2 (A, B, C);
    no joint joins them, which makes the chain a Stephenson chain.

    Parameters
    ----------
    o2, a, b, o4 : (x, y)
        Four-bar: pins frame-L1, L1-L2, L2-L3, frame-L3.
    c, d, o6 : (x, y)
        Dyad: pins L2-L4, L4-L5, frame-L5.
    rate : float, default 1.0
        Crank rate (rad/s) on ``"O2"``.
    name : str, default "stephenson-six-bar"

    Returns
    -------
    Mechanism

    Examples
    --------
    >>> m = stephenson_six_bar((0, 0), (10, 30), (60, 50), (50, 0), (40, 80), (100, 90), (110, 10))
    >>> m.joint_by_name["C"].links
    ('L2', 'L4')
    """
    return _six_bar("L2", (o2, a, b, o4, c, d, o6), rate, name)


def _six_bar(second_loop_on: str, pins, rate: float, name: str) -> Mechanism:
    """A four-bar frame-L1-L2-L3 with a dyad L4-L5 from ``second_loop_on`` to the frame."""
    o2, a, b, o4, c, d, o6 = pins
    return Mechanism(
        name=name,
        links=_links(6),
        joints=(
            _pin("O2", "frame", "L1", o2),
            _pin("A", "L1", "L2", a),
            _pin("B", "L2", "L3", b),
            _pin("O4", "frame", "L3", o4),
            _pin("C", second_loop_on, "L4", c),
            _pin("D", "L4", "L5", d),
            _pin("O6", "frame", "L5", o6),
        ),
        drivers=(Driver("O2", rate=float(rate)),),
    )


# ------------------------------------------------------------------ random ones
def random_four_bar(
    rng: np.random.Generator,
    *,
    size: float = DEFAULT_SIZE,
    min_separation: float = DEFAULT_MIN_SEPARATION,
    min_sine: float = DEFAULT_MIN_SINE,
    rate: float = 1.0,
) -> Mechanism:
    """A :func:`four_bar` with random pins in a ``size`` box.

    Every triple of the four pins spans a triangle whose angles all have a
    sine of at least ``min_sine``, and no two pins are closer than
    ``min_separation * size``.

    Parameters
    ----------
    rng : numpy.random.Generator
    size : float, default 100
    min_separation : float, default 0.05
    min_sine : float, default 0.1
    rate : float, default 1.0

    Returns
    -------
    Mechanism

    Examples
    --------
    >>> import numpy as np
    >>> m = random_four_bar(np.random.default_rng(0))
    >>> m.name, m.n_links
    ('four-bar', 4)
    """
    p = _draw(rng, 4, lambda q: _loop_ok(q, min_sine), size=size, min_separation=min_separation)
    return four_bar(*p, rate=rate)


def random_slider_crank(
    rng: np.random.Generator,
    *,
    size: float = DEFAULT_SIZE,
    min_separation: float = DEFAULT_MIN_SEPARATION,
    min_sine: float = DEFAULT_MIN_SINE,
    rate: float = 1.0,
) -> Mechanism:
    """A :func:`slider_crank` with random pins and a random guide direction.

    The pins O2, A, B span a proper triangle (sines of at least ``min_sine``)
    and the coupler A-B is at least ``asin(min_sine)`` away from square to the
    guide (where the crank could not drive the slider).

    Parameters
    ----------
    rng : numpy.random.Generator
    size : float, default 100
    min_separation : float, default 0.05
    min_sine : float, default 0.1
    rate : float, default 1.0

    Returns
    -------
    Mechanism

    Examples
    --------
    >>> import numpy as np
    >>> m = random_slider_crank(np.random.default_rng(0))
    >>> sorted({j.kind for j in m.joints})
    ['prismatic', 'revolute']
    """
    for _ in range(MAX_TRIES):
        theta = rng.uniform(0.0, math.pi)
        u = np.array([math.cos(theta), math.sin(theta)])

        def accept(q, u=u):
            ab = q[2] - q[1]
            return _triangle_sine(q[0], q[1], q[2]) >= min_sine and abs(ab @ u) / np.hypot(*ab) >= min_sine

        try:
            p = _draw(rng, 3, accept, size=size, min_separation=min_separation)
        except RuntimeError:
            continue
        return slider_crank(p[0], p[1], p[2], axis=(float(u[0]), float(u[1])), rate=rate)
    raise RuntimeError("no acceptable slider-crank drawn")  # pragma: no cover - practically unreachable


def _random_six(rng, size, min_separation, min_sine, second_loop):
    def accept(q):
        o2, a, b, o4, c, d, o6 = q
        return _loop_ok((o2, a, b, o4), min_sine) and _loop_ok(second_loop(q), min_sine)

    return _draw(rng, 7, accept, size=size, min_separation=min_separation)


def random_watt_six_bar(
    rng: np.random.Generator,
    *,
    size: float = DEFAULT_SIZE,
    min_separation: float = DEFAULT_MIN_SEPARATION,
    min_sine: float = DEFAULT_MIN_SINE,
    rate: float = 1.0,
) -> Mechanism:
    """A :func:`watt_six_bar` with random pins; both four-bar loops are proper.

    Parameters
    ----------
    rng : numpy.random.Generator
    size : float, default 100
    min_separation : float, default 0.05
    min_sine : float, default 0.1
    rate : float, default 1.0

    Returns
    -------
    Mechanism

    Examples
    --------
    >>> import numpy as np
    >>> random_watt_six_bar(np.random.default_rng(0)).n_links
    6
    """
    # second loop frame-L3-L4-L5: pins O4, C, D, O6
    p = _random_six(rng, size, min_separation, min_sine, lambda q: (q[3], q[4], q[5], q[6]))
    return watt_six_bar(*p, rate=rate)


def random_stephenson_six_bar(
    rng: np.random.Generator,
    *,
    size: float = DEFAULT_SIZE,
    min_separation: float = DEFAULT_MIN_SEPARATION,
    min_sine: float = DEFAULT_MIN_SINE,
    rate: float = 1.0,
) -> Mechanism:
    """A :func:`stephenson_six_bar` with random pins.

    The four-bar loop is proper and the dyad's pins C, D, O6 span a proper
    triangle (the dyad is not stretched out or folded).

    Parameters
    ----------
    rng : numpy.random.Generator
    size : float, default 100
    min_separation : float, default 0.05
    min_sine : float, default 0.1
    rate : float, default 1.0

    Returns
    -------
    Mechanism

    Examples
    --------
    >>> import numpy as np
    >>> random_stephenson_six_bar(np.random.default_rng(0)).n_links
    6
    """
    p = _random_six(rng, size, min_separation, min_sine, lambda q: (q[4], q[5], q[6]))
    return stephenson_six_bar(*p, rate=rate)


def ladder(
    n_links: int,
    rng: np.random.Generator,
    *,
    attach: str = "rocker",
    size: float = DEFAULT_SIZE,
    min_separation: float = DEFAULT_MIN_SEPARATION,
    min_sine: float = DEFAULT_MIN_SINE,
    max_speed_ratio: float = 10.0,
    rate: float = 1.0,
) -> Mechanism:
    """A one-freedom chain of stacked four-bar loops, with random pins.

    It starts from a four-bar (frame, crank L1, coupler L2, rocker L3) and adds
    ``(n_links - 4) / 2`` dyads.  Dyad ``s`` is two binary links
    ``L(2s+2)`` (its coupler) and ``L(2s+3)`` (its rocker): the coupler is
    pinned (joint ``"P{s}"``) to a link ``X`` of the previous loop, the two
    are pinned together (``"Q{s}"``), and the rocker is pinned to the frame
    (``"G{s}"``).  Two links and three pins keep the mobility at 1, and the
    new loop frame-X-coupler-rocker is a four-bar whose four sides all have
    known centers, so the three-centers theorem reaches every center.

    Parameters
    ----------
    n_links : int
        ``4 + 2k`` with ``k >= 0``.
    rng : numpy.random.Generator
    attach : {"rocker", "coupler", "mixed"}, default "rocker"
        Link ``X`` each dyad hangs on: the previous loop's rocker (every loop
        is then closed by pins only, so no center depends on a long chain of
        constructions), its coupler (the chain of Stephenson type; the loop is
        closed by the coupler's center relative to the frame), or a random
        choice per dyad.
    size : float, default 100
        Side of the box of each loop; loop ``s`` is drawn ``s * size / 2`` to
        the right of the first.
    min_separation : float, default 0.05
        No two pins closer than ``min_separation * size``.
    min_sine : float, default 0.1
        Every triangle of pins of a loop closed by pins, and the triangle of
        each dyad's three pins, has all its angle sines at least this.
    max_speed_ratio : float, default 10
        Every moving link except the crank turns at between
        ``1 / max_speed_ratio`` and ``max_speed_ratio`` times the crank rate.
        Speed ratios multiply along the chain, so without this bound a long
        ladder of random loops drifts towards speeds so large or small (a
        near-dead sub-chain) that its velocity equations are numerically
        singular; the bound rejects such draws, dyad by dyad.
    rate : float, default 1.0
        Crank rate (rad/s) on ``"O2"``.

    Returns
    -------
    Mechanism

    Raises
    ------
    ValueError
        If ``n_links`` is not ``4 + 2k`` or ``attach`` is not known.

    Examples
    --------
    >>> import numpy as np
    >>> from mechgraph.analysis import locate_centers
    >>> m = ladder(20, np.random.default_rng(7))
    >>> m.n_links, len(m.joints), locate_centers(m).unresolved
    (20, 28, [])
    >>> ladder(8, np.random.default_rng(7), attach="coupler").joint_by_name["P1"].links
    ('L2', 'L4')
    """
    n_links = int(n_links)
    if n_links < 4 or n_links % 2:
        raise ValueError(f"a ladder has 4 + 2k links (k >= 0), got {n_links}")
    if attach not in ("rocker", "coupler", "mixed"):
        raise ValueError(f"attach must be 'rocker', 'coupler' or 'mixed', got {attach!r}")
    def crank(q):
        return np.array([1.0, q[0][1], -q[0][0]])  # unit rate about O2

    def base_ok(q):
        if not _loop_ok(q, min_sine):
            return False
        tw = _dyad_twists(crank(q), q[1], q[2], q[3])
        return tw is not None and _speeds_ok(tw, max_speed_ratio)

    base = _draw(rng, 4, base_ok, size=size, min_separation=min_separation)
    o2, a, b, o4 = base
    joints = [
        _pin("O2", "frame", "L1", o2),
        _pin("A", "L1", "L2", a),
        _pin("B", "L2", "L3", b),
        _pin("O4", "frame", "L3", o4),
    ]
    all_points = [np.asarray(p) for p in base]
    twist = dict(zip(("L2", "L3"), _dyad_twists(crank(base), a, b, o4)))
    coupler, rocker = "L2", "L3"
    rocker_pivot = o4  # the rocker's pin on the frame
    min_dist = min_separation * size
    for s in range(1, (n_links - 4) // 2 + 1):
        x = attach if attach != "mixed" else ("rocker", "coupler")[int(rng.integers(2))]
        held = rocker if x == "rocker" else coupler
        low = (s * size / 2.0, 0.0)
        existing = np.asarray(all_points)

        def accept(q, x=x, existing=existing, pivot=rocker_pivot, held_twist=twist[held]):
            d = q[:, None, :] - existing[None, :, :]
            if np.hypot(d[..., 0], d[..., 1]).min() < min_dist:
                return False
            if x == "rocker":
                if not _loop_ok((pivot, q[0], q[1], q[2]), min_sine):
                    return False
            elif _triangle_sine(q[0], q[1], q[2]) < min_sine:
                return False
            tw = _dyad_twists(held_twist, q[0], q[1], q[2])
            return tw is not None and _speeds_ok(tw, max_speed_ratio)

        p, m_, g = _draw(rng, 3, accept, size=size, min_separation=min_separation, low=low)
        new_c, new_r = f"L{2 * s + 2}", f"L{2 * s + 3}"
        joints += [
            _pin(f"P{s}", held, new_c, p),
            _pin(f"Q{s}", new_c, new_r, m_),
            _pin(f"G{s}", "frame", new_r, g),
        ]
        all_points += [p, m_, g]
        twist[new_c], twist[new_r] = _dyad_twists(twist[held], p, m_, g)
        coupler, rocker, rocker_pivot = new_c, new_r, g
    return Mechanism(
        name=f"ladder-{n_links}",
        links=_links(n_links),
        joints=tuple(joints),
        drivers=(Driver("O2", rate=float(rate)),),
    )


#: Random generator of each topology by name (``ladder`` gets 8, 10 or 12 links).
TOPOLOGIES: dict[str, Callable[..., Mechanism]] = {
    "four-bar": random_four_bar,
    "slider-crank": random_slider_crank,
    "watt": random_watt_six_bar,
    "stephenson": random_stephenson_six_bar,
    "ladder": lambda rng, **kw: ladder(int(rng.choice([8, 10, 12])), rng, attach="mixed", **kw),
}


def random_mechanism(kind: str, rng: np.random.Generator, **kwargs) -> Mechanism:
    """A random mechanism of the named topology (a key of :data:`TOPOLOGIES`).

    Parameters
    ----------
    kind : str
        ``"four-bar"``, ``"slider-crank"``, ``"watt"``, ``"stephenson"`` or ``"ladder"``.
    rng : numpy.random.Generator
    **kwargs
        Passed on (``size``, ``min_separation``, ``min_sine``, ``rate``).

    Returns
    -------
    Mechanism

    Raises
    ------
    KeyError
        For an unknown topology.

    Examples
    --------
    >>> import numpy as np
    >>> random_mechanism("watt", np.random.default_rng(3)).name
    'watt-six-bar'
    """
    try:
        make = TOPOLOGIES[kind]
    except KeyError:
        raise KeyError(f"unknown topology {kind!r}; known: {', '.join(TOPOLOGIES)}") from None
    return make(rng, **kwargs)
