"""Tests of kinetic.data: the measured-data loader and Dataset.

Every data file used here is invented test input (labelled so inside the files).
Unit conversions are checked against hand-computed values from the definitions
of the SI prefixes and units:

* SI prefixes m = 1e-3, c = 1e-2, u (micro) = 1e-6: BIPM, The International
  System of Units (SI Brochure), 9th ed. 2019, section 3 (table of prefixes;
  section numbers here from memory).
* degree Celsius: t/degC = T/K - 273.15 (SI Brochure 9th ed. 2019, section 2.3.1).
* degree Fahrenheit: T/K = (t/degF + 459.67) * 5/9 (NIST SP 811, 2008 ed.,
  Appendix B; from memory).
* siemens = 1/ohm (SI Brochure 9th ed. 2019, table of derived units).
"""
from __future__ import annotations

import hashlib
import json
import re
import subprocess
import sys
from pathlib import Path

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

import kinetic.data as kd
import kinetic.data.numbers as kdn
import kinetic.data.units as kdu
from kinetic.data import Dataset, load_data, load_series, parse_data
from kinetic.errors import DataError, ParameterError, RecordError

HERE = Path(__file__).parent
GOOD = HERE / "datafiles"
BAD = HERE / "malformed"

# Float64 tolerance for a product of a value and a pint conversion factor: the
# factor (e.g. 1e-3/1e-2) may itself be off by an ulp, and the product rounds
# once more, so a few ulp (~1e-15 relative) is the most either can contribute.
RTOL_UNIT = 4e-15


# ======================================================================================
# The malformed corpus: one problem per file
# ======================================================================================

# file -> (line, column text expected in the message or None, key phrase, load options)
MALFORMED = {
    "empty.csv": (1, None, "the file is empty", {}),
    "blank_lines_only.csv": (1, None, "the file is empty", {}),
    "comments_only.csv": (2, None, "no header row", {}),
    "no_header.csv": (1, None, "expected a header row", {}),
    "header_only.csv": (1, None, "no data rows", {}),
    "header_then_comments_only.csv": (2, None, "no data rows", {}),
    "unknown_column.csv": (1, 'column "pressure"', "unknown column", {}),
    "preamble_without_hash.csv": (1, 'column "Sample:"', "must start with '#'", {}),
    "unknown_unit.csv": (1, 'column "kappa"', 'unknown unit "blorbs"', {}),
    "wrong_dimension_kappa.csv": (1, 'column "kappa"', "is not a thermal conductivity", {}),
    "wrong_dimension_temperature.csv": (1, 'column "T"', "is not a temperature", {}),
    "wrong_dimension_resistivity.csv": (1, 'column "rho"', "is not an electrical resistivity", {}),
    "wrong_dimension_uncertainty.csv": (1, 'column "kappa_err"', "is not a thermal conductivity", {}),
    "offset_unit_scaled.csv": (1, 'column "T"', "offset unit", {}),
    "unclosed_bracket.csv": (1, 'column "kappa [W/(m K)"', "unbalanced", {}),
    "unit_without_name.csv": (1, "column 1", "has a unit but no name", {}),
    "unnamed_column.csv": (1, "column 2", "has no name", {}),
    "text_in_number.csv": (4, 'column "kappa"', "expected a number, got 'abc'", {}),
    "text_temperature.csv": (3, 'column "T"', "expected a number, got 'room'", {}),
    "hex_number.csv": (2, 'column "kappa"', "expected a number, got '0x1A'", {}),
    "nan_value.csv": (3, 'column "kappa"', "expected a finite number, got 'nan'", {}),
    "inf_value.csv": (4, 'column "kappa"', "expected a finite number, got '-inf'", {}),
    "overflow_value.csv": (2, 'column "kappa"', "expected a finite number", {}),
    "negative_temperature.csv": (3, 'column "T"', "above absolute zero", {}),
    "zero_temperature.csv": (2, 'column "T"', "above absolute zero", {}),
    "below_absolute_zero_celsius.csv": (3, 'column "T"', "-300 degC (= -26.85 K)", {}),
    "negative_kappa.csv": (3, 'column "kappa"', "positive thermal conductivity", {}),
    "negative_uncertainty.csv": (3, 'column "kappa_err"', "positive uncertainty", {}),
    "zero_uncertainty.csv": (2, 'column "kappa_err"', "positive uncertainty", {}),
    "zero_conductivity.csv": (3, 'column "sigma"', "positive electrical conductivity", {}),
    "negative_conductivity.csv": (2, 'column "sigma"', "positive electrical conductivity", {}),
    "negative_resistivity.csv": (4, 'column "rho"', "positive electrical resistivity", {}),
    "conflicting_duplicate_temperature.csv": (5, 'column "T"', "repeats line 3 with different values", {}),
    "mixed_decimal_marks.csv": (2, 'column "kappa"', "decimal comma in '1,5'", {}),
    "decimal_comma_when_point_required.csv": (2, 'column "kappa"', "decimal comma in '1,5'; use a decimal point",
                                              {"decimal": "."}),
    "decimal_comma_in_comma_file.csv": (3, None, "decimal commas", {}),
    "ragged_short_row.csv": (3, 'column "kappa_err"', "expected 3 fields", {}),
    "ragged_long_row.csv": (3, None, "expected 2 fields", {}),
    "ragged_whitespace_row.csv": (3, 'column "kappa"', "expected 2 fields", {}),
    "empty_field.csv": (2, 'column "kappa"', "empty field", {}),
    "missing_temperature_column.csv": (1, 'column "temperature"', "missing", {}),
    "missing_kappa_column.csv": (1, 'column "kappa"', "missing", {}),
    "duplicate_column.csv": (1, 'column "temperature"', "a second T column", {}),
    "two_kappa_columns.csv": (1, 'column "kappa_lattice"', "a second kappa column", {}),
    "both_resistivity_and_conductivity.csv": (1, 'column "sigma"', "a second electrical column", {}),
    "seebeck_without_unit.csv": (2, 'column "S"', "far beyond any known solid", {}),
    "bad_kind_comment.csv": (1, None, '"# kind:" comment', {}),
    "binary_spreadsheet.xlsx": (1, None, "export it as CSV", {}),
    "nul_bytes.csv": (3, None, "binary file", {}),
    "crlf_text_in_number.csv": (4, 'column "kappa"', "expected a number, got 'x'", {}),
    "comment_lines_shift_numbers.csv": (8, 'column "kappa"', "expected a number, got 'bad'", {}),
}


