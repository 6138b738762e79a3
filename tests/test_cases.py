"""Every case file in cases/ (and the bundled demo), solved completely and checked.

Each case is a demonstration scenario with invented numbers (see the comment at
the top of each file).  The checks:

* every one of the n(n-1)/2 relative centers is defined, and the built-in
  cross-check passes (both methods agree, every link triple collinear);
* topology: chain and inversion (six-bars under topology.py's convention,
  eight-bars recognised by chain), Gruebler-Kutzbach and numerical mobility;
* how many centers the three-centers theorem reaches and how many are left to
  the velocity analysis, against an independent circle-diagram closure
  written here (combinatorial, no geometry);
* an independent physical check: link twists from central finite differences
  of a position solution written here (loop closure by Newton's method), for
  every case whose joints have a full position model (revolute, prismatic,
  straight pin-in-slot, gears on a carrier);
* the indeterminate eight-bars, the two-freedom five-bar, and the contact
  kinds (gear, cam, pin-in-slot, rolling), each against its source.
"""

from __future__ import annotations

import math
from dataclasses import replace
from pathlib import Path

import numpy as np
import pytest

from mechgraph.analysis import analyse
from mechgraph.casefile import demo_case_path, load_case
from mechgraph.joints import GearMesh, PinInSlot, Prismatic, Revolute
from mechgraph.model import Driver
from mechgraph.topology import summarise_topology

CASE_DIR = Path(__file__).resolve().parent.parent / "cases"
CASE_FILES = sorted(CASE_DIR.glob("*.toml"))
DEMO = Path(str(demo_case_path()))
ALL_FILES = CASE_FILES + [DEMO]

THEOREM_METHODS = ("joint", "three-centers", "coincident")

# Expected structure of each case: links, chain, inversion, Gruebler-Kutzbach and
# numerical mobility, centers reached by the theorem / left to the velocity analysis.
# Chain and inversion names follow mechgraph.topology's convention (its docstring,
# inversion numbers "from memory" there); topology.py names inversions of six-bars
# only, so the eight-bars expect inversion None.  Chains with a higher pair (cam,
# gear, pin-in-slot) are not classified by topology.py (None).  The centre counts
# are also re-derived below by an independent circle-diagram closure.
EXPECTED = {
    "watt1_carton_flap_folder": dict(n=6, chain="Watt", inversion="Watt I", gruebler=1, mobility=1, theorem=15, velocity=0),
    "watt2_bottle_pusher": dict(n=6, chain="Watt", inversion="Watt II", gruebler=1, mobility=1, theorem=15, velocity=0),
    "stephenson1_bending_clamp": dict(n=6, chain="Stephenson", inversion="Stephenson I", gruebler=1, mobility=1, theorem=15, velocity=0),
    "stephenson2_hopper_gate": dict(n=6, chain="Stephenson", inversion="Stephenson II", gruebler=1, mobility=1, theorem=15, velocity=0),
    "stephenson3_coater_blade_lift": dict(n=6, chain="Stephenson", inversion="Stephenson III", gruebler=1, mobility=1, theorem=15, velocity=0),
    "sixbar_slider_toggle_press": dict(n=6, chain="Watt", inversion="Watt II", gruebler=1, mobility=1, theorem=15, velocity=0),
    "inverted_slider_boom_lift": dict(n=4, chain=None, inversion=None, gruebler=1, mobility=1, theorem=6, velocity=0),
    "cam_reject_gate": dict(n=5, chain=None, inversion=None, gruebler=1, mobility=1, theorem=10, velocity=0),
    "geared_fivebar_feed_gripper": dict(n=5, chain=None, inversion=None, gruebler=1, mobility=1, theorem=10, velocity=0),
    "twodof_fivebar_plotter": dict(n=5, chain=None, inversion=None, gruebler=2, mobility=2, theorem=5, velocity=5),
    "eightbar_double_butterfly_stage_lift": dict(n=8, chain="double butterfly", inversion=None, gruebler=1, mobility=1, theorem=10, velocity=18),
    "eightbar_single_flier_dough_folder": dict(n=8, chain="single flier", inversion=None, gruebler=1, mobility=1, theorem=12, velocity=16),
    "pin_in_slot_louvre_actuator": dict(n=5, chain=None, inversion=None, gruebler=1, mobility=1, theorem=10, velocity=0),
    "rolling_dough_sheeter": dict(n=4, chain=None, inversion=None, gruebler=1, mobility=1, theorem=6, velocity=0),
    # the bundled demo (mechgraph/data/label_applicator.toml)
    "label_applicator": dict(n=6, chain="Stephenson", inversion="Stephenson III", gruebler=1, mobility=1, theorem=15, velocity=0),
}

