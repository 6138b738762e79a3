"""Joint kinds: what each one says about the two links it joins.

Every joint kind is a frozen dataclass with the same small interface, so the
topology, the three-centers solver, the velocity analysis and (later) the
position analysis treat all kinds alike:

``kind``
    The name used in case files.
``freedoms``
    Relative freedoms the joint leaves (1 for revolute, prismatic and rolling
    contact; 2 for the higher pairs pin-in-slot, cam contact and gear mesh).
    Gruebler-Kutzbach counts ``3 - freedoms`` constraints per joint.
``drive``
    ``"rotation"``, ``"sliding"`` or ``None``: which input rate the joint can take.
``primary(pose_a, pose_b)``
    What the joint alone says of the relative center of its two links: a
    homogeneous point, or a homogeneous locus line (the common normal).
``twist_rows(pose_a, pose_b)``
    Its velocity constraints as rows over the twists ``(w, vx, vy)`` of link a
    then link b (``vx, vy``: velocity of the link point at the global origin).
    These rows are the Jacobian of ``residual`` in twist coordinates.
``residual(pose_a, pose_b)``
    Its position constraint equations at link poses ``(x, y, theta)``.
``driver_row(pose_a, pose_b)``
    For drivable joints: the row whose value is the input rate.

Every method takes an optional arithmetic (:mod:`mechgraph.arithmetic`) and
computes in its numbers, so the same code serves floating point, exact and
high-precision analyses.  Rows are lists of numbers of that kind.

Geometry is stored in the links' own frames.  A case describes one position,
and every link frame coincides with the global frame in that position, so the
stored coordinates are the drawing's coordinates; a new position is a new set
of link poses.  To add a kind, see DEVELOPERS.md.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import ClassVar, NamedTuple

import numpy as np

from . import projective as pg
from .arithmetic import FLOAT
from .errors import ModelError

__all__ = [
    "Primary",
    "Joint",
    "Revolute",
    "Prismatic",
    "PinInSlot",
    "RollingContact",
    "GearMesh",
    "CamContact",
    "JOINT_KINDS",
    "GEAR_DISTANCE_TOL",
    "PITCH_POINT_TOL",
    "place",
    "rotate",
]

Vec = tuple[float, float]

#: Relative tolerance of the centre-distance check of a gear pair given by its
#: pitch radii: the distance between the two centres must equal ``r1 + r2``
#: (external) or ``|r1 - r2|`` (internal) to this fraction of the larger of the
#: two.  Radii and centres are typed separately, each to a few significant
#: digits, so the test is looser than the coincidence tolerances (1e-9); one part
#: in a million still refuses a slip in any of the first six significant digits.
GEAR_DISTANCE_TOL = 1e-6

#: Tolerance of the agreement between a pitch point given in code together with
#: the radii and the pitch point the radii put on the line of centres:
#: ``|P_given - P_radii| <= PITCH_POINT_TOL * |C1 C2|`` (relative to the centre
#: distance, so it does not depend on units or on where the gears lie).  The same figure as the default
#: :attr:`mechgraph.model.Mechanism.coincidence_tol`: both say "the same point".
PITCH_POINT_TOL = 1e-9


class Primary(NamedTuple):
    """What one joint alone says of its pair's relative center.

    Exactly one of ``point`` and ``line`` is set: a located center, or a line
    the center lies on.  ``note`` says why, in words for the derivation.

    Attributes
    ----------
    point : triple or None
        The relative center as a homogeneous point (:mod:`mechgraph.projective`).
    line : triple or None
        A homogeneous line the relative center lies on (the locus of a
        one-constraint contact).
    note : str
        The reason, as it appears in the derivation.

    Examples
    --------
    >>> Revolute("A", ("crank", "coupler"), at=(30.0, 40.0)).primary((0.0, 0.0, 0.0), (0.0, 0.0, 0.0))
    Primary(point=(30.0, 40.0, 1.0), line=None, note="pin of revolute 'A'")

    Notes
    -----
    A plain named tuple; the seeds of the three-centers solver
    (:mod:`mechgraph.three_centers`) are built from it.

    References
    ----------
    Primary centers of the joint kinds: common practice, no single source.
    """

    point: tuple | None
    line: tuple | None
    note: str


def rotate(v: Vec, theta: float) -> Vec:
    """Rotate vector ``v`` by ``theta`` radians (counter-clockwise), in floats.

    Parameters
    ----------
    v : (float, float)
        The vector.
    theta : float
        Angle in radians, counter-clockwise positive.

    Returns
    -------
    (float, float)
        ``(cos theta vx - sin theta vy, sin theta vx + cos theta vy)``; ``v``
        itself (as floats) when ``theta == 0``.

    Examples
    --------
    >>> import math
    >>> tuple(round(c, 12) + 0.0 for c in rotate((1.0, 0.0), math.pi / 2))
    (0.0, 1.0)

    Notes
    -----
    The float arithmetic's rotation (:class:`mechgraph.arithmetic.FloatArithmetic`):
    one sine, one cosine and four products, O(1).

    References
    ----------
    Plane rotation matrix: common practice, no single source.
    """
    return FLOAT.rotate(v, theta)


def place(local: Vec, pose) -> Vec:
    """Global position of a link point given in the link's frame, at link pose ``(x, y, theta)``, in floats.

    Parameters
    ----------
    local : (float, float)
        The point in the link's own frame (the drawing's coordinates, since
        every link frame coincides with the global frame in the drawn position).
    pose : (float, float, float)
        Link pose ``(x, y, theta)``: the frame's origin and rotation.

    Returns
    -------
    (float, float)
        ``(x, y) + R(theta) local``.

    Examples
    --------
    >>> place((1.0, 0.0), (2.0, 3.0, 0.0))
    (3.0, 3.0)

    Notes
    -----
    One :func:`rotate` and a translation, O(1).

    References
    ----------
    Rigid placement by rotation and translation: common practice, no single source.
    """
    return FLOAT.place(local, pose)


def _point_rows(r) -> list:
    """Rows of ``v_a(r) - v_b(r) = 0`` over ``(w_a, vx_a, vy_a, w_b, vx_b, vy_b)``."""
    x, y = r
    one, zero = x * 0 + 1, x * 0
    return [
        [-y, one, zero, y, -one, zero],
        [x, zero, one, -x, zero, -one],
    ]


def _along_row(r, n) -> list:
    """Row of ``n . (v_a(r) - v_b(r))`` over the two twists."""
    x, y = r
    nx, ny = n
    m = ny * x - nx * y
    return [m, nx, ny, -m, -nx, -ny]


def _same_pose(pa, pb) -> bool:
    """True when two link poses are exactly equal."""
    return pa[0] == pb[0] and pa[1] == pb[1] and pa[2] == pb[2]


def _contact_at(joint, pose_a, pose_b, ar):
    """The contact point of a rolling or sliding contact: only where the two links keep their drawn relative pose.

    Elsewhere the contact moves along the profiles, which are not modelled.
    """
    if not _same_pose(pose_a, pose_b):
        raise ModelError(
            f"{joint.label()}: at link poses other than the drawn one the contact point moves along the profiles, "
            "which mechgraph does not model; analyse the drawn position (or draw the new one)"
        )
    return ar.place(joint.at, pose_a)


def _unit(v: Vec, what: str) -> Vec:
    """``v`` as a unit vector; a ModelError naming ``what`` if it is zero or not finite."""
    n = math.hypot(v[0], v[1])
    if not (n > 0.0) or not math.isfinite(n):
        raise ModelError(f"{what} must be a non-zero, finite direction, got {list(v)}")
    return (v[0] / n, v[1] / n)


def _direction(ar, given: Vec, deg, theta):
    """A direction in the arithmetic ``ar``: from degrees when given (exact trigonometry), else the given vector."""
    if deg is not None:
        v = ar.trig_deg(deg)
    elif ar.name == "float":
        n = math.hypot(given[0], given[1])  # unit in floating point: residuals then measure lengths
        v = (given[0] / n, given[1] / n)
    else:
        v = (ar.num(given[0]), ar.num(given[1]))  # exact: as given (the constraints are homogeneous in it)
    return ar.rotate(v, theta) if theta != 0 else v


def _set_direction(joint, field_name: str, deg_name: str):
    """Shared __post_init__ of a direction field: degrees (if given) define it; keep the raw, store a unit vector."""
    deg = getattr(joint, deg_name)
    what = f"{joint.label()}: field '{field_name}'"
    if deg is not None:
        if not math.isfinite(deg):
            raise ModelError(f"{what}: the angle must be finite, got {deg!r}")
        r = math.radians(deg)
        raw = (math.cos(r), math.sin(r))
    else:
        raw = tuple(getattr(joint, field_name))
        if len(raw) != 2:
            raise ModelError(f"{what} must be a direction [dx, dy], got {list(raw)}")
    object.__setattr__(joint, "_given_" + field_name, raw)
    object.__setattr__(joint, field_name, _unit(raw, what))


@dataclass(frozen=True)
class Joint:
    """Base of every joint kind: a named joint between two named links.

    Parameters
    ----------
    name : str
        The joint's name, unique in its mechanism.
    links : (str, str)
        Names of the two links it joins.  The order matters: a driver sets the
        motion of the second link relative to the first, and a guide, slot or
        profile normal belongs to a stated one of the two.

    Attributes
    ----------
    kind : str
        Case-file name of the kind (class variable).
    freedoms : int
        Relative freedoms the joint leaves, 1 or 2 (class variable).
    drive : str or None
        ``"rotation"``, ``"sliding"`` or ``None``: the input rate it can take.
    locates_point : bool
        True when its primary information is a located point.

    Examples
    --------
    The base class only states the interface; every kind derives from it:

    >>> j = Revolute("A", ("crank", "coupler"), at=(30.0, 40.0))
    >>> isinstance(j, Joint), j.kind, j.freedoms, j.constraints, j.drive
    (True, 'revolute', 1, 2, 'rotation')

    Notes
    -----
    Every method of every kind costs O(1): a few products in the
    arithmetic's numbers.  To add a kind, see DEVELOPERS.md.

    References
    ----------
    Joint freedoms and constraints of planar mechanisms, as the
    Gruebler-Kutzbach count takes them: common practice, no single source.
    """

    name: str
    links: tuple[str, str]

    kind: ClassVar[str] = "joint"
    freedoms: ClassVar[int] = 1
    drive: ClassVar[str | None] = None
    #: True when the joint's primary information is a located point (two
    #: such joints on one pair lock it or say the same thing).
    locates_point: ClassVar[bool] = True

    @property
    def constraints(self) -> int:
        """Number of scalar constraints (3 - freedoms), as Gruebler-Kutzbach counts them.

        Examples
        --------
        >>> PinInSlot("P", ("rocker", "slotted"), at=(10.0, 0.0), slot=(0.0, 1.0)).constraints
        1
        """
        return 3 - self.freedoms

    def label(self) -> str:
        """The joint as named in messages: ``kind 'name' (a-b)``.

        Returns
        -------
        str

        Examples
        --------
        >>> Revolute("A", ("crank", "coupler")).label()
        "revolute joint 'A' (crank-coupler)"

        Notes
        -----
        String formatting, O(1).

        References
        ----------
        Common practice, no single source.
        """
        return f"{self.kind} joint '{self.name}' ({self.links[0]}-{self.links[1]})"

    def reference_points(self) -> tuple[Vec, ...]:
        """The drawing points of the joint (for scale and checks).

        Returns
        -------
        tuple of (float, float)
            The points that fix the joint in the drawing: a pin, a contact
            point, gear centres and pitch point.

        Raises
        ------
        NotImplementedError
            On the base class; every kind implements it.

        Examples
        --------
        >>> GearMesh("G", ("pinion", "wheel"), centers=((0.0, 0.0), (30.0, 0.0)), radii=(10.0, 20.0)).reference_points()
        ((0.0, 0.0), (30.0, 0.0), (10.0, 0.0))

        Notes
        -----
        O(1).  The mechanism's drawing size (:attr:`mechgraph.model.Mechanism.scale`)
        is the diagonal of the bounding box of all of them.

        References
        ----------
        Common practice, no single source.
        """
        raise NotImplementedError

    def directions(self) -> tuple:
        """The joint's directions as given: ``(vector, degrees or None)`` pairs (for exact arithmetic).

        Returns
        -------
        tuple of (vector, float or None)
            One pair per direction field: the vector as typed (before it is
            made a unit vector), and the angle in degrees when the direction
            was given as an angle.  Empty for kinds without directions.

        Examples
        --------
        >>> Prismatic("S", ("frame", "ram"), axis=(3.0, 4.0)).directions()
        (((3.0, 4.0), None),)
        >>> Revolute("A", ("crank", "coupler")).directions()
        ()

        Notes
        -----
        O(1).  The exact arithmetic builds its number field from these.

        References
        ----------
        Common practice, no single source.
        """
        return ()

    def exact_inputs(self) -> tuple:
        """Further numbers the joint's geometry is built from (for exact arithmetic).

        Returns
        -------
        tuple of float
            Numbers other than coordinates and directions (a gear pair's pitch
            radii); empty for most kinds.

        Examples
        --------
        >>> GearMesh("G", ("pinion", "wheel"), centers=((0.0, 0.0), (30.0, 0.0)), radii=(10.0, 20.0)).exact_inputs()
        (10.0, 20.0)

        Notes
        -----
        O(1).

        References
        ----------
        Common practice, no single source.
        """
        return ()

    def primary(self, pose_a, pose_b, ar=FLOAT) -> Primary:  # pragma: no cover - interface
        """What the joint alone says of the relative center of its two links.

        Parameters
        ----------
        pose_a, pose_b : (x, y, theta)
            Poses of the first and second link; ``(0, 0, 0)`` is the drawn position.
        ar : arithmetic, default :data:`mechgraph.arithmetic.FLOAT`
            Number kind of the result (:mod:`mechgraph.arithmetic`).

        Returns
        -------
        Primary
            A homogeneous point (the center located), or a homogeneous line
            (the center lies on it), and the words for the derivation.

        Raises
        ------
        NotImplementedError
            On the base class; every kind implements it.
        ModelError
            For a contact kind, at link poses other than the drawn relative pose.

        Examples
        --------
        >>> zero = (0.0, 0.0, 0.0)
        >>> Revolute("A", ("crank", "coupler"), at=(30.0, 40.0)).primary(zero, zero).point
        (30.0, 40.0, 1.0)

        Notes
        -----
        O(1).  These are the seeds of the three-centers solver.

        References
        ----------
        Primary centers of the joint kinds: common practice, no single source.
        """
        raise NotImplementedError

    def twist_rows(self, pose_a, pose_b, ar=FLOAT) -> list:  # pragma: no cover - interface
        """The joint's velocity constraints, rows over ``(w_a, vx_a, vy_a, w_b, vx_b, vy_b)``.

        ``(w, vx, vy)`` is a link's twist: its angular velocity and the
        velocity of its point at the global origin.  Each row dotted with the
        two twists is zero when the joint holds.

        Parameters
        ----------
        pose_a, pose_b : (x, y, theta)
            Poses of the first and second link.
        ar : arithmetic, default :data:`mechgraph.arithmetic.FLOAT`
            Number kind of the rows.

        Returns
        -------
        list of list
            ``constraints`` rows of six numbers each.

        Raises
        ------
        NotImplementedError
            On the base class; every kind implements it.
        ModelError
            For a contact kind, at link poses other than the drawn relative pose.

        Examples
        --------
        A rotation of the coupler about the pin at (30, 40) satisfies both rows:

        >>> zero = (0.0, 0.0, 0.0)
        >>> rows = Revolute("A", ("crank", "coupler"), at=(30.0, 40.0)).twist_rows(zero, zero)
        >>> t = (0.0, 0.0, 0.0, 1.0, 40.0, -30.0)
        >>> [sum(a * b for a, b in zip(row, t)) for row in rows]
        [0.0, 0.0]

        Notes
        -----
        O(1).  The rows are the Jacobian of :meth:`residual` in twist
        coordinates (a test checks it by finite differences).

        References
        ----------
        Velocity of a rigid body point, ``v(r) = v0 + w k x r``: common practice,
        no single source.
        """
        raise NotImplementedError

    def residual(self, pose_a, pose_b) -> np.ndarray:
        """Position constraint residuals; kinds without a profile model raise.

        Parameters
        ----------
        pose_a, pose_b : (x, y, theta)
            Poses of the first and second link.

        Returns
        -------
        ndarray, shape (constraints,)
            Zero where the joint holds (lengths in drawing units, angles in radians).

        Raises
        ------
        ModelError
            On kinds whose position depends on contact profiles (cam, rolling
            contact, gear mesh), which mechgraph does not model.

        Examples
        --------
        Turning the second link about the pin keeps the pin together:

        >>> Revolute("A", ("crank", "coupler"), at=(0.0, 0.0)).residual((0.0, 0.0, 0.0), (0.0, 0.0, 0.5))
        array([0., 0.])

        Notes
        -----
        O(1).  :func:`mechgraph.position.assemble` solves these by Newton's method.

        References
        ----------
        Loop-closure constraints of planar joints: common practice, no single source.
        """
        raise ModelError(
            f"{self.label()}: position analysis of a {self.kind} joint needs the contact profiles, "
            "which mechgraph does not model yet; velocity analysis at the given position works"
        )

    def driver_row(self, pose_a, pose_b, ar=FLOAT) -> list:
        """Row over the two twists whose value is the input rate of this joint.

        Parameters
        ----------
        pose_a, pose_b : (x, y, theta)
            Poses of the first and second link.
        ar : arithmetic, default :data:`mechgraph.arithmetic.FLOAT`
            Number kind of the row.

        Returns
        -------
        list
            Six numbers over ``(w_a, vx_a, vy_a, w_b, vx_b, vy_b)``.

        Raises
        ------
        ModelError
            On kinds that cannot take a driver (only revolute and prismatic can).

        Examples
        --------
        A revolute's input is the relative rotation rate ``w_b - w_a``:

        >>> Revolute("O2", ("frame", "crank")).driver_row((0.0, 0.0, 0.0), (0.0, 0.0, 0.0))
        [-1.0, 0.0, 0.0, 1.0, 0.0, 0.0]

        Notes
        -----
        O(1).

        References
        ----------
        Common practice, no single source.
        """
        raise ModelError(
            f"{self.label()} cannot take a driver; drivers go on revolute joints (rotation rate) "
            "or prismatic joints (sliding speed)"
        )


@dataclass(frozen=True)
class Revolute(Joint):
    """Pin joint at ``at``: the relative center is the pin.

    A driver on it sets ``w_b - w_a``, the rotation rate of the second link
    relative to the first (counter-clockwise positive).

    Parameters
    ----------
    name : str
        Joint name.
    links : (str, str)
        The two links it pins together.
    at : (float, float), default (0, 0)
        The pin centre.

    Examples
    --------
    >>> zero = (0.0, 0.0, 0.0)
    >>> j = Revolute("A", ("crank", "coupler"), at=(30.0, 40.0))
    >>> j.primary(zero, zero).point
    (30.0, 40.0, 1.0)
    >>> len(j.twist_rows(zero, zero)), j.constraints
    (2, 2)

    Notes
    -----
    Two constraints: the pin's velocity is the same on both links.  O(1) per
    method.

    References
    ----------
    A revolute joint is the relative center of the two links it joins: common
    practice, no single source.
    """

    at: Vec = (0.0, 0.0)

    kind: ClassVar[str] = "revolute"
    freedoms: ClassVar[int] = 1
    drive: ClassVar[str | None] = "rotation"

    def reference_points(self):
        """The pin, ``(at,)``; see :meth:`Joint.reference_points`."""
        return (self.at,)

    def primary(self, pose_a, pose_b, ar=FLOAT) -> Primary:
        """The pin as a finite homogeneous point; parameters and result as :meth:`Joint.primary`."""
        x, y = ar.place(self.at, pose_a)
        return Primary((x, y, ar.one), None, f"pin of revolute '{self.name}'")

    def twist_rows(self, pose_a, pose_b, ar=FLOAT) -> list:
        """Two rows, ``v_a(pin) = v_b(pin)``; parameters and result as :meth:`Joint.twist_rows`."""
        return _point_rows(ar.place(self.at, pose_a))

    def residual(self, pose_a, pose_b) -> np.ndarray:
        """The gap between the pin as placed by each link, ``(dx, dy)``; see :meth:`Joint.residual`."""
        a = place(self.at, pose_a)
        b = place(self.at, pose_b)
        return np.array([a[0] - b[0], a[1] - b[1]])

    def driver_row(self, pose_a, pose_b, ar=FLOAT) -> list:
        """The row of ``w_b - w_a``; parameters and result as :meth:`Joint.driver_row`."""
        o, z = ar.one, ar.zero
        return [-o, z, z, o, z, z]


@dataclass(frozen=True)
class Prismatic(Joint):
    """Slider on a straight guide: the guide is on the first link, the slider the second.

    ``at`` is a point of the guide line (and of the slider) and ``axis`` the
    sliding direction.  The relative center lies at infinity, perpendicular to
    the axis.  A driver on it sets the sliding speed of the slider along
    ``axis`` relative to the guide.

    Parameters
    ----------
    name : str
        Joint name.
    links : (str, str)
        The guide's link, then the slider's.
    at : (float, float), default (0, 0)
        A point of the guide line.
    axis : (float, float), default (1, 0)
        Sliding direction (any length; stored as a unit vector).
    axis_deg : float, optional
        Sliding direction in degrees from +x; when given it defines ``axis``.

    Raises
    ------
    ModelError
        A zero, non-finite or malformed direction.

    Examples
    --------
    >>> zero = (0.0, 0.0, 0.0)
    >>> j = Prismatic("S", ("frame", "ram"), at=(0.0, 10.0), axis=(0.0, 2.0))
    >>> j.axis
    (0.0, 1.0)
    >>> j.primary(zero, zero).point        # at infinity, perpendicular to the axis
    (-1.0, 0.0, 0.0)
    >>> j.residual(zero, (0.0, 5.0, 0.0)) + 0.0   # sliding along the axis keeps the joint
    array([0., 0.])

    Notes
    -----
    Two constraints: no relative rotation, and no relative velocity across
    the axis.  O(1) per method.

    References
    ----------
    A prismatic joint's center lies at infinity, perpendicular to the sliding
    axis: common practice, no single source.
    """

    at: Vec = (0.0, 0.0)
    axis: Vec = (1.0, 0.0)
    axis_deg: float | None = None

    kind: ClassVar[str] = "prismatic"
    freedoms: ClassVar[int] = 1
    drive: ClassVar[str | None] = "sliding"

    def __post_init__(self):
        _set_direction(self, "axis", "axis_deg")

    def reference_points(self):
        """The guide point, ``(at,)``; see :meth:`Joint.reference_points`."""
        return (self.at,)

    def directions(self):
        """The axis as given; see :meth:`Joint.directions`."""
        return ((self._given_axis, self.axis_deg),)

    def _axis(self, pose_a, ar=FLOAT):
        """The axis as given (not made unit), turned with the guide's link."""
        return _direction(ar, self._given_axis, self.axis_deg, pose_a[2])

    def primary(self, pose_a, pose_b, ar=FLOAT) -> Primary:
        """The point at infinity normal to the axis; parameters and result as :meth:`Joint.primary`."""
        ux, uy = self._axis(pose_a, ar)
        return Primary((-uy, ux, ar.zero), None, f"perpendicular to the axis of prismatic '{self.name}', at infinity")

    def twist_rows(self, pose_a, pose_b, ar=FLOAT) -> list:
        """Equal angular velocities, and no relative velocity across the axis; see :meth:`Joint.twist_rows`."""
        ux, uy = self._axis(pose_a, ar)
        r = ar.place(self.at, pose_a)
        o, z = ar.one, ar.zero
        return [[o, z, z, -o, z, z], _along_row(r, (-uy, ux))]

    def residual(self, pose_a, pose_b) -> np.ndarray:
        """Relative rotation, and the offset across the axis times ``|axis|``; see :meth:`Joint.residual`."""
        ux, uy = self._axis(pose_a)
        a = place(self.at, pose_a)
        b = place(self.at, pose_b)
        return np.array([pose_a[2] - pose_b[2], -uy * (a[0] - b[0]) + ux * (a[1] - b[1])])

    def driver_row(self, pose_a, pose_b, ar=FLOAT) -> list:
        """The slider's speed along the unit axis relative to the guide; see :meth:`Joint.driver_row`."""
        ux, uy = self._axis(pose_a, ar)
        n = ar.sqrt(ux * ux + uy * uy)
        r = ar.place(self.at, pose_a)
        return [-c for c in _along_row(r, (ux / n, uy / n))]


