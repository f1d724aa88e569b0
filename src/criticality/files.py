"""Safe file output shared by the plotting, checking and command-line front ends.

Pipeline place: **outputs** (the last step; nothing else writes files).

Rules, whatever calls it:

* A new file is written to a temporary name in the target folder and moved
  into place with :func:`os.replace`, so a reader never sees half a file.
* An existing file is kept unless ``force`` is set
  (:class:`~criticality.errors.OutputExistsError`).  With ``force`` the new
  text replaces it *through* the name: a symbolic link stays a link and the
  file it points to is replaced, with the old file's permission bits.  A
  file with other hard links is refused (replacing it would split them).
* A file that is not a regular file is never replaced.  A character device
  (``/dev/null``, a terminal) or a named pipe with a reader is written as a
  stream, with or without ``force``; a folder, a socket, a block device, a
  pipe without a reader or a link to nothing is refused.
* :func:`write_all` writes several files all or nothing: every target is
  checked first, every text goes to a temporary file, and only then are they
  moved into place; on any failure the temporary files are removed and no
  target has changed.
* Every failure is an :class:`~criticality.errors.OutputError` (exit status 9
  on the command line) naming the path and the cause.
"""

from __future__ import annotations

import errno
import os
import secrets
import stat
from dataclasses import dataclass
from typing import Any, Mapping

from .errors import OutputError, OutputExistsError

__all__ = ["write_bytes_atomic", "write_text_atomic", "write_all", "check_writable"]


@dataclass(frozen=True)
class _Target:
    path: str      # as given
    real: str      # where the bytes go (links followed)
    kind: str      # "new", "file" or "stream"
    mode: int | None = None


def _fail(path: str, exc: OSError) -> OutputError:
    return OutputError(f"cannot write {path}: {exc.strerror or exc}")


def _target(path, force: bool) -> _Target:
    path = os.fspath(path)
    if not isinstance(path, str) or not path or "\x00" in path:
        raise OutputError(f"cannot write {path!r}: not a usable file name")
    try:
        if not os.path.lexists(path):
            folder = os.path.dirname(os.path.abspath(path))
            if not os.path.isdir(folder):
                raise OutputError(f"cannot write {path}: the folder {folder} does not exist")
            return _Target(path, path, "new")
        if not os.path.exists(path):
            raise OutputError(f"cannot write {path}: it is a symbolic link to a missing file; "
                              "remove the link or point it at a file")
        real = os.path.realpath(path)
        info = os.stat(real)
    except OSError as exc:
        raise _fail(path, exc) from None
    if stat.S_ISCHR(info.st_mode) or stat.S_ISFIFO(info.st_mode):
        return _Target(path, real, "stream")
    if stat.S_ISDIR(info.st_mode):
        raise OutputError(f"cannot write {path}: it is a folder")
    if not stat.S_ISREG(info.st_mode):
        raise OutputError(f"cannot write {path}: it is not a regular file (a socket or a block "
                          "device); it is never replaced")
    if not force:
        raise OutputExistsError(f"{path} exists; pass force=True (--force on the command line) "
                                "to overwrite it")
    if info.st_nlink > 1:
        raise OutputError(f"cannot overwrite {path}: it has {info.st_nlink - 1} other hard "
                          "link(s), which replacing it would split; remove it first or write "
                          "to another name")
    return _Target(path, real, "file", stat.S_IMODE(info.st_mode))


def check_writable(path: str | os.PathLike[str], force: bool) -> str:
    """Raise :class:`OutputError` (:class:`OutputExistsError` for an existing
    file without ``force``) unless ``path`` can be written by the rules of
    this module; returns the path."""
    return _target(path, force).path


def _temporary(target: _Target, data: bytes) -> str:
    folder = os.path.dirname(os.path.abspath(target.real))
    tmp = os.path.join(folder, f".{os.path.basename(target.real)}.{secrets.token_hex(6)}.tmp")
    try:
        with open(tmp, "xb") as handle:
            handle.write(data)
        if target.mode is not None:
            os.chmod(tmp, target.mode)
    except BaseException:
        _remove(tmp)
        raise
    return tmp


def _remove(tmp: str) -> None:
    try:
        os.unlink(tmp)
    except OSError:
        pass


def _stream(target: _Target, data: bytes) -> None:
    try:
        fd = os.open(target.real, os.O_WRONLY | os.O_NONBLOCK | getattr(os, "O_NOCTTY", 0))
    except OSError as exc:
        if exc.errno == errno.ENXIO:
            raise OutputError(f"cannot write {target.path}: it is a named pipe that nobody "
                              "reads") from None
        raise _fail(target.path, exc) from None
    try:
        os.set_blocking(fd, True)
        view = memoryview(data)
        while view:
            view = view[os.write(fd, view):]
    except OSError as exc:
        raise _fail(target.path, exc) from None
    finally:
        os.close(fd)


def write_bytes_atomic(path: str | os.PathLike[str], data: bytes, *, force: bool = False) -> str:
    """Write ``data`` to ``path`` by the rules of this module; returns the path."""
    return write_all({path: data}, force=force)[0]


def write_text_atomic(path: str | os.PathLike[str], text: str, *, force: bool = False) -> str:
    """Write ``text`` (UTF-8) to ``path`` by the rules of this module; returns the path."""
    return write_bytes_atomic(path, text.encode("utf-8"), force=force)


def write_all(items: Mapping[Any, str | bytes], *, force: bool = False) -> tuple:
    """Write several files all or nothing: ``items`` maps each path to its
    bytes (or text, written as UTF-8).  Returns the paths in order.

    Every target is checked before anything is written; a failure while
    writing the temporary files removes them and leaves every target as it
    was.  Streams (devices, pipes) are written last, after the files are in
    place.
    """
    pairs = [(_target(p, force), d.encode("utf-8") if isinstance(d, str) else bytes(d))
             for p, d in dict(items).items()]
    seen = set()
    for target, _ in pairs:
        if target.kind != "stream" and target.real in seen:
            raise OutputError(f"cannot write {target.path}: the same file is named twice")
        seen.add(target.real)
    temporaries, current = [], None
    try:
        for current, data in pairs:
            if current.kind != "stream":
                temporaries.append((_temporary(current, data), current))
        while temporaries:
            tmp, current = temporaries[0]
            os.replace(tmp, current.real)
            temporaries.pop(0)
    except OSError as exc:
        raise _fail(current.path if current else "the output", exc) from None
    finally:
        for tmp, _ in temporaries:
            _remove(tmp)
    for target, data in pairs:
        if target.kind == "stream":
            _stream(target, data)
    return tuple(t.path for t, _ in pairs)
