"""The kinetic command: exit codes, one-line errors, JSON output, the demo fit."""
import json
import math
import os
import subprocess
import sys

import numpy as np
import pytest

from kinetic import demo
from kinetic.cli import main, parse_numbers
from kinetic.records import load_record


def run(capsys, *argv):
    rc = main(list(argv))
    out, err = capsys.readouterr()
    return rc, out, err


def one_line_error(rc, err):
    assert rc == 2
    lines = err.strip().splitlines()
    assert len(lines) == 1, err
    assert "Traceback" not in err
    return lines[0]


def test_fit_demo_json_recovers_the_invented_truth(capsys):
    rc, out, err = run(capsys, "fit", "--demo", "--json", "--quiet", "--lorenz", "spb")
    assert rc == 0 and err == ""
    d = json.loads(out)
    assert d["material"] == "Mg2Si" and d["success"]
    for name in demo.DEFAULT_FREE:
        v, s = d["values"][name], d["stderr"][name]
        # invented data with 3% noise: the true value within 4 standard errors (chance of a miss ~6e-5)
        assert abs(v - demo.TRUE_SAMPLE_A[name]) < 4 * s, (name, v, s)
    assert d["samples"][0]["label"] == "sample A"


def test_fit_demo_text_output(capsys):
    rc, out, err = run(capsys, "fit", "--demo", "--starts", "2", "--quiet")
    assert rc == 0
    assert "boundary.length" in out and "95% interval" in out


def test_fit_file_save_report_then_predict_and_sweep(capsys, tmp_path):
    rec, fig = tmp_path / "r.json", tmp_path / "r.png"
    rc, out, _ = run(capsys, "fit", str(demo.demo_path()), "--material", "Mg2Si", "--starts", "2", "--quiet",
                     "--save", str(rec), "--report", str(fig))
    assert rc == 0 and rec.exists() and fig.read_bytes()[:4] == b"\x89PNG"
    r = load_record(rec)
    rc, out, _ = run(capsys, "predict", "--record", str(rec), "--temperatures", "20", "100:300:2", "--json")
    assert rc == 0
    d = json.loads(out)
    assert d["temperature"] == [20.0, 100.0, 300.0]
    np.testing.assert_array_equal(d["kappa"], r.model.kappa(np.array(d["temperature"])))
    assert all(lo < k < hi for lo, k, hi in zip(d["lower"], d["kappa"], d["upper"]))
    rc, out, _ = run(capsys, "sweep", "grain", "--record", str(rec), "--lengths", "1e-7:1e-5:3:log",
                     "--temperatures", "300", "--json")
    assert rc == 0
    d = json.loads(out)
    assert len(d["kappa"]) == 3 and "lower" in d and d["kappa"][0][0] < d["kappa"][2][0]


def test_joint_fit_of_several_files(capsys, tmp_path):
    files = [str(demo.demo_path(f"grain_{i}.csv")) for i in (1, 2)]
    rc, out, _ = run(capsys, "fit", *files, "--joint", "--material", "Mg2Si", "--starts", "1", "--quiet", "--json")
    assert rc == 0
    d = json.loads(out)
    assert "boundary.length[grain 0.5 um]" in d["values"] and "umklapp.gruneisen" in d["values"]


def test_predict_material_and_sweep_alloy(capsys):
    rc, out, _ = run(capsys, "predict", "--material", "Si", "--temperatures", "300", "--set", "umklapp.gruneisen=1.0")
    assert rc == 0 and "300" in out
    rc, out, _ = run(capsys, "sweep", "alloy", "--host-a", "Si", "--host-b", "Ge", "--fractions", "0:1:3",
                     "--temperatures", "300", "--gruneisen", "1", "--json")
    d = json.loads(out)
    assert rc == 0 and d["fractions"] == [0.0, 0.5, 1.0]
    assert d["kappa"][1][0] < d["kappa"][0][0]  # the alloy conducts less than Si (Abeles 1963)


def test_demo_and_materials(capsys, tmp_path):
    rc, out, _ = run(capsys, "demo", "--write", str(tmp_path / "d"))
    assert rc == 0 and "INVENTED" not in out and "Invented" in out
    assert (tmp_path / "d" / "sample_A.csv").read_text().startswith("# synthetic:")
    rc, out, _ = run(capsys, "materials", "--json")
    assert rc == 0 and any(m["name"] == "Si" for m in json.loads(out))


def test_progress_bar_on_stderr(capsys):
    rc, out, err = run(capsys, "fit", "--demo", "--starts", "3", "--progress")
    assert rc == 0 and "start 3/3" in err and "fit: start" not in out


@pytest.mark.parametrize("argv, match", [
    (["fit", "no_such_file.csv", "--material", "Si"], "no such file"),
    (["fit", "--demo", "--material", "Unobtainium"], "unknown material"),
    (["fit", "--demo", "--free", "umklapp.nope"], "unknown parameter"),
    (["fit", "--demo", "--bounds", "umklapp.gruneisen=3:1"], "lower must be below upper"),
    (["fit", "--demo", "--bounds", "umklapp.gruneisen=3"], "LO:HI"),
    (["fit", "--demo", "--starts", "many"], "invalid int"),
    (["fit", "--demo", "--starts", "0"], "n_starts"),
    (["fit"], "FILE"),
    (["predict", "--material", "Si", "--temperatures", "-5"], "temperature"),
    (["predict", "--material", "Si", "--temperatures", "1:2"], "a:b:n"),
    (["predict", "--record", "missing.json", "--temperatures", "300"], "no such file"),
    (["predict", "--material", "Si", "--temperatures", "300", "--set", "umklapp.gruneisen"], "NAME=VALUE"),
    (["sweep", "alloy", "--host-a", "Si", "--host-b", "Ge", "--fractions", "2", "--temperatures", "300"], "[0, 1]"),
    (["bogus"], "invalid choice"),
])
def test_bad_input_exit_2_with_one_line(capsys, argv, match):
    rc, out, err = run(capsys, *argv)
    line = one_line_error(rc, err)
    assert match in line


