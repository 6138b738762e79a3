"""Reports of an analysis: a readable table, JSON and CSV, written whole or not at all.

The JSON layout (``schema = "mechgraph.centers/1"``) is documented in README.md;
its field names are stable.  Every report carries the caution
:data:`CAUTION`.
"""

from __future__ import annotations

import csv
import io
import json
import math
import os
import tempfile
from pathlib import Path

from .analysis import Analysis, Center
from .errors import OutputError
from .topology import Topology

__all__ = ["CAUTION", "SCHEMA", "to_table", "to_json", "to_csv", "topology_table", "topology_dict", "write_output"]

#: The caution every report carries.
CAUTION = (
    "Kinematic results only. Strength, guarding and safety follow local codes and licensed engineering practice."
)

#: Identifier of the JSON layout.
SCHEMA = "mechgraph.centers/1"


def _f(x: float, digits: int = 6) -> str:
    if x is None:
        return "-"
    if x == 0.0:
        return "0"
    return f"{x:.{digits}g}"


def _center_dict(c: Center, a: Analysis) -> dict:
    L = a.mechanism.scale
    xy = c.cartesian(L)
    d = c.direction()
    out = {
        "pair": [a.mechanism.link_names[c.i], a.mechanism.link_names[c.j]],
        "defined": c.point is not None,
        "at_infinity": c.point is not None and xy is None,
        "x": xy[0] if xy else None,
        "y": xy[1] if xy else None,
        "direction": list(d) if (c.point is not None and xy is None and d) else None,
        "homogeneous": list(c.point) if c.point is not None else None,
        "method": c.method,
        "derivation": c.derivation,
        "relative_rest": c.relative_rest,
        "crossing": c.crossing,
        "agreement": None,
    }
    if c.check is not None:
        out["agreement"] = {
            "separation": c.check.separation,
            "distance": c.check.distance,
            "angle_deg": c.check.angle_deg,
            "passed": c.check.passed,
        }
    out["text"] = None
    if c.kind_point is not None:
        xy_text = c.exact_text()
        out["text"] = {"x": xy_text[0], "y": xy_text[1]} if xy_text else {"direction": list(c.exact_direction_text())}
    ar = c.arithmetic
    as_float = (lambda v: float(ar.to_float(v))) if ar is not None else float
    out["known_lines"] = [[as_float(v) for v in loc.line] for loc in c.loci]
    out["ratio_line"] = [float(v) for v in c.ratio_line] if c.ratio_line is not None else None
    return out


def topology_dict(t: Topology) -> dict:
    """The topology summary as plain data (part of the JSON report)."""
    return {
        "links": t.n_links,
        "joints": t.n_joints,
        "one_freedom_joints": t.j1,
        "two_freedom_joints": t.j2,
        "gruebler_mobility": t.gruebler,
        "mobility_at_position": t.mobility,
        "loops": t.loops,
        "cycle_basis": [list(c) for c in t.cycle_basis],
        "link_types": dict(t.link_types),
        "type_counts": t.type_counts(),
        "chain": t.chain,
        "inversion": t.inversion,
        "ground_role": t.ground_role,
        "notes": list(t.notes),
    }


def _velocity_dict(a: Analysis) -> dict | None:
    v = a.velocity
    if v is None:
        return None
    m = a.mechanism
    links = []
    for i, name in enumerate(m.link_names):
        entry = {"name": name, "angular_velocity": float(v.twists[i, 0])}
        entry["per_unit_input"] = {d: float(v.basis[k, i, 0]) for k, d in enumerate(v.driver_joints)}
        text = angular_velocity_text(v, i)
        if text is not None:
            entry["angular_velocity_text"] = text
        links.append(entry)
    points = []
    for p in m.points:
        i = m.index[p.link]
        vx, vy = v.point_velocity(i, p.at)
        per = {}
        for k, d in enumerate(v.driver_joints):
            w, bx, by = v.basis[k, i]
            per[d] = [float(bx - w * p.at[1]), float(by + w * p.at[0])]
        points.append(
            {"name": p.name, "link": p.link, "x": p.at[0], "y": p.at[1], "vx": vx, "vy": vy, "speed": math.hypot(vx, vy), "per_unit_input": per}
        )
    return {
        "drivers": [{"joint": d, "rate": float(r)} for d, r in zip(v.driver_joints, v.rates)],
        "links": links,
        "points": points,
    }


