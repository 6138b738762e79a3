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
``"L1"`` is always the input crank (or cam, gear, wheel or planet arm), driven
at ``rate`` (rad/s) by the revolute ``"O2"`` between the frame and it.  The
two-freedom :func:`five_bar` has a second driver, ``"O5"``.  The eight-bar
chains (:func:`pin_chain`) keep the link names of their chain templates
(``DOUBLE_BUTTERFLY``, ``SINGLE_FLIER``) and name their pins ``"J0"``,
``"J1"``, ...; the driver is on ``"J0"``.

Besides revolutes and sliders the generators cover the higher pairs and
rolling: a cam and its follower (:func:`cam_follower`), a pin in a slot
(:func:`pin_in_slot_linkage`), gears on the frame and a planetary train
(:func:`geared_linkage`, :func:`planetary_linkage`), a wheel rolling on a
track or on another wheel (:func:`wheel_on_track`, :func:`wheel_on_wheel`),
the two-freedom five-bar and the two indeterminate eight-bar chains.  Their
random forms also reject draws whose velocity equations are nearly singular
(see :func:`_conditioned`).

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

from .errors import MechgraphError
from .joints import CamContact, GearMesh, PinInSlot, Prismatic, Revolute, RollingContact
from .model import Driver, Link, Mechanism
from .velocity import analyse_velocities

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
    "cam_follower",
    "pin_in_slot_linkage",
    "geared_linkage",
    "planetary_linkage",
    "wheel_on_track",
    "wheel_on_wheel",
    "five_bar",
    "DOUBLE_BUTTERFLY",
    "SINGLE_FLIER",
    "pin_chain",
    "random_cam_follower",
    "random_pin_in_slot_linkage",
    "random_geared_linkage",
    "random_rolling_linkage",
    "random_five_bar",
    "random_pin_chain",
    "random_double_butterfly",
    "random_single_flier",
    "random_mechanism",
    "TOPOLOGIES",
    "DETERMINATE",
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


# ------------------------------------------------ higher pairs, rolling, gears
def _unit_vec(v) -> np.ndarray:
    v = np.asarray(v, dtype=float)
    return v / np.hypot(*v)


def _line_sine(p: Point, direction, q: Point) -> float:
    """Sine of the angle between the line through ``p`` along ``direction`` and the ray from ``p`` to ``q``.

    0 when the line passes through ``q``; 1 when it is square to ``p -> q``.

    Examples
    --------
    >>> _line_sine((0, 0), (1, 0), (5, 0)), _line_sine((0, 0), (1, 0), (0, 3))
    (0.0, 1.0)
    """
    d = _unit_vec(direction)
    r = np.asarray(q, dtype=float) - np.asarray(p, dtype=float)
    n = float(np.hypot(*r))
    return 0.0 if n == 0.0 else float(abs(d[0] * r[1] - d[1] * r[0]) / n)


def _conditioned(mech: Mechanism, max_speed_ratio: float) -> bool:
    """True when the velocity equations are regular and no two links nearly move as one.

    The velocity analysis must succeed with the mechanism's drivers (no dead
    point, change point or driver mismatch), and the relative twist of every
    pair of links must be at least ``1 / max_speed_ratio`` of the largest link
    twist (sizes as :meth:`~mechgraph.velocity.VelocityState.twist_size`).  A
    pair below that is near relative rest, where its velocity pole is
    ill-conditioned: a near-degenerate draw.

    Examples
    --------
    >>> _conditioned(four_bar((0, 0), (30, 40), (120, 60), (100, 0)), 20.0)
    True
    >>> _conditioned(four_bar((0, 0), (30, 40), (60, 80), (100, 0)), 20.0)  # crank and coupler in line
    False
    """
    try:
        v = analyse_velocities(mech)
    except MechgraphError:
        return False
    t = v.twists
    n = len(t)
    if n < 2 or v.reference_size == 0.0:
        return False
    rel = v.twist_size(t[:, None, :] - t[None, :, :])[np.triu_indices(n, 1)]
    return bool(rel.min() >= v.reference_size / max_speed_ratio)


def _draw_conditioned(rng, n_points, params, accept, build, *, size, min_separation, max_speed_ratio, what):
    """Draw until a mechanism is accepted and :func:`_conditioned`.

    Each try draws the extra parameters ``params(rng)`` (directions, radii,
    shares), then ``n_points`` uniform points in a ``size`` box; the points
    must keep ``min_separation * size`` apart and pass ``accept(points,
    extra)``, and ``build(points, extra)`` must pass :func:`_conditioned`.
    """
    for _ in range(MAX_TRIES):
        extra = params(rng)
        pts = rng.uniform(0.0, size, size=(n_points, 2))
        if not (_spread_enough(pts, min_separation * size) and accept(pts, extra)):
            continue
        m = build(pts, extra)
        if _conditioned(m, max_speed_ratio):
            return m
    raise RuntimeError(f"no acceptable {what} in {MAX_TRIES} tries; lower min_separation or min_sine")  # pragma: no cover


