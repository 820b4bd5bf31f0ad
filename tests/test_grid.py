"""Grid sweeps on every executor, disorder helpers, and the infinite-randomness exponent."""

from __future__ import annotations

import concurrent.futures as cf
import json
import multiprocessing
import os
import signal
import threading
import time
from collections.abc import Iterator

import numpy as np
import pandas as pd
import pytest
from helpers import dense_string
from scipy import stats
from scipy.linalg import eigvalsh_tridiagonal

import freeladder as fl


def _add(a: int, b: int) -> dict[str, int]:
    return {"sum": a + b, "product": a * b}


def _draw(scale: float, rng: np.random.Generator) -> float:
    return float(scale * rng.random())


def _slow(x: int) -> int:
    time.sleep(0.1)
    return x


@pytest.fixture(scope="module")
def pool() -> Iterator[cf.Executor]:
    """One local process pool shared by the slow tests (starting workers costs seconds)."""
    executor = cf.ProcessPoolExecutor(2, mp_context=multiprocessing.get_context("forkserver"))
    try:
        yield executor
    finally:
        executor.shutdown(wait=True, cancel_futures=True)


# -- the runner ------------------------------------------------------------------------------------
def test_grid_order_columns_and_attrs() -> None:
    df = fl.sweep(_add, {"a": [1, 2, 3], "b": [10, 20]}, progress=False)
    assert list(df.columns) == ["a", "b", "stream", "sum", "product"]
    # itertools.product order (common practice): the last key varies fastest.
    assert list(zip(df["a"], df["b"], strict=True)) == [
        (1, 10), (1, 20), (2, 10), (2, 20), (3, 10), (3, 20)
    ]  # fmt: skip
    assert (df["sum"] == df["a"] + df["b"]).all() and (df["product"] == df["a"] * df["b"]).all()
    assert df.attrs["complete"] is True and df.attrs["points"] == 6
    assert df.attrs["seed"] is None  # _add takes no random stream
    scalar = fl.sweep(lambda x: x * x, {"x": [1, 2, 3]}, progress=False)
    assert scalar["result"].tolist() == [1, 4, 9]


def test_streams_are_spawned_from_one_seed_sequence() -> None:
    # numpy's SeedSequence spawning (common practice): stream i is SeedSequence(seed, (i,)).
    df = fl.sweep(_draw, {"scale": [1.0, 2.0]}, seed=1234, repeat=3, progress=False)
    assert df["realisation"].tolist() == [0, 1, 2, 0, 1, 2]
    for i, row in df.iterrows():
        expect = (
            row["scale"]
            * np.random.default_rng(np.random.SeedSequence(1234, spawn_key=(i,))).random()
        )
        assert row["result"] == expect
    again = fl.sweep(_draw, {"scale": [1.0, 2.0]}, seed=1234, repeat=3, progress=False)
    pd.testing.assert_frame_equal(df, again)
    assert df["result"].nunique() == 6  # independent streams, no repeats
    fresh = fl.sweep(_draw, {"scale": [1.0]}, repeat=2, progress=False)
    entropy = fresh.attrs["seed"]
    assert entropy is not None  # fresh entropy is recorded so the run can be repeated
    redo = fl.sweep(_draw, {"scale": [1.0]}, repeat=2, seed=entropy, progress=False)
    assert redo["result"].tolist() == fresh["result"].tolist()


def test_interrupt_in_process_returns_what_finished() -> None:
    def stop_at_four(x: int) -> int:
        if x == 4:
            raise KeyboardInterrupt
        return x

    df = fl.sweep(stop_at_four, {"x": list(range(10))}, progress=False)
    assert df["result"].tolist() == [0, 1, 2, 3]
    assert df.attrs["complete"] is False and df.attrs["points"] == 10


