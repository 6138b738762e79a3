"""Checking a hand calculation against mechgraph (mechgraph.handcheck).

Every "hand value" here is made from mechgraph's own analysis of the case:
either copied exactly, or deliberately perturbed (a pin misread, a crossing
misplaced, a rate slipped) and, where a person would carry the error on,
propagated by redrawing mechgraph's own derivations through the perturbed
values (:func:`replay`).  No expected number is invented: the tests check
which items the report calls off, faulty or inherited, against what the
perturbation did.
"""

from __future__ import annotations

import json
import math
from functools import lru_cache
from pathlib import Path

import pytest

from mechgraph import projective as pg
from mechgraph.analysis import analyse
from mechgraph.casefile import demo_mechanism, load_case
from mechgraph.errors import CaseFileError, MechgraphError
from mechgraph.handcheck import (
    CSV_COLUMNS,
    DEFAULT_RELATIVE_TOLERANCE,
    HandCheckError,
    check_hand,
    find_hand_file,
    parse_hand_text,
    read_hand_file,
    render_dict,
    render_text,
)
from mechgraph.report import CAUTION
from mechgraph.three_centers import pairs

CASES = Path(__file__).resolve().parent.parent / "cases"
TOL = 0.5  # the hand drawing's tolerance used in most tests, mm
ANGLE_TOL = 1.0  # degrees


@lru_cache(maxsize=None)
def analysis_of(case: str):
    mech = demo_mechanism() if case == "demo" else load_case(CASES / case)
    return analyse(mech)


def idx(mech, a: str, b: str) -> tuple[int, int]:
    i, j = mech.index[a], mech.index[b]
    return (min(i, j), max(i, j))


def is_infinite(mech, h) -> bool:
    # the same test as Center.cartesian: farther than 1e12 drawing sizes is at infinity
    return pg.to_cartesian(h, scale=mech.scale * 1e12, tol=1.0) is None


def replay(a, perturb=None, after=None):
    """Hand values of every center as a person following mechgraph's derivations would get them.

    Each center is constructed as mechgraph constructed it (pin, meeting point of
    the two lines through two earlier centers, or coincidence), but through the
    person's own earlier values.  ``perturb`` {pair: (dx, dy) or degrees} moves a
    center right after it is constructed, so the later centers carry the error on;
    ``after`` {pair: (dx, dy)} moves a center after everything is constructed (a
    slip that nothing else uses).  Velocity-method centers are copied.
    """
    mech, tc = a.mechanism, a.three_centers
    all_pairs = pairs(mech.n_links)
    perturb, after = perturb or {}, after or {}
    vals = {}
    for q in tc.order:
        p, d = all_pairs[q], tc.derivations[q]
        if d.method == "joint":
            h = a.centers[q].point
        elif d.method == "coincident":
            h = vals[tuple(sorted(d.through[0]))]
        else:
            lines = [
                loc.line if loc.through is None else pg.join(*(vals[tuple(sorted(x))] for x in loc.through))
                for loc in d.loci
            ]
            h = pg.meet(*lines)
        if p in perturb:
            h = moved(h, perturb[p])
        vals[p] = h
    for q, c in enumerate(a.centers):
        if all_pairs[q] not in vals and c.point is not None:
            vals[all_pairs[q]] = c.point
    for p, dv in after.items():
        vals[p] = moved(vals[p], dv)
    return vals


def moved(h, dv):
    if isinstance(dv, (int, float)):  # a direction at infinity turned by dv degrees
        t = math.atan2(h[1], h[0]) + math.radians(dv)
        return (math.cos(t), math.sin(t), 0.0)
    x, y = h[0] / h[2], h[1] / h[2]
    return (x + dv[0], y + dv[1], 1.0)


def separation(mech, h, k, far=10.0):
    """(distance or angle, 'distance' or 'angle') between two homogeneous centers, by the documented rule.

    Beyond ``far`` drawing sizes from the drawing's centre (or at infinity) a
    center is judged by its direction from the centre, either sense.
    """
    ox, oy = mech.centre

    def axis_far(t):
        if is_infinite(mech, t):
            return math.atan2(t[1], t[0]), True
        x, y = t[0] / t[2] - ox, t[1] / t[2] - oy
        return math.atan2(y, x), math.hypot(x, y) > far * mech.scale

    (ah, fh), (ak, fk) = axis_far(h), axis_far(k)
    if fh and fk:
        a = math.degrees(ah - ak) % 180.0
        return min(a, 180.0 - a), "angle"
    if is_infinite(mech, h) or is_infinite(mech, k):
        return math.inf, "distance"
    return math.dist((h[0] / h[2], h[1] / h[2]), (k[0] / k[2], k[1] / k[2])), "distance"


def off_pairs(a, vals, tol=TOL, angle_tol=ANGLE_TOL, margin=0.2):
    """The pairs whose hand value is beyond tolerance (asserting none is within ``margin`` of the boundary)."""
    mech = a.mechanism
    out = set()
    for q, p in enumerate(pairs(mech.n_links)):
        if p not in vals:
            continue
        s, kind = separation(mech, vals[p], a.centers[q].point)
        t = tol if kind == "distance" else angle_tol
        assert not ((1 - margin) * t < s < (1 + margin) * t), f"test setup: {mech.pair_names(*p)} is too near the tolerance ({s})"
        if s > t:
            out.add(p)
    return out


def true_rates(a):
    v, m = a.velocity, a.mechanism
    omegas = {i: float(v.twists[i, 0]) for i in range(m.n_links) if i != m.ground_index}
    points = {p.name: v.point_velocity(m.index[p.link], p.at) for p in m.points}
    return omegas, points


def hand_toml(mech, centers, omegas=None, points=None, settings=None) -> str:
    """A TOML hand file of the given values (floats written exactly, with repr)."""
    settings = {"tolerance": TOL, **(settings or {})}
    out = ["[hand]", f'unit = "{mech.unit}"']
    out += [f"{k} = {v!r}" for k, v in settings.items() if v is not None]
    for (i, j), h in centers.items():
        h = tuple(float(c) for c in h)
        out += ["", "[[center]]", f'pair = ["{mech.link_names[i]}", "{mech.link_names[j]}"]']
        if is_infinite(mech, h):
            out.append(f"at_infinity_deg = {math.degrees(math.atan2(h[1], h[0]))!r}")
        else:
            out.append(f"at = [{h[0] / h[2]!r}, {h[1] / h[2]!r}]")
    for i, w in (omegas or {}).items():
        out += ["", "[[angular_velocity]]", f'link = "{mech.link_names[i]}"', f"rad_per_s = {w!r}"]
    for name, v in (points or {}).items():
        out += ["", "[[point_velocity]]", f'point = "{name}"']
        out.append(f"v = [{v[0]!r}, {v[1]!r}]" if isinstance(v, tuple) else f"speed = {v!r}")
    return "\n".join(out) + "\n"


