"""The annotated evidence picture's layout: every text inside the picture, the result box hiding neither the
north arrow, the scale bar nor the corner coordinates, and the corners saying which number is the latitude.

Found by looking at exported pictures (the box once covered the north arrow and text ran off the edge);
checked here on the demo scenes and on a small real Sentinel-2 crop (tests/data/sentinel2, its README).
Check values: geometry only (rectangles inside the picture and apart, the label wording); no external
values - the rule that a map's labels stay clear of its north arrow and scale is common practice, no source."""

from pathlib import Path

import pytest

from wakemeter.detect.analysis import AnalysisRequest, analyze
from wakemeter.evidence.annotate import evidence_layout
from wakemeter.scene.raster import open_scene

ROOT = Path(__file__).resolve().parents[1]
CASES = [
    (ROOT / "sample_scenes" / "harbour_approach_optical.tif", AnalysisRequest(vessel_lonlat=(-35.0, 36.0))),
    (ROOT / "sample_scenes" / "calm_no_wake.tif", AnalysisRequest(vessel_px=(384, 384))),
    (
        ROOT / "tests" / "data" / "sentinel2" / "marseille_00_S2L2A_2023-08-22_wake.tif",
        AnalysisRequest(vessel_px=(120, 120)),
    ),
]
LONG_NAME = "Marram Lark of the Eastern Sandbanks Pilotage Service, tender number 2"


def _overlap(a, b) -> int:
    return max(0, min(a[2], b[2]) - max(a[0], b[0])) * max(0, min(a[3], b[3]) - max(a[1], b[1]))


@pytest.mark.parametrize("path,request_", CASES, ids=[c[0].stem for c in CASES])
def test_labels_inside_and_result_box_hides_no_mark(path, request_):
    with open_scene(path) as sc:
        a = analyze(sc, request_)
        img, layout = evidence_layout(sc, a, scene_label=path.name, vessel_name=LONG_NAME)
    h, w = img.shape[:2]
    for lb in layout.labels:
        x0, y0, x1, y1 = layout.label_rect(lb)
        assert 0 <= x0 and 0 <= y0 and x1 <= w and y1 <= h, (lb.text, (x0, y0, x1, y1), (w, h))
    box = layout.marks["result box"]
    assert box[2] <= w and box[3] <= h
    for name, rect in layout.marks.items():
        if name != "result box":
            assert _overlap(box, rect) == 0, name
    corners = [lb.text for lb in layout.labels if lb.text.startswith("lat ")]
    assert len(corners) == 4 and all(", lon " in t and t.endswith("°") for t in corners)
    assert {"north arrow", "scale bar"} <= set(layout.marks)
    assert any(lb.text.startswith("Vessel: Marram Lark") for lb in layout.labels)
