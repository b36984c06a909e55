"""``kinetic fit``: one file, a joint fit of several, or a batch of separate fits with a summary table.

The fitter, the loader, numpy and matplotlib are imported inside ``run``:
the parser is built for every command (``kinetic --help`` included) and must
stay light (measured reason: benchmarks/bench_cli.py).
"""
from __future__ import annotations

import os
import sys

from .._progress import TextBar
from ..errors import ParameterError
from ._args import (
    OPTION_OF,
    assignments,
    expand_inputs,
    is_pattern,
    number,
    parse_numbers,
    regular_file,
)
from ._model import default_free, model_from
from ._output import dump, jsonable, progress_wanted


def add_parser(sub, model_options):
    f = sub.add_parser("fit", help="fit a lattice model to measured kappa(T): one file, or a batch")
    f.add_argument("files", nargs="*", metavar="FILE",
                   help="data table(s), folders or globs; several are fitted one by one (a batch) "
                        "unless --joint")
    f.add_argument("--demo", nargs="?", const="sample", choices=("sample", "grain"),
                   help="fit the invented demo data (sample A, or the grain-size series)")
    model_options(f)
    f.add_argument("--free", nargs="+", metavar="NAME", help="free parameters (default: the preset's "
                   "default free set: boundary length, point-defect and Umklapp strengths)")
    f.add_argument("--joint", action="store_true", help="several files: one joint fit (shared parameters) "
                   "instead of a batch of separate fits")
    f.add_argument("--per-sample", nargs="+", metavar="NAME", help="joint fit: parameters fitted per sample "
                   "(default boundary.length)")
    f.add_argument("--bounds", action="append", metavar="NAME=LO:HI", help="bounds of a free parameter")
    f.add_argument("--starts", type=int, default=8, help="number of starts (default 8)")
    f.add_argument("--seed", type=int, default=0)
    f.add_argument("--lorenz", default="auto", choices=("auto", "sommerfeld", "spb", "kim"),
                   help="Lorenz number for the electronic part (auto: from the Seebeck coefficient when the "
                        "file has one, else Sommerfeld)")
    f.add_argument("--weights", default="auto", choices=("auto", "errors", "relative"))
    f.add_argument("--tmin", help="use data at T >= TMIN [K] (a unit may be given: 20degC)")
    f.add_argument("--tmax", help="use data at T <= TMAX [K]")
    g = f.add_argument_group("reading the files")
    g.add_argument("--kind", choices=("total", "lattice"), help="what a plain kappa column holds")
    g.add_argument("--ignore-column", action="append", metavar="NAME", help="skip a column (repeatable)")
    g.add_argument("--unit", action="append", metavar="COLUMN=UNIT", help="unit of a column without one")
    g.add_argument("--column", action="append", metavar="HEADER=NAME", help="read a header as a known column")
    g.add_argument("--delimiter", help="column delimiter (default: detected)")
    g.add_argument("--decimal", choices=(".", ","), help="decimal mark (default: detected)")
    g.add_argument("--encoding", help="text encoding (default: detected)")
    g.add_argument("--density", metavar="RHO", help="density for diffusivity data [kg/m^3] (e.g. 5.2g/cm^3)")
    g.add_argument("--heat-capacity", "--cp", dest="heat_capacity", metavar="CP",
                   help="heat capacity for diffusivity data: dulong-petit, debye or a value [J/(kg K)]")
    g.add_argument("--relative-density", metavar="X", help="pellet density / full density, in (0, 1]")
    g.add_argument("--porosity-correction", metavar="NAME",
                   help="effective-medium correction to full density (maxwell-eucken, landauer, dem, loeb)")
    g.add_argument("--diffusivity-rel-err", metavar="X", help="relative 1-sigma error of D (default 0.03)")
    g.add_argument("--density-rel-err", metavar="X", help="relative 1-sigma error of the density (default 0.01)")
    g.add_argument("--heat-capacity-rel-err", metavar="X", help="relative 1-sigma error of c_p")
    o = f.add_argument_group("output")
    o.add_argument("--save", metavar="RECORD.json", help="save a fit record (one fit only)")
    o.add_argument("--report", metavar="FIG", help="save a report figure (.png, .svg, .pdf; one fit only)")
    o.add_argument("--summary", metavar="PATH", action="append",
                   help="batch: write the summary table (.csv, .json; repeat for both)")
    o.add_argument("--at", metavar="T,T,...", default="300",
                   help="batch: temperatures of the k_L columns [K] (default 300)")
    o.add_argument("--jobs", type=int, help="batch: parallel processes on this machine (default: all cores)")
    o.add_argument("--dask-scheduler", metavar="ADDRESS",
                   help="batch: run on a Dask cluster (needs the 'dask' extra)")
    o.add_argument("--json", action="store_true", help="machine-readable output on stdout")
    o.add_argument("--quiet", action="store_true", help="no progress bar")
    o.add_argument("--progress", action="store_true", help="progress bar even when stderr is not a terminal")
    return f


