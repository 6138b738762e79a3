"""Position analysis, and the velocity analysis checked by differentiating positions.

The velocity of a link is the time derivative of its pose (common practice, no
source): central differences of assembled positions are a physical check of
the velocity analysis that shares nothing with the three-centers construction.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from mechgraph.casefile import demo_mechanism, load_case
from mechgraph.errors import ModelError
from mechgraph.generate import random_mechanism
from mechgraph.joints import PinInSlot, Prismatic, Revolute
from mechgraph.position import AssemblyError, _pose_jacobian, assemble, input_coordinates
from mechgraph.velocity import analyse_velocities
from validation.references import fourbar_joints, fourbar_position

from pathlib import Path

CASES = Path(__file__).resolve().parents[1] / "cases"


def _fd_check(m, h=1e-6):
    v = analyse_velocities(m)
    for k in range(len(m.drivers)):
        e = np.zeros(len(m.drivers))
        e[k] = h
        qp, qm = assemble(m, e), assemble(m, -e)
        fd = (qp - qm) / (2 * h)
        b = v.basis[k]
        # at the case's position every link frame sits at the origin, so the pose
        # rate (x', y', theta') equals the twist (vx, vy, w) about the origin
        scale_w = max(1.0, float(np.abs(b[:, 0]).max()))
        scale_v = max(1.0, float(np.abs(b[:, 1:]).max()))
        assert np.abs(fd[:, 2] - b[:, 0]).max() <= 1e-6 * scale_w
        assert np.abs(fd[:, :2] - b[:, 1:]).max() <= 1e-6 * scale_v


def test_demo_velocities_are_position_derivatives():
    _fd_check(demo_mechanism())


@pytest.mark.parametrize("kind", ["four-bar", "slider-crank", "watt", "stephenson", "ladder"])
@pytest.mark.parametrize("seed", range(4))
def test_generated_velocities_are_position_derivatives(kind, seed):
    _fd_check(random_mechanism(kind, np.random.default_rng(seed)))


@pytest.mark.parametrize("path", sorted(p for p in CASES.glob("*.toml")), ids=lambda p: p.stem)
def test_case_velocities_are_position_derivatives(path):
    m = load_case(path)
    try:
        _fd_check(m)  # kinds without a position model (cam, rolling, gear) raise ModelError
    except ModelError as e:
        assert "position analysis of a" in str(e)
        pytest.skip(f"{path.stem}: {e}")


def test_assembly_matches_freudenstein_four_bar():
    # Norton's link lengths (Design of Machinery, worked four-bar; numbers from memory,
    # see ../shared/references.md); the closed form is the half-angle solution of
    # Freudenstein's equation (Ghosal, Resonance, Aug 2010).
    a, b, c, d = 40.0, 120.0, 80.0, 100.0
    th2 = math.radians(40.0)
    th3, th4 = fourbar_position(a, b, c, d, th2, "open")
    j = fourbar_joints(a, c, d, th2, th4)
    from mechgraph.generate import four_bar

    m = four_bar(tuple(j["O2"]), tuple(j["A"]), tuple(j["B"]), tuple(j["O4"]))
    for step_deg in (5.0, 20.0, -30.0, 90.0):
        q = assemble(m, [math.radians(step_deg)])
        # march in small steps so Newton keeps to the open circuit
        steps = np.linspace(0.0, math.radians(step_deg), 10)[1:]
        q = m.reference_poses()
        for s in steps:
            q = assemble(m, [s], start=q)
        t3, t4 = fourbar_position(a, b, c, d, th2 + math.radians(step_deg), "open")
        assert q[m.index["L2"], 2] == pytest.approx(t3 - th3, abs=1e-9)
        assert q[m.index["L3"], 2] == pytest.approx(t4 - th4, abs=1e-9)
        assert input_coordinates(m, q)[0] == pytest.approx(math.radians(step_deg), abs=1e-12)


def test_unreachable_input_raises():
    # The slider of an in-line slider-crank cannot travel beyond crank + rod from the
    # crank pivot (common practice, no source): ask for twice that.
    from mechgraph.generate import slider_crank
    from mechgraph.model import Driver

    m = slider_crank((0.0, 0.0), (6.0, 8.0), (30.0, 0.0))
    m = m.with_drivers([Driver(next(j.name for j in m.joints if j.kind == "prismatic"), 1.0)])
    with pytest.raises(AssemblyError, match=r"did not assemble at inputs \[60.0\]"):
        assemble(m, [60.0], max_iterations=30)


def _residual_jacobian(joint, pa, pb, h=1e-7):
    """Finite-difference Jacobian of a joint's residual over the two links' poses."""
    def r(x):
        return np.atleast_1d(joint.residual(x[:3], x[3:]))

    x0 = np.concatenate([pa, pb])
    cols = []
    for k in range(6):
        e = np.zeros(6)
        e[k] = h
        cols.append((r(x0 + e) - r(x0 - e)) / (2 * h))
    return np.stack(cols, axis=1)


@pytest.mark.parametrize(
    "joint",
    [
        Revolute("R", ("a", "b"), at=(3.0, -2.0)),
        Prismatic("P", ("a", "b"), at=(1.5, 4.0), axis=(0.6, 0.8)),
        PinInSlot("S", ("a", "b"), at=(-2.0, 1.0), slot=(1.0, 2.0)),
    ],
    ids=lambda j: j.kind,
)
@pytest.mark.parametrize("theta", [0.0, 0.7])
def test_velocity_rows_are_the_residual_jacobian(joint, theta):
    # Both links turned and moved together: the joint stays assembled.
    pose = np.array([1.2, -0.4, theta])
    J = _residual_jacobian(joint, pose, pose)
    rows = np.atleast_2d(np.asarray(joint.twist_rows(pose, pose), dtype=float))
    mapped = np.hstack([_pose_jacobian(rows[:, :3], pose), _pose_jacobian(rows[:, 3:], pose)])
    assert np.allclose(J, mapped, atol=1e-7)
