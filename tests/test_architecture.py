"""Layering rules (DEVELOPERS.md, Layers): the core never imports Qt; detectors never import synth.

Source: project architecture rule (DEVELOPERS.md), no external reference needed.
"""

import ast
import subprocess
import sys
from pathlib import Path

import pytest

PKG = Path(__file__).resolve().parents[1] / "wakemeter"
CORE = ["physics", "scene", "detect", "synth", "evidence", "project", "cli"]


@pytest.mark.parametrize("layer", CORE)
def test_core_layer_does_not_import_qt(layer):
    if not (PKG / layer / "__init__.py").exists():
        pytest.fail(f"layer {layer} missing")
    code = (
        f"import sys, importlib, pkgutil\n"
        f"import wakemeter.{layer} as m\n"
        f"for i in pkgutil.walk_packages(m.__path__, m.__name__ + '.'):\n"
        f"    importlib.import_module(i.name)\n"
        f"bad = [k for k in sys.modules if k.split('.')[0] in ('PySide6', 'PyQt5', 'PyQt6', 'pyqtgraph')]\n"
        f"print(bad); sys.exit(1 if bad else 0)\n"
    )
    r = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True)
    assert r.returncode == 0, r.stdout + r.stderr


def _imports(path: Path) -> set[str]:
    tree = ast.parse(path.read_text())
    out: set[str] = set()
    for node in ast.walk(tree):
        if isinstance(node, ast.Import):
            out |= {a.name for a in node.names}
        elif isinstance(node, ast.ImportFrom):
            mod = node.module or ""
            out.add("." * node.level + mod)
    return out


@pytest.mark.parametrize(
    "layer, forbidden",
    [
        ("detect", "synth"),
        ("physics", "scene"),
        ("physics", "detect"),
        ("scene", "detect"),
        ("detect", "evidence"),
        ("detect", "app"),
        # the GUI draws what the analysis computed; it evaluates no
        # wave physics of its own
        ("app", "dispersion"),
        ("app", "kelvin"),
        ("app", "havelock"),
    ],
)
def test_dependencies_point_one_way(layer, forbidden):
    for f in (PKG / layer).rglob("*.py"):
        for imp in _imports(f):
            assert forbidden not in imp.split("."), f"{f} imports {imp}"


#: keys only a result's JSON has (WakeAnalysis.to_json); reading them by string is a view reading JSON
RESULT_ONLY_KEYS = (
    "wake_found",
    "speed_ci95_mps",
    "speed_ci95_knots",
    "speed_check",
    "speed_basis",
    "consistency",
    "regime_explanation",
    "transverse_wavelength_m",
    "heading_std_deg",
    "cautions",
    "decision",
    "combination",
)
#: where results are stored and read back (through WakeAnalysis.from_json)
STORAGE_EDGE = ("detect/result.py",)


def test_views_read_the_typed_result_not_its_json():
    # the evidence summary, PDF, GIS layer, batch table, results panel and position comparison take
    # WakeAnalysis; a result's JSON is read only where it is stored (project architecture rule, no source)
    found = []
    for path in PKG.rglob("*.py"):
        rel = path.relative_to(PKG).as_posix()
        if rel in STORAGE_EDGE:
            continue
        for node in ast.walk(ast.parse(path.read_text())):
            key = None
            if isinstance(node, ast.Subscript) and isinstance(node.slice, ast.Constant):
                key = node.slice.value
            elif (
                isinstance(node, ast.Call)
                and isinstance(node.func, ast.Attribute)
                and node.func.attr == "get"
                and node.args
                and isinstance(node.args[0], ast.Constant)
            ):
                key = node.args[0].value
            if key in RESULT_ONLY_KEYS:
                found.append(f"{rel}:{node.lineno} {key}")
    assert found == []
