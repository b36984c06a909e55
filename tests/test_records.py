"""Fit records: exact round trip, damaged / newer / mistyped files, atomic writes."""
import json
import os

import numpy as np
import pytest

from kinetic import RecordError, demo
from kinetic.fitting import fit, fit_joint, predict_band
from kinetic.records import SCHEMA, VERSION, load_record, record_dict, save_record


@pytest.fixture(scope="module")
def result():
    # invented demo data (kinetic.demo): fit from the file, so the record carries path and sha256
    return fit(demo.demo_model(), demo.demo_dataset(), list(demo.DEFAULT_FREE), n_starts=2)


@pytest.fixture
def saved(tmp_path, result):
    p = tmp_path / "fit.json"
    save_record(p, result)
    return p


def test_round_trip_rebuilds_the_same_model_to_the_bit(saved, result):
    rec = load_record(saved)
    T = np.geomspace(1.0, 2000.0, 300)
    assert np.array_equal(rec.model.kappa(T), result.model.kappa(T))  # identical bits, not approx
    assert rec.model.to_dict() == result.model.to_dict()
    assert rec.values == result.values and rec.stderr == result.stderr
    assert np.array_equal(rec.covariance_fitted, result.covariance_fitted)
    assert np.array_equal(rec.correlation, result.correlation)
    assert rec.data == result.data
    assert rec.flags.to_dict() == result.flags.to_dict()
    assert (rec.chi2, rec.aic, rec.bic, rec.dof) == (result.chi2, result.aic, result.bic, result.dof)
    assert rec.options["n_starts"] == 2 and rec.options["lorenz_method"] == "auto"
    for n in result.names:
        assert rec.interval(n) == result.interval(n)
    b1, b2 = predict_band(result, T), predict_band(rec, T)
    assert np.array_equal(b1.lower, b2.lower) and np.array_equal(b1.upper, b2.upper)


def test_record_holds_schema_versions_path_and_checksum(saved, result):
    d = json.loads(saved.read_text())
    assert d["schema"] == SCHEMA and d["version"] == VERSION == 1
    assert set(d["versions"]) >= {"kinetic", "numpy", "scipy"}
    assert d["created"].endswith("Z")
    s = d["samples"][0]
    assert s["data_path"] == result.data.source and s["data_sha256"] == result.data.sha256
    assert len(s["data"]["temperature"]) == len(result.data)  # data inline, not only a path
    rec = load_record(saved)
    assert rec.data_changed() == []


def test_data_path_argument_adds_a_checksum(tmp_path, result):
    src = tmp_path / "copy.csv"
    src.write_bytes(open(demo.demo_path(), "rb").read())
    p = tmp_path / "r.json"
    save_record(p, result, data_path=src)
    rec = load_record(p)
    assert rec.data_paths == [str(src)] and rec.data_sha256[0] == result.data.sha256
    src.write_text("changed\n")
    assert rec.data_changed() == [result.labels[0]]


def test_joint_fit_round_trip(tmp_path):
    series = demo.demo_series()[:2]
    r = fit_joint(demo.demo_model(), series, ["point_defect.gamma", "umklapp.gruneisen"], ["boundary.length"],
                  n_starts=1)
    p = tmp_path / "joint.json"
    save_record(p, r)
    rec = load_record(p)
    assert rec.labels == r.labels and rec.names == r.names
    T = np.array([20.0, 300.0])
    for i in range(2):
        assert np.array_equal(rec.models[i].kappa(T), r.models[i].kappa(T))


def test_non_finite_numbers_are_written_as_strict_json(tmp_path, result):
    import copy

    r = copy.copy(result)
    r.stderr = dict(result.stderr, **{"umklapp.gruneisen": float("inf")})
    p = tmp_path / "inf.json"
    save_record(p, r)
    text = p.read_text()
    assert "Infinity" not in text and '"inf"' in text
    assert load_record(p).stderr["umklapp.gruneisen"] == float("inf")


# ------------------------------------------------------------------ bad files
def _write(tmp_path, obj_or_text, name="bad.json"):
    p = tmp_path / name
    p.write_text(obj_or_text if isinstance(obj_or_text, str) else json.dumps(obj_or_text))
    return p


def _one_line_naming(exc, path):
    msg = str(exc.value)
    assert "\n" not in msg and str(path) in msg
    return msg


