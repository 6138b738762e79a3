"""The command line: formats, exit codes, errors without tracebacks, safe output."""

from __future__ import annotations

import csv
import io
import json
import subprocess
import sys

import pytest

from mechgraph.cli import EXIT_CHECK_FAILED, EXIT_INPUT, EXIT_OK, EXIT_OUTPUT, EXIT_SINGULAR, main
from mechgraph.casefile import demo_case_path
from mechgraph.report import CAUTION

from test_errors import case


@pytest.fixture
def demo_file(tmp_path):
    p = tmp_path / "demo.toml"
    p.write_text(demo_case_path().read_text(encoding="utf-8"), encoding="utf-8")
    return p


def test_demo_table(capsys):
    assert main(["demo"]) == EXIT_OK
    out = capsys.readouterr().out
    assert CAUTION in out
    assert "Cross-check PASSED" in out
    assert "frame-coupler" in out and "from line frame-crank/crank-coupler" in out
    assert "Stephenson III" in out


def test_centers_json_schema(demo_file, capsys):
    assert main(["centers", str(demo_file), "--format", "json"]) == EXIT_OK
    doc = json.loads(capsys.readouterr().out)
    assert doc["schema"] == "mechgraph.centers/1"
    assert doc["caution"] == CAUTION
    assert len(doc["centers"]) == 15
    c = doc["centers"][0]
    assert set(c) >= {"pair", "defined", "at_infinity", "x", "y", "direction", "homogeneous", "method", "derivation", "agreement"}
    assert doc["crosscheck"]["passed"] is True
    assert doc["topology"]["chain"] == "Stephenson"
    assert doc["velocity"]["drivers"][0]["joint"] == "O2"


def test_centers_csv(demo_file, capsys):
    assert main(["centers", str(demo_file), "-f", "csv"]) == EXIT_OK
    rows = list(csv.reader(io.StringIO(capsys.readouterr().out)))
    assert rows[0][:3] == ["link_a", "link_b", "x"]
    assert len(rows) == 1 + 15 + 1
    assert CAUTION in rows[-1][0]


def test_output_file_is_written_whole(demo_file, tmp_path, capsys):
    out = tmp_path / "centers.json"
    assert main(["centers", str(demo_file), "-f", "json", "-o", str(out)]) == EXIT_OK
    assert json.loads(out.read_text())["schema"] == "mechgraph.centers/1"
    assert capsys.readouterr().out == ""
    assert not [p for p in tmp_path.iterdir() if p.name.endswith(".tmp")]


def test_never_overwrites_the_input(demo_file, capsys):
    before = demo_file.read_bytes()
    assert main(["centers", str(demo_file), "-o", str(demo_file)]) == EXIT_OUTPUT
    err = capsys.readouterr().err
    assert "refusing to write the report over the input file" in err
    assert demo_file.read_bytes() == before


def test_output_into_missing_folder(demo_file, tmp_path, capsys):
    assert main(["centers", str(demo_file), "-o", str(tmp_path / "no" / "x.txt")]) == EXIT_OUTPUT
    assert "does not exist" in capsys.readouterr().err


def test_bad_case_exit_code_and_no_traceback(tmp_path, capsys):
    p = tmp_path / "bad.toml"
    p.write_text(case().replace('kind = "revolute"\nlinks = ["crank"', 'kind = "hinge"\nlinks = ["crank"'))
    assert main(["centers", str(p)]) == EXIT_INPUT
    err = capsys.readouterr().err
    assert err.startswith("mechgraph: ") and "bad.toml" in err and "Traceback" not in err


def test_dead_point_exit_code(tmp_path, capsys):
    p = tmp_path / "dead.toml"
    p.write_text(case(ax=130.0, ay=105.0))
    assert main(["centers", str(p)]) == EXIT_SINGULAR
    assert "dead point" in capsys.readouterr().err


def test_failed_crosscheck_exit_code(demo_file, capsys):
    # An impossible tolerance makes the float cross-check fail: exit code 1, loudly.
    assert main(["centers", str(demo_file), "--agree-tol", "1e-30"]) == EXIT_CHECK_FAILED
    captured = capsys.readouterr()
    assert "Cross-check FAILED" in captured.out
    assert "CROSS-CHECK FAILED" in captured.err


