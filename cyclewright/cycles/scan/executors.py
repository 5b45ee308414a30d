"""Where the chunks of a scan run: a local process pool or a Dask distributed cluster.

Inside
------
- :class:`LocalExecutor` -- a pool of worker processes on this machine (all
  cores by default); one worker, or one task, runs in the calling process
  unless the work is long (``isolate``: then in one worker process, so the
  caller answers a stop signal within a second).
- :class:`DaskExecutor` -- the same tasks on a Dask distributed cluster,
  given the scheduler's address (optional extra ``cluster``). A scheduler
  that cannot be reached within the timeout raises
  :class:`~cyclewright.cycles.errors.InputError` with one line.
- :func:`make_executor` -- by name (``"local"`` or ``"dask"``).

Both expose ``map_unordered(fn, tasks)``: the results as they complete, with
a bounded number of tasks in flight (memory does not grow with the number of
tasks), and ``close()``. The functions and tasks must be picklable; the scan
sends small tuples and gets back plain data.

Workers and their parent
------------------------
Local workers ignore stop signals (the parent answers them and ends the
pool) and never outlive the parent. On Linux the kernel kills a worker the
moment its parent ends (``PR_SET_PDEATHSIG``). Everywhere, and on Linux as
a second line, a watch thread in each worker ends it within
:data:`PARENT_POLL` seconds (0.25 s): it waits on the read end of a pipe
whose only write end the parent holds, so the parent's end -- kill -9
included -- shows at once as end of file, and it also checks that
``getppid`` has not changed. ``CYCLEWRIGHT_PDEATHSIG=0`` leaves the Linux
kernel mechanism out, so that tests exercise the watch thread alone.
"""

from __future__ import annotations

import gc
import multiprocessing
import os
import select
import signal
import socket
import sys
import threading
import time
from collections.abc import Callable, Iterable, Iterator
from concurrent.futures import FIRST_COMPLETED, ProcessPoolExecutor, wait
from urllib.parse import urlsplit

from ..errors import InputError, Name
from ..limits import check_workers, wait_seconds
from ..stopping import STOP_SIGNALS, check_interrupt
from .store import _stderr_notice

__all__ = [
    "LocalExecutor",
    "DaskExecutor",
    "make_executor",
    "DEFAULT_DASK_TIMEOUT",
    "DEFAULT_WORKER_WAIT",
    "ClusterError",
    "PARENT_POLL",
]


def _block_stop_signals():
    if not hasattr(signal, "pthread_sigmask"):
        return None
    return signal.pthread_sigmask(signal.SIG_BLOCK, STOP_SIGNALS)


def _restore_signals(old) -> None:
    if old is not None:
        signal.pthread_sigmask(signal.SIG_SETMASK, old)


#: Seconds between two looks of a worker's watch thread at its parent (the
#: bound on how long a worker outlives its parent where the kernel does not
#: end it at once: any platform but Linux, or ``CYCLEWRIGHT_PDEATHSIG=0``).
PARENT_POLL = 0.25


def _pdeathsig_wanted() -> bool:
    """Linux, unless ``CYCLEWRIGHT_PDEATHSIG=0`` (which leaves the watch thread alone, for tests)."""
    return sys.platform.startswith("linux") and os.environ.get("CYCLEWRIGHT_PDEATHSIG") != "0"


def _parent_gone(parent: int, lifeline: int | None, timeout: float) -> bool:
    """Wait up to ``timeout`` s; True once the parent has ended.

    The parent holds the write end of the ``lifeline`` pipe: when it ends,
    for whatever reason (kill -9 included), the read end sees end of file at
    once. ``getppid`` changing (the worker was adopted) is the second sign.
    """
    if lifeline is not None:
        try:
            ready, _, _ = select.select([lifeline], [], [], timeout)
            if ready and os.read(lifeline, 1) == b"":
                return True
        except (OSError, ValueError):  # no select on pipes here: poll alone
            lifeline = None
    if lifeline is None:
        time.sleep(timeout)
    return os.getppid() != parent


def _parent_watch(parent: int, lifeline: int | None) -> None:
    """End this worker within :data:`PARENT_POLL` seconds of its parent's end.

    The thread spends its time in ``select``/``sleep`` without the GIL and
    the scan's kernels run without it too (``nogil``), so it is not held up
    by the chunk being computed.
    """
    while not _parent_gone(parent, lifeline, PARENT_POLL):
        pass
    os._exit(1)


