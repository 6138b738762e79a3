"""Property tests of the whole pipeline on random mechanisms of several topologies.

Random joint coordinates always describe a valid position for an
instantaneous velocity analysis (each link is the rigid body holding its
joint points), so the generators of :mod:`mechgraph.generate` give test
mechanisms of any shape; draws at a dead point are rejected.

Centers are compared as homogeneous points with
:func:`mechgraph.projective.point_separation` at the drawing scale (about
distance / drawing size for finite centers, the sine of the angle between the
directions for centers at infinity).
"""

from __future__ import annotations

import math
import os
from dataclasses import replace
from itertools import combinations

import numpy as np
import pytest
from hypothesis import HealthCheck, given, reject, settings
from hypothesis import strategies as st

from mechgraph import projective as pg
from mechgraph.analysis import analyse, locate_centers
from mechgraph.errors import SingularPositionError
from mechgraph.generate import (
    TOPOLOGIES,
    _triangle_sine,
    four_bar,
    ladder,
    random_mechanism,
    slider_crank,
    stephenson_six_bar,
    watt_six_bar,
)
from mechgraph.joints import Prismatic, Revolute
from mechgraph.model import Driver, Link, Mechanism

#: Agreement of two float computations of one well-conditioned center
#: (scale-free separation); float results agree to ~1e-12.
SEP_TOL = 1e-8
#: Collinearity residual of a link triple (determinant of unit triples).
COLLINEAR_TOL = 1e-8
#: Relative agreement of angular velocities.
OMEGA_TOL = 1e-9

#: Examples per property; ``MECHGRAPH_EXAMPLES_FACTOR=20`` runs a thorough pass.
_FACTOR = max(1, int(os.environ.get("MECHGRAPH_EXAMPLES_FACTOR", "1")))
PROPERTY = settings(max_examples=50 * _FACTOR, deadline=None, suppress_health_check=[HealthCheck.too_slow])
FEW = settings(max_examples=30 * _FACTOR, deadline=None, suppress_health_check=[HealthCheck.too_slow])

kinds = st.sampled_from(sorted(TOPOLOGIES))
seeds = st.integers(min_value=0, max_value=2**32 - 1)


# --------------------------------------------------------------------- helpers
def _mechanism(kind: str, seed: int) -> Mechanism:
    return random_mechanism(kind, np.random.default_rng(seed))


def _analyse(m: Mechanism):
    """Analyse, rejecting the (rare) draw at a dead point."""
    try:
        return analyse(m)
    except SingularPositionError:
        reject()


def _centers_by_name(a) -> dict[frozenset, tuple]:
    names = a.mechanism.link_names
    return {frozenset((names[c.i], names[c.j])): c.point for c in a.centers}


def _omegas_by_name(a) -> dict[str, float]:
    return {n: float(w) for n, w in zip(a.velocity.link_names, a.velocity.twists[:, 0])}


def _relative_motion(a, c) -> float:
    """Size of the relative twist of a center's two links, as a fraction of the largest link twist.

    Near 0 the two links nearly move as one (relative rest) and their
    velocity pole is ill-conditioned: a rounding error of the twists moves it
    by about (rounding error) / (this fraction).
    """
    v, L = a.velocity, a.mechanism.scale
    cx, cy = a.mechanism.centre

    def size(t):
        w, vx, vy = t
        return math.sqrt((w * L) ** 2 + (vx - w * cy) ** 2 + (vy + w * cx) ** 2)

    ref = max(size(t) for t in v.twists)
    return size(v.relative_twist(c.i, c.j)) / ref


def _assert_methods_agree(a):
    """Both methods agree on every center: to 1e-8 where well conditioned, within the cross-check tolerance always."""
    L = a.mechanism.scale
    assert a.passed
    for c in a.centers:
        assert c.method in ("joint", "three-centers", "coincident"), (c.pair, c.method)
        if c.relative_rest:
            # e.g. a crank square to the guide: rod and slider translate
            # alike, their pole is undefined, the theorem still gives the pin
            assert c.check is None and c.point is not None
            continue
        assert c.check is not None and c.check.passed, c
        # the same measure, computed here and not by the cross-check
        sep = pg.point_separation(c.point, c.velocity_point, scale=L, origin=a.mechanism.centre)
        assert math.isclose(sep, c.check.separation, rel_tol=1e-6, abs_tol=1e-15)
        if _relative_motion(a, c) >= 1e-4:
            assert sep <= SEP_TOL, (c.pair, c.check)


