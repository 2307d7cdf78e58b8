"""Atomic file writes: a temporary file in the same folder, then a rename.

An interrupted save never leaves a half-written file (shared/CONTRACT.md section 7), and
a save never costs the user a file:

* a symbolic link is written through to its target (the link stays a link);
* a read-only file is not replaced unless the caller says so (``replace_read_only``);
* a file name longer than the file system allows is a clear error before anything is
  written, and the temporary name is short, so a name at the limit still works;
* temporary files left behind by a killed writer of ours (``.glidetask-PID-….tmp``) are
  removed by the next write in that folder.
"""

from __future__ import annotations

import errno
import os
import secrets
import time
from pathlib import Path

TEMP_PREFIX = ".glidetask-"
TEMP_SUFFIX = ".tmp"
STALE_AFTER_S = 24 * 3600.0  # a temporary file this old is stale even if its process id lives again


def write_target(path: str | os.PathLike) -> Path:
    """The file a write to ``path`` changes: ``path`` itself, or the end of its symbolic links.

    Raises
    ------
    OSError
        ELOOP for a symbolic link loop.
    """
    real = Path(os.path.realpath(os.fspath(path)))
    if os.path.islink(real):  # realpath stops at a loop
        raise OSError(errno.ELOOP, "is a symbolic link loop", os.fspath(path))
    return real


def _name_max(folder: Path) -> int:
    try:
        return os.pathconf(folder, "PC_NAME_MAX")
    except (OSError, ValueError, AttributeError):
        return 255


def _process_alive(pid: int) -> bool:
    try:
        os.kill(pid, 0)
    except ProcessLookupError:
        return False
    except (PermissionError, OverflowError, ValueError):
        return True  # someone else's process: not ours to judge
    return True


def clean_stale_temporaries(folder: Path, now: float | None = None) -> list[Path]:
    """Remove our own temporary files in ``folder`` whose writer is gone; the removed paths."""
    now = time.time() if now is None else now
    removed = []
    try:
        entries = list(os.scandir(folder))
    except OSError:
        return removed
    for entry in entries:
        name = entry.name
        if not (name.startswith(TEMP_PREFIX) and name.endswith(TEMP_SUFFIX)):
            continue
        pid_text = name[len(TEMP_PREFIX):].split("-", 1)[0]
        try:
            pid = int(pid_text)
            if not entry.is_file(follow_symlinks=False):
                continue
            old = now - entry.stat(follow_symlinks=False).st_mtime > STALE_AFTER_S
        except (ValueError, OSError):
            continue
        if pid == os.getpid() and not old:
            continue  # a write of this process in progress (another thread)
        if old or not _process_alive(pid):
            try:
                os.unlink(entry.path)
                removed.append(Path(entry.path))
            except OSError:
                pass
    return removed


def write_atomic(path: str | os.PathLike, data: str | bytes, encoding: str = "utf-8", *,
                 replace_read_only: bool = False) -> Path:
    """Write ``data`` to ``path`` so that readers see the old file or the new one, never a mix.

    Returns the file written (the target of ``path`` if it is a symbolic link).

    Raises
    ------
    OSError
        The folder is missing or not writable, the name is too long (ENAMETOOLONG), the
        file is read-only (EACCES, unless ``replace_read_only``), or a link loops (ELOOP).
    """
    target = write_target(path)
    folder = target.parent
    name_bytes, limit = len(os.fsencode(target.name)), _name_max(folder)
    if name_bytes > limit:
        raise OSError(errno.ENAMETOOLONG, f"the file name is {name_bytes} bytes; this file system allows "
                                          f"at most {limit}", os.fspath(path))
    if target.is_dir():
        raise IsADirectoryError(errno.EISDIR, "is a folder", os.fspath(path))
    exists = target.exists()
    if exists and not replace_read_only and not os.access(target, os.W_OK):
        raise PermissionError(errno.EACCES, "the file is read-only; it was not replaced", os.fspath(path))
    clean_stale_temporaries(folder)
    payload = data.encode(encoding) if isinstance(data, str) else data
    tmp_name = os.path.join(folder, f"{TEMP_PREFIX}{os.getpid()}-{secrets.token_hex(4)}{TEMP_SUFFIX}")
    fd = os.open(tmp_name, os.O_WRONLY | os.O_CREAT | os.O_EXCL, 0o600)
    try:
        with os.fdopen(fd, "wb") as handle:
            handle.write(payload)
            handle.flush()
            os.fsync(handle.fileno())
        os.chmod(tmp_name, (target.stat().st_mode & 0o777) if exists else 0o644)
        os.replace(tmp_name, target)
    except BaseException:
        try:
            os.unlink(tmp_name)
        except FileNotFoundError:
            pass
        raise
    _sync_folder(folder)
    return target


def _sync_folder(folder: Path) -> None:
    """Make the rename itself durable (best effort: not every system can open a folder)."""
    try:
        fd = os.open(folder, os.O_RDONLY)
    except OSError:
        return
    try:
        os.fsync(fd)
    except OSError:
        pass
    finally:
        os.close(fd)
