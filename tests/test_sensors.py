"""The sensor table: each record recognises its own scenes and answers band roles and published band timing
(self-consistency, and the published Sentinel-2 delay: Markuse 2017, B04 1.005 s after B02)."""

from __future__ import annotations

import re

import pytest

from wakemeter.scene import sensor
from wakemeter.scene.display import true_colour_bands
from wakemeter.scene.sensor import BandRole, SensorRecord, band_roles, band_timing


@pytest.mark.parametrize(
    "names",
    [("B02", "B03", "B04", "B08"), ("b2", "B3", " B04 ", "B8"), ("BLUE", "GREEN", "RED", "NIR")],
)
def test_band_roles_from_names(names):
    roles = band_roles(names)
    assert roles == {BandRole.BLUE: 1, BandRole.GREEN: 2, BandRole.RED: 3, BandRole.NIR: 4}
    assert true_colour_bands(names) == (3, 2, 1)


def test_unnamed_bands_have_no_roles_and_no_timing():
    assert band_roles((None, "", "band 3")) == {}
    assert band_timing((None, None, None, None), "scene.tif") is None
    assert true_colour_bands((None, None, None)) == (1, 2, 3)


def test_sentinel2_timing_needs_the_platform_as_well_as_the_band_names():
    names = ("B02", "B03", "B04", "B08")
    assert band_timing(names, "harbour.tif") is None  # band names alone are shared by other sensors
    t = band_timing(names, "x_S2L2A_y.tif")
    assert t is not None and (t.first_band, t.last_band) == (1, 3)
    assert t.delay_s == pytest.approx(1.005)  # Markuse 2017 (published)
    assert t.recognised_from == "band names and the file name"
    t = band_timing(names, "harbour.tif", {"SPACECRAFT_NAME": "Sentinel-2B"})
    assert t is not None and t.recognised_from == "band names and the platform in the metadata"


def test_a_sensor_is_one_record(monkeypatch):
    # a record added to the table (invented for this test: band names "C1".."C4", no timing) is asked like the
    # others; nothing else changes
    rec = SensorRecord(
        name="test sensor",
        roles={"C1": BandRole.BLUE, "C2": BandRole.GREEN, "C3": BandRole.RED, "C4": BandRole.NIR},
        canonical=lambda d: (d or "").strip().upper() if re.fullmatch(r"\s*C[1-4]\s*", d or "") else None,
    )
    monkeypatch.setattr(sensor, "SENSORS", (*sensor.SENSORS, rec))
    assert band_roles(("C4", "C3", "C2", "C1"))[BandRole.NIR] == 1
    assert band_timing(("C4", "C3", "C2", "C1"), "x.tif") is None