@dataclass(frozen=True)
class _PointOnLine(Joint):
    """Shared math of the one-constraint contacts: a point of link a stays on a line of link b.

    The constraint is ``n . (v_a(c) - v_b(c)) = 0`` with ``n`` the common
    normal; the relative center lies on the normal line through ``c``.
    """

    at: Vec = (0.0, 0.0)

    freedoms: ClassVar[int] = 2
    locates_point: ClassVar[bool] = False

    def reference_points(self):
        """The contact point, ``(at,)``; see :meth:`Joint.reference_points`."""
        return (self.at,)

    def _normal(self, pose_b, ar=FLOAT):  # pragma: no cover - interface
        """The common normal, turned with the second link."""
        raise NotImplementedError

    def _point(self, pose_a, pose_b, ar):
        """The contact point, carried by the first link."""
        return ar.place(self.at, pose_a)

    def primary(self, pose_a, pose_b, ar=FLOAT) -> Primary:
        """The normal line through the contact point; parameters and result as :meth:`Joint.primary`."""
        c = self._point(pose_a, pose_b, ar)
        nx, ny = self._normal(pose_b, ar)
        line = pg.join((c[0], c[1], ar.one), (nx, ny, ar.zero))
        return Primary(None, line, self._locus_note())

    def _locus_note(self) -> str:  # pragma: no cover - interface
        """Words for the derivation."""
        raise NotImplementedError

    def twist_rows(self, pose_a, pose_b, ar=FLOAT) -> list:
        """One row, no relative velocity along the normal at the contact; see :meth:`Joint.twist_rows`."""
        return [_along_row(self._point(pose_a, pose_b, ar), self._normal(pose_b, ar))]