def _sized_unit(p, scale):
    v = np.array([p[0] / scale, p[1] / scale, p[2]], dtype=float)
    return v / np.linalg.norm(v)


def _collinearity(p, q, r, scale) -> float:
    """|det| of the three points as unit triples at the drawing scale (0 when collinear)."""
    return abs(float(np.linalg.det(np.stack([_sized_unit(t, scale) for t in (p, q, r)]))))


def _similar(m: Mechanism, angle: float, shift, s: float = 1.0) -> Mechanism:
    """The same mechanism drawn after x -> s R(angle) x + shift (directions only rotate)."""
    c, sn = math.cos(angle), math.sin(angle)

    def pt(p):
        x, y = p
        return (s * (c * x - sn * y) + shift[0], s * (sn * x + c * y) + shift[1])

    def vec(v):
        return (c * v[0] - sn * v[1], sn * v[0] + c * v[1])

    joints = []
    for j in m.joints:
        if isinstance(j, Prismatic):
            joints.append(replace(j, at=pt(j.at), axis=vec(j.axis)))
        elif isinstance(j, Revolute):
            joints.append(replace(j, at=pt(j.at)))
        else:  # pragma: no cover - the generators make only these kinds
            raise TypeError(j.kind)
    return replace(m, joints=tuple(joints))


def _similarity_matrix(angle: float, shift, s: float = 1.0) -> np.ndarray:
    c, sn = math.cos(angle), math.sin(angle)
    return np.array([[s * c, -s * sn, shift[0]], [s * sn, s * c, shift[1]], [0.0, 0.0, 1.0]])


def _assert_same_centers(expected: dict, got: dict, scale: float, tol: float = SEP_TOL):
    assert expected.keys() == got.keys()
    for key, p in expected.items():
        q = got[key]
        sep = pg.point_separation(p, q, scale=scale)
        assert sep <= tol, f"center {sorted(key)}: {p} vs {q}, separation {sep:.3g}"


def _assert_same_omegas(expected: dict, got: dict):
    assert expected.keys() == got.keys()
    ref = max(abs(w) for w in expected.values())
    for name, w in expected.items():
        assert abs(got[name] - w) <= OMEGA_TOL * ref, f"omega of {name}: {w} vs {got[name]}"


# ------------------------------------------------------------ the two methods
@PROPERTY
@given(kind=kinds, seed=seeds)
def test_both_methods_agree(kind, seed):
    m = _mechanism(kind, seed)
    a = _analyse(m)
    _assert_methods_agree(a)
    # every center of these topologies is reached by the theorem
    assert all(c.method in ("joint", "three-centers") for c in a.centers)


@FEW
@given(
    o2=st.tuples(st.floats(-100, 100), st.floats(-100, 100)),
    a=st.tuples(st.floats(-100, 100), st.floats(-100, 100)),
    b=st.tuples(st.floats(-100, 100), st.floats(-100, 100)),
    o4=st.tuples(st.floats(-100, 100), st.floats(-100, 100)),
    slider=st.booleans(),
    axis_deg=st.floats(0.0, 180.0),
)
def test_both_methods_agree_on_drawn_coordinates(o2, a, b, o4, slider, axis_deg):
    # coordinates drawn by hypothesis itself, away from degenerate triangles
    pins = (o2, a, b) if slider else (o2, a, b, o4)
    for p, q, r in combinations(pins, 3):
        if _triangle_sine(p, q, r) < 0.05:
            reject()
    if slider:
        u = (math.cos(math.radians(axis_deg)), math.sin(math.radians(axis_deg)))
        ab = np.subtract(b, a)
        if abs(ab @ u) < 0.05 * np.hypot(*ab):
            reject()
        m = slider_crank(o2, a, b, axis=u, rate=3.0)
    else:
        m = four_bar(o2, a, b, o4, rate=3.0)
    res = _analyse(m)
    # Two links that nearly move as one (relative twist between rest_tol and
    # 1e-6 of the largest) have an ill-conditioned velocity pole that may miss
    # the cross-check tolerance: such a draw is near-degenerate (e.g. a crank
    # square to a guide tilted by 1e-9 rad), so it is set aside.
    if any(not c.relative_rest and _relative_motion(res, c) < 1e-6 for c in res.centers):
        reject()
    _assert_methods_agree(res)


