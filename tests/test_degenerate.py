"""A catalogue of degenerate geometry: what mechgraph must do at each special position.

One shared list, :data:`CATALOGUE`, names each degenerate mechanism and states
its expected outcome precisely: the centers at infinity (and their
directions), the finite centers, the undefined ones, exactly which pairs are
at relative rest, angular velocities, whether the cross-check passes, or the
exception and the words its message must carry.  Each entry says where every
expected fact comes from: a line of /work/shared/references.md, or "common
practice, no source".

The drawings use small integers, so the special positions are exact (every
parallel is parallel and every collinear set collinear in floating point).

Where mechgraph does not do what the entry expects, the aspect is listed in
the entry's ``bugs`` with the reason, and the test of that aspect is a strict
expected failure: a minimal reproducer that turns into an error once the
core is fixed.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass, field, replace
from typing import Callable

import pytest

from mechgraph import projective as pg
from mechgraph.analysis import analyse
from mechgraph.errors import DriverError, SingularPositionError
from mechgraph.joints import Prismatic, Revolute
from mechgraph.model import Driver, Link, Mechanism
from mechgraph.topology import summarise_topology
from mechgraph.velocity import gruebler_mobility, numerical_mobility

#: Agreement of a computed center with its exact value (scale-free separation).
SEP_TOL = 1e-9
#: Agreement of an angular velocity or point velocity with its exact value (relative).
RATE_TOL = 1e-9

# ------------------------------------------------------------------ sources
PINS = "a revolute joint is the relative center of the two links it joins (references.md, facts of the trade)"
SLIDER = "a prismatic joint's center lies at infinity perpendicular to the sliding axis (references.md, facts of the trade)"
KENNEDY = "three-centers theorem (references.md, Aronhold-Kennedy); parallel lines meet at infinity (common practice, no source)"
RATIO = "angular-velocity-ratio theorem (references.md, facts of the trade)"
SLIDER_CRANK = (
    "in-line slider-crank velocity dx/dt = -r w (sin th + r sin 2th / (2 sqrt(l^2 - r^2 sin^2 th))) "
    "(references.md, 'In-line slider-crank' [memory, computed]); at th = 90 deg it is -r w"
)
GRUEBLER = "Gruebler-Kutzbach M = 3(n-1) - 2 j1 - j2 (references.md, facts of the trade)"
REST = (
    "two links with the same twist have no relative center (their pole is 0/0), and a link at rest relative to "
    "two others has with each of them the same center as they have with each other (common practice, no source)"
)
TRANSLATION = "a link that translates has its center relative to the frame at infinity, square to its velocity (common practice, no source)"
DEAD = "at a dead point the driven joint is locked by the rest of the linkage (common practice, no source)"
CHANGE = "with all pins of a four-bar on one line the linkage can branch: one more freedom than counted (common practice, no source)"
COMPOUND = "links pinned at one point (a compound pin) have that point as every relative center among them (common practice, no source)"
OVER = "two drivers that set one freedom over-drive a loop and leave another freedom free (common practice, no source)"
STRUCTURE = "a linkage of no freedom is a structure: nothing moves and it takes no driver (common practice, no source)"


# ------------------------------------------------------------------ builders
def _links(*names):
    return (Link(names[0], ground=True),) + tuple(Link(n) for n in names[1:])


def _pins(spec):
    return tuple(Revolute(name, (a, b), at=(float(at[0]), float(at[1]))) for name, a, b, at in spec)


def _four_bar(o2, a, b, o4, *, drivers=(("O2", 3.0),), name="four-bar"):
    return Mechanism(
        name=name,
        links=_links("frame", "L1", "L2", "L3"),
        joints=_pins([("O2", "frame", "L1", o2), ("A", "L1", "L2", a), ("B", "L2", "L3", b), ("O4", "frame", "L3", o4)]),
        drivers=tuple(Driver(j, r) for j, r in drivers),
    )


def _slider_crank(o2, a, b, *, driver=("O2", 2.0), name="slider-crank"):
    return Mechanism(
        name=name,
        links=_links("frame", "L1", "L2", "L3"),
        joints=_pins([("O2", "frame", "L1", o2), ("A", "L1", "L2", a), ("B", "L2", "L3", b)])
        + (Prismatic("S", ("frame", "L3"), at=(float(b[0]), float(b[1])), axis=(1.0, 0.0)),),
        drivers=(Driver(*driver),),
    )


def compound_pin():
    """A Stephenson-like six-bar: coupler L2 and link L4 pinned to the crank at one point A."""
    a = (20, 40)
    return Mechanism(
        name="compound pin",
        links=_links("frame", "L1", "L2", "L3", "L4", "L5"),
        joints=_pins(
            [
                ("O2", "frame", "L1", (0, 0)),
                ("A", "L1", "L2", a),
                ("B", "L2", "L3", (110, 70)),
                ("O4", "frame", "L3", (100, 0)),
                ("A2", "L1", "L4", a),
                ("D", "L4", "L5", (-60, 90)),
                ("O6", "frame", "L5", (-80, 10)),
            ]
        ),
        drivers=(Driver("O2", 1.0),),
    )


def shared_frame_pivot():
    """A four-bar whose crank and rocker turn on one frame point: a rigid triangle L1-L2-L3 turning about it."""
    return _four_bar((0, 0), (30, 40), (100, 20), (0, 0), drivers=(("O2", 1.0),), name="shared frame pivot")


def stephenson_pause():
    """Stephenson six-bar whose frame-coupler center falls on the coupler's pin C to the dyad L4-L5.

    Lines O2-A (x = 0) and O4-B (through (100, 0) and (60, 40)) meet at
    C = (0, 100): the coupler turns about C, C is at rest, and so is the dyad.
    """
    return Mechanism(
        name="stephenson pause",
        links=_links("frame", "L1", "L2", "L3", "L4", "L5"),
        joints=_pins(
            [
                ("O2", "frame", "L1", (0, 0)),
                ("A", "L1", "L2", (0, 40)),
                ("B", "L2", "L3", (60, 40)),
                ("O4", "frame", "L3", (100, 0)),
                ("C", "L2", "L4", (0, 100)),
                ("D", "L4", "L5", (60, 130)),
                ("O6", "frame", "L5", (120, 90)),
            ]
        ),
        drivers=(Driver("O2", 2.0),),
    )


def triple_crank():
    """A parallelogram with a third parallel, equal crank (the bar carries three pins)."""
    return Mechanism(
        name="triple parallel crank",
        links=_links("frame", "c1", "bar", "c2", "c3"),
        joints=_pins(
            [
                ("O1", "frame", "c1", (0, 0)),
                ("A1", "c1", "bar", (20, 50)),
                ("O2", "frame", "c2", (60, 0)),
                ("A2", "c2", "bar", (80, 50)),
                ("O3", "frame", "c3", (130, 0)),
                ("A3", "c3", "bar", (150, 50)),
            ]
        ),
        drivers=(Driver("O1", 2.0),),
    )


def over_driven():
    """A four-bar loop and a separate crank L4 on the frame (two freedoms), both drivers on the loop."""
    return Mechanism(
        name="over-driven loop",
        links=_links("frame", "L1", "L2", "L3", "L4"),
        joints=_pins(
            [
                ("O2", "frame", "L1", (0, 0)),
                ("A", "L1", "L2", (30, 40)),
                ("B", "L2", "L3", (120, 60)),
                ("O4", "frame", "L3", (100, 0)),
                ("O5", "frame", "L4", (150, 20)),
            ]
        ),
        drivers=(Driver("O2", 1.0), Driver("O4", 1.0)),
    )


def truss(drivers=(("O2", 1.0),)):
    """Three links pinned in a triangle: no freedom."""
    return Mechanism(
        name="truss",
        links=_links("frame", "L1", "L2"),
        joints=_pins([("O2", "frame", "L1", (0, 0)), ("A", "L1", "L2", (30, 40)), ("O3", "frame", "L2", (80, 0))]),
        drivers=tuple(Driver(j, r) for j, r in drivers),
    )


# ----------------------------------------------------------------- catalogue
@dataclass(frozen=True)
class Degenerate:
    """One degenerate mechanism and what mechgraph must do with it.

    Pairs are written ``"a-b"`` (link names).  Unset expectations are not checked.
    """

    name: str
    build: Callable[[], Mechanism]
    sources: tuple[str, ...]
    analyse_kw: dict = field(default_factory=dict)
    # a refusal
    raises: type | None = None
    match: tuple[str, ...] = ()
    moving_links: tuple[str, ...] | None = None
    # counts
    gruebler: int | None = None
    mobility: int | None = None
    # an analysis
    passed: bool | None = None
    finite: dict = field(default_factory=dict)  # pair -> (x, y)
    at_infinity: dict = field(default_factory=dict)  # pair -> direction (dx, dy)
    undefined: tuple[str, ...] = ()  # pairs with no point at all
    methods: dict = field(default_factory=dict)  # pair -> method
    relative_rest: frozenset | None = None  # exactly these pairs
    omegas: dict = field(default_factory=dict)  # link -> rad/s
    velocities: dict = field(default_factory=dict)  # (link, (x, y)) -> (vx, vy)
    notes: tuple[str, ...] = ()  # words summarise_topology must say
    # aspects mechgraph gets wrong: "raises", "centers", "passed" -> reason
    bugs: dict = field(default_factory=dict)


_PAUSE = Degenerate(
    name="relative rest: Stephenson six-bar pauses its last two links",
    build=stephenson_pause,
    sources=(PINS, KENNEDY, REST),
    gruebler=1,
    mobility=1,
    passed=True,
    relative_rest=frozenset({"frame-L4", "frame-L5", "L4-L5"}),
    finite={
        "frame-L2": (0, 100),  # lines O2-A and O4-B meet at C, by construction
        "frame-L5": (120, 90),
        "L4-L5": (60, 130),
        "L2-L4": (0, 100),
        "L2-L5": (0, 100),  # the coupler turns about C relative to every resting link
        "L1-L4": (0, 0),
        "L1-L5": (0, 0),  # L4, L5 rest with the frame: the crank's center relative to them is O2
        "L3-L4": (100, 0),
        "L3-L5": (100, 0),
    },
    at_infinity={"L1-L3": (1, 0)},  # O2-O4 (y = 0) and A-B (y = 40) are parallel
    undefined=("frame-L4",),  # at relative rest, and the theorem's two lines through C coincide
    methods={"frame-L4": "unresolved", "frame-L2": "three-centers"},
    omegas={"L4": 0.0, "L5": 0.0},
)

CATALOGUE: list[Degenerate] = [
    Degenerate(
        name="coincident pivots: two links pinned to the crank at one point",
        build=compound_pin,
        sources=(PINS, COMPOUND),
        gruebler=1,
        mobility=1,
        passed=True,
        finite={"L1-L2": (20, 40), "L1-L4": (20, 40), "L2-L4": (20, 40)},
        methods={"L2-L4": "coincident", "L1-L2": "joint", "L1-L4": "joint"},
        relative_rest=frozenset(),
    ),
    Degenerate(
        name="coincident pivots: crank and rocker on one frame pin",
        build=shared_frame_pivot,
        sources=(PINS, COMPOUND, REST, GRUEBLER),
        gruebler=1,
        mobility=1,
        passed=True,
        # the three moving links form a rigid triangle turning about the shared pivot
        finite={"frame-L1": (0, 0), "frame-L2": (0, 0), "frame-L3": (0, 0), "L1-L2": (30, 40), "L2-L3": (100, 20)},
        methods={"L1-L3": "coincident"},
        relative_rest=frozenset({"L1-L2", "L1-L3", "L2-L3"}),
        omegas={"L1": 1.0, "L2": 1.0, "L3": 1.0},
    ),
    Degenerate(
        name="parallel links: crank and rocker parallel, not equal",
        build=lambda: _four_bar((0, 0), (0, 40), (100, 60), (100, 0)),
        sources=(PINS, KENNEDY, TRANSLATION, RATIO),
        gruebler=1,
        mobility=1,
        passed=True,
        at_infinity={"frame-L2": (0, 1)},  # lines O2-A and O4-B, both vertical
        finite={"L1-L3": (-200, 0)},  # line O2-O4 (y = 0) and line A-B (y = 40 + x / 5)
        relative_rest=frozenset(),
        # the coupler translates; w3 / w1 = |O2 I13| / |O4 I13| = 200 / 300, positive (I13 outside O2-O4)
        omegas={"L1": 3.0, "L2": 0.0, "L3": 2.0},
    ),
    Degenerate(
        name="parallelogram",
        build=lambda: _four_bar((0, 0), (30, 40), (130, 40), (100, 0)),
        sources=(PINS, KENNEDY, TRANSLATION),
        gruebler=1,
        mobility=1,
        passed=True,
        at_infinity={"frame-L2": (3, 4), "L1-L3": (1, 0)},  # along the cranks; along the frame
        relative_rest=frozenset(),
        omegas={"L1": 3.0, "L2": 0.0, "L3": 3.0},  # the coupler translates, the cranks turn alike
    ),
    Degenerate(
        name="crank square to the slider guide",
        build=lambda: _slider_crank((0, 0), (0, 30), (80, 0)),
        sources=(PINS, SLIDER, KENNEDY, TRANSLATION, REST, SLIDER_CRANK),
        gruebler=1,
        mobility=1,
        passed=True,
        at_infinity={"frame-L2": (0, 1), "frame-L3": (0, 1)},
        # the rod translates with the slider: they are at relative rest; the crank's
        # center relative to the slider is on the vertical through O2 and on line A-B: A
        finite={"L1-L3": (0, 30), "L2-L3": (80, 0)},
        relative_rest=frozenset({"L2-L3"}),
        omegas={"L1": 2.0, "L2": 0.0, "L3": 0.0},
        velocities={("L3", (80, 0)): (-60.0, 0.0), ("L2", (40, 15)): (-60.0, 0.0)},  # -r w = -30 * 2
    ),
    _PAUSE,
    replace(
        _PAUSE,
        name="relative rest: the same pause, theorem and velocities only",
        analyse_kw={"geometric": False},
        bugs={},
    ),
    Degenerate(
        name="dead point: coupler and rocker in line, crank driven",
        build=lambda: _four_bar((0, 0), (30, 40), (70, 20), (110, 0)),
        sources=(DEAD, GRUEBLER),
        gruebler=1,
        mobility=1,
        raises=SingularPositionError,
        match=(r"the driver on 'O2' cannot move the mechanism", r"\(a dead point\)", r"link\(s\) 'L2', 'L3' can still move"),
        moving_links=("L2", "L3"),
    ),
    Degenerate(
        name="dead point: slider-crank driven by the slider at top dead centre",
        build=lambda: _slider_crank((0, 0), (30, 0), (100, 0), driver=("S", 5.0)),
        sources=(DEAD, GRUEBLER),
        gruebler=1,
        mobility=1,
        raises=SingularPositionError,
        match=(r"the driver on 'S' cannot move the mechanism", r"\(a dead point\)", r"link\(s\) 'L1', 'L2' can still move"),
        moving_links=("L1", "L2"),
    ),
    Degenerate(
        name="change point: every pin of a four-bar on one line",
        build=lambda: _four_bar((0, 0), (20, 0), (70, 0), (100, 0)),  # 20 + 50 + 30 = 100
        sources=(CHANGE, GRUEBLER),
        gruebler=1,
        mobility=2,
        raises=SingularPositionError,
        match=(r"1 more freedom than the Gruebler-Kutzbach count \(1\)", r"a change point", r"'L2', 'L3' can still move"),
        moving_links=("L2", "L3"),
    ),
    Degenerate(
        name="redundant parallelogram with a third crank",
        build=triple_crank,
        sources=(PINS, KENNEDY, TRANSLATION, GRUEBLER),
        gruebler=0,
        mobility=1,
        passed=True,
        notes=("redundant",),
        at_infinity={"frame-bar": (20, 50), "c1-c2": (1, 0), "c1-c3": (1, 0), "c2-c3": (1, 0)},
        relative_rest=frozenset(),
        omegas={"c1": 2.0, "bar": 0.0, "c2": 2.0, "c3": 2.0},
    ),
    Degenerate(
        name="over-driven loop: both drivers on one four-bar loop",
        build=over_driven,
        sources=(OVER, GRUEBLER),
        gruebler=2,
        mobility=2,
        raises=SingularPositionError,
        match=(r"the drivers on 'O2' and 'O4' are not independent", r"over-driven", r"link\(s\) 'L4' can still move"),
        moving_links=("L4",),
    ),
    Degenerate(
        name="too many drivers: a four-bar driven at both cranks",
        build=lambda: _four_bar((0, 0), (30, 40), (120, 60), (100, 0), drivers=(("O2", 1.0), ("O4", 1.0))),
        sources=(GRUEBLER,),
        gruebler=1,
        mobility=1,
        raises=DriverError,
        match=(r"has 1 freedom\(s\) at this position but 2 driver\(s\) are given", r"give exactly 1"),
    ),
    Degenerate(
        name="structure: a driven triangle",
        build=truss,
        sources=(STRUCTURE, GRUEBLER),
        gruebler=0,
        mobility=0,
        raises=DriverError,
        match=(r"'truss' has no freedom at this position: it is a structure and cannot be driven",),
    ),
    Degenerate(
        name="structure: an undriven triangle",
        build=lambda: truss(drivers=()),
        sources=(STRUCTURE, GRUEBLER),
        gruebler=0,
        mobility=0,
        raises=DriverError,
        match=(r"'truss' has no freedom at this position: it is a structure, nothing moves",),
    ),
]


# --------------------------------------------------------------------- tests
def _cases(aspect: str, want):
    """The catalogue entries that ``want``, with a strict expected failure where ``aspect`` is a known bug."""
    out = []
    for d in CATALOGUE:
        if not want(d):
            continue
        marks = [pytest.mark.xfail(strict=True, reason=d.bugs[aspect])] if aspect in d.bugs else []
        out.append(pytest.param(d, id=d.name, marks=marks))
    return out


def _center(a, pair: str):
    return a.center(*pair.split("-"))


def test_catalogue_is_consistent():
    names = [d.name for d in CATALOGUE]
    assert len(set(names)) == len(names)
    for d in CATALOGUE:
        assert d.sources and all(d.sources)
        assert (d.raises is None) == (d.passed is not None), d.name
        assert set(d.bugs) <= {"raises", "centers", "passed"}, d.name
        pairs = list(d.finite) + list(d.at_infinity) + list(d.undefined)
        assert len(set(pairs)) == len(pairs), d.name  # no pair expected two ways


@pytest.mark.parametrize("d", [pytest.param(d, id=d.name) for d in CATALOGUE])
def test_counts(d):
    m = d.build()
    if d.gruebler is not None:
        assert gruebler_mobility(m) == d.gruebler
    if d.mobility is not None:
        assert numerical_mobility(m)[0] == d.mobility
    notes = " ".join(summarise_topology(m).notes)
    for word in d.notes:
        assert word in notes


@pytest.mark.parametrize("d", _cases("raises", lambda d: d.raises is not None))
def test_refusals(d):
    m = d.build()
    with pytest.raises(d.raises) as e:
        analyse(m, **d.analyse_kw)
    text = str(e.value)
    assert text.startswith(f"mechanism '{m.name}'")
    for pattern in d.match:
        assert re.search(pattern, text), (pattern, text)
    if d.moving_links is not None:
        assert e.value.moving_links == d.moving_links


@pytest.mark.parametrize("d", _cases("centers", lambda d: d.raises is None))
def test_centers(d):
    m = d.build()
    a = analyse(m, **d.analyse_kw)
    L, O = m.scale, m.centre
    for pair, xy in d.finite.items():
        c = _center(a, pair)
        assert c.point is not None and c.cartesian(L) is not None, (pair, c)
        assert pg.point_separation(c.point, pg.point(*xy), scale=L, origin=O) <= SEP_TOL, (pair, c.point)
    for pair, direction in d.at_infinity.items():
        c = _center(a, pair)
        assert c.point is not None and c.cartesian(L) is None, (pair, c.point)
        assert pg.point_separation(c.point, pg.direction(*direction), scale=L, origin=O) <= SEP_TOL, (pair, c.point)
    for pair in d.undefined:
        c = _center(a, pair)
        assert c.point is None, (pair, c.method, c.point, c.derivation)
    for pair, method in d.methods.items():
        assert _center(a, pair).method == method, (pair, _center(a, pair).derivation)
    if d.relative_rest is not None:
        assert {c.pair for c in a.centers if c.relative_rest} == set(d.relative_rest)
    for c in a.centers:
        if c.relative_rest:
            # the velocity method is indeterminate there: nothing to compare
            assert c.velocity_point is None and c.check is None
            if c.point is not None:
                assert "velocity method is indeterminate" in c.derivation
        elif c.point is not None and c.method != "velocity":
            assert c.check is not None and c.check.passed, (c.pair, c.check)
    w = dict(zip(m.link_names, a.velocity.twists[:, 0]))
    ref = max(abs(x) for x in w.values())
    for link, rate in d.omegas.items():
        assert math.isclose(w[link], rate, rel_tol=RATE_TOL, abs_tol=RATE_TOL * ref), (link, w[link])
    for (link, at), v in d.velocities.items():
        got = a.velocity.point_velocity(m.index[link], at)
        assert math.dist(got, v) <= RATE_TOL * math.hypot(*v), (link, at, got)


@pytest.mark.parametrize("d", _cases("passed", lambda d: d.raises is None))
def test_crosscheck(d):
    a = analyse(d.build(), **d.analyse_kw)
    assert a.passed is d.passed, a.crosscheck
