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


# Source: the project's own rules (DEVELOPERS.md, issue 10): engine modules under about 500
# lines, functions under about 60 lines of code, so that a newcomer can read one whole.
MAX_ENGINE_MODULE_LINES = 500
MAX_FUNCTION_CODE_LINES = 60


def _code_lines(lines: list[str], node) -> int:
    """Lines of a function that hold code: not blank, not a comment, not its docstring."""
    import ast

    body = node.body
    doc = range(0)
    if body and isinstance(body[0], ast.Expr) and isinstance(body[0].value, ast.Constant) \
            and isinstance(body[0].value.value, str):
        doc = range(body[0].lineno, body[0].end_lineno + 1)
    return sum(1 for number in range(node.lineno, node.end_lineno + 1)
               if number not in doc and lines[number - 1].strip() and not lines[number - 1].strip().startswith("#"))


def test_engine_modules_stay_readable_in_one_sitting():
    long = {path.name: n for path in sorted((ROOT / "glidetask" / "engine").glob("*.py"))
            if (n := len(path.read_text(encoding="utf-8").splitlines())) > MAX_ENGINE_MODULE_LINES}
    assert long == {}


def test_functions_stay_short():
    import ast

    long = {}
    for path in sorted((ROOT / "glidetask").rglob("*.py")):
        text = path.read_text(encoding="utf-8")
        lines = text.splitlines()
        for node in ast.walk(ast.parse(text)):
            if isinstance(node, (ast.FunctionDef, ast.AsyncFunctionDef)):
                n = _code_lines(lines, node)
                if n > MAX_FUNCTION_CODE_LINES:
                    long[f"{path.relative_to(ROOT)}:{node.lineno} {node.name}"] = n
    assert long == {}
