"""Real Sentinel-2 scenes: wakes seen as lines with a heading, speed over ground from the hull's shift
between bands, clean sea quiet; and the Sentinel-2-like scene maker with known truth.

The real crops are in tests/data/sentinel2 (MIT licence, see its README for the source and for how the
reference headings were read by eye).
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest
import rasterio
from pyproj import Geod, Transformer
from scipy import integrate

from wakemeter.cli import main
from wakemeter.detect.analysis import AnalysisRequest, analyze
from wakemeter.detect.findings import CautionCode, LineKind
from wakemeter.scene.raster import open_scene
from wakemeter.scene.sensor import SENTINEL2_BAND_TIME_S, band_timing
from wakemeter.synth import Hull, VesselSpec, render, write
from wakemeter.synth.demo import vessel_scene
from wakemeter.synth.multispectral import (
    BANDS,
    MultispectralLook,
    _mtf_sigma_px,
    jonswap_slopes,
    render_multispectral,
    sensor_blur,
)

DATA = Path(__file__).parent / "data" / "sentinel2"
GEOD = Geod(ellps="WGS84")

#: (file, ship pixel, wake points) read by eye (tests/data/sentinel2/README.md)
CROPS = [
    ("marseille_00_S2L2A_2023-08-22_wake.tif", (120, 120), [(100, 80)]),
    ("marseille_01_S2L2A_2023-08-22_wake.tif", (120, 113), [(111, 160)]),
    ("marseille_03_S2L2A_2023-08-22_wake.tif", (118, 122), [(140, 108), (180, 94)]),
]
EYE_READING_DEG = 5.0
SEA = sorted(DATA.glob("*_sea.tif"))


def _bearing(path: Path, frm: tuple[float, float], to: tuple[float, float]) -> float:
    """True bearing from pixel ``frm`` to pixel ``to`` (pixel centres), by pyproj's geodesic."""
    with rasterio.open(path) as ds:
        tr = Transformer.from_crs(ds.crs, "EPSG:4326", always_xy=True)
        (x0, y0), (x1, y1) = (ds.xy(r, c) for c, r in (frm, to))
        lon0, lat0 = tr.transform(x0, y0)
        lon1, lat1 = tr.transform(x1, y1)
    az, _, _ = GEOD.inv(lon0, lat0, lon1, lat1)
    return az % 360.0


def _angle_diff(a: float, b: float) -> float:
    return abs((a - b + 180.0) % 360.0 - 180.0)


@pytest.mark.parametrize("name, ship, wake_points", CROPS)
def test_real_wake_found_with_the_heading_read_by_eye(name, ship, wake_points):
    path = DATA / name
    eye = [_bearing(path, p, ship) for p in wake_points]  # from the wake towards the ship: the heading
    with open_scene(path) as sc:
        a = analyze(sc, AnalysisRequest(vessel_px=(float(ship[0]), float(ship[1]))))
    assert a.wake_found, a.decision
    assert a.heading_deg is not None and a.heading_std_deg is not None
    allow = EYE_READING_DEG + 2 * a.heading_std_deg
    lo, hi = min(eye), max(eye)
    off = 0.0 if lo <= a.heading_deg <= hi else min(_angle_diff(a.heading_deg, lo), _angle_diff(a.heading_deg, hi))
    assert off <= allow, (a.heading_deg, eye, a.heading_std_deg)
    assert any(ln.kind == LineKind.TURBULENT_BRIGHT for ln in a.lines)
    assert a.has_caution(CautionCode.LINES_ONLY)  # no crests at 7 m pixels: said why
    # the hull's shift between B02 and B04 (published 1.005 s apart) gives a speed over ground, and its
    # direction is an independent check of the band order: it must follow the wake seen by eye
    assert a.speed is not None and a.has_caution(CautionCode.OVER_GROUND)
    assert a.methods[0].method.startswith("hull shift between bands")
    assert 0 < a.speed.ci95_low_mps < a.speed.speed_mps < a.speed.ci95_high_mps
    text = next(c.text for c in a.cautions if c.code == CautionCode.OVER_GROUND)
    course = float(text.split("Course over ground ")[1].split("\N{DEGREE SIGN}")[0])
    assert min(_angle_diff(course, e) for e in eye) <= 30.0