def hand_csv(mech, centers, omegas=None, points=None, tol=TOL) -> str:
    """The same as :func:`hand_toml`, as a CSV hand file."""
    rows = [",".join(CSV_COLUMNS), f"setting,unit,,,,,,{mech.unit},,", f"setting,tolerance,,,,,{tol!r},,,"]
    for (i, j), h in centers.items():
        h = tuple(float(c) for c in h)
        a, b = mech.link_names[i], mech.link_names[j]
        if is_infinite(mech, h):
            rows.append(f"center,{a},{b},,,{math.degrees(math.atan2(h[1], h[0]))!r},,,,")
        else:
            rows.append(f"center,{a},{b},{h[0] / h[2]!r},{h[1] / h[2]!r},,,{mech.unit},,")
    for i, w in (omegas or {}).items():
        rows.append(f"angular_velocity,{mech.link_names[i]},,,,,{w!r},rad/s,,")
    for name, v in (points or {}).items():
        if isinstance(v, tuple):
            rows.append(f"point_velocity,{name},,{v[0]!r},{v[1]!r},,,{mech.unit}/s,,")
        else:
            rows.append(f"point_velocity,{name},,,,,{v!r},{mech.unit}/s,,")
    return "\n".join(rows) + "\n"


def check(case, centers, omegas=None, points=None, fmt="toml", **settings):
    a = analysis_of(case)
    m = a.mechanism
    text = hand_toml(m, centers, omegas, points, settings) if fmt == "toml" else hand_csv(m, centers, omegas, points)
    return check_hand(a, parse_hand_text(text, m, f"hand.{fmt}", fmt))


def label(mech, p) -> str:
    return "center " + mech.pair_names(*p)


# --------------------------------------------------------------------------- agreement


@pytest.mark.parametrize("fmt", ["toml", "csv"])
@pytest.mark.parametrize("case", ["demo", "sixbar_slider_toggle_press.toml", "cam_reject_gate.toml"])
def test_mechgraphs_own_values_agree(case, fmt):
    a = analysis_of(case)
    omegas, points = true_rates(a)
    r = check(case, replay(a), omegas, points, fmt=fmt)
    assert r.holds, r.summary
    assert r.summary.startswith("The hand calculation holds")
    assert len(r.centers) == a.mechanism.n_pairs
    assert all(c.status == "agrees" for c in r.centers)
    assert all(x.status == "agrees" for x in r.rates)
    assert r.first_faulty is None and r.faulty_steps == ()
    assert r.caution == CAUTION


def test_values_within_tolerance_agree():
    a = analysis_of("demo")
    # every center moved by 0.4 of the tolerance (mechgraph's values, deliberately moved a little)
    step = 0.4 * TOL / math.sqrt(2.0)
    vals = {p: moved(h, (step, -step)) for p, h in replay(a).items()}
    omegas, points = true_rates(a)
    omegas = {i: w * 1.015 for i, w in omegas.items()}  # 1.5 %, within the 2 % default
    r = check("demo", vals, omegas, points)
    assert r.holds, r.summary
    assert all(c.status == "agrees" and c.off_by == pytest.approx(0.4 * TOL) for c in r.centers)


def test_default_tolerance_is_relative_to_the_drawing():
    a = analysis_of("demo")
    m = a.mechanism
    h = parse_hand_text(hand_toml(m, {}, settings={"tolerance": None}), m)
    assert h.tolerance_is_default
    assert h.tolerance == pytest.approx(DEFAULT_RELATIVE_TOLERANCE * m.scale)
    assert "common practice, no source" in check_hand(a, h).tolerance_source


# --------------------------------------------------------------------------- the first faulty step


def test_early_center_off_is_the_first_faulty_step_and_later_centers_inherit():
    a = analysis_of("demo")
    m = a.mechanism
    root = idx(m, "frame", "coupler")
    vals = replay(a, perturb={root: (0.0, 3.0)})  # the crossing misplaced by 3 mm, and carried on
    r = check("demo", vals)
    off = off_pairs(a, vals)
    assert root in off and len(off) > 2
    assert r.first_faulty == label(m, root)
    assert r.faulty_steps == (label(m, root),)
    assert not r.holds and "first faulty step: center frame-coupler" in r.summary
    first = r.item(label(m, root))
    assert first.status == "off" and first.faulty_step and first.off_by == pytest.approx(3.0)
    assert first.own_step_ok is False
    # it should lie on its two construction lines: the person's own lines (through centers that agree) miss it
    assert {ln.label for ln in first.lines} == {"line frame-crank/crank-coupler", "line coupler-rocker/frame-rocker"}
    assert all(set(ln.through_status) == {"agrees"} for ln in first.lines)
    assert any(ln.passes is False for ln in first.lines)
    # through centers that agree, the person's lines are mechgraph's: the point is as far off either
    assert all(ln.off_user == pytest.approx(ln.off_true, abs=1e-9) for ln in first.lines)
    later = off - {root}
    assert set(first.inherited_by) == {label(m, p) for p in later}
    for p in later:
        c = r.item(label(m, p))
        assert c.status == "off" and not c.faulty_step
        assert c.inherits_from == (label(m, root),)
        assert c.own_step_ok is True  # the person's own lines pass through their own point
        assert "inherited" in c.note
    assert all(r.item(label(m, p)).status == "agrees" for p in set(vals) - off)
    for name in ("frame-pusher", "rocker-pusher"):  # named in the summary as inheriting
        if idx(m, *name.split("-")) in later:
            assert name in r.summary


ALL_CASES = ["demo"] + sorted(p.name for p in CASES.glob("*.toml"))


