"""Benchmark: the flux-free sector of Kitaev's honeycomb on L x L tori, L = 10, 20, 40.

For each torus, time :func:`freeladder.jordan_wigner_spectrum` with every hexagon string fixed
to +1 (the sector search then solves the few completions left by the loop and parity strings),
beside the bare linear algebra of one sector: scipy's dense ``eigvalsh`` of the same
single-particle matrix built by hand (``i h`` with ``h_ab = J`` on every bond, A -> B).  The ratio
is freeladder's time per solved sector over that baseline; it covers building the sectors
(conserved strings, relations over GF(2)) and each sector's solve: on the honeycomb the
single-particle matrix is bipartite, so the energies are the singular values of its V/2 x V/2
off-diagonal block and the parity sign comes from an LU determinant of that block (no Schur
form), which is why the ratio can fall below one.  The energies per site are printed to
show they agree.  The last two columns time ``fl.free_spectrum(m, sector="ground")``
(hexagons fixed by Lieb's flux theorem, the loop and parity completions each solved once, the
lowest kept with all its parity values) and its ratio to the same baseline.

Run with ``bash tools/bench.sh tests/benchmarks/bench_majorana.py`` (L = 40: under a minute here,
mostly the eigvalsh baseline).
"""

from __future__ import annotations

import sys
import time

import numpy as np
import scipy.linalg

import freeladder as fl


def hand_built(cells: int) -> np.ndarray:
    """The flux-free single-particle matrix, built directly from the lattice."""
    index = {}
    for s in (0, 1):
        for x in range(cells):
            for y in range(cells):
                index[(s, x, y)] = len(index)
    h = np.zeros((len(index), len(index)))
    for x in range(cells):
        for y in range(cells):
            b = index[(1, x, y)]
            for a in ((0, x, y), (0, (x + 1) % cells, y), (0, x, (y + 1) % cells)):
                h[index[a], b] += 1.0
                h[b, index[a]] -= 1.0
    return h


def main(sizes: list[int]) -> None:
    print(
        f"{'L':>4} {'sites':>6} {'freeladder s':>13} {'sectors':>8} {'eigvalsh s':>11} "
        f"{'ratio/sector':>13} {'E0/site':>11} {'baseline E0/site':>17} {'ground s':>9} "
        f"{'ratio':>6}"
    )
    for cells in sizes:
        m = fl.kitaev_torus(cells, cells)
        hexagons = fl.honeycomb_hexagons(cells, cells)
        start = time.perf_counter()
        sp = fl.jordan_wigner_spectrum(m, sector={h: 1 for h in hexagons})
        t_fl = time.perf_counter() - start
        start = time.perf_counter()
        eps = scipy.linalg.eigvalsh(1j * hand_built(cells))
        t_base = time.perf_counter() - start
        # E0 = -sum of the positive single-particle energies (periodic Majoranas; the sector
        # search may pick other boundary conditions, so the two differ at finite size)
        base = -float(eps[eps > 0].sum()) / len(m.sites)
        ratio = t_fl / len(sp.sectors) / t_base
        start = time.perf_counter()
        fl.free_spectrum(m, sector="ground")
        t_ground = time.perf_counter() - start
        print(
            f"{cells:>4} {len(m.sites):>6} {t_fl:>13.2f} {len(sp.sectors):>8} {t_base:>11.3f} "
            f"{ratio:>13.1f} {sp.ground_energy / len(m.sites):>11.6f} {base:>17.6f} "
            f"{t_ground:>9.2f} {t_ground / t_base:>6.1f}"
        )


if __name__ == "__main__":
    main([int(a) for a in sys.argv[1:]] or [10, 20, 40])