_cache: dict = {}


def solved(path: Path):
    """(mechanism, analysis) of a case file, computed once per test session."""
    key = str(path)
    if key not in _cache:
        m = load_case(path)
        _cache[key] = (m, analyse(m, geometric=False))  # the theorem alone, then the velocity analysis
    return _cache[key]


def case(stem: str) -> Path:
    return CASE_DIR / f"{stem}.toml"


def ids(paths):
    return [p.stem for p in paths]


# ---------------------------------------------------------------- helpers (own geometry)
def unit_h(p, scale):
    """Homogeneous point sized by the drawing (x/L, y/L, w), made unit."""
    v = np.array([p[0] / scale, p[1] / scale, p[2]], dtype=float)
    return v / np.linalg.norm(v)


def separation(p, q, scale):
    """Scale-free separation of two homogeneous points: |unit(p) x unit(q)|."""
    return float(np.linalg.norm(np.cross(unit_h(p, scale), unit_h(q, scale))))


def collinear3(p, q, r, scale):
    return abs(float(np.linalg.det(np.array([unit_h(p, scale), unit_h(q, scale), unit_h(r, scale)]))))


def cart(p):
    return (p[0] / p[2], p[1] / p[2])


def dist_to_line(pt, through, direction):
    """Distance of point pt from the line through `through` along `direction`."""
    dx, dy = direction
    n = math.hypot(dx, dy)
    return abs((pt[0] - through[0]) * dy - (pt[1] - through[1]) * dx) / n


def circle_diagram_closure(mech):
    """Pairs the three-centers theorem can reach, by counting alone (generic position).

    A pair is located by a joint that fixes its center (revolute, prismatic,
    rolling contact, gears whose centres share a carrier), or once it has two
    locus lines: a contact normal (cam, pin-in-slot, gears without carrier) or,
    for each third link k with both (i, k) and (k, j) located, the line
    through those two centers (Aronhold-Kennedy; common practice, no source).
    """
    idx = mech.index
    known, normals = set(), {}
    for j in mech.joints:
        pair = frozenset(idx[x] for x in j.links)
        if isinstance(j, (Revolute, Prismatic)) or j.kind == "rolling" or (isinstance(j, GearMesh) and j.carrier):
            known.add(pair)
        else:
            normals[pair] = normals.get(pair, 0) + 1
    n = mech.n_links
    changed = True
    while changed:
        changed = False
        for i in range(n):
            for j in range(i + 1, n):
                pair = frozenset((i, j))
                if pair in known:
                    continue
                lines = normals.get(pair, 0) + sum(
                    1 for k in range(n) if k not in pair and frozenset((i, k)) in known and frozenset((k, j)) in known
                )
                if lines >= 2:
                    known.add(pair)
                    changed = True
    return {tuple(sorted(mech.link_names[i] for i in p)) for p in known}


def theorem_pairs(a):
    m = a.mechanism
    return {tuple(sorted((m.link_names[c.i], m.link_names[c.j]))) for c in a.centers if c.method in THEOREM_METHODS}


# ------------------------------------------------- independent position solution
def _rot(v, th):
    c, s = math.cos(th), math.sin(th)
    return np.array([c * v[0] - s * v[1], s * v[0] + c * v[1]])


def _place(r, pose):
    return pose[:2] + _rot(r, pose[2])


FD_KINDS = (Revolute, Prismatic, PinInSlot, GearMesh)


def _fd_supported(path: Path) -> bool:
    m = load_case(path)
    return all(isinstance(j, FD_KINDS) for j in m.joints) and all(
        j.carrier is not None for j in m.joints if isinstance(j, GearMesh)
    )


