"""The wave path's stages one by one, on their typed inputs and outputs (look -> decision -> depth model ->
wake measures -> spread), on the demo scene of known truth (synthetic: sample_scenes, truth beside it) and on a
wake-free scene.  Check values: lambda_t = 2 pi U^2 / g (Lamb 1932, sec. 256); the knot 1852/3600 m/s (BIPM
SI Brochure, Table 8); WGS 84 normal gravity at the vessel's latitude (NIMA TR8350.2)."""

from __future__ import annotations

import json
from pathlib import Path

import numpy as np
import pytest

from wakemeter.detect.decision import Decision, decide
from wakemeter.detect.depth_model import DepthModel, choose_depth_model
from wakemeter.detect.look import Look, choose_look
from wakemeter.detect.spread import Spread, estimate_spread
from wakemeter.detect.tuning import DEFAULT_TUNING
from wakemeter.detect.wake_measures import WakeMeasures, measure_wake
from wakemeter.physics.gravity import normal_gravity
from wakemeter.scene.raster import open_scene
from wakemeter.synth.cases import make_case, synthetic_null, write_case

ROOT = Path(__file__).resolve().parents[1]
SCENE = ROOT / "sample_scenes" / "harbour_approach_optical.tif"
TRUTH = json.loads(SCENE.with_suffix(".truth.json").read_text())["vessels"][0]
T = DEFAULT_TUNING


@pytest.fixture(scope="module")
def stages():
    g = float(normal_gravity(TRUTH["lat"]))
    with open_scene(SCENE) as sc:
        px = (TRUTH["pixel_col"], TRUTH["pixel_row"])
        look = choose_look(sc, px, g=g, depth_m=np.inf, radar=None, snap=True, tuning=T)
        decision = decide(look, g=g, depth_given=False, tuning=T)
        model = choose_depth_model(look, decision, g=g, depth_m=None, tuning=T)
        measures = measure_wake(look, model, g=g, tuning=T)
        spread = estimate_spread(look, model, g=g, tuning=T)
    return g, look, decision, model, measures, spread


def test_look_reads_an_optical_chip_and_a_fit_near_the_truth(stages):
    _g, look, *_ = stages
    assert isinstance(look, Look) and not look.chip.radar and look.step == 1
    assert look.fit.speed_mps == pytest.approx(TRUTH["speed_mps"], rel=0.05)
    assert look.side_contrast >= T.side_contrast_min


def test_decision_calls_the_wake_above_its_thresholds(stages):
    _g, _look, decision, *_ = stages
    assert isinstance(decision, Decision) and decision.found and not decision.supercritical
    assert decision.significance >= T.significance_min


def test_depth_model_is_deep_water_at_the_true_speed(stages):
    _g, _look, _d, model, *_ = stages
    assert isinstance(model, DepthModel) and not model.fitted and not model.supercritical
    assert np.isinf(model.depth_m)
    assert model.speed_mps == pytest.approx(TRUTH["speed_mps"], rel=0.03)


def test_wake_measures_give_the_transverse_wavelength_of_the_dispersion_relation(stages, tmp_path):
    g, _look, _d, _model, measures, _s = stages
    assert isinstance(measures, WakeMeasures)
    # the demo launch's crests are faint in its foam (the analysis declines them at every click 4 px apart); if
    # read, they must be right
    if measures.transverse_wavelength_m is not None:
        assert measures.transverse_wavelength_m == pytest.approx(2 * np.pi * TRUTH["speed_mps"] ** 2 / g, rel=0.03)
    # synthetic case 6 (optical, 4.6 m pixels): crests far above the noise
    tif, sidecar = write_case(make_case(6), tmp_path)
    side = json.loads(sidecar.read_text())
    truth, g6 = side["vessels"][0], side["gravity_mps2"]
    with open_scene(tif) as sc:
        look = choose_look(
            sc, (truth["pixel_col"], truth["pixel_row"]), g=g6, depth_m=np.inf, radar=None, snap=True, tuning=T
        )
        model = choose_depth_model(look, decide(look, g=g6, depth_given=False, tuning=T), g=g6, depth_m=None, tuning=T)
        clear = measure_wake(look, model, g=g6, tuning=T)
    expected = 2 * np.pi * truth["speed_mps"] ** 2 / g6  # Lamb 1932, sec. 256
    assert clear.transverse_wavelength_m == pytest.approx(expected, rel=0.01)
    assert clear.transverse_wavelength_std_m is not None and clear.transverse_wavelength_std_m > 0
    assert abs(clear.transverse_wavelength_m - expected) <= 3 * max(clear.transverse_wavelength_std_m, 0.006 * expected)


def test_spread_gives_positive_uncertainties_that_cover_the_truth(stages):
    _g, _look, _d, model, _m, spread = stages
    assert isinstance(spread, Spread)
    assert spread.speed_std_mps > 0 and spread.heading_std_deg >= T.heading_std_floor_deg
    assert abs(model.speed_mps - TRUTH["speed_mps"]) <= 3 * spread.speed_std_mps + 0.01 * TRUTH["speed_mps"]


def test_a_wake_free_scene_is_not_called_at_the_decision_stage(tmp_path):
    tif = synthetic_null(301, tmp_path)  # optical noise and swell, no vessel (synthetic; seeds 300+ for tests)
    with open_scene(tif) as sc:
        look = choose_look(sc, (sc.width / 2, sc.height / 2), g=9.81, depth_m=np.inf, radar=None, snap=True, tuning=T)
        assert not decide(look, g=9.81, depth_given=False, tuning=T).found
