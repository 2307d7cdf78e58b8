"""Atomic file writes: a temporary file in the same folder, then a rename.

An interrupted save never leaves a half-written file (shared/CONTRACT.md section 7).
"""

from __future__ import annotations

import os
import tempfile
from pathlib import Path


def write_atomic(path: str | os.PathLike, data: str | bytes, encoding: str = "utf-8") -> None:
    """Write ``data`` to ``path`` so that readers see the old file or the new one, never a mix."""
    target = Path(path)
    payload = data.encode(encoding) if isinstance(data, str) else data
    fd, tmp_name = tempfile.mkstemp(prefix=f".{target.name}.", suffix=".tmp", dir=target.parent or ".")
    try:
        with os.fdopen(fd, "wb") as handle:
            handle.write(payload)
            handle.flush()
            os.fsync(handle.fileno())
        if target.exists():
            os.chmod(tmp_name, target.stat().st_mode & 0o777)
        else:
            os.chmod(tmp_name, 0o644)
        os.replace(tmp_name, target)
    except BaseException:
        try:
            os.unlink(tmp_name)
        except FileNotFoundError:
            pass
        raise
