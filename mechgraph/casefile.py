"""Reading case files: a mechanism in one position, written in TOML.

The schema (documented in full in README.md)::

    [mechanism]
    name = "label applicator"     # optional
    unit = "mm"                   # mm, cm, m, in or ft (default mm)

    [[link]]
    name = "frame"
    ground = true                 # exactly one link

    [[joint]]
    name = "O2"                   # optional; default "<link>-<link>"
    kind = "revolute"             # revolute, prismatic, pin_in_slot, rolling, gear, cam
    links = ["frame", "crank"]
    at = [0.0, 0.0]

    [[driver]]
    joint = "O2"
    rpm = 120                     # or rad_per_s, deg_per_s; prismatic: speed

    [[point]]
    name = "pad centre"
    link = "pad arm"
    at = [80.0, 210.0]

Angles in files are in degrees; inside mechgraph they are radians.  Every
error names the file, the entry (``joint[3] 'B'``) and the field, and says
what would be valid.
"""

from __future__ import annotations

import math
import re
import tomllib
from importlib import resources
from pathlib import Path
from typing import Any

from .arithmetic import TypedFloat
from .errors import CaseFileError, MechgraphError
from .joints import JOINT_KINDS, CamContact, GearMesh, PinInSlot, Prismatic, Revolute, RollingContact
from .model import LENGTH_UNITS, Driver, Link, Mechanism, PointOfInterest

__all__ = ["load_case", "parse_case", "demo_mechanism", "demo_case_path", "DEMO_CASE"]

#: File name of the bundled demo case (a six-bar label applicator).
DEMO_CASE = "label_applicator.toml"

_TOP_KEYS = {"mechanism", "link", "joint", "driver", "point"}
_MECH_KEYS = {"name", "unit", "notes"}
_LINK_KEYS = {"name", "ground", "notes"}
_COMMON_JOINT = {"name", "kind", "links", "notes"}
_JOINT_KEYS = {
    "revolute": {"at"},
    "prismatic": {"at", "axis", "axis_deg"},
    "pin_in_slot": {"at", "slot", "slot_deg"},
    "rolling": {"at"},
    "gear": {"centers", "pitch_point", "radii", "internal"},
    "cam": {"at", "normal", "normal_deg"},
}
_RATE_KEYS = {"rpm": 2.0 * math.pi / 60.0, "rad_per_s": 1.0, "deg_per_s": math.pi / 180.0}
_DRIVER_KEYS = {"joint", "speed", "notes"} | set(_RATE_KEYS)
_POINT_KEYS = {"name", "link", "at", "notes"}


