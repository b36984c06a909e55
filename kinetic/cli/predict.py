"""``kinetic predict`` and ``kinetic sweep grain|alloy``: numbers without data, from the default model.

Both start from the preset's default model (``kinetic.defaults``) or a saved
record, and print the plain scope notes (outside the calibrated range, an
uncalibrated preset, a grain size or alloy fraction beyond what was checked)
in the text and the ``--json`` output. The engine loads inside ``run_*`` only
(measured reason: ``kinetic --help`` speed, benchmarks/bench_cli.py).
"""
from __future__ import annotations

from ..errors import ParameterError
from ._args import MAX_POINTS, parse_numbers
from ._model import model_from, scope_notes
from ._output import dump, jsonable

#: Most cells (lengths x temperatures, fractions x temperatures) of one sweep table.
MAX_CELLS = 10 * MAX_POINTS


def add_parsers(sub, model_options, parser_class):
    pr = sub.add_parser("predict", help="lattice kappa at given temperatures, from the default model or a record")
    model_options(pr)
    pr.add_argument("--grain-size", metavar="L", help="boundary length [m] (a unit may be given: 2um)")
    pr.add_argument("--record", help="fit record (adds a confidence band)")
    pr.add_argument("--sample", default="0", help="sample of a joint record (label or index)")
    pr.add_argument("--temperatures", nargs="+", required=True, metavar="T",
                    help="[K]; a:b:n, a:b:n:log, or with a unit (300K, 26.85degC)")
    pr.add_argument("--level", type=float, default=0.95)
    pr.add_argument("--json", action="store_true")

    sw = sub.add_parser("sweep", help="kappa against grain size or alloy fraction")
    swsub = sw.add_subparsers(dest="what", metavar="grain|alloy", parser_class=parser_class)
    g = swsub.add_parser("grain", help="kappa against boundary length (grain size)")
    model_options(g)
    g.add_argument("--record", help="fit record (adds a band)")
    g.add_argument("--sample", default="0")
    g.add_argument("--lengths", nargs="+", required=True, metavar="L",
                   help="[m]; a:b:n, a:b:n:log, or with a unit (100nm:10um:5:log)")
    g.add_argument("--temperatures", nargs="+", required=True, metavar="T", help="[K]")
    g.add_argument("--json", action="store_true")
    a = swsub.add_parser("alloy", help="kappa against alloy fraction x of A(1-x)B(x)")
    a.add_argument("--host-a", required=True)
    a.add_argument("--host-b", required=True)
    a.add_argument("--fractions", nargs="+", required=True, metavar="X")
    a.add_argument("--temperatures", nargs="+", required=True, metavar="T", help="[K]")
    a.add_argument("--length", help="boundary length [m] (a unit may be given: 1mm; default: the hosts')")
    a.add_argument("--gruneisen", help="Grüneisen parameter (default: interpolated between the hosts)")
    a.add_argument("--strain", default=None, help="Abeles strain parameter epsilon (default: the published "
                   "value of the series where there is one, e.g. 39 for Si-Ge, else 0)")
    a.add_argument("--split", action="store_true", help="longitudinal + transverse branches")
    a.add_argument("--json", action="store_true")


def _sample_arg(s):
    try:
        return int(s)
    except ValueError:
        return s


def _span(T):
    return [float(min(T)), float(max(T))] if len(T) else None


def _print_notes(notes):
    for n in notes:
        print(f"note: {n}")


