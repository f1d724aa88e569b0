"""Atomic file output shared by the plotting and checking front ends.

A file is written to a temporary name in the target directory and moved into
place with :func:`os.replace`, so a reader never sees half a file; an existing
file is kept unless ``force`` is set (then
:class:`~criticality.errors.OutputExistsError` is not raised).
"""

from __future__ import annotations

import os
import secrets

from .errors import OutputError, OutputExistsError

__all__ = ["write_bytes_atomic", "write_text_atomic", "check_writable"]


def check_writable(path: str, force: bool) -> str:
    """Raise :class:`OutputExistsError` if ``path`` exists and ``force`` is False."""
    path = os.fspath(path)
    if os.path.exists(path) and not force:
        raise OutputExistsError(f"{path} exists; pass force=True (--force on the command line) "
                                "to overwrite it")
    folder = os.path.dirname(os.path.abspath(path))
    if not os.path.isdir(folder):
        raise OutputError(f"cannot write {path}: the folder {folder} does not exist")
    return path


def write_bytes_atomic(path, data: bytes, *, force: bool = False) -> str:
    """Write ``data`` to ``path`` atomically; returns the path."""
    path = check_writable(os.fspath(path), force)
    folder = os.path.dirname(os.path.abspath(path))
    tmp = os.path.join(folder, f".{os.path.basename(path)}.{secrets.token_hex(6)}.tmp")
    try:
        with open(tmp, "xb") as handle:
            handle.write(data)
        os.replace(tmp, path)
    except BaseException:
        if os.path.exists(tmp):
            os.unlink(tmp)
        raise
    return path


def write_text_atomic(path, text: str, *, force: bool = False) -> str:
    """Write ``text`` (UTF-8) to ``path`` atomically; returns the path."""
    return write_bytes_atomic(path, text.encode("utf-8"), force=force)
