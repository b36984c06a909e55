"""The ``kinetic`` command: fit measured kappa(T), predict, sweep, and try the invented demo data.

Subcommands::

    kinetic fit FILE [FILE ...] --material NAME [--mechanisms boundary,point_defect,umklapp]
                [--free NAME ...] [--set NAME=VALUE ...] [--bounds NAME=LO:HI ...]
                [--per-sample NAME ...] [--starts N] [--seed N] [--lorenz auto|sommerfeld|spb|kim]
                [--weights auto|errors|relative] [--split] [--kind total|lattice]
                [--tmin K] [--tmax K] [--save RECORD.json] [--report FIG.png] [--json] [--quiet]
    kinetic fit --demo [sample|grain]
    kinetic predict (--material NAME | --record FILE) --temperatures T [T ...] [--json]
    kinetic sweep grain (--material NAME | --record FILE) --lengths L ... --temperatures T ...
    kinetic sweep alloy --host-a A --host-b B --fractions X ... --temperatures T ...
    kinetic demo [--write DIR]
    kinetic materials

Several FILEs make a joint fit: by default the boundary length is fitted
per sample and the other free parameters are shared (``--per-sample``
changes which). Number lists accept ``a:b:n`` (n evenly spaced values) and
``a:b:n:log`` (n values evenly spaced in log).

Exit status: 0 on success; 2 for bad input (a one-line message on stderr,
no traceback); 130 when interrupted. ``--json`` writes machine-readable
output to stdout. A progress bar for the multi-start fit goes to stderr when
stderr is a terminal (``--quiet`` silences it, ``--progress`` forces it).
"""
from __future__ import annotations

import argparse
import json
import os
import shutil
import sys
from pathlib import Path

import numpy as np

from .errors import KineticError, ParameterError

__all__ = ["main", "build_parser", "parse_numbers"]

PROG = "kinetic"


class _UsageError(Exception):
    pass


class _Parser(argparse.ArgumentParser):
    """ArgumentParser whose errors are one line (raised, printed by main)."""

    def error(self, message):  # noqa: D401 - argparse API
        raise _UsageError(f"{self.prog}: {message} (see {self.prog} --help)")


def parse_numbers(tokens, name: str):
    """Numbers from command-line tokens: plain numbers, ``a:b:n`` or ``a:b:n:log``.

    Raises
    ------
    ParameterError
        A token that is none of these (naming the option and the token).
    """
    out = []
    for tok in tokens:
        parts = str(tok).split(":")
        try:
            if len(parts) == 1:
                out.append(float(parts[0]))
                continue
            if len(parts) in (3, 4):
                a, b, n = float(parts[0]), float(parts[1]), int(parts[2])
                if n < 1:
                    raise ValueError
                if len(parts) == 4:
                    if parts[3] != "log" or a <= 0 or b <= 0:
                        raise ValueError
                    out.extend(np.geomspace(a, b, n).tolist())
                else:
                    out.extend(np.linspace(a, b, n).tolist())
                continue
        except ValueError:
            pass
        raise ParameterError(f"{name}: cannot read {tok!r}; expected a number, a:b:n or a:b:n:log")
    return np.array(out, dtype=float)


def _assignments(items, name):
    out = {}
    for it in items or []:
        if "=" not in it:
            raise ParameterError(f"{name}: expected NAME=VALUE, got {it!r}")
        k, v = it.split("=", 1)
        out[k.strip()] = v.strip()
    return out


