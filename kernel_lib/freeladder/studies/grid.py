"""Run a function over a grid of parameters: in-process, on local processes or on dask.

:func:`sweep` evaluates ``function(**point)`` for every point of the Cartesian product of a
grid and returns a pandas DataFrame.  Each point gets its own random stream, spawned from one
``numpy.random.SeedSequence`` by the point's position in the grid, so the table is the same
whichever executor runs it, in whatever order the points finish.

(This module holds the parameter-grid runner; :mod:`freeladder.checks.charge_sweep`
is the exact one-pass
check of products of charges, a different thing.)

References
----------
numpy's ``SeedSequence`` (M. E. O'Neill's PCG family and its seeding scheme) for independent
streams; dask.distributed for clusters.  Common practice otherwise.
"""

from __future__ import annotations

import concurrent.futures as cf
import inspect
import itertools
import math
import multiprocessing
import os
import time
from collections.abc import Callable, Iterator, Mapping, Sequence
from typing import TYPE_CHECKING, Any

if TYPE_CHECKING:
    import pandas as pd

import numpy as np

__all__ = ["sweep"]

_RESERVED = ("stream", "realisation")


def _points(
    grid: Mapping[str, Sequence[Any]], repeat: int
) -> tuple[list[str], list[dict[str, Any]], list[int | None]]:
    if not isinstance(grid, Mapping) or not grid:
        raise ValueError("grid must be a non-empty dict of {name: list of values}")
    keys = [str(k) for k in grid]
    values = []
    for k in grid:
        v = grid[k]
        if isinstance(v, (str, bytes)) or not hasattr(v, "__iter__"):
            raise ValueError(f"grid[{k!r}] must be a list of values, got {v!r}")
        v = list(v)
        if not v:
            raise ValueError(f"grid[{k!r}] is empty")
        values.append(v)
    for k in keys:
        if k in _RESERVED:
            raise ValueError(f"grid key {k!r} is reserved for the table")
    if isinstance(repeat, bool) or int(repeat) != repeat or repeat < 1:
        raise ValueError(f"repeat must be a positive integer, got {repeat!r}")
    points, labels = [], []
    for combo in itertools.product(*values):
        for r in range(int(repeat)):
            points.append(dict(zip(keys, combo, strict=True)))
            labels.append(r if repeat > 1 else None)
    return keys, points, labels


def _random_keyword(function: Callable[..., Any], keys: Sequence[str]) -> str | None:
    """``"rng"`` or ``"seed"`` when ``function`` takes that keyword and it is not a grid key
    (a grid key is passed as given: the grid value wins), else None."""
    try:
        params = inspect.signature(function).parameters
    except (TypeError, ValueError):
        return None
    for name in ("rng", "seed"):
        if name in keys:
            continue
        p = params.get(name)
        if p is not None and p.kind in (p.POSITIONAL_OR_KEYWORD, p.KEYWORD_ONLY):
            return name
    return None


def _call(
    function: Callable[..., Any],
    point: dict[str, Any],
    keyword: str | None,
    stream: np.random.SeedSequence | None,
) -> Any:
    """One evaluation; the random stream becomes a Generator (``rng``) or a SeedSequence."""
    kwargs = dict(point)
    if keyword == "rng":
        kwargs["rng"] = np.random.default_rng(stream)
    elif keyword == "seed":
        kwargs["seed"] = stream
    return function(**kwargs)


def _call_batch(
    function: Callable[..., Any],
    batch: list[tuple[int, dict[str, Any], np.random.SeedSequence | None]],
    keyword: str | None,
) -> list[tuple[int, Any]]:
    out = []
    for i, point, stream in batch:
        try:
            out.append((i, _call(function, point, keyword, stream)))
        except Exception as err:
            err.add_note(f"fl.sweep: at grid point {i}: {point}")
            raise
    return out


def _batches(items: list[Any], workers: int) -> list[list[Any]]:
    """About 16 batches per worker, at most 256 items each, so that overhead stays small while
    the progress bar and an interrupt still act promptly."""
    size = max(1, min(256, math.ceil(len(items) / (16 * max(workers, 1)))))
    return [items[i : i + size] for i in range(0, len(items), size)]


