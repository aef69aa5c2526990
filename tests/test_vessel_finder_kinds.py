"""Every vessel once, on every kind of scene the finder meets: the bundled demo scenes (single-band optical at
2 m and radar at 5 m), single-band fleets at fine pixels, and the rules that make one candidate of a vessel
with its wake.  All scenes here are synthetic (wakemeter.synth; the truth is in their truth files);
benchmarks/vessel_finder_sweep.py measures the same at 0.5, 2, 5 and 10 m, optical and radar."""

import json
from pathlib import Path

import numpy as np
import pytest

from wakemeter.detect.analysis import AnalysisRequest, analyze
from wakemeter.detect.hull_centre import opened
from wakemeter.detect.vessel_finder import VesselCandidate, find_vessels, one_per_vessel
from wakemeter.scene.raster import open_scene
from wakemeter.synth import write
from wakemeter.synth.fleet import fleet_spec
from wakemeter.synth.imaging import OpticalModel
from wakemeter.synth.scene_maker import render

ROOT = Path(__file__).resolve().parents[1]
DEMO = ROOT / "sample_scenes"


def _nearest(cands, col, row):
    return min((float(np.hypot(c.px[0] - col, c.px[1] - row)), c) for c in cands)


@pytest.mark.parametrize(
    "name",
    ["channel_two_vessels", "harbour_approach_optical", "tallow_shoal_shallow", "outer_roads_radar", "calm_no_wake"],
)
def test_each_demo_vessel_is_found_once_and_analysed_right(name):
    # Synthetic truth (the demo's truth file).  Before: the channel scene gave 14 candidates, all on the pilot
    # boat and its wake, and missed the coaster; the harbour and shoal scenes gave none; the radar ferry two.
    tif = DEMO / f"{name}.tif"
    truth = json.loads(tif.with_suffix(".truth.json").read_text())
    with open_scene(tif) as sc:
        cands = find_vessels(sc)
        assert len(cands) == len(truth["vessels"]), [c.px for c in cands]
        for v in truth["vessels"]:
            # at the imaged hull (radar shows it displaced) or the true position, within half the hull's length
            reach = 0.5 * v["hull_length_m"] / truth["pixel_m"]
            d = min(
                _nearest(cands, v["pixel_col"], v["pixel_row"])[0],
                _nearest(cands, v["hull_pixel_col"], v["hull_pixel_row"])[0],
            )
            assert d <= reach, (v["name"], d, reach)
            c = min(cands, key=lambda c: np.hypot(c.px[0] - v["pixel_col"], c.px[1] - v["pixel_row"]))
            a = analyze(sc, AnalysisRequest(vessel_px=c.px))
            assert a.speed is not None, v["name"]
            assert a.speed.ci95_low_mps <= v["speed_mps"] <= a.speed.ci95_high_mps, (v["name"], a.speed)


def _fleet(path, n, pixel_m, spacing_m, length_m):
    """A single-band optical fleet of the finder sweep (seed 0) seen through a sensor's blur: its truth and the
    finder's candidates."""
    spec = fleet_spec(
        n,
        seed=0,
        size=1024,
        pixel_m=pixel_m,
        spacing_m=spacing_m,
        length_m=length_m,
        imaging=OpticalModel(psf_sigma_px=0.57),
    )
    tif, _ = write(render(spec), path)
    with open_scene(tif) as sc:
        return json.loads(tif.with_suffix(".truth.json").read_text())["vessels"], find_vessels(sc)


def test_small_boats_at_half_a_metre_are_found_once(tmp_path):
    # Synthetic truth: three boats of 7-18 m at 4-8 kn in a 512 m square at 0.5 m pixels, seen through a
    # sensor's blur.  Before: none found (the windows reached beyond the scene, the wakes set the threshold).
    truth, cands = _fleet(tmp_path / "boats.tif", 3, 0.5, 150.0, (6.0, 30.0))
    found = [v for v in truth if _nearest(cands, v["pixel_col"], v["pixel_row"])[0] <= v["hull_length_m"]]
    assert len(found) >= 2  # the sweep finds 8 of 9 in three such scenes
    assert len(cands) <= len(truth)  # never a boat twice, nothing on the wakes
    assert len({_nearest(cands, v["pixel_col"], v["pixel_row"])[1].px for v in found}) == len(found)


def test_small_hulls_at_five_metres_are_centred_though_pixelated(tmp_path):
    # Synthetic truth: the 5 m fleet of benchmarks/vessel_finder_sweep.py, seed 0.  Its first boat (44 m, heading
    # 308 degrees) is a 9 x 2 px diagonal outline whose solidity is 0.67-0.75 at every share tried: pixelation,
    # not a crest (tuning.finder_refine_solidity_small).  Before: left at the peak on its stern, 4.1 px off.
    truth, cands = _fleet(tmp_path / "fleet.tif", 5, 5.0, 1000.0, (15.0, 80.0))
    first = truth[0]
    assert _nearest(cands, first["pixel_col"], first["pixel_row"])[0] <= 2.0
    # and the whole fleet: each boat once, none off by more than half its hull
    near = [_nearest(cands, v["pixel_col"], v["pixel_row"]) for v in truth]
    assert all(d <= 0.5 * v["hull_length_m"] / 5.0 for (d, _), v in zip(near, truth))


def _cand(col, row, score, length_m=20.0):
    return VesselCandidate((col, row), None, length_m, 5.0, 0.0, score, 1e-9, 4)


