"""Centers the three-centers theorem cannot reach, found geometrically by relaxation.

mechgraph.indeterminate follows the two-freedom relaxation (Foster & Pennock,
ASME IDETC 2004, abstract as recorded in /work/shared/references.md): remove a
binary link, lock one joint at a time, locate the wanted center in each locked
motion with the three-centers theorem alone, join the two positions, and meet
two such lines.  The checks here:

* both indeterminate eight-bar cases and randomly drawn double-butterfly and
  single-flier geometries are completed, and every center agrees with the
  velocity analysis' pole (an independent, linear-algebra method);
* with the published form only (two relaxation lines per center), too;
* the result does not depend on which link is ground;
* determinate chains need no relaxation;
* every relaxation line passes through the true center of every pair it
  speaks of, and each locked-motion position is what ``locate_centers`` gives
  on the welded linkage;
* centers at infinity, other link poses, higher pairs and sliders, and the
  failures (each a MechgraphError naming the link or joint at fault).

Centers are compared with :func:`mechgraph.projective.point_separation` at the
drawing scale about the drawing centre (about distance / drawing size for
finite centers, the sine of the angle between directions at infinity).
"""

from __future__ import annotations

import math
import re
from dataclasses import replace
from pathlib import Path

import numpy as np
import pytest

from mechgraph import projective as pg
from mechgraph.analysis import analyse, locate_centers
from mechgraph.casefile import demo_mechanism, load_case
from mechgraph.errors import MechgraphError
from mechgraph.generate import DOUBLE_BUTTERFLY, SINGLE_FLIER, random_pin_chain as random_chain
from mechgraph.indeterminate import (
    IncompleteRelaxationError,
    RelaxationError,
    RelaxationLine,
    _Frame,
    _try_locate,
    counted_freedoms,
    locate_by_relaxation,
    relax_linkage,
    weld_linkage,
)
from mechgraph.joints import CamContact, PinInSlot, Prismatic, Revolute
from mechgraph.model import Driver, Link, Mechanism
from mechgraph.position import assemble
from mechgraph.three_centers import pair_index, pairs
from mechgraph.velocity import analyse_velocities

CASES = Path(__file__).resolve().parent.parent / "cases"
BUTTERFLY = CASES / "eightbar_double_butterfly_stage_lift.toml"
FLIER = CASES / "eightbar_single_flier_dough_folder.toml"

#: Agreement of two float computations of one well-conditioned center
#: (scale-free separation), as the brief asks; float results agree to ~1e-12.
SEP_TOL = 1e-8


# ----------------------------------------------------------------- generators
# Chain graphs as in mechgraph.topology's templates (the double butterfly and
# single flier of Di Gregorio, ASME J. Mech. Des. 130(4):042303, 2008, as
# described in references.md "Indeterminate linkages").  For an instantaneous
# velocity analysis any placement of the pins is a position (each link is the
# rigid body holding its pins; common practice, no source).  The chain
# templates and the generator (random_chain, drawing pins until the draw is
# well conditioned) live in mechgraph.generate.


def separation(m: Mechanism, p, q) -> float:
    return pg.point_separation(p, q, scale=m.scale, origin=m.centre)


def assert_agrees_with_velocity(m: Mechanism, r, poses=None):
    a = analyse(m, poses)
    assert r.complete, [m.pair_names(*p) for p in r.unresolved]
    for i, j in pairs(m.n_links):
        a_name, b_name = m.link_names[i], m.link_names[j]
        vp = a.center(a_name, b_name).velocity_point
        assert vp is not None, (a_name, b_name)
        assert separation(m, r.point(a_name, b_name), vp) <= SEP_TOL, (a_name, b_name, r.method(a_name, b_name))
    assert r.max_collinearity < 1e-9
    assert r.max_line_residual < 1e-9


_cache: dict = {}


def case(path: Path):
    if path not in _cache:
        m = load_case(path)
        _cache[path] = (m, locate_by_relaxation(m))
    return _cache[path]


