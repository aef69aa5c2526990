"""The command line as a user types it: every command's help opens, list options accept a leading minus,
errors are one plain line.  Source: argparse behaviour (Python documentation); no external values."""

import pytest

from wakemeter.cli import COMMANDS, main
from wakemeter.cli.options import join_negative_lists


@pytest.mark.parametrize("argv", [["--help"], *[[name, "--help"] for name in sorted(COMMANDS)]])
def test_every_help_opens(argv, capsys):
    with pytest.raises(SystemExit) as exit_info:
        main(argv)
    assert exit_info.value.code == 0
    out = capsys.readouterr().out
    assert "usage: wakemeter" in out


def test_negative_numbers_after_list_options():
    # argparse takes "-35,36" for an option; the README writes "--vessel -35,36"
    argv = ["analyze", "s.tif", "--vessel", "-35,36", "--vessel-px", "-1.5e2,3", "--depth", "5"]
    assert join_negative_lists(argv) == ["analyze", "s.tif", "--vessel=-35,36", "--vessel-px=-1.5e2,3", "--depth", "5"]
    assert join_negative_lists(["--vessel", "--json"]) == ["--vessel", "--json"]  # an option is left alone
    assert join_negative_lists(["--vessel", "35,36"]) == ["--vessel", "35,36"]


def test_bad_options_are_one_plain_line(capsys):
    assert main(["analyze", "no_such_scene.tif", "--vessel", "-35,36", "--radar-geometry", "1,2,3"]) == 2
    err = capsys.readouterr().err.strip().splitlines()
    assert len(err) == 1 and "--radar-geometry" in err[0] and "needs 4 numbers" in err[0]


def test_messages_use_the_users_own_terms(capsys):
    # a position given as longitude and latitude is reported as such (not in map coordinates), a NaN as "nan"
    scene = "sample_scenes/harbour_approach_optical.tif"
    assert main(["analyze", scene, "--vessel", "10,10"]) == 2
    err = capsys.readouterr().err
    assert "longitude 10.000000, latitude 10.000000 lies outside the scene" in err
    assert main(["speed", "--transverse-wavelength", "nan"]) == 2
    err = capsys.readouterr().err
    assert "--transverse-wavelength must be a number > 0 m, got nan" in err and "array" not in err
    assert main(["analyze", scene]) == 2
    assert "--vessel LON,LAT or --vessel-px COL,ROW" in capsys.readouterr().err


def test_mistyped_command_and_missing_folder_are_said_at_once(capsys, tmp_path):
    assert main(["analyse", "scene.tif"]) == 2  # British spelling: a suggestion, not the program
    assert "did you mean 'wakemeter analyze'?" in capsys.readouterr().err
    missing = tmp_path / "no_such_folder"
    assert main(["report", "sample_scenes/calm_no_wake.tif", "--vessel-px", "384,384", "--out", str(missing)]) == 2
    assert "does not exist (create it first)" in capsys.readouterr().err


def test_missing_window_libraries_are_named_in_one_line(monkeypatch, capsys):
    # libxcb-cursor0, -icccm4 and -keysyms1 were missing on a fresh Debian-like machine (Qt then aborts with a
    # long message); the program names them and the package to install instead
    import ctypes.util

    from wakemeter.app import main as app_main

    monkeypatch.setenv("DISPLAY", ":0")
    monkeypatch.setenv("QT_QPA_PLATFORM", "")
    monkeypatch.delenv("WAKEMETER_SKIP_LIBRARY_CHECK", raising=False)
    monkeypatch.setattr(ctypes.util, "find_library", lambda name: None if name == "xcb-cursor" else f"lib{name}.so")
    assert app_main.missing_system_libraries() == ["libxcb-cursor0"]
    assert app_main.run_program([]) == 2
    err = capsys.readouterr().err.strip().splitlines()
    assert len(err) == 1 and "sudo apt install libxcb-cursor0" in err[0]