def test_one_per_vessel_folds_what_cannot_be_a_second_vessel():
    t_near = _cand(100.0, 100.0, 20.0)
    faint = _cand(100.0, 112.0, 3.0)  # 120 m away at 10 m pixels and far fainter: a part of the first
    overlap = _cand(101.0, 101.0, 19.0)  # within its hull length: the same vessel
    other = _cand(100.0, 150.0, 18.0)  # 500 m away and as bright: a vessel of its own
    distant_faint = _cand(160.0, 100.0, 3.0)  # 600 m away: a small boat of its own, however faint
    kept = one_per_vessel([faint, t_near, overlap, other, distant_faint], 10.0)
    assert [c.px for c in kept] == [(100.0, 100.0), (100.0, 150.0), (160.0, 100.0)]
    assert kept[0].merged == 2 and kept[1].merged == 0
    # two resolved hulls (both at least 4 px long) side by side are two vessels
    a, b = _cand(100.0, 100.0, 20.0, 60.0), _cand(103.0, 100.0, 19.0, 60.0)
    assert len(one_per_vessel([a, b], 10.0)) == 2


def test_the_solid_part_keeps_a_hull_where_it_is_and_drops_thin_crests():
    # a grey opening removes what is narrower than its square and keeps the rest in place (Serra 1982)
    img = np.zeros((40, 40), np.float32)
    img[10:14, 5:15] = 1.0  # a hull 4 px wide
    img[25, :] = 1.0  # a crest 1 px wide
    for k in (2, 3, 4):
        out = opened(img, k)
        assert np.array_equal(out[10:14, 5:15], img[10:14, 5:15]), k
        assert out[25].max() == 0.0 and out.sum() == img[10:14, 5:15].sum(), k


@pytest.mark.parametrize("kind", ["intensity", "amplitude", "dB"])
def test_the_radar_demo_as_intensity_amplitude_or_db_gives_its_ferry_once(kind, tmp_path):
    # Synthetic truth (outer_roads_radar.truth.json): the same scene written as radar products deliver it
    import rasterio

    src = DEMO / "outer_roads_radar.tif"
    truth = json.loads(src.with_suffix(".truth.json").read_text())["vessels"][0]
    with rasterio.open(src) as s:
        prof, a = s.profile, s.read(1).astype(np.float64)
    as_kind = {"intensity": a, "amplitude": np.sqrt(a), "dB": 10 * np.log10(np.maximum(a, 1e-6))}[kind]
    with rasterio.open(tmp_path / "r.tif", "w", **prof) as o:
        o.write(as_kind.astype(np.float32), 1)
    with open_scene(tmp_path / "r.tif") as sc:
        cands = find_vessels(sc)
    assert len(cands) == 1
    reach = 0.5 * truth["hull_length_m"] / 5.0  # 5 m pixels
    assert np.hypot(cands[0].px[0] - truth["hull_pixel_col"], cands[0].px[1] - truth["hull_pixel_row"]) <= reach


def test_the_sparse_mask_path_gives_the_very_masks_of_the_window_pass(monkeypatch):
    # open sea: the dry and bright masks hold a few hulls, worked on pixel by pixel; the result must be the mask
    # a pass over the whole window gives (the share is a speed switch only)
    from wakemeter.detect import vessel_finder as vf
    from wakemeter.detect.tuning import DEFAULT_TUNING

    rng = np.random.default_rng(5)
    z = rng.normal(0.0, 1.0, (400, 500)).astype(np.float32)
    for r, c in rng.integers(5, 395, (12, 2)):
        z[r : r + 3, c : c + 8] += 9.0  # hulls
    z[:, :4] += 9.0  # a bright strip along the edge (a quay)
    water = np.ones(z.shape, bool)
    dry = z > 6.0
    sparse = (vf._islands(dry, 10.0, DEFAULT_TUNING), vf._wake_objects(z, water, 6.0, 10.0, DEFAULT_TUNING))
    assert vf._few_pixels(dry) is not None and sparse[0].any() and sparse[1].any()
    monkeypatch.setattr(vf, "_FEW_PIXELS_SHARE", -1.0)
    assert vf._few_pixels(dry) is None
    dense = (vf._islands(dry, 10.0, DEFAULT_TUNING), vf._wake_objects(z, water, 6.0, 10.0, DEFAULT_TUNING))
    assert np.array_equal(sparse[0], dense[0]) and np.array_equal(sparse[1], dense[1])


def test_a_scene_with_nan_nodata_still_gives_its_vessel(tmp_path):
    # a float scene whose nodata is NaN (a strip outside the swath): the sea's statistics must not turn NaN
    # (a first version of a speed change multiplied the pixels by their validity: NaN times 0 stayed NaN and the
    # window found nothing)
    from rasterio.transform import from_origin
    from test_scene import _write

    rng = np.random.default_rng(2)
    a = rng.normal(100.0, 5.0, (600, 600)).astype(np.float32)
    a[:, :120] = np.nan
    a[300:303, 400:412] = 400.0  # a hull 12 x 3 px at 10 m
    _write(tmp_path / "nan.tif", a, crs="EPSG:32633", transform=from_origin(500_000, 4_800_000, 10, 10), nodata=np.nan)
    with open_scene(tmp_path / "nan.tif") as sc:
        cands = find_vessels(sc)
    assert len(cands) == 1, [c.px for c in cands]
    assert np.hypot(cands[0].px[0] - 406.0, cands[0].px[1] - 301.5) <= 1.5, cands[0].px