# ------------------------------------------------------------------ the theorem
@PROPERTY
@given(kind=kinds, seed=seeds)
def test_every_triple_of_centers_is_collinear(kind, seed):
    # Aronhold-Kennedy: the three relative centers of any three links lie on
    # one line, centers at infinity included (common practice, no source)
    m = _mechanism(kind, seed)
    a = _analyse(m)
    L, n = m.scale, m.n_links
    tc = a.three_centers
    for i, j, k in combinations(range(n), 3):
        geo = (tc.point(i, j), tc.point(i, k), tc.point(j, k))
        assert _collinearity(*geo, L) <= COLLINEAR_TOL, (i, j, k)
        vel = (a.velocity.pole(i, j), a.velocity.pole(i, k), a.velocity.pole(j, k))
        assert _collinearity(*vel, L) <= COLLINEAR_TOL, (i, j, k)
    assert a.crosscheck.n_triples == n * (n - 1) * (n - 2) // 6
    assert a.crosscheck.max_collinearity <= COLLINEAR_TOL


@PROPERTY
@given(kind=kinds, seed=seeds)
def test_number_of_centers_and_primary_centers(kind, seed):
    m = _mechanism(kind, seed)
    a = _analyse(m)
    n, L = m.n_links, m.scale
    # n(n-1)/2 relative centers, one per pair (common practice, no source)
    assert len(a.centers) == n * (n - 1) // 2 == m.n_pairs
    assert len({frozenset((c.i, c.j)) for c in a.centers}) == len(a.centers)
    assert locate_centers(m).unresolved == []
    for j in m.joints:
        c = a.center(*j.links)
        if isinstance(j, Revolute):
            # a pin is the center of the two links it joins (common practice, no source)
            expected = pg.point(*j.at)
            assert c.method == "joint"
        else:
            # a slider's center is at infinity, perpendicular to the guide
            # (common practice, no source)
            assert isinstance(j, Prismatic)
            ux, uy = j.axis
            expected = pg.direction(-uy, ux)
            assert c.cartesian(L) is None
        assert pg.point_separation(c.point, expected, scale=L) <= 1e-12
        assert pg.point_separation(c.velocity_point, expected, scale=L) <= SEP_TOL


@FEW
@given(
    o2=st.tuples(st.integers(-100, 100), st.integers(-100, 100)),
    crank=st.tuples(st.integers(-100, 100), st.integers(-100, 100)),
    base=st.tuples(st.integers(-100, 100), st.integers(-100, 100)),
)
def test_parallelogram_has_centers_at_infinity(o2, crank, base):
    # integer coordinates: the opposite sides are exactly parallel
    o2 = np.array(o2, dtype=float)
    crank, base = np.array(crank, dtype=float), np.array(base, dtype=float)
    a, o4 = o2 + crank, o2 + base
    b = a + base
    if _triangle_sine(o2, a, o4) < 0.1 or min(np.hypot(*crank), np.hypot(*base)) < 10:
        reject()
    m = four_bar(o2, a, b, o4, rate=2.0)
    res = _analyse(m)
    L = m.scale
    # the coupler translates: its center relative to the frame is at infinity
    # along the cranks; the two cranks turn alike: their relative center is at
    # infinity along the frame (common practice, no source)
    for pair, along in ((("frame", "L2"), crank), (("L1", "L3"), base)):
        c = res.center(*pair)
        assert c.cartesian(L) is None, c
        assert pg.point_separation(c.point, pg.direction(*along), scale=L) <= 1e-12
        assert c.check is not None and c.check.separation <= SEP_TOL
    assert res.passed
    assert abs(res.velocity.angular_velocity(m.index["L2"])) <= 1e-12 * 2.0


