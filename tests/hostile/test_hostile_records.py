"""Hostile fit records: tampered, mistyped, inconsistent or awkward files (issue 9).

Each case states its expected outcome: a correct load (values checked), or one
RecordError line naming the file and the field's JSON path. No case may end
in a traceback of another type or in a silently wrong value.
"""
import errno
import json
import os
import stat
import sys

import numpy as np
import pytest

from kinetic import demo
from kinetic._io import TEMP_SUFFIX, atomic_write, temp_files_of
from kinetic.errors import FitError, RecordError
from kinetic.fitting import FitResult, fit, predict_band, profile_interval
from kinetic.records import Record, load_record, save_record

HERE = os.path.dirname(__file__)


@pytest.fixture(scope="module")
def result():
    # invented demo data (kinetic.demo), one start: the record's content, not the fit, is under test
    return fit(demo.demo_model(), demo.demo_dataset(), list(demo.DEFAULT_FREE), n_starts=1)


@pytest.fixture(scope="module")
def good(result, tmp_path_factory):
    p = tmp_path_factory.mktemp("rec") / "fit.json"
    save_record(p, result)
    return json.loads(p.read_text())


def _load(tmp_path, obj, name="bad.json"):
    p = tmp_path / name
    p.write_text(json.dumps(obj) if not isinstance(obj, str) else obj)
    return load_record(p), p


def _refused(tmp_path, obj, field):
    with pytest.raises(RecordError) as e:
        _load(tmp_path, obj)
    msg = str(e.value)
    assert "\n" not in msg, msg
    assert str(tmp_path / "bad.json") in msg, msg
    assert field in msg, msg
    return msg


def _first(d):
    return d["fit"]["names"][0]


def _set(path_fn):
    return path_fn


