"""The verification suite: mechgraph against outside references and against itself.

Every check is a row: case, source, quantity, expected, computed, error,
tolerance, pass.  :func:`run_suite` runs them all; ``python -m validation``
and ``mechgraph validate`` print the table and exit non-zero on any failure;
``tests/test_validation.py`` runs the same checks under pytest.

Sources of the expected values:

* published formulas and worked examples (named beside each check; "from
  memory" where the value is recalled rather than read);
* the general-purpose reference library sympy (loop-closure differentiation in
  :mod:`validation.references`);
* facts of the trade ("common practice, no source");
* mechgraph's other methods, for the cross-method checks on every case in
  ``cases/``: three-centers vs velocity analysis, velocity analysis vs central
  differences of assembled positions, floating point vs exact vs high precision,
  and, for indeterminate chains, the geometric relaxation method vs the
  velocity analysis.

Kinematic results only; strength, guarding and safety follow local codes and
licensed engineering practice.
"""

from __future__ import annotations

import math
import time
from dataclasses import dataclass
from pathlib import Path
from typing import Callable, Iterator

import numpy as np

from . import references as ref

__all__ = ["Check", "CheckResult", "all_checks", "run_suite", "render_table", "default_cases_dir"]

NORTON = "Norton, Design of Machinery, worked four-bar (numbers from memory, see shared references)"
VECTOR_LOOP = "four-bar vector-loop closed form (Norton; Uicker, Pennock & Shigley; from memory) with Freudenstein (Ghosal, Resonance, Aug 2010)"
SLIDER = "slider-crank closed form (Uicker, Pennock & Shigley, from memory; offset form derived in validation.references)"
SYMPY = "sympy loop-closure differentiation (validation.references)"
TRADE = "common practice, no source"


@dataclass(frozen=True)
class CheckResult:
    """One row of the verification table."""

    case: str
    source: str
    quantity: str
    expected: str
    computed: str
    error: float
    tol: float
    passed: bool
    seconds: float = 0.0
    skipped: bool = False


@dataclass(frozen=True)
class Check:
    """A named check; ``run()`` yields its result rows."""

    name: str
    run: Callable[[], Iterator[CheckResult]]


def default_cases_dir() -> Path:
    """The project's ``cases/`` folder beside the ``validation`` package."""
    return Path(__file__).resolve().parents[1] / "cases"


def _row(case, source, quantity, expected, computed, tol, *, relative=False) -> CheckResult:
    e, c = float(expected), float(computed)
    err = abs(c - e) / (abs(e) if relative and e != 0 else 1.0)
    return CheckResult(case, source, quantity, f"{e:.10g}", f"{c:.10g}", err, tol, bool(err <= tol))


def _flag(case, source, quantity, expected: str, computed: str, ok: bool, err: float = 0.0, tol: float = 0.0):
    return CheckResult(case, source, quantity, expected, computed, err, tol, bool(ok))


# ----------------------------------------------------------------- references
def _four_bar_mechanism(a, b, c, d, th2, circuit, w2):
    from mechgraph.generate import four_bar

    th3, th4 = ref.fourbar_position(a, b, c, d, th2, circuit)
    j = ref.fourbar_joints(a, c, d, th2, th4)
    m = four_bar(tuple(j["O2"]), tuple(j["A"]), tuple(j["B"]), tuple(j["O4"]), rate=w2)
    return m, th3, th4


def _norton() -> Iterator[CheckResult]:
    from mechgraph.analysis import analyse

    a, b, c, d, w2 = 40.0, 120.0, 80.0, 100.0, 25.0
    th2 = math.radians(40.0)
    published = {  # Norton's numbers (from memory), to their printed digits
        "open": {"th3 deg": (20.298, 5e-3), "th4 deg": (57.325, 5e-3), "w3": (-4.1209, 5e-4), "w4": (6.9980, 5e-4)},
        "crossed": {"th3 deg": (-60.978, 5e-3), "th4 deg": (-98.005, 5e-3), "w3": (-9.2588, 5e-4), "w4": (-20.3777, 5e-4)},
    }
    for circuit, values in published.items():
        m, th3, th4 = _four_bar_mechanism(a, b, c, d, th2, circuit, w2)
        an = analyse(m)
        v = an.velocity
        computed = {
            "th3 deg": math.degrees(th3),
            "th4 deg": math.degrees(th4),
            "w3": v.angular_velocity(m.index["L2"]),
            "w4": v.angular_velocity(m.index["L3"]),
        }
        for q, (expected, tol) in values.items():
            yield _row(f"Norton four-bar, {circuit}", NORTON, q, expected, computed[q], tol)
    m, _, _ = _four_bar_mechanism(a, b, c, d, th2, "open", w2)
    an = analyse(m)
    vb = an.velocity.point_velocity(m.index["L3"], m.joint_by_name["B"].at)
    yield _row("Norton four-bar, open", NORTON, "|V_B| mm/s", 559.84, math.hypot(*vb), 5e-2)
    yield _row("Norton four-bar, open", NORTON, "w4/w2", 0.27992, an.velocity.angular_velocity(3) / w2, 5e-5)
    i24 = an.center("L1", "L3").cartesian(m.scale)
    yield _row("Norton four-bar, open", NORTON, "I24 x mm", -38.873, i24[0], 5e-3)