# ------------------------------------------------------------- the two cases
@pytest.mark.parametrize("path", [BUTTERFLY, FLIER], ids=lambda p: p.stem)
def test_eight_bar_cases_are_completed_and_agree_with_the_velocity_analysis(path):
    m, r = case(path)
    unreached = [p for p in pairs(m.n_links) if p not in set(r.theorem_alone)]
    # references.md "Indeterminate linkages" [computed there; tests/test_cases.py
    # checks it]: the theorem alone leaves 18 (butterfly) and 16 (flier) centers.
    assert len(unreached) == (18 if path == BUTTERFLY else 16)
    assert r.relaxations and r.found
    assert_agrees_with_velocity(m, r)
    for p in unreached:
        assert r.methods[pair_index(*p, m.n_links)] in ("relaxation", "three-centers", "coincident")


@pytest.mark.parametrize("path", [BUTTERFLY, FLIER], ids=lambda p: p.stem)
def test_published_form_two_relaxation_lines_per_center(path):
    m = load_case(path)
    r = locate_by_relaxation(m, theorem_lines=False)
    assert len(r.relaxations) >= 2
    for d in r.found.values():
        assert all(isinstance(x, RelaxationLine) for x in d.lines)
        assert len({x.removed for x in d.lines}) == len(d.lines)  # two different links removed
    assert_agrees_with_velocity(m, r)


@pytest.mark.parametrize("path", [BUTTERFLY, FLIER], ids=lambda p: p.stem)
def test_derivations_say_what_to_redraw(path):
    m, r = case(path)
    fr = _Frame(m.scale, m.centre)
    for (i, j), d in r.found.items():
        assert r.derivation(m.link_names[i], m.link_names[j]) == d.text
        assert d.text.startswith("by relaxation: ")
        lines = []
        for x in d.lines:
            if isinstance(x, RelaxationLine):
                assert f"with link '{x.removed}' removed" in d.text
                for pos in x.positions:
                    assert f"locking joint '{pos.locked}'" in d.text
                    if pos.point is not None:
                        assert fr.text(pos.point) in d.text
                if x.line is not None:
                    # the two stated positions give the stated line
                    u, v = (pos.point for pos in x.positions)
                    assert pg.line_separation(pg.join(u, v), x.line, scale=m.scale, origin=m.centre) < 1e-9
                    lines.append(x.line)
            else:
                assert "three-centers line" in d.text
                lines.append(x.line)
        if len(lines) == 2:
            assert separation(m, pg.meet(*lines), d.point) < 1e-9  # the lines meet at the center
            assert f"meet at {fr.text(d.point)}" in d.text
        assert d.steps and all("locked" in s for s in d.steps)
        assert d.details.startswith(d.text)
    # the centers the theorem reached from relaxation seeds name their lines
    for q, meth in enumerate(r.methods):
        if meth == "three-centers":
            assert r.derivations[q].startswith("from ")


@pytest.mark.parametrize("path", [BUTTERFLY, FLIER], ids=lambda p: p.stem)
def test_positions_are_the_theorem_alone_on_the_welded_linkage(path):
    # "in each motion locate the wanted center with the three-centers theorem
    # alone": recompute each position with locate_centers on the welded mechanism.
    m, r = case(path)
    checked = 0
    for d in r.found.values():
        for x in d.lines:
            if not isinstance(x, RelaxationLine):
                continue
            rel = next(y for y in r.relaxations if y.removed == x.removed)
            for pos in x.positions:
                if pos.at_rest:
                    continue
                motion = next(mo for mo in rel.motions if mo.locked == pos.locked)
                w = motion.welded
                assert w.freedoms == 1 and pos.locked in w.locked and w.removed == x.removed
                assert x.removed not in w.body_of
                A, B = w.body_of[m.link_names[x.i]], w.body_of[m.link_names[x.j]]
                tc = locate_centers(w.mechanism)
                assert separation(m, tc.point(A, B), pos.point) < 1e-9
                checked += 1
    assert checked >= 2


