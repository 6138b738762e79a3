"""Checking a hand (or graphical) calculation against mechgraph, step by step.

A person who has located the instant centers of a linkage by hand, with
straightedge and pencil or with a calculator, writes down what they found in
a small *hand file* next to the case file (``press.hand.toml`` next to
``press.toml``).  :func:`read_hand_file` reads it against the case's
mechanism, :func:`check_hand` compares it item by item with an
:class:`~mechgraph.analysis.Analysis`, and :func:`render_text` /
:func:`render_dict` give the verdict as text or as plain (JSON-able) data.

For a center that is off, the check does not stop at the wrong number.  The
analysis records how each center was located: the two three-centers lines
that meet there, each through two other centers.  Using the person's *own*
values of those two centers, the check redraws each of their lines and says
whether it passes through their reported point; it then walks the derivation
graph back (through the centers that are off, and through those within
tolerance that carry an error on) to the earliest wrong step the others
depend on (the *first faulty step*), and lists the later items that only
inherit that error.  The person need not have built the centers in
mechgraph's order: a center whose point lies on two (distinct) three-centers
lines I_ik-I_jk drawn through their own values of other centers is
consistent with their own construction, and inherits from those of the
centers it was drawn through that are off.

The TOML hand file
------------------
A complete example, for the bench press of README.md (links frame, crank,
coupler, rocker, link and ram; a point "punch tip"), with values as a
careful hand construction gives them.  Every field but ``unit`` is
optional; an item left out is reported as missing, not as an error::

    # press.hand.toml: what I found by hand for press.toml
    [hand]
    unit = "mm"                    # required: the case's length unit
    tolerance = 0.5                # mm: how far a center may be from mechgraph's and still agree
    angle_tolerance_deg = 1.0      # centers at infinity, and centers farther than `far`
    relative_tolerance = 0.02      # angular and point velocities (fraction)
    far = 10.0                     # beyond far x drawing size only a center's direction is judged
    rate_floor = 0.01              # see "Rates" below
    notes = "drawn at 1:2 on A3"   # free text, not checked

    [[center]]
    pair = ["frame", "crank"]      # two link names of the case, in either order
    at = [0.0, 0.0]                # a finite center [x, y] in the unit ...

    [[center]]
    pair = ["frame", "ram"]
    at_infinity_deg = 0.0          # ... or a center at infinity: its direction, degrees from +x
                                   # (either sense: 0 and 180 are the same point at infinity)

    [[center]]
    pair = ["frame", "coupler"]
    at = [139.6, 185.3]            # a shallow crossing, read less closely:
    tolerance = 1.0                # this item only (length; `angle_tolerance_deg` for directions)
    unit = "mm"                    # optional; if given it must be the file's unit

    [[angular_velocity]]
    link = "rocker"
    rad_per_s = 1.83               # counter-clockwise positive; or rpm = ..., or deg_per_s = ...
    relative = 0.05                # this item only; or tolerance = 0.1 (absolute, in the rate unit given)

    [[point_velocity]]
    point = "punch tip"            # a [[point]] of the case
    v = [0.0, -283.0]              # [vx, vy] in unit/s; or speed = 283.0 (magnitude only)
    tolerance = 10.0               # this item only, unit/s; or relative = 0.03
    unit = "mm/s"                  # optional; "mm" or "mm/s", it must be the file's unit

Defaults of the tolerances (all file fields; per-item fields override them):

* ``tolerance``: :data:`DEFAULT_RELATIVE_TOLERANCE` (0.5 %) of the drawing
  size (:attr:`~mechgraph.model.Mechanism.scale`, the diagonal of the joints'
  bounding box).  A construction drawn to fill a sheet about 200 mm across is
  read to about a millimetre: pencil line width and the reading of a crossing
  (common practice, no source).
* ``angle_tolerance_deg``: :data:`DEFAULT_ANGLE_TOLERANCE_DEG`, a direction
  drawn and read with a protractor (common practice, no source).
* ``relative_tolerance``: :data:`DEFAULT_RATE_TOLERANCE` (2 %), what a
  graphical velocity analysis read off such a drawing gives (common
  practice, no source).
* ``far``: :data:`DEFAULT_FAR` drawing sizes.  A center farther than that
  from the drawing's centre is off any practical sheet: a hand drawing fixes
  only the direction in which its construction lines converge, so only that
  direction (seen from the drawing's centre, either sense) is judged, with
  ``angle_tolerance_deg``; such a center and a center at infinity can agree
  (common practice, no source).
* ``rate_floor``: :data:`DEFAULT_RATE_FLOOR`; see *Rates*.

The CSV hand file
-----------------
The same content, one row per item, with a header row naming the columns
(any order; columns may be left out; empty cells are "not given"; rows whose
first cell starts with ``#`` and blank rows are skipped).  The columns are
:data:`CSV_COLUMNS`:

==========  ================================================================
``kind``    ``setting``, ``center``, ``angular_velocity`` or ``point_velocity``
``name``    setting name; first link; link; point
``other``   second link (centers only)
``x, y``    finite center; or ``vx, vy`` of a point velocity
``angle_deg``  direction of a center at infinity, degrees from +x
``value``   setting value; angular velocity; point speed
``unit``    length unit (centers, point velocities as ``mm`` or ``mm/s``);
            ``rad/s`` (default), ``rpm`` or ``deg/s`` for angular velocities;
            the file's unit for ``setting,unit``
``tolerance``  this item's absolute tolerance: length, degrees for a center
            given by ``angle_deg``, the row's rate unit, or unit/s
``relative``   this item's relative tolerance (rates only)
==========  ================================================================

Example::

    kind,name,other,x,y,angle_deg,value,unit,tolerance,relative
    setting,unit,,,,,,mm,,
    setting,tolerance,,,,,0.5,,,
    center,frame,crank,0,0,,,,,
    center,frame,ram,,,0,,,,
    center,frame,coupler,139.6,185.3,,,mm,1,
    angular_velocity,rocker,,,,,1.83,rad/s,,0.05
    point_velocity,punch tip,,0,-283,,,mm/s,10,

The settings are those of the TOML ``[hand]`` table; ``setting,unit`` (or a
``unit`` cell on some row) is required, and every length unit in the file
must be the same one, the case's.

Rates
-----
An angular velocity or point velocity agrees when its absolute error is
within its absolute ``tolerance`` (if the item gives one), else when its
relative error is within ``relative`` (or the file's
``relative_tolerance``).  The relative error is ``|given - true| /
max(|true|, rate_floor * reference)``; the reference is the largest angular
speed of any link (angular velocities) or the larger of the largest named
point speed and that angular speed times the drawing size (point
velocities), so that a rate that is zero at this instant (a translating
link) is judged against a small fraction of the mechanism's own rates rather
than against zero.  A point velocity given as ``v = [vx, vy]`` is compared as
a vector, one given as ``speed`` by magnitude only.

Examples
--------
>>> from mechgraph.analysis import analyse
>>> from mechgraph.casefile import demo_mechanism
>>> m = demo_mechanism()
>>> hand = parse_hand_text('''
... [hand]
... unit = "mm"
... tolerance = 0.5
... [[center]]
... pair = ["frame", "crank"]
... at = [0.0, 0.0]
... [[center]]
... pair = ["frame", "coupler"]
... at = [169.7, 237.6]
... ''', m)
>>> report = check_hand(analyse(m), hand)
>>> report.holds, report.center("frame", "coupler").status
(True, 'agrees')
>>> sum(c.status == "missing" for c in report.centers)
13
"""

from __future__ import annotations

import csv
import io
import math
import re
import tomllib
from dataclasses import dataclass, field, replace
from functools import cached_property
from pathlib import Path

from . import projective as pg
from .analysis import Analysis
from .errors import CaseFileError, HandCheckError  # noqa: F401 - HandCheckError is part of this module's API
from .joints import Revolute
from .model import LENGTH_UNITS, Mechanism
from .report import CAUTION
from .three_centers import pairs

__all__ = [
    "HandCheckError",
    "DEFAULT_RELATIVE_TOLERANCE",
    "DEFAULT_ANGLE_TOLERANCE_DEG",
    "DEFAULT_RATE_TOLERANCE",
    "DEFAULT_FAR",
    "DEFAULT_RATE_FLOOR",
    "CSV_COLUMNS",
    "DISPLAY_ZERO",
    "SCHEMA",
    "GivenCenter",
    "GivenAngularVelocity",
    "GivenPointVelocity",
    "HandCalculation",
    "Place",
    "LineCheck",
    "CenterCheck",
    "RateCheck",
    "HandReport",
    "read_hand_file",
    "parse_hand_text",
    "find_hand_file",
    "check_hand",
    "render_text",
    "render_dict",
]

#: Default length tolerance of a hand drawing, as a fraction of the drawing
#: size: a sheet about 200 mm across read to about a millimetre (common
#: practice, no source).  It is wider than the accuracy of a drawn *input*
#: point (:data:`mechgraph.conditioning.DEFAULT_RELATIVE_INPUT_TOL`) because a
#: constructed center is the crossing of lines through other constructed points.
DEFAULT_RELATIVE_TOLERANCE = 0.005

#: Default tolerance of a direction drawn by hand, degrees (common practice, no source).
DEFAULT_ANGLE_TOLERANCE_DEG = 1.0

#: Default relative tolerance of rates read off a velocity drawing (common practice, no source).
DEFAULT_RATE_TOLERANCE = 0.02

#: Default distance, in drawing sizes from the drawing's centre, beyond which
#: only a center's direction is judged (common practice, no source).
DEFAULT_FAR = 10.0

#: Default floor of the relative-error denominator of a rate, as a fraction
#: of the mechanism's largest rate of the same kind.
DEFAULT_RATE_FLOOR = 0.01

#: Columns a CSV hand file may have (``kind`` and ``name`` are required).
CSV_COLUMNS = ("kind", "name", "other", "x", "y", "angle_deg", "value", "unit", "tolerance", "relative")

#: Numbers smaller than this in absolute value are printed as 0 in the text
#: report (round-off of values in drawing units or rad/s; display only, never
#: used in a decision; :func:`render_dict` keeps the raw values).
DISPLAY_ZERO = 1e-12

#: Identifier of the plain-dict layout of :func:`render_dict`.
SCHEMA = "mechgraph.handcheck/1"

_RATE_UNITS = {"rad_per_s": 1.0, "rpm": 2.0 * math.pi / 60.0, "deg_per_s": math.pi / 180.0}
_CSV_RATE_UNITS = {"rad/s": "rad_per_s", "rpm": "rpm", "deg/s": "deg_per_s"}
_RATE_SHOWN = {"rad_per_s": "rad/s", "rpm": "rpm", "deg_per_s": "deg/s"}
_SETTINGS = ("tolerance", "angle_tolerance_deg", "relative_tolerance", "far", "rate_floor")
_HAND_KEYS = {"unit", "notes", "case", *_SETTINGS}
_TOP_KEYS = {"hand", "center", "angular_velocity", "point_velocity"}
_CENTER_KEYS = {"pair", "at", "at_infinity_deg", "tolerance", "angle_tolerance_deg", "unit", "notes"}
_OMEGA_KEYS = {"link", "tolerance", "relative", "notes", *_RATE_UNITS}
_POINT_KEYS = {"point", "v", "speed", "tolerance", "relative", "unit", "notes"}


# --------------------------------------------------------------------------- the given items


