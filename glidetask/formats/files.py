"""Opening the user's input files safely: only regular files, text up to a size cap.

Every reader of a user file goes through here, so that a folder, a named pipe, a device,
a symlink loop, an over-long path or a huge file is one clear problem (``FILE: file:
WHAT``, saying what the thing is) instead of a hang, a memory blow-up or an internal
error (shared/CONTRACT.md section 7).
"""

from __future__ import annotations

import errno
import os
import stat

from glidetask.errors import InputError

MAX_TEXT_BYTES = 64 * 1024 * 1024  # a turnpoint file of a whole continent is a few MB
_NOT_REGULAR = (
    (stat.S_ISDIR, "is a folder, not a file"),
    (stat.S_ISFIFO, "is a named pipe (FIFO), not a regular file"),
    (stat.S_ISCHR, "is a character device, not a regular file"),
    (stat.S_ISBLK, "is a block device, not a regular file"),
    (stat.S_ISSOCK, "is a socket, not a regular file"),
)


def _os_error_text(error: OSError, path: str) -> str:
    """What an error from the file system means, in the user's terms."""
    if error.errno == errno.ENOENT:
        return "no such file"
    if error.errno == errno.ELOOP:
        return "is a symbolic link loop (the link points back to itself)"
    if error.errno == errno.ENAMETOOLONG:
        return f"the path is too long for the file system ({len(os.fsencode(path))} bytes)"
    if error.errno == errno.ENOTDIR:
        return "no such file (a part of the path is not a folder)"
    if error.errno in (errno.EACCES, errno.EPERM):
        return "permission denied: cannot read it"
    return f"cannot read it: {error.strerror or error}"


def file_problem(path: str | os.PathLike) -> str | None:
    """Why ``path`` cannot be read as a regular file, or None if it can (without opening it)."""
    name = os.fspath(path)
    try:
        status = os.stat(name)
    except (OSError, ValueError) as error:  # ValueError: a NUL byte in the path
        return _os_error_text(error, str(name)) if isinstance(error, OSError) else "not a valid path"
    for test, what in _NOT_REGULAR:
        if test(status.st_mode):
            return what
    if not stat.S_ISREG(status.st_mode):
        return "is not a regular file"
    return None


def read_bytes(path: str | os.PathLike, file: str, *, limit: int = MAX_TEXT_BYTES) -> bytes:
    """The content of a regular file of at most ``limit`` bytes.

    Raises
    ------
    InputError
        ``FILE: file: WHAT`` for anything else: missing, a folder, a FIFO, a device, a
        symlink loop, unreadable, or larger than the cap.
    """
    problem = file_problem(path)
    if problem is not None:
        raise InputError.one(file, "file", problem)
    too_big = f"is larger than {limit // (1024 * 1024)} MB, the limit for a text input file"
    try:
        if os.stat(path).st_size > limit:
            raise InputError.one(file, "file", too_big)
        # O_NONBLOCK: should the file be swapped for a FIFO after the check, opening never blocks.
        fd = os.open(path, os.O_RDONLY | getattr(os, "O_NONBLOCK", 0))
        with os.fdopen(fd, "rb") as handle:
            data = handle.read(limit + 1)
    except OSError as error:
        raise InputError.one(file, "file", _os_error_text(error, str(os.fspath(path)))) from None
    if data is None or len(data) > limit:  # None: a non-blocking special file with nothing to read
        raise InputError.one(file, "file", too_big if data else "is not a regular file")
    return data


def read_text(path: str | os.PathLike, file: str, *, encoding: str = "utf-8",
              limit: int = MAX_TEXT_BYTES) -> str:
    """The text of a regular UTF-8 file of at most ``limit`` bytes (InputError otherwise)."""
    data = read_bytes(path, file, limit=limit)
    try:
        return data.decode(encoding)
    except UnicodeDecodeError as error:
        raise InputError.one(file, "file", f"is not UTF-8 text ({error.reason} at byte {error.start})") from None
