"""Test set-up: Qt runs offscreen (no display needed); the user's config and cache are not touched."""

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

import pytest  # noqa: E402


@pytest.fixture(autouse=True)
def _private_dirs(tmp_path_factory, monkeypatch):
    base = tmp_path_factory.getbasetemp()
    monkeypatch.setenv("XDG_CACHE_HOME", str(base / "xdg-cache"))
    monkeypatch.setenv("XDG_CONFIG_HOME", str(base / "xdg-config"))


@pytest.fixture
def plain_demo_scene(tmp_path):
    """The harbour demo scene's pixels without its georeference (2.00 m pixels, north up; its truth in
    sample_scenes/harbour_approach_optical.truth.json): an image that needs a calibration."""
    from pathlib import Path

    import rasterio

    src = Path(__file__).resolve().parents[1] / "sample_scenes" / "harbour_approach_optical.tif"
    plain = tmp_path / "plain.tif"
    with rasterio.open(src) as ds:
        data = ds.read()
        profile = {"driver": "GTiff", "width": ds.width, "height": ds.height, "count": ds.count, "dtype": ds.dtypes[0]}
    with rasterio.open(plain, "w", **profile) as out:
        out.write(data)
    return plain