def cam_follower(
    o2: Point,
    contact: Point,
    normal: Point,
    o3: Point,
    *,
    guide: Point | None = None,
    rate: float = 1.0,
    name: str = "cam-follower",
) -> Mechanism:
    """A disc cam L1 on the frame driving a follower L2 through a sliding contact.

    Parameters
    ----------
    o2 : (x, y)
        Cam shaft, pin frame-L1 (``"O2"``).
    contact : (x, y)
        Contact point of cam and follower (cam joint ``"K"`` between L1 and L2).
    normal : (dx, dy)
        Common normal of the two profiles at the contact, held by the follower.
    o3 : (x, y)
        The follower's pivot on the frame (``"O3"``), or, with ``guide``, a
        point of its straight guide (prismatic ``"S"``).
    guide : (dx, dy), optional
        For a translating follower: the direction it slides in.  Without it
        the follower rocks about ``o3``.
    rate : float, default 1.0
        Cam rate (rad/s) on ``"O2"``.
    name : str, default "cam-follower"

    Returns
    -------
    Mechanism
        Three links: frame, cam L1, follower L2.  One freedom
        (Gruebler-Kutzbach: 3 * 2 - 2 * 2 - 1).

    Examples
    --------
    >>> m = cam_follower((0, 0), (30, 20), (0.2, 1.0), (90, 50))
    >>> [j.kind for j in m.joints]
    ['revolute', 'cam', 'revolute']
    >>> cam_follower((0, 0), (30, 20), (0, 1), (30, 60), guide=(0, 1)).joint_by_name["S"].kind
    'prismatic'
    """
    follower = (
        Prismatic("S", ("frame", "L2"), at=_xy(o3), axis=_xy(guide))
        if guide is not None
        else _pin("O3", "frame", "L2", o3)
    )
    return Mechanism(
        name=name,
        links=_links(3),
        joints=(
            _pin("O2", "frame", "L1", o2),
            CamContact("K", ("L1", "L2"), at=_xy(contact), normal=_xy(normal)),
            follower,
        ),
        drivers=(Driver("O2", rate=float(rate)),),
    )


def pin_in_slot_linkage(
    o2: Point,
    pin: Point,
    slot: Point,
    o4: Point,
    c: Point,
    d: Point,
    o6: Point,
    *,
    rate: float = 1.0,
    name: str = "pin-in-slot",
) -> Mechanism:
    """A crank L1 whose pin runs in a straight slot of a lever L2, which drives a four-bar loop.

    Parameters
    ----------
    o2 : (x, y)
        Crank pivot, frame-L1 (``"O2"``).
    pin : (x, y)
        The crank's pin, running in the lever's slot (pin-in-slot ``"P"``, L1-L2).
    slot : (dx, dy)
        Direction of the slot (in the lever).
    o4 : (x, y)
        Lever pivot, frame-L2 (``"O4"``).
    c, d, o6 : (x, y)
        Output dyad: pins L2-L3 (``"C"``), L3-L4 (``"D"``) and frame-L4 (``"O6"``).
    rate : float, default 1.0
        Crank rate (rad/s) on ``"O2"``.
    name : str, default "pin-in-slot"

    Returns
    -------
    Mechanism
        Five links, five pins and the pin-in-slot: one freedom.

    Examples
    --------
    >>> m = pin_in_slot_linkage((0, 0), (40, 30), (-1, 0.3), (150, 0), (190, 110), (350, 40), (320, -80))
    >>> m.joint_by_name["P"].kind, m.joint_by_name["P"].links
    ('pin_in_slot', ('L1', 'L2'))
    """
    return Mechanism(
        name=name,
        links=_links(5),
        joints=(
            _pin("O2", "frame", "L1", o2),
            PinInSlot("P", ("L1", "L2"), at=_xy(pin), slot=_xy(slot)),
            _pin("O4", "frame", "L2", o4),
            _pin("C", "L2", "L3", c),
            _pin("D", "L3", "L4", d),
            _pin("O6", "frame", "L4", o6),
        ),
        drivers=(Driver("O2", rate=float(rate)),),
    )


