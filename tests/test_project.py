"""Project-level checks: the layout, the README's commands and CI agree, and the
wording rules for what we ship hold."""

from __future__ import annotations

import re
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent

TOP_LEVEL = {"README.md", "DEVELOPERS.md", "pyproject.toml", "glidetask", "tests", "polars",
             "demo_tasks", ".ci", ".gitignore", "LICENSE"}
# Tool and environment folders that a checkout may grow while it is used (all ignored by git).
LOCAL_ONLY = {".git", ".venv", "venv", ".pytest_cache", ".hypothesis", ".benchmarks", "build", "dist"}


def _readme_code_blocks() -> list[str]:
    text = (ROOT / "README.md").read_text(encoding="utf-8")
    return re.findall(r"```\n(.*?)```", text, flags=re.S)


def _top_level_entries() -> set[str]:
    """What the project holds at the top: git's view (tracked files, and untracked ones it
    does not ignore) when this is a checkout, else the folder listing less local tool folders."""
    import subprocess

    try:
        listed = subprocess.run(["git", "ls-files", "--cached", "--others", "--exclude-standard"],
                                cwd=ROOT, capture_output=True, text=True, check=True).stdout
    except (OSError, subprocess.CalledProcessError):
        entries = {p.name for p in ROOT.iterdir()} - LOCAL_ONLY
        return {e for e in entries if not e.endswith(".egg-info")}
    return {line.split("/", 1)[0] for line in listed.splitlines() if line}


def test_top_level_holds_only_the_agreed_entries():
    assert _top_level_entries() == TOP_LEVEL


def test_ci_runs_exactly_the_readme_test_command():
    blocks = _readme_code_blocks()
    test_commands = [b.strip() for b in blocks if "pytest" in b and b.count("\n") == 1]
    assert len(test_commands) == 1, "the README must show one test command"
    ci_script = (ROOT / ".ci" / "run").read_text(encoding="utf-8")
    assert test_commands[0] in ci_script.splitlines()


def test_readme_opens_with_the_job_then_the_two_setup_commands():
    blocks = [b.strip() for b in _readme_code_blocks()]
    assert "glidetask" in blocks[0] and "pip install" in blocks[0]  # install and run the demo
    assert "pytest" in blocks[1] and "pip install" in blocks[1]  # install and run the tests


def test_shipped_text_never_mentions_a_lecture():
    # Source: the project's own rules (DEVELOPERS.md): no lecture or talk is mentioned anywhere.
    pattern = re.compile(r"\b(lecture|lecturer|talk on)\b", re.I)
    offenders = []
    for path in ROOT.rglob("*"):
        if any(part in LOCAL_ONLY or part == "__pycache__" for part in path.parts):
            continue
        if path.is_file() and path.suffix in {".py", ".md", ".toml", ".csv", ".geojson", ".tcss"}:
            if path == Path(__file__):
                continue
            if pattern.search(path.read_text(encoding="utf-8", errors="replace")):
                offenders.append(str(path.relative_to(ROOT)))
    assert offenders == []