def test_corpus_is_complete_and_large_enough():
    on_disk = {p.name for p in BAD.iterdir() if p.is_file() and not p.name.startswith(".")}
    assert on_disk == set(MALFORMED)
    assert len(MALFORMED) >= 25


@pytest.mark.parametrize("fname", sorted(MALFORMED))
def test_malformed_file_gives_one_line_naming_file_line_column(fname):
    line, column, phrase, options = MALFORMED[fname]
    with pytest.raises(DataError) as info:
        load_data(BAD / fname, **options)
    msg = str(info.value)
    assert "\n" not in msg
    assert fname in msg
    assert re.search(rf"\bline {line}\b", msg), msg
    if column is not None:
        assert column in msg, msg
    assert phrase in msg, msg
    # the same problem is found whether or not the vectorised pass is used
    with pytest.raises(DataError) as slow:
        _load_slow(BAD / fname, **options)
    assert str(slow.value) == msg


def _load_slow(path, **options):
    """Load with the vectorised pass disabled (the line-by-line reference pass only)."""
    real = kdn._fast_numbers

    def refuse(*a, **k):
        raise kdn._FastFail

    kdn._fast_numbers = refuse
    try:
        return load_data(path, **options)
    finally:
        kdn._fast_numbers = real


def test_message_style_matches_the_documented_example(tmp_path):
    p = tmp_path / "data.csv"
    p.write_text("T [K], kappa [W/(m K)]\n" + "".join(f"{t}, 1.0\n" for t in range(10, 60, 10))
                 + "60, abc\n")
    with pytest.raises(DataError) as info:
        load_data(p)
    assert str(info.value) == f'{p}, line 7, column "kappa": expected a number, got \'abc\''


# ======================================================================================
# Good files and SI conversion
# ======================================================================================

def test_csv_with_si_units_is_read_exactly():
    ds = load_data(GOOD / "units.csv")
    np.testing.assert_array_equal(ds.temperature, [10, 20, 50, 100, 300])
    np.testing.assert_array_equal(ds.kappa, [12.5, 30.0, 25.0, 14.0, 5.5])
    np.testing.assert_array_equal(ds.kappa_err, [0.5, 1.0, 0.8, 0.4, 0.2])
    assert ds.kind == "total" and ds.label == "units" and len(ds) == 5
    assert ds.resistivity is None and ds.seebeck is None and not ds.has_electrical
    assert ds.units == {"temperature": "K", "kappa": "W/(m K)", "kappa_err": "W/(m K)"}
    raw = (GOOD / "units.csv").read_bytes()
    assert ds.sha256 == hashlib.sha256(raw).hexdigest()
    assert ds.source == str(GOOD / "units.csv")
    assert ds.notes[0].startswith("# invented")


def test_mw_per_cm_k_converts_to_w_per_m_k():
    # 1 mW/(cm K) = 1e-3 W / (1e-2 m K) = 0.1 W/(m K)  (SI prefixes, SI Brochure 2019)
    ds = load_data(GOOD / "mw_per_cm_k.csv")
    np.testing.assert_allclose(ds.kappa, np.array([125.0, 300.0, 55.0]) * 0.1, rtol=RTOL_UNIT)
    np.testing.assert_allclose(ds.kappa_err, np.array([5.0, 10.0, 2.0]) * 0.1, rtol=RTOL_UNIT)
    assert ds.units["kappa"] == "mW/(cm K)"


def test_tsv_and_whitespace_tables():
    ds = load_data(GOOD / "tabs.tsv")
    np.testing.assert_array_equal(ds.temperature, [5, 15, 150])
    np.testing.assert_array_equal(ds.kappa_err, [0.1, 0.25, 0.125])
    ds = load_data(GOOD / "whitespace.dat")
    np.testing.assert_array_equal(ds.temperature, [2, 20, 200])
    np.testing.assert_array_equal(ds.kappa, [0.75, 8.5, 4.0])
    np.testing.assert_array_equal(ds.resistivity, [1.5e-5, 1.25e-5, 2.5e-5])


def test_resistivity_in_uohm_cm_and_seebeck_in_uv_per_k():
    # 1 uOhm cm = 1e-6 Ohm * 1e-2 m = 1e-8 Ohm m; 1 uV/K = 1e-6 V/K (SI prefixes)
    ds = load_data(GOOD / "electrical.csv")
    np.testing.assert_allclose(ds.resistivity, np.array([250.0, 400.0, 500.0]) * 1e-8, rtol=RTOL_UNIT)
    np.testing.assert_allclose(ds.seebeck, np.array([-80.0, -150.0, -200.0]) * 1e-6, rtol=RTOL_UNIT)
    assert ds.has_electrical
    np.testing.assert_allclose(ds.sigma, 1.0 / ds.resistivity, rtol=0)  # same expression


def test_conductivity_in_s_per_cm_is_stored_as_resistivity():
    # 1 S/cm = 100 S/m (c = 1e-2); resistivity = 1/sigma (siemens = 1/ohm)
    ds = load_data(GOOD / "conductivity.csv")
    np.testing.assert_allclose(ds.sigma, [4.0e5, 2.0e5], rtol=RTOL_UNIT)
    np.testing.assert_allclose(ds.resistivity, [2.5e-6, 5.0e-6], rtol=RTOL_UNIT)
    assert ds.units["sigma"] == "S/cm"