@dataclass(frozen=True)
class PinInSlot(_PointOnLine):
    """A pin on the first link running in a straight slot of the second.

    ``at`` is the pin centre, ``slot`` the slot direction.  One constraint:
    the relative center lies on the line through the pin normal to the slot.

    Parameters
    ----------
    name : str
        Joint name.
    links : (str, str)
        The pin's link, then the slotted link.
    at : (float, float), default (0, 0)
        The pin centre.
    slot : (float, float), default (1, 0)
        Slot direction (any length; stored as a unit vector).
    slot_deg : float, optional
        Slot direction in degrees from +x; when given it defines ``slot``.

    Raises
    ------
    ModelError
        A zero, non-finite or malformed direction.

    Examples
    --------
    A vertical slot: the center lies on the horizontal line y = 0 through the pin.

    >>> zero = (0.0, 0.0, 0.0)
    >>> j = PinInSlot("P", ("rocker", "slotted"), at=(10.0, 0.0), slot=(0.0, -1.0))
    >>> j.primary(zero, zero).line
    (0.0, 1.0, 0.0)
    >>> j.residual(zero, (0.0, 3.0, 0.0)) + 0.0   # the pin runs along the slot
    array([0.])

    Notes
    -----
    One constraint (a higher pair): no relative velocity of the pin across
    the slot.  O(1) per method.

    References
    ----------
    A sliding contact's center lies on the common normal at the contact point:
    common practice, no single source.
    """

    slot: Vec = (1.0, 0.0)
    slot_deg: float | None = None

    kind: ClassVar[str] = "pin_in_slot"

    def __post_init__(self):
        _set_direction(self, "slot", "slot_deg")

    def directions(self):
        """The slot direction as given; see :meth:`Joint.directions`."""
        return ((self._given_slot, self.slot_deg),)

    def _normal(self, pose_b, ar=FLOAT):
        """The slot direction turned a quarter turn, with the slotted link."""
        ux, uy = _direction(ar, self._given_slot, self.slot_deg, pose_b[2])
        return (-uy, ux)

    def _locus_note(self) -> str:
        """Words for the derivation."""
        return f"normal to the slot through the pin of pin-in-slot '{self.name}'"

    def residual(self, pose_a, pose_b) -> np.ndarray:
        """The pin's offset across the slot (times ``|slot|``); see :meth:`Joint.residual`."""
        ux, uy = _direction(FLOAT, self._given_slot, self.slot_deg, pose_b[2])
        a = place(self.at, pose_a)
        b = place(self.at, pose_b)
        return np.array([-uy * (a[0] - b[0]) + ux * (a[1] - b[1])])


