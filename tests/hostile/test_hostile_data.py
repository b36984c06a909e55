"""Hostile and awkward data files: each case has its expected outcome.

Either a correct load (with the values checked) or a one-line DataError /
ParameterError that names the file (and the line and column where there is
one).  Never a traceback of another kind, never a silently wrong number.

No case is timed: pathological inputs (a unit such as ``W/(m K)^99999999``,
a 33 MB file, a 12 000-character line, a FIFO) are refused by the loader's
stated limits *before* any expensive work, and each test asserts that the
refusal came from that limit (its message), so a hang would show as the
limit's message missing, not as a slow test.
"""
from __future__ import annotations

import os
import re
import stat
from pathlib import Path

import numpy as np
import pytest

from kinetic.data import load_data
from kinetic.data.text import MAX_FILE_BYTES, MAX_LINE_BYTES
from kinetic.data.units import MAX_UNIT_CHARS
from kinetic.errors import DataError, ParameterError

HERE = Path(__file__).parent / "data"
FLASH = b"# density: 2.0 g/cm^3\n# cp: 0.5 J/(g K)\n"


def ok(T, kappa, **opts):
    return ("ok", np.array(T, float), np.array(kappa, float), opts)


def err(pattern, **opts):
    return ("error", pattern, None, opts)


