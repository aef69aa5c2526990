"""The vessel finder measured against real vessel outlines and against synthetic fleets of known truth.

Real: the Sentinel-2 port scenes in ../shared/realdata/sentinel2_ports (COCO outlines of their vessels, made
for ship detection; MIT licence).  A detection is a hit when its centre lies inside an outline dilated by one
pixel; the rest are false detections (per km² of the searched scene; land included, since the finder masks it
itself).  Detection rate is given by outline size (pixels of the outline).

Synthetic: Sentinel-2-like fleets (wakemeter.synth.fleet + multispectral): hits within 2 px of the hull.

    .venv/bin/python benchmarks/vessel_finder_sweep.py [--record]
"""

from __future__ import annotations

import argparse
import json
import sys
import tempfile
import time
from pathlib import Path

import numpy as np
from scipy import ndimage

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))
from wakemeter.detect.vessel_finder import PFA_PER_KM2, find_vessels  # noqa: E402
from wakemeter.scene.raster import open_scene  # noqa: E402

sys.path.insert(0, str(ROOT / "benchmarks"))
from real_sweep import port_scenes  # noqa: E402

REAL = ROOT.parent / "shared" / "realdata" / "sentinel2_ports"
SIZE_CLASSES = ((0, 20), (20, 60), (60, 200), (200, 10**9))  #: outline pixels (10 m map pixels)
RECORD = ROOT / "benchmarks" / "results" / "vessel_finder_sweep.json"


def rle_mask(seg: dict) -> np.ndarray:
    """COCO's uncompressed run-length encoding: counts alternate background and object runs, column-major
    (Lin et al. 2014, the COCO data format)."""
    h, w = seg["size"]
    flat = np.zeros(h * w, bool)
    pos, val = 0, False
    for n in seg["counts"]:
        if val:
            flat[pos : pos + n] = True
        pos += n
        val = not val
    return flat.reshape((w, h)).T


TILES = ROOT.parent / "shared" / "realdata" / "sentinel2_sea_tiles" / "index.csv"
#: what a person saw at each candidate the finder gave on the clean-sea tiles (judgement, not ground truth): the
#: tiles' labels were given to whole tiles for wakes, and several hold small boats, buoys or a plume
REVIEW = ROOT / "benchmarks" / "vessel_finder_clean_sea_review.csv"


def clean_sea_review() -> dict[str, list[tuple[float, float, str]]]:
    import csv

    out: dict[str, list[tuple[float, float, str]]] = {}
    for r in csv.DictReader(open(REVIEW)):
        out.setdefault(r["port"], []).append((float(r["col"]), float(r["row"]), r["by_eye"]))
    return out


def by_eye(review: list[tuple[float, float, str]], col: float, row: float) -> str:
    """The reviewer's word for the candidate at (col, row): the nearest reviewed point within 6 px (the points were
    reviewed at the finder's peak; the finder now gives the centre of the hull's outline, up to half a hull away)."""
    near = [(np.hypot(c - col, r - row), what) for c, r, what in review]
    d, what = min(near, default=(np.inf, ""))
    return what if d <= 6.0 else "not reviewed"


#: an outline whose pixels are mostly water by NDWI lies on open water; the rest lie alongside or in a basin
OPEN_WATER_SHARE = 0.7


def clean_tiles() -> dict[str, list[tuple[int, int, int]]]:
    """Sea tiles labelled by eye as holding no vessel (clean sea and hard negatives): scene -> (row0, col0, size)."""
    import csv

    out: dict[str, list[tuple[int, int, int]]] = {}
    if not TILES.exists():
        return out
    for r in csv.DictReader(open(TILES)):
        label = r["visual_label_by_helper"].lower()
        if "contains" in label or "ambiguous" in label:
            continue
        out.setdefault(r["scene"], []).append((int(r["row0"]), int(r["col0"]), int(r["size_px"])))
    return out


