"""Every bad input the foundation issue names gets a clear error naming the place at fault."""

from __future__ import annotations

import math

import pytest

from mechgraph.analysis import analyse
from mechgraph.casefile import load_case, parse_case
from mechgraph.errors import CaseFileError, DriverError, MechgraphError, ModelError, SingularPositionError
from mechgraph.joints import Prismatic, Revolute
from mechgraph.model import Driver, Link, Mechanism

FOUR_BAR = """
[mechanism]
name = "test four-bar"
unit = "mm"

[[link]]
name = "frame"
ground = true
[[link]]
name = "crank"
[[link]]
name = "coupler"
[[link]]
name = "rocker"

[[joint]]
name = "O2"
kind = "revolute"
links = ["frame", "crank"]
at = [0.0, 0.0]
[[joint]]
name = "A"
kind = "revolute"
links = ["crank", "coupler"]
at = [{ax}, {ay}]
[[joint]]
name = "B"
kind = "revolute"
links = ["coupler", "rocker"]
at = [120.0, 70.0]
[[joint]]
name = "O4"
kind = "revolute"
links = ["frame", "rocker"]
at = [100.0, 0.0]
{extra}
[[driver]]
joint = "O2"
rad_per_s = 10
"""


def case(extra: str = "", ax: float = 20.0, ay: float = 35.0) -> str:
    return FOUR_BAR.format(extra=extra, ax=ax, ay=ay)


def test_good_case_parses():
    m = parse_case(case(), "good.toml")
    assert m.n_links == 4 and analyse(m).passed


def test_malformed_toml_names_file_and_line():
    text = case().replace('name = "A"', 'name = "A', 1)
    with pytest.raises(CaseFileError, match=r"bad\.toml, line \d+: not valid TOML") as e:
        parse_case(text, "bad.toml")
    lines = text.splitlines()
    assert 'name = "A' in lines[e.value.line - 1]


def test_unknown_joint_kind_lists_valid_kinds():
    text = case().replace('kind = "revolute"\nlinks = ["crank", "coupler"]', 'kind = "hinge"\nlinks = ["crank", "coupler"]')
    with pytest.raises(CaseFileError, match=r"joint\[2\] 'A': joint kind 'hinge' is not known; use one of revolute, prismatic"):
        parse_case(text, "k.toml")


def test_unknown_link_is_named():
    text = case().replace('links = ["coupler", "rocker"]', 'links = ["coupler", "rockr"]')
    with pytest.raises(CaseFileError, match=r"names link 'rockr', which is not defined; links are: frame, crank, coupler, rocker"):
        parse_case(text, "l.toml")


def test_joint_from_link_to_itself():
    text = case().replace('links = ["coupler", "rocker"]', 'links = ["coupler", "coupler"]')
    with pytest.raises(CaseFileError, match=r"joint 'B' joins link 'coupler' to itself"):
        parse_case(text, "s.toml")


def test_two_joints_saying_the_same_thing():
    extra = '[[joint]]\nname = "A2"\nkind = "revolute"\nlinks = ["coupler", "crank"]\nat = [20.0, 35.0]\n'
    with pytest.raises(CaseFileError, match=r"joints 'A' \(revolute\) and 'A2' \(revolute\) both join 'coupler' and 'crank'"):
        parse_case(case(extra), "d.toml")


def test_duplicate_contact_is_refused():
    extra = (
        '[[link]]\nname = "follower"\n'
        '[[joint]]\nname = "k1"\nkind = "cam"\nlinks = ["rocker", "follower"]\nat = [110.0, 30.0]\nnormal_deg = 90\n'
        '[[joint]]\nname = "k2"\nkind = "cam"\nlinks = ["rocker", "follower"]\nat = [110.0, 30.0]\nnormal_deg = 90\n'
    )
    with pytest.raises(CaseFileError, match=r"joints 'k1' and 'k2' are the same cam joint"):
        parse_case(case(extra), "d2.toml")


