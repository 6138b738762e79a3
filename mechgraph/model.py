"""The mechanism model: links, joints, drivers and points of interest.

A :class:`Mechanism` is a frozen, validated description of a planar linkage in
one position.  Build it in code or read it from a case file
(:mod:`mechgraph.casefile`); both go through the same checks, so an invalid
mechanism never exists.

Examples
--------
A four-bar with its crank driven at 10 rad/s:

>>> from mechgraph.model import Link, Driver, Mechanism
>>> from mechgraph.joints import Revolute
>>> m = Mechanism(
...     name="four-bar",
...     links=(Link("frame", ground=True), Link("crank"), Link("coupler"), Link("rocker")),
...     joints=(
...         Revolute("O2", ("frame", "crank"), at=(0.0, 0.0)),
...         Revolute("A", ("crank", "coupler"), at=(30.0, 40.0)),
...         Revolute("B", ("coupler", "rocker"), at=(120.0, 60.0)),
...         Revolute("O4", ("frame", "rocker"), at=(100.0, 0.0)),
...     ),
...     drivers=(Driver("O2", rate=10.0),),
... )
>>> m.n_links, m.n_pairs
(4, 6)
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field, replace
from functools import cached_property
from itertools import combinations

import numpy as np

from .errors import DriverError, ModelError
from .joints import GearMesh, Joint, Revolute

__all__ = [
    "Link",
    "Driver",
    "PointOfInterest",
    "Mechanism",
    "LENGTH_UNITS",
    "MAX_COORDINATE",
    "DEFAULT_COINCIDENCE_TOL",
    "PARALLEL_TOL",
    "GEAR_LINE_TOL",
]

#: Length units a mechanism may declare (outputs use the same unit).
LENGTH_UNITS = ("mm", "cm", "m", "in", "ft")

#: Default bound on any coordinate, in the declared unit: larger values are
#: taken for a typing error (common practice, no source: no machine drawing
#: spans a million kilometres in any unit).
MAX_COORDINATE = 1e9

#: Smallest accepted drawing size relative to the largest coordinate: a 1 mm
#: mechanism may lie up to 1 km from the origin.  Farther, double precision keeps
#: fewer than about ten digits of the drawing's own geometry (2.2e-16 / 1e-6),
#: and the longer constructions (relaxation of indeterminate chains) lose the
#: rest: such coordinates mean a misplaced origin.
MIN_RELATIVE_SIZE = 1e-6

#: Smallest accepted drawing size in any unit: squares of smaller lengths
#: underflow double precision.
MIN_ABSOLUTE_SIZE = 1e-150

#: Default of :attr:`Mechanism.coincidence_tol`: two joint points closer than
#: this fraction of the drawing size are one point.  Typed coordinates carry far
#: fewer than the 16 digits of a double, so a real difference is much larger;
#: the round-off of the model's own arithmetic is far smaller.
DEFAULT_COINCIDENCE_TOL = 1e-9

#: Two unit directions (axis, slot, normal) of joints of one kind between one
#: pair count as parallel, for the duplicate-joint check, when the sine of the
#: angle between them (their cross product) is at most this.  The directions are
#: unit vectors, so the test is already scale-free; it uses the same figure as
#: :data:`DEFAULT_COINCIDENCE_TOL` but does not follow a mechanism's own
#: ``coincidence_tol``.
PARALLEL_TOL = 1e-9

#: Floor of the pitch-point check of a gear mesh, relative to the centre
#: distance: the pitch point may lie off the line of centres by
#: ``max(coincidence_tol * scale, GEAR_LINE_TOL * d)``.  The drawing size is at
#: least the centre distance, so with the default ``coincidence_tol`` the floor
#: only governs when a smaller ``coincidence_tol`` is chosen.
GEAR_LINE_TOL = 1e-9


@dataclass(frozen=True)
class Link:
    """A rigid link, named by the user ("frame", "crank", "ram").

    Parameters
    ----------
    name : str
        The link's name, unique in its mechanism.
    ground : bool, default False
        True for the frame; a mechanism has exactly one.

    Examples
    --------
    >>> Link("frame", ground=True)
    Link(name='frame', ground=True)

    Notes
    -----
    A link carries no geometry of its own: its joints and points of interest
    hold the coordinates.

    References
    ----------
    Common practice, no single source.
    """

    name: str
    ground: bool = False


@dataclass(frozen=True)
class Driver:
    """An input rate across a drivable joint.

    ``rate`` is in rad/s for a revolute (the second link relative to the
    first, counter-clockwise positive) and in length units per second for a
    prismatic joint (the slider along the axis relative to the guide).

    Parameters
    ----------
    joint : str
        Name of the driven joint.
    rate : float
        The input rate, in rad/s or length units per second.
    given : (number, str), optional
        The rate as typed and its case-file unit (a key of ``UNIT_FACTORS``),
        for exact arithmetic; not compared.

    Examples
    --------
    >>> d = Driver("O2", rate=10.0)
    >>> d.joint, d.rate, d.exact_rate()
    ('O2', 10.0, 10)

    Notes
    -----
    Validated by :class:`Mechanism` (known joint, drivable kind, one driver per
    joint, finite rate).

    References
    ----------
    Common practice, no single source.
    """

    joint: str
    rate: float
    given: tuple | None = field(default=None, compare=False)

    #: Exact factor from each case-file rate unit to rad/s (or unit/s).
    UNIT_FACTORS = {"rad_per_s": "1", "speed": "1", "rpm": "pi/30", "deg_per_s": "pi/180"}

    def exact_rate(self):
        """The rate as an exact sympy number: the typed decimal times the unit's exact factor.

        Returns
        -------
        sympy.Expr
            ``Rational(typed decimal) * factor``; without ``given``, the float
            rate's shortest decimal in rad/s.

        Examples
        --------
        >>> Driver("O2", 12.566370614359172, given=(120, "rpm")).exact_rate()
        4*pi

        Notes
        -----
        One sympy product, O(1); sympy is imported here, not at module load.

        References
        ----------
        1 rpm = pi/30 rad/s and 1 deg/s = pi/180 rad/s: common practice, no
        single source.
        """
        from sympy import Rational, sympify

        from .arithmetic import decimal_text

        value, unit = self.given if self.given is not None else (self.rate, "rad_per_s")
        return Rational(decimal_text(value)) * sympify(self.UNIT_FACTORS[unit])


@dataclass(frozen=True)
class PointOfInterest:
    """A named point of a link (coupler point, tool tip, centre of mass) whose velocity is reported.

    Parameters
    ----------
    name : str
        The point's name, unique in its mechanism.
    link : str
        Name of the link that carries it.
    at : (float, float)
        Its position in the drawing.

    Examples
    --------
    >>> PointOfInterest("pad centre", "pad arm", (80.0, 210.0))
    PointOfInterest(name='pad centre', link='pad arm', at=(80.0, 210.0))

    Notes
    -----
    Validated by :class:`Mechanism` (unique name, known link, finite coordinates).

    References
    ----------
    Common practice, no single source.
    """

    name: str
    link: str
    at: tuple[float, float]


def _check_name(name, what: str) -> None:
    """Raise ModelError unless ``name`` is a non-empty string."""
    if not isinstance(name, str) or not name.strip():
        raise ModelError(f"{what} must have a non-empty name, got {name!r}")


def _check_coordinate(v, what: str, max_coordinate: float) -> None:
    """Raise ModelError unless ``v`` is a point of two finite numbers within ``max_coordinate``."""
    if len(v) != 2:
        raise ModelError(f"{what} must be a point [x, y], got {list(v)}")
    for c in v:
        if not isinstance(c, (int, float)) or isinstance(c, bool) or not math.isfinite(c):
            raise ModelError(f"{what} must hold finite numbers, got {list(v)}")
        if abs(c) > max_coordinate:
            shown = ", ".join(f"{x:g}" for x in v)
            raise ModelError(
                f"{what} [{shown}] is beyond {max_coordinate:g} drawing units; "
                "check the number (or the declared unit)"
            )


@dataclass(frozen=True)
class Mechanism:
    """A validated planar mechanism in one position.

    Parameters
    ----------
    links : tuple of Link
        Exactly one has ``ground=True``.
    joints : tuple of Joint
        Each between two different named links.
    drivers : tuple of Driver, optional
        Input rates; as many as the mechanism has freedoms (checked by the
        velocity analysis, where the numerical mobility is known).
    points : tuple of PointOfInterest, optional
    name : str, optional
    unit : str, default "mm"
        Length unit, one of :data:`LENGTH_UNITS`.
    max_coordinate : float, default :data:`MAX_COORDINATE`
        Largest accepted absolute coordinate.
    coincidence_tol : float, default :data:`DEFAULT_COINCIDENCE_TOL` (1e-9)
        Relative tolerance (of the drawing size) below which two joint points
        count as the same, for the duplicate-joint, contact-normal and gear
        checks and for finding a gear pair's carrier.  Directions of two
        joints are compared with :data:`PARALLEL_TOL`.

    Raises
    ------
    ModelError
        Names missing or repeated, no ground or two grounds, a joint from a
        link to itself or to an unknown link, two joints that say the same
        thing, links not connected to ground, non-finite or absurd coordinates,
        a gear mesh whose pitch point is off its line of centres.
    DriverError
        A driver on an unknown joint, on a joint that cannot drive, two drivers
        on one joint, or a non-finite rate.

    Examples
    --------
    A slider-crank (invented numbers):

    >>> from mechgraph.joints import Prismatic, Revolute
    >>> m = Mechanism(
    ...     links=(Link("frame", ground=True), Link("crank"), Link("rod"), Link("slider")),
    ...     joints=(
    ...         Revolute("O", ("frame", "crank"), at=(0.0, 0.0)),
    ...         Revolute("A", ("crank", "rod"), at=(10.0, 10.0)),
    ...         Revolute("B", ("rod", "slider"), at=(30.0, 0.0)),
    ...         Prismatic("S", ("frame", "slider"), at=(30.0, 0.0), axis=(1.0, 0.0)),
    ...     ),
    ...     drivers=(Driver("O", rate=1.0),),
    ... )
    >>> m.ground, m.n_pairs, m.centre
    ('frame', 6, (15.0, 5.0))

    Notes
    -----
    Validation compares every pair of joints on each pair of links, so it
    costs O(j + sum of squares of joints per pair), O(j^2) at worst for j joints.

    References
    ----------
    A mechanism of n links has n(n-1)/2 relative centers: common practice, no
    single source.
    """

    links: tuple[Link, ...]
    joints: tuple[Joint, ...]
    drivers: tuple[Driver, ...] = ()
    points: tuple[PointOfInterest, ...] = ()
    name: str = "mechanism"
    unit: str = "mm"
    max_coordinate: float = field(default=MAX_COORDINATE, compare=False)
    coincidence_tol: float = field(default=DEFAULT_COINCIDENCE_TOL, compare=False)

    def __post_init__(self):
        object.__setattr__(self, "links", tuple(self.links))
        object.__setattr__(self, "joints", tuple(self.joints))
        object.__setattr__(self, "drivers", tuple(self.drivers))
        object.__setattr__(self, "points", tuple(self.points))
        self._validate_links()
        self._validate_joints()
        self._validate_connected()
        object.__setattr__(self, "joints", tuple(self._with_gear_carriers()))
        self._validate_drivers()
        self._validate_points()

    # ----------------------------------------------------------------- checks
    def _validate_links(self):
        """Check the unit, the link names and the single ground link."""
        if self.unit not in LENGTH_UNITS:
            raise ModelError(f"unit {self.unit!r} is not known; use one of {', '.join(LENGTH_UNITS)}")
        if len(self.links) < 2:
            raise ModelError(f"a mechanism needs at least two links, got {len(self.links)}")
        seen = set()
        for link in self.links:
            _check_name(link.name, "every link")
            if link.name in seen:
                raise ModelError(f"link name '{link.name}' is used twice; every link needs its own name")
            seen.add(link.name)
        grounds = [link.name for link in self.links if link.ground]
        if not grounds:
            raise ModelError("no link is marked as ground; mark exactly one link (the frame) with ground = true")
        if len(grounds) > 1:
            raise ModelError(
                f"links {', '.join(repr(g) for g in grounds)} are all marked as ground; exactly one link may be ground"
            )

    def _validate_joints(self):
        """Check joint names, their links, coordinates, drawing size, duplicates and gear meshes."""
        names = set(self.link_names)
        seen = set()
        if not self.joints:
            raise ModelError("the mechanism has no joints")
        for joint in self.joints:
            _check_name(joint.name, "every joint")
            if joint.name in seen:
                raise ModelError(f"joint name '{joint.name}' is used twice; every joint needs its own name")
            seen.add(joint.name)
            if len(joint.links) != 2:
                raise ModelError(
                    f"{joint.kind} joint '{joint.name}' must join exactly two links, got {list(joint.links)}"
                )
            a, b = joint.links
            for x in (a, b):
                if x not in names:
                    raise ModelError(
                        f"{joint.kind} joint '{joint.name}' names link '{x}', which is not defined; "
                        f"links are: {', '.join(self.link_names)}"
                    )
            if a == b:
                raise ModelError(
                    f"{joint.kind} joint '{joint.name}' joins link '{a}' to itself; a joint needs two different links"
                )
            for p in joint.reference_points():
                _check_coordinate(p, f"{joint.label()}: coordinate", self.max_coordinate)
        joint_pts = np.asarray([p for j in self.joints for p in j.reference_points()], dtype=float).reshape(-1, 2)
        far = float(np.abs(joint_pts).max()) if joint_pts.size else 0.0
        raw = self._raw_size()
        if 0.0 < raw and (raw < MIN_RELATIVE_SIZE * far or raw < MIN_ABSOLUTE_SIZE):
            raise ModelError(
                f"the drawing is {self._raw_size():.3g} {self.unit} across but lies {far:.3g} {self.unit} "
                "from the origin: floating point keeps too few digits of its geometry; "
                "move the origin near the mechanism, or change the unit"
                if raw >= MIN_ABSOLUTE_SIZE
                else f"the drawing is {raw:.3g} {self.unit} across, too small for double precision; change the unit"
            )
        tol = self.coincidence_tol * self.scale
        by_pair: dict[frozenset, list[Joint]] = {}
        for joint in self.joints:
            by_pair.setdefault(frozenset(joint.links), []).append(joint)
        for pair, js in by_pair.items():
            for j1, j2 in combinations(js, 2):
                if j1.locates_point and j2.locates_point:
                    a, b = sorted(pair)
                    raise ModelError(
                        f"joints '{j1.name}' ({j1.kind}) and '{j2.name}' ({j2.kind}) both join '{a}' and '{b}': "
                        "two such joints either say the same thing or lock the two links together; "
                        "keep one, or merge the links into one"
                    )
                if type(j1) is type(j2) and _same_geometry(j1, j2, tol):
                    raise ModelError(
                        f"joints '{j1.name}' and '{j2.name}' are the same {j1.kind} joint between "
                        f"'{j1.links[0]}' and '{j1.links[1]}' at the same place; remove one"
                    )
                if (
                    not j1.locates_point
                    and not j2.locates_point
                    and _same_locus(j1, j2, self.scale, self.coincidence_tol)
                ):
                    a, b = sorted(pair)
                    raise ModelError(
                        f"joints '{j1.name}' ({j1.kind}) and '{j2.name}' ({j2.kind}) between '{a}' and '{b}' "
                        "say the same thing: their common normals are one line, so together they constrain "
                        "no more than one of them; remove one, or correct a contact point or normal"
                    )
        for joint in self.joints:
            if isinstance(joint, GearMesh):
                _check_gear(joint, tol)

    def _validate_connected(self):
        """Check that every link reaches the ground link through joints."""
        adjacent: dict[str, set[str]] = {n: set() for n in self.link_names}
        for j in self.joints:
            a, b = j.links
            adjacent[a].add(b)
            adjacent[b].add(a)
        ground = self.ground
        reached, stack = {ground}, [ground]
        while stack:
            for nxt in adjacent[stack.pop()] - reached:
                reached.add(nxt)
                stack.append(nxt)
        loose = [n for n in self.link_names if n not in reached]
        if loose:
            raise ModelError(
                f"link(s) {', '.join(repr(n) for n in loose)} are not connected to the ground link '{ground}' "
                "through any chain of joints; add the joints that hold them, or remove them"
            )

    def _with_gear_carriers(self):
        """Fill in the carrier of each gear mesh: the link holding both gear centres by revolutes."""
        out = []
        tol = self.coincidence_tol * self.scale
        for joint in self.joints:
            if isinstance(joint, GearMesh) and joint.carrier is None:
                carrier = self._find_carrier(joint, tol)
                if carrier is not None:
                    joint = replace(joint, carrier=carrier)
            out.append(joint)
        return out

    def _find_carrier(self, gear: GearMesh, tol: float):
        """The link pinned to both gears at their centres, or None."""
        a, b = gear.links
        holders = []
        for gear_link, centre in ((a, gear.centers[0]), (b, gear.centers[1])):
            found = set()
            for j in self.joints:
                if isinstance(j, Revolute) and gear_link in j.links and math.dist(j.at, centre) <= tol:
                    found.add(j.links[0] if j.links[1] == gear_link else j.links[1])
            holders.append(found)
        common = sorted((holders[0] & holders[1]) - {a, b})
        return common[0] if common else None

    def _validate_drivers(self):
        """Check each driver's joint, its kind, uniqueness and rate."""
        by_name = {j.name: j for j in self.joints}
        seen = set()
        for d in self.drivers:
            if d.joint not in by_name:
                raise DriverError(
                    f"driver names joint '{d.joint}', which is not defined; joints are: {', '.join(by_name)}"
                )
            j = by_name[d.joint]
            if j.drive is None:
                drivable = [x.name for x in self.joints if x.drive is not None]
                raise DriverError(
                    f"driver on {j.label()}: a {j.kind} joint cannot take a driver; drive a revolute "
                    "(rotation rate) or prismatic joint (sliding speed), "
                    f"e.g. one of {', '.join(drivable) or 'none defined'}"
                )
            if d.joint in seen:
                raise DriverError(f"joint '{d.joint}' has two drivers; give each joint at most one")
            seen.add(d.joint)
            if not isinstance(d.rate, (int, float)) or not math.isfinite(d.rate):
                raise DriverError(f"driver on joint '{d.joint}': rate must be a finite number, got {d.rate!r}")

    def _validate_points(self):
        """Check names, links and coordinates of the points of interest."""
        names = set(self.link_names)
        seen = set()
        for p in self.points:
            _check_name(p.name, "every point of interest")
            if p.name in seen:
                raise ModelError(f"point name '{p.name}' is used twice; every point needs its own name")
            seen.add(p.name)
            if p.link not in names:
                raise ModelError(
                    f"point '{p.name}' is on link '{p.link}', which is not defined; "
                    f"links are: {', '.join(self.link_names)}"
                )
            _check_coordinate(p.at, f"point '{p.name}': coordinate", self.max_coordinate)

    # ------------------------------------------------------------ properties
    @cached_property
    def link_names(self) -> tuple[str, ...]:
        """Link names in the order given.

        Examples
        --------
        >>> from mechgraph.casefile import demo_mechanism
        >>> demo_mechanism().link_names[:3]
        ('frame', 'crank', 'coupler')
        """
        return tuple(link.name for link in self.links)

    @cached_property
    def index(self) -> dict[str, int]:
        """Link name -> index (the order of :attr:`link_names`).

        Examples
        --------
        >>> from mechgraph.casefile import demo_mechanism
        >>> demo_mechanism().index["crank"]
        1
        """
        return {n: i for i, n in enumerate(self.link_names)}

    @cached_property
    def ground(self) -> str:
        """Name of the ground link.

        Examples
        --------
        >>> from mechgraph.casefile import demo_mechanism
        >>> demo_mechanism().ground
        'frame'
        """
        return next(link.name for link in self.links if link.ground)

    @cached_property
    def ground_index(self) -> int:
        """Index of the ground link.

        Examples
        --------
        >>> from mechgraph.casefile import demo_mechanism
        >>> demo_mechanism().ground_index
        0
        """
        return self.index[self.ground]

    @property
    def n_links(self) -> int:
        """Number of links, ground included.

        Examples
        --------
        >>> from mechgraph.casefile import demo_mechanism
        >>> demo_mechanism().n_links
        6
        """
        return len(self.links)

    @property
    def n_pairs(self) -> int:
        """Number of relative centers, n(n-1)/2.

        Examples
        --------
        >>> from mechgraph.casefile import demo_mechanism
        >>> demo_mechanism().n_pairs
        15
        """
        n = len(self.links)
        return n * (n - 1) // 2

    @cached_property
    def joint_by_name(self) -> dict[str, Joint]:
        """Joint name -> joint.

        Examples
        --------
        >>> from mechgraph.casefile import demo_mechanism
        >>> demo_mechanism().joint_by_name["O2"].kind
        'revolute'
        """
        return {j.name: j for j in self.joints}

    @cached_property
    def reference_points(self) -> np.ndarray:
        """Every joint and point-of-interest coordinate, shape (k, 2).

        Examples
        --------
        >>> from mechgraph.casefile import demo_mechanism
        >>> demo_mechanism().reference_points.shape
        (8, 2)
        """
        pts = [p for j in self.joints for p in j.reference_points()] + [p.at for p in self.points]
        return np.asarray(pts, dtype=float).reshape(-1, 2)

    @cached_property
    def scale(self) -> float:
        """Drawing size: the diagonal of the joints' bounding box (1 unit if all coincide).

        Every scale-free tolerance is relative to it.

        Examples
        --------
        >>> from mechgraph.casefile import demo_mechanism
        >>> round(demo_mechanism().scale, 6)
        254.950976
        """
        d = self._raw_size()
        return d if d > 0.0 else 1.0

    def _raw_size(self) -> float:
        """Diagonal of the joints' bounding box, 0 when all coincide."""
        pts = np.asarray([p for j in self.joints for p in j.reference_points()], dtype=float).reshape(-1, 2)
        return float(np.hypot(*(pts.max(axis=0) - pts.min(axis=0)))) if len(pts) else 0.0

    @cached_property
    def centre(self) -> tuple[float, float]:
        """Centre of the joints' bounding box, about which the scale-free measures are taken.

        Examples
        --------
        >>> from mechgraph.casefile import demo_mechanism
        >>> demo_mechanism().centre
        (65.0, 95.0)
        """
        pts = np.asarray([p for j in self.joints for p in j.reference_points()], dtype=float).reshape(-1, 2)
        c = (pts.max(axis=0) + pts.min(axis=0)) / 2.0
        return (float(c[0]), float(c[1]))

    def reference_poses(self) -> np.ndarray:
        """Link poses (x, y, theta) of the position the model describes: all zero.

        Returns
        -------
        ndarray, shape (n_links, 3)
            Zeros: in the drawn position every link frame is the global frame.

        Examples
        --------
        >>> from mechgraph.casefile import demo_mechanism
        >>> demo_mechanism().reference_poses().shape
        (6, 3)

        Notes
        -----
        A new array on every call, O(n).

        References
        ----------
        Common practice, no single source.
        """
        return np.zeros((len(self.links), 3))

    def pair_names(self, i: int, j: int) -> str:
        """``"a-b"`` for the pair of link indices ``i, j``.

        Parameters
        ----------
        i, j : int
            Link indices (see :attr:`index`).

        Returns
        -------
        str
            The two link names joined by a hyphen, in the order given.

        Examples
        --------
        >>> from mechgraph.casefile import demo_mechanism
        >>> demo_mechanism().pair_names(0, 1)
        'frame-crank'

        Notes
        -----
        O(1).

        References
        ----------
        Common practice, no single source.
        """
        return f"{self.link_names[i]}-{self.link_names[j]}"

    def with_drivers(self, drivers) -> "Mechanism":
        """The same mechanism with other drivers.

        Parameters
        ----------
        drivers : iterable of Driver
            The new drivers (replacing all the old ones).

        Returns
        -------
        Mechanism
            A new, validated mechanism; this one is unchanged.

        Raises
        ------
        DriverError
            A driver is invalid (see :class:`Mechanism`).

        Examples
        --------
        >>> from mechgraph.casefile import demo_mechanism
        >>> m = demo_mechanism().with_drivers([Driver("O2", rate=2.0)])
        >>> m.drivers
        (Driver(joint='O2', rate=2.0, given=None),)

        Notes
        -----
        :func:`dataclasses.replace`, which validates the whole mechanism again:
        O(j^2) at worst for j joints.

        References
        ----------
        Common practice, no single source.
        """
        return replace(self, drivers=tuple(drivers))