def _closed_form_sweep() -> Iterator[CheckResult]:
    from mechgraph.analysis import analyse

    for dims in ((40.0, 120.0, 80.0, 100.0), (25.0, 90.0, 70.0, 80.0)):
        a, b, c, d = dims
        for deg in range(15, 360, 45):
            th2 = math.radians(deg)
            for circuit in ("open", "crossed"):
                try:
                    m, th3, th4 = _four_bar_mechanism(a, b, c, d, th2, circuit, 10.0)
                except ValueError:
                    continue  # the linkage does not assemble at this crank angle
                w3, w4 = ref.fourbar_velocity(a, b, c, th2, th3, th4, 10.0)
                an = analyse(m)
                case = f"four-bar {a:g}/{b:g}/{c:g}/{d:g} at {deg} deg, {circuit}"
                yield _row(case, VECTOR_LOOP, "w3", w3, an.velocity.angular_velocity(2), 1e-9, relative=True)
                yield _row(case, VECTOR_LOOP, "w4", w4, an.velocity.angular_velocity(3), 1e-9, relative=True)
                ics = ref.fourbar_instant_centers(m.joint_by_name["O2"].at, m.joint_by_name["A"].at, m.joint_by_name["B"].at, m.joint_by_name["O4"].at)
                got = an.center("frame", "L2").cartesian(m.scale)
                if got is not None and np.all(np.isfinite(ics["I13"])):
                    err = math.dist(got, ics["I13"]) / m.scale
                    yield _flag(case, "line intersection (validation.references)", "I13", _xy(ics["I13"]), _xy(got), err <= 1e-9, err, 1e-9)


def _xy(p) -> str:
    return f"({float(p[0]):.8g}, {float(p[1]):.8g})"


def _sympy_four_bar() -> Iterator[CheckResult]:
    from mechgraph.analysis import analyse

    a, b, c, d = 40.0, 120.0, 80.0, 100.0
    for deg in (30, 110, 200, 290):
        th2 = math.radians(deg)
        s = ref.sympy_fourbar(a, b, c, d, th2, 25.0, "open")
        m, _, _ = _four_bar_mechanism(a, b, c, d, th2, "open", 25.0)
        for kind in ("float", "exact"):
            an = analyse(m, arithmetic=kind)
            case = f"four-bar at {deg} deg ({kind})"
            yield _row(case, SYMPY, "w3", s.w3, an.velocity.angular_velocity(2), 1e-9, relative=True)
            yield _row(case, SYMPY, "w4", s.w4, an.velocity.angular_velocity(3), 1e-9, relative=True)


def _slider_cranks() -> Iterator[CheckResult]:
    from mechgraph.analysis import analyse
    from mechgraph.generate import slider_crank

    for r, l, e in ((10.0, 20.0, 0.0), (30.0, 95.0, 8.0), (30.0, 95.0, -12.0)):
        for deg in (20, 75, 140, 250):
            th = math.radians(deg)
            x, th3 = ref.slider_crank_position(r, l, th, e)
            w3, v = ref.slider_crank_velocity(r, l, th, 1.0, e)
            m = slider_crank((0.0, 0.0), (r * math.cos(th), r * math.sin(th)), (x, e), rate=1.0)
            an = analyse(m)
            vel = an.velocity
            case = f"slider-crank r={r:g} l={l:g} e={e:g} at {deg} deg"
            yield _row(case, SLIDER, "rod w", w3, vel.angular_velocity(2), 1e-9, relative=True)
            slider_v = vel.point_velocity(3, (x, e))[0]
            yield _row(case, SLIDER, "slider v", v, slider_v, 1e-9 * r)
            c13 = an.center("frame", "L3")
            ok = c13.cartesian(m.scale) is None and abs(c13.direction()[0]) < 1e-12
            yield _flag(case, "slider center at infinity normal to the guide, " + TRADE, "frame-slider center",
                        "at infinity, vertical", "at infinity, vertical" if ok else str(c13.point), ok)
    # the in-line check value of the shared references (r = 10, l = 20, th = 45 deg, w = 1)
    th = math.radians(45.0)
    x, _ = ref.slider_crank_position(10.0, 20.0, th)
    m = slider_crank((0.0, 0.0), (10 * math.cos(th), 10 * math.sin(th)), (x, 0.0), rate=1.0)
    an = analyse(m)
    i13 = an.center("frame", "L2").cartesian(m.scale)
    yield _row("in-line slider-crank r=10 l=20 45 deg", SLIDER + " [computed]", "I13 x", 25.779, i13[0], 5e-4)
    yield _row("in-line slider-crank r=10 l=20 45 deg", SLIDER + " [computed]", "|w3|", 0.378, abs(an.velocity.angular_velocity(2)), 5e-4)


