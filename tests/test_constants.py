"""Every calibrated number of the analysis is a field of :class:`~wakemeter.detect.tuning.Tuning` (so ``--tune``
reaches it and the sweeps record it); a module-level numeric constant in ``wakemeter/detect`` must be on the
commented allow-list below, which says why it is not a tuning (self-consistency of the code base)."""

from __future__ import annotations

import ast
from pathlib import Path

import wakemeter.detect as detect_pkg
from wakemeter.detect.tuning import DEFAULT_TUNING

DETECT = Path(detect_pkg.__file__).parent

#: not thresholds: numerics, grids, published or sensor values, input bounds
NOT_TUNING = {
    "robust.py:MAD_TO_SIGMA": "published constant (Rousseeuw & Croux 1993)",
    "radon.py:_A": "numerics of the projection",
    "radon.py:MATRIX_CACHE_VERSION": "cache format version",
    "wide_blur.py:FFT_FROM_SIGMA": "numerics: when an FFT blur is faster",
    "vessel_finder.py:_FEW_PIXELS_SHARE": "numerics: when working on a mask's pixels alone is faster (same result)",
    "wide_blur.py:REACH_SIGMAS": "numerics: kernel reach",
    "speed_check.py:DRAWS": "Monte Carlo draws",
    "band_shift.py:MC_DRAWS": "Monte Carlo draws",
    "request.py:MAX_DEPTH_M": "input bound (absurd parameters refused)",
    "request.py:MAX_SPEED_MPS": "input bound (absurd parameters refused)",
    "handmeasure.py:PLACEMENT_PX": "hand-placement uncertainty of a point, not a decision",
    "handmeasure.py:PLACEMENT_SCREEN_PX": "hand-placement uncertainty of a point, not a decision",
    "handmeasure.py:MIN_CREST_PX": "sampling limit of the pixel grid (Shannon 1949) with a margin, not tuned",
    "handmeasure.py:DOUBTFUL_CREST_PX": "where half a pixel of aliasing doubt is added to a hand spacing",
    "revise.py:HAND_ANGLE_STD_DEG": "hand-drawn arm uncertainty, not a decision",
    "revise.py:HAND_ANGLE_MAX_DEG": "input bound of a hand-drawn arm",
    "tuning.py:REACH_FRACTION": "geometry of the chip (largest radius inside it)",
    "wakeline.py:_POINTS_AT_ONCE": "memory only: background points scored together (the same scores in any grouping)",
    "wakeline.py:ANGLE_STEP_DEG": "grid of the ray search (the partner search indexes it in whole steps)",
    "line_finding.py:NOTE_SPEEDS_KN": "speeds named in a message, not a decision",
    "line_finding.py:RESOLVABLE_WAVE_PX": "sampling rule for a message (two samples per crest)",
    "analysis.py:GRAVITY_STD_AT_LATITUDE": "uncertainty of a physical value",
    "analysis.py:GRAVITY_STD_UNKNOWN": "uncertainty of a physical value (covers 9.780-9.832)",
    "spectral.py:FR_MAX": "edge of the physics searched (Froude numbers)",
    "spectral.py:FR_SUPER_RANGE": "edge of the physics searched (Froude numbers)",
    "chip_measures.py:DRAW_LENGTH_FRACTION": "how long the drawn arms are (a picture, not a decision)",
    "vessel_finder.py:TILE": "size of the windows read (memory and speed, not a decision)",
    "vessel_finder.py:PFA_PER_KM2": "default of the user's --pfa option (the false-alarm rate asked for)",
}
#: tuned numbers not yet moved into Tuning (none left: keep it empty)
NOT_YET_MOVED: set[str] = set()


def _numeric(v: ast.expr) -> bool:
    if isinstance(v, ast.Constant):
        return isinstance(v.value, (int, float)) and not isinstance(v.value, bool)
    if isinstance(v, ast.UnaryOp):
        return _numeric(v.operand)
    if isinstance(v, ast.BinOp):
        return _numeric(v.left) and _numeric(v.right)
    if isinstance(v, ast.Tuple):
        return bool(v.elts) and all(_numeric(e) for e in v.elts)
    return False


def module_constants() -> set[str]:
    """``file:NAME`` of every module-level name bound to a number (or numbers) in wakemeter/detect."""
    found = set()
    for path in sorted(DETECT.rglob("*.py")):
        for node in ast.parse(path.read_text()).body:
            if isinstance(node, ast.Assign):
                targets, value = node.targets, node.value
            elif isinstance(node, ast.AnnAssign) and node.value is not None:
                targets, value = [node.target], node.value
            else:
                continue
            for t in targets:
                if isinstance(t, ast.Name) and _numeric(value):
                    found.add(f"{path.relative_to(DETECT).as_posix()}:{t.id}")
    return found


def test_no_numeric_threshold_outside_tuning_and_the_allow_list():
    extra = module_constants() - set(NOT_TUNING) - NOT_YET_MOVED
    assert not extra, f"module-level numbers in detect/ that are neither Tuning fields nor allowed: {sorted(extra)}"


def test_the_allow_list_has_no_stale_entries():
    stale = (set(NOT_TUNING) | NOT_YET_MOVED) - module_constants()
    assert not stale, f"allow-listed constants that no longer exist (take them off): {sorted(stale)}"


def test_the_guard_sees_a_new_constant(tmp_path, monkeypatch):
    # the guard itself can fail: a module with a new threshold is reported
    (tmp_path / "new_stage.py").write_text("THRESHOLD = 3.5\nNAME = 'x'\n")
    monkeypatch.setattr(f"{__name__}.DETECT", tmp_path)
    assert module_constants() == {"new_stage.py:THRESHOLD"}


def test_the_line_path_thresholds_are_reachable_by_tune():
    # the line path's decision numbers moved into Tuning can be overridden like any other
    t = DEFAULT_TUNING.with_overrides(["line_partner_fraction=0.4", "hull_z=10", "line_length_fractions=0.25,1"])
    assert t.line_partner_fraction == 0.4 and t.hull_z == 10.0 and t.line_length_fractions == (0.25, 1.0)


def test_no_function_longer_than_a_page():
    # functions of at most 100 lines, so each reads as one page (house rule; self-consistency)
    import wakemeter

    root = Path(wakemeter.__file__).parent
    long = []
    for path in sorted(root.rglob("*.py")):
        for node in ast.walk(ast.parse(path.read_text())):
            if isinstance(node, (ast.FunctionDef, ast.AsyncFunctionDef)) and node.end_lineno is not None:
                n = node.end_lineno - node.lineno + 1
                if n > 100:
                    long.append(f"{path.relative_to(root)}:{node.name} ({n} lines)")
    assert not long, long
