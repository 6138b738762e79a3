"""Numerical velocity analysis: every link's twist, and every relative center as a pole.

Each joint contributes linear conditions on the twists of its two links
(:meth:`mechgraph.joints.Joint.twist_rows`), each driver one more row with its
rate.  With as many drivers as the mechanism has freedoms at this position the
system has one solution: the twist ``(w, vx, vy)`` of every link (``vx, vy``:
velocity of the link point at the global origin).  The relative center of
links i and j is the pole of their relative twist, the homogeneous point
``(-(vy_i - vy_j), vx_i - vx_j, w_i - w_j)``: finite, or at infinity when the
two angular velocities are equal.

The same code runs in every arithmetic of :mod:`mechgraph.arithmetic`: the
joints give their rows in the arithmetic's numbers and the arithmetic does the
rank decisions and the solve (SVD in floating point and high precision, exact
row reduction in exact arithmetic).

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

from .arithmetic import FLOAT
from .errors import DriverError, ModelError, NumberKindError, SingularPositionError
from .model import Mechanism

__all__ = ["VelocityState", "constraint_rows", "numerical_mobility", "analyse_velocities", "gruebler_mobility"]


def gruebler_mobility(mech: Mechanism) -> int:
    """Gruebler-Kutzbach mobility ``M = 3 (n - 1) - 2 j1 - j2``.

    ``j1`` counts one-freedom joints (revolute, prismatic, rolling contact),
    ``j2`` two-freedom joints (pin-in-slot, cam contact, gear mesh).

    Parameters
    ----------
    mech : Mechanism
        The mechanism.

    Returns
    -------
    int
        The counted mobility; it may be below 1 (a structure) and may differ
        from the mobility at a given position (:func:`numerical_mobility`).

    Examples
    --------
    >>> from mechgraph.casefile import demo_mechanism
    >>> gruebler_mobility(demo_mechanism())
    1

    Notes
    -----
    Sums each joint's ``3 - freedoms`` constraints: O(j) for j joints.  It
    counts constraints, not their independence.

    References
    ----------
    Gruebler-Kutzbach criterion, common practice (no single source).
    """
    n = mech.n_links
    return 3 * (n - 1) - sum(j.constraints for j in mech.joints)


def _frame(mech: Mechanism, poses, ar):
    """Link poses about the drawing centre, in the arithmetic's numbers."""
    cx, cy = mech.centre
    if poses is None:
        poses = mech.reference_poses()
    shape = np.shape(poses)
    if shape != (mech.n_links, 3):
        raise ModelError(f"poses must have shape ({mech.n_links}, 3), one (x, y, theta) per link; got {shape}")
    if not np.all(np.isfinite(np.asarray(poses, dtype=float))):
        raise ModelError("poses must be finite numbers")
    if ar is FLOAT or ar.name == "float":
        s = np.array(poses, dtype=float, copy=True)
        s[:, 0] -= cx
        s[:, 1] -= cy
        return s
    out = []
    for x, y, t in np.asarray(poses, dtype=float):
        if t != 0.0 and ar.exact:
            raise NumberKindError(
                "exact arithmetic works at the case's own position only (link rotations must be zero)"
            )
        out.append((ar.num(x) - ar.num(cx), ar.num(y) - ar.num(cy), ar.num(t) if t != 0.0 else 0))
    return out


def _columns(n: int, g: int) -> list[int | None]:
    """First column of each link's twist in the matrix (None for ground, which has none)."""
    out, c = [], 0
    for i in range(n):
        if i == g:
            out.append(None)
        else:
            out.append(c)
            c += 3
    return out


def _scatter(rows, a: int, b: int, col, ncols: int, L, ar) -> list:
    """Rows over (t_a, t_b) -> rows over the moving links' scaled twists ``(w * L, vx_c, vy_c)``."""
    out = []
    for r in rows:
        full = [ar.zero] * ncols
        for link, off in ((a, 0), (b, 3)):
            c = col[link]
            if c is None:
                continue
            full[c] = full[c] + r[off] / L
            full[c + 1] = full[c + 1] + r[off + 1]
            full[c + 2] = full[c + 2] + r[off + 2]
        out.append(full)
    return out


