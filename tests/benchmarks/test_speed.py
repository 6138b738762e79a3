"""Speed benchmarks (pytest-benchmark): the figures go into the issue's closing note.

Run with ``python -m pytest tests/benchmarks --benchmark-enable``.  Under the
default ``--benchmark-disable`` each benchmark body runs once, as a test.
No timing is asserted here.
"""

from __future__ import annotations

import math
import subprocess
import sys
import time

import numpy as np
import pytest

from mechgraph.analysis import analyse, locate_centers
from mechgraph.casefile import demo_mechanism
from mechgraph.generate import ladder

LADDER_SIZES = (10, 20, 50, 100)


@pytest.fixture(scope="module")
def demo():
    return demo_mechanism()


@pytest.fixture(scope="module")
def ladders():
    return {n: ladder(n, np.random.default_rng(n)) for n in LADDER_SIZES}


def test_demo_all_centers_both_methods_and_crosscheck(benchmark, demo):
    result = benchmark(analyse, demo)
    assert result.passed and len(result.centers) == 15


def test_demo_three_centers_only(benchmark, demo):
    result = benchmark(locate_centers, demo)
    assert result.n_located == 15


@pytest.mark.parametrize("n", LADDER_SIZES)
def test_three_centers_on_ladder(benchmark, ladders, n):
    m = ladders[n]
    result = benchmark(locate_centers, m)
    assert result.n_located == n * (n - 1) // 2


@pytest.mark.parametrize("n", (20, 100))
def test_full_analysis_on_ladder(benchmark, ladders, n):
    result = benchmark.pedantic(analyse, args=(ladders[n],), rounds=3, iterations=1)
    assert len(result.centers) == n * (n - 1) // 2


def test_growth_exponent_of_three_centers(benchmark, ladders):
    """Fit t ~ n^p over the ladder sizes; p is recorded in the benchmark's extra_info."""

    def best(m, repeat):
        return min(_timed(locate_centers, m) for _ in range(repeat))

    def fit():
        repeat = 1 if benchmark.disabled else 5
        times = [best(ladders[n], repeat) for n in LADDER_SIZES]
        logs_n = np.log(LADDER_SIZES)
        p = float(np.polyfit(logs_n, np.log(times), 1)[0])
        return p, times

    p, times = benchmark.pedantic(fit, rounds=1, iterations=1)
    benchmark.extra_info["growth_exponent"] = round(p, 2)
    benchmark.extra_info["seconds_by_size"] = dict(zip(map(str, LADDER_SIZES), [round(t, 5) for t in times]))
    assert math.isfinite(p)


def test_cli_cold_start_demo(benchmark):
    def run():
        r = subprocess.run([sys.executable, "-m", "mechgraph.cli", "demo"], capture_output=True, text=True)
        assert r.returncode == 0, r.stderr

    benchmark.pedantic(run, rounds=1 if benchmark.disabled else 5, iterations=1)


def _timed(f, *args):
    t0 = time.perf_counter()
    f(*args)
    return time.perf_counter() - t0


def test_demo_exact_arithmetic(benchmark, demo):
    result = benchmark(analyse, demo, arithmetic="exact")
    assert result.passed and result.crosscheck.max_separation == 0.0


def test_demo_fifty_digits(benchmark, demo):
    result = benchmark(analyse, demo, arithmetic="precision", digits=50)
    assert result.passed


@pytest.mark.parametrize("stem", ["eightbar_double_butterfly_stage_lift", "eightbar_single_flier_dough_folder"])
def test_indeterminate_eight_bar_geometric(benchmark, stem):
    from pathlib import Path

    from mechgraph.casefile import load_case

    m = load_case(Path(__file__).resolve().parents[2] / "cases" / f"{stem}.toml")
    result = benchmark(analyse, m)
    assert result.passed and not [c for c in result.centers if c.method == "velocity"]


def test_uncertainty_of_the_demo(benchmark, demo):
    from mechgraph.conditioning import assess

    result = benchmark.pedantic(assess, args=(demo,), rounds=1 if benchmark.disabled else 5, iterations=1)
    assert len(result.centers) == 15


def test_full_verification_suite(benchmark):
    from validation.suite import run_suite

    rows = benchmark.pedantic(run_suite, rounds=1, iterations=1)
    assert all(r.passed for r in rows)
