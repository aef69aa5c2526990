"""The typed analysis request and result, the tuning, the speed-method protocol and the Qt-free project model.

Check values: the demo scene's synthetic truth (harbour_approach_optical.truth.json: 7.202 m/s); the rest
are self-consistency checks (a value written and read back must be the same value).
"""

import json
from dataclasses import replace
from pathlib import Path

import numpy as np
import pytest

from wakemeter.detect import methods as methods_mod
from wakemeter.detect.analysis import AnalysisRequest, RadarGeometry, analyze
from wakemeter.detect.findings import CautionCode, SegmentKind
from wakemeter.detect.methods.base import MethodOutput
from wakemeter.detect.result import WakeAnalysis
from wakemeter.detect.tuning import DEFAULT_TUNING
from wakemeter.errors import ParameterError
from wakemeter.physics import inversion as inv
from wakemeter.project import Measurement, Project, Vessel
from wakemeter.project import session as session_mod
from wakemeter.scene.raster import open_scene

ROOT = Path(__file__).resolve().parents[1]
SCENE = ROOT / "sample_scenes" / "harbour_approach_optical.tif"
TRUTH = json.loads((ROOT / "sample_scenes" / "harbour_approach_optical.truth.json").read_text())["vessels"][0]
POS = (TRUTH["pixel_col"], TRUTH["pixel_row"])


@pytest.fixture(scope="module")
def demo():
    with open_scene(SCENE) as sc:
        yield sc, analyze(sc, AnalysisRequest(vessel_px=POS))


def test_request_round_trip_and_checks():
    req = AnalysisRequest(
        vessel_lonlat=(-35.0, 36.0),
        depth=inv.Uncertain(12.0, 1.5),
        hull_length_m=30.0,
        radar_geometry=RadarGeometry(850_000.0, 7_500.0, 100.0, 33.0, slant_range_std_m=500.0),
        seed=7,
    )
    assert AnalysisRequest.from_json(json.loads(json.dumps(req.to_json()))) == req
    with pytest.raises(ParameterError, match="slant range must be > 0"):
        RadarGeometry(0, 0, 0, 0)
    with pytest.raises(ParameterError, match="incidence angle must be between 0 and 90"):
        RadarGeometry(850_000.0, 7_500.0, 100.0, 95.0)
    with pytest.raises(ParameterError, match="position once"):
        AnalysisRequest(vessel_px=(1, 2), vessel_lonlat=(3, 4))
    with pytest.raises(ParameterError, match="water depth must be > 0"):
        AnalysisRequest(vessel_px=(1, 2), depth=inv.Uncertain(0.0, 0.0))
    with pytest.raises(ParameterError, match="not on Earth"):
        AnalysisRequest(vessel_lonlat=(10.0, 95.0))
    with pytest.raises(ParameterError, match="pixel position"):
        AnalysisRequest.from_json({"vessel_px": {"a": 1}})
    with pytest.raises(ParameterError, match="whole number"):
        AnalysisRequest(vessel_px=(1, 2), seed=-1)
    # the older per-vessel inputs of a schema-1 session
    old = AnalysisRequest.from_inputs((5.0, 6.0), {"depth_m": 9.0, "radar_geometry": [850_000.0, 7_500.0, 100.0, 33.0]})
    assert old.depth == inv.Uncertain(9.0, 0.0) and old.radar_geometry.incidence_deg == 33.0


def test_result_echoes_its_request_and_reads_back(demo):
    _sc, a = demo
    j = a.to_json()
    assert j["request"] == a.request.to_json() and j["software"].startswith("wakemeter ")
    b = WakeAnalysis.from_json(json.loads(json.dumps(j)))
    assert b == a  # every compared field, including the combination and the regime (an enum)
    assert b.drawing == a.drawing and b.diagnostics == a.diagnostics and b.interval_cover == a.interval_cover
    assert b.plots is None and a.plots is not None
    assert b.regime.regime is inv.Regime.DEEP
    assert a.caution_codes()[0] is CautionCode.ESTIMATE and a.has_caution(CautionCode.THROUGH_WATER)
    with pytest.raises(ParameterError, match="damaged or incomplete"):
        WakeAnalysis.from_json({"wake_found": True})


def test_tuning_is_an_argument_not_a_global(demo):
    sc, a = demo
    strict = DEFAULT_TUNING.with_overrides(["significance_min=1000", "line_significance_min=1000"])
    assert strict.significance_min == 1000.0 and DEFAULT_TUNING.significance_min == 7.0
    assert strict.changed_fields() == {"significance_min": 1000.0, "line_significance_min": 1000.0}
    assert not analyze(sc, AnalysisRequest(vessel_px=POS), strict).wake_found
    assert a.wake_found  # the default was not touched
    with pytest.raises(ParameterError, match="unknown tuning"):
        DEFAULT_TUNING.with_overrides(["no_such_threshold=1"])
    with pytest.raises(ParameterError, match="needs a number"):
        DEFAULT_TUNING.with_overrides(["significance_min=high"])