@pytest.mark.parametrize("case", ALL_CASES)
def test_any_single_error_carried_on_is_found_as_the_first_faulty_step(case):
    a = analysis_of(case)
    m = a.mechanism
    tol = DEFAULT_RELATIVE_TOLERANCE * m.scale  # the default hand tolerance
    omegas, points = true_rates(a)
    assert check(case, replay(a), omegas, points, tolerance=tol).holds
    tc = a.three_centers
    for q, p in enumerate(pairs(m.n_links)):
        c = a.centers[q]
        if c.point is None:
            continue
        # 8 tolerances across, or 4 degrees for a center at infinity; carried on by the later constructions
        dv = 4.0 if is_infinite(m, c.point) else (0.0, 8.0 * tol)
        vals = replay(a, perturb={p: dv}) if q in tc.order else replay(a, after={p: dv})
        r = check(case, vals, tolerance=tol)
        off = off_pairs(a, vals, tol=tol, margin=1e-6)  # only rounding could blur a closer call
        assert {(x.i, x.j) for x in r.centers if x.status == "off"} == off
        if p not in off:  # only beyond the far limit, where a shift along the direction is not an error
            assert separation(m, vals[p], c.point)[1] == "angle"
            continue
        assert r.first_faulty == label(m, p) and r.faulty_steps == (label(m, p),), (m.pair_names(*p), r.faulty_steps)
        assert set(r.item(label(m, p)).inherited_by) == {label(m, x) for x in off - {p}}
        for x in off - {p}:
            assert r.item(label(m, x)).inherits_from == (label(m, p),)


def test_error_carried_through_centers_within_tolerance_is_still_inherited():
    case = "sixbar_slider_toggle_press.toml"
    a = analysis_of(case)
    m = a.mechanism
    tol = DEFAULT_RELATIVE_TOLERANCE * m.scale
    pin, inner, outer = idx(m, "toggle link", "ram"), idx(m, "bell crank", "ram"), idx(m, "connecting rod", "ram")
    vals = replay(a, perturb={pin: (0.0, 8.0 * tol)})  # pin misread, and carried on
    off = off_pairs(a, vals, tol=tol)
    # bell crank-ram is built on the misread pin, stays within tolerance, and carries its error on to
    # connecting rod-ram, which is off although every center it is built on agrees
    assert inner not in off and outer in off
    r = check(case, vals, tolerance=tol)
    c = r.item(label(m, outer))
    assert not c.faulty_step and c.own_step_ok is True and c.inherits_from == (label(m, pin),)
    assert "each within tolerance but carrying on the error of center toggle link-ram" in c.note


def test_misread_pin_is_the_first_faulty_step():
    a = analysis_of("demo")
    m = a.mechanism
    pin = idx(m, "crank", "coupler")
    vals = replay(a, perturb={pin: (0.0, 4.0)})  # pin A misread 4 mm high, and carried on
    r = check("demo", vals)
    off = off_pairs(a, vals)
    assert r.first_faulty == label(m, pin)
    c = r.item(label(m, pin))
    assert c.method == "joint" and "primary center" in c.note and "revolute 'A'" in c.derivation
    assert c.step < r.item("center frame-coupler").step  # located before the centers built on it
    assert set(c.inherited_by) == {label(m, p) for p in off - {pin}}


def test_earliest_of_two_independent_errors_is_first():
    a = analysis_of("demo")
    m = a.mechanism
    early, late = idx(m, "crank", "rocker"), idx(m, "frame", "coupler")
    tc = a.three_centers
    # in mechgraph's construction order crank-rocker comes before frame-coupler
    order = [pairs(m.n_links)[q] for q in tc.order]
    assert order.index(early) < order.index(late)
    vals = replay(a, after={late: (3.0, 0.0), early: (0.0, 3.0)})  # two slips, neither carried on
    r = check("demo", vals)
    assert r.first_faulty == label(m, early)
    assert set(r.faulty_steps) == {label(m, early), label(m, late)}
    assert "other faulty step(s): center frame-coupler" in r.summary


def test_inherited_center_that_is_also_drawn_wrong_is_a_faulty_step_too():
    a = analysis_of("demo")
    m = a.mechanism
    root, later = idx(m, "frame", "coupler"), idx(m, "frame", "pusher")
    # frame-coupler off and carried on; frame-pusher then also misplaced off its own lines
    vals = replay(a, perturb={root: (3.0, 0.0)}, after={later: (0.0, -4.0)})
    r = check("demo", vals)
    c = r.item(label(m, later))
    assert c.faulty_step and c.own_step_ok is False
    assert c.inherits_from == (label(m, root),)
    assert r.first_faulty == label(m, root)
    assert r.faulty_steps[:2] == (label(m, root), label(m, later))


def test_center_at_infinity_off_by_an_angle():
    case = "sixbar_slider_toggle_press.toml"
    a = analysis_of(case)
    m = a.mechanism
    slider = idx(m, "frame", "ram")
    assert is_infinite(m, a.centers[pairs(m.n_links).index(slider)].point)
    vals = replay(a, perturb={slider: 3.0})  # the guide's normal drawn 3 degrees off, and carried on
    r = check(case, vals)
    c = r.item(label(m, slider))
    assert c.status == "off" and c.measure == "angle_deg" and c.off_by == pytest.approx(3.0)
    assert c.given.at_infinity and c.expected.at_infinity
    assert r.first_faulty == label(m, slider)
    assert set(c.inherited_by) == {label(m, p) for p in off_pairs(a, vals) - {slider}}
    assert c.inherited_by  # the error does reach later centers


def test_early_center_off_in_slider_case():
    case = "sixbar_slider_toggle_press.toml"
    a = analysis_of(case)
    m = a.mechanism
    root = idx(m, "crank", "bell crank")
    vals = replay(a, perturb={root: (-6.0, 2.0)})
    r = check(case, vals, fmt="csv")
    off = off_pairs(a, vals)
    assert r.first_faulty == label(m, root)
    assert set(r.item(label(m, root)).inherited_by) == {label(m, p) for p in off - {root}}


def test_contact_normal_is_one_of_the_lines():
    case = "cam_reject_gate.toml"
    a = analysis_of(case)
    m = a.mechanism
    p = idx(m, "cam", "follower arm")
    vals = replay(a, perturb={p: (4.0, 4.0)})
    r = check(case, vals)
    c = r.item(label(m, p))
    assert r.first_faulty == label(m, p)
    normal = [ln for ln in c.lines if ln.through is None]
    assert len(normal) == 1 and "cam face" in normal[0].label and normal[0].passes is False
    assert set(c.inherited_by) == {label(m, x) for x in off_pairs(a, vals) - {p}}