def _residual(mech, q, drive):
    """Loop-closure equations written here from the joint geometry (link frames = drawing at q = 0)."""
    n, g, idx = mech.n_links, mech.ground_index, mech.index
    poses = np.zeros((n, 3))
    poses[[i for i in range(n) if i != g]] = q.reshape(-1, 3)
    out = []
    for j in mech.joints:
        a, b = poses[idx[j.links[0]]], poses[idx[j.links[1]]]
        if isinstance(j, Revolute):
            out += list(_place(j.at, a) - _place(j.at, b))
        elif isinstance(j, Prismatic):  # guide on a, slider b
            nrm = _rot((-j.axis[1], j.axis[0]), a[2])
            out += [a[2] - b[2], float(nrm @ (_place(j.at, b) - _place(j.at, a)))]
        elif isinstance(j, PinInSlot):  # pin on a, straight slot on b
            nrm = _rot((-j.slot[1], j.slot[0]), b[2])
            out.append(float(nrm @ (_place(j.at, a) - _place(j.at, b))))
        elif isinstance(j, GearMesh):  # pitch circles roll: r_a dth_a = -/+ r_b dth_b relative to the carrier
            c = poses[idx[j.carrier]]
            ra, rb = j.pitch_radii
            sgn = -1.0 if j.internal else 1.0
            out.append(ra * (a[2] - c[2]) + sgn * rb * (b[2] - c[2]))
    for d, s in zip(mech.drivers, drive):
        j = mech.joint_by_name[d.joint]
        a, b = poses[idx[j.links[0]]], poses[idx[j.links[1]]]
        if isinstance(j, Revolute):
            out.append(b[2] - a[2] - s)
        else:
            out.append(float(_rot(j.axis, a[2]) @ (_place(j.at, b) - _place(j.at, a))) - s)
    return np.array(out)


def _solve_position(mech, drive):
    q = np.zeros(3 * (mech.n_links - 1))
    eps = 1e-7
    for _ in range(40):
        f = _residual(mech, q, drive)
        J = np.empty((len(f), len(q)))
        for k in range(len(q)):
            dq = np.zeros_like(q)
            dq[k] = eps
            J[:, k] = (_residual(mech, q + dq, drive) - _residual(mech, q - dq, drive)) / (2 * eps)
        step = np.linalg.lstsq(J, -f, rcond=None)[0]
        q = q + step
        if np.max(np.abs(step)) < 1e-13 * mech.scale:
            break
    assert np.max(np.abs(_residual(mech, q, drive))) < 1e-9 * mech.scale
    return q


def finite_difference_basis(mech):
    """Twists (w, vx, vy) of every link per unit rate of each driver, by central differences."""
    n, g = mech.n_links, mech.ground_index
    nd = len(mech.drivers)
    basis = np.zeros((nd, n, 3))
    moving = [i for i in range(n) if i != g]
    for k, d in enumerate(mech.drivers):
        sliding = isinstance(mech.joint_by_name[d.joint], Prismatic)
        h = 1e-5 * (mech.scale if sliding else 1.0)
        e = np.zeros(nd)
        e[k] = h
        dq = (_solve_position(mech, e) - _solve_position(mech, -e)) / (2 * h)
        # poses are (x, y, th); the twist is (dth, dx, dy): the link point at the origin moves by (dx, dy)
        basis[k, moving] = dq.reshape(-1, 3)[:, [2, 0, 1]]
    return basis


# =========================================================================== tests
def test_every_case_has_expectations():
    assert CASE_FILES, "no case files in cases/"
    assert {p.stem for p in ALL_FILES} == set(EXPECTED)


@pytest.mark.parametrize("path", ALL_FILES, ids=ids(ALL_FILES))
def test_all_centers_defined_and_crosscheck_passes(path):
    m, a = solved(path)
    # n(n-1)/2 relative centers (common practice, no source)
    assert len(a.centers) == m.n_links * (m.n_links - 1) // 2
    for c in a.centers:
        assert c.method in ("joint", "three-centers", "coincident", "velocity"), (c.pair, c.derivation)
        assert c.point is not None and not c.relative_rest, c.pair
    assert a.passed, a.crosscheck
    assert a.crosscheck.n_triples == m.n_links * (m.n_links - 1) * (m.n_links - 2) // 6


