"""The pipeline's special situations: relative rest, coincident loci, compound pins, redundancy, two inputs."""

from __future__ import annotations


import pytest

from mechgraph import projective as pg
from mechgraph.analysis import analyse, locate_centers
from mechgraph.joints import Revolute
from mechgraph.model import Driver, Link, Mechanism
from mechgraph.three_centers import solve_three_centers
from mechgraph.topology import summarise_topology


def _pins(spec):
    return tuple(Revolute(name, (a, b), at=at) for name, a, b, at in spec)


def _links(*names):
    return (Link(names[0], ground=True),) + tuple(Link(n) for n in names[1:])


def watt_at_toggle():
    """A Watt II six-bar whose first loop is at a toggle: crank and coupler collinear.

    There the rocker's angular velocity is zero (common practice, no source:
    the extreme positions of a crank-rocker's rocker occur when crank and
    coupler are collinear), so every link of the second loop, driven by the
    rocker, is at rest too.
    """
    o2, o4 = (0.0, 0.0), (100.0, 0.0)
    a = (20.0, 15.0)  # crank tip
    b = (a[0] * 4.0, a[1] * 4.0)  # B on the line O2-A extended: crank and coupler collinear
    c, d, o6 = (150.0, 90.0), (210.0, 40.0), (200.0, -20.0)
    return Mechanism(
        name="watt at toggle",
        links=_links("frame", "crank", "coupler", "rocker", "link", "output"),
        joints=_pins(
            [
                ("O2", "frame", "crank", o2),
                ("A", "crank", "coupler", a),
                ("B", "coupler", "rocker", b),
                ("O4", "frame", "rocker", o4),
                ("C", "rocker", "link", c),
                ("D", "link", "output", d),
                ("O6", "frame", "output", o6),
            ]
        ),
        drivers=(Driver("O2", 3.0),),
    )


def test_relative_rest_reports_geometric_center_and_no_disagreement():
    m = watt_at_toggle()
    a = analyse(m)
    v = a.velocity
    assert abs(v.angular_velocity(m.index["rocker"])) < 1e-12
    rest = [c for c in a.centers if c.relative_rest]
    # frame, rocker, link, output are mutually at rest: C(4, 2) = 6 pairs.
    assert {c.pair for c in rest} == {
        "frame-rocker", "frame-link", "frame-output", "rocker-link", "rocker-output", "link-output"
    }
    for c in rest:
        assert c.point is not None and c.check is None
        assert c.method in ("joint", "three-centers")
        assert "velocity method is indeterminate" in c.derivation
    assert a.passed
    # The geometric center frame-link is still where the theorem puts it: on the
    # line through frame-rocker (O4) and rocker-link (C), and on the line through
    # frame-output (O6) and output-link (D).
    p = a.center("frame", "link").point
    assert pg.collinearity(p, (100.0, 0.0, 1.0), (150.0, 90.0, 1.0), scale=m.scale) < 1e-12
    assert pg.collinearity(p, (200.0, -20.0, 1.0), (210.0, 40.0, 1.0), scale=m.scale) < 1e-12


def test_coincident_lines_locate_nothing():
    # Centers 0-1, 0-2, 1-3 and 2-3 all on the x axis: both three-centers lines of
    # pair (1, 2) are the x axis, so they coincide and locate nothing.
    seeds = [
        (0, 1, (0.0, 0.0, 1.0), "a", "pin"),
        (0, 2, (1.0, 0.0, 1.0), "b", "pin"),
        (1, 3, (2.0, 0.0, 1.0), "c", "pin"),
        (2, 3, (3.0, 0.0, 1.0), "d", "pin"),
    ]
    r = solve_three_centers(4, seeds, scale=3.0, tol=1e-9)
    assert r.point(1, 2) is None
    assert len(r.derivations) == 6
    loci = r.loci[3]  # pair (1, 2)
    assert len(loci) == 2
    assert pg.line_separation(loci[0].line, loci[1].line, scale=3.0) < 1e-12
    # Tilt one center slightly above the tolerance and the pair is located.
    seeds[3] = (2, 3, (3.0, 1e-6, 1.0), "d", "pin")
    assert solve_three_centers(4, seeds, scale=3.0, tol=1e-9).point(1, 2) is not None


@pytest.mark.parametrize("bad", [0.0, -1e-9, float("nan")])
def test_tolerance_must_be_positive(bad):
    with pytest.raises(ValueError, match="tol must be positive"):
        solve_three_centers(3, [], tol=bad)


