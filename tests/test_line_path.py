"""The line path's stages on their typed inputs: the hull's own outline, a white hull that is not its own
wake, the narrow-arms method inside its domain, the heading uncertainty's model term, and results that name
only the methods that gave a figure.

Scenes from :mod:`wakemeter.synth.hull_scenes` (synthetic, invented pixel values): each holds one failure
class met on real 1.5-3 m images (issue notes: a white hull called a "turbulent wake (bright)", a planing
boat's foam V and foam-covered hull read as narrow Kelvin arms and a 101 m hull, giving 90 kn).
"""

from __future__ import annotations

import dataclasses

import numpy as np
import pytest

from wakemeter.detect.analysis import AnalysisRequest, analyze
from wakemeter.detect.findings import CautionCode, LineKind
from wakemeter.detect.hull_outline import hull_outline_length_m
from wakemeter.detect.line_chip import Hull
from wakemeter.detect.tuning import DEFAULT_TUNING
from wakemeter.physics.hull import hull_froude_from_arm_angle
from wakemeter.physics.units import KNOT_MPS
from wakemeter.scene.raster import open_scene
from wakemeter.synth.hull_scenes import white_hull_scene


def _hull(core: np.ndarray, mask: np.ndarray, m_px: float = 1.0) -> Hull:
    rr, cc = np.nonzero(core)
    return Hull((float(rr.mean()), float(cc.mean())), 0.0, 0.0, 0.0, 100.0, mask, core)


def _bar(n: int = 40, r0: int = 19, c0: int = 10, length: int = 8, width: int = 3) -> np.ndarray:
    m = np.zeros((n, n), bool)
    m[r0 : r0 + width, c0 : c0 + length] = True
    return m


def test_hull_outline_of_a_clean_hull_is_its_length():
    # an 8 x 3 pixel hull along the columns, moving right (the wake at image angle 180 deg): 8 pixels long
    # (hand-worked: the outline spans columns 10-17; extents from the centre 3.5 + 3.5, plus the centre pixel)
    core = _bar()
    length, why = hull_outline_length_m(_hull(core, core), 180.0, 1.5, DEFAULT_TUNING)
    assert why == "" and length == pytest.approx(8 * 1.5)


def test_hull_outline_refused_when_foam_trails_it():
    # the same hull with 20 pixels of foam behind it (above a quarter of the peak, below half): the blob is 28
    # pixels long, and its length is not the hull's (the real failure: 101 m "hulls" of 12 m boats)
    core = _bar()
    mask = core | _bar(c0=0, length=10, width=3)
    length, why = hull_outline_length_m(_hull(core, mask), 180.0, 1.5, DEFAULT_TUNING)
    assert length is None and "foam" in why