def test_velocity_method_center_of_an_indeterminate_linkage():
    case = "eightbar_double_butterfly_stage_lift.toml"
    a = analysis_of(case)
    m = a.mechanism
    assert r_holds(case, replay(a))
    q = next(k for k, c in enumerate(a.centers) if c.method in ("velocity", "relaxation"))
    p = pairs(m.n_links)[q]
    vals = replay(a, after={p: (5.0, 0.0)})
    r = check(case, vals)
    c = r.item(label(m, p))
    assert c.status == "off" and c.faulty_step and "not reached by the three-centers theorem" in c.note
    if c.method == "relaxation":
        assert "relaxation method" in c.note and "velocity analysis" not in c.note
    assert r.first_faulty == label(m, p)


def own_order(a, recipe, perturb):
    """Hand values of a person who builds the centers in their own order, through their own values.

    The pins are mechgraph's; ``recipe`` is a list of (target, (A, B), (C, D)) of
    link-name pairs: the target is where line A-B meets line C-D (each through
    the person's values).  ``perturb`` {pair: (dx, dy)} moves a center right
    after it is constructed, so that later steps carry the error on.
    """
    m, tc = a.mechanism, a.three_centers
    all_pairs = pairs(m.n_links)
    vals = {all_pairs[q]: a.centers[q].point for q in tc.order if tc.derivations[q].method == "joint"}
    for tgt, (p1, p2), (q1, q2) in recipe:
        h = pg.meet(pg.join(vals[idx(m, *p1)], vals[idx(m, *p2)]), pg.join(vals[idx(m, *q1)], vals[idx(m, *q2)]))
        p = idx(m, *tgt)
        vals[p] = moved(h, perturb[p]) if p in perturb else h
    return vals


def test_centers_built_in_the_persons_own_order_inherit():
    a = analysis_of("demo")
    m = a.mechanism
    F, C, R, P, D, K = "frame", "crank", "rocker", "pusher", "pad arm", "coupler"
    recipe = [
        ((F, K), ((F, C), (C, K)), ((K, R), (F, R))),
        ((C, R), ((F, C), (F, R)), ((C, K), (K, R))),
        ((K, D), ((K, P), (P, D)), ((F, D), (F, K))),
        ((C, D), ((F, C), (F, D)), ((K, D), (C, K))),  # the error is made here
        ((C, P), ((C, K), (K, P)), ((C, D), (P, D))),  # not mechgraph's lines for these three
        ((F, P), ((F, C), (C, P)), ((F, D), (P, D))),
        ((R, P), ((K, R), (K, P)), ((C, R), (C, P))),
        ((R, D), ((F, R), (F, D)), ((K, D), (K, R))),
    ]
    root = idx(m, C, D)
    later = {idx(m, C, P), idx(m, F, P), idx(m, R, P)}
    tc = a.three_centers
    q_of = {p: q for q, p in enumerate(pairs(m.n_links))}
    # the setup: for these, mechgraph's own derivation is not the person's
    for p in later:
        assert {frozenset(tuple(sorted(x)) for x in loc.through) for loc in tc.derivations[q_of[p]].loci} != {
            frozenset(idx(m, *x) for x in step[1:][k]) for step in recipe if idx(m, *step[0]) == p for k in (0, 1)}
    vals = own_order(a, recipe, {root: (3.0, 2.0)})
    off = off_pairs(a, vals)
    assert off == {root} | later
    r = check("demo", vals)
    assert r.first_faulty == label(m, root) and r.faulty_steps == (label(m, root),), r.faulty_steps
    assert set(r.item(label(m, root)).inherited_by) == {label(m, p) for p in later}
    for p in later:
        c = r.item(label(m, p))
        assert c.status == "off" and not c.faulty_step and c.inherits_from == (label(m, root),)
        assert "inherited" in c.note
    # rocker-pusher misses one of mechgraph's lines (through frame-pusher): it is judged by the person's own ones
    c = r.item(label(m, idx(m, R, P)))
    assert c.own_step_ok is False and "consistent with your own construction" in c.note
    assert "line crank-rocker/crank-pusher" in {ln.label for ln in c.lines}
    # a slip after the construction, on no line of the person's, is still a faulty step of its own
    vals[idx(m, R, D)] = moved(vals[idx(m, R, D)], (0.0, 4.0))
    r = check("demo", vals)
    assert r.faulty_steps == (label(m, root), label(m, idx(m, R, D)))


def test_relaxation_center_carried_on_by_the_person_is_inherited():
    case = "eightbar_double_butterfly_stage_lift.toml"
    a = analysis_of(case)
    m = a.mechanism
    q_of = {p: q for q, p in enumerate(pairs(m.n_links))}
    root, later = idx(m, "frame", "upper plate"), idx(m, "frame", "front tie")
    assert a.centers[q_of[root]].method == a.centers[q_of[later]].method == "relaxation"
    vals = {p: a.centers[q].point for q, p in enumerate(pairs(m.n_links)) if a.centers[q].method == "joint"}
    vals[root] = moved(a.centers[q_of[root]].point, (4.0, -3.0))  # off by 5 mm
    # the person then crosses two three-centers lines, one through their own (off) frame-upper plate
    vals[later] = pg.meet(
        pg.join(vals[idx(m, "frame", "rocking beam")], vals[idx(m, "rocking beam", "front tie")]),
        pg.join(vals[idx(m, "upper plate", "front tie")], vals[root]),
    )
    assert off_pairs(a, vals) == {root, later}
    r = check(case, vals)
    assert r.first_faulty == label(m, root) and r.faulty_steps == (label(m, root),)
    first, c = r.item(label(m, root)), r.item(label(m, later))
    assert first.inherited_by == (label(m, later),)
    assert not c.faulty_step and c.inherits_from == (label(m, root),)
    for x in (first, c):
        assert "relaxation method" in x.note and "analysis.center(...).derivation" in x.note
        assert "velocity analysis" not in x.note


def r_holds(case, vals) -> bool:
    return check(case, vals).holds


