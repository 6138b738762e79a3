"""How far to trust each center: sensitivities against sympy derivatives, dead-point rechecks."""

from __future__ import annotations

import math

import pytest

from mechgraph.conditioning import DEFAULT_RELATIVE_INPUT_TOL, assess, drawing_points, move_point, velocity_condition
from mechgraph.casefile import demo_mechanism
from mechgraph.generate import four_bar

PINS = [(0.0, 0.0), (20.0, 35.0), (120.0, 60.0), (100.0, 0.0)]


def test_pin_moves_with_its_own_point():
    # A revolute's center is its pin (common practice, no source): J = I, |J|_F = sqrt 2.
    c = assess(four_bar(*PINS))
    for pair in ("frame-L1", "L1-L2", "L2-L3", "frame-L3"):
        assert c.trust(pair).sensitivity == pytest.approx(math.sqrt(2.0), rel=1e-6)


def test_secondary_center_sensitivity_matches_sympy_derivative():
    # Independent reference: the coupler's center I13 is the meeting point of lines
    # O2-A and O4-B; sympy differentiates that closed form with respect to all
    # eight drawn coordinates.
    import sympy as sp

    xs = sp.symbols("x0:8")
    o2, a, b, o4 = (xs[0], xs[1]), (xs[2], xs[3]), (xs[4], xs[5]), (xs[6], xs[7])
    l1 = sp.Line(sp.Point(*o2), sp.Point(*a))
    l2 = sp.Line(sp.Point(*o4), sp.Point(*b))
    p = l1.intersection(l2)[0]
    subs = dict(zip(xs, [c for pt in PINS for c in pt]))
    J = sp.Matrix([p.x, p.y]).jacobian(sp.Matrix(xs)).subs(subs)
    expected = float(sp.sqrt(sum(v**2 for v in J)))
    c = assess(four_bar(*PINS))
    assert c.trust("frame-L2").sensitivity == pytest.approx(expected, rel=1e-6)


def test_uncertainty_scales_with_the_given_tolerance():
    m = four_bar(*PINS)
    d = assess(m)
    assert d.input_tol_is_default and d.input_tol == pytest.approx(DEFAULT_RELATIVE_INPUT_TOL * m.scale)
    g = assess(m, input_tol=0.5)
    assert not g.input_tol_is_default
    for c in g.centers:
        assert c.uncertainty == pytest.approx(0.5 * c.sensitivity)


def test_near_dead_point_is_flagged_and_rechecked_in_precision():
    # Coupler and rocker nearly collinear with the crank driving: close to a dead
    # point of the dyad (common practice, no source): B on the line O4-A, nudged.
    o4, a = (100.0, 0.0), (20.0, 35.0)
    t = 0.5
    b = (o4[0] + t * (a[0] - o4[0]) + 1e-5, o4[1] + t * (a[1] - o4[1]))
    m = four_bar((0.0, 0.0), a, b, o4)
    assert velocity_condition(m) < 1e-6
    c = assess(m)
    assert c.rechecked_in_precision
    assert all(x.digits is not None for x in c.centers)
    # the centers are geometric and keep their digits; the velocities lose some
    assert min(x.digits for x in c.centers) > 12
    assert min(c.velocity_digits.values()) < 14
    assert any("dead point" in f for x in c.centers for f in x.flags)


def test_well_conditioned_case_is_not_rechecked_unless_asked():
    m = four_bar(*PINS)
    assert not assess(m).rechecked_in_precision
    c = assess(m, always_precision=True)
    assert c.rechecked_in_precision and min(x.digits for x in c.centers) > 12


def test_compound_pins_move_together():
    m = demo_mechanism()
    pts = drawing_points(m)
    assert len(pts) == 7
    moved = move_point(m, pts[0][1], 1.0, 2.0)
    assert moved.joint_by_name["O2"].at == (1.0, 2.0)


@pytest.mark.parametrize("kw", [{"input_tol": 0.0}, {"input_tol": -1.0}, {"step": 0.0}])
def test_bad_parameters(kw):
    with pytest.raises(ValueError, match="must be positive"):
        assess(four_bar(*PINS), **kw)