def _columns(
    keys: list[str], done: dict[int, Any], points: list[dict[str, Any]], labels: list[int | None]
) -> pd.DataFrame:
    rows = []
    for i in sorted(done):
        row = dict(points[i])
        row["stream"] = i
        if labels[i] is not None:
            row["realisation"] = labels[i]
        result = done[i]
        if isinstance(result, Mapping):
            for name, value in result.items():
                if str(name) in row:
                    raise ValueError(
                        f"the function returned {name!r}, which is also a grid key; rename it"
                    )
                row[str(name)] = value
        else:
            row["result"] = result
        rows.append(row)
    import pandas as pd  # on use: importing pandas takes about a second

    return pd.DataFrame(rows, columns=None if rows else [*keys, "stream"])


def _is_dask_client(executor: Any) -> bool:
    return type(executor).__module__.startswith("distributed") and hasattr(executor, "submit")


def sweep(
    function: Callable[..., Any],
    grid: Mapping[str, Sequence[Any]],
    executor: Any = None,
    seed: int | np.random.SeedSequence | None = None,
    progress: bool = True,
    repeat: int = 1,
) -> pd.DataFrame:
    """``function(**point)`` over the Cartesian product of ``grid``, as a pandas DataFrame.

    Parameters
    ----------
    function : callable
        Called with one keyword per grid key.  If it takes a keyword ``rng`` it also gets a
        ``numpy.random.Generator``; else, if it takes ``seed``, a ``numpy.random.SeedSequence``
        (``numpy.random.default_rng`` accepts both).  A grid key named ``rng`` or ``seed`` is
        passed as the grid gives it: the grid value wins, and no stream is injected under that
        name (``seed`` still gets one when ``rng`` is the grid key).  A dict result becomes
        columns; anything else becomes the column ``result``.  For ``"processes"`` and dask it
        must be picklable (a function defined at module level).
    grid : dict of lists
        ``{name: values}``; the points are ``itertools.product`` of the values in key order.
    executor : None, "processes", concurrent.futures.Executor, distributed.Client or str
        None runs in this process; ``"processes"`` on a local process pool (one per core,
        started with ``forkserver`` where available); an Executor you made is used as it is; a
        ``distributed.Client``, or a scheduler address such as ``"tcp://127.0.0.1:8786"``
        (connected for this call and closed after), runs on dask.distributed.
    seed : int, SeedSequence or None
        Root of the random streams.  Point ``i`` (its position in the grid) gets
        ``SeedSequence(entropy, spawn_key=(i,))``, the ``i``-th child of ``seed``.  None draws
        fresh entropy, kept in ``df.attrs["seed"]`` so that the run can be repeated.
    progress : bool
        Show a progress bar (tqdm.auto).
    repeat : int
        Evaluate every grid point this many times, each with its own random stream (disorder
        realisations); the table then has a column ``realisation`` (0 .. repeat - 1).

    Returns
    -------
    pandas.DataFrame
        One row per finished evaluation, in grid order: the grid keys, ``stream`` (the
        evaluation's index, the spawn key of its random stream), ``realisation`` (with
        ``repeat > 1``) and the results.  ``df.attrs`` holds
        ``complete`` (False after an interrupt), ``points`` (how many were asked for),
        ``seed`` (the root entropy, or None when the function takes no random stream),
        ``executor`` (text) and ``seconds``.

    Raises
    ------
    ValueError
        For a malformed grid, an unknown executor, or a result key that is also a grid key.
    Exception
        Whatever ``function`` raises, after the pending work is cancelled; the failing point is
        named in a note on the exception.

    Notes
    -----
    The results never depend on the executor: each point's random stream depends only on
    ``seed`` and the point's index, and rows are sorted by index.  Work goes to processes in
    batches of consecutive points (at most 256; about 16 per worker).  KeyboardInterrupt
    (Ctrl-C, or "interrupt kernel" in Jupyter) cancels what has not started and returns the
    rows that finished, with ``df.attrs["complete"] = False``.

    Examples
    --------
    >>> import freeladder as fl
    >>> df = fl.sweep(lambda a, b: {"sum": a + b}, {"a": [1, 2], "b": [10, 20]}, progress=False)
    >>> df["sum"].tolist(), df.attrs["complete"]
    ([11, 21, 12, 22], True)
    """
    from tqdm.auto import tqdm

    if not callable(function):
        raise ValueError(f"function must be callable, got {type(function).__name__}")
    keys, points, labels = _points(grid, repeat)
    keyword = _random_keyword(function, keys)
    streams: list[np.random.SeedSequence | None]
    entropy: Any = None
    if keyword is not None or seed is not None:
        root = seed if isinstance(seed, np.random.SeedSequence) else np.random.SeedSequence(seed)
        entropy = root.entropy
        streams = [
            np.random.SeedSequence(entropy, spawn_key=(*root.spawn_key, i))
            for i in range(len(points))
        ]
    else:
        streams = [None] * len(points)
    items = [(i, p, s) for i, (p, s) in enumerate(zip(points, streams, strict=True))]
    start = time.perf_counter()
    done: dict[int, Any] = {}
    complete = True
    bar = tqdm(total=len(points), disable=not progress, desc="sweep")
    try:
        if executor is None:
            described = "in-process"
            try:
                for item in items:
                    done.update(_call_batch(function, [item], keyword))
                    bar.update(1)
            except KeyboardInterrupt:
                complete = False
        elif _is_dask_client(executor) or isinstance(executor, str) and ":" in executor:
            described, complete = _run_dask(executor, function, items, keyword, done, bar)
        elif executor == "processes" or isinstance(executor, cf.Executor):
            described, complete = _run_pool(executor, function, items, keyword, done, bar)
        else:
            raise ValueError(
                "executor must be None, 'processes', a concurrent.futures.Executor, a "
                f"distributed.Client or a scheduler address, not {executor!r}"
            )
    finally:
        bar.close()
    df = _columns(keys, done, points, labels)
    df.attrs.update(
        complete=complete,
        points=len(points),
        seed=entropy,
        executor=described,
        seconds=time.perf_counter() - start,
    )
    return df