# ------------------------------------------------------------------ invariances
@PROPERTY
@given(
    kind=kinds,
    seed=seeds,
    angle=st.floats(-math.pi, math.pi),
    # up to a hundred thousand drawing sizes away (the constructions are made
    # about the drawing centre; see the far-from-origin checks at the end)
    shift=st.tuples(st.floats(-1e7, 1e7), st.floats(-1e7, 1e7)),
)
def test_rigid_motion_moves_centers_and_keeps_angular_velocities(kind, seed, angle, shift):
    m = _mechanism(kind, seed)
    a = _analyse(m)
    moved = _similar(m, angle, shift)
    b = _analyse(moved)
    H = _similarity_matrix(angle, shift)
    # finite centers move with the drawing; directions at infinity rotate
    # (w = 0 is kept by H, whose last row is (0, 0, 1))
    expected = {k: tuple(H @ np.asarray(p)) for k, p in _centers_by_name(a).items()}
    _assert_same_centers(expected, _centers_by_name(b), moved.scale)
    _assert_same_omegas(_omegas_by_name(a), _omegas_by_name(b))
    assert b.passed


@PROPERTY
@given(kind=kinds, seed=seeds, s=st.floats(1e-3, 1e3))
def test_uniform_scaling_scales_centers_and_keeps_angular_velocities(kind, seed, s):
    m = _mechanism(kind, seed)
    a = _analyse(m)
    scaled = _similar(m, 0.0, (0.0, 0.0), s)
    b = _analyse(scaled)
    assert math.isclose(scaled.scale, s * m.scale, rel_tol=1e-12)
    expected = {k: (s * p[0], s * p[1], p[2]) for k, p in _centers_by_name(a).items()}
    _assert_same_centers(expected, _centers_by_name(b), scaled.scale)
    for key, p in _centers_by_name(a).items():
        ca = pg.to_cartesian(p, scale=m.scale, tol=1e-6)
        cb = pg.to_cartesian(_centers_by_name(b)[key], scale=scaled.scale, tol=1e-6)
        if ca is not None and cb is not None and math.hypot(*ca) < 1e3 * m.scale:
            assert math.dist((s * ca[0], s * ca[1]), cb) <= 1e-7 * scaled.scale
    _assert_same_omegas(_omegas_by_name(a), _omegas_by_name(b))


name_chars = "abcdefghijklmnopqrstuvwxyzABCDEFGHIJKLMNOPQRSTUVWXYZ0123456789_"


@PROPERTY
@given(kind=kinds, seed=seeds, data=st.data())
def test_renaming_and_reordering_change_nothing(kind, seed, data):
    m = _mechanism(kind, seed)
    a = _analyse(m)
    n = m.n_links
    new_names = data.draw(
        st.lists(
            st.text(name_chars, min_size=1, max_size=8),
            min_size=n,
            max_size=n,
            unique=True,
        ),
        label="names",
    )
    rename = dict(zip(m.link_names, new_names))
    link_order = data.draw(st.permutations(range(n)), label="link order")
    joint_order = data.draw(st.permutations(range(len(m.joints))), label="joint order")
    flips = data.draw(st.lists(st.booleans(), min_size=len(m.joints), max_size=len(m.joints)), label="flips")

    links = tuple(Link(rename[m.links[i].name], ground=m.links[i].ground) for i in link_order)
    joints, flipped = [], set()
    for k in joint_order:
        j = m.joints[k]
        x, y = (rename[v] for v in j.links)
        if flips[k]:
            # the same joint with its links swapped; a driver across it then
            # reads the opposite sign
            x, y = y, x
            flipped.add(j.name)
        joints.append(replace(j, links=(x, y)))
    drivers = tuple(Driver(d.joint, -d.rate if d.joint in flipped else d.rate) for d in m.drivers)
    r = Mechanism(links=links, joints=tuple(joints), drivers=drivers, name=m.name, unit=m.unit)
    b = _analyse(r)

    back = {v: k for k, v in rename.items()}
    got = {frozenset(back[x] for x in key): p for key, p in _centers_by_name(b).items()}
    _assert_same_centers(_centers_by_name(a), got, m.scale)
    _assert_same_omegas(_omegas_by_name(a), {back[k]: w for k, w in _omegas_by_name(b).items()})
    for c in b.centers:
        ca = a.center(back[r.link_names[c.i]], back[r.link_names[c.j]])
        assert c.method == ca.method
    assert b.passed