# --------------------------------------------------------------- cross-method
def _cases_isolated(cases_dir: Path):
    """Each case as (name, mechanism or the error reading it): one bad file does not hide the others."""
    from mechgraph.casefile import demo_mechanism, load_case

    yield "demo (label applicator)", demo_mechanism()
    if cases_dir.is_dir():
        for p in sorted(cases_dir.glob("*.toml")):
            try:
                yield p.stem, load_case(p)
            except Exception as e:  # reported as that case's failed row
                yield p.stem, e


def _cross_method(cases_dir: Path) -> Iterator[CheckResult]:
    for name, m in _cases_isolated(cases_dir):
        if isinstance(m, Exception):
            yield _flag(name, "case file", "reads", "a valid case", f"{type(m).__name__}: {m}", False, math.inf)
            continue
        try:
            rows = list(_cross_method_one(name, m))
        except Exception as e:
            rows = [_flag(name, "cross-method checks", "runs", "no error", f"{type(e).__name__}: {e}", False, math.inf)]
        yield from rows


def _cross_method_one(name, m) -> Iterator[CheckResult]:
    from mechgraph.analysis import analyse
    from mechgraph.errors import ModelError, NumberKindError
    from mechgraph.position import assemble

    fl = analyse(m)
    cc = fl.crosscheck
    n = m.n_links
    yield _flag(name, TRADE, "centers defined", str(n * (n - 1) // 2), str(sum(c.point is not None for c in fl.centers)),
                all(c.point is not None for c in fl.centers))
    yield _flag(name, "three-centers vs velocity analysis", "largest separation", "0", f"{cc.max_separation:.2e}",
                cc.max_separation <= cc.tol, cc.max_separation, cc.tol)
    yield _flag(name, "Aronhold-Kennedy theorem, " + TRADE, "largest triple residual", "0", f"{cc.max_collinearity:.2e}",
                cc.max_collinearity <= cc.tol, cc.max_collinearity, cc.tol)
    for kind in ("exact", "precision"):
        try:
            other = analyse(m, arithmetic=kind)
        except NumberKindError as e:
            yield CheckResult(name, f"floating point vs {kind} arithmetic", "largest center difference", "0",
                              f"not run: {e}", 0.0, 0.0, True, skipped=True)
            continue
        worst = max(
            (_sep(m, c1.point, c2.point) for c1, c2 in zip(fl.centers, other.centers) if c1.point is not None),
            default=0.0,
        )
        yield _flag(name, f"floating point vs {kind} arithmetic", "largest center difference", "0", f"{worst:.2e}",
                    worst <= 1e-9 and other.passed, worst, 1e-9)
    # velocity analysis vs central differences of assembled positions
    try:
        h = 1e-6
        for k, d in enumerate(m.drivers):
            e = np.zeros(len(m.drivers))
            e[k] = h * (m.scale if m.joint_by_name[d.joint].drive == "sliding" else 1.0)
            fd = (assemble(m, e) - assemble(m, -e)) / (2 * e[k])
            b = fl.velocity.basis[k]
            err = float(np.max(np.abs(fd[:, 2] - b[:, 0])) / max(1.0, np.abs(b[:, 0]).max()))
            yield _flag(name, "central differences of assembled positions", f"angular velocities per unit '{d.joint}'",
                        "0", f"{err:.2e}", err <= 1e-6, err, 1e-6)
    except ModelError:
        yield CheckResult(name, "central differences of assembled positions", "angular velocities", "-",
                          "not run: a joint kind without a position model (cam, rolling, gear)",
                          0.0, 0.0, True, skipped=True)


def _sep(m, p, q) -> float:
    from mechgraph import projective as pg

    return pg.point_separation(p, q, scale=m.scale, origin=m.centre)


def _indeterminate(cases_dir: Path) -> Iterator[CheckResult]:
    try:
        from mechgraph.indeterminate import locate_by_relaxation
    except ImportError:  # pragma: no cover - the module is part of the package
        return
    from mechgraph.analysis import analyse, locate_centers

    for name, m in _cases_isolated(cases_dir):
        if isinstance(m, Exception) or not locate_centers(m).unresolved or len(m.drivers) != 1:
            continue  # determinate (or several freedoms): nothing for the relaxation method
        fl = analyse(m, geometric=False)
        res = locate_by_relaxation(m)
        pts = _relaxation_points(res, m)
        worst, found = 0.0, 0
        for c in fl.centers:
            p = pts.get((c.i, c.j))
            if p is None or c.velocity_point is None:
                continue
            found += 1
            worst = max(worst, _sep(m, p, c.velocity_point))
        total = m.n_pairs
        yield _flag(name, "relaxation method (Foster & Pennock, ASME IDETC 2004) vs velocity analysis",
                    "centers located geometrically", str(total), str(found), found == total)
        yield _flag(name, "relaxation method (Foster & Pennock, ASME IDETC 2004) vs velocity analysis",
                    "largest separation", "0", f"{worst:.2e}", worst <= 1e-8, worst, 1e-8)


def _relaxation_points(res, m) -> dict:
    """Pair (i, j) -> point from a relaxation result (its ``points`` per pair, as the solver orders pairs)."""
    from mechgraph.three_centers import pairs

    pts = getattr(res, "points", None)
    if pts is None:
        return {}
    return {p: pt for p, pt in zip(pairs(m.n_links), pts) if pt is not None}


def all_checks(cases_dir: Path | None = None) -> list[Check]:
    """Every check of the suite, in report order."""
    cases_dir = default_cases_dir() if cases_dir is None else Path(cases_dir)
    return [
        Check("norton", _norton),
        Check("closed-form four-bars", _closed_form_sweep),
        Check("sympy four-bars", _sympy_four_bar),
        Check("slider-cranks", _slider_cranks),
        Check("cross-method on every case", lambda: _cross_method(cases_dir)),
        Check("indeterminate chains", lambda: _indeterminate(cases_dir)),
    ]


def run_suite(cases_dir: Path | None = None) -> list[CheckResult]:
    """Run every check and return the rows (a check that raises gives a failed row naming the error)."""
    rows: list[CheckResult] = []
    for check in all_checks(cases_dir):
        t0 = time.perf_counter()
        try:
            got = list(check.run())
        except Exception as e:  # a crash is a failed check, reported with its cause
            got = [CheckResult(check.name, "-", "runs", "no error", f"{type(e).__name__}: {e}", math.inf, 0.0, False)]
        dt = time.perf_counter() - t0
        rows += [CheckResult(**{**r.__dict__, "seconds": dt / max(1, len(got))}) for r in got]
    return rows


def render_table(rows: list[CheckResult]) -> str:
    """The verification table, with a summary line and the caution."""
    from mechgraph.report import CAUTION

    heads = ("case", "source", "quantity", "expected", "computed", "error", "pass")
    body = [
        (r.case, r.source, r.quantity, r.expected, r.computed, f"{r.error:.2e}",
         "skip" if r.skipped else ("pass" if r.passed else "FAIL"))
        for r in rows
    ]
    limits = (48, 110, 44, 24, 60, 9, 4)  # the source column is kept whole enough to show "from memory"
    widths = [min(lim, max(len(h), *(len(b[k]) for b in body))) if body else len(h) for k, (h, lim) in enumerate(zip(heads, limits))]

    def cut(s, w):
        return s if len(s) <= w else s[: w - 3] + "..."

    lines = ["mechgraph verification suite", f"CAUTION: {CAUTION}", ""]
    lines.append("  ".join(h.ljust(w) for h, w in zip(heads, widths)))
    lines.append("  ".join("-" * w for w in widths))
    for b in body:
        lines.append("  ".join(cut(x, w).ljust(w) for x, w in zip(b, widths)))
    failed = [r for r in rows if not r.passed]
    skipped = [r for r in rows if r.skipped]
    lines.append("")
    tail = f", {len(skipped)} skipped" if skipped else ""
    lines.append(f"{len(rows) - len(failed) - len(skipped)} passed, {len(failed)} failed{tail}")
    return "\n".join(lines) + "\n"