def test_western_longitudes_and_a_current_as_the_readme_writes_them(capsys):
    # `--vessel -70.5,41.2` once failed with "expected one argument"; a current setting toward a bearing with a
    # leading minus is not a thing, but its list is read the same way
    assert main(["analyze", "no_such_scene.tif", "--vessel", "-70.5,41.2"]) == 2
    assert "no such file" in capsys.readouterr().err
    assert main(["analyze", "no_such_scene.tif", "--vessel", "-70.5,41.2", "--current", "-1,90"]) == 2
    assert "current speed must be within 0-60 m/s" in capsys.readouterr().err


def test_speed_uses_a_half_angle_given_with_a_transverse_wavelength(capsys):
    # 64 m transverse waves and a 24 deg half-angle: not deep water, so speed and depth come from the pair; the
    # pair's speed and depth satisfy the finite-depth dispersion relation U^2 = (g/k) tanh(k h) for transverse
    # waves (Lamb 1932, Hydrodynamics, sec. 228); with a depth of 12 m as well, the speed there gives a
    # half-angle of 27 deg (Havelock 1908), which contradicts the 24 +- 1 deg measured: said
    import math
    import re

    from wakemeter.cli import main

    assert main(["speed", "--transverse-wavelength", "64", "--half-angle", "24"]) == 0
    out = capsys.readouterr().out
    assert "deep water assumed" not in out
    u = float(re.search(r"half-angle \(finite depth\): (\d+\.\d+) m/s", out).group(1))
    h = float(re.search(r"depth from the pair: (\d+\.\d) m", out).group(1))
    k = 2 * math.pi / 64
    assert u**2 == pytest.approx(9.80665 / k * math.tanh(k * h), rel=0.02)
    assert main(["speed", "--transverse-wavelength", "64", "--half-angle", "24", "--depth", "12"]) == 0
    out = capsys.readouterr().out
    assert "CONTRADICTION" in out and "27.1" in out
    assert main(["speed", "--transverse-wavelength", "64", "--half-angle", "19.5", "--depth", "100"]) == 0
    assert "CONTRADICTION" not in capsys.readouterr().out  # deep water and Kelvin's angle agree


def test_report_refuses_an_existing_set_before_analysing_and_names_force(tmp_path, capsys):
    # an existing set named with --name is refused at once (no analysis); the message names --force
    # (program behaviour, no source)

    from wakemeter.cli import main

    argv = ["report", "sample_scenes/harbour_approach_optical.tif", "--vessel", "-35,36", "--out", str(tmp_path)]
    assert main([*argv, "--name", "case_a"]) == 0
    capsys.readouterr()
    import wakemeter.detect.analysis as analysis_mod

    called = []
    real = analysis_mod.analyze
    analysis_mod.analyze = lambda *a, **k: called.append(1) or real(*a, **k)
    try:
        assert main([*argv, "--name", "case_a"]) == 2
    finally:
        analysis_mod.analyze = real
    err = capsys.readouterr().err
    assert "--force" in err and called == []
    assert main(argv) == 0 and main(argv) == 2  # the default name is known only after the analysis
    assert "--force" in capsys.readouterr().err


def test_synth_says_where_the_vessel_and_its_radar_hull_are(tmp_path, capsys):
    # the README's own example: 15 kn over 12 m of water, radar; the output names the hull's imaged pixel, and
    # the analysis from there finds the 15 kn truth within its interval (synthetic truth; Fr_h = 7.72 /
    # sqrt(9.80 x 12) = 0.71)
    import re

    from wakemeter.cli import main

    out = tmp_path / "my_scene.tif"
    argv = ["synth", "--out", str(out), "--speed-knots", "15", "--heading", "120", "--kind", "radar", "--depth", "12"]
    assert main(argv) == 0
    said = capsys.readouterr().out
    assert "depth Froude number 0.71" in said
    col, row = re.search(r"hull is imaged \d+ m away, at pixel (\d+),(\d+)", said).groups()
    assert main(["analyze", str(out), "--vessel-px", f"{col},{row}", "--json"]) == 0
    import json

    r = json.loads(capsys.readouterr().out)
    lo, hi = r["speed_ci95_knots"]
    assert lo <= 15.0 <= hi
