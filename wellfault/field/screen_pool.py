"""Field screening, the run loop: serial, process pool or Dask, in chunks, with progress."""

from __future__ import annotations

import math
import os
import sys
import warnings
from collections.abc import Callable, Iterable, Iterator
from concurrent.futures import FIRST_COMPLETED, ProcessPoolExecutor, wait

from ..errors import WellfaultWarning
from .screen_well import _Config, _run_one

# ------------------------------------------------------------------------------- worker side
_WORKER_CFG: _Config | None = None


def _init_worker(cfg: _Config) -> None:
    global _WORKER_CFG
    _WORKER_CFG = cfg
    warnings.simplefilter("ignore", DeprecationWarning)


def _pool_items(kind: str, items: list) -> list[dict]:
    """Entry point in a pool worker (the settings came once, with the initializer)."""
    return _run_items(_WORKER_CFG, kind, items)


def _run_items(cfg: _Config, kind: str, items: list) -> list[dict]:
    """Screen a chunk of wells: one outcome dict per (task, extra) item, never raising."""
    return [_run_one(cfg, kind, task, extra) for task, extra in items]


# ------------------------------------------------------------------------------- runners
def _chunks(items: Iterable, size: int) -> Iterator[list]:
    chunk: list = []
    for it in items:
        chunk.append(it)
        if len(chunk) >= size:
            yield chunk
            chunk = []
    if chunk:
        yield chunk


def _mp_context():
    """Start method of the worker processes.

    ``fork`` where it is the platform's safe default (Linux, Python < 3.14) and this process
    runs no other Python thread: workers start in milliseconds and scripts need no
    ``if __name__ == "__main__"`` guard. Otherwise ``forkserver`` (POSIX, the server preloads
    this module) or ``spawn``, which need that guard in scripts.
    """
    import multiprocessing as mp
    import threading

    methods = mp.get_all_start_methods()
    if sys.platform.startswith("linux") and sys.version_info < (3, 14) and "fork" in methods \
            and threading.active_count() == 1:
        return mp.get_context("fork")
    if "forkserver" in methods:
        ctx = mp.get_context("forkserver")
        ctx.set_forkserver_preload(["wellfault.field.screen"])
        return ctx
    return mp.get_context("spawn")


def _noop() -> int:
    return os.getpid()


class _NoBar:
    def __enter__(self):
        return self

    def __exit__(self, *exc):
        return False

    def update(self, n: int) -> None:
        pass