#: the single band kept for the single-band runs (the stack holds B02, B03, B04, B08: band 3 is red)
SINGLE_BAND = 3
#: dry areas (NDWI <= 0) at least this large stand for the land layer an analyst would give (the largest
#: ships are about 0.024 km²: no hull is taken for land)
LAND_MIN_KM2 = 0.1


def _single_band(stack: Path, out: Path) -> Path:
    """The stack's red band alone, without band names: a scene with no water index."""
    import rasterio

    with rasterio.open(stack) as src:
        prof = src.profile | {"count": 1}
        band = src.read(SINGLE_BAND)
    with rasterio.open(out, "w", **prof) as dst:
        dst.write(band, 1)
    return out


def _land_layer(stack: Path, out: Path) -> Path:
    """A land layer (GeoJSON in WGS 84, as analysts have them) from the stack's large dry areas by NDWI."""
    import rasterio
    import shapely
    from pyproj import Transformer
    from rasterio.features import shapes

    from wakemeter.evidence.gis import Feature, write_features

    with rasterio.open(stack) as src:
        g, n = src.read(2).astype(float), src.read(4).astype(float)
        transform, crs = src.transform, src.crs
    dry = ((g - n) / np.maximum(g + n, 1e-6) <= 0).astype(np.uint8)
    lab, _k = ndimage.label(dry)
    px_km2 = abs(transform.a * transform.e) / 1e6
    big = np.isin(lab, [i for i, c in enumerate(np.bincount(lab.ravel())) if i and c * px_km2 >= LAND_MIN_KM2])
    to_wgs = Transformer.from_crs(crs, "EPSG:4326", always_xy=True)
    feats = []
    for geom, _val in shapes(big.astype(np.uint8), mask=big, transform=transform):
        poly = shapely.geometry.shape(geom)
        poly = shapely.transform(poly, lambda xy: np.column_stack(to_wgs.transform(xy[:, 0], xy[:, 1])))
        feats.append(Feature("land", poly, {"kind": "land"}))
    return write_features(out, feats, force=True)