# id -> (file bytes, expected outcome).  Expected values are worked out by hand
# from the unit definitions (SI brochure; 0 degC = 273.15 K).
CASES = {
    # ---- header forms labs write ---------------------------------------------------------
    "slash_spaced": (b"T / K, kappa / (W/m/K)\n300, 1.5\n", ok([300], [1.5])),
    "paren_minus_exponents": (b"T (K), kappa (W m-1 K-1)\n300, 1.5\n", ok([300], [1.5])),
    "slash_nested": (b"T/K, kappa/(W/(m K))\n300, 1.5\n", ok([300], [1.5])),
    "caret_exponents": (b"T [K], kappa [W m^-1 K^-1]\n300, 1.5\n", ok([300], [1.5])),
    "compact_Wm-1K-1": (b"T [K], kappa [Wm-1K-1]\n300, 1.5\n", ok([300], [1.5])),
    "superscripts": ("T [K], kappa [W·m⁻¹·K⁻¹]\n300, 1.5\n".encode(), ok([300], [1.5])),
    "mW_per_cm_K": (b"T [K], kappa [mW/(cm K)]\n300, 15\n", ok([300], [1.5])),
    "celsius_paren_degree": ("T (°C), kappa [W/(m K)]\n26.85, 1.5\n".encode(), ok([300], [1.5])),
    "celsius_sign_U2103": ("T [℃], kappa [W/(m K)]\n26.85, 1.5\n".encode(), ok([300], [1.5])),
    "celsius_latin1_degree": (b"T [\xb0C], kappa [W/(m K)]\n26.85, 1.5\n", ok([300], [1.5])),
    "fahrenheit": (b"T [degF], kappa [W/(m K)]\n80.33, 1.5\n", ok([300], [1.5])),
    "kelvin_sign_U212A": ("T [\u212a], kappa [W/(m K)]\n300, 1.5\n".encode(), ok([300], [1.5])),
    # a temperature DIFFERENCE in a compound unit: 1 W/(m degC) = 1 W/(m K)
    "per_degree_celsius": ("T [K], kappa [W/(m °C)]\n300, 1.5\n".encode(), ok([300], [1.5])),
    "per_degree_celsius_latin1": (b"T [K], kappa [W/(m \xb0C)]\n300, 1.5\n", ok([300], [1.5])),
    "bom_crlf": (b"\xef\xbb\xbfT [K], kappa [W/(m K)]\r\n300, 1.5\r\n400, 1.2\r\n",
                 ok([300, 400], [1.5, 1.2])),
    "utf16_bom": ("T [K]\tkappa [W/(m K)]\n300\t1.5\n".encode("utf-16"), ok([300], [1.5])),
    "old_mac_cr": (b"T [K], kappa [W/(m K)]\r300, 1.5\r400, 1.2\r", ok([300, 400], [1.5, 1.2])),
    "tsv_decimal_comma": (b"T [K]\tkappa [W/(m K)]\n300\t1,5\n400\t1,25\n",
                          ok([300, 400], [1.5, 1.25])),
    "tsv_three_decimals_with_option": (b"T [K]\tkappa [W/(m K)]\n300\t1,500\n",
                                       ok([300], [1.5], decimal=",")),
    "descending_rows": (b"T [K], kappa [W/(m K)]\n400, 1.2\n300, 1.5\n",
                        ok([300, 400], [1.5, 1.2])),
    "quoted_fields": (b'"T [K]","kappa [W/(m K)]"\n"300","1.5"\n', ok([300], [1.5])),
    "trailing_delimiters": (b"T [K], kappa [W/(m K)],\n300, 1.5,\n", ok([300], [1.5])),
    "diffusivity_celsius": (FLASH + "T [°C], D [mm^2/s]\n26.85, 4.0\n".encode(), ok([300], [4.0])),
    "diffusivity_cm2": (FLASH + b"T [K], thermal diffusivity [cm^2/s]\n300, 0.04\n",
                        ok([300], [4.0])),
    # ---- units that must be refused fast, by the stated limits ---------------------------
    "unit_huge_exponent": (b"T [K], kappa [W/(m K)^99999999]\n300, 1\n",
                           err(r'line 1, column "kappa": unit .* cannot be read \(an exponent '
                               r"other than a plain number up to 4\)")),
    "unit_huge_number": (b"T [K], kappa [123456789 W/(m K)]\n300, 1\n",
                         err(r"cannot be read \(a number of more than 8 digits\)")),
    "unit_exponent_5": (b"T [K], kappa [W/(m K)^5]\n300, 1\n",
                        err(r"cannot be read \(an exponent other than a plain number up to 4\)")),
    "unit_power_of_ten": (b"T [K], kappa [10^99999 W/(m K)]\n300, 1\n",
                          err(r"cannot be read \(an exponent other than a plain number")),
    "unit_parenthesised_exponent": (b"T [K], kappa [W/(m K)^(9*9)]\n300, 1\n",
                                    err(r"cannot be read \(an exponent other than")),
    "unit_repeated_exponent": (b"T [K], kappa [W/(m K)**2**2]\n300, 1\n",
                               err(r"cannot be read \(a repeated exponent\)")),
    "unit_too_long": (b"T [K], kappa [" + b"W/(m K) " * 6 + b"]\n300, 1\n",
                      err(rf"cannot be read \(longer than {MAX_UNIT_CHARS} characters\)")),
    "unit_unclosed": (b"T [K], kappa [W/(m K]\n300, 1\n",
                      err(r'column "kappa": unit "W/\(m K" cannot be read \(unbalanced')),
    "unit_unclosed_paren_field": (b"T [K]; kappa (W/(m K)\n300; 1\n",
                                  err(r'column "kappa \(W/\(m K\)": unbalanced "\(" and "\)"')),
    "unit_unknown": (b"T [K], kappa [W/(m blorp)]\n300, 1\n",
                     err(r'column "kappa": unknown unit "W/\(m blorp\)"')),
    "unit_wrong_dimension": (b"T [K], kappa [K]\n300, 1\n",
                             err(r'column "kappa": unit "K" is not a thermal conductivity')),
    "slash_without_unit": (b"T [K], kappa/\n300, 1\n",
                           err(r'column "kappa/": "/" but no unit after it; expected a unit')),
    # ---- numbers the loader would have to guess ------------------------------------------
    "tsv_thousands_separators": (b"T [K]\tkappa [W/(m K)]\n300\t1,500\n600\t1,200\n1,000\t900\n",
                                 err(r'line 2, column "kappa": \'1,500\' may hold a thousands '
                                     r"separator.*--decimal")),
    "tsv_thousands_in_T": (b"T [K]\tkappa [W/(m K)]\n1,000\t1,5\n",
                           err(r'line 2, column "T": \'1,000\' may hold a thousands separator')),
    "decimal_comma_in_csv": (b"T [K], kappa [W/(m K)]\n300, 1,5\n",
                             err(r"line 2: expected 2 fields .* got 3 .*decimal commas")),
    "mixed_decimal_marks": (b"T [K]; kappa [W/(m K)]\n300; 1,5\n400; 1.2\n",
                            err(r"line 3, column \"kappa\": decimal point in '1.2' but line 2 "
                                r"uses a decimal comma")),
    "unicode_minus": ("T [K], kappa [W/(m K)]\n300, −1.5\n".encode(),
                      err(r'line 2, column "kappa": expected a number, got \'−1.5\'')),
    "zero_width_space": ("T [K], kappa [W/(m K)]\n300, 1.5\u200b\n".encode(),
                         err(r'line 2, column "kappa": expected a number')),
    "bell_character": (b"T [K], kappa [W/(m K)]\n300, 1\x075\n",
                       err(r'line 2, column "kappa": expected a number')),
    "nan": (b"T [K], kappa [W/(m K)]\n300, nan\n", err(r"expected a finite number, got 'nan'")),
    "inf": (b"T [K], kappa [W/(m K)]\n300, inf\n", err(r"expected a finite number, got 'inf'")),
    "overflow": (b"T [K], kappa [W/(m K)]\n300, 1e999\n", err(r"too large for a float")),
    "negative_kappa": (b"T [K], kappa [W/(m K)]\n300, -1.5\n",
                       err(r'line 2, column "kappa": expected a positive thermal conductivity')),
    "below_absolute_zero": (b"T [degC], kappa [W/(m K)]\n-300, 1\n",
                            err(r'line 2, column "T": expected a temperature above absolute zero')),
    "ragged_row": (b"T [K], kappa [W/(m K)]\n300\n", err(r'line 2, column "kappa": missing')),
    "repeat_with_other_value": (b"T [K], kappa [W/(m K)]\n300, 1\n300, 2\n",
                                err(r"line 3, column \"T\": temperature 300 K repeats line 2")),
    # ---- files that are not tables -------------------------------------------------------
    "empty": (b"", err(r"line 1: the file is empty")),
    "nul_bytes": (b"T [K], kappa\x00\n300, 1\n", err(r"line 1: this looks like a binary file")),
    "zip_workbook": (b"PK\x03\x04\x00\x00garbage", err(r"zipped file such as an Excel \.xlsx")),
    "header_only": (b"T [K], kappa [W/(m K)]\n", err(r"line 1: header but no data rows")),
    "unknown_column_names_every_door": (
        b"T [K], kappa [W/(m K)], time [s]\n300, 1, 5\n",
        err(r'column "time": unknown column.*--ignore-column time \(CLI\) / '
            r'ignore_columns=\["time"\] \(Python\) / "Ignore columns" \(workbench\)')),
    "unknown_column_ignored": (b"T [K], kappa [W/(m K)], time [s]\n300, 1, 5\n",
                               ok([300], [1.0], ignore_columns=["time"])),
    "line_too_long": (b"# " + b"x" * (MAX_LINE_BYTES + 10) + b"\nT [K], kappa\n300, 1\n",
                      err(rf"line 1: {MAX_LINE_BYTES + 12} bytes is longer than the "
                          rf"{MAX_LINE_BYTES} bytes a line may have")),
    # ---- diffusivity files ---------------------------------------------------------------
    "diffusivity_no_unit": (FLASH + b"T [K], D\n300, 4\n",
                            err(r'line 3, column "D": no unit; expected a unit such as mm\^2/s')),
    "diffusivity_unit_wrong_by_1e6": (FLASH + b"T [K], D [m^2/s]\n300, 4\n",
                                      err(r'line 4, column "D": 4 m\^2/s is no diffusivity')),
    "diffusivity_no_density": (b"# cp: 0.5 J/(g K)\nT [K], D [mm^2/s]\n300, 4\n",
                               err(r": no density for k = D rho c_p")),
    "relative_density_above_one": (FLASH + b"# relative_density: 1.5\nT [K], D [mm^2/s]\n300, 4\n",
                                   err(r"line 3: expected a relative density in \(0, 1\].*'1.5'")),
    "density_header_and_column_disagree": (
        b"# density: 2.0 g/cm^3\n# cp: 0.5 J/(g K)\nT [K], D [mm^2/s], density [g/cm^3]\n"
        b"300, 4, 2.1\n",
        err(r'line 4, column "density": density 2100 kg/m\^3 disagrees with 2000 kg/m\^3 '
            r"given by line 1")),
}