def _rows(mech: Mechanism, frame, ar):
    """Every joint's rows over the moving links' scaled twists, with the joint name of each row."""
    n, g = mech.n_links, mech.ground_index
    col = _columns(n, g)
    ncols = 3 * (n - 1)
    L = ar.num(mech.scale)
    rows, names = [], []
    for j in mech.joints:
        a, b = (mech.index[x] for x in j.links)
        r = _scatter(j.twist_rows(frame[a], frame[b], ar), a, b, col, ncols, L, ar)
        rows += r
        names += [j.name] * len(r)
    return rows, names, col, ncols, L


def constraint_rows(mech: Mechanism, poses: np.ndarray | None = None, *, arithmetic=FLOAT):
    """Velocity constraint matrix of all joints over the moving links' scaled twists.

    Parameters
    ----------
    mech : Mechanism
        The mechanism.
    poses : ndarray, shape (n_links, 3), optional
        Link poses; the case's own position by default.
    arithmetic : optional
        Number kind (:mod:`mechgraph.arithmetic`); floating point by default.

    Returns
    -------
    A : matrix of the arithmetic (ndarray for floats), shape (rows, 3 * (n_links - 1))
        Columns per moving link: ``(w * scale, vx_c, vy_c)`` with ``v_c`` the
        velocity of the link point at the drawing centre.
    row_joint : list of str
        Joint name of each row.

    Raises
    ------
    NumberKindError
        Exact arithmetic at poses with a link rotation.
    ModelError
        A contact joint (cam, rolling) at poses that move its two links
        relative to each other.

    Examples
    --------
    The demo's seven revolutes give two rows each, over five moving links:

    >>> from mechgraph.casefile import demo_mechanism
    >>> A, row_joint = constraint_rows(demo_mechanism())
    >>> A.shape, row_joint[:3]
    ((14, 15), ['O2', 'O2', 'A'])

    Notes
    -----
    Each joint's :meth:`~mechgraph.joints.Joint.twist_rows`, written about the
    drawing centre with the angular column scaled by the drawing size, so
    that the matrix does not depend on the origin or the length unit: O(j n)
    to fill for j joints and n links.

    References
    ----------
    Velocity constraints of planar joints on link twists: common practice, no
    single source.
    """
    ar = arithmetic
    rows, names, _, ncols, _ = _rows(mech, _frame(mech, poses, ar), ar)
    return ar.matrix(rows, ncols), names


