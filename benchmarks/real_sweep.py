"""Real-scene sweep (script): every Sentinel-2 wake crop, sea tile and annotated port vessel of the shared
real data, analysed as a user would, with a picture of each result.

Run: ``.venv/bin/python benchmarks/real_sweep.py [REALDATA] [PICTURES] [--tune NAME=VALUE]``.  REALDATA is the
folder described in its README (default ``../shared/realdata`` beside the project); PICTURES is where a small
picture of every result and a contact sheet per group are written (default a folder in the temporary
directory).  The summary is recorded in ``benchmarks/results/`` beside the last record.

* Wake crops: analysed at the ship pixel of ``index.csv``; found / missed, heading, speed.  The crops of the
  second batch (``sentinel2_wake_crops_more``, two other ports, sun glint) are analysed at their hull pixel
  and their heading compared with the heading read by eye (+/-15 deg by its README).
* Heading errors: every found wake with a heading read by eye (``real_sweep_eye_headings.csv`` for the
  first crops and three small boats on sea tiles, read by us from enlarged pictures; the second batch's
  ``index.csv``) gives an error and its ratio
  to the stated standard uncertainty; the summary counts the share within 2 and 3 sigma.
* Sea tiles: analysed at the centre and at the three brightest specks (where a user might click on
  something small and bright); a wake there is a false alarm unless the tile's label says it holds a boat.
* Port scenes: the four 10 m bands stacked (B02 B03 B04 B08) and analysed at every COCO vessel outline's
  centre.  The outlines say where vessels are, not whether they move: ``real_sweep_eye_labels.csv`` holds
  a person's reading of each vessel's picture (wake visible or not), and found / missed / false alarm are
  counted against it.  Labels read by eye are judgement, not ground truth.
* Finder candidates: every candidate the vessel finder gives in the port scenes, analysed as ``batch --find``
  analyses it (the outlines above miss small boats, and the finder also lands on piers and islets); where a
  wake is found, ``real_sweep_candidate_review.csv`` says what a person saw there.
"""

from __future__ import annotations

import csv
import json
import shutil
import tempfile
from pathlib import Path

import cv2
import numpy as np
import rasterio
from scipy import ndimage

from wakemeter.detect.analysis import AnalysisRequest, analyze
from wakemeter.detect.line_chip import prepare_line_chip
from wakemeter.errors import ParameterError
from wakemeter.physics.units import KNOT_MPS
from wakemeter.scene.raster import open_scene

from sweep_record import parse, record

HERE = Path(__file__).resolve().parent
EYE_LABELS = HERE / "real_sweep_eye_labels.csv"
EYE_HEADINGS = HERE / "real_sweep_eye_headings.csv"
#: what a person saw at each vessel-finder candidate where a wake was found in the port scenes (judgement, not
#: ground truth; reviewed from true colour and the near-infrared band at 6x)
CANDIDATE_REVIEW = HERE / "real_sweep_candidate_review.csv"
BANDS = ("B02", "B03", "B04", "B08")
PICTURE_PX = 120  # scene pixels around the vessel in each picture


def _picture(scene, a, title: str, out: Path) -> None:
    """A 3x picture of the vessel's surroundings (B04 B03 B02 stretched) with the wake line and the verdict."""
    c, r = a.vessel_px
    h = PICTURE_PX // 2
    c0, r0 = int(c) - h, int(r) - h
    data, ok = scene.read(window=(max(c0, 0), max(r0, 0), PICTURE_PX, PICTURE_PX))
    rgb = data[[2, 1, 0]] if data.shape[0] >= 3 else np.repeat(data[:1], 3, axis=0)
    img = np.zeros((PICTURE_PX, PICTURE_PX, 3), np.uint8)
    for i in range(3):
        band = rgb[i]
        lo, hi = np.percentile(band[ok[0]], [1, 99.5]) if ok[0].any() else (0, 1)
        img[: band.shape[0], : band.shape[1], 2 - i] = np.clip((band - lo) / max(hi - lo, 1e-6) * 255, 0, 255)
    img = cv2.resize(img, None, fx=3, fy=3, interpolation=cv2.INTER_NEAREST)
    ox, oy = max(c0, 0), max(r0, 0)
    for seg in a.drawing.segments:
        if seg.kind.value in ("track", "arm_left", "arm_right", "narrow_v_left", "narrow_v_right"):
            pts = np.array([[(x - ox) * 3, (y - oy) * 3] for x, y in seg.points], np.int32)
            cv2.polylines(img, [pts], False, (0, 255, 255), 1)
    cv2.circle(img, (int((c - ox) * 3), int((r - oy) * 3)), 9, (0, 0, 255), 1)
    verdict = "WAKE" if a.wake_found else "no wake"
    if a.wake_found and a.heading_deg is not None:
        verdict += f" {a.heading_deg:.0f}deg"
    if a.speed is not None:
        verdict += f" {a.speed.speed_mps / KNOT_MPS:.1f}kn"
    cv2.putText(img, title[:40], (3, 12), cv2.FONT_HERSHEY_PLAIN, 0.9, (255, 255, 255), 1)
    cv2.putText(img, verdict, (3, 26), cv2.FONT_HERSHEY_PLAIN, 0.9, (0, 255, 255), 1)
    cv2.imwrite(str(out), img)