@pytest.mark.parametrize("click", [(200.0, 200.0), (200.5, 200.5), (199.5, 199.5), (201.0, 201.0), (200.0, 193.0)])
def test_real_wake_with_room_for_the_spectrum_keeps_its_heading(click):
    # the whole 400 px crop of marseille_01 (tests/data/sentinel2/README.md; ship near (200, 193), the data set's
    # ship pixel (200, 200), wake point (191, 240) read by eye): here the wave spectrum's box fits, and a marginal
    # wave fit (significance 7.3, needs 7) read the wake on the wrong side: heading 214 deg and 47 kn for 4 of
    # 6 clicks within 2 px of the ship. The hull's shift between bands says which way it moves: the fit must
    # give way to it, whatever pixel of the hull is clicked.
    path = DATA / "marseille_01_S2L2A_2023-08-22_wake_whole.tif"
    eye = _bearing(path, (191, 240), (200, 193))
    with open_scene(path) as sc:
        a = analyze(sc, AnalysisRequest(vessel_px=click))
    assert a.wake_found and a.heading_deg is not None and a.heading_std_deg is not None
    assert _angle_diff(a.heading_deg, eye) <= EYE_READING_DEG + 2 * a.heading_std_deg, (a.heading_deg, eye)
    assert a.methods[0].method.startswith("hull shift between bands")


#: vessels of two other ports seen as one bright streak (hull and foam) over hazy, glinting water: (file, vessel
#: pixel, heading by eye, deg); the headings are the shared data's own, read by eye from true colour to +/-15 deg
#: (tests/data/sentinel2/README.md).  Before the streak reading: "no line starts at the vessel" on both
STREAKS = [
    ("cartagena_02_S2L2A_2023-07-30_streak.tif", (120.5, 120.5), 165.0),
    ("klang_02_S2L2A_2023-04-08_streak.tif", (116.5, 120.5), 110.0),
]
#: two ships on open water without a trail (labelled by eye), brighter at one end: (col, row)
HULLS_WITHOUT_WAKE = [(135.0, 185.0), (115.5, 120.0)]


@pytest.mark.parametrize("name, ship, eye", STREAKS)
def test_real_foam_streak_at_another_port_is_a_wake_with_its_heading(name, ship, eye):
    with open_scene(DATA / name) as sc:
        a = analyze(sc, AnalysisRequest(vessel_px=ship))
    assert a.wake_found, a.decision
    assert a.heading_deg is not None and a.heading_std_deg is not None
    assert _angle_diff(a.heading_deg, eye) <= 15.0  # the eye reading's own tolerance
    assert _angle_diff(a.heading_deg, eye) <= 2 * a.heading_std_deg + EYE_READING_DEG
    assert a.has_caution(CautionCode.STREAK)


@pytest.mark.parametrize("name, ship, eye", STREAKS)
def test_real_foam_streak_clicked_anywhere_along_it_keeps_its_direction(name, ship, eye):
    # a user clicks the streak, not always its head: 8 and 4 px behind it (on the foam) and 2 px ahead give the
    # same heading or no wake, never the reverse (on all 7 streaks found among the shared crops: 0 reversed)
    h = np.radians(eye)
    found = 0
    with open_scene(DATA / name) as sc:
        for d in (-8.0, -4.0, 2.0):
            a = analyze(sc, AnalysisRequest(vessel_px=(ship[0] + d * np.sin(h), ship[1] - d * np.cos(h))))
            if a.wake_found:
                found += 1
                assert a.heading_deg is not None and a.heading_std_deg is not None
                assert _angle_diff(a.heading_deg, eye) <= 2 * a.heading_std_deg + EYE_READING_DEG, (d, a.heading_deg)
    assert found >= 2  # most clicks on the streak find it


@pytest.mark.parametrize("ship", HULLS_WITHOUT_WAKE)
def test_real_ship_brighter_at_one_end_is_not_a_foam_streak(ship):
    # each is a compact streak brighter at one end, as a hull and its foam are; its far end is as bright in the
    # near infrared as in the visible (share about 1.9), which foam never is (Moore et al. 1998; Dierssen 2019).
    # Without that test both were read as wakes heading 260-268 deg, one with a speed
    with open_scene(DATA / "gdynia_r430_c980_S2L2A_hulls.tif") as sc:
        a = analyze(sc, AnalysisRequest(vessel_px=ship))
    assert not a.wake_found and a.speed is None
    assert "near infrared" in a.decision