def geared_linkage(
    o2: Point,
    o3: Point,
    pitch: Point,
    a: Point,
    e: Point,
    b: Point,
    *,
    rate: float = 1.0,
    name: str = "geared-five-bar",
) -> Mechanism:
    """A geared five-bar: two meshing gears L1, L2 on frame pivots, joined by two arms L3, L4.

    Both gear centres are pinned to the frame, so the frame is the carrier and
    the gears' relative center is the pitch point.

    Parameters
    ----------
    o2, o3 : (x, y)
        Gear centres, pins frame-L1 (``"O2"``) and frame-L2 (``"O3"``).
    pitch : (x, y)
        Pitch point of the mesh (gear joint ``"G"``), on the line of centres:
        between them for an external pair, outside them for a ring gear.
    a, e, b : (x, y)
        Crank pin of L1 to arm L3 (``"A"``), elbow L3-L4 (``"E"``), crank pin
        of L2 to arm L4 (``"B"``).
    rate : float, default 1.0
        Rate (rad/s) of gear L1 on ``"O2"``.
    name : str, default "geared-five-bar"

    Returns
    -------
    Mechanism
        Five links, five pins and the mesh: one freedom.

    Examples
    --------
    >>> m = geared_linkage((0, 0), (120, 0), (48, 0), (-20, 60), (60, 190), (150, 70))
    >>> m.joint_by_name["G"].carrier
    'frame'
    """
    return Mechanism(
        name=name,
        links=_links(5),
        joints=(
            _pin("O2", "frame", "L1", o2),
            _pin("O3", "frame", "L2", o3),
            GearMesh("G", ("L1", "L2"), centers=(_xy(o2), _xy(o3)), pitch_point=_xy(pitch)),
            _pin("A", "L1", "L3", a),
            _pin("E", "L3", "L4", e),
            _pin("B", "L2", "L4", b),
        ),
        drivers=(Driver("O2", rate=float(rate)),),
    )


def planetary_linkage(
    o2: Point,
    q: Point,
    pitch: Point,
    a: Point,
    b: Point,
    o4: Point,
    *,
    rate: float = 1.0,
    name: str = "planetary",
) -> Mechanism:
    """A planet gear L2 on a driven arm L1, meshing with a gear of the frame, driving a dyad L3-L4.

    The frame's gear (a fixed sun, or a fixed ring) is centred on the arm's
    pivot; the arm holds both gear centres, so it is the mesh's carrier
    and the planet's center relative to the frame is the pitch point.

    Parameters
    ----------
    o2 : (x, y)
        Arm pivot and centre of the frame's gear (``"O2"``, frame-L1).
    q : (x, y)
        Planet centre, pin L1-L2 (``"Q"``).
    pitch : (x, y)
        Pitch point (gear joint ``"G"``, frame-L2), on the line of centres:
        between ``o2`` and ``q`` for a sun, beyond ``q`` for a ring.
    a, b, o4 : (x, y)
        Output dyad: planet pin to coupler L3 (``"A"``), L3-L4 (``"B"``),
        frame-L4 (``"O4"``).
    rate : float, default 1.0
        Arm rate (rad/s) on ``"O2"``.
    name : str, default "planetary"

    Returns
    -------
    Mechanism
        Five links, five pins and the mesh: one freedom.

    Examples
    --------
    >>> m = planetary_linkage((0, 0), (60, 0), (40, 0), (70, 30), (150, 80), (160, 0))
    >>> m.joint_by_name["G"].carrier
    'L1'
    """
    return Mechanism(
        name=name,
        links=_links(5),
        joints=(
            _pin("O2", "frame", "L1", o2),
            _pin("Q", "L1", "L2", q),
            GearMesh("G", ("frame", "L2"), centers=(_xy(o2), _xy(q)), pitch_point=_xy(pitch)),
            _pin("A", "L2", "L3", a),
            _pin("B", "L3", "L4", b),
            _pin("O4", "frame", "L4", o4),
        ),
        drivers=(Driver("O2", rate=float(rate)),),
    )


def wheel_on_track(
    o2: Point, a: Point, w: Point, contact: Point, *, rate: float = 1.0, name: str = "wheel-on-track"
) -> Mechanism:
    """A crank L1 and rod L2 pushing a wheel L3 that rolls without slip on a straight track of the frame.

    Parameters
    ----------
    o2, a : (x, y)
        Pins frame-L1 (``"O2"``) and L1-L2 (``"A"``).
    w : (x, y)
        The wheel's axle, pin L2-L3 (``"W"``), at the wheel centre.
    contact : (x, y)
        Where the wheel touches the track (rolling joint ``"K"``, L3-frame);
        the track is the frame's line through it square to ``w - contact``.
    rate : float, default 1.0
        Crank rate (rad/s) on ``"O2"``.
    name : str, default "wheel-on-track"

    Returns
    -------
    Mechanism
        Four links, three pins and the rolling contact: one freedom.

    Examples
    --------
    >>> m = wheel_on_track((0, 150), (40, 190), (260, 40), (260, 0))
    >>> m.joint_by_name["K"].kind, m.joint_by_name["K"].links
    ('rolling', ('L3', 'frame'))
    """
    return Mechanism(
        name=name,
        links=_links(4),
        joints=(
            _pin("O2", "frame", "L1", o2),
            _pin("A", "L1", "L2", a),
            _pin("W", "L2", "L3", w),
            RollingContact("K", ("L3", "frame"), at=_xy(contact)),
        ),
        drivers=(Driver("O2", rate=float(rate)),),
    )