@pytest.mark.parametrize("path", [BUTTERFLY, FLIER], ids=lambda p: p.stem)
def test_every_relaxation_line_passes_through_the_true_centers(path):
    # Foster & Pennock (IDETC 2004 abstract, references.md): in the two-freedom
    # linkage left by removing a binary link, each center lies on one straight
    # line.  The true motion is one of its motions, so the velocity pole of every
    # pair not involving the removed link is on that line.  Pins and centers that
    # do not depend on the motion come out as points: two positions that coincide,
    # or a lock that welds the two links (relative rest).
    m = load_case(path)
    a = analyse(m)
    degree = {x: sum(x in j.links for j in m.joints) for x in m.link_names}
    binaries = [x for x in m.link_names if degree[x] == 2]
    assert len(binaries) == 4  # the butterfly's four binaries; the flier's three and the rocker
    seen_same = 0
    for removed in binaries:
        rel = relax_linkage(m, removed)
        assert len(rel.motions) >= 2
        r = m.index[removed]
        for i, j in pairs(m.n_links):
            x = rel.line(i, j)
            if r in (i, j):
                assert x is None
                continue
            assert x is not None, m.pair_names(i, j)  # six-bars and four-bars: every lock is determinate
            vp = a.centers[pair_index(i, j, m.n_links)].velocity_point
            if x.point is not None:
                assert separation(m, x.point, vp) < SEP_TOL, m.pair_names(i, j)
                seen_same += not any(p.at_rest for p in x.positions)
            else:
                assert pg.point_on_line(vp, x.line, scale=m.scale, origin=m.centre) < 1e-9, m.pair_names(i, j)
                assert x.residual < 1e-9  # the other motions' positions are on it too
        # every joint left is a center that does not depend on the motion
        for jt in m.joints:
            if removed in jt.links:
                continue
            i, j = sorted(m.index[y] for y in jt.links)
            x = rel.line(i, j)
            assert x.point is not None
            assert separation(m, x.point, pg.point(*jt.at)) < 1e-12
    assert seen_same


def test_a_lock_that_welds_the_pair_gives_the_point():
    # Demo six-bar without the pusher: locking the pad arm pivot welds the pad arm
    # to the frame (no relative motion), so in every other motion the frame-pad arm
    # center stays where the other lock puts it: the pivot itself.
    m = demo_mechanism()
    rel = relax_linkage(m, "pusher")
    x = rel.line(m.index["frame"], m.index["pad arm"])
    assert x.point is not None and any(p.at_rest for p in x.positions)
    assert separation(m, x.point, pg.point(*m.joint_by_name["O6"].at)) < 1e-12
    assert "stops the two links moving relative to each other" in x.describe(mech=m)


# ---------------------------------------------------------------- random draws
@pytest.mark.parametrize("topology", [DOUBLE_BUTTERFLY, SINGLE_FLIER], ids=["double-butterfly", "single-flier"])
@pytest.mark.parametrize("seed", range(6))
def test_random_geometries_agree_with_the_velocity_analysis(topology, seed):
    m = random_chain(topology, np.random.default_rng(1000 + seed), "random eight-bar")
    assert locate_centers(m).unresolved  # indeterminate whatever the geometry
    for theorem_lines in (True, False):
        r = locate_by_relaxation(m, theorem_lines=theorem_lines)
        assert r.found
        assert_agrees_with_velocity(m, r)


@pytest.mark.parametrize("topology", [DOUBLE_BUTTERFLY, SINGLE_FLIER], ids=["double-butterfly", "single-flier"])
def test_random_geometry_far_from_the_origin(topology):
    # the same drawing moved far away and scaled: the same centers (the work is
    # done about the drawing centre at the drawing scale)
    m = random_chain(topology, np.random.default_rng(7), "random eight-bar")
    shift, k = np.array([3.0e5, -2.0e5]), 40.0
    moved = replace(m, joints=tuple(replace(j, at=tuple(float(c) for c in np.asarray(j.at) * k + shift)) for j in m.joints))
    r0, r1 = locate_by_relaxation(m), locate_by_relaxation(moved)
    assert_agrees_with_velocity(moved, r1)
    for p, q in zip(r0.points, r1.points):
        x, y, w = q
        back = ((x - shift[0] * w) / k, (y - shift[1] * w) / k, w)
        assert separation(m, p, back) < SEP_TOL


# ----------------------------------------------------------------- invariances
@pytest.mark.parametrize("path", [BUTTERFLY, FLIER], ids=lambda p: p.stem)
def test_result_does_not_depend_on_which_link_is_ground(path):
    # Relative centers are geometric: which link is called ground changes none
    # of them (common practice, no source; references.md: determinacy is a
    # property of the chain, not of the ground).
    m, base = case(path)
    for g in m.link_names:
        v = replace(m, links=tuple(replace(link, ground=(link.name == g)) for link in m.links))
        r = locate_by_relaxation(v)
        assert r.complete
        for p, q in zip(r.points, base.points):
            assert separation(m, p, q) < SEP_TOL, g