def angular_velocity_text(v, i: int) -> str | None:
    """Angular velocity of link ``i`` as text in the run's arithmetic (exact: e.g. ``-132*pi/191``), or None."""
    if v.kind_twists is None:
        return None
    ar = v.arithmetic
    w = v.kind_twists[i][0]
    if ar.exact:
        return str(ar.to_sympy(w) * v.rate_factor)
    return ar.text(w)


def trust_dict(cond) -> dict:
    """The conditioning assessment as plain data (the JSON report's ``trust``)."""
    return {
        "input_tol": cond.input_tol,
        "input_tol_is_default": cond.input_tol_is_default,
        "velocity_condition": cond.velocity_condition,
        "rechecked_in_precision": cond.rechecked_in_precision,
        "velocity_digits": dict(cond.velocity_digits),
        "centers": [
            {
                "pair": c.pair,
                "at_infinity": c.at_infinity,
                "sensitivity": c.sensitivity,
                "uncertainty": c.uncertainty,
                "flags": list(c.flags),
                "digits": c.digits,
            }
            for c in cond.centers
        ],
    }


def trust_table(cond, unit: str) -> str:
    """The conditioning assessment in words: uncertainty of each center at the drawing tolerance."""
    src = " (default: 0.2 % of the drawing size, common practice)" if cond.input_tol_is_default else ""
    out = [
        f"Trust at a drawing tolerance of {_f(cond.input_tol, 4)} {unit}{src}: +- is the RMS (one standard deviation) "
        "of a linear estimate, for independent errors of that size in every drawn coordinate; where a center is "
        "flagged, the linear estimate understates the spread"
    ]
    if cond.velocity_condition is not None:
        out.append(f"  velocity system reciprocal condition {_f(cond.velocity_condition, 3)} (1 ideal, 0 singular)")
    for c in cond.centers:
        if c.at_infinity:
            u = f"direction +- {math.degrees(c.uncertainty):.3g} deg"
        else:
            u = f"+- {_f(c.uncertainty, 3)} {unit}"
        dig = f", {math.floor(c.digits)} digits sound" if c.digits is not None else ""
        flags = "; " + "; ".join(c.flags) if c.flags else ""
        out.append(f"  {c.pair:<24} {u:<28} (x{_f(c.sensitivity, 3)}{dig}){flags}")
    if cond.velocity_digits:
        worst = min(cond.velocity_digits.items(), key=lambda kv: kv[1])
        out.append(
            f"  angular velocities rechecked in high precision: the least sound is '{worst[0]}' with {math.floor(worst[1])} digits"
        )
    return "\n".join(out) + "\n"


def recheck_dict(r) -> dict | None:
    """The automatic high-precision recheck near a dead point as plain data (JSON ``precision_recheck``)."""
    if r is None:
        return None
    return {
        "velocity_condition": r.velocity_condition,
        "digits": r.digits,
        "center_digits": dict(r.center_digits),
        "velocity_digits": dict(r.velocity_digits),
    }


def recheck_table(r) -> str:
    """The recheck in words: how many digits of the float results are sound."""
    cmin = min(r.center_digits.items(), key=lambda kv: kv[1]) if r.center_digits else None
    vmin = min(r.velocity_digits.items(), key=lambda kv: kv[1]) if r.velocity_digits else None
    out = [
        f"Near a dead point: the velocity system's reciprocal condition is {_f(r.velocity_condition, 3)}, "
        f"so the results were recomputed with {r.digits} digits:"
    ]
    if cmin:
        out.append(f"  centers keep at least {math.floor(cmin[1])} sound digits (least: {cmin[0]})")
    if vmin:
        out.append(f"  angular velocities keep at least {math.floor(vmin[1])} sound digits (least: '{vmin[0]}')")
    return "\n".join(out) + "\n"