def wheel_on_wheel(
    o2: Point, contact: Point, b: Point, o4: Point, *, rate: float = 1.0, name: str = "wheel-on-wheel"
) -> Mechanism:
    """A driven wheel L1 on the frame and a wheel L2 rolling on it, held against it by a rocker L3.

    Wheel L1 is centred on its pivot ``o2`` with radius ``|contact - o2|``;
    wheel L2 touches it at ``contact`` (its centre on the ray from ``o2``
    through ``contact``; its radius does not enter an instantaneous analysis)
    and carries the pin ``b`` to the rocker.

    Parameters
    ----------
    o2 : (x, y)
        Pivot of wheel L1 (``"O2"``, frame-L1).
    contact : (x, y)
        Contact point (rolling joint ``"K"``, L1-L2).
    b : (x, y)
        Pin of wheel L2 to the rocker L3 (``"B"``).
    o4 : (x, y)
        Rocker pivot (``"O4"``, frame-L3).
    rate : float, default 1.0
        Rate (rad/s) of wheel L1 on ``"O2"``.
    name : str, default "wheel-on-wheel"

    Returns
    -------
    Mechanism
        Four links, three pins and the rolling contact: one freedom.

    Examples
    --------
    >>> m = wheel_on_wheel((0, 0), (40, 0), (70, 25), (90, 90))
    >>> m.joint_by_name["K"].links
    ('L1', 'L2')
    """
    return Mechanism(
        name=name,
        links=_links(4),
        joints=(
            _pin("O2", "frame", "L1", o2),
            RollingContact("K", ("L1", "L2"), at=_xy(contact)),
            _pin("B", "L2", "L3", b),
            _pin("O4", "frame", "L3", o4),
        ),
        drivers=(Driver("O2", rate=float(rate)),),
    )


def five_bar(
    o2: Point,
    a: Point,
    p: Point,
    b: Point,
    o5: Point,
    *,
    rates: tuple[float, float] = (1.0, 0.5),
    name: str = "five-bar",
) -> Mechanism:
    """A two-freedom five-bar: cranks L1 and L4 on the frame, both driven, joined by arms L2 and L3.

    Parameters
    ----------
    o2, a, p, b, o5 : (x, y)
        Pins frame-L1 (``"O2"``), L1-L2 (``"A"``), L2-L3 (``"P"``),
        L3-L4 (``"B"``) and frame-L4 (``"O5"``).
    rates : (float, float), default (1.0, 0.5)
        Rates (rad/s) of the drivers on ``"O2"`` and ``"O5"``.
    name : str, default "five-bar"

    Returns
    -------
    Mechanism
        Five links and five pins: two freedoms (3 * 4 - 2 * 5).

    Examples
    --------
    >>> m = five_bar((0, 0), (-10, 40), (45, 95), (95, 35), (80, 0))
    >>> [d.joint for d in m.drivers]
    ['O2', 'O5']
    """
    r1, r2 = rates
    return Mechanism(
        name=name,
        links=_links(5),
        joints=(
            _pin("O2", "frame", "L1", o2),
            _pin("A", "L1", "L2", a),
            _pin("P", "L2", "L3", p),
            _pin("B", "L3", "L4", b),
            _pin("O5", "frame", "L4", o5),
        ),
        drivers=(Driver("O2", rate=float(r1)), Driver("O5", rate=float(r2))),
    )


# ------------------------------------------------------------ eight-bar chains
#: Double-butterfly eight-bar chain: (ground link, other links, pinned pairs).
#: Four ternary links in two directly joined pairs (T1-T2, T3-T4), the pairs
#: linked by four binary links, no four-bar loop (Di Gregorio, ASME J. Mech.
#: Des. 130(4):042303, 2008, as recorded in /work/shared/references.md).
DOUBLE_BUTTERFLY = (
    "T1",
    ("T2", "T3", "T4", "B1", "B2", "B3", "B4"),
    (("T1", "T2"), ("T3", "T4"), ("T1", "B1"), ("B1", "T3"), ("T1", "B2"), ("B2", "T4"),
     ("T2", "B3"), ("B3", "T3"), ("T2", "B4"), ("B4", "T4")),
)
#: Single-flier eight-bar chain: a four-bar loop L1-L4 and a ternary flier F
#: hung by three binaries from three links of that loop (same source).
SINGLE_FLIER = (
    "L1",
    ("L2", "L3", "L4", "F", "B1", "B2", "B3"),
    (("L1", "L2"), ("L2", "L3"), ("L3", "L4"), ("L4", "L1"), ("F", "B1"), ("F", "B2"), ("F", "B3"),
     ("B1", "L1"), ("B2", "L2"), ("B3", "L3")),
)