@pytest.mark.parametrize("path", ALL_FILES, ids=ids(ALL_FILES))
def test_topology(path):
    m, _ = solved(path)
    e = EXPECTED[path.stem]
    t = summarise_topology(m)
    assert t.n_links == e["n"]
    assert (t.chain, t.inversion) == (e["chain"], e["inversion"])
    # Gruebler-Kutzbach M = 3(n-1) - 2 j1 - j2 (common practice, no source), recounted here
    j2 = sum(1 for j in m.joints if j.kind in ("pin_in_slot", "cam", "gear"))
    j1 = len(m.joints) - j2
    assert t.gruebler == 3 * (m.n_links - 1) - 2 * j1 - j2 == e["gruebler"]
    assert t.mobility == e["mobility"]
    assert len(m.drivers) == e["mobility"]


@pytest.mark.parametrize("path", ALL_FILES, ids=ids(ALL_FILES))
def test_theorem_versus_velocity_counts(path):
    m, a = solved(path)
    e = EXPECTED[path.stem]
    by_theorem = [c for c in a.centers if c.method in THEOREM_METHODS]
    by_velocity = [c for c in a.centers if c.method == "velocity"]
    assert (len(by_theorem), len(by_velocity)) == (e["theorem"], e["velocity"])
    assert len(a.three_centers.unresolved) == e["velocity"]
    # the solver reaches exactly the pairs an independent counting closure reaches
    assert theorem_pairs(a) == circle_diagram_closure(m)


FD_FILES = [p for p in ALL_FILES if _fd_supported(p)]


@pytest.mark.parametrize("path", FD_FILES, ids=ids(FD_FILES))
def test_velocities_match_finite_differences_of_positions(path):
    """Independent physical check: differentiate a position solution written here."""
    m, a = solved(path)
    fd = finite_difference_basis(m)
    vb = a.velocity.basis
    L = m.scale
    size = np.array([L, 1.0, 1.0])  # w at drawing size, so all three components are comparable
    ref = np.max(np.abs(vb * size))
    assert np.max(np.abs((fd - vb) * size)) <= 1e-6 * ref
    # every center of the table (whichever method found it) is the pole of the differentiated twists
    tw = np.tensordot(a.velocity.rates, fd, axes=1)
    for c in a.centers:
        w, vx, vy = tw[c.i] - tw[c.j]
        assert separation(c.point, (-vy, vx, w), L) < 1e-6, c.pair


# ------------------------------------------------------------ indeterminate eight-bars
BUTTERFLY = "eightbar_double_butterfly_stage_lift"
FLIER = "eightbar_single_flier_dough_folder"


def test_double_butterfly_theorem_finds_no_secondary_center():
    # references.md, "Indeterminate linkages" [computed there; verified here by the
    # circle-diagram closure]: the theorem finds none of the 18 secondary centers
    # (Di Gregorio, ASME J. Mech. Des. 130(4):042303, 2008, treats this chain).
    m, a = solved(case(BUTTERFLY))
    secondary = [c for c in a.centers if c.method != "joint"]
    assert len(secondary) == 28 - 10 == 18
    assert all(c.method == "velocity" for c in secondary)
    assert len(circle_diagram_closure(m)) == 10


def test_single_flier_theorem_finds_only_the_four_bar_centers():
    # Own reasoning on the circle diagram (verified by circle_diagram_closure):
    # the four-bar loop frame / input plate / coupler plate / rocker gives its two
    # diagonal centers.  After that every unknown pair has at most one third link
    # joining it through two known centers (e.g. paddle-frame only through the
    # anchor link, anchor link-input plate only through the frame), so nothing
    # more is reached: 2 of the 18 secondary centers by the theorem, 16 left.
    m, a = solved(case(FLIER))
    found = {tuple(sorted((m.link_names[c.i], m.link_names[c.j]))) for c in a.centers if c.method == "three-centers"}
    assert found == {("coupler plate", "frame"), ("input plate", "rocker")}
    assert sum(c.method == "velocity" for c in a.centers) == 16
    assert len(circle_diagram_closure(m)) == 12


@pytest.mark.parametrize("stem", [BUTTERFLY, FLIER])
def test_unreached_centers_lie_on_their_known_lines(stem):
    # An unreached pair with one third link joining it through two known centers
    # has exactly one three-centers line; the velocity pole must lie on it
    # (Aronhold-Kennedy; common practice, no source).  Pairs with no such third
    # link have no line at all.
    m, a = solved(case(stem))
    known = circle_diagram_closure(m)
    names = m.link_names
    with_line = 0
    for c in a.centers:
        if c.method != "velocity":
            continue
        paths = sum(
            1
            for k in range(m.n_links)
            if k not in (c.i, c.j)
            and tuple(sorted((names[c.i], names[k]))) in known
            and tuple(sorted((names[k], names[c.j]))) in known
        )
        assert paths <= 1, c.pair
        assert bool(c.loci) == (paths == 1), c.pair
        with_line += paths
        for loc in c.loci:
            ln = np.array([loc.line[0] * m.scale, loc.line[1] * m.scale, loc.line[2]])
            assert abs(ln @ unit_h(c.point, m.scale)) / np.linalg.norm(ln) < 1e-9, c.pair
    assert with_line > 0