def real_ports(pfa: float, single: str | None = None) -> dict:
    """The real ports as they are (four bands, NDWI), or ``single``: their red band alone ("alone") or with a
    land layer made from their large dry areas ("with land")."""
    per_class = {f"{lo}-{hi}": [0, 0] for lo, hi in SIZE_CLASSES}
    where = {"open water": [0, 0], "alongside or in a basin": [0, 0]}
    false, area_km2, rows = 0, 0.0, []
    clean = clean_tiles()
    review = clean_sea_review()
    clean_false, clean_km2 = 0, 0.0
    clean_seen: dict[str, int] = {}
    centre_off: list[float] = []  # a hit's distance from its outline's centre, px
    with tempfile.TemporaryDirectory() as tmp:
        for port_dir, path, j in port_scenes(REAL, Path(tmp)):
            scene_path, land = path, None
            if single is not None:
                scene_path = _single_band(path, Path(tmp) / f"{port_dir.name}_red.tif")
            with open_scene(scene_path) as sc:
                anns = [a for a in j["annotations"] if tuple(a["segmentation"]["size"]) == (sc.height, sc.width)]
                if not anns:
                    continue
                if single == "with land":
                    from wakemeter.scene.land_layer import LandLayer

                    land = LandLayer.read(_land_layer(path, Path(tmp) / f"{port_dir.name}_land.geojson"), sc.georef)
                t0 = time.perf_counter()
                cands = find_vessels(sc, pfa_per_km2=pfa, land=land)
                dt = time.perf_counter() - t0
                fr = sc.local_frame(sc.width / 2, sc.height / 2)
                km2 = sc.width * sc.height * fr.length_of(1, 0) * fr.length_of(0, 1) / 1e6
            with open_scene(path) as sc:
                d, ok = sc.read(bands=(2, 4))
            ndwi = (d[0] - d[1]) / np.maximum(d[0] + d[1], 1e-6)
            wet = ok.all(axis=0) & (ndwi > 0)
            raw = [rle_mask(a["segmentation"]) for a in anns]
            masks = [ndimage.binary_dilation(m) for m in raw]
            kinds = ["open water" if wet[m].mean() > OPEN_WATER_SHARE else "alongside or in a basin" for m in raw]
            px_km2 = km2 / (wet.shape[0] * wet.shape[1])
            for r0, c0, size in clean.get(port_dir.name, []):
                clean_km2 += size * size * px_km2
                for c in cands:
                    if r0 <= c.px[1] < r0 + size and c0 <= c.px[0] < c0 + size:
                        clean_false += 1
                        what = by_eye(review.get(port_dir.name, []), c.px[0], c.px[1])
                        clean_seen[what] = clean_seen.get(what, 0) + 1
            hit = [False] * len(anns)
            n_false = 0
            for c in cands:
                col, row = int(round(c.px[0])), int(round(c.px[1]))
                inside = [
                    i for i, m in enumerate(masks) if 0 <= row < m.shape[0] and 0 <= col < m.shape[1] and m[row, col]
                ]
                for i in inside:
                    hit[i] = True
                if inside:
                    rr, cc = np.nonzero(raw[inside[0]])  # the outline's centre (GDAL's pixel-centre convention)
                    centre_off.append(float(np.hypot(c.px[0] - cc.mean() - 0.5, c.px[1] - rr.mean() - 0.5)))
                n_false += not inside
            for a, h, k in zip(anns, hit, kinds):
                where[k][0] += h
                where[k][1] += 1
                for lo, hi in SIZE_CLASSES:
                    if lo <= a["area"] < hi:
                        per_class[f"{lo}-{hi}"][0] += h
                        per_class[f"{lo}-{hi}"][1] += 1
            false += n_false
            area_km2 += km2
            rows.append(
                {
                    "port": port_dir.name,
                    "outlines": len(anns),
                    "found": int(sum(hit)),
                    "false": n_false,
                    "km2": round(km2, 1),
                    "seconds": round(dt, 2),
                }
            )
            print(rows[-1], flush=True)
    found = sum(v[0] for v in per_class.values())
    total = sum(v[1] for v in per_class.values())
    return {
        "ports": rows,
        "detection_by_outline_pixels": {k: f"{v[0]}/{v[1]}" for k, v in per_class.items()},
        "detection_by_place": {k: f"{v[0]}/{v[1]}" for k, v in where.items()},
        "false_on_clean_sea_tiles": clean_false,
        "clean_sea_km2": round(clean_km2, 2),
        "clean_sea_candidates_by_eye": dict(sorted(clean_seen.items())),
        "clean_sea_nothing_clear_or_seam_per_km2": round(
            (clean_seen.get("nothing clear", 0) + clean_seen.get("detector seam", 0)) / max(clean_km2, 1e-9), 3
        ),
        "detected": f"{found}/{total}",
        "hits_within_2px_of_outline_centre": f"{sum(d <= 2.0 for d in centre_off)}/{len(centre_off)}",
        "hits_median_px_from_outline_centre": round(float(np.median(centre_off)), 2) if centre_off else None,
        "unmatched_detections": false,
        "note": "unmatched detections include small boats the outlines leave out (several are plainly boats)",
        "unmatched_per_km2": round(false / max(area_km2, 1e-9), 3),
        "km2": round(area_km2, 1),
    }