def pin_chain(topology, pins: Sequence[Point], name: str, *, rate: float = 1.0) -> Mechanism:
    """A chain of links joined by pins only, from a template such as :data:`DOUBLE_BUTTERFLY`.

    Parameters
    ----------
    topology : (str, sequence of str, sequence of (str, str))
        Ground link, the other links, and the pinned pairs.
    pins : sequence of (x, y)
        One pin per pinned pair, in order; pin ``k`` is the revolute ``"J{k}"``.
    name : str
    rate : float, default 1.0
        Rate (rad/s) of the driver on ``"J0"`` (the first pair's pin).

    Returns
    -------
    Mechanism

    Examples
    --------
    >>> pins = [(0, 0), (40, 80), (230, 120), (250, -20), (-120, 60), (-40, 60), (140, 200),
    ...         (-100, 260), (20, 300), (120, 380)]
    >>> m = pin_chain(SINGLE_FLIER, pins, "flier")
    >>> m.n_links, len(m.joints), m.ground, m.drivers[0].joint
    (8, 10, 'L1', 'J0')
    """
    ground, others, edges = topology
    links = [Link(ground, ground=True)] + [Link(x) for x in others]
    joints = [Revolute(f"J{k}", e, at=(float(p[0]), float(p[1]))) for k, (e, p) in enumerate(zip(edges, pins))]
    return Mechanism(name=name, links=links, joints=joints, drivers=[Driver("J0", float(rate))])


def random_pin_chain(
    topology,
    rng: np.random.Generator,
    name: str,
    *,
    size: float = DEFAULT_SIZE,
    min_separation: float = DEFAULT_MIN_SEPARATION,
    min_sine: float = DEFAULT_MIN_SINE,
    max_ratio: float = 20.0,
    rate: float = 1.0,
) -> Mechanism:
    """A :func:`pin_chain` with pins drawn uniformly in a ``size`` box.

    Draws with two pins closer than ``min_separation * size``, with a ternary
    link whose three pins span a triangle with an angle sine below
    ``min_sine``, at a dead point (singular velocity equations), or with a
    link turning faster than ``max_ratio`` times the driver are rejected.
    The rejection keeps the velocity analysis well conditioned; it looks at
    nothing the relaxation method (:mod:`mechgraph.indeterminate`) computes.

    Parameters
    ----------
    topology : chain template, e.g. :data:`DOUBLE_BUTTERFLY` or :data:`SINGLE_FLIER`
    rng : numpy.random.Generator
    name : str
    size : float, default 100
    min_separation : float, default 0.05
    min_sine : float, default 0.1
    max_ratio : float, default 20
    rate : float, default 1.0

    Returns
    -------
    Mechanism

    Raises
    ------
    RuntimeError
        No acceptable draw in 1000 tries.

    Examples
    --------
    >>> import numpy as np
    >>> m = random_pin_chain(DOUBLE_BUTTERFLY, np.random.default_rng(1), "butterfly")
    >>> m.n_links, len(m.joints)
    (8, 10)
    """
    from .errors import SingularPositionError

    for _ in range(1000):
        pts = rng.uniform(0.0, size, (len(topology[2]), 2))
        d = np.hypot(*(pts[:, None] - pts[None]).transpose(2, 0, 1))
        np.fill_diagonal(d, np.inf)
        if d.min() < min_separation * size:
            continue
        m = pin_chain(topology, pts, name, rate=rate)
        held: dict[str, list] = {}
        for j in m.joints:
            for x in j.links:
                held.setdefault(x, []).append(j.at)
        if any(len(p) == 3 and _triangle_sine(*p) < min_sine for p in held.values()):
            continue
        try:
            v = analyse_velocities(m)
        except SingularPositionError:
            continue
        if np.abs(v.twists[:, 0]).max() <= max_ratio * abs(rate):
            return m
    raise RuntimeError(f"no acceptable draw of '{name}' in 1000 tries")  # pragma: no cover


def random_double_butterfly(rng: np.random.Generator, **kwargs) -> Mechanism:
    """A random :data:`DOUBLE_BUTTERFLY` eight-bar (see :func:`random_pin_chain` for ``kwargs``).

    Examples
    --------
    >>> import numpy as np
    >>> random_double_butterfly(np.random.default_rng(0)).name
    'double-butterfly'
    """
    return random_pin_chain(DOUBLE_BUTTERFLY, rng, "double-butterfly", **kwargs)


def random_single_flier(rng: np.random.Generator, **kwargs) -> Mechanism:
    """A random :data:`SINGLE_FLIER` eight-bar (see :func:`random_pin_chain` for ``kwargs``).

    Examples
    --------
    >>> import numpy as np
    >>> random_single_flier(np.random.default_rng(0)).name
    'single-flier'
    """
    return random_pin_chain(SINGLE_FLIER, rng, "single-flier", **kwargs)


# ------------------------------------------------- random higher-pair linkages
def _angle_dir(rng) -> np.ndarray:
    t = rng.uniform(0.0, 2.0 * math.pi)
    return np.array([math.cos(t), math.sin(t)])