def test_celsius_is_an_offset_unit():
    # T/K = t/degC + 273.15 (SI Brochure 2019, 2.3.1); the sum rounds once in float64
    ds = load_data(GOOD / "celsius.csv")
    np.testing.assert_allclose(ds.temperature, [73.15, 273.15, 298.15, 373.15], rtol=1e-15)
    np.testing.assert_array_equal(ds.kappa, [8.0, 2.0, 1.8, 1.5])


def test_fahrenheit_is_an_offset_unit():
    # T/K = (t/degF + 459.67) * 5/9 (NIST SP 811 App. B, from memory):
    # -40 F = 233.15 K, 32 F = 273.15 K, 212 F = 373.15 K.  Rounding of the
    # offset and 5/9 in float64 allows a few ulp at ~300 K (1e-13 K).
    ds = load_data(GOOD / "fahrenheit.csv")
    np.testing.assert_allclose(ds.temperature, [233.15, 273.15, 373.15], rtol=0, atol=1e-12)


def test_lattice_column_sets_the_kind_and_dk_is_an_uncertainty():
    ds = load_data(GOOD / "lattice.csv")
    assert ds.kind == "lattice"
    np.testing.assert_array_equal(ds.kappa_err, [0.3, 0.2])


def test_comments_label_and_kind_come_from_the_file():
    ds = load_data(GOOD / "comments.csv")
    assert ds.label == "pellet B (invented)"
    assert ds.kind == "lattice"
    np.testing.assert_array_equal(ds.temperature, [10, 20, 40])
    np.testing.assert_array_equal(ds.kappa, [4.0, 6.0, 5.0])
    assert "# heater power changed here" in ds.notes
    assert "# contact re-glued (line 8)" in ds.notes
    assert "# label: pellet B (invented)" in ds.notes


def test_sample_comment_is_a_label_and_the_first_label_wins():
    ds = parse_data("# sample: invented pellet C\n# label: later\nT, kappa\n10, 1\n", name="f.csv")
    assert ds.label == "invented pellet C"
    assert parse_data("T, kappa\n10, 1\n", name="dir/run_07.csv").label == "run_07"


def test_arguments_override_comment_label_and_kind():
    ds = load_data(GOOD / "comments.csv", label="other", kind="lattice")
    assert ds.label == "other"
    ds = load_data(GOOD / "units.csv", kind="lattice")
    assert ds.kind == "lattice"


def test_kind_argument_must_agree_with_a_kind_named_column():
    with pytest.raises(DataError, match=r'line 2, column "kappa_lattice": the column name says lattice'):
        load_data(GOOD / "lattice.csv", kind="total")


def test_plain_kappa_defaults_to_total_with_a_note():
    ds = load_data(GOOD / "units.csv")
    assert ds.kind == "total"
    assert any("taken as total thermal conductivity" in n for n in ds.notes)


def test_bom_crlf_and_utf16_are_read_silently():
    ds = load_data(GOOD / "bom.csv")
    np.testing.assert_array_equal(ds.kappa, [2.5, 1.25])
    assert not any("UTF-8" in n for n in ds.notes)
    ds = load_data(GOOD / "crlf.csv")
    np.testing.assert_array_equal(ds.kappa, [1.0, 2.0])
    ds = load_data(GOOD / "utf16.txt")
    np.testing.assert_array_equal(ds.temperature, [100, 200])
    np.testing.assert_array_equal(ds.kappa, [2.5, 2.0])


def test_decimal_commas_in_a_semicolon_file_are_accepted_with_a_note():
    ds = load_data(GOOD / "decimal_comma.csv")
    np.testing.assert_array_equal(ds.temperature, [10.5, 20.0, 300.0])
    np.testing.assert_array_equal(ds.kappa, [1.25, 2.5, 0.75])
    np.testing.assert_array_equal(ds.kappa_err, [0.05, 0.1, 0.025])
    assert "decimal commas read as decimal points" in ds.notes


def test_decimal_option():
    ds = parse_data("T;kappa\n10;1,5\n", name="x.csv", decimal=",")
    assert ds.kappa[0] == 1.5
    with pytest.raises(DataError, match=r'x\.csv, line 2, column "T": decimal point in \'10\.5\''):
        parse_data("T;kappa\n10.5;1,5\n", name="x.csv", decimal=",")
    with pytest.raises(ParameterError, match="decimal"):
        parse_data("T,kappa\n10,1\n", decimal=",", delimiter=",")
    with pytest.raises(ParameterError, match="decimal must be one of"):
        parse_data("T,kappa\n10,1\n", decimal=";")


def test_windows_1252_file_is_read_with_a_note():
    ds = load_data(GOOD / "latin1.csv")
    np.testing.assert_allclose(ds.temperature, [298.15, 398.15], rtol=1e-15)  # degC offset, one rounding
    np.testing.assert_allclose(ds.resistivity, [8e-6, 9e-6], rtol=RTOL_UNIT)  # 1 uOhm cm = 1e-8 Ohm m
    assert any("not UTF-8" in n and "line 2" in n and "Windows-1252" in n for n in ds.notes)
    assert ds.units["temperature"] == "°C"


def test_strict_encoding_names_the_line():
    with pytest.raises(DataError, match=r"latin1\.csv, line 2: byte 0xb0 is not valid utf-8"):
        load_data(GOOD / "latin1.csv", encoding="utf-8")
    with pytest.raises(ParameterError, match="unknown text encoding"):
        load_data(GOOD / "units.csv", encoding="no-such-codec")


def test_unsorted_rows_are_sorted_together_with_a_note():
    ds = load_data(GOOD / "descending.csv")
    np.testing.assert_array_equal(ds.temperature, [50, 100, 200, 300])
    np.testing.assert_array_equal(ds.kappa, [6.0, 3.0, 1.5, 1.0])
    np.testing.assert_array_equal(ds.kappa_err, [0.3, 0.15, 0.075, 0.05])
    assert "rows sorted by temperature (the file was not in ascending order)" in ds.notes