@pytest.mark.parametrize("name", sorted(CASES))
def test_case(tmp_path, name):
    content, (outcome, a, b, opts) = CASES[name]
    path = tmp_path / f"{name}.csv"
    path.write_bytes(content)
    if outcome == "ok":
        ds = load_data(path, **opts)
        np.testing.assert_allclose(ds.temperature, a, rtol=1e-12)
        np.testing.assert_allclose(ds.kappa, b, rtol=1e-12)
        return
    with pytest.raises((DataError, ParameterError)) as info:
        load_data(path, **opts)
    msg = str(info.value)
    assert "\n" not in msg, msg
    assert msg.startswith(str(path)), msg          # names the file
    assert re.search(a, msg), msg


def test_corpus_size():
    assert len(CASES) + len(SPECIAL) >= 40


# ---- things that are not regular files: refused by os.stat before opening --------------------

def _fifo(tmp_path):
    p = tmp_path / "pipe.csv"
    os.mkfifo(p)
    return p, r"is a named pipe \(FIFO\); expected a regular data file"


def _fifo_symlink(tmp_path):
    p, _ = _fifo(tmp_path)
    link = tmp_path / "link.csv"
    link.symlink_to(p)
    return link, r"is a named pipe \(FIFO\)"


def _directory(tmp_path):
    return tmp_path, r"is a folder; expected the path of a data file"