def synthetic_fleets(n_scenes: int, per_scene: int) -> dict:
    from wakemeter.synth import write
    from wakemeter.synth.fleet import fleet_spec
    from wakemeter.synth.multispectral import BANDS as MB
    from wakemeter.synth.multispectral import MultispectralLook, render_multispectral

    hits = total = false = 0
    worst = 0.0
    with tempfile.TemporaryDirectory() as tmp:
        for seed in range(n_scenes):
            spec = fleet_spec(per_scene, seed=seed, size=768, pixel_m=10.0)
            tif, _ = write(
                render_multispectral(spec, MultispectralLook()).rendered, Path(tmp) / f"f{seed}.tif", band_names=MB
            )
            truth = json.loads(tif.with_suffix(".truth.json").read_text())["vessels"]
            with open_scene(tif) as sc:
                cands = find_vessels(sc)
            used = set()
            for v in truth:
                d = [np.hypot(c.px[0] - v["pixel_col"], c.px[1] - v["pixel_row"]) for c in cands]
                i = int(np.argmin(d)) if d else -1
                total += 1
                if i >= 0 and d[i] <= 2.0:
                    hits += 1
                    used.add(i)
                    worst = max(worst, d[i])
            false += len(cands) - len(used)
    return {
        "scenes": n_scenes,
        "vessels": total,
        "found_within_2px": hits,
        "false": false,
        "worst_offset_px": round(worst, 2),
    }


#: single-band fleets: (kind, pixel size m, vessels per scene, spacing m, hull lengths m); the scenes are 1024 px
SINGLE_BAND_FLEETS = (
    ("optical", 0.5, 3, 150.0, (6.0, 30.0)),
    ("optical", 2.0, 4, 500.0, (10.0, 60.0)),
    ("optical", 5.0, 5, 1000.0, (15.0, 80.0)),
    ("radar", 5.0, 5, 1000.0, (20.0, 80.0)),
    ("radar", 10.0, 5, 1500.0, (30.0, 120.0)),
)


#: the fleets' sensor blur (pixels; transfer 0.2 at the Nyquist frequency, synth/imaging.py)
SENSOR_BLUR_PX = 0.57


def _score(cands, truth) -> tuple[int, int, int, int, float, list[float]]:
    """(found within 2 px, found within half the hull's length, vessels found more than once, false, worst
    offset px, each found vessel's offset px): every candidate is given to its nearest vessel when within half
    that vessel's length (at least 2 px); the rest are false."""
    near2 = near_half = twice = false = 0
    worst = 0.0
    per_vessel = [0] * len(truth)
    best = [np.inf] * len(truth)
    for c in cands:
        # at the imaged hull (a radar shows a moving hull displaced along the track) or at the vessel's true
        # position (where its wake starts), whichever is nearer
        d = [
            min(
                np.hypot(c.px[0] - v["pixel_col"], c.px[1] - v["pixel_row"]),
                np.hypot(
                    c.px[0] - v.get("hull_pixel_col", v["pixel_col"]), c.px[1] - v.get("hull_pixel_row", v["pixel_row"])
                ),
            )
            for v in truth
        ]
        i = int(np.argmin(d)) if d else -1
        reach = max(2.0, 0.5 * truth[i]["hull_length_m"] / truth[i]["_pixel_m"]) if i >= 0 else 0.0
        if i >= 0 and d[i] <= reach:
            per_vessel[i] += 1
            best[i] = min(best[i], d[i])
        else:
            false += 1
    for k, b in zip(per_vessel, best):
        near_half += k > 0
        near2 += int(b <= 2.0)
        twice += k > 1
        if k:
            worst = max(worst, float(b))
    return near2, near_half, twice, false, worst, [float(b) for k, b in zip(per_vessel, best) if k]