def random_cam_follower(
    rng: np.random.Generator,
    *,
    follower: str | None = None,
    size: float = DEFAULT_SIZE,
    min_separation: float = DEFAULT_MIN_SEPARATION,
    min_sine: float = DEFAULT_MIN_SINE,
    max_speed_ratio: float = 20.0,
    rate: float = 1.0,
) -> Mechanism:
    """A :func:`cam_follower` with a random contact point, common normal and follower pivot or guide.

    Rejected as near-degenerate: the common normal passing within
    ``asin(min_sine)`` of the cam shaft (the follower dwells) or of the
    follower pivot (a dead point); for a translating follower, a normal
    within that of square to the guide (a dead point); and draws that fail
    :func:`_conditioned`.

    Parameters
    ----------
    rng : numpy.random.Generator
    follower : {"rocking", "translating"}, optional
        Drawn at random when not given.
    size, min_separation, min_sine, rate
        As for :func:`random_four_bar`.
    max_speed_ratio : float, default 20
        See :func:`_conditioned`.

    Returns
    -------
    Mechanism

    Raises
    ------
    ValueError
        For an unknown ``follower``.

    Examples
    --------
    >>> import numpy as np
    >>> m = random_cam_follower(np.random.default_rng(0), follower="translating")
    >>> sorted(j.kind for j in m.joints)
    ['cam', 'prismatic', 'revolute']
    """
    if follower is None:
        follower = ("rocking", "translating")[int(rng.integers(2))]
    if follower not in ("rocking", "translating"):
        raise ValueError(f"follower must be 'rocking' or 'translating', got {follower!r}")
    def params(rng):
        return _angle_dir(rng), _angle_dir(rng)  # common normal, guide

    def accept(q, nu):
        (o2, k, o3), (n, u) = q, nu
        if _line_sine(k, n, o2) < min_sine:
            return False
        if follower == "translating":
            return abs(float(n @ u)) >= min_sine
        return _line_sine(k, n, o3) >= min_sine

    def build(q, nu):
        (o2, k, o3), (n, u) = q, nu
        guide = tuple(u) if follower == "translating" else None
        return cam_follower(o2, k, tuple(n), o3, guide=guide, rate=rate)

    return _draw_conditioned(
        rng, 3, params, accept, build, size=size, min_separation=min_separation, max_speed_ratio=max_speed_ratio,
        what="cam-follower",
    )


def random_pin_in_slot_linkage(
    rng: np.random.Generator,
    *,
    size: float = DEFAULT_SIZE,
    min_separation: float = DEFAULT_MIN_SEPARATION,
    min_sine: float = DEFAULT_MIN_SINE,
    max_speed_ratio: float = 20.0,
    rate: float = 1.0,
) -> Mechanism:
    """A :func:`pin_in_slot_linkage` with random pins and slot direction.

    Rejected as near-degenerate: pins O2, pin and O4 nearly in line; the
    normal to the slot through the pin passing within ``asin(min_sine)`` of
    either pivot (dwell or dead point); an improper output loop O4-C-D-O6;
    draws that fail :func:`_conditioned`.

    Parameters
    ----------
    rng : numpy.random.Generator
    size, min_separation, min_sine, rate
        As for :func:`random_four_bar`.
    max_speed_ratio : float, default 20

    Returns
    -------
    Mechanism

    Examples
    --------
    >>> import numpy as np
    >>> random_pin_in_slot_linkage(np.random.default_rng(0)).n_links
    5
    """
    def accept(q, s):
        o2, p, o4, c, d, o6 = q
        normal = (-s[1], s[0])
        return (
            _triangle_sine(o2, p, o4) >= min_sine
            and _line_sine(p, normal, o2) >= min_sine
            and _line_sine(p, normal, o4) >= min_sine
            and _loop_ok((o4, c, d, o6), min_sine)
        )

    return _draw_conditioned(
        rng, 6, _angle_dir, accept, lambda q, s: pin_in_slot_linkage(q[0], q[1], tuple(s), *q[2:], rate=rate),
        size=size, min_separation=min_separation, max_speed_ratio=max_speed_ratio, what="pin-in-slot linkage",
    )