def test_compound_pin_gives_coincident_centers():
    # Three links at one pin (two revolutes at the same point): every center
    # among them is that point (common practice, no source).
    p = (40.0, 30.0)
    m = Mechanism(
        name="compound pin",
        links=_links("frame", "crank", "rod1", "rod2", "slide1", "slide2"),
        joints=_pins(
            [
                ("O", "frame", "crank", (0.0, 0.0)),
                ("P1", "crank", "rod1", p),
                ("P2", "crank", "rod2", p),
                ("Q1", "rod1", "slide1", (120.0, 10.0)),
                ("Q2", "rod2", "slide2", (10.0, 110.0)),
                ("G1", "frame", "slide1", (140.0, -40.0)),
                ("G2", "frame", "slide2", (-50.0, 120.0)),
            ]
        ),
        drivers=(Driver("O", 1.0),),
    )
    a = analyse(m)
    c = a.center("rod1", "rod2")
    assert c.method == "coincident"
    assert c.cartesian(m.scale) == pytest.approx(p, abs=1e-9)
    assert a.passed


def test_redundant_parallelogram_is_explained():
    # A parallelogram with a third parallel crank: Gruebler-Kutzbach counts 0
    # freedoms, yet it moves (the classic redundant case, common practice, no source).
    m = Mechanism(
        name="triple parallel",
        links=_links("frame", "c1", "bar", "c2", "c3"),
        joints=_pins(
            [
                ("O1", "frame", "c1", (0.0, 0.0)),
                ("A1", "c1", "bar", (20.0, 50.0)),
                ("O2", "frame", "c2", (60.0, 0.0)),
                ("A2", "c2", "bar", (80.0, 50.0)),
                ("O3", "frame", "c3", (130.0, 0.0)),
                ("A3", "c3", "bar", (150.0, 50.0)),
            ]
        ),
        drivers=(Driver("O1", 2.0),),
    )
    t = summarise_topology(m)
    assert t.gruebler == 0 and t.mobility == 1
    assert any("redundant" in note for note in t.notes)
    a = analyse(m)
    # The bar translates: its center with the frame is at infinity, perpendicular to
    # its velocity, i.e. along the cranks (common practice, no source).
    c = a.center("frame", "bar")
    assert c.cartesian(m.scale) is None
    dx, dy = c.direction()
    assert abs(dx * 50.0 - dy * 20.0) < 1e-9 * 50.0
    assert a.passed


def test_two_input_center_moves_on_its_ratio_line():
    # Five-bar: frame, left crank, left arm, right arm, right crank; two drivers.
    m = Mechanism(
        name="five-bar",
        links=_links("frame", "lc", "la", "ra", "rc"),
        joints=_pins(
            [
                ("O1", "frame", "lc", (0.0, 0.0)),
                ("A", "lc", "la", (-10.0, 40.0)),
                ("P", "la", "ra", (45.0, 95.0)),
                ("B", "ra", "rc", (95.0, 35.0)),
                ("O2", "frame", "rc", (80.0, 0.0)),
            ]
        ),
        drivers=(Driver("O1", 1.0), Driver("O2", 0.5)),
    )
    a = analyse(m)
    moving = [c for c in a.centers if c.method == "velocity"]
    assert moving and all(c.ratio_line is not None for c in moving)
    # Different ratios of the two inputs: each ratio-dependent center stays on its line
    # (Foster and Pennock, ASME IDETC 2004, abstract, via ../shared/references.md).
    for rates in [(1.0, -2.0), (0.3, 1.7), (2.0, 0.0)]:
        b = analyse(m.with_drivers([Driver("O1", rates[0]), Driver("O2", rates[1])]))
        for c in moving:
            p = b.center(*c.pair.split("-")).point
            assert pg.point_on_line(p, c.ratio_line, scale=m.scale) < 1e-12
    assert a.passed


def test_locate_centers_alone_needs_no_drivers():
    m = watt_at_toggle().with_drivers([])
    r = locate_centers(m)
    assert r.n_located == 15
    a = analyse(m, velocities=False)
    assert a.velocity is None and all(c.check is None for c in a.centers)


def test_far_away_drawing_is_handled_scale_free():
    # The same four-bar in metres, drawn 2e4 units from the origin, and in mm:
    # the rocker's angular velocity does not change (common practice, no source).
    from mechgraph.generate import four_bar

    base = [(0.0, 0.0), (0.02, 0.035), (0.12, 0.07), (0.1, 0.0)]

    def rocker_rate(offset, k):
        m = four_bar(*[(x * k + offset[0], y * k + offset[1]) for x, y in base], rate=10.0)
        a = analyse(m)
        assert a.passed
        return a.velocity.angular_velocity(3)

    ref = rocker_rate((0.0, 0.0), 1.0)
    for offset, k in [((1e4, -2e4), 1.0), ((0.0, 0.0), 1000.0), ((-3e5, 4e5), 1000.0)]:
        assert rocker_rate(offset, k) == pytest.approx(ref, rel=1e-6)