def test_random_geometry_does_not_depend_on_ground_or_driver():
    m = random_chain(DOUBLE_BUTTERFLY, np.random.default_rng(11), "random butterfly")
    base = locate_by_relaxation(m)
    for g, d in (("B3", "J4"), ("T4", "J7"), ("B1", "J2")):
        v = replace(m, links=tuple(replace(link, ground=(link.name == g)) for link in m.links)).with_drivers([Driver(d, -2.0)])
        r = locate_by_relaxation(v)
        assert r.complete
        assert max(separation(m, p, q) for p, q in zip(r.points, base.points)) < SEP_TOL


def test_determinate_chain_needs_no_relaxation():
    m = demo_mechanism()
    r = locate_by_relaxation(m)
    assert r.complete and r.relaxations == () and r.rounds == 0 and not r.found
    tc = locate_centers(m)
    assert r.points == tc.points
    assert len(r.theorem_alone) == m.n_pairs
    assert "relaxation" not in r.methods


@pytest.mark.parametrize("path", sorted(CASES.glob("*.toml")), ids=lambda p: p.stem)
def test_every_single_freedom_case_is_completed(path):
    m = load_case(path)
    if path.stem == "twodof_fivebar_plotter":
        # references.md (Foster & Pennock, IDETC 2004 abstract): with two inputs the
        # secondary centers depend on the ratio of the input rates.
        with pytest.raises(RelaxationError, match=r"'two-motor pen plotter' has 2 freedom\(s\).*ratio of the input rates"):
            locate_by_relaxation(m)
        return
    r = locate_by_relaxation(m)
    indeterminate = bool(locate_centers(m).unresolved)
    assert bool(r.relaxations) == indeterminate
    assert_agrees_with_velocity(m, r)


# ----------------------------------------------------------- special geometry
def _moved_pin(m: Mechanism, name: str, x: float) -> Mechanism:
    return replace(m, joints=tuple(replace(j, at=(x, j.at[1])) if j.name == name else j for j in m.joints))


def test_center_at_infinity():
    # Move the rear tie head of the butterfly case along x until the lower plate's
    # angular velocity equals the frame's (zero): their relative center is then at
    # infinity (its pole has w = 0; kinematics-notes, common practice, no source).
    # The geometry is found with the velocity analysis; the relaxation method has
    # to reach the point at infinity by itself.
    m0 = load_case(BUTTERFLY)
    lo, hi = m0.index["frame"], m0.index["lower plate"]

    def rel_w(x):
        t = analyse_velocities(_moved_pin(m0, "rear tie head", x)).twists
        return t[hi, 0] - t[lo, 0]

    a, b = 75.0, 80.0
    assert rel_w(a) * rel_w(b) < 0
    for _ in range(60):
        c = 0.5 * (a + b)
        a, b = (c, b) if rel_w(c) * rel_w(a) > 0 else (a, c)
    m = _moved_pin(m0, "rear tie head", a)
    r = locate_by_relaxation(m)
    assert_agrees_with_velocity(m, r)
    x, y, w = r.point("frame", "lower plate")
    assert abs(w) * m.scale < 1e-9 * math.hypot(x, y)  # at infinity, in drawing terms
    assert r.method("frame", "lower plate") != "unresolved"
    r2 = locate_by_relaxation(m, theorem_lines=False)
    assert_agrees_with_velocity(m, r2)


@pytest.mark.parametrize("path", [BUTTERFLY, FLIER], ids=lambda p: p.stem)
def test_other_link_poses(path):
    # A position assembled by Newton's method (mechgraph.position); the centers
    # there against the velocity analysis at the same poses.
    m = load_case(path)
    q = assemble(m, [0.15])
    r = locate_by_relaxation(m, q)
    assert_agrees_with_velocity(m, r, q)
    # the case's own position, given as explicit zero poses, is the same as none
    assert locate_by_relaxation(m, m.reference_poses()).points == case(path)[1].points


