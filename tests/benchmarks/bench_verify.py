"""Benchmark: ``verify`` from 20 to 10^5 terms, and the sparse exact check to dimension 2^22.

Three tables.  (1) Reach-2 exclusion chains of 20 to 60 terms, every even size (issue 14):
the time ratio between consecutive sizes stays below 2 and 60 terms take under 30 s.
(2) ``--large``: reach-1 and reach-2 chains of 10^2 .. 10^5 terms (disordered couplings):
time and peak memory (resident set size, one process per size) of ``verify``, the time of
the spectrum inside it, the decisive checks that passed, and the ratio to the previous size
(10x the terms); goal 10^5 terms under 60 s; then the same runs by phase (verdict, spectrum,
each linear check).  (3) ``--sparse``: :func:`freeladder.spectra.ed.sector_exact_spectrum` for
the 8 lowest levels of the open XY chain in a field in its even-parity sector, dimensions 2^14
.. 2^22 (sites 15 .. 23), time, peak memory and the estimate checked beforehand, after the
ground sector of a 20-site ring against sparse exact diagonalization in that sector.
Run:  bash tools/bench.sh tests/benchmarks/bench_verify.py [--large] [--sparse]
"""

from __future__ import annotations

import json
import resource
import subprocess
import sys
import time
import tracemalloc

import numpy as np

import freeladder as fl
from freeladder.checks import verification
from freeladder.spectra.ed import sector_exact_spectrum, sparse_memory


def main(sizes: list[int]) -> None:
    fl.verify(fl.exclusion_chain(8, reach=2))  # warm-up: first imports and caches
    previous = None
    worst = 0.0
    print(f"{'terms':>5} {'seconds':>8} {'ratio':>6}  ok     route of [Q(r), Q(s)] / slowest check")
    for size in sizes:
        m = fl.exclusion_chain(size, reach=2, couplings=[1 + j % 3 for j in range(size)])
        t0 = time.perf_counter()
        report = fl.verify(m)
        seconds = time.perf_counter() - t0
        ratio = seconds / previous if previous else float("nan")
        if previous:
            worst = max(worst, ratio)
        previous = seconds
        route = "sweep" if "sweep" in report["[Q(r), Q(s)] = 0"].method else "pairwise"
        slow = max(report.checks, key=lambda c: c.seconds)
        print(
            f"{size:>5} {seconds:>8.2f} {ratio:>6.2f}  {report.ok!s:<6} {route:<9} "
            f"{slow.name} {slow.seconds:.2f} s",
            flush=True,
        )
    print(f"largest ratio between consecutive sizes: {worst:.2f} (goal < 2)")


PHASES = (
    ("verdict", "verdict"),
    ("spectrum", "spectrum"),
    ("hypotheses", verification.HYPOTHESES),
    ("windows", verification.WINDOWS),
    ("power sums", verification.POWER_SUMS),
    ("sum rules", verification.SUM_RULES),
)
"""Columns of the phase table: the analysis's verdict (graph side), the spectrum (roots and
their bounds), then the checks by name; "rest" is what verify spent outside them."""


def one(reach: int, terms: int) -> None:
    """One size, in its own process: time of verify and of its phases, peak RSS (JSON)."""
    rng = np.random.default_rng(terms)
    m = fl.exclusion_chain(terms, reach=reach, couplings=rng.uniform(0.5, 1.5, terms))
    t0 = time.perf_counter()
    analysis = fl.analyze(m)
    verdict = analysis.verdict  # the graph side: classification, computed once and kept
    t_verdict = time.perf_counter() - t0
    analysis.spectrum()
    t_spectrum = time.perf_counter() - t0 - t_verdict
    report = fl.verify(analysis)
    seconds = time.perf_counter() - t0
    peak = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024  # KiB on Linux
    phases = {"verdict": t_verdict, "spectrum": t_spectrum}
    phases.update({c.name: c.seconds for c in report.checks})
    slow = max(report.checks, key=lambda c: c.seconds)
    decisive = ", ".join(c.name for c in report.checks if c.passed and c.decisive)
    print(
        json.dumps(
            {
                "seconds": seconds,
                "peak": peak,
                "ok": report.ok,
                "kind": verdict.kind,
                "phases": phases,
                "slowest": f"{slow.name} ({slow.seconds:.1f} s) | {decisive}",
            }
        )
    )