def test_far_centers_are_judged_by_direction():
    a = analysis_of("demo")
    m = a.mechanism
    p = idx(m, "rocker", "pad arm")
    c = a.centers[pairs(m.n_links).index(p)]
    x, y = c.cartesian(m.scale)
    ox, oy = m.centre
    r = math.hypot(x - ox, y - oy)
    assert 1.5 * m.scale < r < 3.0 * m.scale  # mechgraph's center, a little over two drawing sizes out
    toward = math.degrees(math.atan2(y - oy, x - ox))
    far = {"far": 1.5}  # with the far limit at 1.5 drawing sizes it counts as far
    # at infinity, in its direction from the drawing centre: agrees
    rep = check("demo", {p: (math.cos(math.radians(toward)), math.sin(math.radians(toward)), 0.0)}, **far)
    assert rep.item(label(m, p)).status == "agrees" and rep.item(label(m, p)).measure == "angle_deg"
    # twice as far out along the same direction: a different point, the same direction: agrees
    twice = (ox + 2.0 * (x - ox), oy + 2.0 * (y - oy), 1.0)
    assert check("demo", {p: twice}, **far).item(label(m, p)).status == "agrees"
    # without the lower far limit the same point is simply off by its distance
    off = check("demo", {p: twice}).item(label(m, p))
    assert off.status == "off" and off.measure == "distance" and off.off_by == pytest.approx(r)
    # 3 degrees off that direction: off by 3 degrees
    t = math.radians(toward + 3.0)
    turned = check("demo", {p: (math.cos(t), math.sin(t), 0.0)}, **far).item(label(m, p))
    assert turned.status == "off" and turned.off_by == pytest.approx(3.0)


def test_finite_and_infinite_do_not_mix_within_the_far_limit():
    case = "sixbar_slider_toggle_press.toml"
    a = analysis_of(case)
    m = a.mechanism
    slider, pin = idx(m, "frame", "ram"), idx(m, "frame", "crank")
    # the slider's center written as a finite point on the drawing, the crank pivot as a direction
    r = check(case, {slider: (100.0, 0.0, 1.0), pin: (1.0, 0.0, 0.0)})
    c = r.item(label(m, slider))
    assert c.status == "off" and c.off_by is None and "it lies at infinity" in c.note
    c = r.item(label(m, pin))
    assert c.status == "off" and c.off_by is None and "not at infinity" in c.note


def test_item_tolerances_and_rate_units():
    a = analysis_of("demo")
    m = a.mechanism
    p = idx(m, "frame", "coupler")
    x, y = a.centers[pairs(m.n_links).index(p)].cartesian(m.scale)
    w = float(a.velocity.twists[m.index["rocker"], 0])
    text = (
        '[hand]\nunit = "mm"\ntolerance = 0.5\n'
        # mechgraph's center moved 1 mm: off at the file's 0.5 mm, agrees with this item's own 2 mm
        f'[[center]]\npair = ["coupler", "frame"]\nat = [{x + 1.0!r}, {y!r}]\ntolerance = 2.0\n'
        # mechgraph's rate, written in rpm and 5 % high: agrees with this item's 10 %
        f'[[angular_velocity]]\nlink = "rocker"\nrpm = {w * 1.05 * 60.0 / (2.0 * math.pi)!r}\nrelative = 0.1\n'
    )
    r = check_hand(a, parse_hand_text(text, m))
    assert r.item(label(m, p)).status == "agrees" and r.item(label(m, p)).tolerance == 2.0
    rc = r.item("angular velocity of 'rocker'")
    assert rc.status == "agrees" and rc.relative_error == pytest.approx(0.05) and "rpm" in rc.note
    assert not check_hand(a, parse_hand_text(text.replace("relative = 0.1", "relative = 0.01"), m)).holds


@pytest.mark.parametrize("kind", ["exact", "precision"])
def test_exact_and_precision_analyses_give_the_same_verdict(kind):
    a = analysis_of("demo")
    m = a.mechanism
    omegas, points = true_rates(a)
    vals = replay(a, perturb={idx(m, "frame", "coupler"): (0.0, 3.0)})
    hand = parse_hand_text(hand_toml(m, vals, omegas, points), m)
    r, ref = check_hand(analyse(m, arithmetic=kind), hand), check_hand(a, hand)
    assert r.summary == ref.summary and r.first_faulty == "center frame-coupler"
    assert [c.status for c in r.centers] == [c.status for c in ref.centers]
    json.dumps(render_dict(r), allow_nan=False)


def test_without_velocity_analysis_rates_are_unchecked():
    a = analysis_of("demo")
    m = a.mechanism
    omegas, points = true_rates(a)
    bare = analyse(m, velocities=False)
    r = check_hand(bare, parse_hand_text(hand_toml(m, replay(a), omegas, points), m))
    assert all(c.status == "agrees" for c in r.centers)
    assert all(x.status == "unchecked" for x in r.rates)
    assert r.holds and "given but not checkable" in r.summary


# --------------------------------------------------------------------------- missing items


def test_missing_items_are_reported_as_missing():
    a = analysis_of("demo")
    m = a.mechanism
    vals = replay(a)
    given = [idx(m, "frame", "crank"), idx(m, "frame", "coupler"), idx(m, "rocker", "pad arm")]
    r = check("demo", {p: vals[p] for p in given})
    assert len(r.centers) == 15
    assert [c.status for c in r.centers].count("agrees") == 3
    assert [c.status for c in r.centers].count("missing") == 12
    assert all(x.status == "missing" for x in r.rates)
    assert {x.name for x in r.rates} == {"crank", "coupler", "rocker", "pusher", "pad arm", "pad centre"}
    assert r.holds and "18 item(s) of the case not given" in r.summary


def test_off_center_built_on_a_missing_one_cannot_be_traced_further():
    a = analysis_of("demo")
    m = a.mechanism
    vals = replay(a, after={idx(m, "frame", "coupler"): (3.0, 0.0)})
    del vals[idx(m, "crank", "coupler")]
    r = check("demo", vals)
    c = r.center("frame", "coupler")
    assert c.faulty_step and "which you did not give" in c.note
    # the other line can still be redrawn, through centers that agree, and it misses the point
    assert c.own_step_ok is False and "the error is made at this step" in c.note
    # with every input missing nothing can be redrawn at all
    alone = check("demo", {idx(m, "frame", "coupler"): vals[idx(m, "frame", "coupler")]}).center("frame", "coupler")
    assert alone.own_step_ok is None and alone.faulty_step
    assert "earliest wrong center that can be traced" in alone.note and "your own lines pass" not in alone.note
    ln = next(x for x in c.lines if x.label == "line frame-crank/crank-coupler")
    assert ln.passes is None and "no value for crank-coupler" in ln.note