@dataclass(frozen=True)
class GivenCenter:
    """A center as the person found it.

    Attributes
    ----------
    links : tuple of str
        The two link names as written.
    i, j : int
        Link indices in the case, ``i < j``.
    at : tuple of float or None
        A finite center ``(x, y)`` in the file's unit.
    direction_deg : float or None
        For a center at infinity: its direction, degrees from +x.
    tolerance : float or None
        This item's length tolerance, overriding the file's.
    angle_tolerance_deg : float or None
        This item's angle tolerance, overriding the file's.
    source : str
        Where it was written (``center[3]`` or ``line 7``).
    """

    links: tuple[str, str]
    i: int
    j: int
    at: tuple[float, float] | None
    direction_deg: float | None
    tolerance: float | None = None
    angle_tolerance_deg: float | None = None
    source: str = ""

    @property
    def homogeneous(self) -> tuple[float, float, float]:
        """The center as a homogeneous point ``(x, y, 1)`` or ``(cos, sin, 0)``."""
        if self.at is not None:
            return (self.at[0], self.at[1], 1.0)
        a = math.radians(self.direction_deg)
        return (math.cos(a), math.sin(a), 0.0)


@dataclass(frozen=True)
class GivenAngularVelocity:
    """An angular velocity as the person found it (rad/s, counter-clockwise positive).

    ``tolerance`` is absolute (rad/s), ``relative`` a fraction; at most one is
    set, else the file's ``relative_tolerance`` applies.  ``shown`` is the
    value as written, with its unit.
    """

    link: str
    index: int
    value: float
    tolerance: float | None = None
    relative: float | None = None
    source: str = ""
    shown: str = ""


@dataclass(frozen=True)
class GivenPointVelocity:
    """A point velocity as the person found it: a vector ``(vx, vy)`` or a speed, in unit/s.

    ``tolerance`` is absolute (unit/s), ``relative`` a fraction; at most one
    is set, else the file's ``relative_tolerance`` applies.
    """

    point: str
    link: str
    vector: tuple[float, float] | None
    speed: float | None
    tolerance: float | None = None
    relative: float | None = None
    source: str = ""


@dataclass(frozen=True)
class HandCalculation:
    """Everything a hand file says, checked against its case's names and unit.

    Attributes
    ----------
    path : str
    format : str
        ``"toml"`` or ``"csv"``.
    unit : str
        Length unit (the case's).
    tolerance : float
        Length tolerance of centers, in ``unit``.
    tolerance_is_default : bool
        True when the file gave none and :data:`DEFAULT_RELATIVE_TOLERANCE` applied.
    angle_tolerance_deg, relative_tolerance, far, rate_floor : float
        See the module documentation.
    centers, angular_velocities, point_velocities : tuple
        The items given, in file order.
    mechanism_name : str
    link_names, point_names : tuple of str
        The case's links and points, to check that an analysis is of the same case.
    scale : float
        The case's drawing size.
    notes : str
    """

    path: str
    format: str
    unit: str
    tolerance: float
    tolerance_is_default: bool
    angle_tolerance_deg: float
    relative_tolerance: float
    far: float
    rate_floor: float
    centers: tuple[GivenCenter, ...]
    angular_velocities: tuple[GivenAngularVelocity, ...]
    point_velocities: tuple[GivenPointVelocity, ...]
    mechanism_name: str
    link_names: tuple[str, ...]
    point_names: tuple[str, ...]
    scale: float
    notes: str = ""

    @cached_property
    def _center_map(self) -> dict:
        return {(c.i, c.j): c for c in self.centers}

    @cached_property
    def _omega_map(self) -> dict:
        return {w.index: w for w in self.angular_velocities}

    @cached_property
    def _point_map(self) -> dict:
        return {p.point: p for p in self.point_velocities}

    def center(self, i: int, j: int) -> GivenCenter | None:
        """The given center of links ``i`` and ``j`` (indices, either order), or None."""
        return self._center_map.get((min(i, j), max(i, j)))

    def angular_velocity(self, i: int) -> GivenAngularVelocity | None:
        """The given angular velocity of link ``i``, or None."""
        return self._omega_map.get(i)

    def point_velocity(self, name: str) -> GivenPointVelocity | None:
        """The given velocity of the named point, or None."""
        return self._point_map.get(name)

    @property
    def n_items(self) -> int:
        return len(self.centers) + len(self.angular_velocities) + len(self.point_velocities)

    @property
    def tolerance_source(self) -> str:
        """Where the length tolerance comes from, in words."""
        if not self.tolerance_is_default:
            return "from the hand file"
        return (
            f"default: {DEFAULT_RELATIVE_TOLERANCE:.1%} of the drawing size {_num(self.scale)} {self.unit}, "
            "a hand drawing's accuracy (common practice, no source)"
        )


# --------------------------------------------------------------------------- reading


class _Builder:
    """Collects items from either format, with the checks both share."""

    def __init__(self, mech: Mechanism, path: str, fmt: str):
        self.mech = mech
        self.path = path
        self.format = fmt
        self.unit: str | None = None
        self.unit_where: str = ""
        self.settings: dict[str, float] = {}
        self.settings_where: dict[str, str] = {}
        self.notes = ""
        self.centers: dict[tuple[int, int], GivenCenter] = {}
        self.omegas: dict[int, GivenAngularVelocity] = {}
        self.points: dict[str, GivenPointVelocity] = {}
        self.point_names = {p.name: p for p in mech.points}

    # errors: TOML names entry and field; CSV names the line
    def fail(self, where: str, msg: str, line: int | None = None):
        # with a line number (CSV) the line is the place; otherwise the entry and field (TOML)
        text = f"{where}: {msg}" if where and line is None else msg
        raise HandCheckError(text, path=self.path, line=line)

    def link(self, name: str, where: str, what: str, line=None) -> int:
        if name not in self.mech.index:
            self.fail(
                where,
                f"{what} names link '{name}', which is not in case '{self.mech.name}'; "
                f"links are: {', '.join(self.mech.link_names)}",
                line,
            )
        return self.mech.index[name]

    def length_unit(self, unit: str, where: str, line=None, *, per_second: bool = False):
        """Check a length unit written on an item (or for the file) against the file's and the case's."""
        u = unit.strip()
        base = u[:-2] if per_second and u.endswith("/s") else u
        if base not in LENGTH_UNITS:
            valid = ", ".join(f"{x}" + (f" or {x}/s" if per_second else "") for x in LENGTH_UNITS)
            self.fail(where, f"unit {unit!r} is not a length unit; use {valid} (the case's unit is {self.mech.unit})", line)
        if self.unit is None:
            if base != self.mech.unit:
                self.fail(
                    where,
                    f"unit '{base}' does not match the case's unit '{self.mech.unit}' (case '{self.mech.name}'); "
                    f"write the hand values in {self.mech.unit}, the unit of the case",
                    line,
                )
            self.unit, self.unit_where = base, (where or (f"line {line}" if line is not None else "its first unit"))
        elif base != self.unit:
            self.fail(
                where,
                f"unit '{base}' mixes units: the file's unit is '{self.unit}' ({self.unit_where}); "
                f"write every length in {self.unit}",
                line,
            )

    def setting(self, key: str, value: float, where: str, line=None):
        if key in self.settings:
            self.fail(where, f"setting '{key}' is given twice (first in {self.settings_where[key]}); give it once", line)
        if key == "angle_tolerance_deg":
            ok, valid = 0.0 < value <= 90.0, "a number of degrees above 0 and at most 90"
        elif key == "rate_floor":
            ok, valid = 0.0 < value <= 1.0, "a fraction above 0 and at most 1"
        else:
            ok, valid = value > 0.0, "a positive number"
        if not ok:
            self.fail(where, f"setting '{key}' is {value:g}; it must be {valid}", line)
        self.settings[key] = value
        self.settings_where[key] = where

    def tolerance_pair(self, tol, rel, where: str, line=None):
        if tol is not None and rel is not None:
            self.fail(where, "give at most one of 'tolerance' (absolute) or 'relative' (a fraction), not both", line)
        if tol is not None and not tol > 0.0:
            self.fail(where, f"'tolerance' must be a positive number, got {tol:g}", line)
        if rel is not None and not rel > 0.0:
            self.fail(where, f"'relative' must be a positive fraction (e.g. 0.05 for 5 %), got {rel:g}", line)

    def add_center(self, a: str, b: str, at, direction, tol, angle_tol, where: str, line=None):
        i = self.link(a, where, "the pair", line)
        j = self.link(b, where, "the pair", line)
        if i == j:
            self.fail(where, f"the pair names link '{a}' twice; a center is of two different links", line)
        if (at is None) == (direction is None):
            self.fail(
                where,
                "give exactly one of a finite center ([x, y]) or a center at infinity (its direction in degrees"
                + (", field 'at_infinity_deg')" if self.format == "toml" else ", column 'angle_deg')"),
                line,
            )
        if tol is not None and not tol > 0.0:
            self.fail(where, f"the tolerance must be a positive number, got {tol:g}", line)
        if angle_tol is not None and not 0.0 < angle_tol <= 90.0:
            self.fail(where, f"the angle tolerance must be above 0 and at most 90 degrees, got {angle_tol:g}", line)
        for v in at or ():
            if abs(v) > self.mech.max_coordinate:
                self.fail(where, f"coordinate {v:g} is beyond {self.mech.max_coordinate:g} {self.mech.unit}; check the number", line)
        key = (min(i, j), max(i, j))
        if key in self.centers:
            self.fail(
                where,
                f"center {self.mech.pair_names(*key)} is already given in {self.centers[key].source}; give each center once",
                line,
            )
        self.centers[key] = GivenCenter(
            links=(a, b), i=key[0], j=key[1], at=at, direction_deg=direction,
            tolerance=tol, angle_tolerance_deg=angle_tol, source=where,
        )

    def add_omega(self, name: str, value: float, rate_key: str, tol, rel, where: str, line=None):
        i = self.link(name, where, "the angular velocity", line)
        self.tolerance_pair(tol, rel, where, line)
        if i in self.omegas:
            self.fail(where, f"the angular velocity of link '{name}' is already given in {self.omegas[i].source}; give it once", line)
        f = _RATE_UNITS[rate_key]
        self.omegas[i] = GivenAngularVelocity(
            link=name, index=i, value=value * f, tolerance=None if tol is None else tol * f,
            relative=rel, source=where, shown=f"{value:g} {_RATE_SHOWN[rate_key]}",
        )

    def add_point(self, name: str, vector, speed, tol, rel, where: str, line=None):
        if name not in self.point_names:
            known = ", ".join(f"'{p}'" for p in self.point_names) or "none (the case has no [[point]] entries)"
            self.fail(where, f"point '{name}' is not a point of case '{self.mech.name}'; its points are: {known}", line)
        if (vector is None) == (speed is None):
            self.fail(
                where,
                "give exactly one of the velocity vector "
                + ("(field 'v' = [vx, vy])" if self.format == "toml" else "(columns x, y)")
                + " or the speed " + ("(field 'speed')" if self.format == "toml" else "(column value)"),
                line,
            )
        if speed is not None and speed < 0.0:
            self.fail(where, f"a speed is a magnitude and cannot be negative, got {speed:g}; give v = [vx, vy] for a signed velocity", line)
        self.tolerance_pair(tol, rel, where, line)
        if name in self.points:
            self.fail(where, f"the velocity of point '{name}' is already given in {self.points[name].source}; give it once", line)
        self.points[name] = GivenPointVelocity(
            point=name, link=self.point_names[name].link, vector=vector, speed=speed,
            tolerance=tol, relative=rel, source=where,
        )

    def build(self) -> HandCalculation:
        if self.unit is None:
            how = (
                "add unit = \"%s\" to the [hand] table" if self.format == "toml"
                else "add a row setting,unit,,,,,,%s,, (or fill the unit column)"
            ) % self.mech.unit
            self.fail("", f"the hand file does not say its length unit; {how}")
        s = self.settings
        default = "tolerance" not in s
        return HandCalculation(
            path=self.path,
            format=self.format,
            unit=self.unit,
            tolerance=s.get("tolerance", DEFAULT_RELATIVE_TOLERANCE * self.mech.scale),
            tolerance_is_default=default,
            angle_tolerance_deg=s.get("angle_tolerance_deg", DEFAULT_ANGLE_TOLERANCE_DEG),
            relative_tolerance=s.get("relative_tolerance", DEFAULT_RATE_TOLERANCE),
            far=s.get("far", DEFAULT_FAR),
            rate_floor=s.get("rate_floor", DEFAULT_RATE_FLOOR),
            centers=tuple(self.centers.values()),
            angular_velocities=tuple(self.omegas.values()),
            point_velocities=tuple(self.points.values()),
            mechanism_name=self.mech.name,
            link_names=self.mech.link_names,
            point_names=tuple(p.name for p in self.mech.points),
            scale=self.mech.scale,
            notes=self.notes,
        )


