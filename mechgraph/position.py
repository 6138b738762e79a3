"""Position analysis: assemble the mechanism at other input values by Newton's method.

The joints' position equations (:meth:`mechgraph.joints.Joint.residual`) and
the drivers' input coordinates are solved for the link poses ``(x, y, theta)``
(shape ``(n_links, 3)``; the case's own position is all zeros).  The
Jacobian is the same set of rows the velocity analysis uses
(:meth:`~mechgraph.joints.Joint.twist_rows`), mapped from twist to pose
coordinates, so the equations of each joint kind are written once.

This is the base of motion sweeps, and of the finite-difference check of the
velocity analysis: differentiating assembled positions is a physical check
independent of the three-centers construction.
"""

from __future__ import annotations

import numpy as np

from .errors import AssemblyError, ModelError
from .model import Mechanism

__all__ = ["input_coordinates", "assemble", "AssemblyError", "check_assembled"]


def check_assembled(mech: Mechanism, poses, *, tol: float = 1e-9) -> None:
    """Raise unless every joint with a position model holds at link poses ``poses``.

    Parameters
    ----------
    mech : Mechanism
        The mechanism.
    poses : array_like, shape (n_links, 3)
        Link poses ``(x, y, theta)``.
    tol : float, default 1e-9
        Largest residual accepted, as a fraction of the drawing size: every
        residual, the angular ones (radians) included, is compared with
        ``tol * mech.scale``.

    Raises
    ------
    ModelError
        The poses have the wrong shape, or a joint does not hold (its residual
        is named), or a contact joint's links left their drawn relative pose.

    Examples
    --------
    >>> from mechgraph.casefile import demo_mechanism
    >>> m = demo_mechanism()
    >>> check_assembled(m, m.reference_poses())

    Notes
    -----
    One residual per joint, O(j) for j joints.  Contact kinds without a
    position model (cam, rolling, gear) are checked only for keeping their
    drawn relative pose.

    References
    ----------
    Common practice, no single source.
    """
    poses = np.asarray(poses, dtype=float)
    if poses.shape != (mech.n_links, 3):
        raise ModelError(f"poses must have shape ({mech.n_links}, 3), one (x, y, theta) per link; got {poses.shape}")
    if not np.all(np.isfinite(poses)):
        raise ModelError("poses must be finite numbers")
    for j in mech.joints:
        a, b = (mech.index[x] for x in j.links)
        try:
            r = np.atleast_1d(j.residual(poses[a], poses[b]))
        except ModelError:
            j.twist_rows(poses[a], poses[b])  # contacts: raises unless the links keep their drawn relative pose
            continue
        worst = float(np.max(np.abs(r) / _row_scales(j, len(r), mech.scale))) if r.size else 0.0
        if worst > tol:
            raise ModelError(
                f"{j.label()} does not hold at the given link poses (residual {worst:.3g}); "
                "the poses must describe an assembled position (see mechgraph.position.assemble)"
            )


def _row_scales(joint, k: int, scale: float) -> np.ndarray:
    """Per residual row: the drawing size for a distance, 1 for an angle (so ``tol`` is relative / radians)."""
    lengths = getattr(joint, "residual_is_length", (True,) * k)
    return np.array([scale if is_len else 1.0 for is_len in lengths[:k]] + [scale] * (k - len(lengths[:k])))


def _driver_value(mech: Mechanism, joint, pa, pb) -> float:
    """Input coordinate of a driven joint: relative rotation (rad) or sliding displacement (length)."""
    if joint.drive == "rotation":
        return float(pb[2] - pa[2])
    # sliding: displacement of the slider's reference point along the guide axis
    from .joints import place, rotate

    u = rotate(joint.axis, pa[2])
    ra = place(joint.at, pa)
    rb = place(joint.at, pb)
    return float(u[0] * (rb[0] - ra[0]) + u[1] * (rb[1] - ra[1]))


def input_coordinates(mech: Mechanism, poses) -> np.ndarray:
    """Value of every driver's input coordinate at link poses ``poses``.

    A revolute's input is the relative rotation of its second link (radians,
    zero in the case's position); a prismatic's is the slider's displacement
    along the axis (length units).

    Parameters
    ----------
    mech : Mechanism
        The mechanism, with its drivers.
    poses : array_like, shape (n_links, 3)
        Link poses ``(x, y, theta)``.

    Returns
    -------
    ndarray, shape (n_drivers,)
        One input value per driver, in the order of ``mech.drivers``.

    Examples
    --------
    >>> from mechgraph.casefile import demo_mechanism
    >>> m = demo_mechanism()
    >>> input_coordinates(m, m.reference_poses())
    array([0.])

    Notes
    -----
    O(1) per driver.

    References
    ----------
    Common practice, no single source.
    """
    poses = np.asarray(poses, dtype=float)
    out = []
    for d in mech.drivers:
        j = mech.joint_by_name[d.joint]
        a, b = (mech.index[x] for x in j.links)
        out.append(_driver_value(mech, j, poses[a], poses[b]))
    return np.array(out)


