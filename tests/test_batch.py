"""kinetic.batch: a series of samples fitted one by one, checked row by row against single fits."""
import csv
import errno
import json
import os
import sys
from pathlib import Path

import numpy as np
import pytest

from kinetic import batch, demo
from kinetic.cli import main
from kinetic.data import load_data
from kinetic.errors import ParameterError
from kinetic.fitting import fit

GRAIN = [demo.demo_path(f"grain_{i}.csv") for i in (1, 2, 3)]
FIT_OPTIONS = {"n_starts": 2, "seed": 0}
AT = [300.0, 600.0]


def start_model():
    # the model fit_many starts from for material="Mg2Si" (the preset's default model)
    return batch._start_model("Mg2Si")


@pytest.fixture(scope="module")
def single_fits():
    model = start_model()
    free = batch._start_free(model)
    return free, [fit(model, load_data(p), free, **FIT_OPTIONS) for p in GRAIN]


def assert_rows_match_single_fits(rows, free, singles):
    assert len(rows) == len(singles)
    for row, res in zip(rows, singles):
        assert row["status"] == "ok", row["error"]
        assert row["n_points"] == len(res.data.temperature)
        for n in free:
            # the same computation (same code, data, start points and seed) in another process or
            # thread: agreement to rounding, not to a fit tolerance
            assert row["values"][n] == pytest.approx(res.values[n], rel=1e-9), n
            assert row["stderr"][n] == pytest.approx(res.stderr[n], rel=1e-6), n
        k = res.model.kappa(np.array(AT))
        for t, kv in zip(AT, k):
            assert row["kappa_lattice"][f"{t:g} K"] == pytest.approx(kv, rel=1e-9)


def test_rows_match_single_fits_in_this_process(single_fits):
    free, singles = single_fits
    r = batch.fit_many(GRAIN, material="Mg2Si", jobs=1, fit_options=FIT_OPTIONS, at=AT, progress=False)
    assert r.free == free and r.n_failed == 0
    assert [row["label"] for row in r.rows] == [res.labels[0] for res in singles]
    assert_rows_match_single_fits(r.rows, free, singles)


def test_rows_match_single_fits_on_local_processes(single_fits):
    free, singles = single_fits
    r = batch.fit_many(GRAIN, material="Mg2Si", jobs=2, fit_options=FIT_OPTIONS, at=AT, progress=False)
    assert_rows_match_single_fits(r.rows, free, singles)  # row order is the order of the files


def test_rows_match_single_fits_on_a_local_dask_cluster(single_fits):
    distributed = pytest.importorskip("distributed")
    free, singles = single_fits
    with distributed.LocalCluster(n_workers=1, threads_per_worker=1, processes=False, dashboard_address=None,
                                  silence_logs=40) as cluster:
        r = batch.fit_many(GRAIN, material="Mg2Si", scheduler=cluster.scheduler_address,
                           fit_options=FIT_OPTIONS, at=AT, progress=False)
    assert_rows_match_single_fits(r.rows, free, singles)


def test_missing_dask_is_one_clear_error(monkeypatch):
    monkeypatch.setitem(sys.modules, "distributed", None)  # import distributed -> ImportError
    with pytest.raises(ParameterError, match=r"kinetic-conductivity\[dask\]"):
        batch.fit_many(GRAIN[:1], material="Mg2Si", scheduler="tcp://127.0.0.1:1", progress=False)


def test_each_failure_is_a_row_and_the_batch_goes_on(tmp_path):
    bad = tmp_path / "text.csv"
    bad.write_text("T [K],kappa [W/(m K)]\n300,abc\n400,3\n")
    fifo = tmp_path / "pipe.csv"
    os.mkfifo(fifo)
    paths = [GRAIN[0], tmp_path / "missing.csv", bad, fifo, tmp_path / "*.nomatch"]
    r = batch.fit_many(paths, material="Mg2Si", jobs=1, fit_options={"n_starts": 1}, progress=False)
    status = [row["status"] for row in r.rows]
    assert status == ["ok", "error", "error", "error", "error"]
    errors = [row["error"] for row in r.rows[1:]]
    assert "no such file" in errors[0] and "missing.csv" in errors[0]
    assert "text.csv" in errors[1]           # the loader names the file (and line/column)
    assert "not a regular file" in errors[2]
    assert "no file matches" in errors[3]
    for e in errors:
        assert "\n" not in e and "Traceback" not in e
    assert r.n_failed == 4


