"""Two analysed rows that are one vessel (detect.same_vessel), on results of the demo scenes (synthetic truth)."""

from dataclasses import replace
from pathlib import Path

import pytest

from wakemeter.detect.analysis import AnalysisRequest, analyze
from wakemeter.detect.same_vessel import same_as
from wakemeter.detect.tuning import DEFAULT_TUNING

SAME_PLACE_M, SAME_WAKE_M = DEFAULT_TUNING.same_place_m, DEFAULT_TUNING.same_wake_m
from wakemeter.scene.raster import open_scene

ROOT = Path(__file__).resolve().parents[1]


@pytest.fixture(scope="module")
def channel():
    # the pilot boat (743, 186) and the coaster (294, 834) of the channel demo, each analysed from its hull
    with open_scene(ROOT / "sample_scenes" / "channel_two_vessels.tif") as sc:
        pilot = analyze(sc, AnalysisRequest(vessel_px=(743.0, 186.4)))
        coaster = analyze(sc, AnalysisRequest(vessel_px=(293.8, 834.5)))
    assert pilot.speed is not None and coaster.speed is not None
    return pilot, coaster


def test_same_place_is_one_vessel_and_the_named_row_is_kept(channel):
    pilot, coaster = channel
    moved = replace(pilot, vessel_px=(pilot.vessel_px[0] + 5.0, pilot.vessel_px[1]))  # 10 m away at 2 m pixels
    assert 5.0 * pilot.pixel_m < SAME_PLACE_M
    rows = [("found 1", moved, True), ("Merrow Pilot 2", pilot, False), ("found 2", coaster, True)]
    assert same_as(rows) == {0: 1}
    # named rows are never folded, even into each other
    assert same_as([("A", pilot, False), ("B", moved, False)]) == {}


def test_one_wake_seen_from_two_points_is_one_vessel_but_two_wakes_are_two(channel):
    pilot, coaster = channel
    # 100 m along the pilot boat's track (beyond the same place, within SAME_WAKE_M): the same wake measured
    far = replace(pilot, vessel_px=(pilot.vessel_px[0] - 50.0, pilot.vessel_px[1]))
    assert SAME_PLACE_M < 50.0 * pilot.pixel_m < SAME_WAKE_M
    assert same_as([("found 1", pilot, True), ("found 2", far, True)]) == {1: 0}
    # a different heading (the coaster's) at the same distance: two vessels
    other = replace(coaster, vessel_px=far.vessel_px)
    assert same_as([("found 1", pilot, True), ("found 2", other, True)]) == {}
    # beyond SAME_WAKE_M: two vessels, however alike
    beyond = replace(pilot, vessel_px=(pilot.vessel_px[0] - 200.0, pilot.vessel_px[1]))
    assert same_as([("found 1", pilot, True), ("found 2", beyond, True)]) == {}