@pytest.mark.parametrize("stem", [BUTTERFLY, FLIER])
def test_determinacy_independent_of_ground_and_driver(stem):
    # references.md [computed there, checked here]: determinacy is a property of the
    # chain, not of which link is ground or which joint drives.  Relative centers are
    # geometric, so they must also come out at the same points.
    m, a = solved(case(stem))
    base_pairs = theorem_pairs(a)
    base_points = [c.point for c in a.centers]
    variants = []
    for g in m.link_names:
        variants.append(replace(m, links=tuple(replace(link, ground=(link.name == g)) for link in m.links)))
    for j in m.joints:
        variants.append(m.with_drivers([Driver(j.name, 1.5)]))
    assert len(variants) == 8 + 10
    for v in variants:
        b = analyse(v, geometric=False)
        assert b.passed
        assert theorem_pairs(b) == base_pairs
        assert sum(c.method == "velocity" for c in b.centers) == EXPECTED[stem]["velocity"]
        for c, p in zip(b.centers, base_points):
            assert separation(c.point, p, m.scale) < 1e-8, (v.ground, v.drivers, c.pair)


# ------------------------------------------------------------------ two-freedom five-bar
def test_two_freedom_centers_move_on_straight_lines_with_the_input_ratio():
    # Foster & Pennock, ASME IDETC 2004 (abstract, as recorded in references.md):
    # in a two-freedom linkage a secondary center depends on the ratio of the input
    # rates and moves along a straight line as the ratio changes.
    m, a = solved(case("twodof_fivebar_plotter"))
    L = m.scale
    left, right = (d.joint for d in m.drivers)
    runs = [analyse(m.with_drivers([Driver(left, 1.0), Driver(right, r)])) for r in (0.5, -1.5, 3.0)]
    moving = set()
    for q, c in enumerate(a.centers):
        pts = [r.centers[q].point for r in runs]
        spread = max(separation(pts[0], p, L) for p in pts[1:])
        if spread > 1e-6:
            moving.add(c.pair)
            assert collinear3(*pts, L) < 1e-9, c.pair  # three ratios -> three collinear points
            # and the line is the locus the theorem gave for this pair (one line; the
            # solver may record it more than once, from each of its two centers)
            assert c.loci, c.pair
            for loc in c.loci:
                ln = np.array([loc.line[0] * L, loc.line[1] * L, loc.line[2]])
                for p in pts:
                    assert abs(ln @ unit_h(p, L)) / np.linalg.norm(ln) < 1e-9, c.pair
        else:
            assert c.method == "joint", c.pair  # only the pins stay put
    # exactly the ratio-dependent centers are the ones the theorem leaves to the velocity analysis
    assert moving == {c.pair for c in a.centers if c.method == "velocity"}
    assert len(moving) == 5


# ------------------------------------------------------------------------ contact kinds
def test_gear_pair_center_is_the_pitch_point():
    # Common practice, no source: gears whose centres are held by one carrier have
    # their relative center at the pitch point, and turn at w_b/w_a = -r_a/r_b (external).
    m, a = solved(case("geared_fivebar_feed_gripper"))
    pitch = (48.0, 0.0)  # drive gear r = 48 at (0, 0), idler r = 72 at (120, 0)
    c = a.center("drive gear", "idler gear")
    for p in (c.point, c.velocity_point):
        assert math.dist(cart(p), pitch) < 1e-9 * m.scale
    v = a.velocity
    ratio = v.angular_velocity(m.index["idler gear"]) / v.angular_velocity(m.index["drive gear"])
    assert ratio == pytest.approx(-48.0 / 72.0, rel=1e-12)


