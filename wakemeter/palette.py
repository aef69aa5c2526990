"""One palette for everything the program draws: the window's canvas and the evidence picture use the same
colours for the same things (RGB, 0-255), so a mark on screen looks like its mark in the report."""

from __future__ import annotations

#: what is drawn -> its colour
COLOURS: dict[str, tuple[int, int, int]] = {
    "vessel": (70, 230, 110),
    "track": (255, 200, 0),
    "arm": (255, 60, 170),
    "crest": (80, 200, 255),
    "ruler": (240, 240, 240),
    "calibration": (255, 140, 40),
    "report": (190, 150, 255),
    "chip": (120, 170, 255),
    "narrow_v": (170, 255, 240),
    "text": (255, 255, 255),
    "box": (20, 24, 32),
    "north": (255, 255, 255),
}
#: the analysis's own marks are drawn a little transparent on screen, above the analyst's (0-255)
FINDING_ALPHA = {"track": 170, "arm": 170, "chip": 150, "crest": 150, "narrow_v": 190}

#: what each colour of the evidence picture shows (its legend, in the report)
LEGEND: dict[str, str] = {
    "vessel": "vessel (circle); a radar hull away from its wake (square)",
    "track": "track behind the vessel (heading)",
    "arm": "wake arms found",
    "narrow_v": "radar narrow-V arms",
    "chip": "area analysed",
    "crest": "crest lines fitted",
}
