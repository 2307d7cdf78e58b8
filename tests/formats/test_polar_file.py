"""Polar files: reading, defaults, and every kind of problem reported with its place."""

from __future__ import annotations

import math
from pathlib import Path

import pytest

from glidetask.engine.polar import scaled_polar
from glidetask.errors import InputError
from glidetask.formats.polar_file import load_polar_spec, loading_problems, polar_problems, read_polar_spec
from polar_text import GOOD



def _write(tmp_path: Path, text: str, name: str = "p.toml") -> Path:
    path = tmp_path / name
    path.write_text(text, encoding="utf-8")
    return path


def _problems(tmp_path: Path, text: str) -> list[tuple[str, str]]:
    spec, problems = read_polar_spec(_write(tmp_path, text))
    assert spec is None
    return [(p.where, p.what) for p in problems]


def test_reads_the_contract_example_in_si_units(tmp_path):
    # Source: shared/CONTRACT.md 2.1 (the example file and its units); 1 km/h = 1/3.6 m/s.
    spec = load_polar_spec(_write(tmp_path, GOOD))
    assert spec.label == "test example"
    assert spec.vne_ias_ms == pytest.approx(75.0)
    assert spec.min_speed_ias_ms == pytest.approx(75.0 / 3.6)
    assert spec.points[1] == pytest.approx((120.0 / 3.6, 0.80))
    assert (spec.wing_area_m2, spec.empty_mass_kg, spec.max_ballast_kg, spec.max_mass_kg) == (10.5, 255.0, 170.0, 525.0)


def test_optional_keys_take_the_contract_defaults(tmp_path):
    # Source: shared/CONTRACT.md 2.1: empty mass defaults to reference minus 90, ballast to 0,
    # no mass limit.
    text = "\n".join(line for line in GOOD.splitlines()
                     if not line.startswith(("empty_mass_kg", "max_ballast_kg", "max_mass_kg", "label")))
    spec = load_polar_spec(_write(tmp_path, text, "my-glider.toml"))
    assert spec.empty_mass_kg == 260.0 and spec.max_ballast_kg == 0.0 and spec.max_mass_kg is None
    assert spec.label == "my-glider"


def test_stall_speed_is_read_or_defaulted_and_flagged(tmp_path):
    # Source: shared/CONTRACT.md 2.4: optional IAS at the reference mass, default min_speed_kmh / 1.1.
    given = load_polar_spec(_write(tmp_path, GOOD.replace("min_speed_kmh = 75.0", "min_speed_kmh = 75.0\nstall_speed_kmh = 66.0")))
    assert given.stall_ias_ms == pytest.approx(66.0 / 3.6) and not given.stall_speed_defaulted
    defaulted = load_polar_spec(_write(tmp_path, GOOD))
    assert defaulted.stall_ias_ms == pytest.approx(75.0 / 1.1 / 3.6) and defaulted.stall_speed_defaulted


@pytest.mark.parametrize("stall, fragment", [
    ("0.0", "greater than 0"),
    ("75.0", "must be below min_speed_kmh (75)"),
    ("80.0", "must be below min_speed_kmh (75)"),
    ("40.0", "below min_speed_kmh / 1.5 (50)"),  # e.g. typed in m/s-like or knots-confused figures
    ('"slow"', "must be a number"),
])
def test_bad_stall_speeds(tmp_path, stall, fragment):
    found = _problems(tmp_path, GOOD.replace("min_speed_kmh = 75.0", f"min_speed_kmh = 75.0\nstall_speed_kmh = {stall}"))
    assert any(w == "[glider] stall_speed_kmh" and fragment in what for w, what in found), found


def test_fitted_polar_must_sink_down_to_the_stall(tmp_path):
    # A fit that is positive over min_speed..vne but rises out of the ground below the first
    # point: the circling model would fly there, so the reader checks the range from the stall.
    # The points lie on sink = 0.000135 (v - 55)(v - 70), v in km/h: negative between 55 and 70.
    text = GOOD.replace("[[80.0, 0.62], [120.0, 0.80], [180.0, 1.85]]", "[[80.0, 0.03375], [120.0, 0.43875], [180.0, 1.85625]]")
    # (Without a stall speed the same points are refused too, for a best glide beyond any
    # sailplane: see the hostile-input tests.)
    found = _problems(tmp_path, text.replace("min_speed_kmh = 75.0", "min_speed_kmh = 75.0\nstall_speed_kmh = 60.0"))
    assert any(w == "[polar] points" and "minimum sink" in what for w, what in found), found