# ------------------------------------------------------------------ generators
@pytest.mark.parametrize("n_links", [10, 20, 50, 100])
@pytest.mark.parametrize("attach", ["rocker", "coupler", "mixed"])
def test_ladder_is_solved_completely_by_the_theorem(n_links, attach):
    m = ladder(n_links, np.random.default_rng(1000 + n_links), attach=attach)
    assert m.n_links == n_links
    # mobility 1: 3 (n - 1) - 2 j with j = 3 n / 2 - 2 pins
    assert len(m.joints) == 3 * n_links // 2 - 2
    assert [d.joint for d in m.drivers] == ["O2"]
    assert locate_centers(m).unresolved == []


@FEW
@given(n_links=st.sampled_from([4, 6, 8, 10, 12]), seed=seeds, attach=st.sampled_from(["rocker", "coupler", "mixed"]))
def test_ladder_has_one_freedom_and_passes(n_links, seed, attach):
    m = ladder(n_links, np.random.default_rng(seed), attach=attach)
    a = _analyse(m)
    assert a.velocity.mobility == a.velocity.gruebler == 1
    assert a.passed
    assert not a.unresolved_by_theorem


def test_fixed_topologies_have_the_documented_chains():
    pts = [(0, 0), (10, 30), (60, 50), (50, 0), (90, 40), (130, 60), (120, 0)]
    for make, ternary in ((watt_six_bar, {"frame", "L3"}), (stephenson_six_bar, {"frame", "L2"})):
        m = make(*pts)
        degree = {n: sum(n in j.links for j in m.joints) for n in m.link_names}
        assert {n for n, d in degree.items() if d == 3} == ternary
        adjacent = any(set(j.links) == ternary for j in m.joints)
        assert adjacent == (make is watt_six_bar)  # Watt: ternaries joined; Stephenson: not
        assert analyse(m).passed


@pytest.mark.parametrize("bad", [3, 5, 7, 2])
def test_ladder_rejects_odd_or_small_sizes(bad):
    with pytest.raises(ValueError):
        ladder(bad, np.random.default_rng(0))


def test_generators_are_reproducible():
    for kind in TOPOLOGIES:
        assert _mechanism(kind, 42) == _mechanism(kind, 42)


# ------------------------------------------- far from the origin (a fixed defect)
def _far_four_bar(offset: float, k: float) -> Mechanism:
    """The four-bar (0,0), (30,40), (120,60), (100,0), shrunk by k and moved by (offset, offset)."""
    pins = [(0.0, 0.0), (30.0, 40.0), (120.0, 60.0), (100.0, 0.0)]
    return four_bar(*[(offset + k * x, offset + k * y) for x, y in pins])


def _true_errors(offset: float, k: float):
    """Distance of each located center from the true one, in drawing sizes, and the analysis."""
    ref, far = analyse(_far_four_bar(0.0, k)), analyse(_far_four_bar(offset, k))
    errors = {}
    for cr, cf in zip(ref.centers, far.centers):
        x, y = pg.to_cartesian(cr.point)
        errors[cf.pair] = math.dist((x + offset, y + offset), pg.to_cartesian(cf.point)) / far.mechanism.scale
    return errors, far


def test_far_from_origin_centers_stay_right_or_the_crosscheck_says_so():
    # A 1.34-unit four-bar drawn at (1e7, 1e7), well inside MAX_COORDINATE.  Before
    # the constructions were made about the drawing centre, L1-L3 came out ~8 % of
    # the drawing off while the cross-check passed.
    errors, far = _true_errors(1e7, 0.01)
    wrong = {p: e for p, e in errors.items() if e > far.crosscheck.tol}
    assert not wrong, (wrong, far.crosscheck)
    assert far.passed


def test_far_from_origin_distinct_centers_are_not_taken_as_coincident():
    # The same four-bar at (1e8, 1e8): frame-L2 was once reported as coinciding with
    # frame-L1 and L1-L2 (pins 0.5 units apart), 3 units from the true center.
    errors, far = _true_errors(1e8, 0.01)
    assert far.center("frame", "L2").method == "three-centers", far.center("frame", "L2").derivation
    assert max(errors.values()) <= 1e-6
