"""The real process in a pseudo-terminal: ``python -m glidetask`` exits 0 on ctrl+q."""

from __future__ import annotations

import os
import select
import subprocess
import sys
import time
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[2]


def _read_until(fd: int, marker: bytes, timeout_s: float) -> bytes:
    seen = b""
    deadline = time.monotonic() + timeout_s
    while time.monotonic() < deadline:
        ready, _, _ = select.select([fd], [], [], 0.2)
        if ready:
            try:
                chunk = os.read(fd, 65536)
            except OSError:
                break
            seen += chunk
            if marker in seen:
                return seen
    return seen


@pytest.mark.skipif(sys.platform == "win32", reason="needs a POSIX pseudo-terminal")
def test_ctrl_q_in_a_terminal_exits_with_status_zero(tmp_path, acknowledged):
    import pty

    main_fd, child_fd = pty.openpty()
    env = {**os.environ, "PYTHONPATH": str(ROOT), "TERM": "xterm-256color", "COLUMNS": "100", "LINES": "30"}
    process = subprocess.Popen([sys.executable, "-m", "glidetask"], cwd=tmp_path, env=env,
                               stdin=child_fd, stdout=child_fd, stderr=child_fd, close_fds=True)
    os.close(child_fd)
    try:
        screen = _read_until(main_fd, b"Planning aid", 60)
        assert b"Planning aid" in screen, "the UI never showed its caution line"
        os.write(main_fd, b"\x11")  # ctrl+q
        assert process.wait(timeout=30) == 0
    finally:
        if process.poll() is None:
            process.kill()
        os.close(main_fd)