def to_dict(a: Analysis, topology: Topology | None = None, trust=None, recheck=None) -> dict:
    """The whole analysis as plain data (the JSON report before encoding)."""
    m = a.mechanism
    cc = a.crosscheck
    names = m.link_names
    return {
        "schema": SCHEMA,
        "caution": CAUTION,
        "arithmetic": a.arithmetic,
        "mechanism": {"name": m.name, "unit": m.unit, "links": list(names), "ground": m.ground, "scale": m.scale},
        "topology": topology_dict(topology) if topology is not None else None,
        "velocity": _velocity_dict(a),
        "centers": [_center_dict(c, a) for c in a.centers],
        "crosscheck": {
            "passed": cc.passed,
            "tolerance": cc.tol,
            "compared": cc.n_compared,
            "max_separation": cc.max_separation,
            "worst_pair": [names[i] for i in cc.worst_pair] if cc.worst_pair else None,
            "triples": cc.n_triples,
            "max_collinearity": cc.max_collinearity,
            "worst_triple": [names[i] for i in cc.worst_triple] if cc.worst_triple else None,
            "max_locus_residual": cc.max_locus_residual,
            "worst_locus_pair": [names[i] for i in cc.worst_locus_pair] if cc.worst_locus_pair else None,
        },
        "trust": trust_dict(trust) if trust is not None else None,
        "precision_recheck": recheck_dict(recheck),
    }


def to_json(a: Analysis, topology: Topology | None = None, trust=None, recheck=None) -> str:
    """JSON report (see README.md for the fields).

    Examples
    --------
    >>> import json
    >>> from mechgraph.analysis import analyse
    >>> from mechgraph.casefile import demo_mechanism
    >>> doc = json.loads(to_json(analyse(demo_mechanism())))
    >>> doc["schema"], len(doc["centers"]), doc["crosscheck"]["passed"]
    ('mechgraph.centers/1', 15, True)
    """
    return json.dumps(to_dict(a, topology, trust, recheck), indent=2) + "\n"


CSV_FIELDS = ["link_a", "link_b", "x", "y", "at_infinity", "dir_x", "dir_y", "method", "separation", "relative_rest", "derivation"]


def to_csv(a: Analysis) -> str:
    """CSV of the centers, one row per pair (columns :data:`CSV_FIELDS`; the caution as a last comment row)."""
    buf = io.StringIO()
    w = csv.writer(buf, lineterminator="\n")
    w.writerow(CSV_FIELDS)
    for c in a.centers:
        d = _center_dict(c, a)
        direction = d["direction"] or [None, None]
        w.writerow(
            [
                d["pair"][0],
                d["pair"][1],
                _num(d["x"]),
                _num(d["y"]),
                "yes" if d["at_infinity"] else ("no" if d["defined"] else ""),
                _num(direction[0]),
                _num(direction[1]),
                d["method"],
                _num(d["agreement"]["separation"]) if d["agreement"] else "",
                "yes" if d["relative_rest"] else "no",
                d["derivation"],
            ]
        )
    w.writerow([f"# {CAUTION}"])
    return buf.getvalue()


def _num(x) -> str:
    return "" if x is None else repr(float(x))


def _shown(x: float, ref: float, noise: float = 1e-12) -> float:
    """A value for display: round-off below ``noise * ref`` is shown as 0 (the JSON keeps raw values)."""
    return 0.0 if abs(x) <= noise * ref else x