class _Reader:
    """Field access with messages that name the file, entry and field."""

    def __init__(self, path: str):
        self.path = path

    def fail(self, where: str, msg: str):
        """Raise a CaseFileError naming the file and ``where``."""
        raise CaseFileError(f"{where}: {msg}", path=self.path)

    def keys(self, table: dict, allowed: set, where: str):
        """Fail on any field of ``table`` not in ``allowed``, listing the valid ones."""
        extra = sorted(set(table) - allowed)
        if extra:
            self.fail(
                where,
                f"unknown field(s) {', '.join(repr(e) for e in extra)}; valid fields are: {', '.join(sorted(allowed))}",
            )

    def string(self, table: dict, key: str, where: str, default: Any = ...):
        """A non-empty text field, stripped; ``default`` when absent (required if no default)."""
        if key not in table:
            if default is ...:
                self.fail(where, f"field '{key}' is missing (a text value)")
            return default
        v = table[key]
        if not isinstance(v, str) or not v.strip():
            self.fail(where, f"field '{key}' must be a non-empty text, got {v!r}")
        return v.strip()

    def number(self, v, where: str, key: str) -> float:
        """A finite number (not a boolean), keeping its typed decimal text when it has one."""
        if isinstance(v, bool) or not isinstance(v, (int, float)):
            self.fail(where, f"field '{key}' must be a number, got {v!r}")
        if not math.isfinite(v):
            self.fail(where, f"field '{key}' must be finite, got {float(v)!r}")
        return v if isinstance(v, TypedFloat) else float(v)

    def pair(self, table: dict, key: str, where: str):
        """A field holding two numbers ``[x, y]``."""
        v = table.get(key)
        if not isinstance(v, list) or len(v) != 2:
            self.fail(where, f"field '{key}' must be a point [x, y] of two numbers, got {v!r}")
        return (self.number(v[0], where, key), self.number(v[1], where, key))

    def direction(self, table: dict, vec_key: str, where: str) -> dict:
        """The direction field as joint keyword arguments: ``{key: [dx, dy]}`` or ``{key_deg: degrees}``."""
        deg_key = vec_key + "_deg"
        has_vec, has_deg = vec_key in table, deg_key in table
        if has_vec == has_deg:
            self.fail(where, f"give exactly one of '{vec_key}' (a direction [dx, dy]) or '{deg_key}' (degrees from +x)")
        if has_deg:
            return {vec_key + "_deg": self.number(table[deg_key], where, deg_key)}
        d = self.pair(table, vec_key, where)
        if math.hypot(*d) == 0.0:
            self.fail(where, f"field '{vec_key}' is a zero-length direction {list(d)}; give a non-zero [dx, dy]")
        return {vec_key: d}

    def entries(self, doc: dict, key: str) -> list[dict]:
        """The ``[[key]]`` array of tables (empty when absent)."""
        v = doc.get(key, [])
        if isinstance(v, dict):
            self.fail(key, f"write each {key} as an array entry [[{key}]], not as a single table [{key}]")
        if not isinstance(v, list) or not all(isinstance(e, dict) for e in v):
            self.fail(key, f"'{key}' must be a list of [[{key}]] tables")
        return v


def _toml_line(err: tomllib.TOMLDecodeError, text: str) -> int | None:
    """The line number of a TOML error (the last line for an error at the end), or None."""
    m = re.search(r"line (\d+)", str(err))
    if m:
        return int(m.group(1))
    if "end of document" in str(err):
        return max(1, len(text.splitlines()))
    return None


def parse_case(text: str, path: str = "<case>") -> Mechanism:
    """Build a :class:`~mechgraph.model.Mechanism` from case-file text.

    Parameters
    ----------
    text : str
        TOML text in the mechgraph case schema.
    path : str, optional
        Name used in error messages.

    Returns
    -------
    Mechanism

    Raises
    ------
    CaseFileError
        Malformed TOML (with its line number), unknown or missing fields,
        unknown joint kinds, malformed numbers; model errors (see
        :class:`~mechgraph.model.Mechanism`) are re-raised naming the file.

    Examples
    --------
    >>> m = parse_case('''
    ... [[link]]
    ... name = "frame"
    ... ground = true
    ... [[link]]
    ... name = "crank"
    ... [[joint]]
    ... kind = "revolute"
    ... links = ["frame", "crank"]
    ... at = [0, 0]
    ... [[driver]]
    ... joint = "frame-crank"
    ... rpm = 60
    ... ''')
    >>> m.joints[0].name, round(m.drivers[0].rate, 6)
    ('frame-crank', 6.283185)

    Notes
    -----
    One pass over the TOML tables (Python's :mod:`tomllib`, floats kept with
    their typed text for exact arithmetic), then the checks of
    :class:`~mechgraph.model.Mechanism`: linear in the size of the file, plus
    the model's pairwise joint checks.

    References
    ----------
    TOML v1.0.0 specification, https://toml.io/en/v1.0.0 (the file syntax);
    the case schema is mechgraph's own.
    """
    r = _Reader(path)
    try:
        doc = tomllib.loads(text, parse_float=TypedFloat)
    except tomllib.TOMLDecodeError as e:
        raise CaseFileError(f"not valid TOML: {e}", path=path, line=_toml_line(e, text)) from None
    r.keys(doc, _TOP_KEYS, "top level")
    mech = doc.get("mechanism", {})
    if not isinstance(mech, dict):
        r.fail("mechanism", "[mechanism] must be a table")
    r.keys(mech, _MECH_KEYS, "[mechanism]")
    name = r.string(mech, "name", "[mechanism]", default=Path(path).stem)
    unit = r.string(mech, "unit", "[mechanism]", default="mm")
    if unit not in LENGTH_UNITS:
        r.fail("[mechanism]", f"field 'unit' is {unit!r}; use one of {', '.join(LENGTH_UNITS)}")

    links = []
    for k, e in enumerate(r.entries(doc, "link")):
        where = f"link[{k + 1}]"
        r.keys(e, _LINK_KEYS, where)
        ground = e.get("ground", False)
        if not isinstance(ground, bool):
            r.fail(where, f"field 'ground' must be true or false, got {ground!r}")
        links.append(Link(r.string(e, "name", where), ground=ground))
    if not links:
        r.fail("link", "the case defines no links; add [[link]] entries, one with ground = true")

    joints = []
    for k, e in enumerate(r.entries(doc, "joint")):
        joints.append(_joint(r, e, k))
    drivers = []
    for k, e in enumerate(r.entries(doc, "driver")):
        drivers.append(_driver(r, e, k, joints))
    points = []
    for k, e in enumerate(r.entries(doc, "point")):
        where = f"point[{k + 1}]"
        r.keys(e, _POINT_KEYS, where)
        points.append(PointOfInterest(r.string(e, "name", where), r.string(e, "link", where), r.pair(e, "at", where)))
    try:
        return Mechanism(
            links=tuple(links), joints=tuple(joints), drivers=tuple(drivers), points=tuple(points), name=name, unit=unit
        )
    except CaseFileError:
        raise
    except MechgraphError as e:
        raise CaseFileError(str(e), path=path) from None