def random_geared_linkage(
    rng: np.random.Generator,
    *,
    planetary: bool | None = None,
    internal: bool | None = None,
    size: float = DEFAULT_SIZE,
    min_separation: float = DEFAULT_MIN_SEPARATION,
    min_sine: float = DEFAULT_MIN_SINE,
    max_speed_ratio: float = 20.0,
    rate: float = 1.0,
) -> Mechanism:
    """A random :func:`geared_linkage` (gears on the frame) or :func:`planetary_linkage`.

    The pitch point divides the line of centres at a random share ``t``
    (``P = C1 + t (C2 - C1)``): ``t`` in [0.25, 0.75] for an external pair;
    for a ring gear ``t`` in [1.5, 3] (or, on the frame, in [-2, -0.5], the
    ring being the second gear).  Rejected as near-degenerate: an improper
    triangle of the arms' pins (geared five-bar) or an improper loop of the
    planet's pitch point and the dyad's pins (planetary); draws that fail
    :func:`_conditioned`.

    Parameters
    ----------
    rng : numpy.random.Generator
    planetary : bool, optional
        Both gear centres on the driven arm (the frame's gear fixed) instead
        of on the frame; drawn at random when not given.
    internal : bool, optional
        A ring gear pair instead of an external one; drawn at random when not given.
    size, min_separation, min_sine, rate
        As for :func:`random_four_bar`.
    max_speed_ratio : float, default 20

    Returns
    -------
    Mechanism

    Examples
    --------
    >>> import numpy as np
    >>> m = random_geared_linkage(np.random.default_rng(0), planetary=True, internal=True)
    >>> m.name, m.joint_by_name["G"].carrier, m.joint_by_name["G"].internal
    ('planetary', 'L1', True)
    """
    if planetary is None:
        planetary = bool(rng.integers(2))
    if internal is None:
        internal = bool(rng.integers(2))
    def share(rng):
        if not internal:
            return rng.uniform(0.25, 0.75)
        return rng.uniform(1.5, 3.0) if (planetary or rng.integers(2)) else rng.uniform(-2.0, -0.5)

    def pitch(c1, c2, t):
        return c1 + t * (c2 - c1)

    if planetary:

        def accept(q, t):
            o2, qc, a, b, o4 = q
            p = pitch(o2, qc, t)
            return np.hypot(*(p - o2)) >= min_separation * size and _loop_ok((p, a, b, o4), min_sine)

        def build(q, t):
            o2, qc, a, b, o4 = q
            return planetary_linkage(o2, qc, pitch(o2, qc, t), a, b, o4, rate=rate)

    else:

        def accept(q, t):
            o2, o3, a, e, b = q
            p = pitch(o2, o3, t)
            far = min(np.hypot(*(p - o2)), np.hypot(*(p - o3)))
            return far >= min_separation * size and _triangle_sine(a, e, b) >= min_sine

        def build(q, t):
            o2, o3, a, e, b = q
            return geared_linkage(o2, o3, pitch(o2, o3, t), a, e, b, rate=rate)

    return _draw_conditioned(
        rng, 5, share, accept, build, size=size, min_separation=min_separation, max_speed_ratio=max_speed_ratio,
        what="geared linkage",
    )


def random_rolling_linkage(
    rng: np.random.Generator,
    *,
    on: str | None = None,
    size: float = DEFAULT_SIZE,
    min_separation: float = DEFAULT_MIN_SEPARATION,
    min_sine: float = DEFAULT_MIN_SINE,
    max_speed_ratio: float = 20.0,
    rate: float = 1.0,
) -> Mechanism:
    """A random :func:`wheel_on_track` or :func:`wheel_on_wheel`.

    On a track: random crank pins and axle, a wheel radius in
    [0.1, 0.3] ``size`` and a random track direction; on a wheel: random
    pivots, contact point and rocker pin.  Instantaneously either is a
    four-bar whose pins are the crank pivot, the two moving pins (or contact)
    and the contact (or rocker pivot); that loop must be proper
    (:func:`random_four_bar`'s test), and the draw must pass :func:`_conditioned`.

    Parameters
    ----------
    rng : numpy.random.Generator
    on : {"track", "wheel"}, optional
        Drawn at random when not given.
    size, min_separation, min_sine, rate
        As for :func:`random_four_bar`.
    max_speed_ratio : float, default 20

    Returns
    -------
    Mechanism

    Raises
    ------
    ValueError
        For an unknown ``on``.

    Examples
    --------
    >>> import numpy as np
    >>> random_rolling_linkage(np.random.default_rng(0), on="wheel").name
    'wheel-on-wheel'
    """
    if on is None:
        on = ("track", "wheel")[int(rng.integers(2))]
    if on not in ("track", "wheel"):
        raise ValueError(f"on must be 'track' or 'wheel', got {on!r}")
    if on == "wheel":
        return _draw_conditioned(
            rng, 4, lambda rng: None, lambda q, _: _loop_ok(q, min_sine), lambda q, _: wheel_on_wheel(*q, rate=rate),
            size=size, min_separation=min_separation, max_speed_ratio=max_speed_ratio, what="wheel on a wheel",
        )

    def params(rng):
        return _angle_dir(rng), rng.uniform(0.1, 0.3) * size  # normal of the track (towards the axle), radius

    def contact(q, ur):
        return q[2] - ur[1] * ur[0]

    def accept(q, ur):
        o2, a, w = q
        k = contact(q, ur)
        return min(np.hypot(*(k - x)) for x in (o2, a)) >= min_separation * size and _loop_ok((o2, a, w, k), min_sine)

    return _draw_conditioned(
        rng, 3, params, accept, lambda q, ur: wheel_on_track(*q, contact(q, ur), rate=rate),
        size=size, min_separation=min_separation, max_speed_ratio=max_speed_ratio, what="wheel on a track",
    )