@pytest.mark.parametrize("click", [(121.6, 193.5), (120.6, 56.6), (121.6, 130.0)])
def test_real_pier_clicked_is_not_a_vessel_with_a_wake(click):
    # a pier about 1.9 km long and one or two pixels wide at Gdynia (tests/data/sentinel2/README.md): the water
    # index does not mask it (NDWI 0.0-0.1, mixed with the water), so a click on it found a "hull" and a bright
    # line along the pier from it: a wake heading 180 deg at the first click (and, on the whole port scene, at
    # every finder candidate on the pier, one with a speed)
    with open_scene(DATA / "gdynia_r570_c790_S2L2A_pier.tif") as sc:
        a = analyze(sc, AnalysisRequest(vessel_px=click))
    assert not a.wake_found and a.speed is None, a.decision
    if click == (121.6, 193.5):
        assert "longer than any vessel" in a.decision


def test_real_bow_with_coloured_fringes_gives_no_speed_from_the_shift_between_bands():
    # a small craft with a bright trail off Marseille (tests/data/sentinel2/README.md): its leading edge moves
    # 3.7 px from B02 to B04, which read as 52 kn (46-58), but in B08, recorded between them (Heiselberg 2019,
    # the band timing; from memory), it does not move at all (-0.3 px): the shift is not the hull's motion.  The
    # wake is still reported, without a speed, and the caution says why
    with open_scene(DATA / "marseille_r730_c62_S2L2A_colour_edge.tif") as sc:
        a = analyze(sc, AnalysisRequest(vessel_px=(120.5, 119.6)))
    assert a.wake_found and a.speed is None
    why = [c for c in a.cautions if c.code == CautionCode.SHIFT_NOT_MOTION]
    assert why and "band B08" in why[0].text


@pytest.mark.parametrize(
    ("name", "click"),
    [
        ("marseille_r1096_c652_S2L2A_shallows.tif", (179.8, 255.1)),
        ("marseille_r1096_c652_S2L2A_shallows.tif", (152.7, 351.1)),
        ("gdynia_r256_c1024_S2L2A_plume.tif", (82.0, 207.0)),
    ],
)
def test_real_bright_line_over_shallow_water_or_a_plume_is_not_a_foam_wake(name, click):
    # two rocks beside islets off Marseille where the vessel finder put candidates, whose bright line runs over
    # shallow turquoise water, and a bright patch in a pale plume at Gdynia (tests/data/sentinel2/README.md; read
    # by eye: no vessel with a trail): each was a "bright foam line" wake (significance 12.5-17.9). Their lines'
    # excess over the water is green (1.30-1.53 times the blue) or blue-green (red 0.09 of the blue), where foam
    # is about white (foam_colour.py; foam lines on the shared data 0.79-1.08 and 0.52-0.96)
    with open_scene(DATA / name) as sc:
        a = analyze(sc, AnalysisRequest(vessel_px=click))
    assert not a.wake_found and a.speed is None
    assert "not white in the visible" in a.decision


def test_real_rocky_islet_clicked_gives_no_foam_wake():
    # a white limestone islet off Marseille, about 100 m long (tests/data/sentinel2/README.md), where the vessel
    # finder put a candidate: a bright line ran from it and was read as a wake heading 8 deg; that line is as
    # bright in the near infrared as in the visible (share 1.3), which foam never is (foam_colour.py)
    with open_scene(DATA / "marseille_r1216_c690_S2L2A_islets.tif") as sc:
        a = analyze(sc, AnalysisRequest(vessel_px=(120.3, 204.8)))
    assert not a.wake_found and a.speed is None
    assert "not foam" in a.decision


