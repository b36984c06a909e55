"""The command line under hostile input: each case ends in exit 2 and one line on stderr (no traceback),
or in a correct result with checked values; nothing half-written; nothing hangs."""
import errno
import json
import os
import subprocess
import sys

import pytest

from kinetic import demo
from kinetic.cli import main

SAMPLE = str(demo.demo_path("sample_A.csv"))
MALFORMED = os.path.join(os.path.dirname(os.path.dirname(__file__)), "malformed")


def run(capsys, *argv):
    rc = main([str(a) for a in argv])
    out, err = capsys.readouterr()
    return rc, out, err


def one_line_error(rc, err):
    assert rc == 2, err
    lines = err.strip().splitlines()
    assert len(lines) == 1, err
    assert "Traceback" not in err
    return lines[0]


P = ["predict", "--material", "Si"]


@pytest.mark.parametrize("argv, match", [
    # number lists
    (P + ["--temperatures", "1:1000:100000000000"], "at most 100000"),
    (P + ["--temperatures", "1:1000:1e3"], "whole number"),
    (P + ["--temperatures", "1:1000:0"], ">= 1"),
    (P + ["--temperatures", "1:1000:-5"], ">= 1"),
    (P + ["--temperatures", "1:2"], "a:b:n"),
    (P + ["--temperatures", "1:2:3:lin"], "a:b:n:log"),
    (P + ["--temperatures", "0:100:3:log"], "a > 0"),
    (P + ["--temperatures", "nan"], "temperature"),
    (P + ["--temperatures", "inf"], "temperature"),
    (P + ["--temperatures", "-5"], "temperature"),
    (P + ["--temperatures", "0x1F"], "cannot read"),
    (P + ["--temperatures", "300,400"], "cannot read"),
    # numbers with units: converted or refused, never read as bare numbers
    (P + ["--temperatures", "3m"], "not convertible to K"),
    (P + ["--temperatures", "300 W/(m K)^99999999"], "too long or complex"),
    (P + ["--temperatures", "300 bogons"], "not a unit pint can read"),
    (P + ["--temperatures", "300", "--grain-size", "2kg"], "not convertible to m"),
    (P + ["--temperatures", "300", "--grain-size=-1um"], "> 0"),
    (P + ["--temperatures", "300", "--grain-size", "0"], "> 0"),
    (P + ["--temperatures", "300", "--set", "umklapp.gruneisen=2um"], "carries a unit"),
    (P + ["--temperatures", "300", "--set", "umklapp.gruneisen=abc"], "--set umklapp.gruneisen"),
    (P + ["--temperatures", "300", "--set", "nope.x=1"], "unknown parameter"),
    (P + ["--temperatures", "300", "--set", "=1"], "NAME=VALUE"),
    # materials
    (["predict", "--material", "Unobtainium", "--temperatures", "300"], "unknown material"),
    (["predict", "--temperatures", "300"], "--material is required"),
    (["predict", "--material", "Si", "--record", "r.json", "--temperatures", "300"], "not both"),
    (["sweep", "alloy", "--host-a", "Si", "--host-b", "Nope", "--fractions", "0.5", "--temperatures", "300"],
     "unknown material"),
    (["sweep", "alloy", "--host-a", "Si", "--host-b", "Ge", "--fractions", "0.5", "--temperatures", "300",
      "--length", "5 kelvin"], "not convertible to m"),
    (["sweep", "grain", "--material", "Si", "--lengths", "1e-9:1:100000:log", "--temperatures", "1:1000:100"],
     "at most 1000000"),
    (["sweep"], "grain"),
    # fit options
    (["fit", SAMPLE, "--material", "Mg2Si", "--starts", "-1"], "n_starts"),
    (["fit", SAMPLE, "--material", "Mg2Si", "--bounds", "umklapp.gruneisen=a:b"], "--bounds"),
    (["fit", SAMPLE, "--material", "Mg2Si", "--tmin", "20 metres"], "--tmin"),
    (["fit", SAMPLE, "--material", "Mg2Si", "--density", "heavy"], "--density"),
    (["fit", SAMPLE, "--material", "Mg2Si", "--density", "5 K"], "not convertible"),
    (["fit", SAMPLE, "--material", "Mg2Si", "--relative-density", "1.5"], "(0, 1]"),
    (["fit", SAMPLE, "--material", "Mg2Si", "--relative-density", "0"], "(0, 1]"),
    (["fit", SAMPLE, "--material", "Mg2Si", "--heat-capacity", "lots"], "--heat-capacity"),
    (["fit", SAMPLE, "--material", "Mg2Si", "--unit", "rho"], "COLUMN=UNIT"),
    (["fit", SAMPLE, "--material", "Mg2Si", "--decimal", ";"], "invalid choice"),
    (["fit", SAMPLE, "--material", "Mg2Si", "--jobs", "2"], "--jobs is for a batch"),
    (["fit", SAMPLE, SAMPLE, "--material", "Mg2Si", "--save", "r.json"], "--save and --report take one fit"),
    (["fit", SAMPLE, "--material", "Mg2Si", "--summary", "s.xlsx"], ".csv or .json"),
    (["fit", SAMPLE, SAMPLE, "--material", "Mg2Si", "--jobs", "0"], "--jobs"),
    (["fit", SAMPLE, SAMPLE, "--material", "Mg2Si", "--at", "-300"], "at"),
    (["fit", SAMPLE], "--material is required"),
    (["fit", "--demo", "--starts", "1", "--material", "Nope"], "unknown material"),
    # files
    (["fit", "no_such_file.csv", "--material", "Si"], "no such file"),
    (["fit", os.path.join(MALFORMED, "unknown_column.csv"), "--material", "Si"], "--ignore-column pressure"),
    (["fit", os.path.join(MALFORMED, "text_in_number.csv"), "--material", "Si"], "text_in_number.csv"),
    (["predict", "--record", "missing.json", "--temperatures", "300"], "no such file"),
    (["fit", SAMPLE, "--material", "Si", "--bogus-option"], "unrecognized arguments"),
])
def test_bad_input_is_one_line(capsys, argv, match):
    rc, out, err = run(capsys, *argv)
    assert match in one_line_error(rc, err)