# each: (id, mutation of a good record dict, text the one-line error must contain)
TAMPERED = [
    ("negative chi2", lambda d: d["fit"].__setitem__("chi2", -5.0), "fit.chi2"),
    ("negative n_points", lambda d: d["fit"].__setitem__("n_points", -3), "fit.n_points"),
    ("n_points disagrees with the samples", lambda d: d["fit"].__setitem__("n_points", d["fit"]["n_points"] + 1),
     "fit.n_points"),
    ("negative stderr", lambda d: d["fit"]["stderr"].__setitem__(_first(d), -0.1), "fit.stderr."),
    ("nan stderr", lambda d: d["fit"]["stderr"].__setitem__(_first(d), "nan"), "fit.stderr."),
    ("negative covariance diagonal",
     lambda d: d["fit"]["covariance_fitted"][0].__setitem__(0, -1e-3), "fit.covariance_fitted[0][0]"),
    ("asymmetric covariance",
     lambda d: d["fit"]["covariance_fitted"][0].__setitem__(1, d["fit"]["covariance_fitted"][0][1] + 1.0),
     "fit.covariance_fitted must be symmetric"),
    ("correlation 5", lambda d: (d["fit"]["correlation"][0].__setitem__(1, 5.0),
                                 d["fit"]["correlation"][1].__setitem__(0, 5.0)), "fit.correlation[0][1]"),
    ("correlation diagonal not 1", lambda d: d["fit"]["correlation"][1].__setitem__(1, 0.5),
     "fit.correlation[1][1]"),
    ("fitted value disagrees with the stored model",
     lambda d: d["fit"]["values"].__setitem__(_first(d), d["fit"]["values"][_first(d)] * 1.5), "fit.values."),
    ("value as the string 1e-6", lambda d: d["fit"]["values"].__setitem__(_first(d), "1e-6"), "fit.values."),
    ("model length as the string 1e-6",
     lambda d: d["samples"][0]["model"]["scattering"][0]["values"].__setitem__("length", "1e-6"),
     "samples[0].model.scattering[0].values.length"),
    ("lower > upper", lambda d: d["fit"]["free"][0].update(lower=1.0, upper=1e-3), "fit.free[0].lower"),
    ("log 'yes'", lambda d: d["fit"]["free"][0].__setitem__("log", "yes"), "fit.free[0].log"),
    ("log 'no'", lambda d: d["fit"]["free"][0].__setitem__("log", "no"), "fit.free[0].log"),
    ("success 'yes'", lambda d: d["fit"].__setitem__("success", "yes"), "fit.success"),
    ("scatter_estimated 1", lambda d: d["fit"].__setitem__("scatter_estimated", 1), "fit.scatter_estimated"),
    ("residuals too short", lambda d: d["fit"]["residuals"].pop(), "fit.residuals"),
    ("sigma_relative too long", lambda d: d["samples"][0]["lattice_target"]["sigma_relative"].append(0.1),
     "samples[0].lattice_target.sigma_relative"),
    ("kappa target of another length", lambda d: d["samples"][0]["lattice_target"]["kappa"].pop(),
     "samples[0].lattice_target.kappa"),
    ("negative temperature", lambda d: d["samples"][0]["lattice_target"]["temperature"].__setitem__(0, -10.0),
     "samples[0].lattice_target.temperature[0]"),
    ("zero kappa", lambda d: d["samples"][0]["lattice_target"]["kappa"].__setitem__(0, 0.0),
     "samples[0].lattice_target.kappa[0]"),
    ("negative scatter", lambda d: d["fit"].__setitem__("scatter", -0.01), "fit.scatter"),
    ("dof inconsistent", lambda d: d["fit"].__setitem__("dof", 99), "fit.dof"),
    ("n_free inconsistent", lambda d: d["fit"].__setitem__("n_free", 7), "fit.n_free"),
    ("reduced chi2 inconsistent", lambda d: d["fit"].__setitem__("reduced_chi2", 123.0), "fit.reduced_chi2"),
    ("chi2 disagrees with residuals", lambda d: d["fit"].__setitem__("chi2", d["fit"]["chi2"] * 2 + 1.0),
     "fit.chi2"),
    ("at_bound names a stranger", lambda d: d["fit"]["flags"].__setitem__("at_bound", ["nobody.x"]),
     "fit.flags.at_bound[0]"),
    ("cancelled 'no'", lambda d: d["fit"]["flags"].__setitem__("cancelled", "no"), "fit.flags.cancelled"),
    ("sha256 not hex", lambda d: d["samples"][0].__setitem__("data_sha256", "xyz"), "samples[0].data_sha256"),
    ("free sample index out of range", lambda d: d["fit"]["free"][0].__setitem__("samples", [5]),
     "fit.free[0].samples"),
    ("free names an unknown parameter", lambda d: d["fit"]["free"][0].__setitem__("param", "nope.x"),
     "fit.free[0].param"),
    ("kept flags as numbers", lambda d: d["samples"][0]["lattice_target"].__setitem__(
        "kept", [1] * len(d["samples"][0]["lattice_target"]["kept"])), "samples[0].lattice_target.kept[0]"),
    ("version true", lambda d: d.__setitem__("version", True), "version"),
    ("nfev negative", lambda d: d["fit"].__setitem__("nfev", -1), "fit.nfev"),
    ("target shifted against the data",
     lambda d: d["samples"][0]["lattice_target"].__setitem__(
         "kappa", [v * 1.1 for v in d["samples"][0]["lattice_target"]["kappa"]]),
     "samples[0].lattice_target.kappa"),
    ("target temperatures shifted", lambda d: d["samples"][0]["lattice_target"].__setitem__(
        "temperature", [v + 1.0 for v in d["samples"][0]["lattice_target"]["temperature"]]),
     "samples[0].lattice_target.temperature"),
    ("branch velocity as a string",
     lambda d: d["samples"][0]["model"]["branches"][0].__setitem__("velocity", "3877"),
     "samples[0].model.branches[0].velocity"),
]


@pytest.mark.parametrize("mutate, field", [c[1:] for c in TAMPERED], ids=[c[0] for c in TAMPERED])
def test_tampered_record_is_refused_naming_the_field(tmp_path, good, mutate, field):
    d = json.loads(json.dumps(good))
    mutate(d)
    _refused(tmp_path, d, field)


def test_not_positive_semidefinite_covariance(tmp_path, good, result):
    # symmetric, right diagonal, but an off-diagonal pair making it indefinite
    d = json.loads(json.dumps(good))
    c = d["fit"]["covariance_fitted"]
    s0, s1 = c[0][0] ** 0.5, c[1][1] ** 0.5
    c[0][1] = c[1][0] = 3.0 * s0 * s1
    msg = _refused(tmp_path, d, "fit.covariance_fitted")
    assert "positive semi-definite" in msg