def _same_locus(j1: Joint, j2: Joint, scale: float, tol: float) -> bool:
    """True when two one-constraint contacts put their pair's center on the same line."""
    from . import projective as pg

    zero = (0.0, 0.0, 0.0)
    l1, l2 = j1.primary(zero, zero).line, j2.primary(zero, zero).line
    if l1 is None or l2 is None:
        return False
    return pg.line_separation(l1, l2, scale=scale) <= tol


def _same_geometry(j1: Joint, j2: Joint, tol: float) -> bool:
    """True when two joints of one kind have the same points (within ``tol``) and parallel directions."""
    p1, p2 = j1.reference_points(), j2.reference_points()
    if any(math.dist(a, b) > tol for a, b in zip(p1, p2)):
        return False
    for attr in ("axis", "slot", "normal"):
        if hasattr(j1, attr):
            u, v = getattr(j1, attr), getattr(j2, attr)
            if abs(u[0] * v[1] - u[1] * v[0]) > PARALLEL_TOL:
                return False
    return True


def _check_gear(g: GearMesh, tol: float) -> None:
    """Raise ModelError unless the gear's centres differ and its pitch point is on their line, off both."""
    (ax, ay), (bx, by) = g.centers
    px, py = g.pitch_point
    d = math.hypot(bx - ax, by - ay)
    if d <= tol:
        raise ModelError(f"{g.label()}: the two gear centres coincide; give two distinct centres")
    off = abs((bx - ax) * (py - ay) - (by - ay) * (px - ax)) / d
    if off > max(tol, GEAR_LINE_TOL * d):
        raise ModelError(
            f"{g.label()}: the pitch point {list(g.pitch_point)} is {off:.6g} off the line of centres; "
            "it must lie on the line through the two gear centres"
        )
    ra, rb = g.pitch_radii
    if ra <= tol or rb <= tol:
        raise ModelError(
            f"{g.label()}: a pitch radius is zero (pitch point on a gear centre); both radii must be positive"
        )
