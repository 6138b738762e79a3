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
    """Rotate vector ``v`` by ``theta`` radians (counter-clockwise)."""
    c, s = math.cos(theta), math.sin(theta)
    return (c * v[0] - s * v[1], s * v[0] + c * v[1])


def place(local: Vec, pose) -> Vec:
    """Global position of a link point given in the link's frame, at link pose ``(x, y, theta)``."""
    r = rotate(local, pose[2])
    return (pose[0] + r[0], pose[1] + r[1])


def _point_rows(r: Vec) -> np.ndarray:
    """Rows of ``v_a(r) - v_b(r) = 0`` over ``(w_a, vx_a, vy_a, w_b, vx_b, vy_b)``."""
    x, y = r
    return np.array(
        [
            [-y, 1.0, 0.0, y, -1.0, 0.0],
            [x, 0.0, 1.0, -x, 0.0, -1.0],
        ]
    )


def _along_row(r: Vec, n: Vec) -> np.ndarray:
    """Row of ``n . (v_a(r) - v_b(r))`` over the two twists."""
    x, y = r
    nx, ny = n
    m = ny * x - nx * y
    return np.array([m, nx, ny, -m, -nx, -ny])


def _unit(v: Vec, what: str) -> Vec:
    n = math.hypot(v[0], v[1])
    if not (n > 0.0) or not math.isfinite(n):
        raise ModelError(f"{what} must be a non-zero, finite direction, got {list(v)}")
    return (v[0] / n, v[1] / n)


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

    def primary(self, pose_a, pose_b) -> Primary:  # pragma: no cover - interface
        raise NotImplementedError

    def twist_rows(self, pose_a, pose_b) -> np.ndarray:  # pragma: no cover - interface
        raise NotImplementedError

    def residual(self, pose_a, pose_b) -> np.ndarray:
        """Position constraint residuals; kinds without a profile model raise."""
        raise ModelError(
            f"{self.label()}: position analysis of a {self.kind} joint needs the contact profiles, "
            "which mechgraph does not model yet; velocity analysis at the given position works"
        )

    def driver_row(self, pose_a, pose_b) -> np.ndarray:
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

    def primary(self, pose_a, pose_b) -> Primary:
        x, y = place(self.at, pose_a)
        return Primary(pg.point(x, y), None, f"pin of revolute '{self.name}'")

    def twist_rows(self, pose_a, pose_b) -> np.ndarray:
        return _point_rows(place(self.at, pose_a))

    def residual(self, pose_a, pose_b) -> np.ndarray:
        a = place(self.at, pose_a)
        b = place(self.at, pose_b)
        return np.array([a[0] - b[0], a[1] - b[1]])

    def driver_row(self, pose_a, pose_b) -> np.ndarray:
        return np.array([-1.0, 0.0, 0.0, 1.0, 0.0, 0.0])


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

    kind: ClassVar[str] = "prismatic"
    freedoms: ClassVar[int] = 1
    drive: ClassVar[str | None] = "sliding"

    def __post_init__(self):
        object.__setattr__(self, "axis", _unit(self.axis, f"{self.label()}: field 'axis'"))

    def reference_points(self):
        return (self.at,)

    def _axis(self, pose_a) -> Vec:
        return rotate(self.axis, pose_a[2])

    def primary(self, pose_a, pose_b) -> Primary:
        ux, uy = self._axis(pose_a)
        return Primary(pg.direction(-uy, ux), None, f"perpendicular to the axis of prismatic '{self.name}', at infinity")

    def twist_rows(self, pose_a, pose_b) -> np.ndarray:
        ux, uy = self._axis(pose_a)
        r = place(self.at, pose_a)
        return np.vstack([np.array([1.0, 0.0, 0.0, -1.0, 0.0, 0.0]), _along_row(r, (-uy, ux))])

    def residual(self, pose_a, pose_b) -> np.ndarray:
        ux, uy = self._axis(pose_a)
        a = place(self.at, pose_a)
        b = place(self.at, pose_b)
        return np.array([pose_a[2] - pose_b[2], -uy * (a[0] - b[0]) + ux * (a[1] - b[1])])

    def driver_row(self, pose_a, pose_b) -> np.ndarray:
        u = self._axis(pose_a)
        r = place(self.at, pose_a)
        return -_along_row(r, u)


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

    def _normal(self, pose_b) -> Vec:  # pragma: no cover - interface
        raise NotImplementedError

    def primary(self, pose_a, pose_b) -> Primary:
        c = place(self.at, pose_a)
        nx, ny = self._normal(pose_b)
        line = pg.join(pg.point(*c), pg.direction(nx, ny))
        return Primary(None, line, self._locus_note())

    def _locus_note(self) -> str:  # pragma: no cover - interface
        raise NotImplementedError

    def twist_rows(self, pose_a, pose_b) -> np.ndarray:
        return _along_row(place(self.at, pose_a), self._normal(pose_b))[None, :]