def build_parser() -> argparse.ArgumentParser:
    p = _Parser(prog=PROG, description="Kinetic-theory thermal conductivity: fit, predict, sweep.")
    sub = p.add_subparsers(dest="command", metavar="COMMAND", parser_class=_Parser)

    def model_options(sp):
        sp.add_argument("--material", help="material preset (see 'kinetic materials')")
        sp.add_argument("--mechanisms", help="comma-separated: boundary,point_defect,umklapp[,normal]")
        sp.add_argument("--split", action="store_true", help="longitudinal + transverse branches")
        sp.add_argument("--set", action="append", metavar="NAME=VALUE", help="fix a parameter value")

    f = sub.add_parser("fit", help="fit a lattice model to measured kappa(T)")
    f.add_argument("files", nargs="*", metavar="FILE", help="data table(s); several make a joint fit")
    f.add_argument("--demo", nargs="?", const="sample", choices=("sample", "grain"),
                   help="fit the invented demo data (sample A, or the grain-size series)")
    model_options(f)
    f.add_argument("--free", nargs="+", metavar="NAME", help="free parameters (default: boundary.length, "
                   "point_defect.gamma, umklapp.gruneisen)")
    f.add_argument("--per-sample", nargs="+", metavar="NAME", help="joint fit: parameters fitted per sample "
                   "(default boundary.length)")
    f.add_argument("--bounds", action="append", metavar="NAME=LO:HI", help="bounds of a free parameter")
    f.add_argument("--starts", type=int, default=8, help="number of starts (default 8)")
    f.add_argument("--seed", type=int, default=0)
    f.add_argument("--lorenz", default="auto", choices=("auto", "sommerfeld", "spb", "kim"),
                   help="Lorenz number for the electronic part (auto: from the Seebeck coefficient when the file has one, else Sommerfeld)")
    f.add_argument("--weights", default="auto", choices=("auto", "errors", "relative"))
    f.add_argument("--kind", choices=("total", "lattice"), help="what a plain kappa column holds")
    f.add_argument("--tmin", type=float, help="use data at T >= TMIN [K]")
    f.add_argument("--tmax", type=float, help="use data at T <= TMAX [K]")
    f.add_argument("--save", metavar="RECORD.json", help="save a fit record")
    f.add_argument("--report", metavar="FIG", help="save a report figure (.png, .svg, .pdf)")
    f.add_argument("--json", action="store_true", help="machine-readable output on stdout")
    f.add_argument("--quiet", action="store_true", help="no progress bar")
    f.add_argument("--progress", action="store_true", help="progress bar even when stderr is not a terminal")

    pr = sub.add_parser("predict", help="lattice kappa at given temperatures")
    model_options(pr)
    pr.add_argument("--record", help="fit record (adds a confidence band)")
    pr.add_argument("--sample", default="0", help="sample of a joint record (label or index)")
    pr.add_argument("--temperatures", nargs="+", required=True, metavar="T", help="[K]")
    pr.add_argument("--level", type=float, default=0.95)
    pr.add_argument("--json", action="store_true")

    sw = sub.add_parser("sweep", help="kappa against grain size or alloy fraction")
    swsub = sw.add_subparsers(dest="what", metavar="grain|alloy", parser_class=_Parser)
    g = swsub.add_parser("grain", help="kappa against boundary length")
    model_options(g)
    g.add_argument("--record", help="fit record (adds a band)")
    g.add_argument("--sample", default="0")
    g.add_argument("--lengths", nargs="+", required=True, metavar="L", help="[m]")
    g.add_argument("--temperatures", nargs="+", required=True, metavar="T", help="[K]")
    g.add_argument("--json", action="store_true")
    a = swsub.add_parser("alloy", help="kappa against alloy fraction x of A(1-x)B(x)")
    a.add_argument("--host-a", required=True)
    a.add_argument("--host-b", required=True)
    a.add_argument("--fractions", nargs="+", required=True, metavar="X")
    a.add_argument("--temperatures", nargs="+", required=True, metavar="T", help="[K]")
    a.add_argument("--length", type=float, help="boundary length [m] (default 1 mm)")
    a.add_argument("--gruneisen", type=float, help="Grüneisen parameter (default: interpolated hosts)")
    a.add_argument("--strain", type=float, default=0.0, help="Abeles strain parameter epsilon")
    a.add_argument("--split", action="store_true")
    a.add_argument("--json", action="store_true")

    d = sub.add_parser("demo", help="list the invented demo data; copy the files with --write")
    d.add_argument("--write", metavar="DIR", help="copy the demo CSV files into DIR")
    d.add_argument("--json", action="store_true")

    m = sub.add_parser("materials", help="list material presets")
    m.add_argument("--json", action="store_true")
    return p


# ---------------------------------------------------------------------------------
# helpers
# ---------------------------------------------------------------------------------

def _model_from(args, material=None):
    from .fitting import default_model

    mat = material or args.material
    if not mat:
        raise ParameterError("--material is required (see 'kinetic materials' for presets)")
    mechs = None
    if getattr(args, "mechanisms", None):
        mechs = [s.strip() for s in args.mechanisms.split(",") if s.strip()]
    model = default_model(mat, mechs, split_branches=bool(getattr(args, "split", False)))
    sets = _assignments(getattr(args, "set", None), "--set")
    if sets:
        vals = {}
        for k, v in sets.items():
            try:
                vals[k] = float(v)
            except ValueError:
                raise ParameterError(f"--set {k}: expected a number, got {v!r}") from None
        model = model.with_params(vals)
    return model


class _Progress:
    def __init__(self, enabled, stream=None, width=30):
        self.enabled = enabled
        self.stream = stream or sys.stderr
        self.width = width
        self.shown = False

    def __call__(self, i, n, best):
        if not self.enabled:
            return
        k = int(round(self.width * i / n))
        cost = "" if best is None else f"  best chi2/2 = {best:.4g}"
        self.stream.write(f"\rfit: start {i}/{n} [{'#' * k}{'.' * (self.width - k)}]{cost}")
        self.stream.flush()
        self.shown = True

    def close(self):
        if self.shown:
            self.stream.write("\n")
            self.stream.flush()