@pytest.mark.parametrize("path", SEA, ids=[p.name for p in SEA])
def test_real_sea_tiles_stay_quiet(path):
    """Clean sea (seam, slicks, sediment, swell, an old straight line): no wake at the centre nor at the three
    brightest specks (where a user might click on a small bright thing)."""
    from scipy import ndimage

    with open_scene(path) as sc:
        data, _ = sc.read()
        z = np.mean([(b - np.median(b)) / (1.4826 * np.median(np.abs(b - np.median(b))) + 1e-9) for b in data], axis=0)
        sm = ndimage.gaussian_filter(z, 1.0)
        peaks = (sm == ndimage.maximum_filter(sm, 9)) & (sm > 6)
        pr, pc = np.nonzero(peaks)
        order = np.argsort(-sm[pr, pc])[:3]
        points = [(128.0, 128.0)] + [(float(pc[k]), float(pr[k])) for k in order]
        for p in points:
            a = analyze(sc, AnalysisRequest(vessel_px=p))
            assert not a.wake_found, (p, a.decision)
            assert a.speed is None


def test_cli_analyze_real_crop_as_the_readme_writes_it(capsys):
    assert main(["analyze", str(DATA / CROPS[0][0]), "--vessel-px", "120,120"]) == 0
    out = capsys.readouterr().out
    assert "Speed over ground" in out
    assert "hull shift between bands" in out
    assert "no Kelvin crests are seen here" in out


def test_sentinel2_timing_is_the_published_one():
    # Markuse 2017 (MSI band timing): B04 is recorded 1.005 s after B02
    assert SENTINEL2_BAND_TIME_S["B04"] - SENTINEL2_BAND_TIME_S["B02"] == pytest.approx(1.005)
    t = band_timing(("B02", "B03", "B04", "B08"), "x_S2L2A_y.tif")
    assert t is not None and (t.first_band, t.last_band) == (1, 3)
    # band names alone are not enough (other sensors use them), nor is a name without the two bands
    assert band_timing(("B02", "B03", "B04", "B08"), "scene.tif") is None
    assert band_timing(("B02", "B03"), "S2.tif") is None
    assert band_timing(("B2", "B3", "B4", "B8"), "a.tif", {"SPACECRAFT_NAME": "Sentinel-2B"}) is not None


def test_unknown_sensor_says_why_there_is_no_speed(tmp_path):
    src = DATA / CROPS[0][0]
    dst = tmp_path / "unnamed_scene.tif"  # same pixels, nothing says which sensor
    with rasterio.open(src) as s:
        prof = s.profile
        with rasterio.open(dst, "w", **prof) as d:
            d.write(s.read())
    with open_scene(dst) as sc:
        a = analyze(sc, AnalysisRequest(vessel_px=(120.0, 120.0)))
    assert a.wake_found and a.speed is None
    why = next(c.text for c in a.cautions if c.code == CautionCode.LINES_ONLY)
    assert "not known to the program" in why and "pixels" in why


# ---- the Sentinel-2-like scene maker: known truth -------------------------------------------------------


def _ms_case(seed: int, tmp_path: Path):
    rng = np.random.default_rng(seed)
    u, hd, length = float(rng.uniform(3, 12)), float(rng.uniform(0, 360)), float(rng.uniform(60, 200))
    v = VesselSpec("Test launch", -35.0, 36.0, u, hd, Hull(length, length / 6))
    spec = vessel_scene("t", v, 320, float(rng.uniform(7, 10)), seed=seed)
    look = MultispectralLook(wind_mps=float(rng.uniform(3, 10)), wind_direction_deg=float(rng.uniform(0, 360)))
    ms = render_multispectral(spec, look)
    path = tmp_path / f"case_S2_{seed}.tif"
    write(ms.rendered, path, band_names=BANDS)
    return path, {**ms.rendered.truth["vessels"][0], "scene_pixel_m": ms.rendered.truth["pixel_m"]}


@pytest.mark.parametrize("seed", [200, 201, 202])
def test_sentinel2_like_scene_speed_and_heading_within_their_intervals(seed, tmp_path):
    """Seeds 200+ were not used to set the edge uncertainty (benchmarks/multispectral_sweep.py used 100-159)."""
    path, truth = _ms_case(seed, tmp_path)
    with open_scene(path) as sc:
        a = analyze(sc, AnalysisRequest(vessel_px=(truth["pixel_col"], truth["pixel_row"])))
    assert a.wake_found
    assert _angle_diff(a.heading_deg, truth["heading_deg"]) <= 3 * a.heading_std_deg + 1.0
    assert a.speed is not None
    assert a.speed.ci95_low_mps <= truth["speed_mps"] <= a.speed.ci95_high_mps