def _joint(r: _Reader, e: dict, k: int):
    """The joint of ``[[joint]]`` entry ``k`` (0-based)."""
    where = f"joint[{k + 1}]"
    if "name" in e:
        where += f" '{e['name']}'"
    kind = r.string(e, "kind", where)
    if kind not in JOINT_KINDS:
        r.fail(where, f"joint kind {kind!r} is not known; use one of {', '.join(JOINT_KINDS)}")
    r.keys(e, _COMMON_JOINT | _JOINT_KEYS[kind], where)
    ls = e.get("links")
    if not isinstance(ls, list) or len(ls) != 2 or not all(isinstance(x, str) and x.strip() for x in ls):
        r.fail(where, f"field 'links' must name two links, e.g. [\"frame\", \"crank\"], got {ls!r}")
    links = (ls[0].strip(), ls[1].strip())
    name = r.string(e, "name", where, default=f"{links[0]}-{links[1]}")
    try:
        if kind == "revolute":
            return Revolute(name, links, at=r.pair(e, "at", where))
        if kind == "rolling":
            return RollingContact(name, links, at=r.pair(e, "at", where))
        if kind == "prismatic":
            return Prismatic(name, links, at=r.pair(e, "at", where), **r.direction(e, "axis", where))
        if kind == "pin_in_slot":
            return PinInSlot(name, links, at=r.pair(e, "at", where), **r.direction(e, "slot", where))
        if kind == "cam":
            return CamContact(name, links, at=r.pair(e, "at", where), **r.direction(e, "normal", where))
        return _gear(r, e, where, name, links)
    except CaseFileError:
        raise
    except MechgraphError as err:
        r.fail(where, str(err))


def _gear(r: _Reader, e: dict, where: str, name: str, links):
    """A gear mesh from its entry: centres, and a pitch point or radii."""
    c = e.get("centers")
    if not isinstance(c, list) or len(c) != 2:
        r.fail(where, "field 'centers' must hold the two gear centres [[x1, y1], [x2, y2]]")
    centers = (r.pair({"centers": c[0]}, "centers", where), r.pair({"centers": c[1]}, "centers", where))
    has_pp, has_r = "pitch_point" in e, "radii" in e
    if has_pp == has_r:
        r.fail(where, "give exactly one of 'pitch_point' [x, y] or 'radii' [r1, r2] (with 'internal' for a ring gear)")
    if has_pp:
        if "internal" in e:
            r.fail(where, "'internal' goes with 'radii'; with 'pitch_point' the pitch point's place says it")
        pp = r.pair(e, "pitch_point", where)
        return GearMesh(name, links, centers=centers, pitch_point=pp)
    rv = e["radii"]
    if not isinstance(rv, list) or len(rv) != 2:
        r.fail(where, f"field 'radii' must be two pitch radii [r1, r2], got {rv!r}")
    radii = tuple(r.number(x, where, "radii") for x in rv)
    internal = e.get("internal", False)
    if not isinstance(internal, bool):
        r.fail(where, f"field 'internal' must be true or false, got {internal!r}")
    return GearMesh(name, links, centers=centers, radii=radii, internal_pair=internal)


