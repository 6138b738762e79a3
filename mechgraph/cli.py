"""The ``mechgraph`` command line.

Commands::

    mechgraph demo                       the bundled six-bar, full report
    mechgraph centers CASE [-f FORMAT] [-o FILE]
    mechgraph topology CASE [-f FORMAT] [-o FILE]
    mechgraph handcheck CASE [HANDFILE] [-f FORMAT] [-o FILE]
    mechgraph validate [--cases DIR] [-o FILE]

Exit codes: 0 success; 1 a check failed (the cross-check, a hand calculation
that does not hold, or the verification suite); 2 bad input (case file, hand
file, model, drivers, command line); 3 singular position (dead point, change
point); 4 an output file cannot be written; 5 an internal error (a defect of
mechgraph, reported in one line).  Errors are printed as one message on
standard error, without a traceback.
"""

from __future__ import annotations

import argparse
import json
import sys

from .errors import MechgraphError, OutputError, SingularPositionError

__all__ = ["main", "EXIT_OK", "EXIT_CHECK_FAILED", "EXIT_INPUT", "EXIT_SINGULAR", "EXIT_OUTPUT", "EXIT_INTERNAL"]

EXIT_OK = 0
EXIT_CHECK_FAILED = 1
EXIT_INPUT = 2
EXIT_SINGULAR = 3
EXIT_OUTPUT = 4
EXIT_INTERNAL = 5

_EPILOG = (
    "exit codes: 0 success, 1 a check failed (cross-check, hand calculation, verification suite), 2 bad input, "
    "3 singular position (dead point), 5 internal error, "
    "4 output cannot be written. Kinematic results only; strength, guarding and safety follow local codes "
    "and licensed engineering practice."
)


def _parser() -> argparse.ArgumentParser:
    p = argparse.ArgumentParser(
        prog="mechgraph",
        description="Relative instant centers, velocities and topology of planar multi-loop mechanisms.",
        epilog=_EPILOG,
    )
    sub = p.add_subparsers(dest="command", metavar="COMMAND")

    def outputs(sp, formats):
        sp.add_argument("-f", "--format", choices=formats, default=formats[0], help=f"output format (default {formats[0]})")
        sp.add_argument("-o", "--output", metavar="FILE", help="write to FILE (whole or not at all) instead of standard output ('-' is standard output)")

    def tolerances(sp):
        sp.add_argument("--tol", type=float, default=1e-9, help="coincidence tolerance of the three-centers solver, relative to the drawing size (default 1e-9)")
        sp.add_argument("--agree-tol", type=float, default=1e-6, help="cross-check tolerance, relative to the drawing size (default 1e-6)")
        sp.add_argument("--rank-tol", type=float, default=1e-9, help="relative singular-value threshold of the velocity analysis (default 1e-9)")
        sp.add_argument(
            "--arithmetic",
            choices=["float", "exact", "precision"],
            default="float",
            help="number kind: float (default), exact (fractions and surds, every test exact) or precision (many digits)",
        )
        sp.add_argument("--digits", type=int, default=50, help="working digits of --arithmetic precision (default 50)")
        sp.add_argument(
            "--uncertainty",
            nargs="?",
            const=-1.0,
            type=float,
            metavar="TOL",
            help="add how far each center moves for a drawing error of TOL length units "
            "(default 0.2 %% of the drawing size); near dead points the float results are rechecked in high precision",
        )

    d = sub.add_parser("demo", help="analyse the bundled demo six-bar (a label applicator)", epilog=_EPILOG)
    outputs(d, ["table", "json", "csv"])
    tolerances(d)
    c = sub.add_parser("centers", help="all relative instant centers of a case file, with derivations and cross-check", epilog=_EPILOG)
    c.add_argument("case", help="case file (TOML)")
    outputs(c, ["table", "json", "csv"])
    tolerances(c)
    t = sub.add_parser("topology", help="graph, mobility, loops, link types and chain class of a case file", epilog=_EPILOG)
    t.add_argument("case", help="case file (TOML)")
    outputs(t, ["table", "json"])
    h = sub.add_parser(
        "handcheck",
        help="check a hand or graphical calculation item by item and point out the first faulty step",
        epilog=_EPILOG,
    )
    h.add_argument("case", help="case file (TOML)")
    h.add_argument("hand", nargs="?", help="hand file (TOML or CSV); default CASE with .hand.toml or .hand.csv")
    outputs(h, ["table", "json"])
    v = sub.add_parser("validate", help="run the verification suite against outside references and across methods", epilog=_EPILOG)
    v.add_argument("--cases", metavar="DIR", help="folder of case files to cross-check (default: the project's cases/)")
    outputs(v, ["table"])
    return p


def _emit(text: str, output: str | None, inputs) -> None:
    if output and output != "-":
        from .report import write_output

        write_output(output, text, inputs=inputs)
    else:
        sys.stdout.write(text)