def _where(c: Center, a: Analysis, unit: str) -> str:
    if c.point is None:
        return "undefined"
    L = a.mechanism.scale
    xy = c.cartesian(L)
    if c.kind_point is not None and a.arithmetic == "exact":
        t = c.exact_text()
        if t is not None:
            return f"({t[0]}, {t[1]}) {unit}"
        d = c.exact_direction_text()
        return f"at infinity, direction ({d[0]}, {d[1]})"
    if xy is not None:
        return f"({_f(_shown(xy[0], L), 7)}, {_f(_shown(xy[1], L), 7)}) {unit}"
    dx, dy = c.direction()
    ang = math.degrees(math.atan2(dy, dx)) % 180.0
    if 180.0 - ang < 1e-9:
        ang = 0.0
    return f"at infinity, direction {ang:.4g} deg"


def topology_table(t: Topology, mech_name: str = "") -> str:
    """The topology summary in words."""
    lines = []
    head = f"Topology of '{mech_name}'" if mech_name else "Topology"
    lines.append(head)
    counts = ", ".join(f"{v} {k}" for k, v in t.type_counts().items())
    lines.append(f"  links {t.n_links} ({counts}); joints {t.n_joints} ({t.j1} one-freedom, {t.j2} two-freedom)")
    lines.append(f"  mobility: Gruebler-Kutzbach {t.gruebler}, at this position {t.mobility}; independent loops {t.loops}")
    if t.chain:
        inv = f", {t.inversion}" if t.inversion else ""
        role = f" (ground is {t.ground_role})" if t.ground_role else ""
        lines.append(f"  chain: {t.chain}{inv}{role}")
    for c in t.cycle_basis:
        lines.append(f"  loop: {' - '.join(c)}")
    for note in t.notes:
        lines.append(f"  note: {note}")
    return "\n".join(lines) + "\n"


def to_table(a: Analysis, topology: Topology | None = None, trust=None, recheck=None) -> str:
    """A readable report: every center with method, derivation and check; velocities; the cross-check."""
    m = a.mechanism
    u = m.unit
    mode = {"float": "", "exact": ", exact arithmetic", "precision": ", high-precision arithmetic"}[a.arithmetic]
    out = [
        f"mechgraph: relative instant centers of '{m.name}' ({m.n_links} links, {m.n_pairs} centers, lengths in {u}{mode})",
        f"CAUTION: {CAUTION}",
        "",
    ]
    if topology is not None:
        out.append(topology_table(topology, m.name))
    rows = []
    for c in a.centers:
        if c.check is None:
            chk = "rest" if c.relative_rest else "-"
        else:
            chk = ("ok " if c.check.passed else "FAIL ") + _f(c.check.separation, 2)
        rows.append((c.pair, _where(c, a, u), c.method, chk, c.derivation))
    heads = ("pair", "center", "method", "check", "derivation")
    widths = [max(len(h), *(len(r[k]) for r in rows)) for k, h in enumerate(heads[:-1])]
    fmt = "  ".join(f"{{:<{w}}}" for w in widths) + "  {}"
    out.append(fmt.format(*heads))
    out.append(fmt.format(*("-" * w for w in widths), "-" * 10))
    out += [fmt.format(*r) for r in rows]
    out.append("")
    v = a.velocity
    if v is not None:
        drv = ", ".join(f"'{d}' at {_f(r)}" for d, r in zip(v.driver_joints, v.rates))
        out.append(f"Velocities (drivers: {drv}; rad/s and {u}/s)")
        wref = float(abs(v.twists[:, 0]).max()) if v.twists.size else 0.0
        vref = wref * m.scale + float(abs(v.twists[:, 1:]).max(initial=0.0))
        for i, name in enumerate(m.link_names):
            if i == m.ground_index:
                continue
            per = "  ".join(
                f"per unit '{d}': {_f(_shown(float(v.basis[k, i, 0]), float(abs(v.basis[k, :, 0]).max())))}"
                for k, d in enumerate(v.driver_joints)
            )
            exact_w = angular_velocity_text(v, i) if a.arithmetic == "exact" else None
            shown_w = exact_w if exact_w is not None else _f(_shown(float(v.twists[i, 0]), wref))
            out.append(f"  {name:<16} w = {shown_w:>12}   {per}")
        for p in m.points:
            vx, vy = v.point_velocity(m.index[p.link], p.at)
            vx, vy = _shown(vx, vref), _shown(vy, vref)
            out.append(f"  point '{p.name}' on {p.link}: v = ({_f(vx)}, {_f(vy)}), speed {_f(math.hypot(vx, vy))}")
        out.append("")
    cc = a.crosscheck
    names = m.link_names
    verdict = "PASSED" if cc.passed else "FAILED"
    wp = "-".join(names[i] for i in cc.worst_pair) if cc.worst_pair else "-"
    wt = ", ".join(names[i] for i in cc.worst_triple) if cc.worst_triple else "-"
    out.append(f"Cross-check {verdict} (tolerance {cc.tol:g} of the drawing size {_f(m.scale)} {u}):")
    out.append(f"  three-centers vs velocity analysis: {cc.n_compared} centers compared, largest separation {_f(cc.max_separation, 3)} ({wp})")
    out.append(f"  Aronhold-Kennedy collinearity: {cc.n_triples} link triples, largest residual {_f(cc.max_collinearity, 3)} ({wt})")
    if cc.worst_locus_pair is not None:
        wl = "-".join(names[i] for i in cc.worst_locus_pair)
        out.append(f"  velocity centers on their known three-centers lines: largest residual {_f(cc.max_locus_residual, 3)} ({wl})")
    unreached = [c for c in a.centers if c.method in ("velocity", "unresolved")]
    if unreached:
        out.append(f"  {len(unreached)} center(s) not reachable by the three-centers theorem: {', '.join(c.pair for c in unreached)}")
    out.append("")
    if recheck is not None:
        out.append(recheck_table(recheck))
    if trust is not None:
        out.append(trust_table(trust, u))
    return "\n".join(out)