def run_predict(args) -> int:
    T = parse_numbers(args.temperatures, "--temperatures", unit="K")
    if args.record and args.material:
        raise ParameterError("give --material or --record, not both")
    if args.record:
        from ..fitting import predict_band
        from ..records import load_record

        rec = load_record(args.record)
        band = predict_band(rec, T, args.level, sample=_sample_arg(args.sample))
        out = {"source": args.record, "temperature": jsonable(band.temperature), "kappa": jsonable(band.kappa),
               "lower": jsonable(band.lower), "upper": jsonable(band.upper), "level": band.level,
               "scope_notes": [str(n) for n in getattr(band, "notes", []) or []]}
    else:
        model = model_from(args)
        # the boundary length is the user's only where they set it (the default model's own is checked)
        changed = args.grain_size is not None or any(s.split("=", 1)[0].strip() == "boundary.length"
                                                     for s in args.set or [])
        notes = scope_notes(args.material, temperature=_span(T),
                            boundary_length=model.params.get("boundary.length") if changed else None)
        out = {"source": f"default model of {args.material}", "temperature": jsonable(T),
               "kappa": jsonable(model.kappa(T)), "parameters": model.params, "scope_notes": notes}
    if args.json:
        print(dump(out))
        return 0
    print(f"# lattice kappa from the {out['source']}")
    head = "T [K]        kappa [W/(m K)]" + ("   lower        upper" if "lower" in out else "")
    print(head)
    for i, t in enumerate(out["temperature"]):
        row = f"{t:<12.6g} {_fmt(out['kappa'][i]):<14}"
        if "lower" in out:
            row += f"   {_fmt(out['lower'][i]):<12} {_fmt(out['upper'][i])}"
        print(row)
    _print_notes(out["scope_notes"])
    return 0


def _fmt(v):
    return "n/a" if v is None else f"{v:.6g}"


def run_sweep(args) -> int:
    from .. import whatif

    if args.what is None:
        raise ParameterError("sweep needs 'grain' or 'alloy'")
    T = parse_numbers(args.temperatures, "--temperatures", unit="K")
    if args.what == "grain":
        L = parse_numbers(args.lengths, "--lengths", unit="m")
        _check_cells(len(L), len(T), "--lengths")
        if args.record and args.material:
            raise ParameterError("give --material or --record, not both")
        if args.record:
            from ..records import load_record

            rec = load_record(args.record)
            sw = whatif.grain_size_sweep(None, L, T, rec, sample=_sample_arg(args.sample))
            notes = [str(n) for n in getattr(sw, "notes", []) or []]
        else:
            sw = whatif.grain_size_sweep(model_from(args), L, T)
            notes = scope_notes(args.material, temperature=_span(T), boundary_length=float(min(L)))
        out = {"lengths": jsonable(sw.values), "temperature": jsonable(sw.temperature),
               "kappa": [jsonable(r) for r in sw.kappa]}
        if sw.lower is not None:
            out["lower"] = [jsonable(r) for r in sw.lower]
            out["upper"] = [jsonable(r) for r in sw.upper]
        xs, xname = out["lengths"], "L [m]"
    else:
        from ._args import number

        X = parse_numbers(args.fractions, "--fractions")
        _check_cells(len(X), len(T), "--fractions")
        length = None if args.length is None else number(args.length, "--length", unit="m")
        gr = None if args.gruneisen is None else number(args.gruneisen, "--gruneisen")
        sw = whatif.alloy_sweep(args.host_a, args.host_b, X, T, boundary_length=length, gruneisen=gr,
                                strain_epsilon=None if args.strain is None else number(args.strain, "--strain"),
                                split_branches=True if args.split else None)
        notes = []
        for host, frac in ((args.host_a, float(max(X))), (args.host_b, float(max(1.0 - X)))):
            for n in scope_notes(host, temperature=_span(T), alloy_fraction=frac):
                if n not in notes:
                    notes.append(n)
        notes += [str(n) for n in getattr(sw, "notes", []) or [] if str(n) not in notes]
        out = {"fractions": jsonable(sw.fractions), "temperature": jsonable(sw.temperature),
               "kappa": [jsonable(r) for r in sw.kappa], "gamma": jsonable(sw.gamma)}
        xs, xname = out["fractions"], "x"
    out["scope_notes"] = notes
    if args.json:
        print(dump(out))
        return 0
    print(f"# lattice kappa [W/(m K)]; rows: {xname}, columns: T [K]")
    print(f"{xname:<12}" + "".join(f"{t:>12.5g}" for t in out["temperature"]))
    for x, row in zip(xs, out["kappa"]):
        print(f"{x:<12.5g}" + "".join(f"{_fmt(v):>12}" for v in row))
    _print_notes(notes)
    return 0


def _check_cells(n_rows, n_cols, name):
    if n_rows * n_cols > MAX_CELLS:
        raise ParameterError(f"{name} x --temperatures: {n_rows} x {n_cols} values; at most {MAX_CELLS} in one table")