def _sheet(pictures: list[Path], out: Path, cols: int = 6, shrink: int = 1) -> None:
    if not pictures:
        return
    tiles = [cv2.imread(str(p))[::shrink, ::shrink] for p in pictures]
    h, w = tiles[0].shape[:2]
    rows = -(-len(tiles) // cols)
    sheet = np.zeros((rows * h, cols * w, 3), np.uint8)
    for i, t in enumerate(tiles):
        sheet[(i // cols) * h : (i // cols + 1) * h, (i % cols) * w : (i % cols + 1) * w] = t[:h, :w]
    cv2.imwrite(str(out), sheet)


def _row(a, **kw) -> dict:
    return {
        **kw,
        "wake": a.wake_found,
        "significance": None if not np.isfinite(a.significance) else round(float(a.significance), 1),
        "heading_deg": None if a.heading_deg is None else round(a.heading_deg, 1),
        "heading_std_deg": None if a.heading_std_deg is None else round(a.heading_std_deg, 1),
        "speed_knots": None if a.speed is None else round(a.speed.speed_mps / KNOT_MPS, 1),
        "speed_ci95_knots": None
        if a.speed is None
        else [round(a.speed.ci95_low_mps / KNOT_MPS, 1), round(a.speed.ci95_high_mps / KNOT_MPS, 1)],
        "method": a.methods[0].method if a.methods else None,
    }


def _crop_group(folder: Path, items: list[dict], group: str, tuning, pics: Path) -> list[dict]:
    """Each crop analysed at its vessel point (``item["point"]``), pictured, compared with its eye heading."""
    rows, shots = [], []
    for item in items:
        col, row = item["point"]
        with open_scene(folder / item["file"]) as sc:
            a = analyze(sc, AnalysisRequest(vessel_px=(col, row)), tuning)
            name = Path(item["file"]).stem[:12]
            shot = pics / f"{group}_{name}.png"
            _picture(sc, a, name, shot)
            r = {**_row(a, group=group, file=item["file"], point=[col, row]), **_axis_off(sc, a, tuning)}
        shots.append(shot)
        rows.append(_heading_error(r, item["eye"]))
        print(rows[-1], flush=True)
    _sheet(shots, pics / f"sheet_{group}.png", cols=3)
    return rows


def crops(root: Path, pics: Path, tuning) -> list[dict]:
    folder = root / "sentinel2_wake_crops"
    eye = _eye_headings()
    items = [
        {
            "file": it["file"],
            "point": tuple(float(v) for v in it["ship_px_in_crop"].split(",")),
            "eye": eye.get(it["file"]),
        }
        for it in csv.DictReader((folder / "index.csv").open())
    ]
    return _crop_group(folder, items, "crop", tuning, pics)


def _eye_headings() -> dict:
    if not EYE_HEADINGS.exists():
        return {}
    return {r["file"]: float(r["heading_deg_by_eye"]) for r in csv.DictReader(EYE_HEADINGS.open())}


def _axis_off(sc, a, tuning) -> dict:
    """For a found wake with an elongated hull: the angle between the hull's long axis (second moments of its
    blob, the line path's own reading) and the wake line drawn from it (image angles, 0-90 deg)."""
    track = next((seg for seg in a.drawing.segments if seg.kind.value == "track"), None) if a.wake_found else None
    if track is None:
        return {}
    try:
        chip = prepare_line_chip(sc, a.vessel_px, size_px=tuning.line_chip_px, snap_radius_m=tuning.line_snap_radius_m)
    except ParameterError:
        return {}
    h = chip.hull
    if h is None or h.length_m < tuning.hull_elongation_min * h.width_m:
        return {}
    (x0, y0), (x1, y1) = track.points
    line = float(np.degrees(np.arctan2(-(y1 - y0), x1 - x0)))
    off = abs((line - h.axis_deg + 90.0) % 180.0 - 90.0)
    return {"hull_axis_off_deg": round(off, 1), "hull_length_px": round(h.length_m / chip.m_per_px, 1)}


def _heading_error(row: dict, eye: float | None) -> dict:
    if eye is None or row["heading_deg"] is None:
        return {**row, "heading_by_eye": eye}
    err = (row["heading_deg"] - eye + 180.0) % 360.0 - 180.0
    return {**row, "heading_by_eye": eye, "heading_error_deg": round(err, 1)}


def more_crops(root: Path, pics: Path, tuning) -> list[dict]:
    folder = root / "sentinel2_wake_crops_more"
    if not (folder / "index.csv").exists():
        return []
    # index.csv gives the hull pixel's 0-based index; the analysis takes GDAL's continuous coordinates
    items = [
        {
            "file": it["file"],
            "point": (float(it["vessel_col"]) + 0.5, float(it["vessel_row"]) + 0.5),
            "eye": float(it["heading_deg_by_eye"]),
        }
        for it in csv.DictReader((folder / "index.csv").open())
    ]
    return _crop_group(folder, items, "crop_more", tuning, pics)


def _named_copy(src: Path, tmp: Path) -> Path:
    """The tile with its bands named as the data set's README gives their order (B02 B03 B04 B08) and a Sentinel-2
    Level-2A name, as a user's own Sentinel-2 file carries them (the shared tiles carry neither)."""
    dst = tmp / f"{src.stem}_S2L2A.tif"
    shutil.copy(src, dst)
    with rasterio.open(dst, "r+") as ds:
        for i, name in enumerate(BANDS):
            ds.set_band_description(i + 1, name)
    return dst


def sea_tiles(root: Path, pics: Path, tuning, named: bool = False) -> list[dict]:
    """The sea tiles' centre and three brightest specks; ``named``: the same with the bands named (group
    "sea_named": the colour tests and the band timing then apply; headings are not compared twice)."""
    folder = root / "sentinel2_sea_tiles"
    rows, shots = [], []
    headings = {} if named else _eye_headings()
    group = "sea_named" if named else "sea"
    tmp = Path(tempfile.mkdtemp())
    for item in csv.DictReader((folder / "index.csv").open()):
        label = item["visual_label_by_helper"]
        holds_boat = label.startswith("CONTAINS")
        path = _named_copy(folder / item["file"], tmp) if named else folder / item["file"]
        with open_scene(path) as sc:
            data, valid = sc.read()
            z = np.mean(
                [(b - np.median(b)) / (1.4826 * np.median(np.abs(b - np.median(b))) + 1e-9) for b in data], axis=0
            )
            sm = ndimage.gaussian_filter(z, 1.0)
            pr, pc = np.nonzero((sm == ndimage.maximum_filter(sm, 9)) & (sm > 6))
            order = np.argsort(-sm[pr, pc])[:3]
            points = [(sc.width / 2, sc.height / 2)] + [(float(pc[k]), float(pr[k])) for k in order]
            for i, p in enumerate(points):
                a = analyze(sc, AnalysisRequest(vessel_px=p), tuning)
                r = {
                    **_row(a, group=group, file=item["file"], point=list(p), label=label, holds_boat=holds_boat),
                    **_axis_off(sc, a, tuning),
                }
                rows.append(_heading_error(r, headings.get(f"{item['file']}@{int(p[0])}_{int(p[1])}")))
                if a.wake_found or (i == 0 and not named):
                    shot = pics / f"{group}_{Path(item['file']).stem}_{i}.png"
                    _picture(sc, a, f"{Path(item['file']).stem} {i}", shot)
                    shots.append(shot)
                print(rows[-1], flush=True)
    _sheet(shots, pics / f"sheet_{group}.png")
    shutil.rmtree(tmp, ignore_errors=True)
    return rows


def _stack(port_dir: Path, tmp: Path) -> Path | None:
    files = [next(iter(sorted(port_dir.glob(f"*_S2L2A_{b}.tif"))), None) for b in BANDS]
    if any(f is None for f in files):
        return None
    out = tmp / f"{port_dir.name}_S2L2A_stack.tif"
    with rasterio.open(files[0]) as first:
        prof = first.profile.copy()
    prof.update(count=4, compress="deflate")
    with rasterio.open(out, "w", **prof) as dst:
        for i, f in enumerate(files):
            with rasterio.open(f) as src:
                dst.write(src.read(1), i + 1)
            dst.set_band_description(i + 1, BANDS[i])
    return out


def port_scenes(ports_dir: Path, tmp: Path):
    """(port folder, its four bands stacked in one file, its COCO outlines) for every port with both."""
    for port_dir in sorted(p for p in ports_dir.iterdir() if p.is_dir()):
        coco = next(iter(port_dir.glob("*_coco.json")), None)
        stack = _stack(port_dir, tmp) if coco else None
        if stack is not None:
            yield port_dir, stack, json.loads(coco.read_text())


def ports(root: Path, pics: Path, tuning, eye: dict) -> list[dict]:
    rows, shots = [], []
    headings = _eye_headings()
    with tempfile.TemporaryDirectory() as tmp:
        for port_dir, stack, j in port_scenes(root / "sentinel2_ports", Path(tmp)):
            with open_scene(stack) as sc:
                for ann in j["annotations"]:
                    h_w = ann.get("segmentation", {}).get("size") if isinstance(ann.get("segmentation"), dict) else None
                    if h_w is not None and tuple(h_w) != (sc.height, sc.width):
                        continue  # outlines drawn on an image of another size (not this scene's grid)
                    x, y, w, h = ann["bbox"]
                    p = (x + w / 2, y + h / 2)
                    a = analyze(sc, AnalysisRequest(vessel_px=p), tuning)
                    key = f"{port_dir.name}:{ann['id']}"
                    r = _row(a, group="port", file=key, point=list(p), outline_px=[w, h], wake_by_eye=eye.get(key))
                    r.update(_axis_off(sc, a, tuning))
                    rows.append(_heading_error(r, headings.get(key)))
                    shot = pics / f"port_{port_dir.name}_{ann['id']:03d}.png"
                    _picture(sc, a, key, shot)
                    shots.append(shot)
                    print(rows[-1], flush=True)
    for k in range(0, len(shots), 40):
        _sheet(shots[k : k + 40], pics / f"sheet_ports_{k // 40 + 1}.png", cols=8, shrink=2)
    return rows


def _candidate_review() -> dict[str, list[tuple[float, float, str]]]:
    out: dict[str, list[tuple[float, float, str]]] = {}
    if CANDIDATE_REVIEW.exists():
        for r in csv.DictReader(CANDIDATE_REVIEW.open()):
            out.setdefault(r["port"], []).append((float(r["col"]), float(r["row"]), r["by_eye"]))
    return out


def port_candidates(root: Path, pics: Path, tuning) -> list[dict]:
    """Every vessel-finder candidate in the port scenes analysed, as ``batch --find`` does (not only the
    outlined vessels): where a wake is found, what a person saw there (``CANDIDATE_REVIEW``, nearest within
    3 px; "not reviewed" otherwise)."""
    from wakemeter.detect.vessel_finder import find_vessels

    review = _candidate_review()
    rows, shots = [], []
    with tempfile.TemporaryDirectory() as tmp:
        for port_dir, stack, _ in port_scenes(root / "sentinel2_ports", Path(tmp)):
            with open_scene(stack) as sc:
                for k, cand in enumerate(find_vessels(sc)):
                    a = analyze(sc, AnalysisRequest(vessel_px=cand.px), tuning)
                    seen = [
                        (np.hypot(c - cand.px[0], r - cand.px[1]), what) for c, r, what in review.get(port_dir.name, [])
                    ]
                    d, what = min(seen, default=(np.inf, ""))
                    by_eye = (what if d <= 3.0 else "not reviewed") if a.wake_found else None
                    point = [round(cand.px[0], 1), round(cand.px[1], 1)]
                    rows.append(_row(a, group="candidate", file=f"{port_dir.name}#{k}", point=point, by_eye=by_eye))
                    if a.wake_found:
                        shot = pics / f"candidate_{port_dir.name}_{k:03d}.png"
                        _picture(sc, a, f"{port_dir.name} candidate {k}", shot)
                        shots.append(shot)
                    print(rows[-1], flush=True)
    _sheet(shots, pics / "sheet_candidates.png")
    return rows


def summarise(rows: list[dict]) -> dict:
    c = [r for r in rows if r["group"] == "crop"]
    m = [r for r in rows if r["group"] == "crop_more"]
    errs = [(r["heading_error_deg"], r["heading_std_deg"]) for r in rows if r.get("heading_error_deg") is not None]
    z = [abs(e) / max(s, 1e-9) for e, s in errs]
    s = [r for r in rows if r["group"] == "sea"]
    named = [r for r in rows if r["group"] == "sea_named"]
    p = [r for r in rows if r["group"] == "port"]
    clean = [r for r in s if not r["holds_boat"]]
    boat = [r for r in s if r["holds_boat"]]
    labelled = [r for r in p if r["wake_by_eye"] is not None]
    out = {
        "crops": len(c),
        "crops_found": sum(r["wake"] for r in c),
        "crops_with_speed": sum(r["speed_knots"] is not None for r in c),
        "more_crops": len(m),
        "more_crops_found": sum(r["wake"] for r in m),
        "more_crops_found_within_15deg": sum(
            r["wake"] and r.get("heading_error_deg") is not None and abs(r["heading_error_deg"]) <= 15 for r in m
        ),
        "headings_compared_by_eye": len(errs),
        "heading_abs_error_median_deg": None if not errs else round(float(np.median([abs(e) for e, _ in errs])), 1),
        "heading_within_2sigma": sum(v <= 2 for v in z),
        "heading_within_3sigma": sum(v <= 3 for v in z),
        "hull_axis_off_deg_of_found_wakes": sorted(r["hull_axis_off_deg"] for r in rows if "hull_axis_off_deg" in r),
        "sea_points_clean": len(clean),
        "sea_false_alarms_clean": sum(r["wake"] for r in clean),
        "sea_clean_tiles_with_alarm": len({r["file"] for r in clean if r["wake"]}),
        "sea_points_in_boat_tiles": len(boat),
        "sea_wakes_in_boat_tiles": sum(r["wake"] for r in boat),
        "sea_named_false_alarms_clean": sum(r["wake"] for r in named if not r["holds_boat"]),
        "sea_named_wakes_in_boat_tiles": sum(r["wake"] for r in named if r["holds_boat"]),
        "sea_named_speeds": sum(r["speed_knots"] is not None for r in named),
        "port_vessels": len(p),
        "port_vessels_labelled": len(labelled),
        "port_wakes_by_eye": sum(r["wake_by_eye"] for r in labelled),
        "port_found_of_wakes_by_eye": sum(r["wake"] and r["wake_by_eye"] for r in labelled),
        "port_false_alarms_no_wake_by_eye": sum(r["wake"] and not r["wake_by_eye"] for r in labelled),
        "port_found_unlabelled": sum(r["wake"] for r in p if r["wake_by_eye"] is None),
    }
    cand = [r for r in rows if r["group"] == "candidate"]
    if cand:
        seen = [r["by_eye"] for r in cand if r["wake"]]
        out |= {
            "finder_candidates": len(cand),
            "finder_candidates_with_a_wake": len(seen),
            "of_which_vessel_with_a_trail_by_eye": seen.count("vessel with a trail"),
            "of_which_no_vessel_by_eye": seen.count("no vessel"),
            "of_which_unclear_or_not_reviewed": sum(s not in ("vessel with a trail", "no vessel") for s in seen),
        }
    return out


def _eye_labels() -> dict:
    if not EYE_LABELS.exists():
        return {}
    labels = {}
    for r in csv.DictReader(EYE_LABELS.open()):
        seen = r["wake_visible"].strip().lower()
        if seen in ("yes", "no"):  # "unclear" stays unlabelled
            labels[r["vessel"]] = seen == "yes"
    return labels


if __name__ == "__main__":
    args, tuning = parse(
        __doc__.splitlines()[0],
        [
            ("realdata", str, str(HERE.parents[1] / "shared" / "realdata"), "the shared real-data folder"),
            ("pictures", str, str(Path(tempfile.gettempdir()) / "wakemeter_real_sweep"), "folder for pictures"),
        ],
    )
    root, pics = Path(args.realdata), Path(args.pictures)
    pics.mkdir(parents=True, exist_ok=True)
    rows = crops(root, pics, tuning) + more_crops(root, pics, tuning) + sea_tiles(root, pics, tuning)
    rows += sea_tiles(root, pics, tuning, named=True)
    rows += ports(root, pics, tuning, _eye_labels())
    rows += port_candidates(root, pics, tuning)
    print(f"pictures in {pics}")
    record("real_sweep", {}, tuning, summarise(rows), rows, write=not args.no_record)