def load_options(args) -> dict:
    """The loader keywords the user gave (only those), from the 'reading the files' options."""
    opts = {}
    if args.kind:
        opts["kind"] = args.kind
    if args.ignore_column:
        opts["ignore_columns"] = list(args.ignore_column)
    if args.unit:
        opts["units"] = assignments(args.unit, "--unit", "COLUMN=UNIT")
    if args.column:
        opts["columns"] = assignments(args.column, "--column", "HEADER=NAME")
    for name in ("delimiter", "decimal", "encoding", "porosity_correction"):
        if getattr(args, name, None) is not None:
            opts[name] = getattr(args, name)
    if args.density is not None:
        opts["density"] = number(args.density, "--density", unit="kg/m^3")
    if args.heat_capacity is not None:
        hc = args.heat_capacity.strip().lower()
        opts["heat_capacity"] = hc if hc in ("dulong-petit", "debye") else \
            number(args.heat_capacity, "--heat-capacity", unit="J/(kg K)")
    for name in ("diffusivity_rel_err", "density_rel_err", "heat_capacity_rel_err"):
        if getattr(args, name, None) is not None:
            opts[name] = number(getattr(args, name), "--" + name.replace("_", "-"))
    if opts.get("heat_capacity") == "debye" and getattr(args, "material", None):
        opts["material"] = args.material  # the Debye heat capacity of that preset
    if args.relative_density is not None:
        x = number(args.relative_density, "--relative-density")
        if not 0.0 < x <= 1.0:
            raise ParameterError(f"--relative-density must be in (0, 1], got {args.relative_density!r}")
        opts["relative_density"] = x
    return opts


def check_load_options(opts: dict) -> None:
    """Refuse at once an option this build's loader does not take (instead of a TypeError later)."""
    import inspect

    from ..data import load_data

    params = inspect.signature(load_data).parameters
    if any(p.kind is p.VAR_KEYWORD for p in params.values()):
        return
    for k in opts:
        if k not in params:
            opt = OPTION_OF.get(k, "--" + k.replace("_", "-"))
            raise ParameterError(f"{opt}: this version's loader does not take it yet")


def _temperature_limit(text, name):
    if text is None:
        return None
    return number(text, name, unit="K")


def _bounds(args) -> dict:
    bounds = {}
    for k, v in assignments(args.bounds, "--bounds", "NAME=LO:HI").items():
        parts = v.split(":")
        if len(parts) != 2:
            raise ParameterError(f"--bounds {k}: expected LO:HI, got {v!r}")
        bounds[k] = (number(parts[0], f"--bounds {k}"), number(parts[1], f"--bounds {k}"))
    return bounds


def _is_batch(args) -> bool:
    if args.joint or args.demo:
        return False
    if args.summary or len(args.files) > 1:
        return True
    return bool(args.files) and (is_pattern(args.files[0]) or os.path.isdir(args.files[0]))


def run(args) -> int:
    if args.demo and args.files:
        raise ParameterError("give data files or --demo, not both")
    if not args.demo and not args.files:
        raise ParameterError("fit needs a data FILE (or --demo)")
    if not args.demo and not args.material:
        raise ParameterError("--material is required (see 'kinetic materials' for presets)")
    if args.jobs is not None and args.jobs < 1:
        raise ParameterError(f"--jobs must be a whole number >= 1, got {args.jobs}")
    if _is_batch(args):
        return _run_batch(args)
    for opt in ("summary", "jobs", "dask_scheduler"):
        if getattr(args, opt):
            raise ParameterError(f"--{opt.replace('_', '-')} is for a batch of separate fits (several files, "
                                 "without --joint)")
    return _run_one(args)