def test_identical_repeated_row_is_merged_naming_both_lines():
    ds = load_data(GOOD / "repeated_row.csv")
    np.testing.assert_array_equal(ds.temperature, [10, 20, 30])
    np.testing.assert_array_equal(ds.kappa, [1.0, 2.0, 3.0])
    assert any("line 6 repeats line 4" in n for n in ds.notes)


def test_percent_uncertainty_is_relative_to_kappa():
    # 5 % of 2.0 and 2.5 % of 4.0 are both 0.1 W/(m K) (percent = 1e-2)
    ds = load_data(GOOD / "percent_err.csv")
    np.testing.assert_allclose(ds.kappa_err, [0.1, 0.1], rtol=RTOL_UNIT)


def test_spreadsheet_export_with_quotes_trailing_commas_bom_and_crlf():
    ds = load_data(GOOD / "excel_export.csv")
    np.testing.assert_array_equal(ds.temperature, [100, 200])
    np.testing.assert_array_equal(ds.kappa, [2.5, 2.0])
    np.testing.assert_allclose(ds.seebeck, [-12.5e-6, -25e-6], rtol=RTOL_UNIT)  # uV = 1e-6 V


def test_lab_spellings_of_names_and_units():
    # W/mK read as W/(m K); 1 mOhm cm = 1e-3 Ohm * 1e-2 m = 1e-5 Ohm m; uV = 1e-6 V
    ds = load_data(GOOD / "lab_spellings.csv")
    np.testing.assert_array_equal(ds.temperature, [100, 200])
    np.testing.assert_array_equal(ds.kappa, [2.5, 2.0])
    np.testing.assert_allclose(ds.resistivity, [1.5e-5, 2.5e-5], rtol=RTOL_UNIT)
    np.testing.assert_allclose(ds.seebeck, [120e-6, 180e-6], rtol=RTOL_UNIT)
    assert any('"W/mK"' in n and "W/(m*K)" in n for n in ds.notes)


def test_extra_columns_need_ignore_columns():
    with pytest.raises(DataError, match=r'line 2, column "time": unknown column.*ignore_columns'):
        load_data(GOOD / "extra_columns.csv")
    ds = load_data(GOOD / "extra_columns.csv", ignore_columns=["time", "Heater"])
    np.testing.assert_array_equal(ds.temperature, [10, 20])
    np.testing.assert_array_equal(ds.kappa, [1.5, 2.5])


def test_columns_without_units_use_documented_si_defaults_with_notes():
    ds = load_data(GOOD / "unitless.csv")
    np.testing.assert_array_equal(ds.resistivity, [2e-5, 3e-5])
    for role, unit in (("T", "K"), ("kappa", "W/(m K)"), ("rho", "Ohm m")):
        assert any(f'column "{role}" has no unit; read as {unit}' in n for n in ds.notes)
    assert kd.DEFAULT_UNITS["resistivity"] == "Ohm m"


def test_units_option_supplies_missing_units():
    # 1 uOhm cm = 1e-8 Ohm m (SI prefixes)
    ds = load_data(GOOD / "unitless.csv", units={"rho": "uOhm cm"})
    np.testing.assert_allclose(ds.resistivity, [2e-13, 3e-13], rtol=RTOL_UNIT)
    assert ds.units["resistivity"] == "uOhm cm"
    with pytest.raises(DataError, match='the header gives unit "uOhm cm" but units= gives'):
        load_data(GOOD / "electrical.csv", units={"rho": "Ohm m"})
    with pytest.raises(ParameterError, match=r"units\['pressure'\]: unknown column"):
        load_data(GOOD / "unitless.csv", units={"pressure": "bar"})
    with pytest.raises(ParameterError, match=r'units\["rho"\]: unknown unit "blorbs"'):
        load_data(GOOD / "unitless.csv", units={"rho": "blorbs"})


def test_uncertainty_without_unit_takes_the_kappa_unit():
    # 1 mW/(cm K) = 0.1 W/(m K)
    ds = parse_data("T [K], kappa [mW/(cm K)], kappa_err\n10, 20, 1\n")
    np.testing.assert_allclose(ds.kappa_err, [0.1], rtol=RTOL_UNIT)
    assert any("read in the kappa column's unit mW/(cm K)" in n for n in ds.notes)


def test_columns_option_adds_names():
    ds = parse_data("Tsample, k_meas\n10, 1\n", columns={"Tsample": "T", "k_meas": "kappa_lattice"})
    assert ds.kind == "lattice" and ds.temperature[0] == 10
    with pytest.raises(ParameterError, match="unknown column name"):
        parse_data("T, kappa\n10, 1\n", columns={"x": "nonsense"})


def test_delimiter_option_and_detection():
    ds = parse_data("T kappa\n10 1\n", delimiter="whitespace")
    assert ds.kappa[0] == 1.0
    # a wrong delimiter leaves the whole header as one unknown name
    with pytest.raises(DataError, match='column "T;kappa": unknown column'):
        parse_data("T;kappa\n10;1\n", delimiter=",")
    with pytest.raises(ParameterError, match="delimiter must be one of"):
        parse_data("T,kappa\n10,1\n", delimiter="|")


def test_header_layouts():
    # a space-aligned table whose header contains a stray tab is still whitespace-separated
    assert parse_data("T [K]\t  kappa [W/(m K)]\n  300   1.5\n").kappa[0] == 1.5
    ds = parse_data("T (K)   kappa (W/(m K))   rho (uOhm cm)\n300 1.5 250\n")
    # 1 uOhm cm = 1e-8 Ohm m (SI prefixes)
    np.testing.assert_allclose(ds.resistivity, [250e-8], rtol=RTOL_UNIT)
    ds = parse_data("Temperature (K), Thermal conductivity (W/m·K)\n300, 1.5\n")
    assert ds.kappa[0] == 1.5 and ds.units["kappa"] == "W/m·K"
    ds = parse_data("T[K];kappa[W/(m K)]\n300;1.5\n")
    assert ds.temperature[0] == 300