def test_engine_hints_are_given_as_cli_options(capsys):
    rc, out, err = run(capsys, "fit", os.path.join(MALFORMED, "unknown_column.csv"), "--material", "Si")
    line = one_line_error(rc, err)
    assert "ignore_columns" not in line and "--ignore-column pressure" in line


def test_the_option_the_message_suggests_works(capsys, tmp_path):
    # a lab file with an extra column: refused with a hint, then read with the hinted option
    with open(SAMPLE) as fh:
        text = fh.read().splitlines()
    head = next(i for i, line in enumerate(text) if line and not line.startswith("#"))
    text[head] += ", humidity [%]"
    for i in range(head + 1, len(text)):
        if text[i].strip() and not text[i].startswith("#"):
            text[i] += ", 40"
    p = tmp_path / "extra.csv"
    p.write_text("\n".join(text) + "\n")
    rc, out, err = run(capsys, "fit", p, "--material", "Mg2Si", "--starts", "1", "--quiet")
    assert "--ignore-column humidity" in one_line_error(rc, err)
    rc, out, err = run(capsys, "fit", p, "--material", "Mg2Si", "--starts", "1", "--quiet", "--json",
                       "--ignore-column", "humidity")
    assert rc == 0 and json.loads(out)["success"]


def test_units_in_options_are_converted(capsys):
    rc, out, _ = run(capsys, *P, "--temperatures", "26.85degC", "300K", "--grain-size", "2um", "--json")
    assert rc == 0
    d = json.loads(out)
    assert d["temperature"] == pytest.approx([300.0, 300.0])
    assert d["parameters"]["boundary.length"] == pytest.approx(2e-6)
    assert d["kappa"][0] == pytest.approx(d["kappa"][1])
    rc, out, _ = run(capsys, *P, "--temperatures", "300", "--grain-size", "2e-6", "--json")
    assert json.loads(out)["kappa"][0] == pytest.approx(d["kappa"][0], rel=1e-12)


def test_loader_options_are_read_with_units():
    from kinetic.cli import build_parser
    from kinetic.cli.fit import load_options

    args = build_parser().parse_args(["fit", "x.csv", "--density", "5.2g/cm^3", "--cp", "0.7J/g/K",
                                      "--relative-density", "0.9", "--porosity-correction", "maxwell-eucken",
                                      "--ignore-column", "a", "--ignore-column", "b", "--unit", "rho=uOhm cm"])
    o = load_options(args)
    assert o["density"] == pytest.approx(5200.0) and o["heat_capacity"] == pytest.approx(700.0)
    assert o["relative_density"] == 0.9 and o["porosity_correction"] == "maxwell-eucken"
    assert o["ignore_columns"] == ["a", "b"] and o["units"] == {"rho": "uOhm cm"}
    args = build_parser().parse_args(["fit", "x.csv", "--heat-capacity", "Dulong-Petit"])
    assert load_options(args)["heat_capacity"] == "dulong-petit"


def test_fifo_is_refused_at_once(capsys, tmp_path):
    fifo = tmp_path / "data.csv"
    os.mkfifo(fifo)
    rc, out, err = run(capsys, "fit", fifo, "--material", "Si")
    assert "not a regular file (a FIFO)" in one_line_error(rc, err)


def test_empty_folder(capsys, tmp_path):
    rc, out, err = run(capsys, "fit", tmp_path, "--material", "Si")
    assert "no data tables" in one_line_error(rc, err)