def test_deeply_nested_json_is_damaged_not_a_crash(tmp_path):
    msg = _refused(tmp_path, "[" * 100000 + "]" * 100000, "")
    assert "damaged" in msg


def test_bare_infinity_constant_is_refused(tmp_path, good):
    text = json.dumps(good).replace('"chi2": ' + json.dumps(good["fit"]["chi2"]), '"chi2": Infinity', 1)
    assert "Infinity" in text
    assert "damaged" in _refused(tmp_path, text, "")


# ------------------------------------------------------------------ correct loads
def test_utf8_bom_loads_with_the_same_values(tmp_path, good, result):
    p = tmp_path / "bom.json"
    p.write_bytes(b"\xef\xbb\xbf" + json.dumps(good).encode("utf-8"))
    rec = load_record(p)
    assert rec.values == result.values and rec.chi2 == result.chi2
    assert isinstance(rec, FitResult) and isinstance(rec, Record)


def test_loaded_record_saves_again_and_reloads_identically(tmp_path, result):
    p1, p2 = tmp_path / "a.json", tmp_path / "b.json"
    save_record(p1, result)
    rec = load_record(p1)
    save_record(p2, rec)  # a loaded record is a FitResult: it can be saved again
    rec2 = load_record(p2)
    assert rec2.values == result.values and rec2.stderr == result.stderr
    assert np.array_equal(rec2.covariance_fitted, result.covariance_fitted)
    assert rec2.provenance.path == str(p2) and rec.provenance.path == str(p1)
    assert rec2.data_sha256 == rec.data_sha256 and rec2.data_paths == rec.data_paths
    T = np.array([20.0, 300.0])
    assert np.array_equal(predict_band(rec2, T).upper, predict_band(result, T).upper)


def test_loaded_record_reports_like_a_fit(tmp_path, result):
    p = tmp_path / "r.json"
    save_record(p, result)
    rec = load_record(p)
    assert [r.to_dict() for r in rec.report_rows()] == [r.to_dict() for r in result.report_rows()]
    assert "loaded from the record" in rec.summary()
    json.dumps(rec.to_dict(), allow_nan=False)
    with pytest.raises(FitError, match="refit"):
        profile_interval(rec, rec.names[0])


def test_undetermined_parameter_round_trips_as_not_determined(tmp_path, result):
    import copy

    r = copy.copy(result)
    name = r.names[0]
    r.flags = copy.deepcopy(result.flags)
    r.flags.at_bound = [name]
    p = tmp_path / "atb.json"
    save_record(p, r)
    rec = load_record(p)
    iv = rec.interval_info(name)
    assert not iv.determined and "bound" in iv.note
    row = next(x for x in rec.report_rows() if x.code_key == name)
    assert row.interval is None and row.interval_text == "not determined"
    assert rec.to_dict()["intervals_95"][name] is None


def test_fifo_is_refused_at_once(tmp_path):
    if not hasattr(os, "mkfifo"):
        pytest.skip("no FIFOs on this platform")
    p = tmp_path / "pipe.json"
    os.mkfifo(p)
    with pytest.raises(RecordError, match="not a regular file"):
        load_record(p)


# ------------------------------------------------------------------ saving
def test_stale_temp_files_of_interrupted_saves_are_removed(tmp_path, result):
    p = tmp_path / "fit.json"
    dead = tmp_path / f".fit.json.999999999.dead{TEMP_SUFFIX}"  # no process has this id
    running = tmp_path / f".fit.json.{os.getpid()}.live{TEMP_SUFFIX}"  # a save of ours, still running
    other = tmp_path / f".other.json.999999999.dead{TEMP_SUFFIX}"  # another target's: not ours to remove
    for f in (dead, running, other):
        f.write_text("partial")
    save_record(p, result)
    assert not dead.exists() and running.exists() and other.exists()
    assert load_record(p).values == result.values


def test_new_files_get_the_users_umask_not_0600(tmp_path, result):
    old = os.umask(0o022)
    try:
        p = save_record(tmp_path / "m.json", result)
        q = atomic_write(tmp_path / "t.txt", b"x")
    finally:
        os.umask(old)
    assert stat.S_IMODE(p.stat().st_mode) == 0o644
    assert stat.S_IMODE(q.stat().st_mode) == 0o644