# Header unit spellings -> hand-computed SI factor (SI prefixes and derived units,
# SI Brochure 2019; the W/mK reading is common practice in thermal-transport labs)
UNIT_CASES = [
    ("kappa", "W/(m K)", 1.0),
    ("kappa", "W m^-1 K^-1", 1.0),
    ("kappa", "W m-1 K-1", 1.0),
    ("kappa", "W/mK", 1.0),
    ("kappa", "W/m/K", 1.0),
    ("kappa", "mW/(cm K)", 0.1),
    ("kappa", "mW/cmK", 0.1),
    ("kappa", "W/(cm K)", 100.0),
    ("kappa", "W/(m·K)", 1.0),
    ("rho", "Ohm m", 1.0),
    ("rho", "ohm*m", 1.0),
    ("rho", "uOhm cm", 1e-8),
    ("rho", "µΩ cm", 1e-8),
    ("rho", "µΩcm", 1e-8),
    ("rho", "mOhm cm", 1e-5),
    ("rho", "Ohm-cm", 1e-2),
    ("rho", "1e-8 Ohm m", 1e-8),
    ("sigma", "S/m", 1.0),
    ("sigma", "S/cm", 100.0),
    ("sigma", "S cm^-1", 100.0),
    ("S", "V/K", 1.0),
    ("S", "uV/K", 1e-6),
    ("S", "µV/K", 1e-6),
    ("S", "mV/K", 1e-3),
    ("T", "K", 1.0),
    ("T", "mK", 1e-3),
]


@pytest.mark.parametrize("column,unit,factor", UNIT_CASES)
def test_unit_spellings(column, unit, factor):
    if column == "T":
        ds, got, value = parse_data(f"T [{unit}], kappa\n2, 4\n"), None, 2.0
        got = ds.temperature
    elif column == "kappa":
        ds = parse_data(f"T, kappa [{unit}]\n2, 4\n")
        got, value = ds.kappa, 4.0
    else:
        ds = parse_data(f"T, kappa, {column} [{unit}]\n2, 4, 8\n")
        got, value = {"rho": ds.resistivity, "sigma": ds.sigma, "S": ds.seebeck}[column], 8.0
    # sigma is stored as 1/sigma and read back as 1/resistivity: two more roundings
    rtol = 3 * RTOL_UNIT if column == "sigma" else RTOL_UNIT
    np.testing.assert_allclose(got, [value * factor], rtol=rtol)


def test_shortcut_unit_table_agrees_with_pint():
    # the loader's table of common units (used to avoid building a pint registry)
    # must give the factor pint gives; one ulp of slack for pint's own arithmetic
    import pint

    u = pint.UnitRegistry()
    for (role, unit), factor in kdu._COMMON_UNITS.items():
        spelling = unit.replace("Ω", "ohm").replace("Ohm", "ohm")
        assert u.Quantity(1.0, spelling).to(kdu._PINT_SI[role]).magnitude == pytest.approx(
            factor, rel=2.3e-16), (role, unit)


def test_temperature_units_spelled_as_in_labs():
    # a bare C in a temperature column is Celsius, not coulomb (noted); 0 degC = 273.15 K
    ds = parse_data("T [C], kappa\n0, 1\n")
    assert ds.temperature[0] == 273.15
    assert any('read as degC' in n for n in ds.notes)
    for spelling in ("°C", "degC", "celsius", "deg C"):
        assert parse_data(f"T [{spelling}], kappa\n0, 1\n").temperature[0] == 273.15
    assert parse_data("T (K), kappa\n7, 1\n").temperature[0] == 7
    assert parse_data("T / K, kappa / W m^-1 K^-1\n7, 1\n").kappa[0] == 1


def test_kappa_in_wrong_unit_kind_names_column():
    with pytest.raises(DataError, match=r'line 1, column "kappa": unit "degC" is not a thermal conductivity'):
        parse_data("T, kappa [degC]\n1, 1\n")


def test_name_in_parentheses_is_a_name_not_a_unit():
    ds = parse_data("T [K], kappa (lattice) [W/(m K)]\n10, 1\n")
    assert ds.kind == "lattice"


def test_no_matplotlib_or_ipywidgets_needed():
    code = (
        "import sys, importlib.abc\n"
        "class Block(importlib.abc.MetaPathFinder):\n"
        "    def find_spec(self, name, path=None, target=None):\n"
        "        if name.split('.')[0] in ('matplotlib', 'ipywidgets', 'ipympl'):\n"
        "            raise ImportError('blocked ' + name)\n"
        "sys.meta_path.insert(0, Block())\n"
        "from kinetic.data import load_data\n"
        f"ds = load_data({str(GOOD / 'electrical.csv')!r})\n"
        "assert len(ds) == 3\n"
        "print('ok')\n"
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, timeout=120)
    assert out.returncode == 0, out.stderr
    assert out.stdout.strip() == "ok"


# ======================================================================================
# Paths and argument checks
# ======================================================================================

def test_missing_path_and_folder(tmp_path):
    with pytest.raises(DataError, match=r"nope\.csv: no such file"):
        load_data(tmp_path / "nope.csv")
    with pytest.raises(DataError, match="is a folder"):
        load_data(tmp_path)
    with pytest.raises(ParameterError, match="source must be a path"):
        load_data(b"T,kappa\n1,1\n")
    with pytest.raises(ParameterError, match="source must be a path"):
        load_data(42)


def test_option_checks():
    with pytest.raises(ParameterError, match="kind must be one of"):
        load_data(GOOD / "units.csv", kind="electronic")
    with pytest.raises(ParameterError, match="label must be a string"):
        load_data(GOOD / "units.csv", label=3)
    with pytest.raises(ParameterError, match="content must be bytes or str"):
        parse_data(12)