def test_save_into_a_missing_or_non_folder_is_one_line_and_writes_nothing(capsys, tmp_path):
    fig = tmp_path / "fig.png"
    for target in (tmp_path / "no" / "such" / "dir" / "r.json", tmp_path / "file.txt" / "r.json"):
        (tmp_path / "file.txt").write_text("x")
        rc, out, err = run(capsys, "fit", SAMPLE, "--material", "Mg2Si", "--starts", "1", "--quiet",
                           "--save", target, "--report", fig)
        one_line_error(rc, err)
        assert out == "" and not fig.exists()


def test_save_on_a_full_device_is_one_line_and_leaves_nothing(capsys, tmp_path, monkeypatch):
    def full(*a, **k):
        raise OSError(errno.ENOSPC, "No space left on device")

    monkeypatch.setattr(os, "fsync", full)
    monkeypatch.setattr(os, "replace", full)
    rec, fig = tmp_path / "r.json", tmp_path / "r.png"
    rc, out, err = run(capsys, "fit", SAMPLE, "--material", "Mg2Si", "--starts", "1", "--quiet",
                       "--save", rec, "--report", fig)
    assert "No space left on device" in one_line_error(rc, err)
    assert os.listdir(tmp_path) == []  # no record, no figure, no temporary file


def test_summary_on_a_full_device_is_one_line(capsys, tmp_path, monkeypatch):
    def full(*a, **k):
        raise OSError(errno.ENOSPC, "No space left on device")

    monkeypatch.setattr(os, "fsync", full)
    rc, out, err = run(capsys, "fit", SAMPLE, SAMPLE, "--material", "Mg2Si", "--starts", "1", "--jobs", "1",
                       "--quiet", "--summary", tmp_path / "s.csv")
    assert "No space left on device" in one_line_error(rc, err)
    assert os.listdir(tmp_path) == []


def test_no_record_or_figure_when_the_fit_fails(capsys, tmp_path):
    rec, fig = tmp_path / "r.json", tmp_path / "r.png"
    rc, out, err = run(capsys, "fit", SAMPLE, "--material", "Mg2Si", "--free", "umklapp.nope",
                       "--save", rec, "--report", fig)
    one_line_error(rc, err)
    assert not rec.exists() and not fig.exists()


def test_predict_carries_the_scope_notes_of_the_default_model(capsys):
    defaults = pytest.importorskip("kinetic.defaults")
    if not hasattr(defaults, "scope_notes"):
        pytest.skip("kinetic.defaults.scope_notes not in this build")
    # 1-5000 K leaves any calibrated range of a preset (melting points lie far below 5000 K for Si)
    rc, out, _ = run(capsys, *P, "--temperatures", "1:5000:5", "--json")
    d = json.loads(out)
    want = defaults.scope_notes("Si", temperature=[1.0, 5000.0], boundary_length=d["parameters"]["boundary.length"])
    assert rc == 0 and d["scope_notes"] == [str(n) for n in want] and len(want) > 0
    rc, out, _ = run(capsys, *P, "--temperatures", "1:5000:5")
    assert all(f"note: {n}" in out for n in want)


def test_version(capsys):
    rc, out, _ = run(capsys, "--version")
    from kinetic._version import __version__
    assert rc == 0 and __version__ in out


def _subprocess(*argv, timeout=60):
    env = dict(os.environ)
    root = os.path.dirname(os.path.dirname(os.path.dirname(os.path.abspath(__file__))))
    env["PYTHONPATH"] = root + (os.pathsep + env["PYTHONPATH"] if env.get("PYTHONPATH") else "")
    return subprocess.run([sys.executable, "-m", "kinetic.cli", *map(str, argv)], capture_output=True,
                          text=True, timeout=timeout, env=env, stdin=subprocess.DEVNULL, check=False)


@pytest.mark.parametrize("argv, match", [
    (P + ["--temperatures", "1:1000:100000000000"], "at most 100000"),
    (P + ["--temperatures", "300 W/(m K)^99999999"], "too long or complex"),
    (["fit", "missing.csv", "--material", "Si"], "no such file"),
])
def test_in_a_real_process(argv, match):
    done = _subprocess(*argv)
    assert done.returncode == 2 and done.stdout == ""
    lines = done.stderr.strip().splitlines()
    assert len(lines) == 1 and match in lines[0] and "Traceback" not in done.stderr


def test_fifo_in_a_real_process_does_not_hang(tmp_path):
    fifo = tmp_path / "data.csv"
    os.mkfifo(fifo)
    done = _subprocess("fit", fifo, "--material", "Si", timeout=60)  # a hang fails by timeout
    assert done.returncode == 2 and "not a regular file" in done.stderr
    assert len(done.stderr.strip().splitlines()) == 1