def _collect(futures: Iterator[Any], done: dict[int, Any], bar: Any) -> None:
    """Store each finished batch; an exception in a batch propagates (it names its point)."""
    for fut in futures:
        results = fut.result()
        done.update(results)
        bar.update(len(results))


def _run_pool(
    executor: Any,
    function: Callable[..., Any],
    items: list[Any],
    keyword: str | None,
    done: dict[int, Any],
    bar: Any,
) -> tuple[str, bool]:
    own = executor == "processes"
    if own:
        methods = multiprocessing.get_all_start_methods()
        ctx = multiprocessing.get_context("forkserver" if "forkserver" in methods else "spawn")
        workers = os.cpu_count() or 1
        pool: cf.Executor = cf.ProcessPoolExecutor(max_workers=workers, mp_context=ctx)
    else:
        pool = executor
        workers = getattr(executor, "_max_workers", os.cpu_count() or 1)
    futures: list[cf.Future[Any]] = []
    complete = True
    try:
        for b in _batches(items, workers):
            futures.append(pool.submit(_call_batch, function, b, keyword))
        _collect(cf.as_completed(futures), done, bar)
    except KeyboardInterrupt:
        complete = False
    finally:
        for f in futures:
            f.cancel()
        if own:
            pool.shutdown(wait=True, cancel_futures=True)
    return (f"local process pool ({workers} workers)" if own else type(pool).__name__), complete


def _run_dask(
    executor: Any,
    function: Callable[..., Any],
    items: list[Any],
    keyword: str | None,
    done: dict[int, Any],
    bar: Any,
) -> tuple[str, bool]:
    try:
        from distributed import Client, as_completed
    except ImportError as err:  # pragma: no cover - depends on the installation
        raise ImportError(
            "a dask executor needs dask.distributed: pip install 'freeladder[dist]'"
        ) from err
    own = isinstance(executor, str)
    client = Client(executor) if own else executor
    complete = True
    futures: list[Any] = []
    try:
        workers = max(1, len(client.scheduler_info().get("workers", {})))
        batches = _batches(items, workers)
        futures = [client.submit(_call_batch, function, b, keyword, pure=False) for b in batches]
        try:
            _collect(iter(as_completed(futures)), done, bar)
        except KeyboardInterrupt:
            complete = False
        described = f"dask.distributed ({client.scheduler.address}, {workers} workers)"
    finally:
        pending = [f for f in futures if not f.done()]
        if pending:
            client.cancel(pending)
        if own:
            client.close()
    return described, complete