def _toml_number(b: _Builder, v, where: str, key: str) -> float:
    if isinstance(v, bool) or not isinstance(v, (int, float)):
        b.fail(where, f"field '{key}' must be a number (e.g. 12.5, no quotes, no unit), got {v!r}")
    if not math.isfinite(v):
        b.fail(where, f"field '{key}' must be a finite number, got {v!r}")
    return float(v)


def _toml_pair(b: _Builder, e: dict, key: str, where: str, what: str):
    if key not in e:
        return None
    v = e[key]
    if not isinstance(v, list) or len(v) != 2:
        b.fail(where, f"field '{key}' must be {what} of two numbers, got {v!r}")
    return (_toml_number(b, v[0], where, key), _toml_number(b, v[1], where, key))


def _toml_opt(b: _Builder, e: dict, key: str, where: str):
    return _toml_number(b, e[key], where, key) if key in e else None


def _toml_keys(b: _Builder, e: dict, allowed: set, where: str):
    extra = sorted(set(e) - allowed)
    if extra:
        b.fail(where, f"unknown field(s) {', '.join(repr(x) for x in extra)}; valid fields are: {', '.join(sorted(allowed))}")


def _toml_text(b: _Builder, e: dict, key: str, where: str, what: str) -> str:
    if key not in e:
        b.fail(where, f"field '{key}' is missing ({what})")
    v = e[key]
    if not isinstance(v, str) or not v.strip():
        b.fail(where, f"field '{key}' must be a non-empty text ({what}), got {v!r}")
    return v.strip()


def _toml_entries(b: _Builder, doc: dict, key: str) -> list:
    v = doc.get(key, [])
    if isinstance(v, dict):
        b.fail(key, f"write each {key} as an array entry [[{key}]], not as a single table [{key}]")
    if not isinstance(v, list) or not all(isinstance(e, dict) for e in v):
        b.fail(key, f"'{key}' must be a list of [[{key}]] tables")
    return v


def _parse_toml(b: _Builder, text: str) -> None:
    try:
        doc = tomllib.loads(text)
    except tomllib.TOMLDecodeError as e:
        m = re.search(r"line (\d+)", str(e))
        raise HandCheckError(f"not valid TOML: {e}", path=b.path, line=int(m.group(1)) if m else None) from None
    _toml_keys(b, doc, _TOP_KEYS, "top level")
    hand = doc.get("hand")
    if not isinstance(hand, dict):
        b.fail("[hand]", f"the [hand] table is missing (or not a table); it must give at least unit = \"{b.mech.unit}\"")
    _toml_keys(b, hand, _HAND_KEYS, "[hand]")
    b.length_unit(_toml_text(b, hand, "unit", "[hand]", f"the length unit, e.g. \"{b.mech.unit}\""), "[hand] field 'unit'")
    for key in _SETTINGS:
        if key in hand:
            b.setting(key, _toml_number(b, hand[key], "[hand]", key), f"[hand] field '{key}'")
    if "notes" in hand:
        b.notes = str(hand["notes"])

    for k, e in enumerate(_toml_entries(b, doc, "center")):
        where = f"center[{k + 1}]"
        ls = e.get("pair")
        if not isinstance(ls, list) or len(ls) != 2 or not all(isinstance(x, str) and x.strip() for x in ls):
            b.fail(where, f"field 'pair' must name two links, e.g. [\"{b.mech.link_names[0]}\", \"{b.mech.link_names[1]}\"], got {ls!r}")
        a, c = ls[0].strip(), ls[1].strip()
        where += f" {a}-{c}"
        _toml_keys(b, e, _CENTER_KEYS, where)
        if "unit" in e:
            b.length_unit(_toml_text(b, e, "unit", where, "a length unit"), f"{where} field 'unit'")
        at = _toml_pair(b, e, "at", where, "a point [x, y]")
        d = _toml_opt(b, e, "at_infinity_deg", where)
        b.add_center(a, c, at, d, _toml_opt(b, e, "tolerance", where), _toml_opt(b, e, "angle_tolerance_deg", where), where)

    for k, e in enumerate(_toml_entries(b, doc, "angular_velocity")):
        where = f"angular_velocity[{k + 1}]"
        name = _toml_text(b, e, "link", where, "a link of the case")
        where += f" '{name}'"
        _toml_keys(b, e, _OMEGA_KEYS, where)
        given = [key for key in _RATE_UNITS if key in e]
        if len(given) != 1:
            b.fail(where, "give exactly one of rad_per_s, rpm or deg_per_s (counter-clockwise positive)")
        b.add_omega(
            name, _toml_number(b, e[given[0]], where, given[0]), given[0],
            _toml_opt(b, e, "tolerance", where), _toml_opt(b, e, "relative", where), where,
        )

    for k, e in enumerate(_toml_entries(b, doc, "point_velocity")):
        where = f"point_velocity[{k + 1}]"
        name = _toml_text(b, e, "point", where, "a [[point]] of the case")
        where += f" '{name}'"
        _toml_keys(b, e, _POINT_KEYS, where)
        if "unit" in e:
            b.length_unit(_toml_text(b, e, "unit", where, "a length unit"), f"{where} field 'unit'", per_second=True)
        b.add_point(
            name, _toml_pair(b, e, "v", where, "a velocity [vx, vy]"), _toml_opt(b, e, "speed", where),
            _toml_opt(b, e, "tolerance", where), _toml_opt(b, e, "relative", where), where,
        )


def _parse_csv(b: _Builder, text: str) -> None:
    reader = csv.reader(io.StringIO(text))
    header = None
    for row in reader:
        line = reader.line_num
        cells = [c.strip() for c in row]
        if not any(cells) or cells[0].startswith("#"):
            continue
        if header is None:
            names = [c.lower() for c in cells]
            unknown = [c for c in names if c not in CSV_COLUMNS]
            if unknown:
                b.fail("", f"unknown column(s) {', '.join(repr(c) for c in unknown)} in the header; valid columns are: {', '.join(CSV_COLUMNS)}", line)
            for need in ("kind", "name"):
                if need not in names:
                    b.fail("", f"the header has no '{need}' column; the first row must name the columns, e.g. {','.join(CSV_COLUMNS)}", line)
            dup = sorted({c for c in names if names.count(c) > 1})
            if dup:
                b.fail("", f"column(s) {', '.join(repr(c) for c in dup)} appear twice in the header", line)
            header = names
            continue
        if len(cells) > len(header):
            b.fail(
                "",
                f"{len(cells)} cells but the header has {len(header)} columns (a decimal comma, or a name "
                "with a comma that needs quotes?)",
                line,
            )
        r = dict(zip(header, cells + [""] * (len(header) - len(cells))))
        _csv_row(b, r, line)
    if header is None:
        b.fail("", f"the file is empty; the first row must name the columns, e.g. {','.join(CSV_COLUMNS)}")


def _csv_number(b: _Builder, r: dict, col: str, line: int) -> float | None:
    cell = r.get(col, "")
    if cell == "":
        return None
    try:
        v = float(cell)
    except ValueError:
        b.fail("", f"column '{col}': {cell!r} is not a number; write e.g. 12.5 (a decimal point, no unit)", line)
    if not math.isfinite(v):
        b.fail("", f"column '{col}': {cell!r} is not a finite number", line)
    return v


def _csv_unused(b: _Builder, r: dict, kind: str, allowed: set, line: int):
    extra = [c for c in CSV_COLUMNS if c not in allowed and r.get(c, "") != ""]
    if extra:
        b.fail("", f"a {kind} row does not use column(s) {', '.join(repr(c) for c in extra)}; leave them empty", line)


def _csv_row(b: _Builder, r: dict, line: int) -> None:
    kind, name = r.get("kind", "").lower(), r.get("name", "")
    kinds = ("setting", "center", "angular_velocity", "point_velocity")
    if kind not in kinds:
        b.fail("", f"kind {r.get('kind', '')!r} is not known; use one of {', '.join(kinds)}", line)
    if not name:
        b.fail("", f"a {kind} row needs a name", line)
    where = f"line {line}"
    if kind == "setting":
        if name == "unit":
            _csv_unused(b, r, kind, {"kind", "name", "unit"}, line)
            if not r.get("unit"):
                b.fail("", f"setting 'unit' needs the unit in the unit column, e.g. setting,unit,,,,,,{b.mech.unit},,", line)
            if b.unit is not None:
                if "unit" in b.settings_where:
                    b.fail("", f"setting 'unit' is given twice (first in {b.settings_where['unit']}); give it once", line)
            b.length_unit(r["unit"], "", line)
            b.settings_where["unit"] = where
            return
        if name not in _SETTINGS:
            b.fail("", f"setting {name!r} is not known; settings are: unit, {', '.join(_SETTINGS)}", line)
        _csv_unused(b, r, kind, {"kind", "name", "value"}, line)
        v = _csv_number(b, r, "value", line)
        if v is None:
            b.fail("", f"setting '{name}' needs a number in the value column", line)
        b.setting(name, v, where, line)
        return
    if kind == "center":
        _csv_unused(b, r, kind, {"kind", "name", "other", "x", "y", "angle_deg", "unit", "tolerance"}, line)
        other = r.get("other", "")
        if not other:
            b.fail("", "a center row names its two links in the columns name and other", line)
        if r.get("unit"):
            b.length_unit(r["unit"], "", line)
        x, y = _csv_number(b, r, "x", line), _csv_number(b, r, "y", line)
        if (x is None) != (y is None):
            b.fail("", "a finite center needs both x and y", line)
        d = _csv_number(b, r, "angle_deg", line)
        tol = _csv_number(b, r, "tolerance", line)
        at = None if x is None else (x, y)
        b.add_center(
            name, other, at, d, tol if d is None else None, tol if d is not None else None, where, line,
        )
        return
    if kind == "angular_velocity":
        _csv_unused(b, r, kind, {"kind", "name", "value", "unit", "tolerance", "relative"}, line)
        u = r.get("unit", "") or "rad/s"
        if u not in _CSV_RATE_UNITS:
            b.fail("", f"angular velocity unit {u!r} is not known; use {', '.join(_CSV_RATE_UNITS)} (rad/s when empty)", line)
        v = _csv_number(b, r, "value", line)
        if v is None:
            b.fail("", "an angular_velocity row needs its value (counter-clockwise positive)", line)
        b.add_omega(name, v, _CSV_RATE_UNITS[u], _csv_number(b, r, "tolerance", line), _csv_number(b, r, "relative", line), where, line)
        return
    _csv_unused(b, r, kind, {"kind", "name", "x", "y", "value", "unit", "tolerance", "relative"}, line)
    if r.get("unit"):
        b.length_unit(r["unit"], "", line, per_second=True)
    x, y = _csv_number(b, r, "x", line), _csv_number(b, r, "y", line)
    if (x is None) != (y is None):
        b.fail("", "a velocity vector needs both x (vx) and y (vy)", line)
    b.add_point(
        name, None if x is None else (x, y), _csv_number(b, r, "value", line),
        _csv_number(b, r, "tolerance", line), _csv_number(b, r, "relative", line), where, line,
    )


