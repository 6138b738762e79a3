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
    "place",
    "rotate",
]

Vec = tuple[float, float]


class Primary(NamedTuple):
    """What one joint alone says of its pair's relative center.

    Exactly one of ``point`` and ``line`` is set: a located center, or a line
    the center lies on.  ``note`` says why, in words for the derivation.
    """

    point: tuple | None
    line: tuple | None
    note: str


def rotate(v: Vec, theta: float) -> Vec:
    """Rotate vector ``v`` by ``theta`` radians (counter-clockwise), in floats."""
    return FLOAT.rotate(v, theta)


def place(local: Vec, pose) -> Vec:
    """Global position of a link point given in the link's frame, at link pose ``(x, y, theta)``, in floats."""
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
    n = math.hypot(v[0], v[1])
    if not (n > 0.0) or not math.isfinite(n):
        raise ModelError(f"{what} must be a non-zero, finite direction, got {list(v)}")
    return (v[0] / n, v[1] / n)


def _direction(ar, given: Vec, deg, theta):
    """A direction in the arithmetic ``ar``: from degrees when given (exact trigonometry), else the given vector."""
    v = ar.trig_deg(deg) if deg is not None else (ar.num(given[0]), ar.num(given[1]))
    return ar.rotate(v, theta) if theta != 0 else v


def _set_direction(joint, field_name: str, deg_name: str):
    """Shared __post_init__ of a direction field: degrees (if given) define it; keep the raw vector; store a unit one."""
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
    """Base of every joint kind: a named joint between two named links."""

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
        """Number of scalar constraints (3 - freedoms)."""
        return 3 - self.freedoms

    def label(self) -> str:
        """The joint as named in messages: ``kind 'name' (a-b)``."""
        return f"{self.kind} joint '{self.name}' ({self.links[0]}-{self.links[1]})"

    def reference_points(self) -> tuple[Vec, ...]:
        """The drawing points of the joint (for scale and checks)."""
        raise NotImplementedError

    def directions(self) -> tuple:
        """The joint's directions as given: ``(vector, degrees or None)`` pairs (for exact arithmetic)."""
        return ()

    def exact_inputs(self) -> tuple:
        """Further numbers the joint's geometry is built from (for exact arithmetic)."""
        return ()

    def primary(self, pose_a, pose_b, ar=FLOAT) -> Primary:  # pragma: no cover - interface
        raise NotImplementedError

    def twist_rows(self, pose_a, pose_b, ar=FLOAT) -> list:  # pragma: no cover - interface
        raise NotImplementedError

    def residual(self, pose_a, pose_b) -> np.ndarray:
        """Position constraint residuals; kinds without a profile model raise."""
        raise ModelError(
            f"{self.label()}: position analysis of a {self.kind} joint needs the contact profiles, "
            "which mechgraph does not model yet; velocity analysis at the given position works"
        )

    def driver_row(self, pose_a, pose_b, ar=FLOAT) -> list:
        """Row over the two twists whose value is the input rate of this joint."""
        raise ModelError(
            f"{self.label()} cannot take a driver; drivers go on revolute joints (rotation rate) "
            "or prismatic joints (sliding speed)"
        )


@dataclass(frozen=True)
class Revolute(Joint):
    """Pin joint at ``at``: the relative center is the pin.

    A driver on it sets ``w_b - w_a``, the rotation rate of the second link
    relative to the first (counter-clockwise positive).
    """

    at: Vec = (0.0, 0.0)

    kind: ClassVar[str] = "revolute"
    freedoms: ClassVar[int] = 1
    drive: ClassVar[str | None] = "rotation"

    def reference_points(self):
        return (self.at,)

    def primary(self, pose_a, pose_b, ar=FLOAT) -> Primary:
        x, y = ar.place(self.at, pose_a)
        return Primary((x, y, ar.one), None, f"pin of revolute '{self.name}'")

    def twist_rows(self, pose_a, pose_b, ar=FLOAT) -> list:
        return _point_rows(ar.place(self.at, pose_a))

    def residual(self, pose_a, pose_b) -> np.ndarray:
        a = place(self.at, pose_a)
        b = place(self.at, pose_b)
        return np.array([a[0] - b[0], a[1] - b[1]])

    def driver_row(self, pose_a, pose_b, ar=FLOAT) -> list:
        o, z = ar.one, ar.zero
        return [-o, z, z, o, z, z]