def numerical_mobility(
    mech: Mechanism, poses: np.ndarray | None = None, *, rank_tol: float = 1e-9, arithmetic=FLOAT
) -> tuple[int, int]:
    """Freedoms of the mechanism at this position from the rank of its velocity constraints.

    Parameters
    ----------
    mech : Mechanism
        The mechanism.
    poses : ndarray, shape (n_links, 3), optional
        Link poses; the case's own position by default.
    rank_tol : float, default 1e-9
        Singular values below ``rank_tol`` times the largest count as zero
        (rows normalised first); exact arithmetic needs no threshold.
    arithmetic : optional
        Number kind; floating point by default.

    Returns
    -------
    mobility : int
        ``3 (n - 1) - rank``.
    rank : int
        Rank of the constraint matrix.

    Raises
    ------
    NumberKindError
        Exact arithmetic at poses with a link rotation.
    ModelError
        A contact joint at poses that move its two links relative to each other.

    Examples
    --------
    >>> from mechgraph.casefile import demo_mechanism
    >>> numerical_mobility(demo_mechanism())
    (1, 14)

    Notes
    -----
    One SVD of a (constraints x 3(n-1)) matrix: O(n^3).  Differs from the
    Gruebler-Kutzbach count where constraints are redundant (a parallelogram
    with a third parallel link) or the position is special (a change point).

    References
    ----------
    Mobility as the dimension of the null space of the velocity constraints,
    ``3 (n - 1) - rank``: common practice, no single source.
    """
    A, _ = constraint_rows(mech, poses, arithmetic=arithmetic)
    r = arithmetic.rank(A, rank_tol)
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
    arithmetic : object
        The number kind the analysis ran in.
    kind_basis : tuple or None
        For exact and high-precision runs: the basis twists in the
        arithmetic's own numbers, per driver, per link ``(w, vx, vy)``.
    kind_twists : tuple or None
        The twists in the arithmetic's numbers.  In exact arithmetic they are
        proportional to the true twists by :attr:`rate_factor` (a driver rate in
        rpm carries the factor pi/30, which no number field holds).
    rate_factor : object
        Exact common factor of the rates (sympy), 1 when the rates are rational.

    Examples
    --------
    >>> from mechgraph.casefile import demo_mechanism
    >>> m = demo_mechanism()
    >>> v = analyse_velocities(m)
    >>> round(v.angular_velocity(m.index["crank"]), 6)     # 120 rpm
    12.566371
    >>> v.basis.shape, v.driver_joints
    ((1, 6, 3), ('O2',))

    Notes
    -----
    Built by :func:`analyse_velocities`; a frozen record.  The twists are
    ``rates @ basis``, linear in the driver rates.

    References
    ----------
    Twists of planar rigid bodies and their poles (instant centers): common
    practice, no single source.
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
    arithmetic: object = FLOAT
    kind_basis: tuple | None = None
    kind_twists: tuple | None = None
    rate_factor: object = 1

    def twist_size(self, t) -> np.ndarray:
        """Size of twist(s) ``t`` (last axis ``(w, vx, vy)``): ``|(w * scale, v at the drawing centre)|``.

        Parameters
        ----------
        t : array_like, shape (..., 3)
            One twist or an array of twists ``(w, vx, vy)``.

        Returns
        -------
        ndarray, shape (...)
            Their sizes in length units per second.

        Examples
        --------
        >>> from mechgraph.casefile import demo_mechanism
        >>> m = demo_mechanism()
        >>> v = analyse_velocities(m)
        >>> float(v.twist_size((0.0, 3.0, 4.0)))   # a translation: its speed
        5.0

        Notes
        -----
        Vectorised, O(size of ``t``).  Taken at the drawing centre and with
        the angular part at drawing size, so it does not depend on the origin.

        References
        ----------
        mechgraph's own yardstick; common practice, no single source.
        """
        return _twist_size(np.asarray(t, dtype=float), self.scale, self.centre)

    def relative_twist(self, i: int, j: int) -> np.ndarray:
        """Twist of link i relative to link j.

        Parameters
        ----------
        i, j : int
            Link indices (:attr:`mechgraph.model.Mechanism.index`).

        Returns
        -------
        ndarray, shape (3,)
            ``twists[i] - twists[j]``.

        Examples
        --------
        >>> from mechgraph.casefile import demo_mechanism
        >>> m = demo_mechanism()
        >>> v = analyse_velocities(m)
        >>> round(float(v.relative_twist(m.index["crank"], m.index["frame"])[0]), 6)
        12.566371

        Notes
        -----
        One subtraction, O(1).

        References
        ----------
        Relative twists of planar rigid bodies: common practice, no single source.
        """
        return self.twists[i] - self.twists[j]

    def pole(self, i: int, j: int) -> tuple[float, float, float]:
        """Relative center of links i and j as a homogeneous point (null at relative rest).

        Parameters
        ----------
        i, j : int
            Link indices.

        Returns
        -------
        tuple of float
            ``(-(vy_i - vy_j), vx_i - vx_j, w_i - w_j)``: finite, or at infinity
            when the two angular velocities are equal.

        Examples
        --------
        >>> from mechgraph.casefile import demo_mechanism
        >>> m = demo_mechanism()
        >>> v = analyse_velocities(m)
        >>> p = v.pole(m.index["frame"], m.index["crank"])   # the crank pivot
        >>> round(p[0] / p[2], 9) + 0.0, round(p[1] / p[2], 9) + 0.0
        (0.0, 0.0)

        Notes
        -----
        O(1).  The pole of a twist is the point of zero velocity; it is linear
        in the twist, so relative poles add (the Aronhold-Kennedy theorem).

        References
        ----------
        Instant center as the pole of a relative twist: common practice, no
        single source.
        """
        w, vx, vy = self.relative_twist(i, j)
        return (float(-vy), float(vx), float(w))

    def kind_pole(self, i: int, j: int):
        """The pole of pair (i, j) in the arithmetic's own numbers (floats for a float run).

        Parameters
        ----------
        i, j : int
            Link indices.

        Returns
        -------
        triple
            As :meth:`pole`, in the arithmetic's numbers; in exact arithmetic
            proportional to the true pole by :attr:`rate_factor`, which does
            not move the point.

        Examples
        --------
        >>> from mechgraph.casefile import demo_mechanism
        >>> m = demo_mechanism()
        >>> v = analyse_velocities(m)
        >>> v.kind_pole(0, 1) == v.pole(0, 1)   # a float run
        True

        Notes
        -----
        O(1).

        References
        ----------
        Common practice, no single source.
        """
        if self.kind_twists is None:
            return self.pole(i, j)
        (wi, xi, yi), (wj, xj, yj) = self.kind_twists[i], self.kind_twists[j]
        return (yj - yi, xi - xj, wi - wj)

    def is_relative_rest(self, i: int, j: int) -> bool:
        """True when links i and j have (nearly) the same twist: their velocity pole is undefined.

        Exact arithmetic decides it exactly.

        Parameters
        ----------
        i, j : int
            Link indices.

        Returns
        -------
        bool
            In floating point: the relative twist's size (:meth:`twist_size`) is
            at most :attr:`rest_tol` times :attr:`reference_size`; True for
            every pair when nothing moves.

        Examples
        --------
        >>> from mechgraph.casefile import demo_mechanism
        >>> m = demo_mechanism()
        >>> v = analyse_velocities(m)
        >>> v.is_relative_rest(m.index["frame"], m.index["crank"]), v.is_relative_rest(1, 1)
        (False, True)

        Notes
        -----
        One twist size, O(1).

        References
        ----------
        Common practice, no single source.
        """
        if self.kind_twists is not None and self.arithmetic.exact:
            return all(c == self.arithmetic.zero for c in self.kind_pole(i, j))
        ref = self.reference_size
        if ref == 0.0:
            return True
        return float(self.twist_size(self.relative_twist(i, j))) <= self.rest_tol * ref

    def angular_velocity(self, i: int) -> float:
        """Angular velocity of link i, rad/s, counter-clockwise positive.

        Parameters
        ----------
        i : int
            Link index.

        Returns
        -------
        float

        Examples
        --------
        >>> from mechgraph.casefile import demo_mechanism
        >>> m = demo_mechanism()
        >>> v = analyse_velocities(m)
        >>> v.angular_velocity(m.index["frame"])
        0.0

        Notes
        -----
        O(1).

        References
        ----------
        Common practice, no single source.
        """
        return float(self.twists[i, 0])

    def point_velocity(self, i: int, r) -> tuple[float, float]:
        """Velocity of the point of link i at global position r.

        Parameters
        ----------
        i : int
            Link index.
        r : (float, float)
            The point, in global coordinates.

        Returns
        -------
        (float, float)
            ``(vx - w r_y, vy + w r_x)``, length units per second.

        Examples
        --------
        The crank turns at 120 rpm about the origin; its point at (10, 0)
        moves straight up at 10 w:

        >>> from mechgraph.casefile import demo_mechanism
        >>> m = demo_mechanism()
        >>> v = analyse_velocities(m)
        >>> tuple(round(c, 6) + 0.0 for c in v.point_velocity(m.index["crank"], (10.0, 0.0)))
        (0.0, 125.663706)

        Notes
        -----
        O(1).

        References
        ----------
        Velocity of a rigid body point, ``v(r) = v0 + w k x r``: common practice,
        no single source.
        """
        w, vx, vy = self.twists[i]
        return (float(vx - w * r[1]), float(vy + w * r[0]))