def _pose_jacobian(rows: np.ndarray, pose) -> np.ndarray:
    """Rows over a link's twist (w, vx0, vy0) -> rows over its pose (x, y, theta).

    With the frame origin at p, a pose change (dx, dy, dtheta) is the twist
    (dtheta, dx + dtheta * p_y, dy - dtheta * p_x).
    """
    x, y = pose[0], pose[1]
    T = np.array([[0.0, 0.0, 1.0], [1.0, 0.0, y], [0.0, 1.0, -x]])
    return rows @ T


def _system(mech: Mechanism, poses: np.ndarray, targets: np.ndarray):
    """Residuals, Jacobian over the moving links' pose columns, and those columns' indices."""
    g = mech.ground_index
    res, jac, sizes = [], [], []
    n = mech.n_links
    for j in mech.joints:
        a, b = (mech.index[x] for x in j.links)
        r = np.atleast_1d(j.residual(poses[a], poses[b]))
        sizes.append(_row_scales(j, len(r), mech.scale))
        rows = np.atleast_2d(np.asarray(j.twist_rows(poses[a], poses[b]), dtype=float))
        block = np.zeros((len(r), 3 * n))
        block[:, 3 * a : 3 * a + 3] += _pose_jacobian(rows[:, :3], poses[a])
        block[:, 3 * b : 3 * b + 3] += _pose_jacobian(rows[:, 3:], poses[b])
        res.append(r)
        jac.append(block)
    for k, d in enumerate(mech.drivers):
        j = mech.joint_by_name[d.joint]
        a, b = (mech.index[x] for x in j.links)
        res.append(np.array([_driver_value(mech, j, poses[a], poses[b]) - targets[k]]))
        sizes.append(np.array([1.0 if j.drive == "rotation" else mech.scale]))
        row = np.asarray(j.driver_row(poses[a], poses[b]), dtype=float)[None, :]
        block = np.zeros((1, 3 * n))
        block[:, 3 * a : 3 * a + 3] += _pose_jacobian(row[:, :3], poses[a])
        block[:, 3 * b : 3 * b + 3] += _pose_jacobian(row[:, 3:], poses[b])
        jac.append(block)
    J = np.vstack(jac)
    keep = [c for c in range(3 * n) if c // 3 != g]
    return np.concatenate(res), J[:, keep], keep, np.concatenate(sizes)


def assemble(
    mech: Mechanism,
    inputs,
    *,
    start=None,
    tol: float = 1e-12,
    max_iterations: int = 50,
) -> np.ndarray:
    """Link poses at given driver input values, by Newton's method from a nearby position.

    Parameters
    ----------
    mech : Mechanism
        The mechanism, with its drivers.
    inputs : sequence of float
        Target input coordinate of each driver (see :func:`input_coordinates`).
    start : ndarray, shape (n_links, 3), optional
        Starting poses; the case's own position by default.  Newton's method
        keeps to the assembly branch of the start when the step is small.
    tol : float, default 1e-12
        Converged when every residual is at most ``tol`` times the drawing
        size; the angular residuals (radians) are compared with the same
        ``tol * scale``.
    max_iterations : int, default 50
        Newton steps before giving up.

    Returns
    -------
    ndarray, shape (n_links, 3)
        Link poses ``(x, y, theta)``; ground stays at its start pose.

    Raises
    ------
    ModelError
        A joint kind has no position model (cam, rolling contact, gear mesh),
        or the number of inputs differs from the number of drivers.
    AssemblyError
        No convergence: the input may be beyond the mechanism's reach.

    Examples
    --------
    >>> import numpy as np
    >>> from mechgraph.casefile import demo_mechanism
    >>> m = demo_mechanism()
    >>> q = assemble(m, [np.radians(5.0)])
    >>> round(float(np.degrees(q[m.index["crank"], 2])), 9)
    5.0

    Notes
    -----
    Gauss-Newton with least squares on the (constraints + drivers) x 3(n-1)
    system; each iteration costs one dense solve, O(n^3).

    References
    ----------
    Newton's method on the loop-closure equations: common practice, no single
    source.  The Jacobian rows are the joints' velocity rows
    (:meth:`mechgraph.joints.Joint.twist_rows`).
    """
    poses = mech.reference_poses() if start is None else np.array(start, dtype=float, copy=True)
    targets = np.asarray(inputs, dtype=float).reshape(-1)
    if len(targets) != len(mech.drivers):
        raise ModelError(f"assemble needs one input value per driver ({len(mech.drivers)}), got {len(targets)}")
    norm = np.inf
    for it in range(1, max_iterations + 1):
        r, J, keep, sizes = _system(mech, poses, targets)
        norm = float(np.max(np.abs(r) / sizes)) if r.size else 0.0  # distances per drawing size, angles in radians
        if norm <= tol:
            return poses
        step = np.linalg.lstsq(J, -r, rcond=None)[0]
        flat = poses.reshape(-1)
        flat[keep] += step
        poses = flat.reshape(-1, 3)
    raise AssemblyError(
        f"mechanism '{mech.name}' did not assemble at inputs {[float(t) for t in targets]} "
        f"after {max_iterations} Newton steps (largest residual {norm:.3g}); "
        "the input may be out of reach, or the start too far from it",
        residual=norm,
        iterations=max_iterations,
    )
