"""Safe file writing: nothing half-written, nothing silently replaced, no leftovers.

* :func:`atomic_write_bytes` - one file: a hidden temporary file in the target folder, then a rename.
* :func:`publish_folder` - a set of files (the evidence) written into a hidden temporary folder and
  published by one rename; the name is claimed exclusively (a second writer gets an error, never a mix).
* :func:`clean_stale` - hidden temporary files and folders of ours whose writer is gone (killed) are
  removed on the next write into that folder; a replaced set caught half-way is put back.

Our temporary names carry the writing process' id (``.NAME.wmtmp-PID-RANDOM``), so a live writer's files
are never taken for leftovers.  The umask is read once, when this module is first imported (in the main
thread, at start-up): reading it by setting it is not thread-safe.
"""

from __future__ import annotations

import errno
import os
import re
import secrets
import shutil
import time
from collections.abc import Callable
from pathlib import Path

#: how a temporary name of ours looks: .<name>.wmtmp-<pid>-<random>[.<kind>]
_TEMP = re.compile(r"^\.(?P<name>.+)\.wmtmp-(?P<pid>\d+)-[0-9a-f]{8}(?P<kind>\.replaced)?(?P<ext>\.[A-Za-z0-9]+)?$")
#: a leftover older than this is removed even when its process id is in use again (ids are reused)
STALE_AFTER_S = 24 * 3600


def _read_umask() -> int:
    try:  # Linux 4.7+: read without changing it
        for line in Path("/proc/self/status").read_text().splitlines():
            if line.startswith("Umask:"):
                return int(line.split()[1], 8)
    except (OSError, ValueError, IndexError):
        pass
    mask = os.umask(0o022)
    os.umask(mask)
    return mask


UMASK = _read_umask()

#: test hook: called with the name of each step of a safe write (a test makes it kill the process there)
step_hook: Callable[[str], None] | None = None


def step(name: str) -> None:
    if step_hook is not None:
        step_hook(name)


FILE_MODE = 0o666 & ~UMASK
DIR_MODE = 0o777 & ~UMASK


def temp_name(target: Path, kind: str = "", ext: str = "") -> Path:
    """A hidden name of ours beside ``target``, marked with this process' id (``ext``: an extension a writer
    needs to see, such as ``.gpkg``)."""
    return target.parent / f".{target.name}.wmtmp-{os.getpid()}-{secrets.token_hex(4)}{kind}{ext}"


def _alive(pid: int) -> bool:
    if pid == os.getpid():
        return True
    try:
        os.kill(pid, 0)
    except ProcessLookupError:
        return False
    except PermissionError:  # someone else's process: alive
        return True
    return True


def remove_tree(p: Path) -> None:
    """Remove a file or a folder of ours, quietly."""
    _remove(p)


def _remove(p: Path) -> None:
    if p.is_dir() and not p.is_symlink():
        shutil.rmtree(p, ignore_errors=True)
    else:
        p.unlink(missing_ok=True)


def clean_stale(folder: str | os.PathLike) -> list[str]:
    """Remove our temporary files and folders in ``folder`` left by a writer that is gone; a replaced
    evidence set whose new set never arrived is put back.  Returns what was done, one line each."""
    done: list[str] = []
    try:
        entries = list(os.scandir(os.fspath(folder)))
    except OSError:
        return done
    now = time.time()
    for e in entries:
        m = _TEMP.match(str(e.name))
        if m is None:
            continue
        try:
            age = now - e.stat(follow_symlinks=False).st_mtime
        except OSError:
            continue
        if _alive(int(m["pid"])) and age < STALE_AFTER_S:
            continue
        p = Path(e.path)
        original = p.parent / m["name"]
        if m["kind"] and not m["ext"] and not original.exists():
            try:  # the old set was moved aside and the new one never published: the old one comes back
                os.rename(p, original)
                done.append(f"restored {original.name}")
                continue
            except OSError:
                pass
        try:
            _remove(p)
        except OSError:  # a folder we may read but not change: leave it for a writer that can
            continue
        done.append(f"removed {e.name}")
    return done


def atomic_write_bytes(target: str | os.PathLike, data: bytes) -> Path:
    """Write ``data`` to ``target`` atomically with the usual permissions; raises OSError on failure."""
    target = Path(target)
    clean_stale(target.parent)
    tmp = temp_name(target)
    try:
        fd = os.open(tmp, os.O_WRONLY | os.O_CREAT | os.O_EXCL, 0o600)
        with os.fdopen(fd, "wb") as fh:
            fh.write(data)
            fh.flush()
            os.fsync(fh.fileno())
        os.chmod(tmp, FILE_MODE)
        step("file written")
        os.replace(tmp, target)
        step("file in place")
    finally:
        tmp.unlink(missing_ok=True)
    return target


def new_temp_folder(target: Path) -> Path:
    """A hidden, empty folder beside ``target`` to write a set into (publish it with :func:`publish_folder`)."""
    clean_stale(target.parent)
    tmp = temp_name(target)
    tmp.mkdir(mode=0o700)
    return tmp


class NameTaken(FileExistsError):
    """The published name exists and replacing it was not allowed."""


def publish_folder(tmp: Path, target: Path, *, replace: bool = False) -> None:
    """Publish the finished folder ``tmp`` as ``target`` in one rename.

    Without ``replace`` the name is claimed exclusively: if ``target`` exists (or another writer publishes
    it first), :class:`NameTaken` is raised and ``tmp`` is left for the caller to remove.  With ``replace``
    the old set is moved aside, the new one renamed in, and the old one removed; a crash between the two
    renames leaves the old set hidden and :func:`clean_stale` puts it back.  Never a mix of old and new."""
    for f in tmp.iterdir():
        os.chmod(f, FILE_MODE)
    os.chmod(tmp, DIR_MODE)
    aside = None
    if target.exists() or target.is_symlink():
        if not replace:
            raise NameTaken(f"{target.name} already exists in {target.parent}")
        aside = temp_name(target, ".replaced")
        os.rename(target, aside)
        step("old set moved aside")
    try:
        # rename() onto an existing non-empty folder fails (ENOTEMPTY/EEXIST): a concurrent writer loses
        os.rename(tmp, target)
    except OSError as err:
        if aside is not None:
            os.rename(aside, target)
        if err.errno in (errno.ENOTEMPTY, errno.EEXIST):
            raise NameTaken(f"{target.name} already exists in {target.parent}") from err
        raise
    if aside is not None:
        step("new set in place")
        _remove(aside)