def large(sizes: tuple[int, ...] = (100, 1000, 10_000, 100_000)) -> None:
    print(
        f"{'reach':>5} {'terms':>7} {'seconds':>8} {'spectrum':>8} {'peak MiB':>9} {'ratio':>6}"
        "  ok     slowest check | decisive checks passed"
    )
    rows = []
    for reach in (1, 2):
        previous = None
        for terms in sizes:
            out = json.loads(
                subprocess.run(
                    [sys.executable, __file__, "--one", str(reach), str(terms)],
                    capture_output=True,
                    text=True,
                    check=True,
                ).stdout.splitlines()[-1]
            )
            seconds = out["seconds"]
            ratio = seconds / previous if previous else float("nan")
            previous = seconds
            rows.append((reach, terms, out))
            print(
                f"{reach:>5} {terms:>7} {seconds:>8.2f} {out['phases']['spectrum']:>8.2f} "
                f"{out['peak']:>9.0f} {ratio:>6.2f}  {out['ok']!s:<6} {out['slowest']}",
                flush=True,
            )
    print("\nphases (seconds; rest = verify outside them):")
    print(f"{'reach':>5} {'terms':>7} " + " ".join(f"{p:>10}" for p, _ in PHASES) + f" {'rest':>6}")
    for reach, terms, out in rows:
        times = [out["phases"].get(key, 0.0) for _, key in PHASES]
        print(
            f"{reach:>5} {terms:>7} "
            + " ".join(f"{t:>10.2f}" for t in times)
            + f" {out['seconds'] - sum(times):>6.2f}"
        )


def sparse() -> None:
    print(
        f"{'sites':>5} {'dimension':>10} {'sector':>8} {'seconds':>8} {'peak MiB':>9} "
        f"{'estimate MiB':>12} {'ratio':>6}"
    )
    previous = None
    for sites in range(15, 24, 2):
        bonds = [f"- 0.7 X{i} X{i + 1} - 0.3 Y{i} Y{i + 1}" for i in range(sites - 1)]
        m = fl.parse_model(" ".join(bonds + [f"- 0.6 Z{i}" for i in range(sites)]))
        parity = fl.sectors(m).parity_operators[0]
        estimate = sparse_memory(m, 8) / 2**20
        tracemalloc.start()
        t0 = time.perf_counter()
        ed = sector_exact_spectrum(m, 8, [(parity, 1)])
        seconds = time.perf_counter() - t0
        peak = tracemalloc.get_traced_memory()[1] / 2**20
        tracemalloc.stop()
        ratio = seconds / previous if previous else float("nan")
        previous = seconds
        print(
            f"{sites:>5} {m.dimension:>10} {ed.dimension:>8} {seconds:>8.2f} {peak:>9.1f} "
            f"{estimate:>12.1f} {ratio:>6.2f}",
            flush=True,
        )


def ring_sector(sites: int = 20) -> None:
    """The ground sector of an XY ring in a field against sparse exact diagonalization in that
    sector (tests/test_sparse_checks.py runs the same check on 14 sites)."""
    bonds = [
        f"{0.6 + 0.05 * (i % 3)} X{i} X{(i + 1) % sites} + 0.9 Y{i} Y{(i + 1) % sites}"
        for i in range(sites)
    ]
    m = fl.parse_model(" + ".join(bonds + [f"0.3 Z{i}" for i in range(sites)]))
    t0 = time.perf_counter()
    check = verification.sector_lowest_check(m)
    print(
        f"{sites}-site ring, ground sector against sparse exact diagonalization: "
        f"{check.status} in {time.perf_counter() - t0:.1f} s ({check.detail[:160]})"
    )


if __name__ == "__main__":
    flags = {a for a in sys.argv[1:] if a.startswith("--")}
    args = [int(a) for a in sys.argv[1:] if not a.startswith("--")]
    if "--one" in flags:
        one(args[0], args[1])
        sys.exit()
    if "--large" in flags:
        large()
    if "--sparse" in flags:
        ring_sector()
        sparse()
    if not flags:
        main(args if args else list(range(20, 62, 2)))
