"""Names people and files give to vessels, scenes and cases, made safe to show and store everywhere.

A name may come from a session file, a vessel list, a position report or the command line: control
characters (new lines, tabs, escapes, bidirectional overrides) are shown as a space, runs of white space
become one, and the length is bounded, so the PDF, the picture, the JSON and the GIS layers all carry the
same readable text.
"""

from __future__ import annotations

import unicodedata

#: the longest name kept (characters); a longer one is cut and ends in an ellipsis
MAX_NAME_CHARS = 200


def clean_name(text: object, *, limit: int = MAX_NAME_CHARS) -> str:
    """``text`` as one printable line of at most ``limit`` characters ("" for None)."""
    if text is None:
        return ""
    raw = str(text)
    if len(raw) > 8 * limit:  # never walk megabytes of a crafted name
        raw = raw[: 8 * limit]
    shown = "".join(" " if unicodedata.category(ch)[0] in ("C", "Z") and ch != " " else ch for ch in raw)
    one_line = " ".join(shown.split())
    return one_line if len(one_line) <= limit else one_line[: limit - 1].rstrip() + "\N{HORIZONTAL ELLIPSIS}"