def test_link_not_connected_to_ground():
    extra = '[[link]]\nname = "stray"\n[[link]]\nname = "stray2"\n[[joint]]\nkind = "revolute"\nlinks = ["stray", "stray2"]\nat = [5.0, 5.0]\n'
    with pytest.raises(CaseFileError, match=r"link\(s\) 'stray', 'stray2' are not connected to the ground link 'frame'"):
        parse_case(case(extra), "c.toml")


def test_no_ground():
    text = case().replace("ground = true\n", "")
    with pytest.raises(CaseFileError, match=r"no link is marked as ground; mark exactly one link"):
        parse_case(text, "g.toml")


def test_two_grounds():
    text = case().replace('name = "crank"\n', 'name = "crank"\nground = true\n', 1)
    with pytest.raises(CaseFileError, match=r"links 'frame', 'crank' are all marked as ground; exactly one link may be ground"):
        parse_case(text, "g2.toml")


def test_zero_length_slider_axis():
    extra = '[[link]]\nname = "ram"\n[[joint]]\nname = "P"\nkind = "prismatic"\nlinks = ["frame", "ram"]\nat = [50.0, -20.0]\naxis = [0.0, 0.0]\n'
    with pytest.raises(CaseFileError, match=r"joint\[5\] 'P': field 'axis' is a zero-length direction"):
        parse_case(case(extra), "z.toml")
    with pytest.raises(ModelError, match=r"prismatic joint 'P' \(frame-ram\): field 'axis' must be a non-zero"):
        Prismatic("P", ("frame", "ram"), at=(0.0, 0.0), axis=(0.0, 0.0))


@pytest.mark.parametrize("value", ["nan", "inf", "-inf"])
def test_non_finite_coordinates(value):
    with pytest.raises(CaseFileError, match=r"joint\[2\] 'A': field 'at' must be finite"):
        parse_case(case().replace("at = [20.0, 35.0]", f"at = [{value}, 35.0]"), "n.toml")


def test_absurd_coordinates():
    with pytest.raises(CaseFileError, match=r"a\.toml: revolute joint 'A' \(crank-coupler\): coordinate \[2e\+15, 35\] is beyond 1e\+09 drawing units"):
        parse_case(case(ax=2e15), "a.toml")


def test_non_number_coordinate():
    with pytest.raises(CaseFileError, match=r"field 'at' must be a number, got '20'"):
        parse_case(case().replace("at = [20.0, 35.0]", 'at = ["20", 35.0]'), "t.toml")


def test_unknown_field_is_named_with_valid_ones():
    with pytest.raises(CaseFileError, match=r"unknown field\(s\) 'att'; valid fields are: at, kind, links, name, notes"):
        parse_case(case().replace("at = [120.0, 70.0]", "att = [120.0, 70.0]"), "f.toml")


def test_too_many_drivers_for_the_mobility():
    extra = '[[driver]]\njoint = "O4"\nrpm = 30\n'
    m = parse_case(case(extra), "dr.toml")
    with pytest.raises(DriverError, match=r"has 1 freedom\(s\) at this position but 2 driver\(s\) are given; give exactly 1"):
        analyse(m)


def test_too_few_drivers():
    m = parse_case(case().split("[[driver]]")[0], "dr0.toml")
    with pytest.raises(DriverError, match=r"has 1 freedom\(s\) at this position but 0 driver\(s\) are given"):
        analyse(m)


def test_driver_on_joint_that_cannot_drive():
    extra = '[[link]]\nname = "follower"\n[[joint]]\nname = "k"\nkind = "cam"\nlinks = ["rocker", "follower"]\nat = [110.0, 30.0]\nnormal_deg = 90\n'
    text = case(extra).replace('joint = "O2"', 'joint = "k"')
    with pytest.raises(CaseFileError, match=r"driver on cam joint 'k' \(rocker-follower\): a cam joint cannot take a driver"):
        parse_case(text, "cd.toml")


def test_driver_on_unknown_joint():
    with pytest.raises(CaseFileError, match=r"driver names joint 'Q', which is not defined; joints are: O2, A, B, O4"):
        parse_case(case().replace('joint = "O2"', 'joint = "Q"'), "u.toml")


def test_driver_rate_kind_must_match_joint():
    with pytest.raises(CaseFileError, match=r"'O2' is a revolute joint: give its rate as rpm, rad_per_s or deg_per_s, not speed"):
        parse_case(case().replace("rad_per_s = 10", "speed = 10"), "r.toml")