def parse_hand_text(text: str, mech: Mechanism, path: str = "<hand>", format: str = "toml") -> HandCalculation:
    """Read hand-file text (TOML or CSV) against a case's mechanism.

    Parameters
    ----------
    text : str
        The file's content, in the layout of the module documentation.
    mech : Mechanism
        The case the hand calculation is of: link and point names and the
        unit are checked against it, and the default tolerance is taken from
        its drawing size.
    path : str, default "<hand>"
        Name used in error messages.
    format : {"toml", "csv"}, default "toml"

    Returns
    -------
    HandCalculation

    Raises
    ------
    HandCheckError
        Malformed TOML or CSV; unknown fields, columns or kinds; links, pairs
        or points not in the case; a unit that differs from the case's or
        from another unit in the file; unparsable or non-finite numbers;
        an item or setting given twice; a center given both finite and at
        infinity (or neither); two tolerances for one item.

    Examples
    --------
    >>> from mechgraph.casefile import demo_mechanism
    >>> h = parse_hand_text('''kind,name,other,x,y,unit
    ... center,frame,crank,0,0,mm
    ... ''', demo_mechanism(), format="csv")
    >>> h.unit, h.centers[0].at, h.tolerance_is_default
    ('mm', (0.0, 0.0), True)

    Notes
    -----
    A missing item is not an error: :func:`check_hand` reports it as missing.
    """
    if format not in ("toml", "csv"):
        raise HandCheckError(f"format {format!r} is not known; use 'toml' or 'csv'", path=path)
    b = _Builder(mech, path, format)
    if format == "toml":
        _parse_toml(b, text)
    else:
        _parse_csv(b, text)
    return b.build()


def read_hand_file(path, mech: Mechanism) -> HandCalculation:
    """Read a hand file (``.toml`` or ``.csv``) against a case's mechanism.

    Parameters
    ----------
    path : str or Path
        The hand file; its suffix says its format.
    mech : Mechanism
        The case it belongs to (see :func:`parse_hand_text`).

    Returns
    -------
    HandCalculation

    Raises
    ------
    HandCheckError
        The file does not exist, cannot be read, has another suffix, or its
        content is invalid (see :func:`parse_hand_text`).

    Examples
    --------
    >>> import tempfile, pathlib
    >>> from mechgraph.casefile import demo_mechanism
    >>> folder = pathlib.Path(tempfile.mkdtemp())
    >>> _ = (folder / "demo.hand.toml").write_text('[hand]\\nunit = "mm"\\n')
    >>> read_hand_file(folder / "demo.hand.toml", demo_mechanism()).n_items
    0

    Notes
    -----
    The file is read whole, as UTF-8.
    """
    p = Path(path)
    suffix = p.suffix.lower()
    if suffix not in (".toml", ".csv"):
        raise HandCheckError(f"a hand file must end in .toml or .csv (its format), not {p.suffix or 'no suffix'!r}", path=str(p))
    try:
        text = p.read_text(encoding="utf-8")
    except FileNotFoundError:
        raise HandCheckError("no such file", path=str(p)) from None
    except (OSError, UnicodeDecodeError) as e:
        raise HandCheckError(f"cannot be read: {e}", path=str(p)) from None
    return parse_hand_text(text, mech, str(p), suffix[1:])


def find_hand_file(case_path) -> Path | None:
    """The hand file placed next to a case file: ``<stem>.hand.toml`` or ``<stem>.hand.csv``.

    Parameters
    ----------
    case_path : str or Path

    Returns
    -------
    Path or None
        The TOML one if both exist; None if neither does.

    Raises
    ------
    HandCheckError
        Never for a missing hand file (None is returned); only if
        ``case_path`` has no file name.

    Examples
    --------
    >>> find_hand_file("/nowhere/press.toml") is None
    True

    Notes
    -----
    A naming convention only; :func:`read_hand_file` reads a hand file of any name.
    """
    p = Path(case_path)
    if not p.name:
        raise HandCheckError("a case path must name a file", path=str(p))
    for suffix in (".hand.toml", ".hand.csv"):
        q = p.with_name(p.stem + suffix)
        if q.is_file():
            return q
    return None


# --------------------------------------------------------------------------- geometry of the check


@dataclass(frozen=True)
class Place:
    """Where a center is, as a report shows it.

    Attributes
    ----------
    xy : tuple of float or None
        A finite point; None at infinity.
    axis_deg : float or None
        Direction modulo 180 degrees: of a center at infinity, or, for a
        finite point beyond the ``far`` limit, seen from the drawing's centre.
    far : bool
        At infinity, or beyond the ``far`` limit: judged by direction only.
    """

    xy: tuple[float, float] | None
    axis_deg: float | None
    far: bool

    @property
    def at_infinity(self) -> bool:
        return self.xy is None

    def text(self, unit: str) -> str:
        if self.xy is None:
            shown = _num(self.axis_deg, 4)
            return f"at infinity, {'0' if shown == '180' else shown} deg"  # 180 and 0 are one direction
        return f"({_num(self.xy[0])}, {_num(self.xy[1])}) {unit}"

    def as_dict(self) -> dict:
        return {
            "x": None if self.xy is None else self.xy[0],
            "y": None if self.xy is None else self.xy[1],
            "at_infinity": self.xy is None,
            "direction_deg": self.axis_deg if self.xy is None else None,
            "far": self.far,
        }


def _axis(dx: float, dy: float) -> float:
    return math.degrees(math.atan2(dy, dx)) % 180.0


def _axis_diff(a: float, b: float) -> float:
    d = abs(a - b) % 180.0
    return min(d, 180.0 - d)


class _Geometry:
    """The drawing's centre and the far limit, and the measures built on them."""

    def __init__(self, mech: Mechanism, far: float):
        self.origin = mech.centre
        self.far_distance = far * mech.scale

    def place(self, h) -> Place:
        x, y, w = (float(c) for c in h)
        if w == 0.0:
            return Place(None, _axis(x, y), True)
        p = (x / w, y / w)
        dx, dy = p[0] - self.origin[0], p[1] - self.origin[1]
        far = math.hypot(dx, dy) > self.far_distance
        return Place(p, _axis(dx, dy) if far else None, far)

    def true_place(self, center, scale: float) -> Place | None:
        if center.point is None:
            return None
        xy = center.cartesian(scale)
        if xy is None:
            d = center.direction()
            return Place(None, _axis(*d), True)
        return self.place((xy[0], xy[1], 1.0))

    def compare(self, want: Place, got: Place, tol: float, angle_tol: float):
        """(agrees, off_by, measure, note) of a given place against the one it should be."""
        if want.far and got.far:
            off = _axis_diff(want.axis_deg, got.axis_deg)
            note = ""
            if want.xy is not None and got.xy is not None:
                note = f"both beyond the far limit; their distance is {_num(math.dist(want.xy, got.xy))}, only the direction is judged"
            return off <= angle_tol, off, "angle_deg", note
        if want.xy is not None and got.xy is not None:
            d = math.dist(want.xy, got.xy)
            return d <= tol, d, "distance", ""
        if want.xy is None:
            r = math.hypot(got.xy[0] - self.origin[0], got.xy[1] - self.origin[1])
            return False, None, None, (
                f"it lies at infinity; a finite point agrees with it only beyond the far limit "
                f"({_num(self.far_distance)} from the drawing's centre, yours is at {_num(r)})"
            )
        r = math.hypot(want.xy[0] - self.origin[0], want.xy[1] - self.origin[1])
        return False, None, None, (
            f"it is a finite point {_num(r)} from the drawing's centre, within the far limit "
            f"({_num(self.far_distance)}), so it is not at infinity"
        )

    def incidence(self, p: Place, line, tol: float, angle_tol: float):
        """(value, measure, passes) of a place against a line: how far it is off the line."""
        a, b, c = (float(v) for v in line)
        nab = math.hypot(a, b)
        ox, oy = self.origin
        line_far = nab == 0.0 or abs(a * ox + b * oy + c) / nab > self.far_distance
        if not p.far:
            if line_far:
                return None, None, False
            d = abs(a * p.xy[0] + b * p.xy[1] + c) / nab
            return d, "distance", d <= tol
        if line_far:
            return 0.0, "angle_deg", True
        if p.xy is None:
            ang = _axis_diff(p.axis_deg, _axis(-b, a))
        else:
            d = abs(a * p.xy[0] + b * p.xy[1] + c) / nab
            ang = math.degrees(math.atan2(d, math.hypot(p.xy[0] - ox, p.xy[1] - oy)))
        return ang, "angle_deg", ang <= angle_tol


# --------------------------------------------------------------------------- the report


@dataclass(frozen=True)
class LineCheck:
    """One construction line a center should lie on, redrawn from the person's own values.

    Attributes
    ----------
    label : str
        ``line frame-crank/crank-coupler`` (through those two centers), or
        the contact normal of a joint, or ``coincides with frame-crank``.
    through : tuple of two pairs (names), or None
        The two centers the line joins (None for a contact normal).
    through_status : tuple of str
        The person's status of each through-center (``agrees``, ``off``, ``missing``).
    line : tuple
        mechgraph's line, homogeneous ``(a, b, c)``: ``a x + b y + c = 0``.
    off_true : float or None
        How far the person's point is off mechgraph's line (in ``measure``).
    user_line : tuple or None
        The same line through the person's own values of the through-centers
        (None when one is missing or the two coincide).
    off_user : float or None
        How far the person's point is off their own line.
    measure : str or None
        ``distance`` (the unit) or ``angle_deg``.
    passes : bool or None
        The person's own line passes through their point within tolerance
        (None when it cannot be drawn).
    note : str
    """

    label: str
    through: tuple | None
    through_status: tuple
    line: tuple
    off_true: float | None
    user_line: tuple | None
    off_user: float | None
    measure: str | None
    passes: bool | None
    note: str = ""


@dataclass(frozen=True)
class CenterCheck:
    """The verdict on one relative center.

    Attributes
    ----------
    pair : tuple of str
    i, j : int
    label : str
        ``center frame-coupler``.
    status : str
        ``agrees``, ``off``, ``missing`` (in the case, not given) or
        ``unchecked`` (given, but the case does not define it: relative rest).
    expected, given : Place or None
    off_by : float or None
        In ``measure``: distance in the unit, or angle in degrees.
    measure : str or None
    tolerance : float or None
        The tolerance in that measure.
    method, derivation : str
        How mechgraph located it.
    depends_on : tuple of pairs (names)
        The centers its construction uses.
    lines : tuple of LineCheck
        For a center that is off: the lines it should lie on, redrawn.
    own_step_ok : bool or None
        For a center that is off: every line redrawn from the person's own
        values passes through their point (the step itself was done right,
        the error came in with its inputs); None when nothing could be redrawn.
    faulty_step : bool
        Off, and the error is made here: the person's own lines miss their
        point (and no two other three-centers lines through their own values
        pass through it), or nothing wrong lies behind it (see :func:`check_hand`).
    inherits_from : tuple of str
        Labels of the earlier faulty steps whose error reaches it.
    inherited_by : tuple of str
        Labels of the later items that are off because of it.
    step : int or None
        Its place in mechgraph's construction order (0 first; None for a
        center the three-centers theorem does not reach).
    note : str
    """

    pair: tuple[str, str]
    i: int
    j: int
    label: str
    status: str
    expected: Place | None
    given: Place | None
    off_by: float | None
    measure: str | None
    tolerance: float | None
    method: str
    derivation: str
    depends_on: tuple = ()
    lines: tuple = ()
    own_step_ok: bool | None = None
    faulty_step: bool = False
    inherits_from: tuple = ()
    inherited_by: tuple = ()
    step: int | None = None
    note: str = ""