def test_coincident_lines_wait_for_another_relaxation():
    # Two lines that coincide locate nothing: with only a duplicate of one
    # relaxation line, no center; with a second relaxation's line, the center.
    m = load_case(BUTTERFLY)
    fr = _Frame(m.scale, m.centre)
    tc = locate_centers(m)
    first, second = relax_linkage(m, "front strut"), relax_linkage(m, "rear strut")
    i, j = m.index["frame"], m.index["upper plate"]
    q = pair_index(i, j, m.n_links)
    line = first.line(i, j)
    assert line.line is not None
    twin = replace(line, removed="rear tie")
    assert _try_locate(m, tc, {q: [line, twin]}, fr, 1e-9, False) == {}
    got = _try_locate(m, tc, {q: [line, twin, second.line(i, j)]}, fr, 1e-9, False)
    vp = analyse(m).center("frame", "upper plate").velocity_point
    assert separation(m, got[q][1].point, vp) < SEP_TOL
    assert "'rear strut' removed" in got[q][1].text


# ---------------------------------------------------------- other joint kinds
def _flier_with_slot(seed: int) -> Mechanism:
    # the anchor link and its two pins replaced by a pin on the flier running in a
    # straight slot of the frame: still one freedom (Gruebler-Kutzbach, common practice)
    m = random_chain(SINGLE_FLIER, np.random.default_rng(seed), "flier with slot")
    head = next(j for j in m.joints if set(j.links) == {"F", "B1"})
    joints = [j for j in m.joints if "B1" not in j.links] + [PinInSlot("slot", ("F", "L1"), at=head.at, slot=(1.0, 0.3))]
    return replace(m, links=tuple(x for x in m.links if x.name != "B1"), joints=tuple(joints))


def _butterfly_with_slider(seed: int) -> Mechanism:
    m = random_chain(DOUBLE_BUTTERFLY, np.random.default_rng(seed), "butterfly with slider")
    joints = tuple(Prismatic(j.name, j.links, at=j.at, axis=(0.3, 1.0)) if j.links == ("T1", "B1") else j for j in m.joints)
    return replace(m, joints=joints)


def _butterfly_with_cam(seed: int) -> Mechanism:
    m = random_chain(DOUBLE_BUTTERFLY, np.random.default_rng(seed), "butterfly with cam")
    head = next(j for j in m.joints if set(j.links) == {"B1", "T3"})
    joints = [j for j in m.joints if "B1" not in j.links] + [CamContact("cam", ("T3", "T1"), at=head.at, normal=(0.2, 1.0))]
    return replace(m, links=tuple(x for x in m.links if x.name != "B1"), joints=tuple(joints))


@pytest.mark.parametrize("make", [_flier_with_slot, _butterfly_with_slider, _butterfly_with_cam])
@pytest.mark.parametrize("seed", range(2))
def test_higher_pairs_and_sliders(make, seed):
    m = make(seed)
    assert locate_centers(m).unresolved
    r = locate_by_relaxation(m)
    assert_agrees_with_velocity(m, r)


def test_no_relaxation_helps_with_cams_only():
    # Four links: two pairs pinned (frame-beam, upper-lower) and tied by four cam
    # contacts instead of binary links: one freedom (Gruebler-Kutzbach, common
    # practice).  Removing any link leaves a single lockable pin, so one motion
    # only and no line: the method reports the pairs left, and says so on request.
    links = [Link("frame", ground=True), Link("beam"), Link("upper"), Link("lower")]
    joints = [
        Revolute("P", ("frame", "beam"), at=(0.0, 0.0)),
        Revolute("Q", ("upper", "lower"), at=(20.0, 330.0)),
        CamContact("c1", ("upper", "frame"), at=(-150.0, 120.0), normal=(0.3, 1.0)),
        CamContact("c2", ("lower", "frame"), at=(160.0, 100.0), normal=(-0.4, 1.0)),
        CamContact("c3", ("upper", "beam"), at=(-50.0, 180.0), normal=(1.0, 0.2)),
        CamContact("c4", ("lower", "beam"), at=(90.0, 160.0), normal=(1.0, -0.5)),
    ]
    m = Mechanism(name="cam butterfly", links=links, joints=joints, drivers=[Driver("P", 1.0)])
    assert counted_freedoms(m) == 1
    r = locate_by_relaxation(m)
    assert not r.complete and r.unresolved == locate_centers(m).unresolved
    assert all(len(x.motions) < 2 for x in r.relaxations) and r.relaxations
    assert all("not reached" in r.derivations[pair_index(i, j, 4)] for i, j in r.unresolved)
    with pytest.raises(IncompleteRelaxationError, match=r"'cam butterfly': center\(s\) frame-upper") as e:
        r.require_complete()
    assert "frame-upper" in e.value.pairs
    # the velocity analysis still has them
    assert analyse(m).passed