def _device(tmp_path):
    return Path("/dev/null"), r"is a device; expected a regular data file"


def _too_big(tmp_path):
    p = tmp_path / "huge.csv"
    with open(p, "wb") as f:          # sparse: the size is seen by os.stat, nothing is read
        f.truncate(MAX_FILE_BYTES + 1)
    return p, rf"{MAX_FILE_BYTES + 1} bytes is more than the {MAX_FILE_BYTES} bytes"


def _missing(tmp_path):
    return tmp_path / "nope.csv", r"no such file"


SPECIAL = {"fifo": _fifo, "fifo_symlink": _fifo_symlink, "directory": _directory,
           "device": _device, "too_big": _too_big, "missing": _missing}


@pytest.mark.parametrize("name", sorted(SPECIAL))
def test_not_a_regular_file(tmp_path, name):
    if name == "device" and not Path("/dev/null").exists():
        pytest.skip("no /dev/null here")
    path, pattern = SPECIAL[name](tmp_path)
    with pytest.raises(DataError, match=pattern) as info:
        load_data(path)
    assert str(info.value).startswith(str(path)) and "\n" not in str(info.value)


def test_fifo_is_refused_by_stat_not_by_reading(tmp_path, monkeypatch):
    # opening a FIFO without a writer would block: the loader must not open it at all
    path, _ = _fifo(tmp_path)
    real_open = open

    def no_open(p, *a, **k):
        if os.fspath(p) == os.fspath(path):
            raise AssertionError("the loader opened the FIFO")
        return real_open(p, *a, **k)

    monkeypatch.setattr("builtins.open", no_open)
    with pytest.raises(DataError, match="FIFO"):
        load_data(path)
    assert stat.S_ISFIFO(os.stat(path).st_mode)


# ---- shipped files (the same problems as files on disk, with their exact bytes) --------------

SHIPPED = {
    "latin1_degree.csv": ok([300.0, 400.0], [1.5, 1.2]),
    "bom_crlf_slash.csv": ok([300.0, 400.0], [1.5, 1.2]),
    "thousands.tsv": err(r'line 3, column "kappa": \'1,500\' may hold a thousands separator'),
    "unit_bomb.csv": err(r"cannot be read \(an exponent other than a plain number up to 4\)"),
}


@pytest.mark.parametrize("name", sorted(SHIPPED))
def test_shipped_file(name):
    outcome, a, b, opts = SHIPPED[name]
    path = HERE / name
    if outcome == "ok":
        ds = load_data(path, **opts)
        np.testing.assert_allclose(ds.temperature, a, rtol=1e-12)
        np.testing.assert_allclose(ds.kappa, b, rtol=1e-12)
        return
    with pytest.raises(DataError) as info:
        load_data(path, **opts)
    assert str(info.value).startswith(str(path)) and re.search(a, str(info.value))