@dataclass(frozen=True)
class RateCheck:
    """The verdict on one angular velocity (rad/s) or point velocity (unit/s).

    Attributes
    ----------
    kind : str
        ``angular_velocity`` or ``point_velocity``.
    name : str
        The link or the point.
    label : str
    status : str
        ``agrees``, ``off``, ``missing`` or ``unchecked`` (no velocity analysis).
    expected : float or tuple
        mechgraph's value (a point velocity as ``(vx, vy)``).
    given : float or tuple or None
    compared_as : str
        ``value``, ``vector`` or ``speed``.
    error, relative_error : float or None
        Absolute error (rad/s or unit/s) and relative error (see the module documentation).
    tolerance : str
        The tolerance applied, in words.
    predicted : float or tuple or None
        For an item that is off: the value the person's own centers and rates give.
    faulty_step : bool
    inherits_from, inherited_by : tuple of str
    note : str
    """

    kind: str
    name: str
    label: str
    status: str
    expected: object
    given: object
    compared_as: str
    error: float | None
    relative_error: float | None
    tolerance: str
    predicted: object = None
    faulty_step: bool = False
    inherits_from: tuple = ()
    inherited_by: tuple = ()
    note: str = ""


@dataclass(frozen=True)
class HandReport:
    """A hand calculation checked against mechgraph's analysis.

    Attributes
    ----------
    case_name, hand_path, unit : str
    tolerance : float
        Length tolerance of centers (``tolerance_source`` says where it comes from).
    tolerance_source : str
    angle_tolerance_deg, relative_tolerance, far, rate_floor : float
    centers : tuple of CenterCheck
        All n(n-1)/2 centers, pairs in row order.
    rates : tuple of RateCheck
        Angular velocities of the moving links (and of any other link given),
        then the velocities of the case's points.
    holds : bool
        Something was given and nothing given is off.
    first_faulty : str or None
        Label of the first faulty step.
    faulty_steps : tuple of str
        Every faulty step, in construction order.
    summary : str
        One line: whether the hand calculation holds, and why not.
    caution : str
        :data:`mechgraph.report.CAUTION`.
    """

    case_name: str
    hand_path: str
    unit: str
    tolerance: float
    tolerance_source: str
    angle_tolerance_deg: float
    relative_tolerance: float
    far: float
    rate_floor: float
    centers: tuple
    rates: tuple
    holds: bool
    first_faulty: str | None
    faulty_steps: tuple
    summary: str
    caution: str = field(default=CAUTION)

    def center(self, a: str, b: str) -> CenterCheck:
        """The check of the center of links ``a`` and ``b`` (either order).

        Raises
        ------
        KeyError
            If the two names are not a pair of the case.
        """
        for c in self.centers:
            if set(c.pair) == {a, b} and a != b:
                return c
        raise KeyError(f"no center of links {a!r} and {b!r}")

    def item(self, label: str):
        """The check of the item with this label (``center a-b``, ``angular velocity of 'x'``, ...)."""
        for c in (*self.centers, *self.rates):
            if c.label == label:
                return c
        raise KeyError(f"no item {label!r}")

    def count(self, status: str) -> int:
        """Number of items (centers and rates) with this status."""
        return sum(c.status == status for c in (*self.centers, *self.rates))


def _pair_names(mech: Mechanism, p) -> tuple[str, str]:
    i, j = sorted(p)
    return (mech.link_names[i], mech.link_names[j])


def _center_label(mech: Mechanism, p) -> str:
    return "center " + mech.pair_names(*sorted(p))


def check_hand(analysis: Analysis, hand: HandCalculation) -> HandReport:
    """Check a hand calculation against mechgraph's analysis, item by item and step by step.

    Parameters
    ----------
    analysis : Analysis
        mechgraph's result for the case (:func:`~mechgraph.analysis.analyse`).
    hand : HandCalculation
        What the person found (:func:`read_hand_file`), read against the same case.

    Returns
    -------
    HandReport
        Every center (agrees / off by how much / missing), every rate, the
        faulty steps, the first of them, and a summary.

    Raises
    ------
    HandCheckError
        The hand file was read against another case (other links, points or unit).

    Examples
    --------
    A pin misread by 3 mm is the first faulty step (the hand value is
    mechgraph's own pin, deliberately moved):

    >>> from mechgraph.analysis import analyse
    >>> from mechgraph.casefile import demo_mechanism
    >>> m = demo_mechanism()
    >>> hand = parse_hand_text('[hand]\\nunit = "mm"\\ntolerance = 0.5\\n'
    ...                        '[[center]]\\npair = ["crank", "coupler"]\\nat = [28.0, 35.0]\\n', m)
    >>> r = check_hand(analyse(m), hand)
    >>> r.holds, r.first_faulty, round(r.center("crank", "coupler").off_by, 6)
    (False, 'center crank-coupler', 3.0)

    Notes
    -----
    Each center that is off is redrawn from its derivation in the analysis:
    for each of its two construction lines (``Locus.through``, the two
    centers the line joins) the person's own values of those two centers give
    their line, and the check says whether it passes through their point.
    Centers are classified in construction order.  A center that is off
    *inherits* the error of the centers it is built from that are off; when
    none is, the derivation graph is walked further back through the centers
    that agree (an error within tolerance can grow at a later crossing), and
    it inherits from the off centers found there.  It is a *faulty step* when
    the person's own lines miss their own point, or when there is nothing
    wrong behind it to inherit from (a misread pin; or, with lines that do
    pass, small errors grown at a sensitive crossing, which the note says).
    The person may have built a center otherwise than mechgraph did: for a
    center that is not a pin, every three-centers line I_ik-I_jk (k any
    third link) through the person's own values of I_ik and I_jk is also
    redrawn, and when their point lies on two such lines that do not
    coincide, the step is consistent with their own construction: it is not a
    faulty step, and it inherits from the off centers those lines pass
    through (the walk back continues from them; such lines are added to
    ``lines``).  When centers consistent only with one another leave no
    faulty step behind them, the earliest of them that mechgraph's own
    derivation finds faulty is the faulty step.
    The first faulty step is the earliest faulty step in the order in which
    the construction locates the centers; the later items that inherit from
    it are listed with it.  Rates are traced the same way: an
    angular velocity through the three centers that relate it to a known one
    (the input, or a link whose rate agrees), a point velocity through its
    link's angular velocity and center with the ground.  Cost O(n^2) for n
    links, plus the rates.
    """
    mech = analysis.mechanism
    points = tuple(p.name for p in mech.points)
    if tuple(mech.link_names) != tuple(hand.link_names) or mech.unit != hand.unit or points != hand.point_names:
        raise HandCheckError(
            f"the hand file was read against case '{hand.mechanism_name}' (links {', '.join(hand.link_names)}; "
            f"points {', '.join(hand.point_names) or 'none'}; unit {hand.unit}), but the analysis is of case "
            f"'{mech.name}' (links {', '.join(mech.link_names)}; points {', '.join(points) or 'none'}; unit {mech.unit}); "
            "read the hand file against the case analysed",
            path=hand.path,
        )
    geo = _Geometry(mech, hand.far)
    # in exact or high-precision runs the construction lines are in that run's numbers
    kind = next((c.arithmetic for c in analysis.centers if getattr(c, "arithmetic", None) is not None), None)
    to_float = float if kind is None else kind.to_float
    L = mech.scale
    n = mech.n_links
    tc = analysis.three_centers
    all_pairs = pairs(n)
    rank = {q: k for k, q in enumerate(tc.order)}

    # pass 1: each center against mechgraph's
    status: dict[tuple[int, int], str] = {}
    base: dict[tuple[int, int], dict] = {}
    for q, (i, j) in enumerate(all_pairs):
        c = analysis.centers[q]
        g = hand.center(i, j)
        want = geo.true_place(c, L)
        got = geo.place(g.homogeneous) if g is not None else None
        tol = g.tolerance if g is not None and g.tolerance is not None else hand.tolerance
        atol = g.angle_tolerance_deg if g is not None and g.angle_tolerance_deg is not None else hand.angle_tolerance_deg
        entry = dict(expected=want, given=got, off_by=None, measure=None, tolerance=None, note="", tol=tol, atol=atol)
        if g is None:
            st = "missing"
            if want is None:
                entry["note"] = "the case does not define this center (the two links are at relative rest)"
        elif want is None:
            st = "unchecked"
            entry["note"] = "the case does not define this center (the two links are at relative rest), so it cannot be checked"
        else:
            ok, off, measure, note = geo.compare(want, got, tol, atol)
            st = "agrees" if ok else "off"
            entry.update(off_by=off, measure=measure, note=note,
                         tolerance=None if measure is None else (tol if measure == "distance" else atol))
        status[(i, j)] = st
        base[(i, j)] = entry

    def user_place(p):
        g = hand.center(*p)
        return None if g is None else geo.place(g.homogeneous)

    # pass 2: derivation of each center; the lines of those that are off
    deps: dict[tuple[int, int], tuple] = {}
    lines: dict[tuple[int, int], tuple] = {}
    own_ok: dict[tuple[int, int], bool | None] = {}
    for q, p in enumerate(all_pairs):
        d = tc.derivations[q]
        if d is None:
            loci, coincident = tc.loci[q], None
        elif d.method == "coincident":
            loci, coincident = (), d.through
        else:
            loci, coincident = d.loci, None
        dp = []
        for loc in loci:
            if loc.through is not None:
                dp += [tuple(sorted(x)) for x in loc.through]
        if coincident is not None:
            dp += [tuple(sorted(x)) for x in coincident]
        deps[p] = tuple(dict.fromkeys(dp))
        if status[p] != "off":
            continue
        mine = user_place(p)
        e = base[p]
        checks = []
        for loc in loci:
            loc = replace(loc, raw_line=tuple(to_float(v) for v in loc.line), offset=(0.0, 0.0))
            checks.append(_line_check(mech, geo, loc, mine, e["tol"], e["atol"], status, user_place))
        if coincident is not None:
            for other in coincident:
                checks.append(_coincidence_check(mech, geo, tuple(sorted(other)), mine, e["tol"], e["atol"], status, user_place))
        lines[p] = tuple(checks)
        drawn = [x.passes for x in checks if x.passes is not None]
        own_ok[p] = None if not drawn else all(drawn)

    pair_q = {p: q for q, p in enumerate(all_pairs)}

    def order_key(p):
        return (rank.get(pair_q[p], len(all_pairs) + pair_q[p]), p)

    def off_behind_agreeing(p) -> list:
        """The off centers reached from p's inputs walking back through inputs that agree."""
        seen, stack, found = set(), list(deps[p]), []
        while stack:
            x = stack.pop()
            if x in seen:
                continue
            seen.add(x)
            if status[x] == "off":
                found.append(x)
            elif status[x] == "agrees":
                stack.extend(deps[x])
        return found

    def own_construction(p) -> list:
        """Three-centers lines I_ik-I_jk through the person's own values that pass through their point of p."""
        mine, e = user_place(p), base[p]
        tol, atol = e["tol"], e["atol"]
        found = []
        for k in range(n):
            if k in p:
                continue
            a, b = tuple(sorted((p[0], k))), tuple(sorted((p[1], k)))
            ua, ub = user_place(a), user_place(b)
            if ua is None or ub is None:
                continue
            # two coinciding centers give no line; a center at the point itself gives no information
            if any(geo.compare(x, y, tol, atol)[0] for x, y in ((ua, ub), (ua, mine), (ub, mine))):
                continue
            user_line = tuple(pg.join(_homogeneous(ua), _homogeneous(ub)))
            off_user, measure, passes = geo.incidence(mine, user_line, tol, atol)
            if not passes:
                continue
            ta, tb = base[a]["expected"], base[b]["expected"]
            true_line, off_true = (), None
            if ta is not None and tb is not None and not (ta.xy is None and tb.xy is None):
                true_line = tuple(pg.join(_homogeneous(ta), _homogeneous(tb)))
                off_true, _, _ = geo.incidence(mine, true_line, tol, atol)
            found.append((a, b, ua, ub, LineCheck(
                label=f"line {mech.pair_names(*a)}/{mech.pair_names(*b)}",
                through=(_pair_names(mech, a), _pair_names(mech, b)), through_status=(status[a], status[b]),
                line=true_line, off_true=off_true, user_line=user_line, off_user=off_user, measure=measure,
                passes=True, note="a three-centers line through your own values of two other centers",
            )))
        # at least two of them that are not one and the same line
        for x in found:
            others = [y for y in found if y is not x and not (
                geo.incidence(y[2], x[4].user_line, tol, atol)[2] and geo.incidence(y[3], x[4].user_line, tol, atol)[2])]
            if others:
                return found
        return []

    # classify each center that is off: a faulty step, or inheriting from the centers it is built on
    faulty: set = set()
    sources_of: dict = {}
    carried: dict = {}  # inherited through inputs that agree: those inputs
    own_lines: dict = {}  # consistent with the person's own construction (not mechgraph's): its passing lines
    plain_faulty: dict = {}  # the classification by mechgraph's derivation alone: (faulty, sources)
    for p in sorted((p for p in all_pairs if status[p] == "off"), key=order_key):
        off_inputs = [x for x in deps[p] if status[x] == "off"]
        if off_inputs:
            sources = off_inputs
        elif own_ok[p] is False:
            sources = []
        else:
            sources = off_behind_agreeing(p)
            if sources:
                carried[p] = [x for x in deps[p] if status[x] == "agrees"]
        is_faulty = not sources or own_ok[p] is False
        plain_faulty[p] = (is_faulty, sources)
        if analysis.centers[pair_q[p]].method != "joint":
            # the person may have built it in another order, through other centers of their own: if their
            # point lies on two of their own three-centers lines, the step itself is right, and the error
            # comes from the centers those lines are drawn through (a primary center is read off the case)
            own = own_construction(p)
            own_src = list(dict.fromkeys(x for a, b, *_ in own for x in (a, b) if status[x] == "off"))
            if own_src and is_faulty:
                is_faulty, sources = False, own_src
                own_lines[p] = [x[4] for x in own]
                carried.pop(p, None)
            elif own_src:
                sources = list(dict.fromkeys([*sources, *own_src]))
        if is_faulty:
            faulty.add(p)
        sources_of[p] = sources

    def trace(p) -> list:
        """The faulty steps reached from p's sources, walking back through the centers they come from."""
        seen, stack, found = {p}, list(sources_of.get(p, ())), set()
        while stack:
            x = stack.pop()
            if x in seen:
                continue
            seen.add(x)
            if x in faulty:
                found.add(x)
            stack.extend(sources_of.get(x, ()))
        return sorted(found, key=order_key)

    # centers consistent only with one another (each on lines through the others) leave no faulty step behind
    # them: the earliest of them that mechgraph's own derivation finds faulty (else the earliest) is the step
    while True:
        stranded = [p for p in sorted(sources_of, key=order_key) if p not in faulty and not trace(p)]
        if not stranded:
            break
        p = next((x for x in stranded if plain_faulty[x][0]), stranded[0])
        faulty.add(p)
        sources_of[p] = plain_faulty[p][1]
        own_lines.pop(p, None)
    inherits: dict = {p: trace(p) for p in sources_of}
    for p, extra in own_lines.items():
        have = {ln.through for ln in lines[p]}
        lines[p] = lines[p] + tuple(ln for ln in extra if ln.through not in have and ln.through[::-1] not in have)

    # rates, traced back to the centers and rates they come from
    rates = _rate_checks(analysis, hand, status, inherits, faulty)
    rate_from = {r.label: r.inherits_from for r in rates}

    centers = []
    for q, p in enumerate(all_pairs):
        e = base[p]
        c = analysis.centers[q]
        lab = _center_label(mech, p)
        by = []
        if p in faulty:
            by = [_center_label(mech, x) for x in sorted((x for x in inherits if p in inherits[x]), key=order_key)]
            by += [lab_r for lab_r, src in rate_from.items() if lab in src]
        note = e["note"]
        if status[p] == "off":
            note = _center_note(mech, lines.get(p, ()), own_ok.get(p), p in faulty, inherits[p], deps[p], status,
                                tc.derivations[q], note, carried.get(p, ()), c.method, own_lines.get(p, ()))
        centers.append(
            CenterCheck(
                pair=_pair_names(mech, p), i=p[0], j=p[1], label=lab, status=status[p],
                expected=e["expected"], given=e["given"], off_by=e["off_by"], measure=e["measure"],
                tolerance=e["tolerance"], method=c.method, derivation=c.derivation,
                depends_on=tuple(_pair_names(mech, x) for x in deps[p]), lines=lines.get(p, ()),
                own_step_ok=own_ok.get(p), faulty_step=p in faulty,
                inherits_from=tuple(_center_label(mech, x) for x in inherits.get(p, ())),
                inherited_by=tuple(by), step=rank.get(q), note=note,
            )
        )

    faulty_labels = [_center_label(mech, p) for p in sorted(faulty, key=order_key)]
    faulty_labels += [r.label for r in rates if r.faulty_step]
    # a faulty rate is inherited by the point velocities built on it
    rates = tuple(
        replace(r, inherited_by=tuple(x.label for x in rates if r.label in x.inherits_from)) if r.faulty_step else r for r in rates
    )
    summary, holds = _summary(hand, faulty_labels, centers + list(rates))
    return HandReport(
        case_name=mech.name, hand_path=hand.path, unit=mech.unit, tolerance=hand.tolerance,
        tolerance_source=hand.tolerance_source, angle_tolerance_deg=hand.angle_tolerance_deg,
        relative_tolerance=hand.relative_tolerance, far=hand.far, rate_floor=hand.rate_floor,
        centers=tuple(centers), rates=rates, holds=holds,
        first_faulty=faulty_labels[0] if faulty_labels else None, faulty_steps=tuple(faulty_labels),
        summary=summary,
    )


