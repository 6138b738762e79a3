"""First smoke checks of the pipeline on the bundled demo."""

from mechgraph.analysis import analyse
from mechgraph.casefile import demo_mechanism


def test_demo_has_all_centers_and_passes():
    a = analyse(demo_mechanism())
    # n(n-1)/2 relative centers (common practice, no source)
    assert len(a.centers) == 6 * 5 // 2
    assert a.passed
    assert all(c.method in ("joint", "three-centers") for c in a.centers)
