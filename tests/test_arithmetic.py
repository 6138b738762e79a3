"""The three arithmetics: exact results against sympy, high precision against exact, float against both."""

from __future__ import annotations

import json
import math

import pytest

from mechgraph import projective as pg
from mechgraph.analysis import analyse
from mechgraph.arithmetic import NumberKindError, ExactArithmetic, PrecisionArithmetic, TypedFloat, decimal_text
from mechgraph.casefile import demo_mechanism, parse_case
from mechgraph.cli import EXIT_INPUT, EXIT_OK, main
from mechgraph.generate import four_bar
from mechgraph.joints import Prismatic, Revolute
from mechgraph.model import Driver, Link, Mechanism


def test_exact_demo_agrees_exactly_everywhere():
    a = analyse(demo_mechanism(), arithmetic="exact")
    assert a.arithmetic == "exact" and a.passed
    cc = a.crosscheck
    assert cc.tol == 0.0 and cc.max_separation == 0.0 and cc.max_collinearity == 0.0
    assert cc.n_compared == 15 and cc.n_triples == 20


def test_exact_four_bar_centers_match_sympy_geometry():
    # Independent reference: sympy.geometry line intersections (a general-purpose
    # library) of the lines of the three-centers theorem, in exact rationals.
    from sympy import Rational
    from sympy.geometry import Line, Point

    o2, a_, b_, o4 = (0, 0), (Rational(37, 2), Rational(412, 10)), (Rational(1213, 10), 66), (100, 0)
    m = four_bar(*[(float(x), float(y)) for x, y in (o2, a_, b_, o4)])
    res = analyse(m, arithmetic="exact")
    i13 = Line(Point(*o2), Point(*a_)).intersection(Line(Point(*o4), Point(*b_)))[0]
    i24 = Line(Point(*o2), Point(*o4)).intersection(Line(Point(*a_), Point(*b_)))[0]
    assert res.center("frame", "L2").exact_text() == (str(i13.x), str(i13.y))
    assert res.center("L1", "L3").exact_text() == (str(i24.x), str(i24.y))


def test_exact_rocker_rate_matches_sympy_derivative():
    # Independent reference: the vector-loop velocity equations solved by sympy
    # (validation.references.sympy_fourbar differentiates the loop closure).
    from validation.references import fourbar_velocity

    m = four_bar((0.0, 0.0), (20.0, 35.0), (120.0, 60.0), (100.0, 0.0), rate=10.0)
    res = analyse(m, arithmetic="exact")
    th2 = math.atan2(35.0, 20.0)
    th3 = math.atan2(60.0 - 35.0, 120.0 - 20.0)
    th4 = math.atan2(60.0, 20.0)
    a, b, c = math.hypot(20, 35), math.hypot(100, 25), math.hypot(20, 60)
    w3, w4 = fourbar_velocity(a, b, c, th2, th3, th4, 10.0)
    kt = res.velocity.kind_twists
    ar = res.velocity.arithmetic
    assert ar.to_float(kt[3][0]) == pytest.approx(w4, rel=1e-12)
    assert ar.to_float(kt[2][0]) == pytest.approx(w3, rel=1e-12)


def test_decimals_are_taken_as_typed():
    assert decimal_text(TypedFloat("37.2")) == "37.2"
    m = parse_case(
        """
[[link]]
name = "frame"
ground = true
[[link]]
name = "arm"
[[joint]]
kind = "revolute"
links = ["frame", "arm"]
at = [37.2, 1e-3]
[[driver]]
joint = "frame-arm"
rad_per_s = 1
""",
        "t.toml",
    )
    a = analyse(m, arithmetic="exact", velocities=False)
    assert a.center("frame", "arm").exact_text() == ("186/5", "1/1000")


def test_exact_surds_from_degrees():
    # A slider at 30 degrees: its center lies at infinity perpendicular to the
    # guide (common practice, no source), direction (-sin 30, cos 30) = (-1/2, sqrt(3)/2).
    from sympy import Rational, sqrt, sympify

    m = Mechanism(
        name="inclined slider",
        links=(Link("frame", ground=True), Link("crank"), Link("rod"), Link("block")),
        joints=(
            Revolute("O", ("frame", "crank"), at=(0.0, 0.0)),
            Revolute("A", ("crank", "rod"), at=(10.0, 20.0)),
            Revolute("B", ("rod", "block"), at=(60.0, 30.0)),
            Prismatic("S", ("frame", "block"), at=(60.0, 30.0), axis_deg=30.0),
        ),
        drivers=(Driver("O", 1.0),),
    )
    a = analyse(m, arithmetic="exact")
    assert a.passed and a.crosscheck.max_separation == 0.0
    dx, dy = (sympify(t) for t in a.center("frame", "block").exact_direction_text())
    # same direction as (-1/2, sqrt(3)/2), up to scale
    assert (dx * sqrt(3) / 2 - dy * Rational(-1, 2)).equals(0)


def test_precision_agrees_with_exact_to_its_digits():
    m = demo_mechanism()
    e = analyse(m, arithmetic="exact")
    p = analyse(m, arithmetic="precision", digits=60)
    f = analyse(m)
    for ce, cp, cf in zip(e.centers, p.centers, f.centers):
        ex, ey = ce.kind_point[0] / ce.kind_point[2], ce.kind_point[1] / ce.kind_point[2]
        x, y, w = cp.kind_point
        ar = cp.arithmetic
        assert abs(ar.to_float(x / w - ar.num(str(e.velocity.arithmetic.to_sympy(ex).evalf(70))))) < 1e-40
        assert abs(ar.to_float(y / w - ar.num(str(e.velocity.arithmetic.to_sympy(ey).evalf(70))))) < 1e-40
        assert pg.point_separation(cf.point, cp.point, scale=m.scale, origin=m.centre) < 1e-12
    assert p.passed and p.crosscheck.max_separation < 1e-40