def test_sentinel2_like_ship_with_a_long_bright_foam_wake_is_not_taken_for_a_pier(tmp_path):
    # a 200 m hull at 10 m/s: its foam is as bright as the hull for 500 m, longer than any vessel; a pier that
    # long is refused, but this object's near-infrared share is foam's (synthetic, Sentinel-2-like)
    from wakemeter.detect.line_chip import prepare_line_chip
    from wakemeter.detect.tuning import DEFAULT_TUNING

    v = VesselSpec("Long wake", -35.0, 36.0, 10.0, 70.0, Hull(200.0, 200.0 / 6))
    ms = render_multispectral(vessel_scene("t", v, 320, 10.0, seed=5), MultispectralLook(wind_mps=5.0))
    path = tmp_path / "long_S2.tif"
    write(ms.rendered, path, band_names=BANDS)
    t = ms.rendered.truth["vessels"][0]
    with open_scene(path) as sc:
        chip = prepare_line_chip(sc, (t["pixel_col"], t["pixel_row"]), size_px=DEFAULT_TUNING.line_chip_px)
        assert chip.hull is not None and chip.hull.core_length_m > DEFAULT_TUNING.finder_max_length_m
        a = analyze(sc, AnalysisRequest(vessel_px=(t["pixel_col"], t["pixel_row"])))
    assert a.wake_found and a.heading_deg is not None and a.heading_std_deg is not None
    assert _angle_diff(a.heading_deg, 70.0) <= 2 * a.heading_std_deg


def test_sentinel2_like_hull_moves_between_bands_by_speed_times_delay(tmp_path):
    path, truth = _ms_case(203, tmp_path)
    px = truth["hull_pixel_per_band"]
    shift_px = np.hypot(px["B04"][0] - px["B02"][0], px["B04"][1] - px["B02"][1])
    assert shift_px * truth["scene_pixel_m"] == pytest.approx(truth["speed_mps"] * 1.005, rel=1e-3)
    with rasterio.open(path) as ds:
        assert ds.descriptions == BANDS and ds.dtypes[0] == "uint16"
        b02 = ds.read(1).astype(float)
    assert 200 < np.median(b02) < 900  # open water of a few percent reflectance, x 10 000


def test_jonswap_slope_variance_matches_the_spectrum_integral():
    """The 2-D random sea's slope variance equals the integral of k^2 S(k) of the JONSWAP spectrum
    (Hasselmann et al. 1973), integrated here independently with scipy's quad over the resolved band."""
    g, wind, fetch = 9.81, 8.0, 40.0
    n, dx = 512, 2.0
    ((sx, sy),) = jonswap_slopes(
        (n, n),
        dx_m=dx,
        dy_m=dx,
        wind_mps=wind,
        fetch_km=fetch,
        direction_xy=(1.0, 0.0),
        spreading_s=4.0,
        times_s=(0.0,),
        g=g,
        rng=np.random.default_rng(3),
    )
    f = fetch * 1000.0
    alpha = 0.076 * (wind**2 / (f * g)) ** 0.22
    wp = 22.0 * (g * g / (wind * f)) ** (1.0 / 3.0)

    def s_omega(w: float) -> float:
        sig = 0.07 if w <= wp else 0.09
        return (
            alpha
            * g
            * g
            * w**-5
            * np.exp(-1.25 * (wp / w) ** 4)
            * 3.3 ** np.exp(-((w - wp) ** 2) / (2 * sig**2 * wp**2))
        )

    k_lo, k_hi = 2 * np.pi / (n * dx), np.pi / dx  # the grid resolves these wavenumbers
    w_lo, w_hi = np.sqrt(g * k_lo), np.sqrt(g * k_hi)
    expected, _ = integrate.quad(lambda w: (w**4 / g**2) * s_omega(w), w_lo, w_hi, limit=200)
    got = float(np.mean(sx**2 + sy**2))
    assert got == pytest.approx(expected, rel=0.15)


def test_mtf_blur_has_the_stated_transfer():
    """The renderer's blur passes a cosine at the Nyquist frequency (0.5 cycles per pixel) with the stated
    modulation (0.3), and half that frequency with exp(-2 pi^2 sigma^2 f^2), the Gaussian's transform."""
    sigma = _mtf_sigma_px(0.3)
    for f, want in ((0.5, 0.3), (0.25, np.exp(-2 * np.pi**2 * sigma**2 * 0.25**2))):
        x = np.cos(2 * np.pi * f * np.arange(64))[None, :] * np.ones((64, 1))
        y = sensor_blur(x, sigma)
        assert np.ptp(y[10]) / np.ptp(x[10]) == pytest.approx(want, rel=1e-6)


