"""Speed over ground with a current, and a speed limit judged with the result's uncertainty.

Check values: the normal distribution (scipy.stats.norm, a reference library) for the probability of
exceeding a limit and the one-sided 95 % bound U - 1.6449 s (Abramowitz & Stegun 1964, table 26.1); the
current triangle, velocity over ground = velocity through the water + the current's velocity (Bowditch,
The American Practical Navigator, from memory), in cases worked by hand below."""

import json
import math

import numpy as np
import pytest
from scipy.stats import norm

from wakemeter.cli import main
from wakemeter.detect.request import AnalysisRequest, SpeedLimit, WaterCurrent
from wakemeter.detect.speed_check import DRAWS, check_speed
from wakemeter.errors import ParameterError
from wakemeter.physics import over_ground as og
from wakemeter.physics.units import KNOT_MPS

MC_P = 4 * math.sqrt(0.25 / DRAWS)  # four standard errors of a Monte Carlo fraction


@pytest.mark.parametrize("limit_kn", [10.0, 11.0, 11.6, 12.5])
def test_probability_and_lower_bound_match_the_normal_closed_form(limit_kn):
    u, s = 12.0 * KNOT_MPS, 0.5 * KNOT_MPS  # a symmetric interval: the split normal is a normal
    c = check_speed(
        u,
        (u - 1.959964 * s, u + 1.959964 * s),
        measured_over_ground=False,
        heading_deg=45.0,
        heading_std_deg=1.0,
        current=None,
        limit=SpeedLimit(limit_kn * KNOT_MPS, over_ground=False),
        seed=3,
    )
    assert c.judged.probability_over == pytest.approx(norm.sf(limit_kn * KNOT_MPS, u, s), abs=MC_P)
    assert c.judged.lower95_mps == pytest.approx(u - 1.644854 * s, abs=0.03 * s)
    assert f"{c.judged.lower95_mps / KNOT_MPS:.1f} kn" in c.statement and f"{limit_kn:.1f} kn limit" in c.statement


def test_the_statement_in_plain_words():
    u, s = 12.0 * KNOT_MPS, 0.5 * KNOT_MPS
    c = check_speed(
        u,
        (u - 1.96 * s, u + 1.96 * s),
        measured_over_ground=False,
        heading_deg=10.0,
        heading_std_deg=0.5,
        current=None,
        limit=SpeedLimit(10.0 * KNOT_MPS),
    )
    # 12 - 1.645 x 0.5 = 11.18 kn; P(N(12, 0.5) > 10) = 1 - 3.2e-5: more than the draws can resolve
    assert c.statement.startswith("speed over ground at least 11.2 kn with 95 % confidence; exceeds the 10.0 kn")
    assert "more than 0.999" in c.statement
    assert any("no current given" in a for a in c.assumptions)


@pytest.mark.parametrize(
    "heading,toward,expected",
    [
        (90.0, 90.0, 6.0),  # current from astern: 5 + 1
        (90.0, 270.0, 4.0),  # current from ahead: 5 - 1
        (0.0, 90.0, math.sqrt(26.0)),  # current on the beam: sqrt(5^2 + 1^2)
    ],
)
def test_current_triangle_worked_by_hand(heading, toward, expected):
    c = check_speed(
        5.0,
        (5.0, 5.0),
        measured_over_ground=False,
        heading_deg=heading,
        heading_std_deg=0.0,
        current=WaterCurrent(1.0, toward),
        limit=None,
    )
    assert c.over_ground.median_mps == pytest.approx(expected, rel=1e-9)
    assert c.through_water.median_mps == pytest.approx(5.0, rel=1e-9)
    # and back: a speed measured over ground gives the speed through the water
    back = check_speed(
        expected,
        (expected, expected),
        measured_over_ground=True,
        heading_deg=heading if toward != 90.0 or heading != 0.0 else math.degrees(math.atan2(1.0, 5.0)),
        heading_std_deg=0.0,
        current=WaterCurrent(1.0, toward),
        limit=None,
    )
    assert back.through_water.median_mps == pytest.approx(5.0, rel=1e-6)


def test_split_normal_keeps_its_interval():
    rng = np.random.default_rng(1)
    d = og.split_normal_draws(10.0, 9.0, 13.0, 200_000, rng)
    lo, med, hi = np.percentile(d, [2.5, 50.0, 97.5])
    # half of each side lies beyond 1.96 of its spread with probability 0.05, taken with weight one half
    assert lo == pytest.approx(9.0, abs=0.02) and hi == pytest.approx(13.0, abs=0.05)
    assert med == pytest.approx(10.0, abs=0.02)


