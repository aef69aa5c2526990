"""Bounds checked from a raster's declared sizes before any pixel is read, so that a small crafted file
cannot make one read allocate gigabytes (a TIFF declaring 65 535 samples per pixel, or one compressed
strip that inflates to gigabytes), and a file whose every block is empty is called empty, not zeros."""

from __future__ import annotations

from pathlib import Path

import numpy as np

from ..errors import SceneReadError

#: more bands than any multispectral or hyperspectral product we read (a few hundred at most)
MAX_BANDS = 2048
#: the largest single block (tile or strip) GDAL must inflate to read any pixel of it
MAX_BLOCK_BYTES = 256 * 1024**2
#: how many blocks are looked at to tell an empty file (evenly spread over the raster)
EMPTY_CHECK_BLOCKS = 4096


def check_declared_sizes(p: Path, ds) -> None:
    """Raise :class:`SceneReadError` when the declared layout would need more memory than allowed."""
    if ds.count > MAX_BANDS:
        raise SceneReadError(
            f"{p.name}: the file declares {ds.count} bands per pixel; wakemeter reads at most {MAX_BANDS} "
            "(the file may be damaged or crafted)"
        )
    item = np.dtype(ds.dtypes[0]).itemsize
    rows, cols = ds.block_shapes[0]
    per_pixel = ds.count if str(getattr(ds.interleaving, "value", ds.interleaving)).lower() == "pixel" else 1
    block = int(rows) * int(cols) * item * per_pixel
    if block > MAX_BLOCK_BYTES:
        raise SceneReadError(
            f"{p.name}: one block of this file holds {rows} x {cols} pixels x {per_pixel} band(s) "
            f"({block / 1024**2:,.0f} MB once unpacked), more than the {MAX_BLOCK_BYTES // 1024**2} MB one read "
            "may take; re-save it tiled (for example: gdal_translate -co TILED=YES in.tif out.tif)"
        )


def check_not_empty(p: Path, ds) -> None:
    """A GeoTIFF whose every block has zero bytes holds no pixels: refuse it instead of reading zeros."""
    if ds.driver != "GTiff":
        return
    rows, cols = ds.block_shapes[0]
    n_r, n_c = -(-ds.height // int(rows)), -(-ds.width // int(cols))
    total = n_r * n_c
    picks = np.unique(np.linspace(0, total - 1, min(total, EMPTY_CHECK_BLOCKS)).astype(np.int64))
    for k in picks:
        r, c = divmod(int(k), n_c)
        # GDAL gives no size for a block that is absent from the file (offset and byte count 0)
        size = ds.get_tag_item(f"BLOCK_SIZE_{c}_{r}", "TIFF", bidx=1)
        if size is not None and int(size) > 0:
            return
    raise SceneReadError(
        f"{p.name}: the file holds no pixel data (every block of it is empty); it may be an incomplete download"
    )


#: folders whose files are never image data: a format that refers to other files (VRT and the like) may
#: not read from them unless the user confirms
SYSTEM_FOLDERS = (
    "/etc",
    "/proc",
    "/sys",
    "/dev",
    "/boot",
    "/run",
    "/usr",
    "/bin",
    "/sbin",
    "/lib",
    "/lib64",
    "/var/log",
    "/var/lib",
    "/var/run",
    "/var/spool",
    "/var/mail",
    "/var/cache",
)
#: hidden folders in the home folder that hold keys and settings
PRIVATE_HOME_FOLDERS = (".ssh", ".gnupg", ".aws", ".config", ".local/share/keyrings", ".netrc", ".kube")


class ReferencedFilesError(SceneReadError):
    """The scene reads files it should not without the user's say (``files`` names them)."""

    def __init__(self, message: str, files: tuple[str, ...]):
        super().__init__(message)
        self.files = files


def system_file(path: str) -> bool:
    """True for a path in a system folder, a private folder of the home, or a GDAL virtual file system
    (network and archive readers such as /vsicurl/)."""
    if path.startswith("/vsi") and not path.startswith("/vsimem/"):
        return True
    try:
        real = Path(path).resolve()
    except (OSError, RuntimeError):
        return True
    home = Path.home()
    folders = [Path(f) for f in SYSTEM_FOLDERS] + [home / name for name in PRIVATE_HOME_FOLDERS]
    return any(real == f or f in real.parents for f in folders)


def check_referenced_files(
    p: Path, files: tuple[str, ...], *, allow_system_files: bool, archive: Path | None = None
) -> None:
    """Refuse a scene that reads system or private files (a crafted VRT can show any file as an image).  Files
    read inside ``archive`` (the zip the user opened, through /vsizip/) are that file's own."""
    own = f"/vsizip/{archive}/" if archive is not None else None
    others = tuple(f for f in files if Path(f).resolve() != p.resolve() and not (own and f.startswith(own)))
    bad = tuple(f for f in others if system_file(f))
    if bad and not allow_system_files:
        raise ReferencedFilesError(
            f"{p.name} reads other files, some of them system or private files ({', '.join(bad[:3])}"
            + (", ..." if len(bad) > 3 else "")
            + "); wakemeter does not open them without your confirmation",
            bad,
        )