@dataclass(frozen=True)
class Prismatic(Joint):
    """Slider on a straight guide: the guide is on the first link, the slider the second.

    ``at`` is a point of the guide line (and of the slider) and ``axis`` the
    sliding direction.  The relative center lies at infinity, perpendicular to
    the axis.  A driver on it sets the sliding speed of the slider along
    ``axis`` relative to the guide.
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
        return (self.at,)

    def directions(self):
        return ((self._given_axis, self.axis_deg),)

    def _axis(self, pose_a, ar=FLOAT):
        return _direction(ar, self._given_axis, self.axis_deg, pose_a[2])

    def primary(self, pose_a, pose_b, ar=FLOAT) -> Primary:
        ux, uy = self._axis(pose_a, ar)
        return Primary((-uy, ux, ar.zero), None, f"perpendicular to the axis of prismatic '{self.name}', at infinity")

    def twist_rows(self, pose_a, pose_b, ar=FLOAT) -> list:
        ux, uy = self._axis(pose_a, ar)
        r = ar.place(self.at, pose_a)
        o, z = ar.one, ar.zero
        return [[o, z, z, -o, z, z], _along_row(r, (-uy, ux))]

    def residual(self, pose_a, pose_b) -> np.ndarray:
        ux, uy = self._axis(pose_a)
        a = place(self.at, pose_a)
        b = place(self.at, pose_b)
        return np.array([pose_a[2] - pose_b[2], -uy * (a[0] - b[0]) + ux * (a[1] - b[1])])

    def driver_row(self, pose_a, pose_b, ar=FLOAT) -> list:
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
        return (self.at,)

    def _normal(self, pose_b, ar=FLOAT):  # pragma: no cover - interface
        raise NotImplementedError

    def _point(self, pose_a, pose_b, ar):
        return ar.place(self.at, pose_a)

    def primary(self, pose_a, pose_b, ar=FLOAT) -> Primary:
        c = self._point(pose_a, pose_b, ar)
        nx, ny = self._normal(pose_b, ar)
        line = pg.join((c[0], c[1], ar.one), (nx, ny, ar.zero))
        return Primary(None, line, self._locus_note())

    def _locus_note(self) -> str:  # pragma: no cover - interface
        raise NotImplementedError

    def twist_rows(self, pose_a, pose_b, ar=FLOAT) -> list:
        return [_along_row(self._point(pose_a, pose_b, ar), self._normal(pose_b, ar))]


@dataclass(frozen=True)
class PinInSlot(_PointOnLine):
    """A pin on the first link running in a straight slot of the second.

    ``at`` is the pin centre, ``slot`` the slot direction.  One constraint:
    the relative center lies on the line through the pin normal to the slot.
    """

    slot: Vec = (1.0, 0.0)
    slot_deg: float | None = None

    kind: ClassVar[str] = "pin_in_slot"

    def __post_init__(self):
        _set_direction(self, "slot", "slot_deg")

    def directions(self):
        return ((self._given_slot, self.slot_deg),)

    def _normal(self, pose_b, ar=FLOAT):
        ux, uy = _direction(ar, self._given_slot, self.slot_deg, pose_b[2])
        return (-uy, ux)

    def _locus_note(self) -> str:
        return f"normal to the slot through the pin of pin-in-slot '{self.name}'"

    def residual(self, pose_a, pose_b) -> np.ndarray:
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
    """

    normal: Vec = (0.0, 1.0)
    normal_deg: float | None = None

    kind: ClassVar[str] = "cam"

    def __post_init__(self):
        _set_direction(self, "normal", "normal_deg")

    def directions(self):
        return ((self._given_normal, self.normal_deg),)

    def _normal(self, pose_b, ar=FLOAT):
        return _direction(ar, self._given_normal, self.normal_deg, pose_b[2])

    def _point(self, pose_a, pose_b, ar):
        return _contact_at(self, pose_a, pose_b, ar)

    def _locus_note(self) -> str:
        return f"common normal of cam contact '{self.name}'"