def test_bad_tolerance(demo_file, capsys):
    assert main(["centers", str(demo_file), "--tol", "-1"]) == EXIT_INPUT
    assert "--tol must be a number between 0 and 1" in capsys.readouterr().err


def test_topology_command(demo_file, capsys):
    assert main(["topology", str(demo_file)]) == EXIT_OK
    out = capsys.readouterr().out
    assert "Gruebler-Kutzbach 1" in out and "Stephenson" in out
    assert main(["topology", str(demo_file), "-f", "json"]) == EXIT_OK
    assert json.loads(capsys.readouterr().out)["topology"]["gruebler_mobility"] == 1


def test_no_command_prints_help(capsys):
    assert main([]) == EXIT_INPUT
    assert "COMMAND" in capsys.readouterr().out


@pytest.mark.parametrize("args", [["--help"], ["demo", "--help"], ["centers", "--help"], ["topology", "--help"]])
def test_help_everywhere(args, capsys):
    with pytest.raises(SystemExit) as e:
        main(args)
    assert e.value.code == 0
    assert "exit codes" in capsys.readouterr().out


def test_console_script_runs_without_traceback(tmp_path):
    p = tmp_path / "missing.toml"
    r = subprocess.run([sys.executable, "-m", "mechgraph.cli", "centers", str(p)], capture_output=True, text=True)
    assert r.returncode == EXIT_INPUT
    assert "no such file" in r.stderr and "Traceback" not in r.stderr


def test_cli_does_not_import_heavy_modules():
    code = "import sys, mechgraph.cli; print(any(m.startswith(('sympy', 'matplotlib', 'scipy')) for m in sys.modules))"
    r = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True)
    assert r.stdout.strip() == "False"


def _readme_blocks():
    import re
    from pathlib import Path

    text = (Path(__file__).resolve().parents[1] / "README.md").read_text(encoding="utf-8")
    return re.findall(r"```toml\n(.*?)```", text, re.S)


def test_handcheck_command_holds_and_fails(tmp_path, capsys):
    case, hand = _readme_blocks()
    (tmp_path / "press.toml").write_text(case)
    (tmp_path / "press.hand.toml").write_text(hand)
    assert main(["handcheck", str(tmp_path / "press.toml")]) == EXIT_OK  # finds press.hand.toml beside the case
    assert "The hand calculation holds" in capsys.readouterr().out
    (tmp_path / "press.hand.toml").write_text(hand.replace("at = [139.6, 185.3]", "at = [150.0, 185.3]"))
    assert main(["handcheck", str(tmp_path / "press.toml"), "-f", "json"]) == EXIT_CHECK_FAILED
    doc = json.loads(capsys.readouterr().out)
    assert doc["holds"] is False


def test_handcheck_without_hand_file(tmp_path, capsys):
    case, _ = _readme_blocks()
    (tmp_path / "press.toml").write_text(case)
    assert main(["handcheck", str(tmp_path / "press.toml")]) == EXIT_INPUT
    assert "no hand file given and none found beside it" in capsys.readouterr().err


def test_output_dash_is_stdout(demo_file, capsys):
    assert main(["centers", str(demo_file), "-o", "-"]) == EXIT_OK
    assert "Cross-check PASSED" in capsys.readouterr().out


def test_replaced_output_keeps_its_permissions(demo_file, tmp_path):
    import os
    import stat

    out = tmp_path / "r.txt"
    out.write_text("old")
    os.chmod(out, 0o644)
    assert main(["centers", str(demo_file), "-o", str(out)]) == EXIT_OK
    assert stat.S_IMODE(out.stat().st_mode) == 0o644
    link = tmp_path / "link.txt"
    link.symlink_to(out)
    assert main(["centers", str(demo_file), "-f", "csv", "-o", str(link)]) == EXIT_OK
    assert link.is_symlink() and out.read_text().startswith("link_a")
