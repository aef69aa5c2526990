"""Reading the XML files of a satellite product (metadata, annotation, calibration tables): parsed with a size
limit, elements found by their local names (namespaces ignored), values checked as numbers and times, every
failure a :class:`~wakemeter.errors.SceneReadError` that names the file."""

from __future__ import annotations

import math
import xml.etree.ElementTree as ET
from datetime import UTC, datetime

from ..errors import SceneReadError

#: the largest metadata file read (a product's is a few hundred kB)
MAX_METADATA_BYTES = 8 * 1024**2


def parse_product_xml(data: bytes, name: str, limit: int = MAX_METADATA_BYTES) -> ET.Element:
    """A product's XML file (metadata, annotation), refused in words when too large or not XML."""
    if len(data) > limit:
        raise SceneReadError(f"{name}: larger than a product's metadata can be")
    try:
        return ET.fromstring(data)
    except ET.ParseError as err:
        raise SceneReadError(f"{name}: the product's metadata is not readable XML ({err})") from err


def local_name(el: ET.Element) -> str:
    """An element's name without its namespace."""
    return el.tag.rsplit("}", 1)[-1]


def find(root: ET.Element, path: str) -> ET.Element | None:
    """The element at a slash-separated path of local names below ``root`` (namespaces ignored)."""
    node: ET.Element | None = root
    for part in path.split("/"):
        if node is None:
            return None
        node = next((c for c in node if local_name(c) == part), None)
    return node


def children(root: ET.Element, path: str, tag: str) -> list[ET.Element]:
    """The elements named ``tag`` in the element at ``path`` (none when it is absent)."""
    parent = find(root, path)
    return [] if parent is None else [c for c in parent if local_name(c) == tag]


def optional_text(root: ET.Element, path: str) -> str:
    """The text at ``path``, or empty when it is absent."""
    el = find(root, path)
    return "" if el is None else (el.text or "").strip()


def text(root: ET.Element, path: str, where: str) -> str:
    """The text at ``path``; a SceneReadError naming ``where`` when it is absent or empty."""
    el = find(root, path)
    if el is None or not (el.text or "").strip():
        raise SceneReadError(
            f"{where}: the annotation has no {path.rsplit('/', 1)[-1]} (not the product it claims to be?)"
        )
    return (el.text or "").strip()


def number(value: str, what: str, where: str) -> float:
    """``value`` as a finite number; a SceneReadError naming ``what`` and ``where`` otherwise."""
    try:
        v = float(value)
    except ValueError as err:
        raise SceneReadError(f"{where}: {what} is not a number ({value[:40]!r})") from err
    if not math.isfinite(v):
        raise SceneReadError(f"{where}: {what} is not a finite number")
    return v


def product_time(value: str, where: str) -> datetime:
    """A product time (UTC, written without a zone: 2023-08-22T05:48:12.123456)."""
    try:
        t = datetime.fromisoformat(value.strip().rstrip("Z"))
    except ValueError as err:
        raise SceneReadError(f"{where}: {value[:40]!r} is not a time") from err
    return t.replace(tzinfo=UTC)


def iso_utc(t: datetime) -> str:
    """ISO 8601 in UTC to the millisecond, with a Z."""
    return t.astimezone(UTC).isoformat(timespec="milliseconds").replace("+00:00", "Z")