def _dump(obj):
    print(json.dumps(obj, indent=1, allow_nan=False))


def _jsonable(a):
    return [None if not np.isfinite(v) else float(v) for v in np.asarray(a, dtype=float).ravel()]


# ---------------------------------------------------------------------------------
# commands
# ---------------------------------------------------------------------------------

def _cmd_fit(args) -> int:
    from . import demo as demo_mod
    from .data import load_data
    from .fitting import default_free, fit, fit_joint

    if args.demo and args.files:
        raise ParameterError("give data files or --demo, not both")
    if args.demo:
        material = args.material or demo_mod.DEMO_MATERIAL
        if args.demo == "grain":
            datasets = demo_mod.demo_series()
        else:
            datasets = [demo_mod.demo_dataset()]
    else:
        if not args.files:
            raise ParameterError("fit needs a data FILE (or --demo)")
        material = args.material
        if not material:
            raise ParameterError("--material is required (see 'kinetic materials' for presets)")
        datasets = [load_data(f, kind=args.kind) for f in args.files]
    if args.tmin is not None or args.tmax is not None:
        datasets = [ds.subset(args.tmin, args.tmax) for ds in datasets]
    model = _model_from(args, material)
    free = list(args.free) if args.free else default_free(model)
    bounds = {}
    for k, v in _assignments(args.bounds, "--bounds").items():
        parts = v.split(":")
        try:
            lo, hi = (float(parts[0]), float(parts[1])) if len(parts) == 2 else (None, None)
        except ValueError:
            lo = None
        if lo is None:
            raise ParameterError(f"--bounds {k}: expected LO:HI, got {v!r}")
        bounds[k] = (lo, hi)
    show = (not args.quiet) and (args.progress or sys.stderr.isatty())
    bar = _Progress(show)
    try:
        if len(datasets) == 1:
            res = fit(model, datasets[0], free, bounds=bounds or None, lorenz_method=args.lorenz,
                      n_starts=args.starts, seed=args.seed, progress=bar, weights=args.weights)
        else:
            per = list(args.per_sample) if args.per_sample else [n for n in free if n.startswith("boundary.")]
            shared = [n for n in free if n not in per]
            missing = [n for n in per if n not in model.params]
            if missing:
                raise ParameterError(f"--per-sample {missing[0]}: unknown parameter; valid: {', '.join(model.params)}")
            res = fit_joint(model, datasets, shared, per, bounds=bounds or None, lorenz_method=args.lorenz,
                            n_starts=args.starts, seed=args.seed, progress=bar, weights=args.weights)
    finally:
        bar.close()
    if args.save:
        from .records import save_record

        save_record(args.save, res)
    if args.report:
        from .report import report_figure

        report_figure(res, args.report)
    if args.json:
        out = res.to_dict()
        out["record"] = args.save
        out["report"] = args.report
        out["material"] = material
        out["samples"] = [{"label": lab, "temperature": _jsonable(t.temperature),
                           "kappa_lattice": _jsonable(t.kappa),
                           "kappa_fit": _jsonable(res.models[i].kappa(t.temperature))}
                          for i, (lab, t) in enumerate(zip(res.labels, res.targets))]
        _dump(out)
    else:
        print(res.summary())
        if args.save:
            print(f"record saved to {args.save}")
        if args.report:
            print(f"report figure saved to {args.report}")
    return 0


def _sample_arg(s):
    try:
        return int(s)
    except ValueError:
        return s


def _cmd_predict(args) -> int:
    T = parse_numbers(args.temperatures, "--temperatures")
    if args.record and args.material:
        raise ParameterError("give --material or --record, not both")
    if args.record:
        from .fitting import predict_band
        from .records import load_record

        rec = load_record(args.record)
        band = predict_band(rec, T, args.level, sample=_sample_arg(args.sample))
        out = {"source": args.record, "temperature": _jsonable(band.temperature), "kappa": _jsonable(band.kappa),
               "lower": _jsonable(band.lower), "upper": _jsonable(band.upper), "level": band.level}
    else:
        model = _model_from(args)
        out = {"source": f"material {args.material} (default start values)", "temperature": _jsonable(T),
               "kappa": _jsonable(model.kappa(T)), "parameters": model.params}
    if args.json:
        _dump(out)
    else:
        print(f"# lattice kappa from {out['source']}")
        head = "T [K]        kappa [W/(m K)]" + ("   lower        upper" if "lower" in out else "")
        print(head)
        for i, t in enumerate(out["temperature"]):
            row = f"{t:<12.6g} {out['kappa'][i]:<14.6g}"
            if "lower" in out:
                row += f"   {out['lower'][i]:<12.6g} {out['upper'][i]:.6g}"
            print(row)
    return 0


