"""``glidetask polar``: the contract 5.1 JSON, the text card, and bad input."""

from __future__ import annotations

import json
import math
import re
import subprocess
import sys
from pathlib import Path

import pytest

from glidetask import cautions
from glidetask.cli import main
from polar_text import GOOD

ROOT = Path(__file__).resolve().parents[2]
RACING = str(ROOT / "polars" / "racing-15m.toml")
ERROR_LINE = re.compile(r"^glidetask: error: [^:]+: [^:]+: .+$")



def _json(capsys, *argv: str) -> dict:
    assert main(["polar", *argv, "--json"]) == 0
    return json.loads(capsys.readouterr().out)


def _errors(capsys, *argv: str) -> list[str]:
    assert main(list(argv)) == 2
    captured = capsys.readouterr()
    assert captured.out == "" and "Traceback" not in captured.err
    lines = captured.err.strip().splitlines()
    assert lines and all(ERROR_LINE.match(line) for line in lines), lines
    return lines


def test_json_has_every_contract_key(capsys):
    # Source: shared/CONTRACT.md 5.1.
    data = _json(capsys, RACING)
    for key in ("mass_kg", "wing_loading_kgm2", "coefficients", "fit_rms_ms", "min_sink_ms",
                "min_sink_speed_kmh", "best_ld", "best_ld_speed_kmh", "speed_to_fly", "cautions"):
        assert key in data
    assert set(data["coefficients"]) >= {"a", "b", "c"}
    assert [row["mc_ms"] for row in data["speed_to_fly"]] == pytest.approx([0.5 * i for i in range(11)])
    assert all({"mc_ms", "speed_kmh", "cruise_speed_kmh"} <= set(row) for row in data["speed_to_fly"])
    assert data["cautions"] == cautions.general()


def test_json_figures_follow_from_the_coefficients(capsys):
    # Source: glide polar theory for sink = a v^2 + b v + c (TAS m/s): minimum sink at the
    # vertex -b/(2a), best L/D at sqrt(c/a), MacCready speed sqrt((c + m)/a), cruise speed
    # m v/(m + sink(v)) (MacCready 1958; Reichmann, Cross-Country Soaring; from memory).
    data = _json(capsys, RACING, "--ballast-kg", "100", "--bugs-percent", "10")
    a, b, c = (data["coefficients"][k] for k in "abc")
    assert data["mass_kg"] == pytest.approx(255.0 + 90.0 + 100.0)
    assert data["wing_loading_kgm2"] == pytest.approx(445.0 / 10.5)
    vertex = -b / (2 * a)
    assert data["min_sink_speed_kmh"] == pytest.approx(vertex * 3.6, rel=1e-9)
    assert data["min_sink_ms"] == pytest.approx(a * vertex**2 + b * vertex + c, rel=1e-9)
    tangent = math.sqrt(c / a)
    assert data["best_ld_speed_kmh"] == pytest.approx(tangent * 3.6, rel=1e-9)
    assert data["best_ld"] == pytest.approx(tangent / (a * tangent**2 + b * tangent + c), rel=1e-9)
    for row in data["speed_to_fly"]:
        m, v = row["mc_ms"], math.sqrt((c + row["mc_ms"]) / a)
        assert row["speed_kmh"] == pytest.approx(v * 3.6, rel=1e-9)
        if m == 0.0:
            assert row["cruise_speed_kmh"] is None  # no climbs: no average progress
        else:
            assert row["cruise_speed_kmh"] == pytest.approx(m * v / (m + a * v * v + b * v + c) * 3.6, rel=1e-9)


def test_altitude_scales_speeds_by_the_standard_density(capsys):
    # Source: ISO 2533 table, sigma = 0.7423 at 3000 m (from memory; 4 decimals, hence rel 1e-4):
    # TAS = IAS / sqrt(sigma); L/D unchanged.
    sea = _json(capsys, RACING)
    high = _json(capsys, RACING, "--altitude-m", "3000")
    assert high["best_ld_speed_kmh"] == pytest.approx(sea["best_ld_speed_kmh"] / math.sqrt(0.7423), rel=1e-4)
    assert high["best_ld"] == pytest.approx(sea["best_ld"], rel=1e-9)
    assert high["density_ratio"] == pytest.approx(0.7423, abs=6e-5)


