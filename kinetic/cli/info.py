"""``kinetic materials`` (presets and their calibration) and ``kinetic demo`` (the invented demo data).

``materials`` reads the plain preset tables (:mod:`kinetic.presets`, no numpy
or scipy), the calibration records included, so that it answers within half
a second (measured: benchmarks/bench_cli.py); ``kinetic.defaults`` imports the
engine (scipy) and would take longer than that on its own.
:func:`preset_calibration` reads the same preset fields as
``kinetic.defaults.calibration`` (a test checks that they agree).
"""
from __future__ import annotations

import shutil
from pathlib import Path

from ..errors import ParameterError
from ._output import dump


def add_parsers(sub):
    d = sub.add_parser("demo", help="list the invented demo data; copy the files with --write")
    d.add_argument("--write", metavar="DIR", help="copy the demo CSV files into DIR")
    d.add_argument("--json", action="store_true")
    m = sub.add_parser("materials", help="list material presets: calibrated or not, on what range, how well")
    m.add_argument("--json", action="store_true")


def _value(preset, field):
    e = preset.get(field)
    return e.get("value") if isinstance(e, dict) else None


def preset_calibration(preset, name=None) -> dict | None:
    """The calibration of one preset table (:func:`kinetic.presets.calibration_record`: plain data)."""
    from ..presets import calibration_record

    return calibration_record(preset, name)


def material_rows() -> list:
    """One dict per preset: name, formula, Debye temperature [K], velocity [m/s], calibration."""
    from ..presets import PRESETS  # plain data: no numpy, no scipy

    rows = []
    for name, p in PRESETS.items():
        cal = preset_calibration(p, name)
        vl, vt = _value(p, "velocity_longitudinal"), _value(p, "velocity_transverse")
        rows.append({"name": name, "formula": _value(p, "formula") or name,
                     "debye_temperature": _value(p, "debye_temperature"),
                     "velocity_debye": _value(p, "velocity_debye"),
                     "split_branches": vl is not None and vt is not None,
                     "calibrated": cal is not None, "calibration": cal})
    return rows


def run_materials(args) -> int:
    rows = material_rows()
    if args.json:
        print(dump(rows))
        return 0
    print(f"{'name':<8} {'theta_D [K]':>11} {'calibrated':<10} {'range [K]':<12} {'rms':>6} {'points':>6}  "
          f"{'table':<20} source")
    for r in rows:
        th = "-" if r["debye_temperature"] is None else f"{r['debye_temperature']:.4g}"
        c = r["calibration"]
        if c is None:
            print(f"{r['name']:<8} {th:>11} {'no':<10} {'-':<12} {'-':>6} {'-':>6}  {'-':<20} -")
            continue
        span = f"{c.get('t_min', float('nan')):g}-{c.get('t_max', float('nan')):g}"
        rms = c.get("rms")
        rms_s = "-" if rms is None else f"{100 * rms:.1f}%"
        n = c.get("n_points")
        print(f"{r['name']:<8} {th:>11} {'yes':<10} {span:<12} {rms_s:>6} {'-' if n is None else n:>6}  "
              f"{c.get('table_status', ''):<20} {c.get('source', '')}")
    n_cal = sum(r["calibrated"] for r in rows)
    n_mem = sum(1 for r in rows if r["calibration"] and "memory" in r["calibration"]["table_status"])
    print(f"{n_cal} of {len(rows)} presets calibrated on a published k(T) table "
          "(rms: relative rms deviation of the default model from that table).")
    if n_mem:
        print(f"{n_mem} of these tables are wholly or partly from memory (not read from the published "
              "table): their predictions are rough estimates until someone checks the original.")
    return 0


def run_demo(args) -> int:
    from .. import demo as demo_mod

    files = demo_mod.demo_files()
    written = []
    if args.write:
        folder = Path(args.write)
        try:
            folder.mkdir(parents=True, exist_ok=True)
            for name in files:
                shutil.copyfile(demo_mod.demo_path(name), folder / name)
                written.append(str(folder / name))
        except OSError as exc:
            raise ParameterError(f"--write {args.write}: cannot write there ({exc.strerror or exc})") from None
    if args.json:
        print(dump({"files": files, "written": written, "true_sample_A": demo_mod.TRUE_SAMPLE_A,
                    "true_series": demo_mod.TRUE_SERIES,
                    "true_doping": {k: list(v) for k, v in demo_mod.TRUE_DOPING.items()}}))
        return 0
    print("Invented demo data (synthetic, made with kinetic's own engine; not real measurements):")
    for name, lab in files.items():
        print(f"  {name:<16} {lab}")
    print(f"True values of sample A: {demo_mod.TRUE_SAMPLE_A}")
    print("Try:  kinetic fit --demo      or   kinetic fit --demo grain")
    if written:
        print(f"copied {len(written)} files to {args.write}; e.g. kinetic fit {written[0]} --material "
              f"{demo_mod.DEMO_MATERIAL}")
    return 0
