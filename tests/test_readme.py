"""The README's examples run as tests: its case file, its commands, its table excerpt."""

from __future__ import annotations

import re
import shlex
from pathlib import Path

import pytest

from mechgraph.casefile import parse_case
from mechgraph.cli import EXIT_OK, main

README = Path(__file__).resolve().parents[1] / "README.md"
TEXT = README.read_text(encoding="utf-8")


def _blocks(lang: str) -> list[str]:
    return re.findall(rf"```{lang}\n(.*?)```", TEXT, re.S)


def test_readme_case_file_is_valid_and_solves():
    toml = _blocks("toml")[0]
    m = parse_case(toml, "README.md")
    assert m.name == "bench press" and m.n_links == 6


def test_readme_hand_file_holds():
    from mechgraph.analysis import analyse
    from mechgraph.handcheck import check_hand, parse_hand_text

    case, hand = _blocks("toml")
    m = parse_case(case, "README.md")
    report = check_hand(analyse(m), parse_hand_text(hand, m, "press.hand.toml"))
    assert report.holds


def _commands() -> list[list[str]]:
    out = []
    for block in _blocks("console"):
        for line in block.splitlines():
            line = line.split("#", 1)[0].strip()
            if line.startswith("mechgraph "):
                out.append(shlex.split(line)[1:])
    return out


def test_readme_names_install_and_test_commands():
    blocks = [b.strip() for b in _blocks("console")]
    assert "pip install -e '.[test]' && mechgraph demo" in blocks
    assert "python -m pytest" in blocks


@pytest.mark.parametrize("args", _commands(), ids=lambda a: " ".join(a))
def test_readme_command_runs(args, tmp_path, monkeypatch, capsys):
    toml, hand = _blocks("toml")
    (tmp_path / "press.toml").write_text(toml, encoding="utf-8")
    (tmp_path / "press.hand.toml").write_text(hand, encoding="utf-8")
    monkeypatch.chdir(tmp_path)
    if args[0] == "validate":
        pytest.skip("the verification suite runs in tests/test_validation.py")
    assert main(args) == EXIT_OK
    if "-o" in args:
        assert (tmp_path / args[args.index("-o") + 1]).stat().st_size > 0


def test_readme_table_excerpt_matches_the_demo(capsys):
    (excerpt,) = _blocks("text")
    assert main(["demo"]) == EXIT_OK

    def settled(text):  # the check column shows round-off, which may differ by platform
        return re.sub(r"ok \S+ +", "ok ", text)

    out = settled(capsys.readouterr().out)
    for line in excerpt.strip().splitlines()[1:]:
        assert settled(line) in out, line