@dataclass(frozen=True)
class CamContact(_PointOnLine):
    """Sliding contact of two profiles (cam and follower) at ``at`` with common normal ``normal``.

    The normal is held by the second link's profile.  One constraint: the
    relative center lies on the common normal.  Velocity analysis only needs
    the contact point and normal of this position; position analysis would
    need the profiles and is not modelled.

    Parameters
    ----------
    name : str
        Joint name.
    links : (str, str)
        The two links in contact; the second holds the normal.
    at : (float, float), default (0, 0)
        The contact point.
    normal : (float, float), default (0, 1)
        Common normal of the two profiles at the contact (any length; stored
        as a unit vector).
    normal_deg : float, optional
        Normal direction in degrees from +x; when given it defines ``normal``.

    Raises
    ------
    ModelError
        A zero, non-finite or malformed direction.

    Examples
    --------
    A flat-faced follower touching at (0, 25) with a vertical normal: the
    center lies on the line x = 0.

    >>> zero = (0.0, 0.0, 0.0)
    >>> j = CamContact("K", ("follower", "cam"), at=(0.0, 25.0), normal=(0.0, 1.0))
    >>> j.primary(zero, zero).line
    (-1.0, 0.0, 0.0)
    >>> j.freedoms, j.drive
    (2, None)

    Notes
    -----
    One constraint (a higher pair): no relative velocity along the common
    normal at the contact.  Only the drawn relative pose of the two links is
    modelled; elsewhere :meth:`primary` and :meth:`twist_rows` raise
    ModelError.  O(1) per method.

    References
    ----------
    A sliding contact's center lies on the common normal at the contact point:
    common practice, no single source.
    """

    normal: Vec = (0.0, 1.0)
    normal_deg: float | None = None

    kind: ClassVar[str] = "cam"

    def __post_init__(self):
        _set_direction(self, "normal", "normal_deg")

    def directions(self):
        """The normal as given; see :meth:`Joint.directions`."""
        return ((self._given_normal, self.normal_deg),)

    def _normal(self, pose_b, ar=FLOAT):
        """The common normal as given, turned with the second link."""
        return _direction(ar, self._given_normal, self.normal_deg, pose_b[2])

    def _point(self, pose_a, pose_b, ar):
        """The contact point, only at the drawn relative pose."""
        return _contact_at(self, pose_a, pose_b, ar)

    def _locus_note(self) -> str:
        """Words for the derivation."""
        return f"common normal of cam contact '{self.name}'"


