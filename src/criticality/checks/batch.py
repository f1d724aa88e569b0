"""The Hopf analysis of many model files: one JSON per model and a summary.

Pipeline place: model files -> **one Hopf analysis per file** (serially, or
as tasks on a dask cluster) -> JSON files + :class:`BatchSummary`.

Each task reads nothing from disk: it gets the file's text and name and
builds the model from them (so tasks pickle and any worker can run them).
A model that fails (a file error, no Hopf point, a time limit) is recorded in
the summary with its error class and message; the others go on.  Every result
is local to its Hopf point; a subcritical verdict means an abrupt, hysteretic
onset; verify before relying on a screening.
"""

from __future__ import annotations

import csv
import io
import os
from dataclasses import dataclass
from typing import Any, Mapping, Sequence

from ..errors import CriticalityError, ParameterError

__all__ = ["BatchRow", "BatchSummary", "analyse_many"]

_FIELDS = ("path", "status", "parameter", "critical_value", "omega", "l1", "classification",
           "json", "error")


@dataclass(frozen=True)
class BatchRow:
    """One model of a batch: ``status`` is ``"ok"`` or ``"failed"``."""

    path: str
    status: str
    parameter: str = ""
    critical_value: str = ""
    omega: str = ""
    l1: str = ""
    classification: str = ""
    json: str = ""
    error: str = ""


@dataclass(frozen=True)
class BatchSummary:
    """The rows of a batch analysis, in the order of the paths."""

    rows: tuple

    def __len__(self) -> int:
        return len(self.rows)

    @property
    def failed(self) -> tuple:
        return tuple(r for r in self.rows if r.status != "ok")

    def to_csv(self) -> str:
        buf = io.StringIO()
        writer = csv.writer(buf, lineterminator="\n")
        writer.writerow(_FIELDS)
        for r in self.rows:
            writer.writerow([getattr(r, f) for f in _FIELDS])
        return buf.getvalue()

    def to_pandas(self) -> Any:
        """The summary as a pandas DataFrame (needs pandas)."""
        from ..errors import MissingExtraError
        try:
            import pandas
        except ImportError as exc:
            raise MissingExtraError("to_pandas() needs pandas; install it with: "
                                    "pip install pandas") from exc
        return pandas.DataFrame([{f: getattr(r, f) for f in _FIELDS} for r in self.rows])


def _analyse_text(text: str, source: str, options: dict):
    """``(row fields, JSON text or None)`` for one model file's text (a task)."""
    from ..hopf_analysis.analysis import hopf
    from ..model import Model

    try:
        model = Model.from_text(text, source=source)
        result = hopf(model, options.get("parameter"), order=options.get("order", 3),
                      values=options.get("values"), time_limit=options.get("time_limit"))
        fields = {"status": "ok", "parameter": result.parameter,
                  "critical_value": str(result.critical_value), "omega": str(result.omega),
                  "l1": str(result.l1), "classification": str(result.classification)}
        return fields, result.to_json()
    except CriticalityError as exc:
        return {"status": "failed", "error": f"{type(exc).__name__}: {exc}"}, None
    except (ArithmeticError, ValueError, TypeError, RecursionError, MemoryError) as exc:
        return {"status": "failed",
                "error": f"{type(exc).__name__} (an internal error, please report it): {exc}"}, \
            None


def analyse_many(paths: Sequence, *, parameter: str | None = None,
                 out_dir: str | os.PathLike[str] | None = None,
                 order: int = 3, values: Mapping | None = None,
                 time_limit: float | None = None, force: bool = False,
                 scheduler: Any = None) -> BatchSummary:
    """Hopf analysis of every model file in ``paths``.

    Parameters
    ----------
    paths : sequence of path-like
        TOML model files.
    parameter : str, optional
        The bifurcation parameter (default: each file's own choice).
    out_dir : path-like, optional
        Folder for one ``<file stem>.json`` per model that succeeded and
        ``summary.csv``; nothing is written without it.
    order, values, time_limit
        As for :func:`criticality.hopf`, for every model.
    force : bool
        Overwrite existing output files.
    scheduler : dask.distributed.Client or str, optional
        Run each model as a task on a dask cluster (same results as serial).

    Returns
    -------
    BatchSummary
    """
    from ..files import check_writable, write_all

    if isinstance(paths, (str, os.PathLike)):
        paths = [paths]
    paths = [os.fspath(p) for p in paths]
    if not paths:
        raise ParameterError("analyse_many needs at least one model file")
    if out_dir is not None and not os.path.isdir(out_dir):
        raise ParameterError(f"out_dir {os.fspath(out_dir)!r} is not an existing folder")
    options = {"parameter": parameter, "order": order,
               "values": dict(values) if values else None, "time_limit": time_limit}
    items: list = []
    early: dict = {}
    for i, path in enumerate(paths):
        try:
            items.append((_read_capped(path), path, options))
        except (OSError, UnicodeDecodeError, ValueError) as exc:
            early[i] = {"status": "failed", "error": f"cannot read {path}: {exc}"}
            items.append(None)
    todo = [it for it in items if it is not None]
    if scheduler is None:
        done = [_analyse_text(*it) for it in todo]
    else:
        from .cluster import map_tasks
        done = map_tasks(scheduler, _analyse_text, todo)
    results = iter(done)
    rows, outputs = [], {}
    for i, path in enumerate(paths):
        fields, text = (early[i], None) if i in early else next(results)
        json_path = ""
        if text is not None and out_dir is not None:
            stem = os.path.splitext(os.path.basename(path))[0]
            json_path = os.path.join(os.fspath(out_dir), f"{stem}.json")
            check_writable(json_path, force)
            outputs[json_path] = text
        rows.append(BatchRow(path=path, json=json_path, **fields))
    summary = BatchSummary(tuple(rows))
    if out_dir is not None:
        outputs[os.path.join(os.fspath(out_dir), "summary.csv")] = summary.to_csv()
        write_all(outputs, force=force)  # every JSON and the summary, or none of them
    return summary


def _read_capped(path: str) -> str:
    """A model file's text: a regular file of at most the model-file size
    (a named pipe would block, a device never ends)."""
    import stat

    from ..model.toml_file import MAX_FILE_CHARS

    if not stat.S_ISREG(os.stat(path).st_mode):
        raise ValueError("not a regular file (a named pipe, a device or a folder)")
    with open(path, "rb") as handle:
        data = handle.read(4 * MAX_FILE_CHARS + 1)
    if len(data) > 4 * MAX_FILE_CHARS:
        raise ValueError(f"longer than {4 * MAX_FILE_CHARS // 1_000_000} MB")
    return data.decode("utf-8")