def random_five_bar(
    rng: np.random.Generator,
    *,
    size: float = DEFAULT_SIZE,
    min_separation: float = DEFAULT_MIN_SEPARATION,
    min_sine: float = DEFAULT_MIN_SINE,
    max_speed_ratio: float = 20.0,
    rate: float = 1.0,
    second_rate: float | None = None,
) -> Mechanism:
    """A :func:`five_bar` with random pins and a random second input rate.

    Rejected as near-degenerate: an improper triangle of the arms' pins A, P,
    B (where the two inputs fight), or of either crank and its arm
    (O2, A, P and O5, B, P); draws that fail :func:`_conditioned`.

    Parameters
    ----------
    rng : numpy.random.Generator
    size, min_separation, min_sine
        As for :func:`random_four_bar`.
    max_speed_ratio : float, default 20
    rate : float, default 1.0
        Rate (rad/s) on ``"O2"``.
    second_rate : float, optional
        Rate on ``"O5"``; by default drawn from +-[0.2, 2] times ``rate``.

    Returns
    -------
    Mechanism

    Examples
    --------
    >>> import numpy as np
    >>> m = random_five_bar(np.random.default_rng(0))
    >>> len(m.drivers), m.n_links
    (2, 5)
    """
    if second_rate is None:
        second_rate = float(rate) * rng.uniform(0.2, 2.0) * (1.0 if rng.integers(2) else -1.0)

    def accept(q, _):
        o2, a, p, b, o5 = q
        return all(_triangle_sine(*t) >= min_sine for t in ((a, p, b), (o2, a, p), (o5, b, p)))

    return _draw_conditioned(
        rng, 5, lambda rng: None, accept, lambda q, _: five_bar(*q, rates=(rate, second_rate)),
        size=size, min_separation=min_separation, max_speed_ratio=max_speed_ratio, what="five-bar",
    )


#: Random generator of each topology by name (``ladder`` gets 8, 10 or 12 links).
#: Every one takes ``(rng, *, size, min_separation, min_sine, rate)``.  The
#: pin-jointed chains, slider-crank, cam, slot, gear and rolling linkages have
#: one freedom and every center is reached by the three-centers theorem;
#: ``"five-bar-2dof"`` has two drivers (its secondary centers depend on the
#: ratio of the input rates); the two eight-bars are indeterminate (the
#: theorem alone leaves some centers).
TOPOLOGIES: dict[str, Callable[..., Mechanism]] = {
    "four-bar": random_four_bar,
    "slider-crank": random_slider_crank,
    "watt": random_watt_six_bar,
    "stephenson": random_stephenson_six_bar,
    "ladder": lambda rng, **kw: ladder(int(rng.choice([8, 10, 12])), rng, attach="mixed", **kw),
    "cam-rocking": lambda rng, **kw: random_cam_follower(rng, follower="rocking", **kw),
    "cam-translating": lambda rng, **kw: random_cam_follower(rng, follower="translating", **kw),
    "pin-in-slot": random_pin_in_slot_linkage,
    "geared": lambda rng, **kw: random_geared_linkage(rng, planetary=False, **kw),
    "planetary": lambda rng, **kw: random_geared_linkage(rng, planetary=True, **kw),
    "rolling-track": lambda rng, **kw: random_rolling_linkage(rng, on="track", **kw),
    "rolling-wheel": lambda rng, **kw: random_rolling_linkage(rng, on="wheel", **kw),
    "five-bar-2dof": random_five_bar,
    "double-butterfly": random_double_butterfly,
    "single-flier": random_single_flier,
}

#: Topologies whose every center the three-centers theorem reaches from the joints alone.
DETERMINATE = tuple(k for k in TOPOLOGIES if k not in ("five-bar-2dof", "double-butterfly", "single-flier"))


def random_mechanism(kind: str, rng: np.random.Generator, **kwargs) -> Mechanism:
    """A random mechanism of the named topology (a key of :data:`TOPOLOGIES`).

    Parameters
    ----------
    kind : str
        A key of :data:`TOPOLOGIES`: ``"four-bar"``, ``"slider-crank"``,
        ``"watt"``, ``"stephenson"``, ``"ladder"``, ``"cam-rocking"``,
        ``"cam-translating"``, ``"pin-in-slot"``, ``"geared"``,
        ``"planetary"``, ``"rolling-track"``, ``"rolling-wheel"``,
        ``"five-bar-2dof"``, ``"double-butterfly"`` or ``"single-flier"``.
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
    >>> random_mechanism("planetary", np.random.default_rng(3)).joint_by_name["G"].carrier
    'L1'
    """
    try:
        make = TOPOLOGIES[kind]
    except KeyError:
        raise KeyError(f"unknown topology {kind!r}; known: {', '.join(TOPOLOGIES)}") from None
    return make(rng, **kwargs)