def test_interrupt_on_processes_cancels_and_returns_what_finished(pool: cf.Executor) -> None:
    # Ctrl-C arrives as SIGINT in the main process while the pool works.
    timer = threading.Timer(3.0, os.kill, (os.getpid(), signal.SIGINT))
    timer.start()
    try:
        start = time.perf_counter()
        df = fl.sweep(_slow, {"x": list(range(400))}, executor=pool, progress=False)
        elapsed = time.perf_counter() - start
    finally:
        timer.cancel()
    assert df.attrs["complete"] is False
    assert len(df) < 400  # on a loaded machine the workers may not even have started
    if len(df):
        assert df["result"].tolist() == df["x"].tolist()
    assert elapsed < 15  # 400 x 0.1 s on 2 workers would take 20 s; it stopped early


def test_errors_name_the_grid_point() -> None:
    def fails_on_three(x: int) -> int:
        if x == 3:
            raise ZeroDivisionError("three")
        return x

    with pytest.raises(ZeroDivisionError) as info:
        fl.sweep(fails_on_three, {"x": [1, 2, 3]}, progress=False)
    assert "{'x': 3}" in "".join(getattr(info.value, "__notes__", []))
    with pytest.raises(ValueError, match="grid key"):
        fl.sweep(lambda a, sum: {"sum": a}, {"a": [1], "sum": [2]}, progress=False)
    with pytest.raises(ValueError, match="empty"):
        fl.sweep(_add, {"a": [], "b": [1]}, progress=False)
    with pytest.raises(ValueError, match="executor"):
        fl.sweep(_add, {"a": [1], "b": [1]}, executor=3, progress=False)
    with pytest.raises(ValueError, match="executor"):
        fl.sweep(_add, {"a": [1], "b": [1]}, executor="process", progress=False)
    with pytest.raises(ValueError, match="reserved"):
        fl.sweep(_add, {"stream": [1], "b": [1]}, progress=False)


def _disorder_grid() -> dict[str, list[object]]:
    return {"n_terms": [200, 401], "reach": [1, 2], "low": [0.3], "high": [1.7]}


def test_processes_give_the_in_process_table() -> None:
    ref = fl.sweep(fl.disordered_chain_gap, _disorder_grid(), seed=7, repeat=10, progress=False)
    df = fl.sweep(
        fl.disordered_chain_gap,
        _disorder_grid(),
        seed=7,
        repeat=10,
        executor="processes",
        progress=False,
    )
    assert df.attrs["complete"] is True and "process pool" in df.attrs["executor"]
    pd.testing.assert_frame_equal(df, ref)


def test_dask_cluster_gives_the_in_process_table() -> None:
    distributed = pytest.importorskip("distributed")
    ref = fl.sweep(fl.disordered_chain_gap, _disorder_grid(), seed=11, repeat=10, progress=False)
    cluster = client = None
    try:
        cluster = distributed.LocalCluster(
            n_workers=2,
            threads_per_worker=1,
            processes=True,
            host="127.0.0.1",
            dashboard_address=":0",
        )
        client = distributed.Client(cluster)
        client.wait_for_workers(2, timeout=120)
        workers = client.scheduler_info()["workers"]
        assert len(workers) == 2 and all(a.startswith("tcp://127.0.0.1:") for a in workers)
        # two separate worker processes, neither of them this one
        pids = set(client.run(os.getpid).values())
        assert len(pids) == 2 and os.getpid() not in pids
        df = fl.sweep(
            fl.disordered_chain_gap,
            _disorder_grid(),
            seed=11,
            repeat=10,
            executor=client,
            progress=False,
        )
        assert "dask.distributed" in df.attrs["executor"]
        pd.testing.assert_frame_equal(df, ref)  # row by row, every column
        # A scheduler address: sweep connects its own client and closes it.
        by_address = fl.sweep(
            fl.disordered_chain_gap,
            _disorder_grid(),
            seed=11,
            repeat=10,
            executor=cluster.scheduler_address,
            progress=False,
        )
        pd.testing.assert_frame_equal(by_address, ref)
    finally:
        if client is not None:
            client.close()
        if cluster is not None:
            cluster.close()