# ------------------------------------------------------------ counting, welding
def test_counted_freedoms_follow_gruebler_kutzbach():
    # Gruebler-Kutzbach M = 3(n-1) - 2 j1 - j2 (references.md, common practice):
    # removing a binary link of two pins adds one freedom, a ternary link of three
    # pins adds three; locking a pin takes one.
    m = load_case(BUTTERFLY)
    assert counted_freedoms(m) == 1
    assert counted_freedoms(m, "front strut") == 2
    assert counted_freedoms(m, "frame") == 4
    assert counted_freedoms(m, "front strut", ["beam pivot"]) == 1
    assert counted_freedoms(m, "front strut", ["beam pivot", "plate hinge"]) == 0
    # a pin locked in a four-bar loop: the loop is rigid, the count is not fooled
    # by the redundant lock of a second pin of the same loop
    f = load_case(FLIER)
    assert counted_freedoms(f, "anchor link", ["input pivot"]) == 1
    assert counted_freedoms(f, "anchor link", ["input pivot", "rocker pin"]) == 1


def test_weld_merges_what_the_lock_makes_rigid():
    # Single flier, anchor link removed, input pivot locked: the four-bar loop
    # frame / input plate / coupler plate / rocker becomes one rigid body, and
    # what is left is a four-bar (paddle hung by the crank and coupler links).
    f = load_case(FLIER)
    w = weld_linkage(f, "anchor link", ["input pivot"])
    assert w.freedoms == 1
    assert w.bodies[0] == ("frame", "input plate", "coupler plate", "rocker")
    assert w.mechanism.n_links == 4 and len(w.mechanism.joints) == 4
    assert w.mechanism.ground == "frame+input plate+coupler plate+rocker"
    assert "'frame', 'input plate', 'coupler plate' and 'rocker' welded into one body" in w.welded_text()
    assert not locate_centers(w.mechanism).unresolved
    # removing the ground link: another link becomes the welded linkage's ground
    w2 = weld_linkage(f, "frame", ["rocker pin"])
    assert w2.mechanism.ground.startswith("input plate")


# ---------------------------------------------------------------------- errors
def test_errors_name_what_is_at_fault():
    m = load_case(BUTTERFLY)
    for bad in (0.0, -1e-9, float("nan"), True):
        with pytest.raises(RelaxationError, match="tol must be a positive"):
            locate_by_relaxation(m, tol=bad)
    with pytest.raises(RelaxationError, match=r"shape \(8, 3\)"):
        locate_by_relaxation(m, np.zeros((7, 3)))
    with pytest.raises(RelaxationError, match="link 'frame' from 'stage platform lift' is no relaxation: 4 freedom"):
        relax_linkage(m, "frame")
    with pytest.raises(RelaxationError, match="link 'crank' is not a link of 'stage platform lift'"):
        relax_linkage(m, "crank")
    with pytest.raises(RelaxationError, match="joint 'hinge' is not a joint"):
        weld_linkage(m, "front strut", ["hinge"])
    with pytest.raises(RelaxationError, match="joint 'front strut foot' .* removed link 'front strut'"):
        weld_linkage(m, "front strut", ["front strut foot"])
    with pytest.raises(RelaxationError, match="link 'pusher' is not a link"):
        locate_by_relaxation(m).point("frame", "pusher")
    cam = load_case(CASES / "cam_reject_gate.toml")
    higher = next(j for j in cam.joints if j.freedoms == 2)
    with pytest.raises(RelaxationError, match=rf"joint '{re.escape(higher.name)}' .* leaves 2 freedoms"):
        weld_linkage(cam, locked=[higher.name])
    assert issubclass(RelaxationError, MechgraphError) and issubclass(IncompleteRelaxationError, RelaxationError)