def test_cam_pair_center_lies_on_the_common_normal():
    # Common practice, no source: the relative center of a sliding cam contact lies
    # on the common normal at the contact point (and, by Aronhold-Kennedy, on the
    # line of the cam shaft and the follower pivot).
    m, a = solved(case("cam_reject_gate"))
    contact = (35.0, 52.0)
    normal = (math.cos(math.radians(100.0)), math.sin(math.radians(100.0)))
    c = a.center("cam", "follower arm")
    for p in (c.point, c.velocity_point):
        x = cart(p)
        assert dist_to_line(x, contact, normal) < 1e-9 * m.scale
        assert dist_to_line(x, (0.0, 0.0), (160.0, 90.0)) < 1e-9 * m.scale
    # and the follower's speed at the contact point has no component along the normal
    # relative to the cam (no penetration, no separation; common practice, no source)
    v = a.velocity
    vc = np.subtract(v.point_velocity(m.index["follower arm"], contact), v.point_velocity(m.index["cam"], contact))
    assert abs(vc @ normal) < 1e-9 * np.linalg.norm(v.point_velocity(m.index["cam"], contact))


def test_pin_in_slot_center_lies_on_the_normal_to_the_slot():
    # Common practice, no source: the relative center of a pin in a straight slot
    # lies on the line through the pin, normal to the slot.
    m, a = solved(case("pin_in_slot_louvre_actuator"))
    pin, slot = (45.0, 30.0), (-105.0, 30.0)
    c = a.center("crank", "slotted lever")
    for p in (c.point, c.velocity_point):
        assert dist_to_line(cart(p), pin, (-slot[1], slot[0])) < 1e-9 * m.scale


def test_rolling_center_is_the_contact_point():
    # Common practice, no source: rolling without slip puts the relative center at
    # the contact point, and the axle of a wheel of radius r rolling on a fixed
    # straight track moves parallel to the track at |w| r.
    m, a = solved(case("rolling_dough_sheeter"))
    c = a.center("table", "rolling pin")
    for p in (c.point, c.velocity_point):
        assert math.dist(cart(p), (260.0, 0.0)) < 1e-9 * m.scale
    v = a.velocity
    w = v.angular_velocity(m.index["rolling pin"])
    vx, vy = v.point_velocity(m.index["rolling pin"], (260.0, 40.0))
    assert vy == pytest.approx(0.0, abs=1e-9 * abs(vx))
    assert abs(vx) == pytest.approx(abs(w) * 40.0, rel=1e-12)


def test_inverted_slider_boom_rate_from_moment_arm():
    # Common practice, no source: a cylinder acting on a boom extends at
    # w_boom times the moment arm (distance from the boom pivot to the cylinder
    # line); the barrel/rod center is at infinity, normal to the cylinder axis.
    m, a = solved(case("inverted_slider_boom_lift"))
    axis = (300.0, 330.0)
    arm = dist_to_line((0.0, 0.0), (600.0, 180.0), axis)
    w = a.velocity.angular_velocity(m.index["boom"])
    assert abs(w) * arm == pytest.approx(50.0, rel=1e-12)
    c = a.center("cylinder barrel", "piston rod")
    assert abs(c.point[2]) < 1e-12
    assert abs(c.point[0] * axis[0] + c.point[1] * axis[1]) < 1e-12 * math.hypot(*axis)


def test_press_ram_center_at_infinity_normal_to_guide():
    # Common practice, no source: a prismatic pair's center lies at infinity in the
    # direction normal to the sliding axis (here the ram guide is vertical).
    m, a = solved(case("sixbar_slider_toggle_press"))
    c = a.center("frame", "ram")
    assert abs(c.point[2]) < 1e-12 and abs(c.point[1]) < 1e-12
    assert c.method == "joint"


@pytest.mark.parametrize("stem", ["eightbar_double_butterfly_stage_lift", "eightbar_single_flier_dough_folder"])
def test_indeterminate_centers_are_found_geometrically_by_default(stem):
    # The relaxation method (Foster & Pennock, ASME IDETC 2004, abstract, via
    # ../shared/references.md) locates what the theorem cannot; the velocity
    # analysis then cross-checks every one of them.
    m = load_case(CASE_DIR / f"{stem}.toml")
    a = analyse(m)
    assert not [c.pair for c in a.centers if c.method == "velocity"]
    assert sum(c.method == "relaxation" for c in a.centers) == EXPECTED[stem]["velocity"]
    assert all(c.check is not None and c.check.passed for c in a.centers)
    assert a.passed