def _worker_setup(parent: int, lifeline: tuple[int, int] | None = None) -> None:
    """In each worker: leave stop signals to the parent, and end when the parent is gone.

    On Linux the kernel ends the worker the moment its parent ends
    (``PR_SET_PDEATHSIG``); everywhere a watch thread also ends it within
    :data:`PARENT_POLL` seconds, woken by the end of file of the parent's
    ``lifeline`` pipe (or by ``getppid`` changing).
    """
    signal.signal(signal.SIGINT, signal.SIG_IGN)
    for name in ("SIGTERM", "SIGHUP"):
        if hasattr(signal, name):
            signal.signal(getattr(signal, name), signal.SIG_DFL)
    if _pdeathsig_wanted():
        try:  # the kernel ends this worker the moment its parent ends
            import ctypes

            libc = ctypes.CDLL(None, use_errno=True)
            libc.prctl(1, signal.SIGKILL, 0, 0, 0)  # PR_SET_PDEATHSIG
        except Exception:  # pragma: no cover - the watch thread below still works
            pass
    read_end = None
    if lifeline is not None:
        read_end, write_end = lifeline
        try:
            os.close(write_end)  # only the parent may hold it open
        except OSError:  # pragma: no cover - not inherited (spawned worker)
            read_end = None
    if os.getppid() != parent:  # the parent ended before this worker was set up
        os._exit(1)
    threading.Thread(target=_parent_watch, args=(parent, read_end), daemon=True).start()
    _restore_signals(set())  # unblock what the parent blocked while starting the pool


def _stop_pool(pool: ProcessPoolExecutor) -> None:
    """End the workers now (interrupt or error): nothing they compute is wanted any more."""
    procs = list((getattr(pool, "_processes", None) or {}).values())
    for p in procs:
        try:
            p.terminate()
        except Exception:  # pragma: no cover - already gone
            pass
    try:
        pool.shutdown(wait=False, cancel_futures=True)
    except Exception:  # pragma: no cover - a broken pool
        pass
    deadline = time.monotonic() + 10
    for p in procs:
        try:
            p.join(max(0.0, deadline - time.monotonic()))
            if p.is_alive():
                p.kill()
                p.join(1)
        except Exception:  # pragma: no cover - already gone
            pass


DEFAULT_DASK_TIMEOUT = 10.0
#: Seconds a Dask run waits for a cluster without workers before giving up.
DEFAULT_WORKER_WAIT = 300.0
_DASK_POLL = 1.0


class ClusterError(InputError):
    """The Dask cluster went away (scheduler lost) or stayed without workers: one line."""


def default_workers() -> int:
    """All cores of this machine."""
    return os.cpu_count() or 1


class LocalExecutor:
    """Run tasks in worker processes on this machine.

    Parameters
    ----------
    workers : int, optional
        Number of processes (default: all cores). With 1 worker, or a single
        task, everything runs in the calling process.
    prepare : callable, optional
        Called once in the parent before the pool starts (with the fork start
        method the workers inherit what it loaded, e.g. compiled kernels).
    isolate : bool
        Run even one worker's tasks in a worker process (not in the calling
        process): a long compiled call then never keeps the caller from
        answering a stop signal, which Python handles only between bytecodes.
        For work expected to take a second or more.

    Examples
    --------
    >>> ex = LocalExecutor(1)
    >>> sorted(ex.map_unordered(abs, [-2, 1, -3]))
    [1, 2, 3]
    """

    name = "local"

    def __init__(
        self,
        workers: int | None = None,
        prepare: Callable[[], None] | None = None,
        isolate: bool = False,
    ):
        if workers is not None:
            check_workers(workers)
        self.workers = int(workers) if workers is not None else default_workers()
        self.prepare = prepare
        self.isolate = isolate

    def map_unordered(self, fn: Callable, tasks: Iterable) -> Iterator:
        it = iter(tasks)
        head = [t for _, t in zip(range(2 * self.workers), it)]
        if not head:
            return
        if (self.workers == 1 or len(head) <= 1) and not self.isolate:
            if self.prepare is not None:  # compile first: an interrupt then ends it at once
                self.prepare()
                check_interrupt()
            for t in head:
                check_interrupt()
                yield fn(t)
            for t in it:
                check_interrupt()
                yield fn(t)
            return
        if self.prepare is not None:
            self.prepare()
        check_interrupt()
        methods = multiprocessing.get_all_start_methods()
        ctx = multiprocessing.get_context("fork" if "fork" in methods else None)
        n = min(self.workers, len(head))
        # The workers are started with the stop signals blocked, so none can
        # reach a worker before it has set itself up to ignore them (the
        # parent alone answers an interrupt, and ends the workers).
        pool = None
        finished = False
        # the lifeline: forked workers inherit both ends and keep the read end
        lifeline = os.pipe() if ctx.get_start_method() == "fork" else None
        old = _block_stop_signals()
        # The workers are forked: what the parent holds is shared with them page by
        # page until written. The garbage collector's passes over the inherited
        # objects would write to (and so copy) every page holding one, in every
        # worker; frozen objects are never visited, so the pages stay shared.
        gc.freeze()
        try:
            try:
                pool = ProcessPoolExecutor(
                    max_workers=n,
                    mp_context=ctx,
                    initializer=_worker_setup,
                    initargs=(os.getpid(), lifeline),
                )
                pending = {pool.submit(fn, t) for t in head}  # starts the n workers
            finally:
                gc.unfreeze()
                _restore_signals(old)  # a signal that came meanwhile is raised here
            while pending:
                check_interrupt()
                done, pending = wait(pending, timeout=0.5, return_when=FIRST_COMPLETED)
                for f in done:
                    nxt = next(it, None)
                    if nxt is not None:
                        pending.add(pool.submit(fn, nxt))
                    yield f.result()
            finished = True
        finally:
            if pool is not None:
                if finished:
                    pool.shutdown(wait=True)
                else:
                    _stop_pool(pool)
            for fd in lifeline or ():
                try:
                    os.close(fd)
                except OSError:  # pragma: no cover
                    pass

    def close(self) -> None:
        pass

    def describe(self) -> str:
        return f"local ({self.workers} worker{'s' if self.workers != 1 else ''})"