def _line_check(mech, geo: _Geometry, loc, mine: Place, tol, atol, status, user_place) -> LineCheck:
    off_true, measure, _ = geo.incidence(mine, loc.line, tol, atol)
    if loc.through is None:
        label = loc.note or f"contact normal of joint '{loc.joint}'"
        _, _, passes = geo.incidence(mine, loc.line, tol, atol)
        return LineCheck(label=label, through=None, through_status=(), line=tuple(loc.line), off_true=off_true,
                         user_line=tuple(loc.line), off_user=off_true, measure=measure, passes=passes)
    a, b = (tuple(sorted(x)) for x in loc.through)
    label = f"line {mech.pair_names(*a)}/{mech.pair_names(*b)}"
    ua, ub = user_place(a), user_place(b)
    sts = (status[a], status[b])
    note, user_line, off_user, passes = "", None, None, None
    missing = [mech.pair_names(*x) for x, u in ((a, ua), (b, ub)) if u is None]
    if missing:
        note = f"you gave no value for {' and '.join(missing)}, so your line cannot be redrawn"
    else:
        ga, gb = _homogeneous(ua), _homogeneous(ub)
        same, _, _, _ = geo.compare(ua, ub, tol, atol)
        if same:
            note = f"your {mech.pair_names(*a)} and {mech.pair_names(*b)} coincide, so they give no line"
        else:
            user_line = tuple(pg.join(ga, gb))
            off_user, m2, passes = geo.incidence(mine, user_line, tol, atol)
            measure = measure or m2
            if off_user is None:
                note = "your line lies at infinity (both its centers are at infinity) but your point is finite"
    return LineCheck(label=label, through=(_pair_names(mech, a), _pair_names(mech, b)), through_status=sts,
                     line=tuple(loc.line), off_true=off_true, user_line=user_line, off_user=off_user,
                     measure=measure, passes=passes, note=note)


def _homogeneous(p: Place):
    """Homogeneous triple of a place (finite, or at infinity along its axis)."""
    if p.xy is not None:
        return (p.xy[0], p.xy[1], 1.0)
    a = math.radians(p.axis_deg)
    return (math.cos(a), math.sin(a), 0.0)


def _coincidence_check(mech, geo: _Geometry, other, mine: Place, tol, atol, status, user_place) -> LineCheck:
    label = f"coincides with {mech.pair_names(*other)}"
    u = user_place(other)
    if u is None:
        return LineCheck(label=label, through=(_pair_names(mech, other),), through_status=(status[other],), line=(),
                         off_true=None, user_line=None, off_user=None, measure=None, passes=None,
                         note=f"you gave no value for {mech.pair_names(*other)}")
    ok, off, measure, note = geo.compare(u, mine, tol, atol)
    return LineCheck(label=label, through=(_pair_names(mech, other),), through_status=(status[other],), line=(),
                     off_true=None, user_line=None, off_user=off, measure=measure, passes=ok, note=note)


def _center_note(mech, checks, own, is_faulty, inh, dp, status, d, note, carried=(), method="", own_lines=()) -> str:
    parts = [note] if note else []
    if d is not None and d.method == "joint":
        parts.append("a primary center, given directly by a joint of the case: read it off the case")
    elif d is None and method == "relaxation":
        parts.append("not reached by the three-centers theorem alone: mechgraph locates it geometrically by the "
                     "relaxation method (see analysis.center(...).derivation)")
    elif d is None:
        parts.append("not reached by the three-centers theorem (mechgraph takes it from the velocity analysis)")
    case_missed = [x.label for x in checks if x.passes is False and x.through is None]
    if case_missed:
        parts.append(f"the case's {' and '.join(case_missed)} {'misses' if len(case_missed) == 1 else 'miss'} your point")
    missed = [x.label for x in checks if x.passes is False and x.through is not None]
    passed = [x.label for x in checks if x.passes is True and x.through is not None]
    if missed:
        parts.append(f"your own {_lines_phrase(missed)} {'misses' if len(missed) == 1 else 'miss'} your point")
    if passed:
        parts.append(f"your own {_lines_phrase(passed)} {'passes' if len(passed) == 1 else 'pass'} through it")
    if own_lines:
        parts.append(
            f"your point lies on your own {_lines_phrase([x.label for x in own_lines])}, three-centers lines through "
            "your own values of other centers: it is consistent with your own construction"
        )
    off_deps = [mech.pair_names(*x) for x in dp if status[x] == "off"]
    miss_deps = [mech.pair_names(*x) for x in dp if status[x] in ("missing", "unchecked")]
    if off_deps:
        parts.append(f"built on your {', '.join(off_deps)}, which {'is' if len(off_deps) == 1 else 'are'} off")
    if miss_deps:
        parts.append(f"built on {', '.join(miss_deps)}, which you did not give: it cannot be traced further back")
    if carried:
        names = ", ".join(mech.pair_names(*x) for x in carried)
        parts.append(
            f"built on your {names}, each within tolerance but carrying on the error of "
            f"{', '.join(_center_label(mech, x) for x in inh)}, which grows at this step"
        )
    if is_faulty and own is True and not off_deps and not miss_deps and d is not None and d.method == "three-centers":
        parts.append(
            "your own lines pass through your point and every center they are built on agrees within tolerance, "
            "with no wrong center behind them: their small errors grow at this construction"
            + (f" (its lines cross at a shallow angle, crossing {d.crossing:.2g})" if d.crossing < 0.5 else "")
            + "; draw the centers it is built on more accurately"
        )
    if is_faulty and own is not False and miss_deps:
        parts.append("it is the earliest wrong center that can be traced")
    elif is_faulty:
        parts.append("the error is made at this step")
    elif inh:
        parts.append("the step itself is right: the error is inherited")
    return "; ".join(parts)