def test_dead_point_is_reported_with_links_and_joints():
    # Coupler and rocker collinear with the crank driving: a dead point of the
    # dyad (common practice, no source).  B = (120, 70), O4 = (100, 0): put A on
    # the line O4-B extended beyond B.
    t = 1.5
    ax, ay = 100.0 + t * 20.0, 0.0 + t * 70.0
    m = parse_case(case(ax=ax, ay=ay), "dead.toml")
    with pytest.raises(
        SingularPositionError,
        match=r"the driver on 'O2' cannot move the mechanism at this position: its joint is locked by the rest of the "
        r"linkage here \(a dead point\); with the driver\(s\) on 'O2' held still, link\(s\) 'coupler', 'rocker' can still move",
    ) as e:
        analyse(m)
    assert set(e.value.moving_links) == {"coupler", "rocker"}
    assert "B" in e.value.joints


def test_missing_case_file(tmp_path):
    with pytest.raises(CaseFileError, match=r"nope\.toml: no such file"):
        load_case(tmp_path / "nope.toml")


def test_every_error_is_a_mechgraph_error():
    for cls in (CaseFileError, DriverError, ModelError, SingularPositionError):
        assert issubclass(cls, MechgraphError)


def test_model_api_errors_without_a_file():
    links = (Link("frame", ground=True), Link("crank"))
    with pytest.raises(ModelError, match=r"link name 'crank' is used twice"):
        Mechanism(links=links + (Link("crank"),), joints=(Revolute("O", ("frame", "crank"), at=(0.0, 0.0)),))
    with pytest.raises(DriverError, match=r"driver on joint 'O': rate must be a finite number"):
        Mechanism(links=links, joints=(Revolute("O", ("frame", "crank"), at=(0.0, 0.0)),), drivers=(Driver("O", math.nan),))
    with pytest.raises(ModelError, match=r"unit 'furlong' is not known; use one of mm, cm, m, in, ft"):
        Mechanism(links=links, joints=(Revolute("O", ("frame", "crank"), at=(0.0, 0.0)),), unit="furlong")


def test_change_point_is_a_singular_position_not_a_driver_count():
    # Every pin on one line: the folded four-bar's change point (common practice, no source).
    m = parse_case(case(ax=40.0, ay=0.0).replace("at = [120.0, 70.0]", "at = [140.0, 0.0]"), "change.toml")
    with pytest.raises(SingularPositionError, match=r"leave 1 more freedom than the Gruebler-Kutzbach count \(1\): a change point"):
        analyse(m)


def test_over_driven_loop_names_both_drivers():
    extra = '[[link]]\nname = "free"\n[[joint]]\nname = "F"\nkind = "revolute"\nlinks = ["frame", "free"]\nat = [50.0, -50.0]\n'
    text = case(extra) + '[[driver]]\njoint = "O4"\nrad_per_s = 2\n'
    with pytest.raises(SingularPositionError, match=r"the drivers on 'O2' and 'O4' are not independent .* Move one of these drivers to a joint of 'free'"):
        analyse(parse_case(text, "over.toml"))


def test_all_rates_zero():
    m = parse_case(case().replace("rad_per_s = 10", "rad_per_s = 0"), "zero.toml")
    with pytest.raises(DriverError, match=r"every driver rate is zero, so nothing moves"):
        analyse(m)


def test_two_contacts_on_one_normal_say_the_same_thing():
    extra = (
        '[[link]]\nname = "follower"\n'
        '[[joint]]\nname = "k1"\nkind = "cam"\nlinks = ["rocker", "follower"]\nat = [110.0, 30.0]\nnormal_deg = 90\n'
        '[[joint]]\nname = "k2"\nkind = "cam"\nlinks = ["rocker", "follower"]\nat = [110.0, 60.0]\nnormal_deg = 90\n'
    )
    with pytest.raises(CaseFileError, match=r"joints 'k1' \(cam\) and 'k2' \(cam\) between 'follower' and 'rocker' say the same thing"):
        parse_case(case(extra), "n.toml")
