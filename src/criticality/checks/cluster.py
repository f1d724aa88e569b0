"""Work spread over a dask cluster, with the serial run as the reference.

Pipeline place: sweeps, Hopf curves, batch analyses -> **tasks on a dask
cluster** -> the same results as the serial run.

``scheduler=`` accepts a ``dask.distributed.Client`` or the address of a
scheduler (``"tcp://host:8786"``); each task is a module-level function with
picklable arguments (model text, generated source text, numpy arrays), so it
compiles what it needs on the worker.  dask is an optional extra:
``pip install 'criticality[cluster]'``; without ``scheduler=`` nothing here
is imported.
"""

from __future__ import annotations

from typing import Any, Callable, Sequence

from ..errors import MissingExtraError, ParameterError

__all__ = ["map_tasks", "client_for"]


def client_for(scheduler: Any) -> Any:
    """``(client, owned)`` for a Client or an address (``owned``: close it after)."""
    if hasattr(scheduler, "submit") and hasattr(scheduler, "gather"):
        return scheduler, False
    if not isinstance(scheduler, str):
        raise ParameterError(f"scheduler must be a dask.distributed Client or a scheduler "
                             f"address such as 'tcp://127.0.0.1:8786', got "
                             f"{type(scheduler).__name__}")
    try:
        from dask.distributed import Client
    except ImportError as exc:
        raise MissingExtraError("scheduler= needs dask.distributed; install it with: "
                                "pip install 'criticality[cluster]'") from exc
    try:
        return Client(scheduler, timeout=30), True
    except (OSError, TimeoutError) as exc:
        raise ParameterError(f"cannot reach the dask scheduler at {scheduler!r}: {exc}") from exc


def map_tasks(scheduler: Any, fn: Callable, items: Sequence[tuple]) -> list:
    """``[fn(*item) for item in items]``, each call a task on the cluster, in order."""
    client, owned = client_for(scheduler)
    try:
        futures = [client.submit(fn, *item, pure=False) for item in items]
        return client.gather(futures)
    finally:
        if owned:
            client.close()