def test_a_new_speed_method_is_one_class_and_one_line(demo):
    # a method following the protocol joins the combination, its cautions and its drawing the result; it is
    # passed to analyze, no module is patched (self-consistency)
    sc, a = demo

    class Constant:
        name = "constant"
        reads_depth = False

        def estimate(self, ctx):
            if ctx.waves is None:
                return MethodOutput()
            u = inv.Uncertain(ctx.waves.model.speed_mps, 0.5)
            est = inv.speed_from_spectral_fit(u, ctx.conditions, seed=ctx.rng)
            return MethodOutput((replace(est, method="constant"),))

    b = analyze(sc, AnalysisRequest(vessel_px=POS), methods=(*methods_mod.SPEED_METHODS, Constant()))
    assert [m.method for m in b.methods][-1] == "constant"
    assert "constant" in b.speed.methods and len(b.methods) == len(a.methods) + 1


def test_project_applies_hand_corrections_without_qt(demo):
    sc, a = demo
    p = Project()
    p.scene = sc
    p.put(Vessel(1, "Saltmarsh Wren", POS))
    p.findings[1] = a
    eff = p.effective_finding(1)
    assert eff.speed == a.speed and eff.drawing.first(SegmentKind.CREST) is not None  # crest lines added
    # a hand-drawn arm wider than Kelvin's changes the regime (Havelock 1908), as in the program
    track = Measurement(2, "track", (POS, (POS[0] - 200.0, POS[1] + 100.0)), 1)
    p.put(track)
    assert "heading_deg" in p.measurements[2].values
    hand = p.hand_corrections(1)
    assert hand.crest is None and hand.half_angle is None
    p.put(Measurement(3, "crest", ((POS[0] - 60.0, POS[1] + 30.0), (POS[0] - 260.0, POS[1] + 130.0)), 1))
    hand = p.hand_corrections(1)
    assert hand.crest is not None
    eff = p.effective_finding(1)
    assert eff.revised and eff.has_caution(CautionCode.HAND_CREST) and any(m.by_hand for m in eff.methods)


def test_session_round_trip_and_older_sessions(demo, tmp_path):
    sc, a = demo
    p = Project()
    p.scene = sc
    p.put(Vessel(1, "Saltmarsh Wren", POS))
    p.requests[1] = AnalysisRequest(vessel_px=POS, depth=inv.Uncertain(40.0, 4.0), seed=3)
    p.findings[1] = a
    path = session_mod.save(tmp_path / "s.json", session_mod.to_session(p))
    data = session_mod.load(path)
    q = Project()
    q.scene = sc
    session_mod.fill_project(q, data)
    assert q.requests[1] == p.requests[1] and q.vessels[1] == p.vessels[1]
    assert q.findings[1] == p.effective_finding(1)
    # schema 1: 'inputs' and a separate 'geometry' dict
    old = dict(data, schema="wakemeter.session/1", inputs={"1": {"depth_m": 40.0, "hull_length_m": None}})
    old.pop("requests")
    res = dict(old["findings"]["1"]["result"])
    geometry = {"track": [list(x) for x in a.drawing.first(SegmentKind.TRACK).points]}
    res.pop("drawing")
    res["cautions"] = [c["text"] for c in res["cautions"]]
    old["findings"] = {"1": {"result": res, "geometry": geometry, "rejected": False}}
    r = Project()
    r.scene = sc
    session_mod.fill_project(r, old)
    assert r.requests[1].depth == inv.Uncertain(40.0, 0.0)
    assert r.findings[1].drawing.first(SegmentKind.TRACK) == a.drawing.first(SegmentKind.TRACK)
    assert r.findings[1].caution_codes()[0] is CautionCode.ESTIMATE
    # a damaged field: one clear error, not a traceback
    bad = json.loads(json.dumps(data))
    bad["vessels"][0]["position_px"] = {"a": 1}
    with pytest.raises(session_mod.SessionError, match="damaged"):
        session_mod.fill_project(Project(), bad)


def test_hand_uncertainty_follows_the_zoom_and_arms_use_the_analysed_track(demo):
    # Placement: a point is uncertain by about 2 screen pixels (common practice, no source), so a 300-px track
    # drawn at zoom 0.5 is uncertain by sqrt(2) * 4 / 300 rad = 1.1 deg, not the 0.1 deg of a full-zoom point.
    from wakemeter.detect import handmeasure as hm

    sc, a = demo
    assert hm.placement_px(0.5) == pytest.approx(4.0) and hm.placement_px(8.0) == hm.PLACEMENT_PX
    far = (POS[0] - 268.0, POS[1] + 134.0)  # about 300 px back along the wake
    coarse = hm.track_heading(sc, POS, far, placement=hm.placement_px(0.5))
    fine = hm.track_heading(sc, POS, far)
    assert coarse.bearing_std_deg == pytest.approx(np.degrees(np.sqrt(2) * 4.0 / np.hypot(268.0, 134.0)), rel=1e-6)
    assert coarse.bearing_std_deg > 5 * fine.bearing_std_deg
    # an arm with no hand track is measured against the track the analysis found (with its heading uncertainty)
    p = Project()
    p.scene = sc
    p.put(Vessel(1, "Saltmarsh Wren", POS))
    p.findings[1] = a
    p.put(Measurement(2, "arm", (POS, (POS[0] - 250.0, POS[1] + 40.0)), 1))
    arm = p.measurements[2]
    assert not arm.error and "to the analysed track" in arm.text
    assert arm.values["half_angle_std_deg"] >= a.heading_std_deg