def test_every_problem_is_collected_at_once(tmp_path):
    text = GOOD.replace("wing_area_m2 = 10.5", 'wing_area_m2 = "big"').replace(
        "vne_kmh = 270.0\n", "").replace("max_ballast_kg = 170.0", "max_ballast_kg = -5.0")
    found = _problems(tmp_path, text)
    assert ("[glider] wing_area_m2", "must be a number, got 'big'") in found
    assert ("[glider] vne_kmh", "missing key") in found
    assert ("[glider] max_ballast_kg", "must be in [0, 5000], got -5") in found


@pytest.mark.parametrize("old, new, where, fragment", [
    ("reference_mass_kg = 350.0", "reference_mass_kg = nan", "[glider] reference_mass_kg", "finite"),
    ("wing_area_m2 = 10.5", "wing_area_m2 = inf", "[glider] wing_area_m2", "finite"),
    ("wing_area_m2 = 10.5", "wing_area_m2 = 0", "[glider] wing_area_m2", "greater than 0"),
    ("wing_area_m2 = 10.5", "wing_area_m2 = true", "[glider] wing_area_m2", "must be a number"),
    ("empty_mass_kg = 255.0", "empty_mass_kg = 400.0", "[glider] empty_mass_kg", "above reference_mass_kg"),
    ("max_mass_kg = 525.0", "max_mass_kg = 200.0", "[glider] max_mass_kg", "not above empty_mass_kg"),
    ("min_speed_kmh = 75.0", "min_speed_kmh = 300.0", "[glider] min_speed_kmh", "below vne_kmh"),
    ('label = "test example"', "label = 5", "[glider] label", "must be text"),
    ("max_mass_kg = 525.0", "max_mas_kg = 525.0", "[glider] max_mas_kg", "unknown key"),
    ("[[80.0, 0.62], [120.0, 0.80], [180.0, 1.85]]", "[[80.0, 0.62], [120.0, 0.80]]",
     "[polar] points", "at least 3 points"),
    ("[180.0, 1.85]", "[290.0, 1.85]", "[polar] points[3]", "outside min_speed_kmh..vne_kmh"),
    ("[80.0, 0.62]", "[60.0, 0.62]", "[polar] points[1]", "outside min_speed_kmh..vne_kmh"),
    ("[120.0, 0.80]", "[120.0, nan]", "[polar] points[2]", "finite"),
    ("[120.0, 0.80]", '[120.0, "x"]', "[polar] points[2]", "pair [IAS km/h, sink m/s]"),
    ("[120.0, 0.80]", "[120.0]", "[polar] points[2]", "pair [IAS km/h, sink m/s]"),
    ("[120.0, 0.80]", "[120.0, -0.8]", "[polar] points[2]", "sink rate must be positive"),
    ("[120.0, 0.80]", "[80.0, 0.70]", "[polar] points", "different speeds"),
    # A polar that curves the wrong way: sink falls faster than a straight line at high speed.
    ("[[80.0, 0.62], [120.0, 0.80], [180.0, 1.85]]", "[[80.0, 0.60], [120.0, 1.50], [180.0, 1.90]]",
     "[polar] points", "a = "),
    # A fit whose lowest sink in range is negative.
    ("[[80.0, 0.62], [120.0, 0.80], [180.0, 1.85]]", "[[80.0, 0.30], [120.0, 0.01], [180.0, 1.85]]",
     "[polar] points", "minimum sink"),
])
def test_each_kind_of_bad_value_is_reported_where_it_is(tmp_path, old, new, where, fragment):
    assert old in GOOD
    found = _problems(tmp_path, GOOD.replace(old, new))
    assert any(w == where and fragment in what for w, what in found), found


def test_missing_tables_and_stray_keys(tmp_path):
    found = _problems(tmp_path, 'colour = "red"\n[glider]\nwing_area_m2 = 10.0\n')
    assert ("colour", "unknown table or key (expected [glider] and [polar])") in found
    assert ("[polar]", "missing table") in found
    assert ("[glider] reference_mass_kg", "missing key") in found
    assert _problems(tmp_path, "glider = 3\npolar = []\n")[:1] == [("[glider]", "must be a table, got int")]


def test_toml_syntax_error_names_the_line(tmp_path):
    found = _problems(tmp_path, GOOD.replace("vne_kmh = 270.0", "vne_kmh 270.0"))
    assert len(found) == 1
    where, what = found[0]
    assert where == "line 8" and what.startswith("TOML syntax error:")