def test_damaged_record_is_one_line(capsys, tmp_path):
    p = tmp_path / "bad.json"
    p.write_text('{"schema": "kinetic.fit-record", "ver')
    rc, out, err = run(capsys, "predict", "--record", str(p), "--temperatures", "300")
    assert "damaged or truncated" in one_line_error(rc, err)


def test_help_and_no_command(capsys):
    assert run(capsys, "--help")[0] == 0
    assert run(capsys)[0] == 2


def test_parse_numbers():
    np.testing.assert_allclose(parse_numbers(["1", "2:4:3", "1:100:3:log"], "x"), [1, 2, 3, 4, 1, 10, 100])


def test_console_script_in_a_real_process(tmp_path):
    # the installed entry point (pyproject: kinetic = "kinetic.cli:main"), run as a user would
    ok = subprocess.run([sys.executable, "-m", "kinetic.cli", "fit", "--demo", "--starts", "1", "--json"],
                        capture_output=True, text=True, check=False)
    assert ok.returncode == 0 and math.isfinite(json.loads(ok.stdout)["chi2"])
    bad = subprocess.run([sys.executable, "-m", "kinetic.cli", "fit", str(tmp_path / "x.csv"), "--material", "Si"],
                         capture_output=True, text=True, check=False)
    assert bad.returncode == 2 and len(bad.stderr.strip().splitlines()) == 1 and "Traceback" not in bad.stderr


def test_materials_lists_each_preset_with_its_calibration_or_none(capsys):
    from kinetic.presets import PRESETS

    rc, out, _ = run(capsys, "materials", "--json")
    rows = json.loads(out)
    assert rc == 0 and [r["name"] for r in rows] == list(PRESETS)
    for r in rows:
        assert r["calibrated"] == (r["calibration"] is not None)
        if r["calibrated"]:
            c = r["calibration"]
            assert c["source"] and 0 < c["t_min"] < c["t_max"] and c["rms"] >= 0 and c["n_points"] > 0
    rc, out, _ = run(capsys, "materials")
    assert rc == 0 and all(name in out for name in PRESETS) and "presets calibrated" in out


def test_preset_calibration_rule():
    from kinetic.cli.info import preset_calibration

    cal = {"value": {"table": "reference/x.csv", "t_min": 100, "t_max": 800, "rms": 0.05, "n_points": 12,
                     "sample": "bulk crystal"}, "source": "A. Author, J. (2000)"}
    model = {"value": {"branches": "avg"}}
    assert preset_calibration({"calibration": cal, "model": model}) == {
        "source": "A. Author, J. (2000)", "table": "reference/x.csv", "t_min": 100.0, "t_max": 800.0,
        "rms": 0.05, "n_points": 12, "sample": "bulk crystal", "table_status": "from memory"}
    assert preset_calibration({"calibration": cal}) is None                 # no calibrated model
    assert preset_calibration({"model": model}) is None                     # no calibration record
    assert preset_calibration({"calibration": {"value": None}, "model": model}) is None


def test_materials_agrees_with_the_defaults_module():
    # kinetic materials reads the preset tables directly (speed); kinetic.defaults is the reference
    defaults = pytest.importorskip("kinetic.defaults")
    if not hasattr(defaults, "calibration"):
        pytest.skip("kinetic.defaults.calibration not in this build")
    from kinetic.cli.info import material_rows

    for r in material_rows():
        ref = defaults.calibration(r["name"])
        assert (ref is None) == (r["calibration"] is None), r["name"]
        if ref is not None:
            c = r["calibration"]
            assert (c["source"], c["t_min"], c["t_max"], c["rms"], c["n_points"], c["sample"], c["table_status"]) == \
                   (ref.source, ref.t_min, ref.t_max, ref.rms, ref.n_points, ref.sample, ref.table_status)


HEAVY = ("numpy", "scipy", "pint", "matplotlib", "kinetic.fitting", "kinetic.lattice", "kinetic.data")


@pytest.mark.parametrize("argv", [["--help"], ["materials"], ["materials", "--json"], ["fit", "--help"]])
def test_light_commands_load_no_heavy_module(argv):
    # Speed is measured in benchmarks/bench_cli.py; this guards the reason for it: the command line's
    # own modules load nothing heavy for these commands. The package root is replaced by a bare
    # package object so that the check does not depend on how kinetic/__init__.py imports.
    import kinetic

    code = (
        "import sys, types\n"
        f"m = types.ModuleType('kinetic'); m.__path__ = [{os.path.dirname(kinetic.__file__)!r}]\n"
        "sys.modules['kinetic'] = m\n"
        "from kinetic.cli import main\n"
        "import contextlib, io\n"
        "with contextlib.redirect_stdout(io.StringIO()):\n"
        f"    rc = main({argv!r})\n"
        f"print(rc, [h for h in {HEAVY!r} if h in sys.modules])\n"
    )
    done = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=False)
    assert done.stdout.strip() == "0 []", done.stdout + done.stderr