def single_band_fleets(n_scenes: int) -> list[dict]:
    from wakemeter.synth import write
    from wakemeter.synth.fleet import fleet_spec
    from wakemeter.synth.imaging import OpticalModel, RadarModel
    from wakemeter.synth.scene_maker import render

    out = []
    with tempfile.TemporaryDirectory() as tmp:
        for kind, pixel_m, per_scene, spacing, lengths in SINGLE_BAND_FLEETS:
            tot = [0, 0, 0, 0, 0, 0.0]
            offsets: list[float] = []
            km2 = 0.0
            seconds = 0.0
            for seed in range(n_scenes):
                spec = fleet_spec(
                    per_scene,
                    seed=seed,
                    size=1024,
                    pixel_m=pixel_m,
                    spacing_m=spacing,
                    length_m=lengths,
                    # as a sensor sees them: blurred by its point-spread function (synth/imaging.py)
                    imaging=RadarModel(psf_sigma_px=SENSOR_BLUR_PX)
                    if kind == "radar"
                    else OpticalModel(psf_sigma_px=SENSOR_BLUR_PX),
                )
                tif, _ = write(render(spec), Path(tmp) / f"{kind}{pixel_m}-{seed}.tif")
                truth = json.loads(tif.with_suffix(".truth.json").read_text())["vessels"]
                for v in truth:
                    v["_pixel_m"] = pixel_m
                with open_scene(tif) as sc:
                    t0 = time.perf_counter()
                    cands = find_vessels(sc)
                    seconds += time.perf_counter() - t0
                s = _score(cands, truth)
                for k in range(4):
                    tot[k] += s[k]
                tot[4] += len(truth)
                tot[5] = max(tot[5], s[4])
                offsets += s[5]
                km2 += (1024 * pixel_m / 1000) ** 2
            row = {
                "kind": kind,
                "pixel_m": pixel_m,
                "vessels": tot[4],
                "found_within_2px": tot[0],
                "found_within_half_hull": tot[1],
                "found_more_than_once": tot[2],
                "false": tot[3],
                "false_per_km2": round(tot[3] / km2, 3),
                "worst_offset_px": round(tot[5], 2),
                "median_offset_px": round(float(np.median(offsets)), 2) if offsets else None,
                "seconds_per_scene": round(seconds / n_scenes, 2),
            }
            print(row, flush=True)
            out.append(row)
    return out


DEMO = ROOT / "sample_scenes"


def demo_scenes() -> list[dict]:
    """Every bundled demo scene: each vessel found once (within half its hull's length) and nothing else."""
    out = []
    for tif in sorted(DEMO.glob("*.tif")):
        truth = json.loads(tif.with_suffix(".truth.json").read_text())
        for v in truth["vessels"]:
            v["_pixel_m"] = truth["pixel_m"]
        with open_scene(tif) as sc:
            cands = find_vessels(sc)
        s = _score(cands, truth["vessels"])
        row = {
            "scene": tif.stem,
            "vessels": len(truth["vessels"]),
            "candidates": len(cands),
            "found_within_half_hull": s[1],
            "found_more_than_once": s[2],
            "false": s[3],
        }
        print(row, flush=True)
        out.append(row)
    return out


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--record", action="store_true")
    ap.add_argument("--pfa", type=float, default=PFA_PER_KM2)
    ap.add_argument(
        "--only", choices=("real", "real-single-band", "multispectral", "single-band", "demo"), default=None
    )
    args = ap.parse_args()
    out: dict = {"pfa_per_km2": args.pfa}
    want = lambda part: args.only in (None, part)  # noqa: E731
    if want("demo"):
        out["demo"] = demo_scenes()
    if REAL.is_dir() and want("real"):
        out["real"] = real_ports(args.pfa)
    if REAL.is_dir() and want("real-single-band"):
        out["real_red_band_alone"] = real_ports(args.pfa, "alone")
        out["real_red_band_with_land_layer"] = real_ports(args.pfa, "with land")
    if want("multispectral"):
        out["synthetic"] = synthetic_fleets(4, 6)
    if want("single-band"):
        out["single_band"] = single_band_fleets(3)
    print(json.dumps(out, indent=2))
    if RECORD.exists():
        print("recorded:", json.dumps(json.loads(RECORD.read_text()), indent=2))
    if args.record and args.only is None:
        RECORD.write_text(json.dumps(out, indent=2) + "\n")


if __name__ == "__main__":
    main()