# -- disorder helpers ------------------------------------------------------------------------------
@pytest.mark.parametrize(
    ("distribution", "kwargs", "cdf"),
    [
        ("box", {"low": 0.5, "high": 2.0}, stats.uniform(0.5, 1.5).cdf),
        # c = u^delta: P(c < x) = x^(1/delta) on (0, 1] (Igloi-Monthus, from memory).
        ("power", {"delta": 2.5}, lambda x: np.clip(x, 0, 1) ** (1 / 2.5)),
        ("log-box", {"low": 0.01, "high": 1.0}, lambda x: (np.log(x) + np.log(100)) / np.log(100)),
        ("gaussian", {"mean": 1.0, "width": 0.3}, stats.norm(1.0, 0.3).cdf),
    ],
)  # fmt: skip
def test_disorder_distributions_against_scipy(distribution: str, kwargs: dict, cdf: object) -> None:
    # Kolmogorov-Smirnov test against scipy.stats (common practice); fixed seed, p > 0.01.
    c = fl.disorder_couplings(20000, distribution, rng=3, **kwargs)
    assert stats.kstest(c, cdf).pvalue > 0.01
    assert np.array_equal(c, fl.disorder_couplings(20000, distribution, rng=3, **kwargs))
    assert not np.array_equal(c, fl.disorder_couplings(20000, distribution, rng=4, **kwargs))


def test_disorder_bad_parameters() -> None:
    with pytest.raises(ValueError, match="distribution"):
        fl.disorder_couplings(3, "cauchy")
    with pytest.raises(ValueError, match="log-box"):
        fl.disorder_couplings(3, "log-box", low=0.0)
    with pytest.raises(ValueError, match="low < high"):
        fl.disorder_couplings(3, "box", low=1.0, high=1.0)
    with pytest.raises(ValueError, match="empty"):
        fl.periodic_couplings(3, ())
    with pytest.raises(ValueError, match="L - 1 bonds"):
        fl.interleave([1.0, 2.0], [1.0, 2.0])


def test_patterns() -> None:
    assert fl.periodic_couplings(7, (0.8, 1, 1)) == [0.8, 1, 1, 0.8, 1, 1, 0.8]
    assert fl.periodic_couplings(5, (2, 3)) == fl.staggered(5, 2, 3)
    assert fl.interleave([1.0, 2.0, 3.0], [4.0, 5.0]).tolist() == [1.0, 4.0, 2.0, 5.0, 3.0]


def test_interleaved_chain_is_the_random_ising_chain() -> None:
    # The random transverse-field Ising chain against dense numpy diagonalization: the
    # many-body gap E_1 - E_0 equals 2 |eta_1| of the reach-1 chain with interleaved couplings
    # (free-fermion spectrum of the open chain: P. Pfeuty, Ann. Phys. 57, 79 (1970)).
    rng = np.random.default_rng(5)
    h, j = rng.uniform(0.2, 1.0, 6), rng.uniform(0.2, 1.0, 5)
    m = fl.ising_chain(6, field=h, bond=j)
    dense = sum(complex(c) * dense_string(g, list(range(6))) for c, g in m.terms)
    levels = np.linalg.eigvalsh(dense)
    eta, _, _ = fl.chain_quasi_energy(fl.interleave(h, j), 1)  # type: ignore[misc]
    assert levels[1] - levels[0] == pytest.approx(2 * eta, rel=1e-9)
    eta_builder, _, _ = fl.smallest_quasi_energy(m)
    assert eta_builder == pytest.approx(eta, rel=1e-12)


def test_log_gap_statistics_bookkeeping() -> None:
    df = pd.DataFrame({"size": [4, 4, 4, 8, 8], "gap": [0.5, 0.25, 0.125, 0.1, 0.01]})
    st = fl.log_gap_statistics(df, bins=4)
    row = st.table.set_index("size").loc[4]
    v = -np.log([0.5, 0.25, 0.125])
    assert row["mean"] == pytest.approx(v.mean()) and row["width"] == pytest.approx(v.std(ddof=1))
    assert row["count"] == 3 and row["stderr"] == pytest.approx(v.std(ddof=1) / np.sqrt(3))
    assert st.histograms[4][1].sum() == 3
    json.dumps(st.to_dict(), allow_nan=False)
    logs = fl.log_gap_statistics(df.assign(gap=np.log(df["gap"])), log=True)
    pd.testing.assert_frame_equal(logs.table, st.table)
    with pytest.raises(ValueError, match="not finite and > 0"):
        fl.log_gap_statistics(df.assign(gap=[0.5, 0.0, 0.1, 0.2, 0.3]))