def test_exact_needs_the_cases_own_position():
    from mechgraph.position import assemble

    m = four_bar((0.0, 0.0), (20.0, 35.0), (120.0, 60.0), (100.0, 0.0))
    poses = assemble(m, [0.1])
    with pytest.raises(NumberKindError, match="exact arithmetic works at the case's own position only"):
        analyse(m, poses, arithmetic="exact", velocities=False)
    assert analyse(m, poses).passed  # floating point works at any assembled position


def test_exact_needs_common_rate_units_for_two_inputs():
    m = Mechanism(
        name="five-bar",
        links=(Link("frame", ground=True), Link("a"), Link("b"), Link("c"), Link("d")),
        joints=(
            Revolute("O1", ("frame", "a"), at=(0.0, 0.0)),
            Revolute("A", ("a", "b"), at=(-10.0, 40.0)),
            Revolute("P", ("b", "c"), at=(45.0, 95.0)),
            Revolute("B", ("c", "d"), at=(95.0, 35.0)),
            Revolute("O2", ("frame", "d"), at=(80.0, 0.0)),
        ),
        drivers=(Driver("O1", 2 * math.pi, given=(60, "rpm")), Driver("O2", 1.0, given=(1, "rad_per_s"))),
    )
    with pytest.raises(NumberKindError, match="every driver rate in the same unit"):
        analyse(m, arithmetic="exact")
    assert analyse(m, arithmetic="precision").passed


def test_exact_field_refuses_what_it_cannot_hold():
    with pytest.raises(NumberKindError, match="does not lie in the number field"):
        from sympy import sqrt

        ExactArithmetic.from_numbers([1, 2]).from_expr(sqrt(2))


def test_precision_digits_are_checked():
    with pytest.raises(ValueError, match="digits must be a whole number of at least 16"):
        PrecisionArithmetic(8)


def test_cli_exact_json_carries_text_values(capsys):
    assert main(["demo", "--arithmetic", "exact", "-f", "json"]) == EXIT_OK
    doc = json.loads(capsys.readouterr().out)
    assert doc["arithmetic"] == "exact"
    c = next(c for c in doc["centers"] if c["pair"] == ["frame", "coupler"])
    # Source: sympy.geometry (a general-purpose library): lines O2-A and O4-B of the demo's
    # four-bar loop meet at the coupler's center (the three-centers theorem).
    from sympy.geometry import Line, Point

    p = Line(Point(0, 0), Point(25, 35)).intersection(Line(Point(140, 0), Point(150, 80)))[0]
    assert c["text"] == {"x": str(p.x), "y": str(p.y)} == {"x": "5600/33", "y": "7840/33"}
    assert c["x"] == pytest.approx(5600 / 33, rel=1e-15)
    w = next(l for l in doc["velocity"]["links"] if l["name"] == "coupler")
    # Source: angular-velocity-ratio theorem (common practice, no source): w3/w2 = -|I12 I23| / |I13 I23|
    # measured from the exact centers, with w2 = 120 rpm = 4*pi rad/s.
    from sympy import Rational, pi, sqrt

    i12, i23 = (Rational(0), Rational(0)), (Rational(25), Rational(35))
    ratio = -sqrt((i23[0] - i12[0]) ** 2 + (i23[1] - i12[1]) ** 2) / sqrt((i23[0] - p.x) ** 2 + (i23[1] - p.y) ** 2)
    assert w["angular_velocity_text"] == str(ratio * 4 * pi) == "-132*pi/191"


def test_cli_digits_too_few(capsys):
    assert main(["demo", "--arithmetic", "precision", "--digits", "10"]) == EXIT_INPUT
    assert "--digits must be at least 16" in capsys.readouterr().err


def test_every_case_in_every_arithmetic():
    from pathlib import Path

    from mechgraph.casefile import load_case

    for path in sorted((Path(__file__).resolve().parents[1] / "cases").glob("*.toml")):
        m = load_case(path)
        for kind in ("exact", "precision"):
            a = analyse(m, arithmetic=kind)
            assert a.passed, (path.stem, kind, a.crosscheck)
            assert all(c.point is not None for c in a.centers), (path.stem, kind)


def test_exact_refuses_fields_of_high_degree_promptly():
    # cos 37.2 deg generates a number field of degree 40: refused, pointing to vectors or precision.
    m = Mechanism(
        name="inclined slider",
        links=(Link("frame", ground=True), Link("crank"), Link("rod"), Link("block")),
        joints=(
            Revolute("O", ("frame", "crank"), at=(0.0, 0.0)),
            Revolute("A", ("crank", "rod"), at=(10.0, 30.0)),
            Revolute("B", ("rod", "block"), at=(140.0, 40.0)),
            Prismatic("S", ("frame", "block"), at=(140.0, 40.0), axis_deg=37.2),
        ),
        drivers=(Driver("O", 1.0),),
    )
    with pytest.raises(NumberKindError, match=r"degree 80 \(above 16\) for the directions at 37.2 degrees"):
        analyse(m, arithmetic="exact")
    assert analyse(m, arithmetic="precision").passed


def test_exact_and_precision_json_for_two_inputs(capsys):
    from pathlib import Path

    case = Path(__file__).resolve().parents[1] / "cases" / "twodof_fivebar_plotter.toml"
    for kind in ("exact", "precision"):
        assert main(["centers", str(case), "--arithmetic", kind, "-f", "json"]) == EXIT_OK
        doc = json.loads(capsys.readouterr().out)
        assert any(c["ratio_line"] for c in doc["centers"]) and any(c["known_lines"] for c in doc["centers"])