@dataclass(frozen=True)
class RollingContact(Joint):
    """Rolling without slip of two profiles at the contact point ``at``: the relative center.

    Parameters
    ----------
    name : str
        Joint name.
    links : (str, str)
        The two rolling links.
    at : (float, float), default (0, 0)
        The contact point.

    Examples
    --------
    A wheel rolling on the frame, touching at (5, 0):

    >>> zero = (0.0, 0.0, 0.0)
    >>> j = RollingContact("R", ("frame", "wheel"), at=(5.0, 0.0))
    >>> j.primary(zero, zero).point
    (5.0, 0.0, 1.0)
    >>> j.constraints
    2

    Notes
    -----
    Two constraints: the contact point has the same velocity on both links.
    Only the drawn relative pose is modelled (the contact moves along the
    profiles elsewhere); other poses raise ModelError.  O(1) per method.

    References
    ----------
    Rolling without slip: the relative center is the contact point; common
    practice, no single source.
    """

    at: Vec = (0.0, 0.0)

    kind: ClassVar[str] = "rolling"
    freedoms: ClassVar[int] = 1

    def reference_points(self):
        """The contact point, ``(at,)``; see :meth:`Joint.reference_points`."""
        return (self.at,)

    def primary(self, pose_a, pose_b, ar=FLOAT) -> Primary:
        """The contact point; parameters and result as :meth:`Joint.primary`."""
        x, y = _contact_at(self, pose_a, pose_b, ar)
        return Primary((x, y, ar.one), None, f"contact point of rolling contact '{self.name}'")

    def twist_rows(self, pose_a, pose_b, ar=FLOAT) -> list:
        """Two rows, equal velocities of the contact point; see :meth:`Joint.twist_rows`."""
        return _point_rows(_contact_at(self, pose_a, pose_b, ar))