def _twist_size(t: np.ndarray, scale: float, centre) -> np.ndarray:
    """Vectorised :meth:`VelocityState.twist_size`."""
    w, vx, vy = t[..., 0], t[..., 1], t[..., 2]
    cx, cy = centre
    # the angular part at drawing size, and the velocity at the drawing centre
    return np.sqrt((w * scale) ** 2 + (vx - w * cy) ** 2 + (vy + w * cx) ** 2)


#: Extra decimal digits with which an exact driver rate (such as 4*pi for 120 rpm)
#: is evaluated for a high-precision run, so that its rounding stays below the
#: arithmetic's own working precision.
RATE_GUARD_DIGITS = 5

#: Working digits assumed for a high-precision arithmetic that does not state
#: its own: the default of :class:`mechgraph.arithmetic.PrecisionArithmetic`.
FALLBACK_DIGITS = 50


def _kind_rates(mech: Mechanism, ar):
    """Driver rates in the arithmetic's numbers (exact: scaled by their common unit factor)."""
    if ar.name == "float":
        return [float(d.rate) for d in mech.drivers], 1
    exact = [d.exact_rate() for d in mech.drivers]
    if not ar.exact:
        digits = getattr(ar, "digits", FALLBACK_DIGITS) + RATE_GUARD_DIGITS
        return [ar.num(str(e.evalf(digits))) for e in exact], 1
    if not exact:
        return [], 1
    from sympy import Rational

    factor = None
    parts = []
    for e in exact:
        coeff, rest = e.as_coeff_Mul()
        if not isinstance(coeff, Rational):
            raise NumberKindError(f"exact arithmetic: the rate {e} is not a rational multiple of a unit factor")
        if factor is None:
            factor = rest
        elif rest != factor and coeff != 0:
            raise NumberKindError(
                "exact arithmetic needs every driver rate in the same unit (rpm, rad_per_s, deg_per_s or speed): "
                f"the rates {', '.join(str(x) for x in exact)} have no common factor"
            )
        parts.append(coeff)
    return [ar.num(str(p)) for p in parts], factor


