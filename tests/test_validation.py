"""The verification suite runs under pytest too: every row must pass."""

from __future__ import annotations

import subprocess
import sys

import pytest

from mechgraph.cli import EXIT_CHECK_FAILED, EXIT_INPUT, EXIT_OK, main
from mechgraph.report import CAUTION
from validation import suite
from validation.suite import CheckResult, render_table, run_suite


@pytest.fixture(scope="module")
def rows():
    return run_suite()


def test_every_check_passes(rows):
    failed = [r for r in rows if not r.passed]
    assert not failed, render_table(failed)


def test_the_suite_covers_references_and_every_case(rows):
    sources = " ".join(r.source for r in rows)
    assert "Norton" in sources and "sympy" in sources and "common practice, no source" in sources
    assert "floating point vs exact arithmetic" in sources and "central differences" in sources
    assert "relaxation method" in sources
    from validation.suite import default_cases_dir

    stems = {p.stem for p in default_cases_dir().glob("*.toml")}
    assert stems <= {r.case for r in rows}
    assert len(rows) > 100


def test_table_has_columns_summary_and_caution(rows):
    text = render_table(rows)
    assert "case" in text and "source" in text and "expected" in text and "computed" in text
    assert CAUTION in text
    skipped = sum(r.skipped for r in rows)
    assert text.rstrip().endswith(f"{len(rows) - skipped} passed, 0 failed" + (f", {skipped} skipped" if skipped else ""))
    assert "from memory" in text  # the source column keeps the provenance


def test_a_failing_check_fails_the_command(monkeypatch, capsys):
    bad = suite.Check("deliberately wrong", lambda: iter([CheckResult("x", "test", "q", "1", "2", 1.0, 0.0, False)]))
    monkeypatch.setattr(suite, "all_checks", lambda cases_dir=None: [bad])
    assert main(["validate"]) == EXIT_CHECK_FAILED
    assert "0 passed, 1 failed" in capsys.readouterr().out


def test_a_crashing_check_is_a_failed_row(monkeypatch):
    def boom():
        raise RuntimeError("broken reference")
        yield  # pragma: no cover

    monkeypatch.setattr(suite, "all_checks", lambda cases_dir=None: [suite.Check("crash", boom)])
    (row,) = run_suite()
    assert not row.passed and "RuntimeError: broken reference" in row.computed


def test_validate_command_and_missing_cases_folder(tmp_path, capsys):
    assert main(["validate", "--cases", str(tmp_path / "nowhere")]) == EXIT_INPUT
    assert "no such folder" in capsys.readouterr().err
    assert main(["validate", "--cases", str(tmp_path)]) == EXIT_OK  # references only, no case files


def test_python_dash_m_validation():
    r = subprocess.run([sys.executable, "-m", "validation"], capture_output=True, text=True)
    assert r.returncode == 0, r.stdout[-2000:] + r.stderr
    assert " passed, 0 failed" in r.stdout


def test_a_bad_case_file_fails_only_its_own_rows(tmp_path):
    from mechgraph.casefile import demo_case_path

    (tmp_path / "good.toml").write_text(demo_case_path().read_text())
    (tmp_path / "broken.toml").write_text("[[link]\n")
    rows = [r for r in run_suite(tmp_path) if r.case in ("good", "broken")]
    assert [r.passed for r in rows if r.case == "broken"] == [False]
    assert all(r.passed for r in rows if r.case == "good") and len([r for r in rows if r.case == "good"]) > 3