@dataclass(frozen=True)
class RollingContact(Joint):
    """Rolling without slip of two profiles at the contact point ``at``: the relative center."""

    at: Vec = (0.0, 0.0)

    kind: ClassVar[str] = "rolling"
    freedoms: ClassVar[int] = 1

    def reference_points(self):
        return (self.at,)

    def primary(self, pose_a, pose_b, ar=FLOAT) -> Primary:
        x, y = _contact_at(self, pose_a, pose_b, ar)
        return Primary((x, y, ar.one), None, f"contact point of rolling contact '{self.name}'")

    def twist_rows(self, pose_a, pose_b, ar=FLOAT) -> list:
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
            if self.pitch_point is not None and math.dist(p, self.pitch_point) > 1e-9 * (1.0 + math.hypot(*p)):
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
        if abs(dist - d) > 1e-6 * max(dist, d):
            need = "|r1 - r2|" if internal else "r1 + r2"
            raise ModelError(
                f"{self.label()}: centre distance {dist:.6g} does not match the radii: an "
                f"{'internal' if internal else 'external'} pair needs {need} = {d:.6g}"
            )
        # external: P = A + ra/(ra+rb) (B - A); internal: P = A + ra/(ra-rb) (B - A)  (ra - rb signed)
        t = ra / (ra + rb) if not internal else ra / (ra - rb)
        return (ax + t * (bx - ax), ay + t * (by - ay))

    def reference_points(self):
        return (self.centers[0], self.centers[1], self.pitch_point)

    def exact_inputs(self):
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
        return ar.place(self.centers[0], pose_a), ar.place(self.centers[1], pose_b)

    def _pitch(self, pose_a, pose_b, ar):
        # the pitch point stays on the line of centres, where the radii put it
        if ar.name == "float" and _same_pose(pose_a, pose_b) and pose_a[2] == 0:
            return ar.place(self.pitch_point, pose_a)  # the drawn point itself, without round-off
        a, b = self._centres(pose_a, pose_b, ar)
        t = self._share(ar)
        return (a[0] + t * (b[0] - a[0]), a[1] + t * (b[1] - a[1]))

    @property
    def internal(self) -> bool:
        """True for an internal (ring) pair: the pitch point lies outside the centres."""
        (ax, ay), (bx, by) = self.centers
        px, py = self.pitch_point
        return (px - ax) * (px - bx) + (py - ay) * (py - by) > 0.0

    @property
    def pitch_radii(self) -> tuple[float, float]:
        """Pitch radii of the first and second gear (from the pitch point)."""
        (ax, ay), (bx, by) = self.centers
        px, py = self.pitch_point
        return (math.hypot(px - ax, py - ay), math.hypot(px - bx, py - by))

    def _tangent(self, pose_a, pose_b, ar):
        a, b = self._centres(pose_a, pose_b, ar)
        # normal to the line of centres: the common tangent direction
        dx, dy = b[0] - a[0], b[1] - a[1]
        return (-dy, dx)

    def primary(self, pose_a, pose_b, ar=FLOAT) -> Primary:
        p = self._pitch(pose_a, pose_b, ar)
        if self.carrier is not None:
            return Primary(
                (p[0], p[1], ar.one), None, f"pitch point of gear mesh '{self.name}' (centres held by '{self.carrier}')"
            )
        tx, ty = self._tangent(pose_a, pose_b, ar)
        return Primary(None, pg.join((p[0], p[1], ar.one), (tx, ty, ar.zero)), f"common tangent of gear mesh '{self.name}'")

    def twist_rows(self, pose_a, pose_b, ar=FLOAT) -> list:
        # t . (v_a(p) - v_b(p)) = 0 puts the center on the line through p along t.
        return [_along_row(self._pitch(pose_a, pose_b, ar), self._tangent(pose_a, pose_b, ar))]


#: Every joint kind by its case-file name.
JOINT_KINDS: dict[str, type[Joint]] = {
    cls.kind: cls for cls in (Revolute, Prismatic, PinInSlot, RollingContact, GearMesh, CamContact)
}