def test_real_crop_as_an_8bit_stretched_jpeg_still_shows_its_wake(tmp_path):
    """The same crop as many users get it: true colour stretched to 8 bits and JPEG-compressed (foam and hull
    saturate at 255); the wake is still found along the heading read by eye (no band timing: no speed)."""
    name, ship, wake_points = CROPS[0]
    src = DATA / name
    dst = tmp_path / "stretched_jpeg.tif"
    with rasterio.open(src) as s:
        rgb = s.read([3, 2, 1]).astype(float)
        lo, hi = np.percentile(rgb, [2, 98])
        b8 = np.clip((rgb - lo) / (hi - lo) * 255, 0, 255).astype(np.uint8)
        prof = s.profile | {"count": 3, "dtype": "uint8", "compress": "jpeg", "photometric": "ycbcr", "tiled": True}
        prof.update(blockxsize=128, blockysize=128, predictor=1)
        with rasterio.open(dst, "w", **prof) as d:
            d.write(b8)
    eye = [_bearing(src, p, ship) for p in wake_points]
    with open_scene(dst) as sc:
        a = analyze(sc, AnalysisRequest(vessel_px=(float(ship[0]), float(ship[1]))))
    assert a.wake_found, a.decision
    assert min(_angle_diff(a.heading_deg, e) for e in eye) <= EYE_READING_DEG + 2 * a.heading_std_deg
    assert a.speed is None


@pytest.mark.parametrize("shift", [False, True])
def test_radar_dark_wake_as_a_line_or_honestly_nothing(tmp_path, shift):
    """Synthetic radar (3 looks, 8 m pixels) of a slow vessel whose transverse waves (16 m) are two pixels
    long: no crests to fit. The dark turbulent wake gives the heading; with the hull shifted 209 m in azimuth
    (Raney 1971) the analysis may decline, but it must never give a heading off the truth."""
    from wakemeter.synth import RadarModel

    v = VesselSpec("Slow trawler", -35.0, 36.0, 5.0, 130.0, Hull(120.0, 20.0))
    spec = vessel_scene("radar", v, 640, 8.0, imaging=RadarModel(looks=3, hull_displacement=shift), seed=0)
    tif, sidecar = write(render(spec), tmp_path / "radar.tif")
    import json

    t = json.loads(sidecar.read_text())["vessels"][0]
    with open_scene(tif) as sc:
        a = analyze(sc, AnalysisRequest(vessel_px=(t["hull_pixel_col"], t["hull_pixel_row"])))
    if shift and not a.wake_found:
        assert "hull" in a.decision  # says why: the line from the hull is not along its axis
        return
    assert a.wake_found and a.speed is None
    assert any(ln.kind == LineKind.TURBULENT_DARK for ln in a.lines)
    assert _angle_diff(a.heading_deg, 130.0) <= 3 * a.heading_std_deg + 1.0


def test_speed_basis_is_a_typed_fact_not_a_caution_text():
    # the hull's shift between bands measures the hull against the Earth: the result says "over ground" as a
    # typed field, carried through JSON and back, and records written before the field still read right
    # (self-consistency; the crop is real, tests/data/sentinel2)
    from wakemeter.detect.result import WakeAnalysis

    with open_scene(DATA / CROPS[0][0]) as sc:
        a = analyze(sc, AnalysisRequest(vessel_px=(120.0, 120.0)))
    assert a.speed is not None and a.speed_over_ground and a.speed_basis == "over ground"
    assert all(m.over_ground for m in a.methods)
    j = a.to_json()
    assert j["speed_basis"] == "over ground"
    assert WakeAnalysis.from_json(j).speed_over_ground
    old = {k: v for k, v in j.items() if k != "speed_basis"}
    old["methods"] = [{k: v for k, v in m.items() if k != "over_ground"} for m in j["methods"]]
    assert WakeAnalysis.from_json(old).speed_over_ground and WakeAnalysis.from_json(old).speed_basis == "over ground"