def test_summary_csv_and_json(tmp_path):
    r = batch.fit_many(GRAIN[:2] + [tmp_path / "gone.csv"], material="Mg2Si", jobs=1,
                       fit_options={"n_starts": 1}, at=AT, progress=False)
    r.to_csv(tmp_path / "s.csv")
    r.to_json(tmp_path / "s.json")
    with open(tmp_path / "s.csv", newline="") as fh:
        table = list(csv.reader(fh))
    head, body = table[0], table[1:]
    assert len(body) == 3 and head == r.columns()
    assert "boundary.length [m]" in head and "k_L(300 K) [W/(m K)]" in head
    row0 = dict(zip(head, body[0]))
    assert float(row0["boundary.length [m]"]) == pytest.approx(r.rows[0]["values"]["boundary.length"], rel=1e-9)
    assert float(row0["k_L(600 K) [W/(m K)]"]) == pytest.approx(r.rows[0]["kappa_lattice"]["600 K"], rel=1e-9)
    assert dict(zip(head, body[2]))["status"] == "error"
    d = json.loads((tmp_path / "s.json").read_text())
    assert d["schema"] == "kinetic.batch-summary" and d["at"] == AT
    assert [x["label"] for x in d["rows"]] == [x["label"] for x in r.rows]
    assert not [p for p in os.listdir(tmp_path) if p.endswith(".tmp")]


def test_not_determined_errors_are_said_so():
    row = {"file": "a.csv", "label": "a", "status": "ok", "error": None, "n_points": 5, "chi2_reduced": 1.0,
           "values": {"boundary.length": 1e-6}, "stderr": {"boundary.length": None},
           "kappa_lattice": {"300 K": 10.0}, "flags": ["boundary.length is at a bound"], "notes": []}
    r = batch.BatchResult(rows=[row], free=["boundary.length"], units={"boundary.length": "m"}, at=[300.0],
                          material="Si")
    flat = dict(zip(r.columns(), r.flat_rows()[0]))
    assert flat["boundary.length stderr"] == "not determined"
    assert flat["flags"] == "boundary.length is at a bound"
    assert "not determined" in r.table()


def test_summary_write_on_a_full_device_leaves_nothing(tmp_path, monkeypatch):
    r = batch.BatchResult(rows=[], free=[], units={}, at=[300.0], material="Si")

    def full(fd):
        raise OSError(errno.ENOSPC, "No space left on device")

    monkeypatch.setattr(batch.os, "fsync", full)
    with pytest.raises(OSError, match="No space left"):
        r.to_csv(tmp_path / "s.csv")
    assert os.listdir(tmp_path) == []


def test_progress_callback_and_a_callback_that_raises():
    seen = []
    batch.fit_many(GRAIN[:2], material="Mg2Si", jobs=1, fit_options={"n_starts": 1},
                   progress=lambda done, total, row: seen.append((done, total, row["label"])))
    assert [s[:2] for s in seen] == [(1, 2), (2, 2)]

    def boom(done, total, row):
        raise ZeroDivisionError("x")

    with pytest.raises(ParameterError, match="progress callback raised ZeroDivisionError"):
        batch.fit_many(GRAIN[:1], material="Mg2Si", jobs=1, fit_options={"n_starts": 1}, progress=boom)


@pytest.mark.parametrize("kw, match", [
    ({"material": "Unobtainium"}, "unknown material"),
    ({"material": "Mg2Si", "free": ["umklapp.nope"]}, "unknown parameter"),
    ({"material": "Mg2Si", "jobs": 0}, "jobs"),
    ({"material": "Mg2Si", "jobs": 1.5}, "jobs"),
    ({"material": "Mg2Si", "at": [-5.0]}, "at"),
])
def test_bad_options_are_refused_before_any_fit(kw, match):
    with pytest.raises(ParameterError, match=match):
        batch.fit_many(GRAIN[:1], progress=False, **kw)


def test_cli_batch_over_a_folder_writes_both_tables(capsys, tmp_path):
    folder = tmp_path / "series"
    folder.mkdir()
    for p in GRAIN:
        (folder / os.path.basename(p)).write_bytes(Path(p).read_bytes())
    rc = main(["fit", str(folder), "--material", "Mg2Si", "--starts", "1", "--jobs", "1", "--quiet",
               "--at", "300,600", "--summary", str(tmp_path / "s.csv"), "--summary", str(tmp_path / "s.json")])
    out, err = capsys.readouterr()
    assert rc == 0, err
    assert "grain 0.5 um" in out and "k_L(600 K)" in out
    assert len(json.loads((tmp_path / "s.json").read_text())["rows"]) == 3
    assert (tmp_path / "s.csv").read_text().count("\n") == 4


def test_cli_batch_with_a_failure_exits_2_after_writing_the_table(capsys, tmp_path):
    rc = main(["fit", str(GRAIN[0]), str(tmp_path / "missing.csv"), "--material", "Mg2Si", "--starts", "1",
               "--jobs", "1", "--quiet", "--json", "--summary", str(tmp_path / "s.csv")])
    out, err = capsys.readouterr()
    assert rc == 2 and len(err.strip().splitlines()) == 1 and "1 of 2 fits failed" in err
    d = json.loads(out)
    assert [r["status"] for r in d["rows"]] == ["ok", "error"]
    assert (tmp_path / "s.csv").exists()


def test_cli_batch_glob_and_progress_bar(capsys, tmp_path):
    pattern = os.path.join(os.path.dirname(GRAIN[0]), "grain_[12].csv")
    rc = main(["fit", pattern, "--material", "Mg2Si", "--starts", "1", "--jobs", "1", "--progress"])
    out, err = capsys.readouterr()
    assert rc == 0 and "fit: 2/2" in err and "grain 1.5 um" in out