def test_text_card_shows_the_same_numbers(capsys):
    data = _json(capsys, RACING, "--ballast-kg", "100")
    assert main(["polar", RACING, "--ballast-kg", "100"]) == 0
    text = capsys.readouterr().out
    assert f"best glide       1:{data['best_ld']:.1f} at {data['best_ld_speed_kmh']:.0f} km/h" in text
    assert f"minimum sink     {data['min_sink_ms']:.2f} m/s at {data['min_sink_speed_kmh']:.0f} km/h" in text
    assert f"wing loading     {data['wing_loading_kgm2']:.1f} kg/m2" in text
    for row in data["speed_to_fly"][1:]:
        assert re.search(rf"{row['mc_ms']:.1f} m/s\s+{row['speed_kmh']:.0f} km/h \(\d+ IAS\)\s+"
                         rf"{row['cruise_speed_kmh']:.0f} km/h", text), row
    assert "CAUTION" in text and cautions.GENERAL[0] in text


def test_aviation_units_show_knots_and_feet(capsys):
    # Source: 1 kt = 1.852 km/h, 1 ft = 0.3048 m (international definitions).
    data = _json(capsys, RACING, "--altitude-m", "1000")
    assert main(["polar", RACING, "--altitude-m", "1000", "--units", "aviation"]) == 0
    text = capsys.readouterr().out
    assert f"at {data['best_ld_speed_kmh'] / 1.852:.0f} kt" in text
    assert f"{1000 / 0.3048:.0f} ft MSL" in text
    assert re.search(r"^  2 kt\s+\d+ kt", text, flags=re.M)  # the card in whole knots


@pytest.mark.parametrize("old, new, where", [
    ("wing_area_m2 = 10.5", 'wing_area_m2 = "ten"', "[glider] wing_area_m2"),  # wrong type
    ("vne_kmh = 270.0\n", "", "[glider] vne_kmh"),  # missing key
    ("reference_mass_kg = 350.0", "reference_mass_kg = inf", "[glider] reference_mass_kg"),  # non-finite
    ("[[80.0, 0.62], [120.0, 0.80], [180.0, 1.85]]", "[[80.0, 0.60], [120.0, 1.50], [180.0, 1.90]]",
     "[polar] points"),  # fit with a <= 0
    ("[[80.0, 0.62], [120.0, 0.80], [180.0, 1.85]]", "[[80.0, 0.30], [120.0, 0.01], [180.0, 1.85]]",
     "[polar] points"),  # non-positive minimum sink
    ("[180.0, 1.85]", "[280.0, 1.85]", "[polar] points[3]"),  # point outside the speed range
    ("vne_kmh = 270.0", "vne_kmh 270.0", "line 8"),  # TOML syntax error
])
def test_bad_polar_files_exit_2_with_the_place(capsys, tmp_path, old, new, where):
    path = tmp_path / "bad.toml"
    path.write_text(GOOD.replace(old, new), encoding="utf-8")
    lines = _errors(capsys, "polar", str(path))
    assert any(line.startswith(f"glidetask: error: {path}: {where}: ") for line in lines), lines


@pytest.mark.parametrize("argv, where", [
    (["--ballast-kg", "171"], "--ballast-kg"),  # above max ballast
    (["--pilot-kg", "300"], "--pilot-kg"),  # 255 + 300 = 555 kg > 525 kg, no ballast
    (["--ballast-kg", "-1"], "--ballast-kg"),
    (["--pilot-kg", "0"], "--pilot-kg"),
    (["--bugs-percent", "nan"], "--bugs-percent"),
    (["--altitude-m", "30000"], "--altitude-m"),
])
def test_bad_options_exit_2(capsys, argv, where):
    lines = _errors(capsys, "polar", RACING, *argv)
    assert any(f": command line: {where}: " in line for line in lines), lines


def test_mass_above_the_maximum_is_refused(capsys):
    # 255 empty + 110 pilot + 170 ballast = 535 kg > 525 kg maximum.
    lines = _errors(capsys, "polar", RACING, "--pilot-kg", "110", "--ballast-kg", "170")
    assert any("above the maximum 525 kg" in line and f"(limits from {RACING})" in line for line in lines), lines


def test_whole_process_bad_file_gives_exit_2_and_no_traceback(tmp_path):
    path = tmp_path / "bad.toml"
    path.write_text("[glider\n", encoding="utf-8")
    result = subprocess.run([sys.executable, "-m", "glidetask", "polar", str(path)], cwd=ROOT,
                            capture_output=True, text=True, timeout=60,
                            env={"PYTHONPATH": str(ROOT), "PATH": "/usr/bin:/bin"})
    assert result.returncode == 2
    assert "Traceback" not in result.stderr
    assert result.stderr.startswith(f"glidetask: error: {path}: line 1: TOML syntax error")