def _probe(address: str, timeout: float) -> None:
    """Fail fast, with one line, when a tcp scheduler address does not answer."""
    text = address if "://" in address else f"tcp://{address}"
    parts = urlsplit(text)
    if parts.scheme not in ("tcp", "tls"):
        return  # other transports: let the client try
    try:
        host, port = parts.hostname, parts.port
    except ValueError:
        raise InputError(f"{address!r} is not a scheduler address like tcp://HOST:PORT") from None
    if not host or not port:
        raise InputError(f"{address!r} is not a scheduler address like tcp://HOST:PORT")
    deadline = time.monotonic() + timeout
    try:
        with socket.create_connection((host, port), timeout=timeout) as sock:
            if parts.scheme == "tcp":
                # A scheduler greets every new connection at once (its comm
                # handshake); a port that accepts and stays silent is not one.
                sock.settimeout(max(0.1, deadline - time.monotonic()))
                if not sock.recv(1):
                    raise ConnectionResetError("connection closed without a greeting")
    except OSError as exc:
        if isinstance(exc, socket.timeout):
            why = "no answer"
        else:
            why = exc.strerror or str(exc)
        raise InputError(
            f"cannot reach the Dask scheduler at {address} ({why}, timeout {timeout:g} s)"
        ) from None


class DaskExecutor:
    """Run tasks on a Dask distributed cluster.

    Parameters
    ----------
    address : str
        The scheduler, e.g. ``tcp://10.0.0.5:8786``.
    timeout : float
        Seconds to wait for the scheduler before giving up.
    window : int, optional
        Tasks in flight at once (default: twice the cluster's threads, at least 4).
    worker_wait : float, optional
        Seconds to wait, with a message, while the cluster has no workers;
        then :class:`ClusterError`. Default: ``$CYCLEWRIGHT_WORKER_WAIT`` or
        :data:`DEFAULT_WORKER_WAIT`.
    notice : callable, optional
        Receives one-line messages (default: stderr).

    A scheduler lost mid-run raises :class:`ClusterError` with one line; the
    chunks finished before are in the store.
    """

    name = "dask"

    def __init__(
        self,
        address: str,
        timeout: float = DEFAULT_DASK_TIMEOUT,
        window: int | None = None,
        worker_wait: float | None = None,
        notice: Callable[[str], None] | None = None,
    ):
        try:
            import distributed
        except ImportError:
            raise InputError(
                "the dask executor needs the optional extra 'cluster' "
                "(pip install 'cyclewright[cluster]')"
            ) from None
        if not address or not isinstance(address, str):
            raise InputError.of(
                "the dask executor needs a scheduler address (",
                Name("scheduler"),
                " tcp://HOST:PORT)",
            )
        self.address = address
        self.worker_wait = wait_seconds(
            "CYCLEWRIGHT_WORKER_WAIT", DEFAULT_WORKER_WAIT, InputError, worker_wait
        )
        self.notice = notice or _stderr_notice
        _probe(address, timeout)
        try:
            self.client = distributed.Client(address, timeout=f"{timeout}s", set_as_default=False)
        except (OSError, TimeoutError, ValueError) as exc:
            msg = " ".join(str(exc).split())
            raise InputError(f"cannot reach the Dask scheduler at {address}: {msg}") from None
        self._distributed = distributed
        if window is None:
            try:
                threads = sum(self.client.nthreads().values())
            except Exception:  # pragma: no cover - defensive
                threads = 2
            window = max(4, 2 * threads)
        self.window = window

    def _workers(self) -> int | None:
        try:
            return len(self.client.scheduler_info().get("workers", {}))
        except Exception:  # the scheduler itself is gone: the next result says so
            return None

    def _lost(self, exc: BaseException) -> ClusterError:
        why = " ".join(str(exc).split()) or type(exc).__name__
        return ClusterError(
            f"lost the Dask scheduler at {self.address} ({type(exc).__name__}: {why}); "
            "every chunk finished before is kept in the store, re-run to resume"
        )

    def map_unordered(self, fn: Callable, tasks: Iterable) -> Iterator:
        import asyncio
        import concurrent.futures as cf

        it = iter(tasks)
        live = [self.client.submit(fn, t, pure=False) for _, t in zip(range(self.window), it)]
        if not live:
            return
        pending = set(live)
        lonely_since = None
        quiet = 0.0
        lost = (cf.CancelledError, asyncio.CancelledError, OSError, EOFError)
        try:
            while pending:
                check_interrupt()
                done = {f for f in pending if f.done()}
                if not done:
                    if self.client.status in ("closing", "closed"):
                        raise self._lost(ConnectionError("the client was disconnected"))
                    time.sleep(0.05)
                    quiet += 0.05
                    if quiet < _DASK_POLL:
                        continue
                quiet = 0.0
                pending -= done
                if not done:
                    n = self._workers()
                    now = time.monotonic()
                    if n == 0:
                        if lonely_since is None:
                            lonely_since = now
                            self.notice(
                                f"the Dask cluster at {self.address} has no workers; waiting up "
                                f"to {self.worker_wait:g} s for one"
                            )
                        elif now - lonely_since > self.worker_wait:
                            raise ClusterError(
                                f"the Dask cluster at {self.address} had no workers for "
                                f"{self.worker_wait:g} s; every chunk finished before is kept in "
                                "the store, re-run to resume"
                            )
                    else:
                        lonely_since = None
                    continue
                for fut in done:
                    try:
                        result = fut.result()
                    except lost as exc:
                        raise self._lost(exc) from None
                    except Exception as exc:
                        if type(exc).__name__ in ("FutureCancelledError", "CommClosedError"):
                            raise self._lost(exc) from None
                        raise
                    live.remove(fut)
                    nxt = next(it, None)
                    if nxt is not None:
                        new = self.client.submit(fn, nxt, pure=False)
                        live.append(new)
                        pending.add(new)
                    yield result
        finally:
            for fut in live:
                try:
                    fut.cancel()
                except Exception:  # pragma: no cover - the scheduler is gone
                    pass

    def close(self) -> None:
        try:
            self.client.close()
        except Exception:  # pragma: no cover - closing is best effort
            pass

    def describe(self) -> str:
        return f"dask ({self.address})"


def make_executor(
    name: str,
    *,
    workers: int | None = None,
    scheduler: str | None = None,
    timeout: float = DEFAULT_DASK_TIMEOUT,
    prepare: Callable[[], None] | None = None,
    isolate: bool = False,
):
    """``"local"`` -> :class:`LocalExecutor` (``isolate``: see there); ``"dask"`` -> :class:`DaskExecutor` (needs ``scheduler``).

    >>> make_executor("local", workers=2).describe()
    'local (2 workers)'
    """
    if name == "local":
        if scheduler:
            raise InputError.of(
                Name("scheduler"),
                " applies to the dask executor only (use ",
                Name("executor"),
                " dask)",
            )
        return LocalExecutor(workers, prepare, isolate)
    if name == "dask":
        if not scheduler:
            raise InputError.of(
                "the dask executor needs ",
                Name("scheduler"),
                " ADDRESS (e.g. tcp://127.0.0.1:8786)",
            )
        return DaskExecutor(scheduler, timeout)
    raise InputError(f"unknown executor {name!r}: use 'local' or 'dask'")