def _cmd_sweep(args) -> int:
    from . import whatif

    if args.what is None:
        raise ParameterError("sweep needs 'grain' or 'alloy'")
    T = parse_numbers(args.temperatures, "--temperatures")
    if args.what == "grain":
        L = parse_numbers(args.lengths, "--lengths")
        if args.record and args.material:
            raise ParameterError("give --material or --record, not both")
        if args.record:
            from .records import load_record

            rec = load_record(args.record)
            sw = whatif.grain_size_sweep(None, L, T, rec, sample=_sample_arg(args.sample))
        else:
            sw = whatif.grain_size_sweep(_model_from(args), L, T)
        out = {"lengths": _jsonable(sw.values), "temperature": _jsonable(sw.temperature),
               "kappa": [_jsonable(r) for r in sw.kappa]}
        if sw.lower is not None:
            out["lower"] = [_jsonable(r) for r in sw.lower]
            out["upper"] = [_jsonable(r) for r in sw.upper]
        xs, xname = out["lengths"], "L [m]"
    else:
        X = parse_numbers(args.fractions, "--fractions")
        sw = whatif.alloy_sweep(args.host_a, args.host_b, X, T, boundary_length=args.length,
                                gruneisen=args.gruneisen, strain_epsilon=args.strain, split_branches=args.split)
        out = {"fractions": _jsonable(sw.fractions), "temperature": _jsonable(sw.temperature),
               "kappa": [_jsonable(r) for r in sw.kappa], "gamma": _jsonable(sw.gamma)}
        xs, xname = out["fractions"], "x"
    if args.json:
        _dump(out)
    else:
        print(f"# lattice kappa [W/(m K)]; rows: {xname}, columns: T [K]")
        print(f"{xname:<12}" + "".join(f"{t:>12.5g}" for t in out["temperature"]))
        for x, row in zip(xs, out["kappa"]):
            print(f"{x:<12.5g}" + "".join(f"{v:>12.5g}" for v in row))
    return 0


def _cmd_demo(args) -> int:
    from . import demo as demo_mod

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
        _dump({"files": files, "written": written, "true_sample_A": demo_mod.TRUE_SAMPLE_A,
               "true_series": demo_mod.TRUE_SERIES,
               "true_doping": {k: list(v) for k, v in demo_mod.TRUE_DOPING.items()}})
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


def _cmd_materials(args) -> int:
    from . import materials

    rows = []
    for n in materials.names():
        m = materials.get(n)
        rows.append({"name": n, "debye_temperature": m.debye_temperature, "velocity_debye": m.velocity_debye,
                     "gruneisen": m.gruneisen, "split_branches": m.has_split_velocities})
    if args.json:
        _dump(rows)
    else:
        print(f"{'name':<8} {'theta_D [K]':>11} {'v_D [m/s]':>10} {'gruneisen':>9}  split branches")
        for r in rows:
            g = "-" if r["gruneisen"] is None else f"{r['gruneisen']:.3g}"
            print(f"{r['name']:<8} {r['debye_temperature']:>11.4g} {r['velocity_debye']:>10.5g} {g:>9}  "
                  f"{'yes' if r['split_branches'] else 'no'}")
    return 0


_COMMANDS = {"fit": _cmd_fit, "predict": _cmd_predict, "sweep": _cmd_sweep, "demo": _cmd_demo,
             "materials": _cmd_materials}


def main(argv=None) -> int:
    """Run the command line; returns the exit status (0 ok, 2 bad input, 130 interrupted)."""
    parser = build_parser()
    try:
        try:
            args = parser.parse_args(argv)
        except SystemExit as exc:  # --help
            return int(exc.code or 0)
        if args.command is None:
            parser.print_help()
            return 2
        return _COMMANDS[args.command](args)
    except _UsageError as exc:
        print(str(exc), file=sys.stderr)
        return 2
    except (KineticError, FileNotFoundError, PermissionError, IsADirectoryError) as exc:
        msg = str(exc).splitlines()[0] if str(exc) else type(exc).__name__
        if isinstance(exc, OSError) and getattr(exc, "filename", None):
            msg = f"{exc.filename}: {exc.strerror or exc}"
        print(f"{PROG}: error: {msg}", file=sys.stderr)
        return 2
    except KeyboardInterrupt:
        print(f"{PROG}: interrupted", file=sys.stderr)
        return 130
    except BrokenPipeError:  # output piped into e.g. head, which closed early
        try:
            devnull = os.open(os.devnull, os.O_WRONLY)
            os.dup2(devnull, sys.stdout.fileno())
        except (OSError, ValueError):
            pass
        return 1


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