@dataclass(frozen=True)
class GearMesh(Joint):
    """Two gears in mesh: the pitch circles roll without slip at the pitch point.

    ``centers`` are the gear centres (of the first and the second link).  Give
    either ``pitch_point``, the point where the pitch circles touch, on the
    line of centres (between the centres for an external pair, outside them
    for an internal pair), or ``radii``, the two pitch radii, with
    ``internal`` for a ring gear pair; the centre distance must then match.
    One constraint (a higher pair): the tangential velocities of the two pitch
    circles agree at the pitch point, so the relative center lies on the
    common tangent there.  With both centres held by one link (the
    ``carrier``, found by the model) the relative center is the pitch point.

    Parameters
    ----------
    name : str
        Joint name.
    links : (str, str)
        The two gears' links.
    centers : ((float, float), (float, float))
        The gear centres, of the first and of the second link.
    pitch_point : (float, float), optional
        Where the pitch circles touch.
    radii : (float, float), optional
        The two pitch radii (instead of, or agreeing with, ``pitch_point``).
    internal_pair : bool, optional
        With ``radii``: True for an internal (ring gear) pair.
    carrier : str, optional
        The link holding both centres by revolutes; filled in by
        :class:`~mechgraph.model.Mechanism`.

    Raises
    ------
    ModelError
        Neither ``pitch_point`` nor ``radii``; radii not positive; an internal
        pair of equal radii; a centre distance that differs from the radii by
        more than :data:`GEAR_DISTANCE_TOL`; a pitch point that disagrees with
        the radii by more than :data:`PITCH_POINT_TOL`.

    Examples
    --------
    >>> zero = (0.0, 0.0, 0.0)
    >>> g = GearMesh("G", ("pinion", "wheel"), centers=((0.0, 0.0), (30.0, 0.0)), radii=(10.0, 20.0))
    >>> g.pitch_point, g.pitch_radii, g.internal
    ((10.0, 0.0), (10.0, 20.0), False)
    >>> a, b, c = g.primary(zero, zero).line   # the common tangent: the line x = 10
    >>> b == 0.0, -c / a
    (True, 10.0)

    Notes
    -----
    The pitch point divides the line of centres in the ratio of the radii and
    follows both centres when the links move.  The constraint is that of two
    pitch circles rolling as friction wheels that may part along the line of
    centres, so without a carrier the center lies on the common tangent
    (the line of action of zero pressure angle).  O(1) per method.

    References
    ----------
    Pitch circles of a gear pair roll without slip at the pitch point, which is
    the relative center of two gears on a common carrier: common practice, no
    single source.
    """

    centers: tuple[Vec, Vec] = ((0.0, 0.0), (1.0, 0.0))
    pitch_point: Vec | None = None
    radii: tuple[float, float] | None = None
    internal_pair: bool | None = None
    carrier: str | None = None

    kind: ClassVar[str] = "gear"
    freedoms: ClassVar[int] = 2
    locates_point: ClassVar[bool] = False

    def __post_init__(self):
        if self.pitch_point is None and self.radii is None:
            raise ModelError(f"{self.label()}: give one of pitch_point [x, y] or radii [r1, r2]")
        if self.radii is not None:
            p = self._pitch_from_radii(FLOAT)
            if (
                self.pitch_point is not None
                and math.dist(p, self.pitch_point) > PITCH_POINT_TOL * math.dist(*self.centers)
            ):
                raise ModelError(
                    f"{self.label()}: pitch_point {list(self.pitch_point)} disagrees with the radii, which put it at "
                    f"{[round(c, 9) for c in p]}; give one of the two"
                )
            object.__setattr__(self, "pitch_point", p)

    def _pitch_from_radii(self, ar):
        """The pitch point from the radii: on the line of centres, ``r1 / d`` of the way (no square root)."""
        ra, rb = (ar.num(r) for r in self.radii)
        fa, fb = ar.to_float(ra), ar.to_float(rb)
        if not (fa > 0.0 and fb > 0.0):
            raise ModelError(f"{self.label()}: the pitch radii must be positive, got {list(self.radii)}")
        (ax, ay), (bx, by) = ((ar.num(c[0]), ar.num(c[1])) for c in self.centers)
        internal = bool(self.internal_pair)
        d = abs(fa - fb) if internal else fa + fb
        if d == 0.0:
            raise ModelError(f"{self.label()}: an internal pair of equal radii has no centre distance")
        dist = math.hypot(ar.to_float(bx - ax), ar.to_float(by - ay))
        if abs(dist - d) > GEAR_DISTANCE_TOL * max(dist, d):
            need = "|r1 - r2|" if internal else "r1 + r2"
            raise ModelError(
                f"{self.label()}: centre distance {dist:.6g} does not match the radii: an "
                f"{'internal' if internal else 'external'} pair needs {need} = {d:.6g}"
            )
        # external: P = A + ra/(ra+rb) (B - A); internal: P = A + ra/(ra-rb) (B - A)  (ra - rb signed)
        t = ra / (ra + rb) if not internal else ra / (ra - rb)
        return (ax + t * (bx - ax), ay + t * (by - ay))

    def reference_points(self):
        """The two centres and the pitch point; see :meth:`Joint.reference_points`."""
        return (self.centers[0], self.centers[1], self.pitch_point)

    def exact_inputs(self):
        """The pitch radii, when given; see :meth:`Joint.exact_inputs`."""
        return tuple(self.radii) if self.radii is not None else ()

    def _share(self, ar):
        """Where the pitch point divides the line of centres: P = C_a + t (C_b - C_a), t in the arithmetic.

        From the radii, ``t = r1 / (r1 + r2)`` (external) or ``r1 / (r1 - r2)``
        (internal); from a pitch point, its projection on the line of centres.
        No square root either way.
        """
        if self.radii is not None:
            ra, rb = (ar.num(r) for r in self.radii)
            return ra / (ra - rb) if self.internal_pair else ra / (ra + rb)
        (ax, ay), (bx, by) = ((ar.num(c[0]), ar.num(c[1])) for c in self.centers)
        px, py = ar.num(self.pitch_point[0]), ar.num(self.pitch_point[1])
        dx, dy = bx - ax, by - ay
        return ((px - ax) * dx + (py - ay) * dy) / (dx * dx + dy * dy)

    def _centres(self, pose_a, pose_b, ar):
        """The two gear centres, each placed by its own link."""
        return ar.place(self.centers[0], pose_a), ar.place(self.centers[1], pose_b)

    def _pitch(self, pose_a, pose_b, ar):
        """The pitch point at the given poses."""
        # the pitch point stays on the line of centres, where the radii put it
        if ar.name == "float" and _same_pose(pose_a, pose_b) and pose_a[2] == 0:
            return ar.place(self.pitch_point, pose_a)  # the drawn point itself, without round-off
        a, b = self._centres(pose_a, pose_b, ar)
        t = self._share(ar)
        return (a[0] + t * (b[0] - a[0]), a[1] + t * (b[1] - a[1]))

    @property
    def internal(self) -> bool:
        """True for an internal (ring) pair: the pitch point lies outside the centres.

        Examples
        --------
        >>> GearMesh("G", ("pinion", "ring"), centers=((0.0, 0.0), (10.0, 0.0)), radii=(10.0, 20.0),
        ...          internal_pair=True).internal
        True
        """
        (ax, ay), (bx, by) = self.centers
        px, py = self.pitch_point
        return (px - ax) * (px - bx) + (py - ay) * (py - by) > 0.0

    @property
    def pitch_radii(self) -> tuple[float, float]:
        """Pitch radii of the first and second gear (from the pitch point).

        Examples
        --------
        >>> GearMesh("G", ("pinion", "wheel"), centers=((0.0, 0.0), (30.0, 0.0)), pitch_point=(10.0, 0.0)).pitch_radii
        (10.0, 20.0)
        """
        (ax, ay), (bx, by) = self.centers
        px, py = self.pitch_point
        return (math.hypot(px - ax, py - ay), math.hypot(px - bx, py - by))

    def _tangent(self, pose_a, pose_b, ar):
        """The common tangent direction: the line of centres turned a quarter turn."""
        a, b = self._centres(pose_a, pose_b, ar)
        # normal to the line of centres: the common tangent direction
        dx, dy = b[0] - a[0], b[1] - a[1]
        return (-dy, dx)

    def primary(self, pose_a, pose_b, ar=FLOAT) -> Primary:
        """The pitch point (with a carrier) or the common tangent; see :meth:`Joint.primary`."""
        p = self._pitch(pose_a, pose_b, ar)
        if self.carrier is not None:
            return Primary(
                (p[0], p[1], ar.one), None, f"pitch point of gear mesh '{self.name}' (centres held by '{self.carrier}')"
            )
        tx, ty = self._tangent(pose_a, pose_b, ar)
        return Primary(
            None, pg.join((p[0], p[1], ar.one), (tx, ty, ar.zero)), f"common tangent of gear mesh '{self.name}'"
        )

    def twist_rows(self, pose_a, pose_b, ar=FLOAT) -> list:
        """One row, equal tangential velocities at the pitch point; see :meth:`Joint.twist_rows`."""
        # t . (v_a(p) - v_b(p)) = 0 puts the center on the line through p along t.
        return [_along_row(self._pitch(pose_a, pose_b, ar), self._tangent(pose_a, pose_b, ar))]


#: Every joint kind by its case-file name.
JOINT_KINDS: dict[str, type[Joint]] = {
    cls.kind: cls for cls in (Revolute, Prismatic, PinInSlot, RollingContact, GearMesh, CamContact)
}