def _lines_phrase(labels) -> str:
    """``line a/b`` or ``lines a/b and c/d`` (other labels as they are)."""
    if len(labels) > 1 and all(x.startswith("line ") for x in labels):
        return "lines " + " and ".join(x.removeprefix("line ") for x in labels)
    return " and ".join(labels)


# --------------------------------------------------------------------------- rates


def _rate_status(true_size: float, err: float, ref: float, floor: float, tol, rel, default_rel, unit: str):
    """(agrees, relative error, tolerance in words) of a rate whose error is ``err``."""
    denom = max(abs(true_size), floor * ref)
    relative = err / denom if denom > 0.0 else (0.0 if err == 0.0 else math.inf)
    if tol is not None:
        return err <= tol, relative, f"{_num(tol)} {unit} (absolute)"
    r = rel if rel is not None else default_rel
    return relative <= r, relative, f"{r:.3g} relative ({100.0 * r:.3g} %)"


def _rate_checks(analysis: Analysis, hand: HandCalculation, status, inherits, faulty_centers) -> list[RateCheck]:
    mech = analysis.mechanism
    vel = analysis.velocity
    g = mech.ground_index
    out: list[RateCheck] = []
    items_w = [i for i in range(mech.n_links) if i != g or hand.angular_velocity(i) is not None]
    if vel is None:
        for i in items_w:
            w = hand.angular_velocity(i)
            out.append(RateCheck("angular_velocity", mech.link_names[i], _omega_label(mech, i),
                                 "missing" if w is None else "unchecked", None, None if w is None else w.value, "value",
                                 None, None, "", note="no velocity analysis was run"))
        for p in mech.points:
            gv = hand.point_velocity(p.name)
            given = None if gv is None else (gv.vector if gv.vector is not None else gv.speed)
            form = "vector" if gv is None or gv.vector is not None else "speed"
            out.append(RateCheck("point_velocity", p.name, _point_label(p.name), "missing" if gv is None else "unchecked",
                                 None, given, form, None, None, "", note="no velocity analysis was run"))
        return out

    omega = [float(vel.twists[i, 0]) for i in range(mech.n_links)]
    w_ref = max(abs(x) for x in omega)
    speeds = [math.hypot(*vel.point_velocity(mech.index[p.link], p.at)) for p in mech.points]
    v_ref = max([w_ref * mech.scale, *speeds])

    def center_given(a, b):
        c = hand.center(a, b)
        return None if c is None else c.homogeneous

    def center_inherit(pairs_used) -> list[str]:
        labels = []
        for x in pairs_used:
            x = tuple(sorted(x))
            if status[x] == "off":
                roots = [x] if x in faulty_centers else []
                roots += list(inherits.get(x, ()))
                for r in roots:
                    lab = _center_label(mech, r)
                    if lab not in labels:
                        labels.append(lab)
        return labels

    # the rates known without the person's help: the inputs on revolutes at ground
    inputs = {}
    for d in mech.drivers:
        j = mech.joint_by_name[d.joint]
        if isinstance(j, Revolute) and mech.ground in j.links:
            k = mech.index[j.links[1] if j.links[0] == mech.ground else j.links[0]]
            inputs[k] = (omega[k], f"the input rate of joint '{d.joint}'")

    omega_checks: dict[int, RateCheck] = {}
    for i in items_w:
        name = mech.link_names[i]
        w = hand.angular_velocity(i)
        lab = _omega_label(mech, i)
        if w is None:
            omega_checks[i] = RateCheck("angular_velocity", name, lab, "missing", omega[i], None, "value", None, None, "")
            continue
        err = abs(w.value - omega[i])
        ok, rel, tol_text = _rate_status(omega[i], err, w_ref, hand.rate_floor, w.tolerance, w.relative,
                                         hand.relative_tolerance, "rad/s")
        omega_checks[i] = RateCheck("angular_velocity", name, lab, "agrees" if ok else "off", omega[i], w.value, "value",
                                    err, rel, tol_text, note="" if w.shown.endswith("rad/s") else f"given as {w.shown}")

    # trace each angular velocity that is off
    for i, rc in list(omega_checks.items()):
        if rc.status != "off":
            continue
        w = hand.angular_velocity(i)
        if i == g:
            omega_checks[i] = replace(rc, faulty_step=True, note=_join(rc.note, "the ground link does not turn: its angular velocity is 0"))
            continue
        refs = list(inputs.items()) + [
            (k, (hand.angular_velocity(k).value, f"your angular velocity of '{mech.link_names[k]}'"))
            for k, c in omega_checks.items() if c.status == "agrees" and k not in inputs and k != g
        ]
        traced = None
        for k, (wk, wk_text) in refs:
            if k == i:
                continue
            hs = center_given(g, i), center_given(g, k), center_given(i, k)
            if any(h is None for h in hs):
                continue
            pred = _omega_from_centers(wk, *hs)
            if pred is None:
                continue
            traced = (k, wk_text, pred)
            break
        if traced is None:
            omega_checks[i] = replace(rc, faulty_step=True, note=_join(
                rc.note, f"cannot be traced: give the centers of '{mech.link_names[i]}' with the ground and with a link of known "
                "angular velocity (the input, or one that agrees)"))
            continue
        k, wk_text, pred = traced
        used = [(g, i), (g, k), (i, k)]
        names = ", ".join(mech.pair_names(*sorted(x)) for x in used)
        perr = abs(w.value - pred)
        consistent, _, _ = _rate_status(pred, perr, w_ref, hand.rate_floor, w.tolerance, w.relative,
                                        hand.relative_tolerance, "rad/s")
        src = center_inherit(used)
        if consistent and src:
            note = (f"it follows from your centers {names} and {wk_text} (giving {_num(pred)} rad/s); "
                    f"the error comes from {', '.join(src)}")
            omega_checks[i] = replace(rc, predicted=pred, inherits_from=tuple(src), note=_join(rc.note, note))
        else:
            sense = " (the opposite sense: check the sign)" if abs(w.value + omega[i]) < abs(w.value - omega[i]) else ""
            note = (f"from your centers {names} and {wk_text} it would be {_num(pred)} rad/s, you wrote {_num(w.value)}"
                    f"{sense}: the error is made at this step")
            omega_checks[i] = replace(rc, predicted=pred, faulty_step=True, inherits_from=tuple(src), note=_join(rc.note, note))
    out += [omega_checks[i] for i in items_w]

    for p, true_speed in zip(mech.points, speeds):
        i = mech.index[p.link]
        tv = vel.point_velocity(i, p.at)
        lab = _point_label(p.name)
        gv = hand.point_velocity(p.name)
        if gv is None:
            out.append(RateCheck("point_velocity", p.name, lab, "missing", tv, None, "vector", None, None, ""))
            continue
        if gv.vector is not None:
            given, form, err = gv.vector, "vector", math.dist(gv.vector, tv)
            ok, rel, tol_text = _rate_status(true_speed, err, v_ref, hand.rate_floor, gv.tolerance, gv.relative,
                                             hand.relative_tolerance, f"{mech.unit}/s")
        else:
            given, form, err = gv.speed, "speed", abs(gv.speed - true_speed)
            ok, rel, tol_text = _rate_status(true_speed, err, v_ref, hand.rate_floor, gv.tolerance, gv.relative,
                                             hand.relative_tolerance, f"{mech.unit}/s")
        rc = RateCheck("point_velocity", p.name, lab, "agrees" if ok else "off", tv if form == "vector" else true_speed,
                       given, form, err, rel, tol_text)
        if ok:
            out.append(rc)
            continue
        # trace: v = w x (P - I_ground,link), from the person's own w and center
        w_given = hand.angular_velocity(i)
        w_val = w_given.value if w_given is not None else (inputs[i][0] if i in inputs else None)
        ci = center_given(g, i)
        if w_val is None or ci is None or ci[2] == 0.0:
            why = ("its link translates at this instant in your values (center with the ground at infinity)"
                   if ci is not None and ci[2] == 0.0 else
                   f"give the angular velocity of '{p.link}' and its center with the ground")
            out.append(replace(rc, faulty_step=True, note=f"cannot be traced: {why}"))
            continue
        ix, iy = ci[0], ci[1]
        pv = (-w_val * (p.at[1] - iy), w_val * (p.at[0] - ix))
        if form == "vector":
            perr = math.dist(gv.vector, pv)
            consistent, _, _ = _rate_status(math.hypot(*pv), perr, v_ref, hand.rate_floor, gv.tolerance, gv.relative,
                                            hand.relative_tolerance, "")
            pred = pv
        else:
            pred = math.hypot(*pv)
            consistent, _, _ = _rate_status(pred, abs(gv.speed - pred), v_ref, hand.rate_floor, gv.tolerance,
                                            gv.relative, hand.relative_tolerance, "")
        src = center_inherit([(g, i)])
        wc = next((c for c in out if c.kind == "angular_velocity" and c.name == p.link), None)
        if wc is not None and wc.status == "off":
            src += [x for x in ((wc.label,) if wc.faulty_step else ()) + wc.inherits_from if x not in src]
        what = f"your angular velocity of '{p.link}' and your center {mech.pair_names(*sorted((g, i)))}"
        if consistent and src:
            note = f"it follows from {what}; the error comes from {', '.join(src)}"
            out.append(replace(rc, predicted=pred, inherits_from=tuple(src), note=note))
        else:
            note = f"from {what} it would be {_vec(pred)}: the error is made at this step"
            out.append(replace(rc, predicted=pred, faulty_step=True, inherits_from=tuple(src), note=note))
    return out


def _omega_from_centers(wk: float, i_gi, i_gk, i_ik) -> float | None:
    """Angular velocity of link i from that of link k and the three centers relating them (None if they cannot)."""
    if i_ik[2] == 0.0:
        return wk  # i and k have the same angular velocity
    if i_gi[2] == 0.0:
        return 0.0  # i translates
    if i_gk[2] == 0.0:
        return None  # k translates: its angular velocity says nothing of its speed
    p = (i_ik[0], i_ik[1])
    a = (p[0] - i_gi[0], p[1] - i_gi[1])
    b = (p[0] - i_gk[0], p[1] - i_gk[1])
    aa = a[0] * a[0] + a[1] * a[1]
    if aa == 0.0:
        return None  # the common center is at i's ground center: the relation gives nothing
    # the common point moves alike as part of i and of k: w_i (P - I_gi) = w_k (P - I_gk)
    return wk * (a[0] * b[0] + a[1] * b[1]) / aa


def _join(a: str, b: str) -> str:
    return f"{a}; {b}" if a else b