def test_absurd_inputs_are_refused_in_plain_words():
    with pytest.raises(ParameterError, match="speed limit must be > 0"):
        SpeedLimit(0.0)
    with pytest.raises(ParameterError, match="at most 60"):
        SpeedLimit(1e6)
    with pytest.raises(ParameterError, match="current direction must be within 0-360"):
        WaterCurrent(1.0, 400.0)
    with pytest.raises(ParameterError, match="current speed must be"):
        WaterCurrent(float("nan"), 10.0)


def test_request_round_trip_with_current_and_limit():
    req = AnalysisRequest(
        vessel_px=(10.0, 20.0),
        current=WaterCurrent(0.5, 200.0, 0.1, 10.0, "tide table"),
        speed_limit=SpeedLimit(5.0, over_ground=False),
    )
    assert AnalysisRequest.from_json(json.loads(json.dumps(req.to_json()))) == req
    old = req.to_json()
    del old["current"], old["speed_limit"]  # a request saved before these existed
    assert AnalysisRequest.from_json(old).current is None


def test_analyze_and_report_carry_the_check(tmp_path, capsys):
    # demo truth (sample_scenes/harbour_approach_optical.truth.json): 14.0 kn through the water, heading ~62°
    argv = [
        "sample_scenes/harbour_approach_optical.tif",
        "--vessel",
        "-35,36",
        "--speed-limit",
        "12",
        "--current",
        "1.0,90,0.3,15",
        "--current-source",
        "Hallow Sound tide table",
    ]
    assert main(["analyze", *argv, "--json"]) == 0
    r = json.loads(capsys.readouterr().out)
    c = r["speed_check"]
    assert c["limit"]["limit_knots"] == pytest.approx(12.0) and c["probability_over_limit"] > 0.99
    assert c["over_ground"]["median_knots"] > r["speed_knots"]  # the current sets with the vessel's course
    assert r["request"]["current"]["source"] == "Hallow Sound tide table"
    assert main(["report", *argv, "--out", str(tmp_path)]) == 0
    (folder,) = tmp_path.iterdir()
    from pypdf import PdfReader

    text = " ".join(" ".join(p.extract_text() for p in PdfReader(str(next(folder.glob("*.pdf")))).pages).split())
    assert "Speed over ground (with the current)" in text and "probability of exceeding it" in text
    assert "Hallow Sound tide table" in text
    assert main(["analyze", *argv[:3], "--limit-through-water"]) == 2
    assert "--limit-through-water needs --speed-limit" in capsys.readouterr().err


def test_plain_image_with_a_given_pixel_size(tmp_path, capsys, plain_demo_scene):
    # the demo scene without its georeference (2.00 m pixels, north up; truth 7.20 m/s,
    # sample_scenes/harbour_approach_optical.truth.json) analysed headless with --pixel-size, as the program's
    # Calibrate tool allows
    src = "sample_scenes/harbour_approach_optical.tif"
    plain = plain_demo_scene
    truth = json.loads(open("sample_scenes/harbour_approach_optical.truth.json").read())["vessels"][0]
    px = f"{truth['pixel_col']:.0f},{truth['pixel_row']:.0f}"
    assert main(["analyze", str(plain), "--vessel-px", px]) == 2
    err = capsys.readouterr().err
    assert "no georeference" in err and "--pixel-size" in err  # the option that helps is named
    assert main(["analyze", str(plain), "--vessel-px", px, "--pixel-size", "2.0", "--north-up", "0", "--json"]) == 0
    r = json.loads(capsys.readouterr().out)
    lo, hi = r["speed_ci95_mps"]
    assert lo <= truth["speed_mps"] <= hi
    assert main(["analyze", str(plain), "--vessel-px", px, "--pixel-size", "2.0"]) == 0
    text = capsys.readouterr().out
    assert "no latitude" in text and "vessel's latitude" not in text  # a plain image has no latitude to name
    assert main(["analyze", src, "--vessel", "-35,36", "--pixel-size", "2"]) == 2
    assert "is georeferenced" in capsys.readouterr().err
    assert main(["report", str(plain), "--vessel-px", px, "--pixel-size", "2.0", "--out", str(tmp_path)]) == 0


def test_assumptions_do_not_deny_a_current_that_was_given(capsys):
    # with a current given, no assumption may say there is none; the georeferenced demo names its latitude
    # (program behaviour, no source)
    argv = ["analyze", "sample_scenes/harbour_approach_optical.tif", "--vessel", "-35,36"]
    assert main([*argv, "--current", "1.0,240", "--current-source", "Hallow Sound tide table"]) == 0
    text = capsys.readouterr().out
    assert "no current" not in text
    assert "vessel's latitude, 36.0" in text
