"""Numerical velocity analysis: every link's twist, and every relative center as a pole.

Each joint contributes linear conditions on the twists of its two links
(:meth:`mechgraph.joints.Joint.twist_rows`), each driver one more row with its
rate.  With as many drivers as the mechanism has freedoms at this position the
system has one solution: the twist ``(w, vx, vy)`` of every link (``vx, vy``:
velocity of the link point at the global origin).  The relative center of
links i and j is the pole of their relative twist, the homogeneous point
``(-(vy_i - vy_j), vx_i - vx_j, w_i - w_j)``: finite, or at infinity when the
two angular velocities are equal.

Notes
-----
Internally the rows are written about the centre of the drawing and the
angular columns are scaled by the drawing size, so that the rank decisions
(mobility, dead points) do not depend on where the origin is or which length
unit is used.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .errors import DriverError, SingularPositionError
from .model import Mechanism

__all__ = ["VelocityState", "constraint_rows", "numerical_mobility", "analyse_velocities", "gruebler_mobility"]


def gruebler_mobility(mech: Mechanism) -> int:
    """Gruebler-Kutzbach mobility ``M = 3 (n - 1) - 2 j1 - j2``.

    ``j1`` counts one-freedom joints (revolute, prismatic, rolling contact),
    ``j2`` two-freedom joints (pin-in-slot, cam contact, gear mesh).

    Examples
    --------
    >>> from mechgraph.casefile import demo_mechanism
    >>> gruebler_mobility(demo_mechanism())
    1

    References
    ----------
    Gruebler-Kutzbach criterion, common practice (no single source).
    """
    n = mech.n_links
    return 3 * (n - 1) - sum(j.constraints for j in mech.joints)


def _shifted(mech: Mechanism, poses: np.ndarray) -> np.ndarray:
    c = mech.centre
    s = np.array(poses, dtype=float, copy=True)
    s[:, 0] -= c[0]
    s[:, 1] -= c[1]
    return s


def constraint_rows(mech: Mechanism, poses: np.ndarray | None = None):
    """Velocity constraint matrix of all joints over the moving links' scaled twists.

    Parameters
    ----------
    mech : Mechanism
    poses : ndarray, shape (n_links, 3), optional
        Link poses; the case's own position by default.

    Returns
    -------
    A : ndarray, shape (rows, 3 * (n_links - 1))
        Columns per moving link: ``(w * scale, vx_c, vy_c)`` with ``v_c`` the
        velocity of the link point at the drawing centre.  Rows normalised.
    row_joint : list of str
        Joint name of each row.
    """
    if poses is None:
        poses = mech.reference_poses()
    sp = _shifted(mech, poses)
    n, g, L = mech.n_links, mech.ground_index, mech.scale
    col = _columns(n, g)
    blocks, names = [], []
    for j in mech.joints:
        a, b = (mech.index[x] for x in j.links)
        rows = np.atleast_2d(j.twist_rows(sp[a], sp[b]))
        blocks.append(_scatter(rows, a, b, col, n, L))
        names += [j.name] * rows.shape[0]
    A = np.vstack(blocks) if blocks else np.zeros((0, 3 * (n - 1)))
    return _normalise_rows(A), names


def _columns(n: int, g: int) -> list[int | None]:
    out, c = [], 0
    for i in range(n):
        if i == g:
            out.append(None)
        else:
            out.append(c)
            c += 3
    return out


def _scatter(rows: np.ndarray, a: int, b: int, col, n: int, L: float) -> np.ndarray:
    out = np.zeros((rows.shape[0], 3 * (n - 1)))
    for link, part in ((a, rows[:, 0:3]), (b, rows[:, 3:6])):
        c = col[link]
        if c is None:
            continue
        out[:, c] += part[:, 0] / L
        out[:, c + 1] += part[:, 1]
        out[:, c + 2] += part[:, 2]
    return out


def _normalise_rows(A: np.ndarray) -> np.ndarray:
    if A.size == 0:
        return A
    norms = np.linalg.norm(A, axis=1)
    norms[norms == 0.0] = 1.0
    return A / norms[:, None]


def _rank(s: np.ndarray, rank_tol: float) -> int:
    if s.size == 0 or s[0] == 0.0:
        return 0
    return int(np.sum(s > rank_tol * s[0]))


def numerical_mobility(mech: Mechanism, poses: np.ndarray | None = None, *, rank_tol: float = 1e-9) -> tuple[int, int]:
    """Freedoms of the mechanism at this position from the rank of its velocity constraints.

    Parameters
    ----------
    mech : Mechanism
    poses : ndarray, optional
    rank_tol : float, default 1e-9
        Singular values below ``rank_tol`` times the largest count as zero.

    Returns
    -------
    mobility : int
        ``3 (n - 1) - rank``.
    rank : int
        Rank of the constraint matrix.

    Notes
    -----
    One SVD of a (constraints x 3(n-1)) matrix: O(n^3).  Differs from the
    Gruebler-Kutzbach count where constraints are redundant (a parallelogram
    with a third parallel link) or the position is special (a change point).
    """
    A, _ = constraint_rows(mech, poses)
    s = np.linalg.svd(A, compute_uv=False) if A.size else np.zeros(0)
    r = _rank(s, rank_tol)
    return 3 * (mech.n_links - 1) - r, r


@dataclass(frozen=True)
class VelocityState:
    """Velocities of every link, from the velocity analysis.

    Attributes
    ----------
    link_names : tuple of str
    twists : ndarray, shape (n_links, 3)
        ``(w, vx, vy)`` per link: angular velocity (rad/s) and velocity of the
        link point at the global origin (unit/s).  Ground is zero.
    basis : ndarray, shape (n_drivers, n_links, 3)
        Twists per unit rate of each driver alone (kinematic coefficients).
    driver_joints : tuple of str
    rates : ndarray, shape (n_drivers,)
    mobility : int
        Freedoms from the rank at this position.
    gruebler : int
        Gruebler-Kutzbach count.
    scale : float
        Drawing size used for the relative tests.
    centre : tuple of float
        Drawing centre.
    rest_tol : float
        Relative tolerance of :meth:`is_relative_rest`.
    reference_size : float
        Largest link twist size (see :meth:`twist_size`), the yardstick of relative rest.
    """

    link_names: tuple
    twists: np.ndarray
    basis: np.ndarray
    driver_joints: tuple
    rates: np.ndarray
    mobility: int
    gruebler: int
    scale: float
    centre: tuple
    rest_tol: float
    reference_size: float

    def twist_size(self, t) -> np.ndarray:
        """Size of twist(s) ``t`` (last axis ``(w, vx, vy)``): ``|(w * scale, v at the drawing centre)|``."""
        return _twist_size(np.asarray(t, dtype=float), self.scale, self.centre)

    def relative_twist(self, i: int, j: int) -> np.ndarray:
        """Twist of link i relative to link j."""
        return self.twists[i] - self.twists[j]

    def pole(self, i: int, j: int) -> tuple[float, float, float]:
        """Relative center of links i and j as a homogeneous point (null at relative rest).

        Examples
        --------
        >>> from mechgraph.casefile import demo_mechanism
        >>> m = demo_mechanism()
        >>> v = analyse_velocities(m)
        >>> p = v.pole(m.index["frame"], m.index["crank"])   # the crank pivot
        >>> round(p[0] / p[2], 9) + 0.0, round(p[1] / p[2], 9) + 0.0
        (0.0, 0.0)
        """
        w, vx, vy = self.relative_twist(i, j)
        return (float(-vy), float(vx), float(w))

    def is_relative_rest(self, i: int, j: int) -> bool:
        """True when links i and j have (nearly) the same twist: their velocity pole is undefined."""
        ref = self.reference_size
        if ref == 0.0:
            return True
        return float(self.twist_size(self.relative_twist(i, j))) <= self.rest_tol * ref

    def angular_velocity(self, i: int) -> float:
        return float(self.twists[i, 0])

    def point_velocity(self, i: int, r) -> tuple[float, float]:
        """Velocity of the point of link i at global position r."""
        w, vx, vy = self.twists[i]
        return (float(vx - w * r[1]), float(vy + w * r[0]))


def _twist_size(t: np.ndarray, scale: float, centre) -> np.ndarray:
    w, vx, vy = t[..., 0], t[..., 1], t[..., 2]
    cx, cy = centre
    # the angular part at drawing size, and the velocity at the drawing centre
    return np.sqrt((w * scale) ** 2 + (vx - w * cy) ** 2 + (vy + w * cx) ** 2)


def analyse_velocities(
    mech: Mechanism,
    poses: np.ndarray | None = None,
    *,
    rank_tol: float = 1e-9,
    rest_tol: float = 1e-9,
) -> VelocityState:
    """Solve the twist of every link from the joints and drivers.

    Parameters
    ----------
    mech : Mechanism
    poses : ndarray, shape (n_links, 3), optional
        Link poses; the case's own position by default.
    rank_tol : float, default 1e-9
        Relative singular-value threshold for the rank decisions (mobility,
        singular position).
    rest_tol : float, default 1e-9
        Two links whose relative twist is below this fraction of the largest
        link twist are at relative rest (pole undefined).

    Returns
    -------
    VelocityState

    Raises
    ------
    DriverError
        The number of drivers differs from the freedoms at this position.
    SingularPositionError
        With every driver held the mechanism can still move (a dead point or
        change point): the message names the links that can move and their joints.

    Examples
    --------
    >>> from mechgraph.casefile import demo_mechanism
    >>> m = demo_mechanism()
    >>> v = analyse_velocities(m)
    >>> v.mobility, len(v.driver_joints)
    (1, 1)

    Notes
    -----
    Builds the constraint matrix (2 rows per lower pair, 1 per higher pair) and
    the driver rows, takes one SVD for the rank decisions and solves by least
    squares for every driver's unit rate at once: O(n^3) for n links.
    """
    if poses is None:
        poses = mech.reference_poses()
    n, g, L = mech.n_links, mech.ground_index, mech.scale
    A, row_joint = constraint_rows(mech, poses)
    ncols = 3 * (n - 1)
    s = np.linalg.svd(A, compute_uv=False) if A.size else np.zeros(0)
    rank = _rank(s, rank_tol)
    mobility = ncols - rank
    gm = gruebler_mobility(mech)
    drivers = mech.drivers
    if len(drivers) != mobility:
        _driver_count_error(mech, mobility, gm, len(drivers))
    sp = _shifted(mech, poses)
    col = _columns(n, g)
    D = np.zeros((len(drivers), ncols))
    for k, d in enumerate(drivers):
        j = mech.joint_by_name[d.joint]
        a, b = (mech.index[x] for x in j.links)
        D[k] = _scatter(j.driver_row(sp[a], sp[b])[None, :], a, b, col, n, L)[0]
    dn = np.linalg.norm(D, axis=1) if len(drivers) else np.zeros(0)
    M = np.vstack([A, D / dn[:, None]]) if len(drivers) else A
    u, sv, vt = np.linalg.svd(M, full_matrices=True)
    if _rank(sv, rank_tol) < ncols:
        _singular_error(mech, vt[-1], col, drivers)
    rhs = np.zeros((M.shape[0], len(drivers)))
    for k in range(len(drivers)):
        rhs[A.shape[0] + k, k] = 1.0 / dn[k]
    sol = np.linalg.lstsq(M, rhs, rcond=None)[0] if len(drivers) else np.zeros((ncols, 0))
    cx, cy = mech.centre
    basis = np.zeros((len(drivers), n, 3))
    for i in range(n):
        c = col[i]
        if c is None:
            continue
        w = sol[c] / L
        vcx, vcy = sol[c + 1], sol[c + 2]
        # from the velocity at the drawing centre to the velocity at the origin
        basis[:, i, 0] = w
        basis[:, i, 1] = vcx + w * cy
        basis[:, i, 2] = vcy - w * cx
    rates = np.array([d.rate for d in drivers], dtype=float)
    twists = np.tensordot(rates, basis, axes=1) if len(drivers) else np.zeros((n, 3))
    return VelocityState(
        link_names=mech.link_names,
        twists=twists,
        basis=basis,
        driver_joints=tuple(d.joint for d in drivers),
        rates=rates,
        mobility=mobility,
        gruebler=gm,
        scale=L,
        centre=mech.centre,
        rest_tol=rest_tol,
        reference_size=float(_twist_size(twists, L, mech.centre).max(initial=0.0)),
    )


def _driver_count_error(mech: Mechanism, mobility: int, gm: int, nd: int):
    counted = f" (the Gruebler-Kutzbach count says {gm})" if gm != mobility else ""
    if mobility <= 0:
        raise DriverError(
            f"mechanism '{mech.name}' has no freedom at this position{counted}: it is a structure and cannot be driven; "
            f"remove the {nd} driver(s) or a constraint"
            if nd
            else f"mechanism '{mech.name}' has no freedom at this position{counted}: it is a structure, nothing moves"
        )
    drivable = [j.name for j in mech.joints if j.drive is not None]
    raise DriverError(
        f"mechanism '{mech.name}' has {mobility} freedom(s) at this position{counted} but {nd} driver(s) are given; "
        f"give exactly {mobility}, on revolute or prismatic joints (candidates: {', '.join(drivable)})"
    )


def _singular_error(mech: Mechanism, null: np.ndarray, col, drivers):
    size = np.zeros(mech.n_links)
    for i, c in enumerate(col):
        if c is not None:
            size[i] = np.linalg.norm(null[c : c + 3])
    moving = tuple(mech.link_names[i] for i in np.flatnonzero(size > 1e-6 * max(size.max(), 1e-300)))
    joints = tuple(j.name for j in mech.joints if set(j.links) & set(moving))
    held = ", ".join(f"'{d.joint}'" for d in drivers) or "(none)"
    raise SingularPositionError(
        f"mechanism '{mech.name}': the velocity equations are singular at this position (a dead point or change "
        f"point): with the driver(s) on {held} held still, link(s) {', '.join(repr(x) for x in moving)} can still "
        f"move, through joint(s) {', '.join(repr(x) for x in joints)}. Drive another joint, or analyse a position "
        "away from this one",
        moving_links=moving,
        joints=joints,
    )