def test_parse_data_matches_load_data_for_the_same_bytes():
    raw = (GOOD / "electrical.csv").read_bytes()
    a = load_data(GOOD / "electrical.csv")
    b = parse_data(raw, name="electrical.csv")
    assert b.source is None and a.source is not None
    assert a.sha256 == b.sha256 == hashlib.sha256(raw).hexdigest()
    for attr in ("temperature", "kappa", "resistivity", "seebeck"):
        np.testing.assert_array_equal(getattr(a, attr), getattr(b, attr))
    assert a.label == b.label == "electrical"


# ======================================================================================
# Fast (vectorised) pass against the line-by-line pass
# ======================================================================================

def _parse_slow(text, **options):
    real = kdn._fast_numbers

    def refuse(*a, **k):
        raise kdn._FastFail

    kdn._fast_numbers = refuse
    try:
        return parse_data(text, **options)
    finally:
        kdn._fast_numbers = real


finite = st.floats(min_value=1e-300, max_value=1e300, allow_nan=False, allow_infinity=False)


@settings(max_examples=60, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(rows=st.lists(st.tuples(finite, finite, st.floats(-1e3, 1e3, allow_nan=False)),
                     min_size=1, max_size=30, unique_by=lambda r: r[0]),
       delim=st.sampled_from([",", ";", "\t", " ", "  "]),
       pad=st.sampled_from(["", " ", "\t"]))
def test_vectorised_and_line_passes_agree_exactly(rows, delim, pad):
    if delim.strip() == "" and pad == "\t":
        pad = " "
    head = delim.join(["T [K]", "kappa [W/(m K)]", "S [V/K]"]) if delim.strip() else \
        "T [K]   kappa [W/(m K)]   S [V/K]"
    body = "\n".join(delim.join(pad + repr(v) + pad for v in r) for r in rows)
    text = head + "\n" + body + "\n"
    fast = parse_data(text)
    slow = _parse_slow(text)
    assert fast == slow
    order = np.argsort([r[0] for r in rows])
    # repr() of a float64 round-trips exactly, so the values must come back bit for bit
    np.testing.assert_array_equal(fast.temperature, np.array([r[0] for r in rows])[order])
    np.testing.assert_array_equal(fast.kappa, np.array([r[1] for r in rows])[order])
    np.testing.assert_array_equal(fast.seebeck, np.array([r[2] for r in rows])[order])


def test_clean_file_takes_the_vectorised_pass(monkeypatch):
    def boom(*a, **k):
        raise AssertionError("line-by-line pass used for a clean file")

    monkeypatch.setattr(kdn._Slow, "parse", boom)
    for name in ("units.csv", "tabs.tsv", "whitespace.dat", "decimal_comma.csv", "comments.csv",
                 "excel_export.csv", "crlf.csv"):
        load_data(GOOD / name)


@pytest.mark.parametrize("text", [
    "T,kappa\n10,1 2\n20,\n",          # a field with two numbers beside an empty one
    "T,kappa\n10,1,2\n20\n",           # fields moved between lines
    "T kappa\n10 1 2\n20\n",
    "T;kappa\n10;1\n20;2;\n",
])
def test_vectorised_pass_does_not_accept_misaligned_rows(text):
    with pytest.raises(DataError):
        parse_data(text)


@pytest.mark.parametrize("data,delim,ncols,nrows", [
    ("10,1 2\n20,", ",", 2, 2),        # two numbers in one field, an empty field elsewhere
    ("10,1,2\n20", ",", 2, 2),         # three fields then one
    ("10 1 2\n20", None, 2, 2),
    ("10;;1", ";", 3, 1),
    ("10\t1\t", "\t", 3, 1),
    ("10,abc", ",", 2, 1),
    ("10,nan", ",", 2, 1),
    ("10 1\x0c", None, 2, 1),
    ("10,1.5", ",", 3, 1),
])
def test_vectorised_pass_refuses_anything_doubtful(data, delim, ncols, nrows):
    with pytest.raises(kdn._FastFail):
        kdn._fast_numbers(data, delim, ncols, nrows)


def test_vectorised_pass_reads_a_plain_table():
    got = kdn._fast_numbers("1, 2.5\n3 ,4e-3\n  5,6", ",", 2, 3)
    np.testing.assert_array_equal(got, [[1, 2.5], [3, 4e-3], [5, 6]])
    got = kdn._fast_numbers(" 1\t 2.5\n3   4e-3", None, 2, 2)
    np.testing.assert_array_equal(got, [[1, 2.5], [3, 4e-3]])


@pytest.mark.parametrize("bad,where", [
    ("abc", 'column "kappa": expected a number'),
    ("", 'column "kappa": expected a number, got an empty field'),
    ("1.0, 7", "expected 2 fields"),
    ("nan", 'column "kappa": expected a finite number'),
])
@pytest.mark.parametrize("gaps", [False, True])
def test_large_file_error_is_located_like_the_line_pass(tmp_path, bad, where, gaps):
    # above kdn._BISECT_ROWS rows the first bad row is found by bisection
    n = kdn._BISECT_ROWS + 10_000
    rows = [f"{i + 1}, 1.5" for i in range(n)]
    k = 12_345
    rows[k] = f"{k + 1}, {bad}"
    if gaps:
        rows.insert(100, "# a comment line")
        rows.insert(2000, "")
        rows[5000] += "  # inline note"
    p = tmp_path / "large.csv"
    p.write_text("T [K], kappa [W/(m K)]\n" + "\n".join(rows) + "\n")
    seen = []
    real_parse = kdn._Slow.parse

    def spy(self, body, first_line):
        seen.append(body.count("\n") + 1)
        return real_parse(self, body, first_line)

    kdn._Slow.parse = spy
    try:
        with pytest.raises(DataError) as fast:
            load_data(p)
    finally:
        kdn._Slow.parse = real_parse
    assert seen == [1]          # only the offending row went through the line pass
    with pytest.raises(DataError) as slow:
        _load_slow(p)
    assert str(fast.value) == str(slow.value)
    line = k + 2 + (2 if gaps else 0)   # header is line 1; two inserted lines before row k
    assert f"line {line}, " in str(fast.value) or f"line {line}:" in str(fast.value)
    assert where in str(fast.value)


def test_million_row_file_loads(tmp_path):
    # speed is reported by benchmarks, not asserted here; this checks correctness at scale
    n = 1_000_000
    T = np.arange(1, n + 1) * 1e-3
    p = tmp_path / "big.csv"
    with open(p, "w") as fh:
        fh.write("T [K], kappa [mW/(cm K)], kappa_err [mW/(cm K)]\n")
        fh.write("\n".join(f"{t:.3f}, {2.5 + (i % 7)}, 0.5" for i, t in enumerate(T.tolist())))
        fh.write("\n")
    ds = load_data(p)
    assert len(ds) == n
    np.testing.assert_allclose(ds.temperature[[0, -1]], [1e-3, 1000.0], rtol=1e-15)  # decimal parse
    np.testing.assert_allclose(ds.kappa[:7], (2.5 + np.arange(7)) * 0.1, rtol=RTOL_UNIT)  # mW/(cm K)


# ======================================================================================
# Dataset
# ======================================================================================

def test_from_arrays_sorts_merges_and_stores_sigma_as_resistivity():
    ds = Dataset.from_arrays([300, 10, 20, 10], [1, 3, 2, 3], sigma=[1e5, 2e5, 4e5, 2e5],
                             seebeck=[1e-6, -2e-6, 3e-6, -2e-6], label="A")
    np.testing.assert_array_equal(ds.temperature, [10, 20, 300])
    np.testing.assert_array_equal(ds.kappa, [3, 2, 1])
    np.testing.assert_array_equal(ds.resistivity, 1.0 / np.array([2e5, 4e5, 1e5]))
    assert ds.label == "A" and ds.source is None and ds.sha256 is None
    assert any("sorted" in n for n in ds.notes)
    assert any("temperature[3] repeats temperature[1]" in n for n in ds.notes)
    assert ds.units["sigma"] == "S/m"


@pytest.mark.parametrize("kwargs,match", [
    (dict(temperature=[1, 2], kappa=[1]), "kappa: expected 2 values"),
    (dict(temperature=[1, -2], kappa=[1, 1]), r"temperature\[1\]: expected a temperature above absolute zero"),
    (dict(temperature=[1, 2], kappa=[1, np.nan]), r"kappa\[1\]: expected a finite number, got nan"),
    (dict(temperature=[1, 2], kappa=[1, 0]), r"kappa\[1\]: expected a positive thermal conductivity"),
    (dict(temperature=[1, 2], kappa=[1, 1], kappa_err=[0.1, -1]), r"kappa_err\[1\]: expected a positive uncertainty"),
    (dict(temperature=[1, 2], kappa=[1, 1], sigma=[0, 1]), r"sigma\[0\]: expected a positive electrical conductivity"),
    (dict(temperature=[1, 2], kappa=[1, 1], resistivity=[1, -1]), r"resistivity\[1\]: expected a positive"),
    (dict(temperature=[1, 2], kappa=[1, 1], seebeck=[1, np.inf]), r"seebeck\[1\]: expected a finite number"),
    (dict(temperature=[5, 5], kappa=[1, 2]), r"temperature\[1\]: temperature 5 K repeats temperature\[0\] with different"),
    (dict(temperature=5, kappa=1), "temperature: expected a 1-D array of numbers, got a single number"),
    (dict(temperature=[[1, 2]], kappa=[[1, 2]]), r"temperature: expected a 1-D array of numbers, got an array of shape \(1, 2\)"),
    (dict(temperature=[], kappa=[]), "expected at least one value"),
    (dict(temperature=["a"], kappa=[1]), "temperature: expected an array of numbers"),
])
def test_from_arrays_errors_name_parameter_and_index(kwargs, match):
    with pytest.raises(DataError, match=match):
        Dataset.from_arrays(**kwargs)


def test_from_arrays_parameter_errors():
    with pytest.raises(ParameterError, match="not both"):
        Dataset.from_arrays([1], [1], resistivity=[1], sigma=[1])
    with pytest.raises(ParameterError, match="kind must be"):
        Dataset.from_arrays([1], [1], kind="electronic")
    with pytest.raises(ParameterError, match="label must be a string"):
        Dataset.from_arrays([1], [1], label=None)


def test_from_arrays_accepts_pint_quantities():
    import pint

    u = pint.UnitRegistry()
    ds = Dataset.from_arrays(u.Quantity(np.array([0.0, 100.0]), "degC"),
                             u.Quantity(np.array([1.0, 2.0]), "mW/(cm K)"))
    # 0 degC = 273.15 K (SI Brochure 2019); 1 mW/(cm K) = 0.1 W/(m K)
    np.testing.assert_allclose(ds.temperature, [273.15, 373.15], rtol=1e-15)
    np.testing.assert_allclose(ds.kappa, [0.1, 0.2], rtol=RTOL_UNIT)
    with pytest.raises(DataError, match="temperature: expected a temperature"):
        Dataset.from_arrays(u.Quantity([1.0, 2.0], "m"), [1, 2])


def test_arrays_are_read_only_private_copies():
    T = np.array([1.0, 2.0])
    ds = Dataset.from_arrays(T, [1.0, 2.0])
    T[0] = 99.0
    assert ds.temperature[0] == 1.0
    assert T.flags.writeable
    with pytest.raises(ValueError):
        ds.temperature[0] = 5.0
    with pytest.raises(AttributeError):
        ds.label = "x"


def test_direct_construction_is_validated():
    with pytest.raises(DataError, match="strictly ascending"):
        Dataset(temperature=np.array([2.0, 1.0]), kappa=np.array([1.0, 1.0]))
    with pytest.raises(ParameterError, match="sha256"):
        Dataset(temperature=np.array([1.0]), kappa=np.array([1.0]), sha256="xyz")


def test_subset_is_inclusive_and_noted():
    ds = load_data(GOOD / "units.csv")
    sub = ds.subset(20, 100)
    np.testing.assert_array_equal(sub.temperature, [20, 50, 100])
    np.testing.assert_array_equal(sub.kappa_err, [1.0, 0.8, 0.4])
    assert sub.sha256 == ds.sha256 and sub.label == ds.label
    assert sub.notes[-1] == "subset T >= 20 K and T <= 100 K (3 of 5 rows)"
    assert len(ds.subset(tmin=50)) == 3 and len(ds.subset(tmax=50)) == 3
    with pytest.raises(DataError, match="no rows between"):
        ds.subset(400, 500)
    with pytest.raises(ParameterError, match="tmin must not exceed tmax"):
        ds.subset(100, 20)
    with pytest.raises(ParameterError, match="tmin must be a number"):
        ds.subset("low")


def test_to_dict_is_json_safe_and_round_trips():
    ds = load_data(GOOD / "electrical.csv")
    d = json.loads(json.dumps(ds.to_dict()))
    back = Dataset.from_dict(d)
    assert back == ds
    assert back.notes == ds.notes and back.units == ds.units and back.sha256 == ds.sha256


@settings(max_examples=50, deadline=None)
@given(st.lists(st.tuples(st.floats(1e-300, 1e300), st.floats(1e-300, 1e300),
                          st.floats(-1e10, 1e10, allow_nan=False)), min_size=1, max_size=20,
                unique_by=lambda r: r[0]))
def test_json_round_trip_is_bit_exact(rows):
    rows = sorted(rows)
    ds = Dataset.from_arrays([r[0] for r in rows], [r[1] for r in rows],
                             seebeck=[r[2] for r in rows], label="h")
    back = Dataset.from_dict(json.loads(json.dumps(ds.to_dict())))
    for attr in ("temperature", "kappa", "seebeck"):
        assert getattr(back, attr).tobytes() == getattr(ds, attr).tobytes()


@pytest.mark.parametrize("mutate,match", [
    (lambda d: d.update(version=99), "newer"),
    (lambda d: d.update(format="other"), "expected format"),
    (lambda d: d.pop("kappa"), "missing key 'kappa'"),
    (lambda d: d.update(kappa=[1.0, "x", 3.0]), "kappa must be a list of numbers"),
    (lambda d: d.update(kappa=[1.0, -2.0, 3.0]), r"kappa\[1\]: expected a positive"),
    (lambda d: d.update(temperature=[300.0, 200.0, 100.0]), "strictly ascending"),
    (lambda d: d.update(extra=1), "unknown key 'extra'"),
    (lambda d: d.update(notes="text"), "notes must be a list"),
])
def test_from_dict_refuses_damaged_records(mutate, match):
    d = load_data(GOOD / "electrical.csv").to_dict()
    mutate(d)
    with pytest.raises(RecordError, match=match):
        Dataset.from_dict(d)


def test_repr_is_short():
    ds = load_data(GOOD / "electrical.csv")
    assert repr(ds) == ("Dataset(label='electrical', 3 rows, T 100..300 K, kind='total', "
                        "with resistivity, seebeck)")


# ======================================================================================
# Series
# ======================================================================================

def test_series_from_a_folder_with_labels_from_comments():
    series = load_series(GOOD / "series")
    assert [s.label for s in series] == ["grain 2 um", "grain 10 um", "grain 50 um"]
    np.testing.assert_array_equal(series[1].kappa, [2.0, 4.0, 1.0])


def test_series_from_a_list_with_labels():
    paths = sorted((GOOD / "series").glob("*.csv"))
    series = load_series(paths, labels=["a", "b", "c"], kind="lattice")
    assert [s.label for s in series] == ["a", "b", "c"]
    assert all(s.kind == "lattice" for s in series)


def test_series_errors(tmp_path):
    paths = sorted((GOOD / "series").glob("*.csv"))
    with pytest.raises(ParameterError, match="3 files, 2 labels"):
        load_series(paths, labels=["a", "b"])
    with pytest.raises(DataError, match='label "same" is already used by'):
        load_series(paths[:2], labels=["same", "same"])
    with pytest.raises(ParameterError, match="single file"):
        load_series(paths[0])
    with pytest.raises(DataError, match="no .csv"):
        load_series(tmp_path)
    with pytest.raises(ParameterError, match="empty list"):
        load_series([])
    with pytest.raises(DataError, match=r"text_in_number\.csv, line 4"):
        load_series([paths[0], BAD / "text_in_number.csv"])


# ======================================================================================
# Every door converts pint quantities (issue 9: never read them as bare numbers)
# ======================================================================================

def test_every_dataset_door_converts_quantities():
    import pint

    u = pint.UnitRegistry()
    T = u.Quantity([26.85, 126.85], "degC")
    k = u.Quantity([1500.0, 1200.0], "mW/(cm K)")
    direct = Dataset(temperature=T, kappa=k)
    arrays = Dataset.from_arrays(T, k)
    np.testing.assert_allclose(direct.temperature, [300.0, 400.0])
    np.testing.assert_allclose(direct.kappa, [150.0, 120.0])
    np.testing.assert_allclose(arrays.temperature, direct.temperature)
    np.testing.assert_allclose(arrays.kappa, direct.kappa)
    assert len(direct.subset(u.Quantity(100.0, "degC"))) == 1     # 373.15 K
    with pytest.raises(DataError, match="temperature: expected a temperature, got a quantity in meter"):
        Dataset(temperature=u.Quantity([1.0], "m"), kappa=[1.0])
    with pytest.raises(ParameterError, match="tmin must be a temperature"):
        direct.subset(u.Quantity(1.0, "m"))