def analyse_velocities(
    mech: Mechanism,
    poses: np.ndarray | None = None,
    *,
    rank_tol: float = 1e-9,
    rest_tol: float = 1e-9,
    arithmetic=FLOAT,
) -> VelocityState:
    """Solve the twist of every link from the joints and drivers.

    Parameters
    ----------
    mech : Mechanism
        The mechanism, with its drivers.
    poses : ndarray, shape (n_links, 3), optional
        Link poses; the case's own position by default.
    rank_tol : float, default 1e-9
        Relative singular-value threshold for the rank decisions (mobility,
        singular position); exact arithmetic decides exactly.
    rest_tol : float, default 1e-9
        Two links whose relative twist is below this fraction of the largest
        link twist are at relative rest (pole undefined).
    arithmetic : optional
        Number kind (:mod:`mechgraph.arithmetic`); floating point by default.

    Returns
    -------
    VelocityState
        Every link's twist, per unit driver rate and at the given rates.

    Raises
    ------
    DriverError
        The number of drivers differs from the freedoms at this position, or
        every driver rate is zero.
    SingularPositionError
        With every driver held the mechanism can still move (a dead point or
        change point): the message names the links that can move and their joints.
    NumberKindError
        Exact arithmetic at poses with a link rotation, or exact driver rates
        in units with no common factor.
    ModelError
        A contact joint at poses that move its two links relative to each other.

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
    the driver rows, takes the rank decisions and solves for every driver's
    unit rate at once: O(n^3) for n links.

    References
    ----------
    Velocity analysis from the linear constraint equations of the joints, and
    relative centers as poles of relative twists: common practice, no single
    source.
    """
    ar = arithmetic
    n, Lf = mech.n_links, mech.scale
    frame = _frame(mech, poses, ar)
    rowsA, _, col, ncols, L = _rows(mech, frame, ar)
    A = ar.matrix(rowsA, ncols)
    rank = ar.rank(A, rank_tol)
    mobility = ncols - rank
    gm = gruebler_mobility(mech)
    drivers = mech.drivers
    if drivers and all(d.rate == 0 for d in drivers):
        raise DriverError(
            f"mechanism '{mech.name}': every driver rate is zero, so nothing moves and no velocity pole is defined; "
            "give a non-zero rate (the three-centers results need none)"
        )
    rowsD = []
    for d in drivers:
        j = mech.joint_by_name[d.joint]
        a, b = (mech.index[x] for x in j.links)
        rowsD += _scatter([j.driver_row(frame[a], frame[b], ar)], a, b, col, ncols, L, ar)
    if len(drivers) != mobility or mobility <= 0:
        if mobility > gm >= len(drivers) >= 1:
            # as many drivers as the count asks, but the position leaves more freedom: a change point
            M = ar.matrix(rowsA + rowsD, ncols)
            null = [float(ar.to_float(x)) for x in ar.null_vector(M)]
            _singular_error(mech, np.array(null), col, drivers, extra=mobility - gm, gruebler=gm)
        _driver_count_error(mech, mobility, gm, len(drivers))
    M = ar.matrix(rowsA + rowsD, ncols)
    full = ar.rank(M, rank_tol)
    if full < ncols:
        null = [float(ar.to_float(x)) for x in ar.null_vector(M)]
        # drivers whose rows add nothing to the others: locked, or driving a freedom another driver already drives
        dependent = []
        for k, d in enumerate(drivers):
            others = rowsA + rowsD[:k] + rowsD[k + 1 :]
            if ar.rank(ar.matrix(others, ncols), rank_tol) == full:
                dependent.append(d.joint)
        _singular_error(mech, np.array(null), col, drivers, dependent=dependent)
    nd = len(drivers)
    rhs = [[ar.zero] * nd for _ in rowsA] + [[ar.one if c == k else ar.zero for c in range(nd)] for k in range(nd)]
    sol = ar.solve(M, ar.matrix(rhs, nd)) if nd else []
    cx, cy = mech.centre
    ocx, ocy = ar.num(cx), ar.num(cy)
    kind_basis = []
    for k in range(nd):
        links = []
        for i in range(n):
            c = col[i]
            if c is None:
                links.append((ar.zero, ar.zero, ar.zero))
                continue
            w = sol[c][k] / L
            # from the velocity at the drawing centre to the velocity at the origin
            links.append((w, sol[c + 1][k] + w * ocy, sol[c + 2][k] - w * ocx))
        kind_basis.append(tuple(links))
    basis = np.array([[[ar.to_float(x) for x in t] for t in links] for links in kind_basis]).reshape(nd, n, 3)
    rates = np.array([d.rate for d in drivers], dtype=float)
    twists = np.tensordot(rates, basis, axes=1) if nd else np.zeros((n, 3))
    kind_twists = None
    factor = 1
    if ar.name != "float":
        krates, factor = _kind_rates(mech, ar)
        kind_twists = tuple(
            tuple(sum((krates[k] * kind_basis[k][i][c] for k in range(nd)), ar.zero) for c in range(3))
            for i in range(n)
        )
    return VelocityState(
        link_names=mech.link_names,
        twists=twists,
        basis=basis,
        driver_joints=tuple(d.joint for d in drivers),
        rates=rates,
        mobility=mobility,
        gruebler=gm,
        scale=Lf,
        centre=mech.centre,
        rest_tol=rest_tol,
        reference_size=float(_twist_size(twists, Lf, mech.centre).max(initial=0.0)),
        arithmetic=ar,
        kind_basis=tuple(kind_basis) if ar.name != "float" else None,
        kind_twists=kind_twists,
        rate_factor=factor,
    )