@dataclass(frozen=True)
class PinInSlot(_PointOnLine):
    """A pin on the first link running in a straight slot of the second.

    ``at`` is the pin centre, ``slot`` the slot direction.  One constraint:
    the relative center lies on the line through the pin normal to the slot.
    """

    slot: Vec = (1.0, 0.0)

    kind: ClassVar[str] = "pin_in_slot"

    def __post_init__(self):
        object.__setattr__(self, "slot", _unit(self.slot, f"{self.label()}: field 'slot'"))

    def _normal(self, pose_b) -> Vec:
        ux, uy = rotate(self.slot, pose_b[2])
        return (-uy, ux)

    def _locus_note(self) -> str:
        return f"normal to the slot through the pin of pin-in-slot '{self.name}'"

    def residual(self, pose_a, pose_b) -> np.ndarray:
        nx, ny = self._normal(pose_b)
        a = place(self.at, pose_a)
        b = place(self.at, pose_b)
        return np.array([nx * (a[0] - b[0]) + ny * (a[1] - b[1])])


@dataclass(frozen=True)
class CamContact(_PointOnLine):
    """Sliding contact of two profiles (cam and follower) at ``at`` with common normal ``normal``.

    The normal is held by the second link's profile.  One constraint: the
    relative center lies on the common normal.  Velocity analysis only needs
    the contact point and normal of this position; position analysis would
    need the profiles and is not modelled.
    """

    normal: Vec = (0.0, 1.0)

    kind: ClassVar[str] = "cam"

    def __post_init__(self):
        object.__setattr__(self, "normal", _unit(self.normal, f"{self.label()}: field 'normal'"))

    def _normal(self, pose_b) -> Vec:
        return rotate(self.normal, pose_b[2])

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

    def primary(self, pose_a, pose_b) -> Primary:
        x, y = place(self.at, pose_a)
        return Primary(pg.point(x, y), None, f"contact point of rolling contact '{self.name}'")

    def twist_rows(self, pose_a, pose_b) -> np.ndarray:
        return _point_rows(place(self.at, pose_a))


@dataclass(frozen=True)
class GearMesh(Joint):
    """Two gears in mesh: the pitch circles roll without slip at the pitch point.

    ``centers`` are the gear centres (of the first and the second link) and
    ``pitch_point`` the point where the pitch circles touch, on the line of
    centres: between the centres for an external pair, outside them for an
    internal pair.  One constraint (a higher pair): the tangential velocities
    of the two pitch circles agree at the pitch point, so the relative center
    lies on the common tangent there.  With both centres held by one link (the
    carrier) the relative center is the pitch point itself.
    """

    centers: tuple[Vec, Vec] = ((0.0, 0.0), (1.0, 0.0))
    pitch_point: Vec = (0.5, 0.0)
    carrier: str | None = None

    kind: ClassVar[str] = "gear"
    freedoms: ClassVar[int] = 2
    locates_point: ClassVar[bool] = False

    def reference_points(self):
        return (self.centers[0], self.centers[1], self.pitch_point)

    @property
    def internal(self) -> bool:
        """True for an internal (ring) pair: the pitch point lies outside the centres."""
        (ax, ay), (bx, by) = self.centers
        px, py = self.pitch_point
        return (px - ax) * (px - bx) + (py - ay) * (py - by) > 0.0

    @property
    def radii(self) -> tuple[float, float]:
        """Pitch radii of the first and second gear."""
        (ax, ay), (bx, by) = self.centers
        px, py = self.pitch_point
        return (math.hypot(px - ax, py - ay), math.hypot(px - bx, py - by))

    def _tangent(self, pose_a) -> Vec:
        a = place(self.centers[0], pose_a)
        p = place(self.pitch_point, pose_a)
        # The line of centres through a's centre and the pitch point (robust
        # also when one pitch radius is tiny): its normal is the common tangent.
        dx, dy = p[0] - a[0], p[1] - a[1]
        if math.hypot(dx, dy) == 0.0:
            b = self.centers[1]
            dx, dy = b[0] - a[0], b[1] - a[1]
        n = math.hypot(dx, dy)
        return (-dy / n, dx / n)

    def primary(self, pose_a, pose_b) -> Primary:
        p = place(self.pitch_point, pose_a)
        if self.carrier is not None:
            return Primary(
                pg.point(*p), None, f"pitch point of gear mesh '{self.name}' (centres held by '{self.carrier}')"
            )
        tx, ty = self._tangent(pose_a)
        return Primary(None, pg.join(pg.point(*p), pg.direction(tx, ty)), f"common tangent of gear mesh '{self.name}'")

    def twist_rows(self, pose_a, pose_b) -> np.ndarray:
        # t . (v_a(p) - v_b(p)) = 0 puts the center on the line through p along t.
        return _along_row(place(self.pitch_point, pose_a), self._tangent(pose_a))[None, :]


#: Every joint kind by its case-file name.
JOINT_KINDS: dict[str, type[Joint]] = {
    cls.kind: cls for cls in (Revolute, Prismatic, PinInSlot, RollingContact, GearMesh, CamContact)
}