def write_output(path, text: str, *, inputs=()) -> None:
    """Write a report whole or not at all, never over an input file.

    Parameters
    ----------
    path : str or Path
        Destination.  A symbolic link is followed (its target is written).
    text : str
    inputs : iterable of path, optional
        Files the report was made from; writing onto any of them is refused.

    Raises
    ------
    OutputError
        The destination is an input file, its folder does not exist, or the
        write fails (the destination is then left as it was).

    Examples
    --------
    >>> import tempfile, pathlib
    >>> d = pathlib.Path(tempfile.mkdtemp())
    >>> write_output(d / "r.txt", "hello\\n")
    >>> (d / "r.txt").read_text()
    'hello\\n'

    Notes
    -----
    The text goes to a temporary file in the destination's folder, which is
    then renamed over the destination in one step.  A file replaced keeps its
    permission bits; a new file gets the usual ones (0666 less the umask).
    """
    dest = Path(os.path.realpath(path))
    for src in inputs:
        try:
            same = dest.exists() and os.path.samefile(dest, src)
        except OSError:
            same = False
        if same or dest == Path(os.path.realpath(src)):
            raise OutputError(f"{path}: refusing to write the report over the input file; choose another output path")
    folder = dest.parent
    if not folder.is_dir():
        raise OutputError(f"{path}: the folder {folder} does not exist")
    if dest.exists() and not dest.is_file():
        raise OutputError(f"{path}: exists and is not a regular file")
    if dest.exists():
        mode = dest.stat().st_mode & 0o7777
    else:
        umask = os.umask(0)
        os.umask(umask)
        mode = 0o666 & ~umask
    fd, tmp = tempfile.mkstemp(prefix=f".{dest.name}.", suffix=".tmp", dir=folder)
    try:
        with os.fdopen(fd, "w", encoding="utf-8", newline="") as fh:
            fh.write(text)
        os.chmod(tmp, mode)
        os.replace(tmp, dest)
    except OSError as e:
        try:
            os.unlink(tmp)
        except OSError:
            pass
        raise OutputError(f"{path}: cannot be written: {e}") from None