def _driver_count_error(mech: Mechanism, mobility: int, gm: int, nd: int):
    """Raise the DriverError for a driver count that differs from the mobility."""
    counted = f" (the Gruebler-Kutzbach count says {gm})" if gm != mobility else ""
    if mobility <= 0:
        raise DriverError(
            f"mechanism '{mech.name}' has no freedom at this position{counted}: "
            f"it is a structure and cannot be driven; remove the {nd} driver(s) or a constraint"
            if nd
            else f"mechanism '{mech.name}' has no freedom at this position{counted}: it is a structure, nothing moves"
        )
    drivable = [j.name for j in mech.joints if j.drive is not None]
    raise DriverError(
        f"mechanism '{mech.name}' has {mobility} freedom(s) at this position{counted} but {nd} driver(s) are given; "
        f"give exactly {mobility}, on revolute or prismatic joints (candidates: {', '.join(drivable)})"
    )


#: A link belongs to a singular motion when its share of the null vector exceeds
#: this fraction of the largest share (a plain threshold on a unit vector).
SINGULAR_SHARE = 1e-6

#: Floor of the largest share in that test, so that the threshold stays
#: positive even for a (numerically) zero null vector: only a link with a share
#: above the floor counts.  Far below any real share, so it changes nothing else.
NULL_SHARE_FLOOR = 1e-300


