"""How long the command line makes a user wait: ``kinetic --help``, ``kinetic materials``, ``kinetic demo``.

Each command runs in a fresh process (``python -m kinetic.cli``, what the
``kinetic`` entry point runs), best of N, wall clock including the
interpreter's start, beside a bare ``python -c pass`` on the same machine
and ``import kinetic`` (the package root) for reference. Targets (issue 12):
``kinetic --help`` under 0.3 s, ``kinetic materials`` under 0.5 s.

    python benchmarks/bench_cli.py          # or through benchmarks/run.py

To see where the time goes: ``python -X importtime -m kinetic.cli --help``.
"""
from __future__ import annotations

import os
import subprocess
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent


def _env():
    env = dict(os.environ)
    env["PYTHONPATH"] = str(ROOT) + (os.pathsep + env["PYTHONPATH"] if env.get("PYTHONPATH") else "")
    return env


def best_time(argv, repeat=5) -> float:
    """Best wall time [s] of ``python argv...`` in a fresh process, over ``repeat`` runs."""
    best = float("inf")
    env = _env()
    for _ in range(repeat):
        t0 = time.perf_counter()
        done = subprocess.run([sys.executable, *argv], cwd=ROOT, env=env, stdout=subprocess.DEVNULL,
                              stderr=subprocess.PIPE, text=True, check=False)
        dt = time.perf_counter() - t0
        if done.returncode != 0:
            raise RuntimeError(f"{' '.join(argv)} failed: {done.stderr.strip().splitlines()[-1:]}")
        best = min(best, dt)
    return best


def run(repeat=5) -> list:
    """Rows (label, seconds, unit and target) for benchmarks/run.py."""
    rows = [("cli: python -c pass (interpreter start, reference)", best_time(["-c", "pass"], repeat), "s"),
            ("cli: import kinetic (package root, reference)", best_time(["-c", "import kinetic"], repeat), "s")]
    for cmd, target in ((["--help"], "s   (target < 0.3 s)"), (["materials"], "s   (target < 0.5 s)"),
                        (["demo"], "s")):
        rows.append((f"cli: kinetic {' '.join(cmd)}", best_time(["-m", "kinetic.cli", *cmd], repeat), target))
    return rows


def main():
    rows = run()
    width = max(len(r[0]) for r in rows)
    print(f"kinetic command-line timings ({os.cpu_count()} CPUs, best of 5, fresh process each)")
    for label, value, unit in rows:
        print(f"  {label:<{width}}  {value:>8.3f} {unit}")


if __name__ == "__main__":
    main()