def test_nothing_given():
    a = analysis_of("demo")
    r = check_hand(a, parse_hand_text('[hand]\nunit = "mm"\n', a.mechanism))
    assert not r.holds and r.summary.startswith("Nothing to check")
    assert all(c.status == "missing" for c in r.centers)


# --------------------------------------------------------------------------- rates


def test_rate_slip_is_its_own_faulty_step():
    a = analysis_of("demo")
    m = a.mechanism
    omegas, points = true_rates(a)
    rocker = m.index["rocker"]
    omegas[rocker] *= 1.10  # 10 % slip in the arithmetic, centers all right
    r = check("demo", replay(a), omegas, points)
    w = r.item("angular velocity of 'rocker'")
    assert w.status == "off" and w.faulty_step and w.relative_error == pytest.approx(0.10)
    assert w.predicted == pytest.approx(a.velocity.twists[rocker, 0], rel=1e-9)
    assert r.first_faulty == "angular velocity of 'rocker'"


def test_rate_sign_slip_is_pointed_out():
    a = analysis_of("demo")
    m = a.mechanism
    omegas, _ = true_rates(a)
    omegas[m.index["pusher"]] *= -1.0  # the sense reversed
    r = check("demo", replay(a), omegas)
    assert "opposite sense" in r.item("angular velocity of 'pusher'").note


def test_rate_from_an_off_center_inherits_its_error():
    a = analysis_of("demo")
    m = a.mechanism
    crank, coupler = m.index["crank"], m.index["coupler"]
    root = idx(m, "frame", "coupler")
    truth = replay(a)
    pin = truth[idx(m, "crank", "coupler")]
    A = (pin[0] / pin[2], pin[1] / pin[2])
    I13 = truth[root]
    u = (I13[0] / I13[2] - A[0], I13[1] / I13[2] - A[1])
    n = math.hypot(*u)
    # frame-coupler moved 12 mm along the crank line (away from pin A), and carried on
    vals = replay(a, perturb={root: (12.0 * u[0] / n, 12.0 * u[1] / n)})
    omegas, _ = true_rates(a)
    # the coupler's rate as the person gets it from their own centers: pin A moves alike as part of the
    # crank (about frame-crank) and of the coupler (about their frame-coupler): w3 (A - I13) = w2 (A - I12)
    I12, I13 = vals[idx(m, "frame", "crank")], vals[root]
    r12 = (A[0] - I12[0] / I12[2], A[1] - I12[1] / I12[2])
    r13 = (A[0] - I13[0] / I13[2], A[1] - I13[1] / I13[2])
    omegas[coupler] = omegas[crank] * (r12[0] * r13[0] + r12[1] * r13[1]) / (r13[0] ** 2 + r13[1] ** 2)
    assert abs(omegas[coupler] / a.velocity.twists[coupler, 0] - 1.0) > 0.03  # beyond the 2 % default
    r = check("demo", vals, {crank: omegas[crank], coupler: omegas[coupler]})
    w = r.item("angular velocity of 'coupler'")
    assert w.status == "off" and not w.faulty_step
    assert w.inherits_from == (label(m, root),)
    assert "angular velocity of 'coupler'" in r.item(label(m, root)).inherited_by
    assert r.first_faulty == label(m, root)
    # moved along the crank line, it still lies on that line, and misses only the other
    first = r.item(label(m, root))
    assert {ln.label: ln.passes for ln in first.lines} == {
        "line frame-crank/crank-coupler": True,
        "line coupler-rocker/frame-rocker": False,
    }


def test_point_velocity_as_vector_and_speed():
    a = analysis_of("demo")
    omegas, points = true_rates(a)
    (name, v), = points.items()
    assert check("demo", replay(a), omegas, {name: v}).item(f"velocity of point '{name}'").status == "agrees"
    assert check("demo", replay(a), omegas, {name: math.hypot(*v)}).item(f"velocity of point '{name}'").status == "agrees"
    slipped = (v[0] * 1.1, v[1] * 1.1)  # 10 % too fast, the person's rate and center all right
    r = check("demo", replay(a), omegas, {name: slipped})
    pv = r.item(f"velocity of point '{name}'")
    assert pv.status == "off" and pv.faulty_step and pv.compared_as == "vector"
    assert pv.predicted == pytest.approx(v, rel=1e-9)
    assert pv.relative_error == pytest.approx(0.1)


def test_point_velocity_inherits_an_angular_velocity_slip():
    a = analysis_of("demo")
    m = a.mechanism
    omegas, points = true_rates(a)
    arm = m.index["pad arm"]
    omegas[arm] *= 1.2  # the pad arm's rate slipped by 20 %, and the point's velocity made from it
    (name, v), = points.items()
    r = check("demo", replay(a), omegas, {name: (v[0] * 1.2, v[1] * 1.2)})
    pv = r.item(f"velocity of point '{name}'")
    assert pv.status == "off" and not pv.faulty_step
    assert pv.inherits_from == ("angular velocity of 'pad arm'",)
    assert r.item("angular velocity of 'pad arm'").inherited_by == (f"velocity of point '{name}'",)


def test_translating_link_rate_is_judged_against_the_floor():
    case = "sixbar_slider_toggle_press.toml"
    a = analysis_of(case)
    m = a.mechanism
    omegas, _ = true_rates(a)
    ram = m.index["ram"]
    assert abs(omegas[ram]) < 1e-12  # the ram translates
    r = check(case, replay(a), {ram: 0.0})
    assert r.item("angular velocity of 'ram'").status == "agrees"


# --------------------------------------------------------------------------- renderings


def test_text_and_dict_renderings():
    a = analysis_of("demo")
    m = a.mechanism
    omegas, points = true_rates(a)
    r = check("demo", replay(a, perturb={idx(m, "frame", "coupler"): (3.0, 0.0)}), omegas, points)
    text = render_text(r)
    assert CAUTION in text and r.summary in text
    assert "center frame-coupler [FIRST FAULTY STEP]" in text
    assert "should lie on line frame-crank/crank-coupler" in text
    assert all(c.pair[0] + "-" + c.pair[1] in text for c in r.centers)
    d = render_dict(r)
    json.dumps(d, allow_nan=False)
    assert d["caution"] == CAUTION and d["schema"] == "mechgraph.handcheck/1"
    assert len(d["centers"]) == 15 and d["first_faulty"] == "center frame-coupler"
    c = next(x for x in d["centers"] if x["pair"] == ["frame", "coupler"])
    assert c["status"] == "off" and len(c["lines"]) == 2 and c["faulty_step"]