def _driver(r: _Reader, e: dict, k: int, joints):
    """The driver of ``[[driver]]`` entry ``k`` (0-based), its rate in rad/s or unit/s."""
    where = f"driver[{k + 1}]"
    r.keys(e, _DRIVER_KEYS, where)
    jname = r.string(e, "joint", where)
    where += f" on '{jname}'"
    given = [key for key in list(_RATE_KEYS) + ["speed"] if key in e]
    if len(given) != 1:
        r.fail(
            where,
            "give exactly one rate: rpm, rad_per_s or deg_per_s for a revolute; speed (length unit/s) for a prismatic",
        )
    key = given[0]
    value = r.number(e[key], where, key)
    joint = next((j for j in joints if j.name == jname), None)
    if joint is not None and joint.drive == "rotation" and key == "speed":
        r.fail(where, f"'{jname}' is a revolute joint: give its rate as rpm, rad_per_s or deg_per_s, not speed")
    if joint is not None and joint.drive == "sliding" and key != "speed":
        r.fail(where, f"'{jname}' is a prismatic joint: give its rate as speed (length unit per second), not {key}")
    rate = value if key == "speed" else value * _RATE_KEYS[key]
    return Driver(jname, rate, given=(e[key], key))


def load_case(path) -> Mechanism:
    """Read a case file.

    Parameters
    ----------
    path : str or Path
        The case file (UTF-8 TOML in the schema of :func:`parse_case`).

    Returns
    -------
    Mechanism
        The validated mechanism; its name defaults to the file's stem.

    Raises
    ------
    CaseFileError
        The file cannot be read or does not describe a valid mechanism.

    Examples
    --------
    >>> load_case(demo_case_path()).name
    'label applicator'
    >>> load_case("no/such/case.toml")
    Traceback (most recent call last):
        ...
    mechgraph.errors.CaseFileError: no/such/case.toml: no such file

    Notes
    -----
    Reads the whole file and hands it to :func:`parse_case`: linear in its size.

    References
    ----------
    TOML v1.0.0 specification, https://toml.io/en/v1.0.0; the case schema is
    mechgraph's own.
    """
    p = Path(path)
    try:
        text = p.read_text(encoding="utf-8")
    except FileNotFoundError:
        raise CaseFileError("no such file", path=str(p)) from None
    except (OSError, UnicodeDecodeError) as e:
        raise CaseFileError(f"cannot be read: {e}", path=str(p)) from None
    return parse_case(text, str(p))


def demo_case_path():
    """Path of the bundled demo case (a six-bar label applicator).

    Returns
    -------
    importlib.resources.abc.Traversable
        The file :data:`DEMO_CASE` in the package's ``data`` directory (a
        :class:`pathlib.Path` for an ordinary installation).

    Examples
    --------
    >>> demo_case_path().name
    'label_applicator.toml'

    Notes
    -----
    :func:`importlib.resources.files`, O(1); nothing is read.

    References
    ----------
    Common practice, no single source.
    """
    return resources.files("mechgraph") / "data" / DEMO_CASE


def demo_mechanism() -> Mechanism:
    """The bundled demo: a Stephenson six-bar that swings a label pad (invented numbers).

    Returns
    -------
    Mechanism
        Six links, seven revolutes, one driver.

    Examples
    --------
    >>> demo_mechanism().n_links
    6

    Notes
    -----
    Parses :func:`demo_case_path` with :func:`parse_case` on every call.

    References
    ----------
    Invented numbers for a demonstration; the Stephenson six-bar chain:
    common practice, no single source.
    """
    p = demo_case_path()
    return parse_case(p.read_text(encoding="utf-8"), DEMO_CASE)
