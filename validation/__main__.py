"""``python -m validation``: run the verification suite, print the table, exit non-zero on any failure."""

import sys

from .suite import render_table, run_suite


def main(argv=None) -> int:
    """Run the suite on the project's cases/ folder; 0 when every check passes, else 1."""
    rows = run_suite()
    sys.stdout.write(render_table(rows))
    return 0 if all(r.passed for r in rows) else 1


if __name__ == "__main__":
    sys.exit(main())