def _run_one(args) -> int:
    from .. import demo as demo_mod
    from ..data import load_data
    from ..fitting import fit, fit_joint

    tmin, tmax = _temperature_limit(args.tmin, "--tmin"), _temperature_limit(args.tmax, "--tmax")
    if args.demo:
        material = args.material or demo_mod.DEMO_MATERIAL
        datasets = demo_mod.demo_series() if args.demo == "grain" else [demo_mod.demo_dataset()]
    else:
        material = args.material
        opts = load_options(args)
        check_load_options(opts)
        paths = expand_inputs(args.files)
        datasets = [load_data(regular_file(p), **opts) for p in paths]
    if tmin is not None or tmax is not None:
        datasets = [ds.subset(tmin, tmax) for ds in datasets]
    if args.demo and not (args.material or args.mechanisms or args.split):
        # the demo's own starting model: the mechanisms the invented data were made with,
        # deliberately wrong start values (kinetic.demo.demo_model)
        model = model_from(args, base=demo_mod.demo_model())
        free = list(args.free) if args.free else list(demo_mod.DEFAULT_FREE)
    else:
        model = model_from(args, material)
        free = list(args.free) if args.free else default_free(model)
    bounds = _bounds(args)
    show = (not args.quiet) and progress_wanted(args.progress)
    bar = _StartsBar(show)
    try:
        if len(datasets) == 1:
            res = fit(model, datasets[0], free, bounds=bounds or None, lorenz_method=args.lorenz,
                      n_starts=args.starts, seed=args.seed, progress=bar, weights=args.weights)
        else:
            per = list(args.per_sample) if args.per_sample else [n for n in free if n.startswith("boundary.")]
            missing = [n for n in per if n not in model.params]
            if missing:
                raise ParameterError(f"--per-sample {missing[0]}: unknown parameter; valid: {', '.join(model.params)}")
            shared = [n for n in free if n not in per]
            res = fit_joint(model, datasets, shared, per, bounds=bounds or None, lorenz_method=args.lorenz,
                            n_starts=args.starts, seed=args.seed, progress=bar, weights=args.weights)
    finally:
        bar.close()
    # Everything shown is rendered before anything is written: a fit whose summary
    # cannot be produced leaves no record or figure behind.
    if args.json:
        out = res.to_dict()
        out["record"] = args.save
        out["report"] = args.report
        out["material"] = material
        out["samples"] = [{"label": lab, "temperature": jsonable(t.temperature),
                           "kappa_lattice": jsonable(t.kappa),
                           "kappa_fit": jsonable(res.models[i].kappa(t.temperature))}
                          for i, (lab, t) in enumerate(zip(res.labels, res.targets))]
        text = dump(out)
    else:
        text = res.summary()
    if args.save:
        from ..records import save_record

        save_record(args.save, res)
    if args.report:
        from ..report import report_figure

        report_figure(res, args.report)
    print(text)
    if not args.json:
        if args.save:
            print(f"record saved to {args.save}")
        if args.report:
            print(f"report figure saved to {args.report}")
    return 0


def _run_batch(args) -> int:
    from .. import batch

    if args.save or args.report:
        raise ParameterError("--save and --report take one fit; for a batch, write the table with --summary")
    for p in args.summary or []:
        if not p.lower().endswith((".csv", ".json")):
            raise ParameterError(f"--summary {p}: expected a .csv or .json file name")
    at = parse_numbers([s for s in args.at.split(",") if s.strip()], "--at", unit="K")
    opts = load_options(args)
    check_load_options(opts)
    model = model_from(args, args.material)
    free = list(args.free) if args.free else None
    fit_options = {"n_starts": args.starts, "seed": args.seed, "lorenz_method": args.lorenz,
                   "weights": args.weights}
    bounds = _bounds(args)
    if bounds:
        fit_options["bounds"] = bounds
    paths = expand_inputs(args.files)
    if not paths:
        raise ParameterError(f"no data tables ({', '.join(batch.TABLE_SUFFIXES)}) in {', '.join(args.files)}")
    progress = False if args.quiet else (True if args.progress else None)
    result = batch.fit_many(paths, material=args.material, model=model, free=free, jobs=args.jobs,
                            scheduler=args.dask_scheduler, at=at, progress=progress, fit_options=fit_options,
                            tmin=_temperature_limit(args.tmin, "--tmin"),
                            tmax=_temperature_limit(args.tmax, "--tmax"), **opts)
    for p in args.summary or []:
        if p.lower().endswith(".json"):
            result.to_json(p)
        else:
            result.to_csv(p)
    if args.json:
        print(dump(result.to_dict()))
    else:
        print(result.table())
        for p in args.summary or []:
            print(f"summary written to {p}")
    if result.n_failed:
        print(f"kinetic: error: {result.n_failed} of {len(result.rows)} fits failed; their rows give the reason",
              file=sys.stderr)
        return 2
    return 0


class _StartsBar(TextBar):
    """Progress of the multi-start fit on stderr: ``fit: start i/n [###...]``."""

    def __init__(self, enabled, stream=None, width=30):
        super().__init__(stream, width)
        self.enabled = enabled

    def __call__(self, i, n, best):
        if self.enabled:
            self.show(i, n, "fit: start ", "" if best is None else f"  best chi2/2 = {best:.4g}")
