"""scipy side of test/bench/cases/cli.ts: test/bench/dense_posterior.py as its own python3 process per run
(interpreter start, numpy/scipy import, reading the problem, the dense route, writing the result), timed
from spawn to exit like `priorscope posterior`. The problem file is the one test/bench/cases/fft.ts writes
(bench-results/fft-problem-<grid>.json; the TypeScript case's setup writes it before the scipy side runs).
"""
import subprocess
import sys
from pathlib import Path

_here = Path(__file__).resolve().parent
_results = _here.parent.parent.parent / "bench-results"


def op_process(params):
    problem = _results / f"fft-problem-{int(params['grid'])}.json"
    if not problem.exists():
        raise SystemExit(f"cli.py: {problem} is missing (the TypeScript case's setup writes it; run through test/bench/run.ts)")
    out = _results / "cli" / f"dense-posterior-{int(params['grid'])}.json"
    out.parent.mkdir(parents=True, exist_ok=True)
    cmd = [sys.executable, str(_here.parent / "dense_posterior.py"), str(problem), str(out)]
    return lambda: subprocess.run(cmd, check=True)


OPS = {"dense_posterior_process": op_process}