def test_truncated_file(tmp_path, saved):
    text = saved.read_text()
    p = _write(tmp_path, text[: len(text) // 2])
    with pytest.raises(RecordError) as e:
        load_record(p)
    assert "damaged or truncated" in _one_line_naming(e, p)


@pytest.mark.parametrize("content, match", [
    ("", "empty"),
    ("[1, 2, 3]", "not a kinetic fit record"),
    ('{"schema": "something.else", "version": 1}', "not a kinetic fit record"),
    ('{"schema": "kinetic.fit-record", "version": "1"}', "version"),
    ('{"schema": "kinetic.fit-record", "version": 1, "fit": NaN}', "damaged"),
])
def test_not_a_record(tmp_path, content, match):
    p = _write(tmp_path, content)
    with pytest.raises(RecordError, match=match) as e:
        load_record(p)
    _one_line_naming(e, p)


def test_binary_file(tmp_path):
    p = tmp_path / "bin.json"
    p.write_bytes(b"\xff\xfe\x00\x01garbage")
    with pytest.raises(RecordError, match="UTF-8") as e:
        load_record(p)
    _one_line_naming(e, p)


def test_newer_schema_version(tmp_path, saved):
    d = json.loads(saved.read_text())
    d["version"] = VERSION + 1
    p = _write(tmp_path, d)
    with pytest.raises(RecordError, match="newer") as e:
        load_record(p)
    _one_line_naming(e, p)


@pytest.mark.parametrize("mutate, match", [
    (lambda d: d["fit"].__setitem__("values", [1, 2, 3]), "fit.values"),
    (lambda d: d["fit"]["values"].__setitem__("umklapp.gruneisen", "two"), "fit.values.umklapp.gruneisen"),
    (lambda d: d["fit"].__setitem__("chi2", True), "fit.chi2"),
    (lambda d: d["fit"].__setitem__("n_points", 3.5), "fit.n_points"),
    (lambda d: d["samples"][0].__setitem__("model", {"branches": 3}), "model"),
    (lambda d: d["samples"][0]["data"].__setitem__("kappa", "a lot"), "samples[0].data"),
    (lambda d: d.pop("fit"), "fit"),
    (lambda d: d["fit"].__setitem__("correlation", [[1.0]]), "fit.correlation"),
    (lambda d: d["samples"][0]["lattice_target"].__setitem__("kept", [1, 0]), "kept"),
    (lambda d: d.__setitem__("samples", []), "samples"),
])
def test_wrong_types_give_one_clear_line(tmp_path, saved, mutate, match):
    d = json.loads(saved.read_text())
    mutate(d)
    p = _write(tmp_path, d)
    with pytest.raises(RecordError, match=match.replace("[", r"\[").replace("]", r"\]")) as e:
        load_record(p)
    _one_line_naming(e, p)


def test_missing_file_and_folder(tmp_path):
    with pytest.raises(RecordError, match="no such file"):
        load_record(tmp_path / "nope.json")
    with pytest.raises(RecordError, match="folder"):
        load_record(tmp_path)


# ------------------------------------------------------------------ atomic writes
def test_failure_mid_write_leaves_the_original_intact(tmp_path, result, monkeypatch):
    p = tmp_path / "fit.json"
    save_record(p, result)
    before = p.read_bytes()

    def broken_fsync(fd):  # the disk fails after the new text was handed to the temp file
        raise OSError(28, "No space left on device")

    monkeypatch.setattr(os, "fsync", broken_fsync)
    with pytest.raises(RecordError, match="No space left") as e:
        save_record(p, result)
    _one_line_naming(e, p)
    assert p.read_bytes() == before
    assert sorted(x.name for x in tmp_path.iterdir()) == ["fit.json"]  # no temp file left behind


def test_failure_at_rename_leaves_the_original_intact(tmp_path, result, monkeypatch):
    p = tmp_path / "fit.json"
    save_record(p, result)
    before = p.read_bytes()

    def broken_replace(a, b):
        raise OSError(13, "Permission denied")

    monkeypatch.setattr(os, "replace", broken_replace)
    with pytest.raises(RecordError):
        save_record(p, result)
    assert p.read_bytes() == before
    assert sorted(x.name for x in tmp_path.iterdir()) == ["fit.json"]


def test_record_dict_is_json_safe(result):
    d = record_dict(result)
    json.dumps(d, allow_nan=False)  # raises on NaN/inf
    assert d["fit"]["names"] == result.names