# -- infinite randomness ---------------------------------------------------------------------------
def _random_ising_gap(size: int, rng: np.random.Generator) -> dict[str, float]:
    """Random transverse-field Ising chain of ``size`` sites, fields and bonds uniform in (0, 1]."""
    return fl.disordered_chain_gap(2 * size - 1, reach=1, low=0.0, high=1.0, rng=rng)


IR_SIZES = [64, 128, 256, 512, 1024, 2048, 4096]
IR_REALISATIONS = 1000


def test_infinite_randomness_exponent(pool: cf.Executor) -> None:
    # D. S. Fisher, Phys. Rev. B 51, 6411 (1995): at the critical point of the random
    # transverse-field Ising chain (fields and bonds uniform in (0, 1)), -ln(gap) ~ L^psi with
    # psi = 1/2, and the width of the distribution of ln(gap) grows like L^(1/2) as well.
    # Fit: mean(-ln gap) = A L^psi + B by power_law_fit, weighted by the standard errors of the
    # means.  Its error bar is the fit's standard error (covariance of the weighted least squares,
    # scaled up by the reduced chi^2 when that exceeds 1) combined in quadrature with the largest
    # shift of psi between variant fits (without the smallest size; plain power law on the
    # largest half) -- not a bootstrap.  At L = 4096, -ln(gap) reaches about 320, and about 0.5%
    # of the realisations have a gap near e^-190, where the root finder's Laguerre iteration
    # once stalled (y near 1e164); no realisation is dropped (the table has all of them).
    # Measured: about 30 s on 2 workers.
    df = fl.sweep(
        _random_ising_gap,
        {"size": IR_SIZES},
        seed=2026,
        repeat=IR_REALISATIONS,
        executor=pool,
        progress=False,
    )
    assert df.attrs["complete"] is True and len(df) == len(IR_SIZES) * IR_REALISATIONS
    assert np.all(np.isfinite(df["log_gap"])) and np.all(df["gap_error"] < 1e-10 * df["gap"])
    # The deepest gaps, those near e^-190 (where the root finder was measured to stall) and a
    # few others against LAPACK's bisection (dstebz through scipy) on the zero-diagonal
    # tridiagonal matrix whose positive eigenvalues are the quasi-energies (P. Pfeuty, Ann.
    # Phys. 57, 79 (1970)); stream i is SeedSequence(2026, spawn_key=(i,)).
    stall = df[(df["log_gap"] < -175) & (df["log_gap"] > -205)]
    assert len(stall) > 10
    checked = [df.nsmallest(20, "log_gap"), stall, df.sample(10, random_state=1)]
    for row in pd.concat(checked).itertuples():
        rng = np.random.default_rng(np.random.SeedSequence(2026, spawn_key=(row.stream,)))
        c = fl.disorder_couplings(2 * row.size - 1, "box", low=0.0, high=1.0, rng=rng)
        ref = eigvalsh_tridiagonal(
            np.zeros(2 * row.size), c, select="i", select_range=(row.size,) * 2, tol=1e-300
        )[0]
        assert abs(row.gap - ref) <= row.gap_error + 1e-13 * ref, (row, ref)
    stats_ = fl.log_gap_statistics(df)
    mean = stats_.exponent("mean", correction="offset")
    assert mean.error < 0.05, mean
    assert abs(mean.exponent - 0.5) <= 2 * mean.error, mean
    width = stats_.exponent("width", correction="offset")
    assert width.error < 0.05, width
    assert abs(width.exponent - 0.5) <= 2 * width.error, width