def test_cli_uncertainty_table_and_json(capsys):
    import json

    from mechgraph.cli import EXIT_INPUT, EXIT_OK, main

    assert main(["demo", "--uncertainty", "0.5"]) == EXIT_OK
    out = capsys.readouterr().out
    assert "Trust at a drawing tolerance of 0.5 mm" in out and "digits sound" in out
    assert main(["demo", "--uncertainty", "-f", "json"]) == EXIT_OK
    doc = json.loads(capsys.readouterr().out)
    assert doc["trust"]["input_tol_is_default"] is True and len(doc["trust"]["centers"]) == 15
    assert main(["demo", "--uncertainty", "0"]) == EXIT_INPUT
    assert "--uncertainty must be a positive length" in capsys.readouterr().err


def test_cli_rechecks_automatically_near_a_dead_point(tmp_path, capsys):
    import json

    from mechgraph.cli import EXIT_OK, main

    o4, a = (100.0, 0.0), (20.0, 35.0)
    b = (o4[0] + 0.5 * (a[0] - o4[0]) + 1e-5, o4[1] + 0.5 * (a[1] - o4[1]))
    text = "\n".join(
        ['[[link]]\nname = "frame"\nground = true']
        + [f'[[link]]\nname = "{n}"' for n in ("crank", "coupler", "rocker")]
        + [
            f'[[joint]]\nkind = "revolute"\nlinks = ["{p}", "{q}"]\nat = [{x!r}, {y!r}]'
            for (p, q), (x, y) in zip(
                [("frame", "crank"), ("crank", "coupler"), ("coupler", "rocker"), ("frame", "rocker")],
                [(0.0, 0.0), a, b, o4],
            )
        ]
        + ['[[driver]]\njoint = "frame-crank"\nrad_per_s = 1']
    )
    case = tmp_path / "near.toml"
    case.write_text(text)
    assert main(["centers", str(case)]) == EXIT_OK
    out = capsys.readouterr().out
    assert "Near a dead point" in out and "sound digits" in out
    assert main(["centers", str(case), "-f", "json"]) == EXIT_OK
    doc = json.loads(capsys.readouterr().out)
    assert doc["precision_recheck"]["velocity_condition"] < 1e-6
    assert min(doc["precision_recheck"]["velocity_digits"].values()) < 14
    # away from dead points no recheck is made
    assert main(["demo", "-f", "json"]) == EXIT_OK
    assert json.loads(capsys.readouterr().out)["precision_recheck"] is None


def test_center_at_infinity_is_judged_by_direction():
    # Crank and rocker parallel: the coupler's center lies at infinity along them
    # (common practice, no source).  Reference: a Monte Carlo of the drawing with
    # independent 0.5 mm errors, the center as the meeting point of lines O2-A and
    # O4-B by plain numpy, its direction seen from the drawing centre (up to sign).
    import numpy as np

    pins = np.array([(0.0, 0.0), (0.0, 40.0), (100.0, 80.0), (100.0, 0.0)])
    m = four_bar(*map(tuple, pins))
    t = assess(m, input_tol=0.5).trust("frame-L2")
    assert t.at_infinity and any("at or near infinity" in f for f in t.flags)
    rng = np.random.default_rng(7)
    angles = []
    for _ in range(4000):
        o2, a, b, o4 = pins + rng.normal(0.0, 0.5, pins.shape)
        l1 = np.cross([*o2, 1.0], [*a, 1.0])
        l2 = np.cross([*o4, 1.0], [*b, 1.0])
        x, y, w = np.cross(l1, l2)
        cx, cy = m.centre
        d = (x - cx * w, y - cy * w)  # direction from the centre, homogeneous
        angles.append(math.atan2(d[0], d[1]) % math.pi)  # angle from the vertical, unsigned
    a = (np.array(angles) + math.pi / 2) % math.pi - math.pi / 2
    rms = float(np.sqrt(np.mean(a**2)))
    assert t.uncertainty == pytest.approx(rms, rel=0.25)