def _check_tolerances(args) -> None:
    for name in ("tol", "agree_tol", "rank_tol"):
        v = getattr(args, name, None)
        if v is not None and not (0.0 < v < 1.0):
            raise _UsageError(f"--{name.replace('_', '-')} must be a number between 0 and 1, got {v}")


class _UsageError(MechgraphError):
    pass


def _run(args) -> int:
    from .analysis import analyse
    from .casefile import demo_case_path, load_case, parse_case
    from .report import to_csv, to_json, to_table, topology_dict, topology_table
    from .topology import summarise_topology

    _check_tolerances(args)
    if args.command == "validate":
        return _validate(args)
    if args.command == "handcheck":
        return _handcheck(args)
    if args.command == "demo":
        path = demo_case_path()
        mech = parse_case(path.read_text(encoding="utf-8"), "demo:label_applicator.toml")
        inputs = ()
    else:
        mech = load_case(args.case)
        inputs = (args.case,)
    topo = summarise_topology(mech, rank_tol=getattr(args, "rank_tol", 1e-9))
    if args.command == "topology":
        if args.format == "json":
            text = json.dumps({"mechanism": mech.name, "topology": topology_dict(topo)}, indent=2) + "\n"
        else:
            text = topology_table(topo, mech.name)
        _emit(text, args.output, inputs)
        return EXIT_OK
    if args.digits < 16:
        raise _UsageError(f"--digits must be at least 16, got {args.digits}")
    a = analyse(
        mech, tol=args.tol, agree_tol=args.agree_tol, rank_tol=args.rank_tol, arithmetic=args.arithmetic, digits=args.digits
    )
    trust = recheck = None
    if args.arithmetic == "float" and a.velocity is not None:
        from .conditioning import recheck_near_dead_point

        recheck = recheck_near_dead_point(mech, a)  # automatic: only near a dead point
    if args.uncertainty is not None:
        from .conditioning import assess

        if args.uncertainty != -1.0 and not args.uncertainty > 0.0:
            raise _UsageError(f"--uncertainty must be a positive length, got {args.uncertainty}")
        base = a if args.arithmetic == "float" else None
        trust = assess(mech, base, input_tol=None if args.uncertainty == -1.0 else args.uncertainty)
    if args.format == "json":
        text = to_json(a, topo, trust, recheck)
    elif args.format == "csv":
        text = to_csv(a)
    else:
        text = to_table(a, topo, trust, recheck)
    _emit(text, args.output, inputs)
    if not a.passed:
        print(
            "mechgraph: CROSS-CHECK FAILED: the three-centers and velocity results disagree, or a link triple's "
            "centers are not collinear, beyond the tolerance; do not use these results (see the report)",
            file=sys.stderr,
        )
        return EXIT_CHECK_FAILED
    return EXIT_OK


def _handcheck(args) -> int:
    from .analysis import analyse
    from .casefile import load_case
    from .handcheck import check_hand, find_hand_file, read_hand_file, render_dict, render_text

    mech = load_case(args.case)
    hand_path = args.hand or find_hand_file(args.case)
    if hand_path is None:
        raise _UsageError(f"{args.case}: no hand file given and none found beside it (CASE.hand.toml or CASE.hand.csv)")
    hand = read_hand_file(hand_path, mech)
    report = check_hand(analyse(mech), hand)
    text = json.dumps(render_dict(report), indent=2) + "\n" if args.format == "json" else render_text(report)
    _emit(text, args.output, (args.case, str(hand_path)))
    return EXIT_OK if report.holds else EXIT_CHECK_FAILED


def _validate(args) -> int:
    try:
        from validation.suite import render_table, run_suite
    except ImportError:  # pragma: no cover - installed without the validation package
        raise _UsageError("the validation package is not installed beside mechgraph") from None
    from pathlib import Path

    if args.cases is not None and not Path(args.cases).is_dir():
        raise _UsageError(f"--cases {args.cases}: no such folder")
    rows = run_suite(args.cases)
    _emit(render_table(rows), args.output, ())
    return EXIT_OK if all(r.passed for r in rows) else EXIT_CHECK_FAILED


def main(argv=None) -> int:
    """Entry point of the ``mechgraph`` command; returns the exit code."""
    parser = _parser()
    args = parser.parse_args(argv)
    if args.command is None:
        parser.print_help()
        return EXIT_INPUT
    try:
        return _run(args)
    except SingularPositionError as e:
        print(f"mechgraph: {e}", file=sys.stderr)
        return EXIT_SINGULAR
    except OutputError as e:
        print(f"mechgraph: {e}", file=sys.stderr)
        return EXIT_OUTPUT
    except MechgraphError as e:
        print(f"mechgraph: {e}", file=sys.stderr)
        return EXIT_INPUT
    except KeyboardInterrupt:  # pragma: no cover - interactive
        return 130
    except Exception as e:  # a defect of mechgraph's own: say so in one line, no traceback
        print(f"mechgraph: internal error, please report it with the input: {type(e).__name__}: {e}", file=sys.stderr)
        return EXIT_INTERNAL


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
