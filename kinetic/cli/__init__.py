"""The ``kinetic`` command: fit measured kappa(T) (one file or a batch), predict, sweep, list presets.

Subcommands::

    kinetic fit FILE|FOLDER|GLOB [...] --material NAME [--free NAME ...] [--set NAME=VALUE ...]
                [--bounds NAME=LO:HI ...] [--starts N] [--seed N] [--lorenz auto|sommerfeld|spb|kim]
                [--weights auto|errors|relative] [--tmin K] [--tmax K]
                [--kind total|lattice] [--ignore-column NAME] [--unit COLUMN=UNIT] [--column HEADER=NAME]
                [--density RHO] [--heat-capacity dulong-petit|debye|CP] [--relative-density X]
                [--porosity-correction NAME] [--delimiter D] [--decimal .|,] [--encoding E]
                [--save RECORD.json] [--report FIG.png]                    (one fit)
                [--joint] [--per-sample NAME ...]                           (one joint fit of several files)
                [--summary TABLE.csv|.json] [--at 300,600] [--jobs N] [--dask-scheduler ADDRESS]  (a batch)
                [--json] [--quiet] [--progress]
    kinetic fit --demo [sample|grain]
    kinetic predict (--material NAME [--grain-size L] | --record FILE) --temperatures T [T ...] [--json]
    kinetic sweep grain (--material NAME | --record FILE) --lengths L ... --temperatures T ...
    kinetic sweep alloy --host-a A --host-b B --fractions X ... --temperatures T ...
    kinetic demo [--write DIR]
    kinetic materials [--json]

One FILE is one fit. Several FILEs, a folder or a glob are a batch: each
file is fitted on its own (in parallel on this machine's cores, or on a Dask
cluster), and ``--summary`` writes one table with a row per sample; a
sample that fails gets a row with its one-line error. ``--joint`` fits
several files together instead (boundary length per sample, the rest
shared). Number lists accept ``a:b:n`` (n evenly spaced values) and
``a:b:n:log``; options with a unit in brackets accept a unit too
(``--grain-size 2um``, ``--temperatures 26.85degC``, ``--density 5.2g/cm^3``).
``predict`` and ``sweep`` start from the preset's default model and print
plain notes where a number leaves what the preset was checked against.

Exit status: 0 on success; 2 for bad input or a failed fit (a one-line
message on stderr, no traceback); 130 when interrupted. ``--json`` writes
machine-readable output to stdout. Progress bars go to stderr when stderr is
a terminal (``--quiet`` silences them, ``--progress`` forces them).

Speed. This package and the parser import only the standard library and
:mod:`kinetic.errors`; each command imports the engine, numpy, pint or
matplotlib inside its ``run`` function. That is the measured reason for
those imports inside functions: ``kinetic --help`` and ``kinetic materials``
answer in well under half a second only if they do not load scipy and the
fitter (see benchmarks/bench_cli.py).
"""
from __future__ import annotations

import argparse
import os
import sys

from ..errors import KineticError
from . import fit as _fit
from . import info as _info
from . import predict as _predict
from ._args import cli_words, parse_numbers

__all__ = ["build_parser", "main", "parse_numbers"]

PROG = "kinetic"


class _UsageError(Exception):
    pass


class _Parser(argparse.ArgumentParser):
    """ArgumentParser whose errors are one line (raised, printed by main)."""

    def error(self, message):
        raise _UsageError(f"{self.prog}: {message} (see {self.prog} --help)")


def _model_options(sp):
    sp.add_argument("--material", help="material preset (see 'kinetic materials')")
    sp.add_argument("--mechanisms", help="keep only these of the preset's calibrated mechanisms, comma-separated "
                    "(boundary,point_defect,umklapp,normal)")
    sp.add_argument("--add", action="append", metavar="KIND", help="add a scattering mechanism of any registered "
                    "kind with start values (e.g. dislocation, precipitate, electron_phonon; repeatable); "
                    "set its parameters with --set KIND.PARAM=VALUE")
    sp.add_argument("--split", action="store_true", help="longitudinal + transverse branches")
    sp.add_argument("--set", action="append", metavar="NAME=VALUE", help="fix a parameter value")


def build_parser() -> argparse.ArgumentParser:
    p = _Parser(prog=PROG, description="Kinetic-theory thermal conductivity: fit, predict, sweep.")
    from .._version import __version__

    p.add_argument("--version", action="version", version=f"{PROG} {__version__}")
    sub = p.add_subparsers(dest="command", metavar="COMMAND", parser_class=_Parser)
    _fit.add_parser(sub, _model_options)
    _predict.add_parsers(sub, _model_options, _Parser)
    _info.add_parsers(sub)
    return p


_COMMANDS = {"fit": _fit.run, "predict": _predict.run_predict, "sweep": _predict.run_sweep,
             "demo": _info.run_demo, "materials": _info.run_materials}


def _one_line(exc) -> str:
    if isinstance(exc, OSError) and not isinstance(exc, KineticError):
        where = exc.filename or ""
        why = exc.strerror or str(exc) or type(exc).__name__
        return f"{where}: {why}" if where else why
    text = str(exc).strip()
    return cli_words(text.splitlines()[0]) if text else type(exc).__name__


def main(argv=None) -> int:
    """Run the command line; returns the exit status (0 ok, 2 bad input, 130 interrupted)."""
    parser = build_parser()
    try:
        try:
            args = parser.parse_args(argv)
        except SystemExit as exc:  # --help, --version
            return int(exc.code or 0)
        if args.command is None:
            parser.print_help()
            return 2
        return _COMMANDS[args.command](args)
    except _UsageError as exc:
        print(str(exc), file=sys.stderr)
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
    except (KineticError, OSError) as exc:
        # user mistakes (ours), and the file system's refusals: a missing file, a
        # read-only folder, a full device (ENOSPC) - one line, no traceback
        print(f"{PROG}: error: {_one_line(exc)}", file=sys.stderr)
        return 2
    except (ValueError, OverflowError, MemoryError) as exc:
        # a value the engine could not handle although the options passed their checks
        print(f"{PROG}: error: {type(exc).__name__}: {_one_line(exc)}", file=sys.stderr)
        return 2