def test_analysis_of_another_case_is_refused():
    a = analysis_of("demo")
    other = analysis_of("cam_reject_gate.toml")
    hand = parse_hand_text('[hand]\nunit = "mm"\n', a.mechanism)
    with pytest.raises(HandCheckError, match="read against case 'label applicator'.*analysis is of case 'fruit reject gate'"):
        check_hand(other, hand)


def test_read_hand_file_and_find_it_next_to_the_case(tmp_path):
    a = analysis_of("demo")
    m = a.mechanism
    case = tmp_path / "demo.toml"
    case.write_text("")
    assert find_hand_file(case) is None
    (tmp_path / "demo.hand.csv").write_text(hand_csv(m, replay(a)))
    assert find_hand_file(case) == tmp_path / "demo.hand.csv"
    (tmp_path / "demo.hand.toml").write_text(hand_toml(m, replay(a)))
    found = find_hand_file(case)
    assert found == tmp_path / "demo.hand.toml"
    assert check_hand(a, read_hand_file(found, m)).holds
    assert check_hand(a, read_hand_file(tmp_path / "demo.hand.csv", m)).holds


def test_documented_examples_read_against_the_readme_case():
    import re
    import textwrap

    import mechgraph.handcheck as hc
    from mechgraph.casefile import parse_case

    readme = (Path(__file__).resolve().parent.parent / "README.md").read_text(encoding="utf-8")
    mech = parse_case(re.search(r"```toml\n(.*?)```", readme, re.S).group(1), "README.md")
    blocks = re.findall(r"::\n\n((?:    .*\n|\n)+)", hc.__doc__)
    toml_text, csv_text = (textwrap.dedent(b) for b in blocks[:2])
    t = parse_hand_text(toml_text, mech, "example.toml")
    c = parse_hand_text(csv_text, mech, "example.csv", "csv")
    for h in (t, c):
        assert [x.links for x in h.centers] == [("frame", "crank"), ("frame", "ram"), ("frame", "coupler")]
        assert [x.link for x in h.angular_velocities] == ["rocker"]
        assert [x.point for x in h.point_velocities] == ["punch tip"]
        assert h.tolerance == 0.5 and h.unit == "mm"
    a = analyse(mech)
    for h in (t, c):  # the example's values are a careful hand construction: they hold
        r = check_hand(a, h)
        assert r.holds, r.summary
        assert r.count("agrees") == 5 and r.count("missing") == 16


# --------------------------------------------------------------------------- bad input

GOOD = '[hand]\nunit = "mm"\n'


def toml_error(text):
    m = analysis_of("demo").mechanism
    return parse_hand_text(text, m, "hand.toml")


def csv_error(text):
    m = analysis_of("demo").mechanism
    return parse_hand_text("kind,name,other,x,y,angle_deg,value,unit,tolerance,relative\n" + text, m, "hand.csv", "csv")


@pytest.mark.parametrize(
    "text, message",
    [
        (GOOD + '[[center]]\npair = ["frame", "couplr"]\nat = [0, 0]\n',
         r"hand.toml: center\[1\] frame-couplr: the pair names link 'couplr', which is not in case 'label applicator'; links are: frame, crank"),
        (GOOD + '[[center]]\npair = ["crank", "crank"]\nat = [0, 0]\n', r"names link 'crank' twice"),
        (GOOD + '[[center]]\npair = ["frame"]\nat = [0, 0]\n', r"center\[1\]: field 'pair' must name two links"),
        (GOOD + '[[angular_velocity]]\nlink = "rockr"\nrad_per_s = 1.0\n',
         r"angular_velocity\[1\] 'rockr': the angular velocity names link 'rockr', which is not in case"),
        (GOOD + '[[point_velocity]]\npoint = "tip"\nspeed = 1.0\n',
         r"point_velocity\[1\] 'tip': point 'tip' is not a point of case 'label applicator'; its points are: 'pad centre'"),
        ('[hand]\nunit = "in"\n', r"\[hand\] field 'unit': unit 'in' does not match the case's unit 'mm'"),
        ('[hand]\nunit = "furlong"\n', r"unit 'furlong' is not a length unit"),
        (GOOD + '[[center]]\npair = ["frame", "crank"]\nat = [0, 0]\nunit = "cm"\n',
         r"center\[1\] frame-crank field 'unit': unit 'cm' mixes units: the file's unit is 'mm'"),
        (GOOD + '[[point_velocity]]\npoint = "pad centre"\nspeed = 3.0\nunit = "m/s"\n', r"unit 'm' mixes units"),
        (GOOD + '[[center]]\npair = ["frame", "crank"]\nat = ["12,5", 0]\n',
         r"center\[1\] frame-crank: field 'at' must be a number \(e.g. 12.5, no quotes, no unit\), got '12,5'"),
        (GOOD + '[[center]]\npair = ["frame", "crank"]\nat = [nan, 0]\n', r"field 'at' must be a finite number"),
        (GOOD + '[[angular_velocity]]\nlink = "crank"\nrpm = "fast"\n', r"field 'rpm' must be a number"),
        ('[hand]\nunit = "mm"\ntolerance = "half a mm"\n', r"\[hand\]: field 'tolerance' must be a number"),
        ('[hand]\nunit = "mm"\ntolerance = -1\n', r"setting 'tolerance' is -1; it must be a positive number"),
        (GOOD + '[[center]]\npair = ["frame", "crank"]\nat = [0, 0]\n[[center]]\npair = ["crank", "frame"]\nat = [0, 0]\n',
         r"center\[2\] crank-frame: center frame-crank is already given in center\[1\] frame-crank; give each center once"),
        (GOOD + '[[angular_velocity]]\nlink = "crank"\nrpm = 120\n[[angular_velocity]]\nlink = "crank"\nrad_per_s = 12.5\n',
         r"angular velocity of link 'crank' is already given in angular_velocity\[1\] 'crank'"),
        (GOOD + '[[point_velocity]]\npoint = "pad centre"\nspeed = 3.0\n[[point_velocity]]\npoint = "pad centre"\nspeed = 3.0\n',
         r"velocity of point 'pad centre' is already given in point_velocity\[1\]"),
        (GOOD + '[[center]]\npair = ["frame", "crank"]\nat = [0, 0]\nat_infinity_deg = 90\n', r"give exactly one of a finite center"),
        (GOOD + '[[center]]\npair = ["frame", "crank"]\n', r"give exactly one of a finite center"),
        (GOOD + '[[center]]\npair = ["frame", "crank"]\nat = [0, 0, 0]\n', r"field 'at' must be a point \[x, y\]"),
        (GOOD + '[[center]]\npair = ["frame", "crank"]\nwhere = [0, 0]\n', r"unknown field\(s\) 'where'; valid fields are"),
        (GOOD + '[[angular_velocity]]\nlink = "crank"\nrpm = 1\nrad_per_s = 2\n', r"give exactly one of rad_per_s, rpm or deg_per_s"),
        (GOOD + '[[angular_velocity]]\nlink = "crank"\nrpm = 1\ntolerance = 1\nrelative = 0.1\n', r"give at most one of 'tolerance'"),
        (GOOD + '[[point_velocity]]\npoint = "pad centre"\nspeed = -3.0\n', r"a speed is a magnitude and cannot be negative"),
        ('[hand]\ntolerance = 0.5\n', r"\[hand\]: field 'unit' is missing"),
        ('[[center]]\npair = ["frame", "crank"]\nat = [0, 0]\n', r"the \[hand\] table is missing"),
        ('[hand]\nunit = "mm"\n[extra]\n', r"top level: unknown field\(s\) 'extra'"),
        ('[hand]\nunit = "mm"\ntolerance = = 1\n', r"hand.toml, line 3: not valid TOML"),
    ],
)
def test_bad_toml(text, message):
    with pytest.raises(HandCheckError, match=message):
        toml_error(text)