def _omega_label(mech: Mechanism, i: int) -> str:
    return f"angular velocity of '{mech.link_names[i]}'"


def _point_label(name: str) -> str:
    return f"velocity of point '{name}'"


def _summary(hand: HandCalculation, faulty_labels, items) -> tuple[str, bool]:
    given = [x for x in items if x.status in ("agrees", "off", "unchecked")]
    off = [x for x in items if x.status == "off"]
    missing = [x for x in items if x.status == "missing"]
    miss_text = f"; {len(missing)} item(s) of the case not given" if missing else ""
    if not given:
        return f"Nothing to check: the hand file gives no items ({len(missing)} item(s) of the case not given).", False
    if not off:
        n_ok = sum(x.status == "agrees" for x in given)
        unchecked = len(given) - n_ok
        extra = f" ({unchecked} given but not checkable)" if unchecked else ""
        return f"The hand calculation holds: all {n_ok} item(s) checked agree within tolerance{extra}{miss_text}.", True
    first = next(x for x in items if x.label == faulty_labels[0])
    desc = _off_text(first, hand.unit)
    inherited = list(first.inherited_by)
    text = f"The hand calculation does not hold: {len(off)} of {len(given)} item(s) given are off; first faulty step: {first.label} ({desc})"
    if inherited:
        text += f", inherited by {len(inherited)} later item(s): {', '.join(x.removeprefix('center ') if x.startswith('center ') else x for x in inherited)}"
    others = faulty_labels[1:]
    if others:
        text += f"; other faulty step(s): {', '.join(others)}"
    return text + miss_text + ".", False


def _off_text(x, unit: str) -> str:
    if isinstance(x, CenterCheck):
        if x.off_by is None:
            return f"{x.note.split(';')[0]}"
        if x.measure == "distance":
            return f"off by {_num(x.off_by, 4)} {unit}, tolerance {_num(x.tolerance, 3)} {unit}"
        return f"off by {_num(x.off_by, 3)} deg, tolerance {_num(x.tolerance, 3)} deg"
    u = "rad/s" if x.kind == "angular_velocity" else f"{unit}/s"
    rel = "" if x.relative_error is None or math.isinf(x.relative_error) else f" ({x.relative_error:.1%})"
    return f"off by {_num(x.error, 4)} {u}{rel}, tolerance {x.tolerance}"


# --------------------------------------------------------------------------- rendering


def _num(x, digits: int = 6) -> str:
    if x is None:
        return "-"
    if isinstance(x, float) and math.isinf(x):
        return "inf"
    if abs(x) < DISPLAY_ZERO:
        return "0"
    return f"{x:.{digits}g}"


def _vec(v) -> str:
    if v is None:
        return "-"
    if isinstance(v, tuple):
        return f"({_num(v[0])}, {_num(v[1])})"
    return _num(v)


def render_text(report: HandReport) -> str:
    """The report as readable text: summary, every center, the faulty steps, the rates.

    Parameters
    ----------
    report : HandReport

    Returns
    -------
    str

    Raises
    ------
    Nothing of its own: the report is complete, checked data.

    Examples
    --------
    >>> from mechgraph.analysis import analyse
    >>> from mechgraph.casefile import demo_mechanism
    >>> m = demo_mechanism()
    >>> text = render_text(check_hand(analyse(m), parse_hand_text('[hand]\\nunit = "mm"\\n', m)))
    >>> text.splitlines()[2]
    'Nothing to check: the hand file gives no items (21 item(s) of the case not given).'

    Notes
    -----
    Lengths in the case's unit, angles in degrees, rates in rad/s and unit/s.
    """
    u = report.unit
    out = [
        f"mechgraph hand check of '{report.hand_path}' against case '{report.case_name}' (lengths in {u})",
        f"CAUTION: {report.caution}",
        report.summary,
        "",
        f"Tolerances: centers {_num(report.tolerance, 4)} {u} ({report.tolerance_source}); directions "
        f"{_num(report.angle_tolerance_deg)} deg; rates {report.relative_tolerance:.3g} relative; beyond "
        f"{_num(report.far)} drawing sizes only a center's direction is judged",
        "",
    ]
    rows = []
    for c in report.centers:
        if c.status == "off":
            if c.off_by is None:
                st = "OFF"
            else:
                st = f"OFF by {_num(c.off_by, 4)} {u if c.measure == 'distance' else 'deg'}"
            st += " (faulty step)" if c.faulty_step else " (inherited)"
        else:
            st = c.status
        rows.append((c.pair[0] + "-" + c.pair[1], c.given.text(u) if c.given else "-",
                     c.expected.text(u) if c.expected else "undefined", st))
    heads = ("pair", "yours", "mechgraph", "verdict")
    widths = [max(len(h), *(len(r[k]) for r in rows)) for k, h in enumerate(heads)]
    fmt = "  ".join(f"{{:<{w}}}" for w in widths[:-1]) + "  {}"
    out += ["Centers", fmt.format(*heads), fmt.format(*("-" * w for w in widths))]
    out += [fmt.format(*r) for r in rows]
    out.append("")

    by_step = sorted((c for c in report.centers if c.status == "off"),
                     key=lambda c: (c.step is None, c.step if c.step is not None else 0, c.i, c.j))
    steps = by_step + [r for r in report.rates if r.status == "off"]
    if steps:
        out.append("Items that are off, in construction order")
        for x in steps:
            tag = "FAULTY STEP" if x.faulty_step else "inherited"
            if x.label == report.first_faulty:
                tag = "FIRST FAULTY STEP"
            head = f"  {x.label} [{tag}]"
            if isinstance(x, CenterCheck):
                out.append(head + f": yours {x.given.text(u)}, mechgraph {x.expected.text(u)}")
                out.append(f"      mechgraph: {x.method}, {x.derivation}")
                for ln in x.lines:
                    out.append("      " + _line_text(ln, u))
            else:
                unit = "rad/s" if x.kind == "angular_velocity" else f"{u}/s"
                out.append(head + f": yours {_vec(x.given)}, mechgraph {_vec(x.expected)} {unit} ({_off_text(x, u)})")
            if x.note:
                out.append(f"      {x.note}")
            if x.inherits_from:
                out.append(f"      inherits the error of: {', '.join(x.inherits_from)}")
            if x.inherited_by:
                out.append(f"      inherited by: {', '.join(x.inherited_by)}")
        out.append("")

    if report.rates:
        out.append(f"Rates (rad/s and {u}/s)")
        for r in report.rates:
            if r.status == "off":
                st = f"OFF ({_off_text(r, u)})"
            elif r.status == "agrees":
                st = "agrees" + ("" if r.relative_error is None else f" ({r.relative_error:.2%})")
            else:
                st = r.status
            given = _vec(r.given) if r.given is not None else "-"
            out.append(f"  {r.label:<40} yours {given:<26} mechgraph {_vec(r.expected):<26} {st}")
        out.append("")
    return "\n".join(out)


def _line_text(ln: LineCheck, u: str) -> str:
    unit = u if ln.measure == "distance" else "deg"
    if ln.label.startswith("coincides"):
        if ln.passes is None:
            return f"should coincide with your {ln.label.removeprefix('coincides with ')}: {ln.note}"
        return f"should coincide with your {ln.label.removeprefix('coincides with ')} ({ln.through_status[0]}): " + (
            "it does" if ln.passes else f"it is {_num(ln.off_user, 4)} {unit} away"
        )
    head = f"should lie on {ln.label}"
    if ln.through is not None:
        (a, b), (c, d) = ln.through
        head += f" (your {a}-{b}: {ln.through_status[0]}, your {c}-{d}: {ln.through_status[1]})"
    true_part = "" if ln.off_true is None else f"; your point is {_num(ln.off_true, 4)} {unit} off mechgraph's line"
    if ln.passes is None:
        return f"{head}{true_part}; {ln.note}"
    mine = "passes through your point" if ln.passes else f"misses your point by {_num(ln.off_user, 4)} {unit}"
    if ln.through is None:
        return f"{head} (given by the case): it {mine}"
    return f"{head}: your own line {mine}{true_part}"


def _clean(x):
    """JSON-able: tuples to lists, non-finite floats to None."""
    if isinstance(x, float):
        return x if math.isfinite(x) else None
    if isinstance(x, (list, tuple)):
        return [_clean(v) for v in x]
    if isinstance(x, dict):
        return {k: _clean(v) for k, v in x.items()}
    if isinstance(x, Place):
        return _clean(x.as_dict())
    return x


def render_dict(report: HandReport) -> dict:
    """The report as plain data (JSON-able: lists, dicts, numbers, text, None).

    Parameters
    ----------
    report : HandReport

    Returns
    -------
    dict
        ``schema`` (:data:`SCHEMA`), ``caution``, ``case``, ``hand_file``,
        ``unit``, ``tolerances``, ``holds``, ``summary``, ``first_faulty``,
        ``faulty_steps``, ``centers`` (one entry per pair, with ``lines`` for
        those that are off) and ``rates``.

    Raises
    ------
    Nothing of its own: the report is complete, checked data.

    Examples
    --------
    >>> import json
    >>> from mechgraph.analysis import analyse
    >>> from mechgraph.casefile import demo_mechanism
    >>> m = demo_mechanism()
    >>> d = render_dict(check_hand(analyse(m), parse_hand_text('[hand]\\nunit = "mm"\\n', m)))
    >>> d["schema"], len(d["centers"]), d["caution"].startswith("Kinematic")
    ('mechgraph.handcheck/1', 15, True)
    >>> _ = json.dumps(d, allow_nan=False)

    Notes
    -----
    Infinite or undefined numbers become None.
    """
    def center(c: CenterCheck) -> dict:
        return {
            "pair": list(c.pair), "label": c.label, "status": c.status, "given": c.given, "expected": c.expected,
            "off_by": c.off_by, "measure": c.measure, "tolerance": c.tolerance, "method": c.method,
            "derivation": c.derivation, "depends_on": [list(x) for x in c.depends_on],
            "lines": [
                {
                    "label": ln.label, "through": ln.through, "through_status": ln.through_status,
                    "line": ln.line, "off_true": ln.off_true, "user_line": ln.user_line, "off_user": ln.off_user,
                    "measure": ln.measure, "passes": ln.passes, "note": ln.note,
                }
                for ln in c.lines
            ],
            "own_step_ok": c.own_step_ok, "faulty_step": c.faulty_step, "inherits_from": c.inherits_from,
            "inherited_by": c.inherited_by, "note": c.note,
        }

    def rate(r: RateCheck) -> dict:
        return {
            "kind": r.kind, "name": r.name, "label": r.label, "status": r.status, "given": r.given,
            "expected": r.expected, "compared_as": r.compared_as, "error": r.error,
            "relative_error": r.relative_error, "tolerance": r.tolerance, "predicted": r.predicted,
            "faulty_step": r.faulty_step, "inherits_from": r.inherits_from, "inherited_by": r.inherited_by,
            "note": r.note,
        }

    return _clean({
        "schema": SCHEMA,
        "caution": report.caution,
        "case": report.case_name,
        "hand_file": report.hand_path,
        "unit": report.unit,
        "tolerances": {
            "length": report.tolerance, "length_source": report.tolerance_source,
            "angle_deg": report.angle_tolerance_deg, "relative": report.relative_tolerance,
            "far": report.far, "rate_floor": report.rate_floor,
        },
        "holds": report.holds,
        "summary": report.summary,
        "first_faulty": report.first_faulty,
        "faulty_steps": report.faulty_steps,
        "centers": [center(c) for c in report.centers],
        "rates": [rate(r) for r in report.rates],
    })