class _Runner:
    """Serial, process-pool or Dask execution of chunks of wells, with a progress bar."""

    def __init__(self, cfg: _Config, *, workers: int, client, chunk_size: int | None,
                 progress: bool) -> None:
        self.cfg = cfg
        self.workers = max(1, int(workers))
        self.client = client
        self.chunk_size = chunk_size
        self.progress = progress
        self._pool: ProcessPoolExecutor | None = None
        self._cfg_future = None
        if client is not None:
            self.kind = "dask"
        elif self.workers > 1:
            self.kind = f"process pool, {self.workers} workers"
        else:
            self.kind = "serial"

    def __enter__(self):
        return self

    def __exit__(self, *exc):
        self.close()

    def close(self):
        if self._pool is not None:
            self._pool.shutdown(wait=True, cancel_futures=True)
            self._pool = None

    def _size(self, total: int, slots: int) -> int:
        if self.chunk_size:
            return max(1, int(self.chunk_size))
        return max(1, min(256, math.ceil(total / max(1, slots * 8))))

    def _bar(self, total: int, desc: str):
        if not self.progress:
            return _NoBar()
        from tqdm.auto import tqdm

        class _Bar(tqdm):
            monitor_interval = 0  # no monitor thread: keeps forking worker processes safe

        return _Bar(total=total, desc=desc, unit="well", file=sys.stderr, mininterval=0.5,
                    leave=False)

    def run(self, kind: str, items: Iterable, total: int, desc: str,
            handle: Callable[[dict], None]) -> None:
        if total == 0:
            return
        pool = self.client is None and self.workers > 1 and total > 1
        if pool and self._pool is None:
            pool = self._start_pool()
        with self._bar(total, desc) as bar:
            def take(outs):
                for o in outs:
                    handle(o)
                bar.update(len(outs))

            if self.client is not None:
                self._run_dask(kind, items, total, take)
            elif pool:
                self._run_pool(kind, items, total, take)
            else:
                for chunk in _chunks(items, self._size(total, 1)):
                    take(_run_items(self.cfg, kind, chunk))

    def _failed_chunk(self, kind, chunk, err) -> list[dict]:
        return [{"p": kind, "i": t.index, "e": [t.las or t.tops or "", type(err).__name__,
                                                 f"internal error: {type(err).__name__}: the "
                                                 f"worker screening this well failed ({err})"],
                 "w": [], "n": 0, "s": 0.0} for t, _x in chunk]

    def _run_pool(self, kind, items, total, take):
        from concurrent.futures.process import BrokenProcessPool

        size = self._size(total, self.workers)
        source = _chunks(items, size)
        retry: list[list] = []
        inflight: dict = {}
        limit = 2 * self.workers
        exhausted = False
        while True:
            while len(inflight) < limit and (retry or not exhausted):
                if retry:
                    chunk = retry.pop()
                else:
                    chunk = next(source, None)
                    if chunk is None:
                        exhausted = True
                        break
                try:
                    inflight[self._pool.submit(_pool_items, kind, chunk)] = chunk
                except BrokenProcessPool:
                    self._restart()
                    retry.append(chunk)
            if not inflight:
                break
            done, _ = wait(list(inflight), return_when=FIRST_COMPLETED)
            broken = False
            for fut in done:
                chunk = inflight.pop(fut)
                try:
                    take(fut.result())
                except Exception as err:  # noqa: BLE001 - a worker died: isolate the well
                    broken = broken or isinstance(err, BrokenProcessPool)
                    if len(chunk) > 1:
                        retry.extend([[it] for it in chunk])
                    else:
                        take(self._failed_chunk(kind, chunk, err))
            if broken:
                for fut, chunk in list(inflight.items()):
                    retry.extend([[it] for it in chunk])
                inflight.clear()
                self._restart()

    def _start_pool(self) -> bool:
        """Start the worker processes now (all of them); False, with a warning, when they
        cannot start (then the wells run in this process)."""
        from concurrent.futures.process import BrokenProcessPool

        self._pool = ProcessPoolExecutor(self.workers, mp_context=_mp_context(),
                                         initializer=_init_worker, initargs=(self.cfg,))
        try:
            for fut in [self._pool.submit(_noop) for _ in range(self.workers)]:
                fut.result()
        except (BrokenProcessPool, OSError, RuntimeError) as err:
            self._pool.shutdown(wait=False, cancel_futures=True)
            self._pool = None
            self.workers = 1
            self.kind = "serial (worker processes could not start)"
            warnings.warn(
                f"worker processes could not start ({type(err).__name__}); screening in this "
                "process. In a script, put the call under `if __name__ == \"__main__\":`",
                WellfaultWarning, stacklevel=4)
            return False
        return True

    def _restart(self):
        if self._pool is not None:
            self._pool.shutdown(wait=False, cancel_futures=True)
        if not self._start_pool():
            raise RuntimeError("the worker processes died and could not be restarted")

    def _run_dask(self, kind, items, total, take):
        from distributed import as_completed

        client = self.client
        if self._cfg_future is None:
            self._cfg_future = client.scatter(self.cfg, broadcast=True, hash=False)
        slots = max(1, sum(client.nthreads().values()))
        size = self._size(total, slots)
        source = _chunks(items, size)
        chunks: dict = {}
        ac = as_completed()
        for _ in range(2 * slots):
            chunk = next(source, None)
            if chunk is None:
                break
            fut = client.submit(_run_items, self._cfg_future, kind, chunk, pure=False)
            chunks[fut.key] = chunk
            ac.add(fut)
        for fut in ac:
            chunk = chunks.pop(fut.key)
            try:
                take(fut.result())
            except Exception as err:  # noqa: BLE001 - a worker died: isolate the well
                if len(chunk) > 1:
                    for it in chunk:
                        f2 = client.submit(_run_items, self._cfg_future, kind, [it], pure=False)
                        chunks[f2.key] = [it]
                        ac.add(f2)
                else:
                    take(self._failed_chunk(kind, chunk, err))
            nxt = next(source, None)
            if nxt is not None:
                f3 = client.submit(_run_items, self._cfg_future, kind, nxt, pure=False)
                chunks[f3.key] = nxt
                ac.add(f3)