def test_hull_outline_refused_with_a_foam_v_from_the_stern_corners():
    # foam arms leave the stern's corners, off the centre line: still foam attached to the hull
    core = _bar()
    mask = core.copy()
    for k in range(1, 10):
        mask[19 - k // 3, 10 - k] = True
        mask[21 + k // 3, 10 - k] = True
    length, why = hull_outline_length_m(_hull(core, mask), 180.0, 1.5, DEFAULT_TUNING)
    assert length is None and "foam" in why


def test_hull_outline_refused_when_too_long_for_a_hull_or_too_coarse():
    core = _bar(length=36, width=2)  # 18 widths long: a line, not a hull (length/beam below ~10, from memory)
    assert hull_outline_length_m(_hull(core, core), 180.0, 1.5, DEFAULT_TUNING)[0] is None
    core = _bar()
    length, why = hull_outline_length_m(_hull(core, core), 180.0, 10.0, DEFAULT_TUNING)  # Sentinel-2 pixels
    assert length is None and "per pixel" in why


@pytest.mark.parametrize("superstructure", [1.0, 6.0])
@pytest.mark.parametrize("where", [-0.45, -0.25, 0.0, 0.25, 0.45])
def test_a_white_hull_on_calm_water_is_not_its_own_wake(tmp_path, superstructure, where):
    # a 60 m white hull at 1.5 m per pixel, no wake; with a superstructure six times brighter than the hull the
    # blob at a click is the superstructure and the rest of the hull used to be a bright line "from the vessel":
    # 5 of 5 clicks gave a wake heading 243 deg before (synthetic)
    hs = white_hull_scene(tmp_path / "hull.tif", superstructure_factor=superstructure)
    with open_scene(hs.path) as sc:
        a = analyze(sc, AnalysisRequest(vessel_px=hs.at(where)))
    assert not a.wake_found, a.decision
    assert a.speed is None


def test_a_white_hull_with_its_foam_trail_is_a_wake_with_the_right_heading(tmp_path):
    hs = white_hull_scene(tmp_path / "hull.tif", superstructure_factor=6.0, foam_trail_m=150.0)
    with open_scene(hs.path) as sc:
        for where in (-0.4, 0.0, 0.4):
            a = analyze(sc, AnalysisRequest(vessel_px=hs.at(where)))
            assert a.wake_found and a.heading_deg is not None and a.heading_std_deg is not None
            err = abs((a.heading_deg - hs.heading_deg + 180) % 360 - 180)
            assert err <= 2 * a.heading_std_deg, (a.heading_deg, a.heading_std_deg)


def test_a_bright_trail_as_bright_in_the_near_infrared_as_in_the_visible_is_not_foam(tmp_path):
    # the same hull and trail with the trail grey (as bright in B08 as in B02-B04): a concrete edge or a rock's,
    # not foam, which is darker in the near infrared (foam_colour.py); in one band nothing tells them apart
    hs = white_hull_scene(tmp_path / "hull.tif", superstructure_factor=6.0, foam_trail_m=150.0, foam_nir_share=1.0)
    with open_scene(hs.path) as sc:
        a = analyze(sc, AnalysisRequest(vessel_px=hs.at(0.0)))
    assert not a.wake_found and "not foam" in a.decision
    one = white_hull_scene(tmp_path / "one.tif", superstructure_factor=6.0, foam_trail_m=150.0, bands=1)
    with open_scene(one.path) as sc:
        assert analyze(sc, AnalysisRequest(vessel_px=one.at(0.0))).wake_found


def test_a_bright_trail_green_or_blue_green_in_the_visible_is_not_foam(tmp_path):
    # the same hull and trail, the trail coloured as a shallow sandy bottom seen through the water (its excess over
    # the water in green 1.4 times and in red 0.1 times that in blue; dark in B08): foam is about white in the
    # visible (Moore et al. 1998; Dierssen 2019; foam_colour.py), so it is no wake; white, it is one
    shallow = (1.0, 1.4, 0.1)
    hs = white_hull_scene(tmp_path / "h.tif", superstructure_factor=6.0, foam_trail_m=150.0, trail_colour=shallow)
    with open_scene(hs.path) as sc:
        a = analyze(sc, AnalysisRequest(vessel_px=hs.at(0.0)))
    assert not a.wake_found and "not white in the visible" in a.decision
    hs = white_hull_scene(
        tmp_path / "w.tif", superstructure_factor=6.0, foam_trail_m=150.0, trail_colour=(1.0, 0.9, 0.7)
    )
    with open_scene(hs.path) as sc:
        assert analyze(sc, AnalysisRequest(vessel_px=hs.at(0.0))).wake_found


def _planing_boat(tmp_path, **kw):
    """A 12 m boat at 1.5 m per pixel with a 6 deg foam V from its stern corners (synthetic)."""
    args = dict(length_m=12.0, superstructure_factor=1.5, hull_contrast=900.0, foam_v_half_angle_deg=6.0)
    return white_hull_scene(tmp_path / "v.tif", **{**args, "foam_v_length_m": 200.0, **kw})


def test_a_planing_boats_foam_v_gives_no_speed_from_a_foam_covered_hull(tmp_path):
    # a 12 m boat at 1.5 m per pixel with a foam V of 6 deg from its stern corners: the V is found and read as
    # narrow arms, but the hull's length cannot be read from a blob that holds the foam: no narrow-arms speed,
    # and the reason is said (before: a hull length from the blob and a speed; synthetic)
    hs = _planing_boat(tmp_path)
    with open_scene(hs.path) as sc:
        a = analyze(sc, AnalysisRequest(vessel_px=hs.at(0.0)))
    assert a.wake_found and a.half_angle_deg is not None and a.half_angle_deg < 19.47
    assert any(ln.kind == LineKind.KELVIN_ARM for ln in a.lines)
    assert a.speed is None and not a.methods
    why = next(c.text for c in a.cautions if c.code == CautionCode.LINES_ONLY)
    assert "narrow arms" in why and "foam" in why
    assert "speed from" not in a.decision


def test_narrow_arms_with_a_given_hull_length_follow_the_published_relation(tmp_path):
    # with the length given the method applies: U = Fr_L(phi) sqrt(g L) with Fr_L from the measured half-angle
    # (Rabaud & Moisy 2013, Phys. Rev. Lett. 110, 214503; the inverse in physics.hull, tested there)
    hs = _planing_boat(tmp_path)
    with open_scene(hs.path) as sc:
        a = analyze(sc, AnalysisRequest(vessel_px=hs.at(0.0), hull_length_m=12.0))
    assert a.speed is not None and a.half_angle_deg is not None
    expected = float(hull_froude_from_arm_angle(a.half_angle_deg)) * np.sqrt(a.gravity_mps2 * 12.0)
    assert a.speed.speed_mps == pytest.approx(expected, rel=0.03)
    assert [m.method for m in a.methods] == ["narrow arms and hull length"]
    assert "speed from narrow arms and hull length" in a.decision


def test_narrow_arms_outside_the_domain_give_a_caution_not_a_speed(tmp_path):
    # arms at about 3 deg: by the fast-hull relation Fr_L = 3.6 whatever the length (Rabaud & Moisy 2013; at the
    # bound 2.5 the arms lie at 4.56 deg), above what hulls reach (planing series about 1.75, Radojcic et al.
    # 2014): no speed, a coded caution that says why, even with the length given
    hs = white_hull_scene(
        tmp_path / "v.tif",
        length_m=12.0,
        beam_m=1.5,
        superstructure_factor=1.5,
        hull_contrast=900.0,
        foam_v_half_angle_deg=2.0,
        foam_v_length_m=300.0,
    )
    with open_scene(hs.path) as sc:
        a = analyze(sc, AnalysisRequest(vessel_px=hs.at(0.0), hull_length_m=12.0))
    assert a.wake_found and a.half_angle_deg is not None
    fr = float(hull_froude_from_arm_angle(a.half_angle_deg))
    assert fr > DEFAULT_TUNING.narrow_arms_fr_max  # the case is outside the domain by construction
    assert a.speed is None and not a.methods
    assert a.has_caution(CautionCode.OUT_OF_DOMAIN)


def test_line_heading_uncertainty_carries_the_model_term(tmp_path):
    # the stated heading uncertainty of a line finding is never below the model term measured on real wakes
    # (straight-line fits miss turning tracks, drifting foam, one arm followed; issue notes: median error 2.3
    # deg on 13 real wakes, two near 10 deg stated +/-1.1 and +/-1.4)
    hs = white_hull_scene(tmp_path / "hull.tif", foam_trail_m=150.0)
    with open_scene(hs.path) as sc:
        a = analyze(sc, AnalysisRequest(vessel_px=hs.at(0.0)))
    assert a.heading_std_deg is not None
    assert a.heading_std_deg >= DEFAULT_TUNING.line_heading_model_std_deg
    # a 10 deg error is inside 3 sigma
    assert 10.0 <= 3 * a.heading_std_deg


def test_result_texts_name_only_methods_that_gave_a_figure(tmp_path):
    # every "speed from ..." in a decision names a method of the result's methods list, and a result without
    # a speed names none (the real failure: "speed from the hull's shift between bands" for a figure from the
    # narrow arms)
    cases = [
        dict(foam_trail_m=150.0),
        dict(length_m=12.0, superstructure_factor=1.5, hull_contrast=900.0, foam_v_half_angle_deg=6.0),
    ]
    for i, kw in enumerate(cases):
        hs = white_hull_scene(tmp_path / f"c{i}.tif", **kw)
        with open_scene(hs.path) as sc:
            for req in (
                AnalysisRequest(vessel_px=hs.at(0.0)),
                AnalysisRequest(vessel_px=hs.at(0.0), hull_length_m=12.0),
            ):
                a = analyze(sc, req)
                named = a.decision.split("speed from ", 1)[1] if "speed from " in a.decision else ""
                if a.speed is None:
                    assert named == "" and not a.methods
                else:
                    assert named == " and ".join(dict.fromkeys(m.method for m in a.methods)), a.decision
                    assert set(a.speed.methods) == {m.method for m in a.methods}


def test_speeds_given_are_plausible_for_the_hull(tmp_path):
    # a figure from the narrow arms never exceeds the hull Froude bound (speed in knots for the reader)
    hs = white_hull_scene(
        tmp_path / "v.tif", length_m=12.0, superstructure_factor=1.5, hull_contrast=900.0, foam_v_half_angle_deg=8.0
    )
    with open_scene(hs.path) as sc:
        a = analyze(sc, AnalysisRequest(vessel_px=hs.at(0.0), hull_length_m=12.0))
    if a.speed is not None:
        fr = a.speed.speed_mps / np.sqrt(a.gravity_mps2 * 12.0)
        assert fr <= DEFAULT_TUNING.narrow_arms_fr_max, a.speed.speed_mps / KNOT_MPS


@pytest.mark.parametrize("off", [-17.0, 20.0])
def test_a_wake_turned_off_the_hull_axis_is_not_refused(tmp_path, off):
    # a trail leaving the stern 17-20 deg off the hull's axis (a turning track, a crabbing hull, drifting foam):
    # before, refused as "13-16 deg off the hull's long axis, so it is not this hull's wake" (synthetic; real
    # wakes were refused at 14-17 deg in the same way); now found, the heading along the trail within 2 sigma
    hs = white_hull_scene(
        tmp_path / "t.tif",
        foam_trail_m=300.0,
        trail_off_axis_deg=off,
        superstructure_factor=1.0,
        hull_contrast=1500.0,
        foam_contrast=250.0,
        seed=3,
    )
    with open_scene(hs.path) as sc:
        a = analyze(sc, AnalysisRequest(vessel_px=hs.at(0.0)))
    assert a.wake_found, a.decision
    assert a.heading_deg is not None and a.heading_std_deg is not None
    err = abs((a.heading_deg - (hs.heading_deg + off) + 180) % 360 - 180)
    assert err <= 2 * a.heading_std_deg, (a.heading_deg, a.heading_std_deg)


def _streak(tmp_path, heading: float, **kw):
    """A 50 m boat at 10 m per pixel with 200 m of foam behind it on hazy, glinting water (synthetic): at these
    pixels the hull and its foam are one streak 10-20 pixels long, as on the Sentinel-2 crops of two other ports
    (shared data), where the line search alone found 0 of 9.  The foam's near-infrared share is 0.65 (foam is
    darker in the near infrared: Moore et al. 1998; Dierssen 2019)."""
    args = dict(
        pixel_m=10.0,
        length_m=50.0,
        beam_m=12.0,
        hull_contrast=800.0,
        superstructure_factor=1.0,
        foam_trail_m=200.0,
        foam_contrast=400.0,
        haze_contrast=300.0,
        foam_nir_share=0.65,
        heading_deg=heading,
        size_px=300,
    )
    return white_hull_scene(tmp_path / "streak.tif", **{**args, **kw})


@pytest.mark.parametrize("heading", [60.0, 200.0, 310.0])
def test_a_foam_streak_at_ten_metres_is_a_wake_read_from_its_bright_head(tmp_path, heading):
    # before: "no line starts at the vessel" at every heading and click (the line search starts past the blob,
    # and here the blob is the whole streak)
    hs = _streak(tmp_path, heading)
    with open_scene(hs.path) as sc:
        for where in (0.0, 0.4):
            a = analyze(sc, AnalysisRequest(vessel_px=hs.at(where)))
            assert a.wake_found, a.decision
            assert a.heading_deg is not None and a.heading_std_deg is not None
            err = abs((a.heading_deg - heading + 180) % 360 - 180)
            assert err <= 2 * a.heading_std_deg, (a.heading_deg, a.heading_std_deg)
            assert a.has_caution(CautionCode.STREAK) and "streak" in a.decision
            assert a.speed is None  # a streak gives a track, not a speed


def test_a_streak_as_bright_in_the_near_infrared_as_in_the_visible_is_not_read_as_foam(tmp_path):
    # the same streak with grey "foam": a hull or superstructure for all the pixels can tell, so no wake
    hs = _streak(tmp_path, 60.0, foam_nir_share=1.0)
    with open_scene(hs.path) as sc:
        a = analyze(sc, AnalysisRequest(vessel_px=hs.at(0.0)))
    assert not a.wake_found and "near infrared" in a.decision


@pytest.mark.parametrize("heading", [60.0, 200.0, 310.0])
def test_a_long_hull_brighter_at_its_stern_is_not_a_streak(tmp_path, heading):
    # a 150 m hull at 10 m per pixel whose aft superstructure is twice as bright as the rest, no trail: its
    # brightness fades from one end like a streak's; before the near-infrared test it was read as a wake with a
    # reversed heading at 3 of 6 clicks (synthetic; the earlier attempt's record)
    hs = white_hull_scene(
        tmp_path / "h.tif",
        pixel_m=10.0,
        length_m=150.0,
        beam_m=25.0,
        hull_contrast=250.0,
        superstructure_factor=2.0,
        haze_contrast=300.0,
        heading_deg=heading,
        size_px=300,
    )
    with open_scene(hs.path) as sc:
        for where in (0.0, 0.4):
            a = analyze(sc, AnalysisRequest(vessel_px=hs.at(where)))
            assert not a.wake_found, a.decision


def test_a_single_band_streak_is_not_read_as_a_wake(tmp_path):
    # without a near-infrared band foam cannot be told from a hull brighter at one end: no streak reading
    hs = _streak(tmp_path, 60.0, bands=1)
    with open_scene(hs.path) as sc:
        a = analyze(sc, AnalysisRequest(vessel_px=hs.at(0.0)))
    assert not a.wake_found


def _on_slicks(hs, n: int, k: int = 4) -> list[tuple[float, float]]:
    """Up to ``k`` points on the scene's slicks (a quarter, half and three quarters along each), inside the scene
    by 20 pixels and farther than 40 pixels from the hull."""
    out = []
    for (c0, r0), (c1, r1) in hs.slicks:
        for f in (0.25, 0.5, 0.75):
            c, r = c0 + f * (c1 - c0), r0 + f * (r1 - r0)
            inside = 20 <= c <= n - 20 and 20 <= r <= n - 20
            if inside and np.hypot(c - hs.centre_px[0], r - hs.centre_px[1]) > 40:
                out.append((c, r))
    return out[:k]


@pytest.mark.parametrize("seed", [1, 2])
def test_wind_slicks_in_sun_glint_are_not_wakes(tmp_path, seed):
    # a glinting sea with six wind slicks (dark lines 1-3 km long that start nowhere near a vessel) and a small
    # vessel with a short foam tail and a dark calm wake, the wake and slicks damping 30 % of the glint (plainly
    # visible; synthetic, glint_scenes): a click on a slick gives no wake, and the vessel gives no wake or its
    # own heading, never a slick's
    from wakemeter.synth.glint_scenes import glint_wake_scene

    hs = glint_wake_scene(tmp_path / "g.tif", heading_deg=300.0, seed=seed, calm_depth=0.3)
    with open_scene(hs.path) as sc:
        points = _on_slicks(hs, sc.width)
        assert len(points) >= 2
        for p in points:
            a = analyze(sc, AnalysisRequest(vessel_px=p))
            assert not a.wake_found, (p, a.decision)
        a = analyze(sc, AnalysisRequest(vessel_px=hs.at(0.0)))
    if a.wake_found:
        assert a.heading_deg is not None and a.heading_std_deg is not None
        assert abs((a.heading_deg - 300.0 + 180) % 360 - 180) <= 2 * a.heading_std_deg


@pytest.mark.xfail(strict=True, reason="dark calm wakes across sun glint are not found yet (README, real scenes)")
def test_a_dark_calm_wake_across_sun_glint_is_found(tmp_path):
    # the known miss, held so that it is seen when it changes: on the real Sentinel-2 crops (cartagena 04 and
    # 07) the calm line behind a small craft is 0.25-0.38 of the chip's spread darker than the glint beside it, a
    # broad trough in a texture still correlated 0.6-0.7 at 5 pixels; here (6 % of the glint, one texture
    # spread) the line search scores -1.1 to 2.1 (seeds 1-3) where 9 is needed, and at 30 % it stands out on two
    # seeds (9.9, 17.4) but the hull (z about 11 against the glint, where 12 is needed) is not taken for one,
    # so the line is refused as one from elsewhere
    from wakemeter.synth.glint_scenes import glint_wake_scene

    hs = glint_wake_scene(tmp_path / "g.tif", heading_deg=300.0, seed=1)
    with open_scene(hs.path) as sc:
        a = analyze(sc, AnalysisRequest(vessel_px=hs.at(0.0)))
    assert a.wake_found and a.heading_deg is not None and a.heading_std_deg is not None
    assert abs((a.heading_deg - 300.0 + 180) % 360 - 180) <= 2 * a.heading_std_deg


def test_near_infrared_share_of_an_object_is_its_excess_ratio():
    # hand-worked: water 100 in B02-B04 and 50 in B08; an object 3 pixels long with 400 in each visible band (an
    # excess of 300) and 200 in B08 (an excess of 150): share 150 / 300 = 0.5, foam-like; with B08 at 350 it is
    # 300 / 300 = 1, a grey surface
    from wakemeter.detect.foam_colour import line_nir_share, nir_share
    from wakemeter.detect.line_chip import LineChip, Spectral

    n = 100
    pixels = np.empty((4, n, n), np.float32)
    pixels[:3], pixels[3] = 100.0, 50.0
    ys, xs = np.array([50, 50, 50]), np.array([52, 53, 54])
    pixels[:3, ys, xs], pixels[3, ys, xs] = 400.0, 200.0
    valid = np.ones((n, n), bool)
    chip = LineChip(
        np.zeros((n, n), np.float32), valid, (0, 0), (50.0, 50.0), None, 10.0, None, False, (1, 2, 3, 4), 0.0,
        spectral=Spectral(pixels, (0, 1, 2), 3),
    )  # fmt: skip
    t = DEFAULT_TUNING
    assert nir_share(chip, ys, xs, (50.0, 50.0), t) == pytest.approx(0.5)
    # along the ray from (50, 50) at image angle 0 (towards larger columns), 2 to 5 pixels out: the same pixels
    assert line_nir_share(chip, (50.0, 50.0), 0.0, 2.0, 3.0, t) == pytest.approx(0.5)
    pixels[3, ys, xs] = 350.0
    assert nir_share(chip, ys, xs, (50.0, 50.0), t) == pytest.approx(1.0)
    # no near-infrared band named: no share
    assert nir_share(dataclasses.replace(chip, spectral=None), ys, xs, (50.0, 50.0), t) is None