def _singular_error(mech: Mechanism, null: np.ndarray, col, drivers, *, dependent=(), extra=0, gruebler=None):
    """Raise the SingularPositionError naming the links that move in the null vector, and why."""
    size = np.zeros(mech.n_links)
    for i, c in enumerate(col):
        if c is not None:
            size[i] = np.linalg.norm(null[c : c + 3])
    moving = tuple(
        mech.link_names[i] for i in np.flatnonzero(size > SINGULAR_SHARE * max(size.max(), NULL_SHARE_FLOOR))
    )
    joints = tuple(j.name for j in mech.joints if set(j.links) & set(moving))
    held = ", ".join(f"'{d.joint}'" for d in drivers) or "(none)"
    links = ", ".join(repr(x) for x in moving)
    still = (
        f"with the driver(s) on {held} held still, link(s) {links} can still move, through joint(s) "
        f"{', '.join(repr(x) for x in joints)}"
    )
    if extra:
        why = (
            f"at this position the joints leave {extra} more freedom than the Gruebler-Kutzbach count ({gruebler}): "
            f"a change point (links folded into line, or parallel and equal); {still}. Analyse a position away from it"
        )
    elif len(dependent) == 1 and len(drivers) == 1:
        why = (
            f"the driver on '{dependent[0]}' cannot move the mechanism at this position: its joint is locked by the "
            f"rest of the linkage here (a dead point); {still}. "
            "Drive another joint, or analyse a position away from this one"
        )
    elif dependent:
        names = " and ".join(f"'{x}'" for x in dependent)
        why = (
            f"the drivers on {names} are not independent at this position: together they set a freedom one of them "
            f"already sets (over-driven), or one is locked; {still}. Move one of these drivers to a joint of {links}"
        )
    else:
        why = f"the velocity equations are singular at this position (a dead point or change point): {still}"
    raise SingularPositionError(
        f"mechanism '{mech.name}': {why}",
        moving_links=moving,
        joints=joints,
    )