@pytest.mark.parametrize(
    "text, message",
    [
        ("setting,unit,,,,,,mm,,\ncenter,frame,couplr,0,0,,,,,\n",
         r"hand.csv, line 3: the pair names link 'couplr', which is not in case 'label applicator'; links are"),
        ("setting,unit,,,,,,mm,,\nangular_velocity,rockr,,,,,1.0,,,\n", r"line 3: the angular velocity names link 'rockr'"),
        ("setting,unit,,,,,,mm,,\npoint_velocity,tip,,,,,1.0,,,\n", r"line 3: point 'tip' is not a point of case"),
        ("setting,unit,,,,,,mm,,\ncenter,frame,crank,abc,0,,,,,\n",
         r"line 3: column 'x': 'abc' is not a number; write e.g. 12.5"),
        ("setting,unit,,,,,,mm,,\ncenter,frame,crank,inf,0,,,,,\n", r"line 3: column 'x': 'inf' is not a finite number"),
        ("center,frame,crank,0,0,,,mm,,\ncenter,frame,coupler,1,1,,,cm,,\n",
         r"line 3: unit 'cm' mixes units: the file's unit is 'mm'"),
        ("setting,unit,,,,,,in,,\n", r"line 2: unit 'in' does not match the case's unit 'mm'"),
        ("center,frame,crank,0,0,,,,,\n", r"hand.csv: the hand file does not say its length unit"),
        ("setting,unit,,,,,,mm,,\ncenter,frame,crank,0,0,,,,,\ncenter,crank,frame,0,0,,,,,\n",
         r"line 4: center frame-crank is already given in line 3; give each center once"),
        ("setting,unit,,,,,,mm,,\nsetting,tolerance,,,,,0.5,,,\nsetting,tolerance,,,,,0.7,,,\n",
         r"line 4: setting 'tolerance' is given twice \(first in line 3\)"),
        ("setting,unit,,,,,,mm,,\nangular_velocity,crank,,,,,1,,,\nangular_velocity,crank,,,,,1,rpm,,\n",
         r"line 4: the angular velocity of link 'crank' is already given in line 3"),
        ("setting,unit,,,,,,mm,,\nangular_velocity,crank,,,,,1,rev/s,,\n", r"line 3: angular velocity unit 'rev/s' is not known"),
        ("setting,unit,,,,,,mm,,\nwheel,crank,,,,,1,,,\n", r"line 3: kind 'wheel' is not known"),
        ("setting,unit,,,,,,mm,,\ncenter,frame,crank,12,5,0,,,,,,\n", r"line 3: 12 cells but the header has 10 columns"),
        ("setting,unit,,,,,,mm,,\ncenter,frame,,0,0,,,,,\n", r"line 3: a center row names its two links"),
        ("setting,unit,,,,,,mm,,\ncenter,frame,crank,0,,,,,,\n", r"line 3: a finite center needs both x and y"),
        ("setting,unit,,,,,,mm,,\ncenter,frame,crank,0,0,,5,,,\n", r"line 3: a center row does not use column\(s\) 'value'"),
        ("setting,unit,,,,,,mm,,\nsetting,colour,,,,,1,,,\n", r"line 3: setting 'colour' is not known"),
    ],
)
def test_bad_csv(text, message):
    with pytest.raises(HandCheckError, match=message):
        csv_error(text)


def test_bad_csv_header():
    m = analysis_of("demo").mechanism
    with pytest.raises(HandCheckError, match=r"hand.csv, line 1: unknown column\(s\) 'pairs' in the header"):
        parse_hand_text("kind,name,pairs\n", m, "hand.csv", "csv")
    with pytest.raises(HandCheckError, match=r"line 2: the header has no 'kind' column"):
        parse_hand_text("# my hand values\nname,x,y\n", m, "hand.csv", "csv")
    with pytest.raises(HandCheckError, match=r"hand.csv: the file is empty"):
        parse_hand_text("", m, "hand.csv", "csv")


def test_bad_files(tmp_path):
    m = analysis_of("demo").mechanism
    with pytest.raises(HandCheckError, match=r"no such file"):
        read_hand_file(tmp_path / "absent.hand.toml", m)
    (tmp_path / "hand.txt").write_text(GOOD)
    with pytest.raises(HandCheckError, match=r"hand.txt: a hand file must end in .toml or .csv"):
        read_hand_file(tmp_path / "hand.txt", m)


def test_hand_errors_are_case_file_errors():
    assert issubclass(HandCheckError, CaseFileError) and issubclass(HandCheckError, MechgraphError)