def test_unreadable_and_non_text_files(tmp_path):
    spec, problems = read_polar_spec(tmp_path / "missing.toml")
    assert spec is None and len(problems) == 1 and problems[0].where == "file"
    assert problems[0].what == "no such file"
    binary = tmp_path / "b.toml"
    binary.write_bytes(b"\xff\xfe\x00label")
    spec, problems = read_polar_spec(binary)
    assert [p.what for p in problems] == ["is not UTF-8 text (invalid start byte at byte 0)"]


def test_load_raises_one_input_error_with_every_problem(tmp_path):
    path = _write(tmp_path, GOOD.replace("wing_area_m2 = 10.5", "wing_area_m2 = -1").replace(
        "[180.0, 1.85]", "[300.0, 1.85]"))
    with pytest.raises(InputError) as caught:
        load_polar_spec(path)
    lines = str(caught.value).splitlines()
    assert len(lines) == 2
    assert all(line.startswith(f"glidetask: error: {path}: ") for line in lines)


def test_polar_problems_works_on_a_parsed_document():
    import tomllib

    spec, problems = polar_problems(tomllib.loads(GOOD), "task.toml")
    assert problems == [] and spec.reference_mass_kg == 350.0


def test_loading_problems_against_the_limits(tmp_path):
    spec = load_polar_spec(_write(tmp_path, GOOD))
    kwargs = dict(file="command line", pilot_where="--pilot-kg", ballast_where="--ballast-kg")
    assert loading_problems(spec, 90.0, 170.0, **kwargs) == []  # 255 + 90 + 170 = 515 <= 525
    too_wet = loading_problems(spec, 100.0, 171.0, **kwargs)  # 526 kg, but the ballast is the first fault
    assert [(p.where, p.what) for p in too_wet] == [("--ballast-kg", "ballast 171 kg is outside 0-170 kg, the polar's "
                                                                      "maximum water ballast")]
    heavy = loading_problems(spec, 110.0, 170.0, **kwargs)  # 535 kg
    assert [(p.where, p.what) for p in heavy] == [("--ballast-kg", "the flying mass 535 kg (empty 255 + pilot 110 + "
                                                                   "ballast 170) is above the maximum 525 kg")]
    assert loading_problems(spec, 271.0, 0.0, **kwargs)[0].where == "--pilot-kg"  # 526 kg with no ballast: the pilot
    assert loading_problems(spec, -1.0, 0.0, **kwargs)[0].where == "--pilot-kg"
    assert loading_problems(spec, 0.0, 0.0, **kwargs)[0].what.startswith("pilot mass must be greater than 0")
    assert loading_problems(spec, 90.0, math.nan, **kwargs)[0].where == "--ballast-kg"


@pytest.mark.parametrize("name", ["two-seat-trainer.toml", "club.toml", "racing-15m.toml", "open-18m.toml"])
def test_bundled_polars_are_valid_plausible_and_say_they_are_examples(polars_dir, name):
    # Source: typical figures for these classes of glider (common practice): best L/D about
    # 28-50, minimum sink 0.5-0.75 m/s, wing loading 25-55 kg/m^2 within the mass limits.
    path = polars_dir / name
    header = path.read_text(encoding="utf-8").lower()
    assert "illustrative example" in header and "not data for any real aircraft" in header
    assert "flight manual" in header
    spec = load_polar_spec(path)
    lightest = scaled_polar(spec, spec.empty_mass_kg + 70.0)
    heaviest = scaled_polar(spec, spec.max_mass_kg)
    assert 28.0 < lightest.best_ld < 50.0
    assert 0.5 < lightest.min_sink_ms and heaviest.min_sink_ms < 0.75
    assert 25.0 < lightest.wing_loading_kgm2 and heaviest.wing_loading_kgm2 < 55.0
    assert lightest.fit_rms_ms < 0.02  # the points lie close to a parabola


def test_bundled_polars_cover_the_four_classes(polars_dir):
    # Source: the README's promise: trainer, club, 15 m racing, 18 m with water (best L/D about
    # 30, 35, 43 and 47 in our invented figures).
    expected = {"two-seat-trainer.toml": 30.0, "club.toml": 35.0, "racing-15m.toml": 43.0, "open-18m.toml": 47.0}
    for name, ld in expected.items():
        spec = load_polar_spec(polars_dir / name)
        assert scaled_polar(spec, spec.reference_mass_kg).best_ld == pytest.approx(ld, abs=0.5)
    assert load_polar_spec(polars_dir / "open-18m.toml").max_ballast_kg > 0.0