def test_full_device_is_one_line_and_the_original_stays(tmp_path, result, monkeypatch):
    p = tmp_path / "fit.json"
    save_record(p, result)
    before = p.read_bytes()

    def full(fd, data):
        raise OSError(errno.ENOSPC, "No space left on device")

    monkeypatch.setattr(os, "write", full)
    with pytest.raises(RecordError) as e:
        save_record(p, result)
    msg = str(e.value)
    assert "\n" not in msg and "No space left on device" in msg and str(p) in msg
    assert "unchanged" in msg
    assert p.read_bytes() == before and temp_files_of(p) == []


def test_saving_into_a_missing_folder_is_one_line(tmp_path, result):
    with pytest.raises(RecordError) as e:
        save_record(tmp_path / "no" / "such" / "fit.json", result)
    assert "\n" not in str(e.value) and "fit.json" in str(e.value)


def test_saving_onto_a_folder_is_one_line(tmp_path, result):
    (tmp_path / "dir.json").mkdir()
    with pytest.raises(RecordError, match="is a folder"):
        save_record(tmp_path / "dir.json", result)


@pytest.mark.skipif(sys.platform == "win32", reason="POSIX permissions")
def test_read_only_folder_is_one_line(tmp_path, result):
    ro = tmp_path / "ro"
    ro.mkdir()
    ro.chmod(0o500)
    try:
        if os.access(ro, os.W_OK):
            pytest.skip("running as a user who can write anywhere")
        with pytest.raises(RecordError) as e:
            save_record(ro / "fit.json", result)
        assert "\n" not in str(e.value)
    finally:
        ro.chmod(0o700)


def test_shipped_hostile_record_files(tmp_path):
    """Files under tests/hostile/records/: each name says what it holds; all are refused in one line."""
    folder = os.path.join(HERE, "records")
    expected = {
        "empty.json": "empty",
        "not_json.json": "damaged or truncated",
        "array.json": "not a kinetic fit record",
        "other_schema.json": "not a kinetic fit record",
        "newer_version.json": "newer",
        "latin1.json": "UTF-8",
    }
    for name, text in expected.items():
        with pytest.raises(RecordError) as e:
            load_record(os.path.join(folder, name))
        assert text in str(e.value) and name in str(e.value) and "\n" not in str(e.value)


def test_concurrent_saves_of_one_target_lose_nothing(tmp_path):
    import threading

    p = tmp_path / "same.txt"
    texts = [f"writer {i}\n" * 2000 for i in range(8)]
    errors = []

    def save(t):
        try:
            atomic_write(p, t)
        except Exception as exc:  # noqa: BLE001 -- any failure fails the test below
            errors.append(exc)

    threads = [threading.Thread(target=save, args=(t,)) for t in texts]
    for th in threads:
        th.start()
    for th in threads:
        th.join()
    assert errors == []
    assert p.read_text() in texts  # one complete version, never a mix
    assert temp_files_of(p) == []


def test_a_save_killed_mid_write_leaves_the_original_and_is_cleaned_next_time(tmp_path):
    import signal
    import subprocess

    p = tmp_path / "fit.txt"
    atomic_write(p, "original\n")
    code = ("import os, sys, time\n"
            "from kinetic import _io\n"
            "real = os.fsync\n"
            "def slow(fd):\n"
            "    print('writing', flush=True); time.sleep(60)\n"
            "os.fsync = slow\n"
            f"_io.atomic_write({str(p)!r}, 'new\\n' * 1000)\n")
    env = dict(os.environ, PYTHONPATH=os.pathsep.join(sys.path))
    proc = subprocess.Popen([sys.executable, "-c", code], stdout=subprocess.PIPE, env=env)
    assert proc.stdout.readline().strip() == b"writing"
    proc.send_signal(signal.SIGKILL)
    proc.wait()
    assert p.read_text() == "original\n" and len(temp_files_of(p)) == 1  # the kill left its temp file
    atomic_write(p, "next\n")
    assert p.read_text() == "next\n" and temp_files_of(p) == []
