"""The one place that opens files: bounded reads of what the tool checks, atomic writes of
what it is asked to write.

Every module that reads a build file, a parts file, the project file or a baseline, and every
command that writes a report, a deck, a baseline or a changed plan, goes through here.
"""

from __future__ import annotations

import os
import tempfile
from pathlib import Path


class FileTrouble(Exception):
    """A file could not be read or written; the message is fit to show the user."""


def read_bytes_bounded(path: str | Path, limit: int) -> bytes:
    """Read at most `limit` bytes of a regular file; refuse anything larger or not a regular file."""
    path = Path(path)
    try:
        fd = os.open(path, os.O_RDONLY | getattr(os, "O_NONBLOCK", 0))
    except OSError as exc:
        raise FileTrouble(f"cannot read: {exc.strerror}") from None
    try:
        import stat

        if not stat.S_ISREG(os.fstat(fd).st_mode):
            raise FileTrouble("not a regular file")
        with os.fdopen(fd, "rb", closefd=False) as fh:
            data = fh.read(limit + 1)
    except OSError as exc:
        raise FileTrouble(f"cannot read: {exc.strerror}") from None
    finally:
        os.close(fd)
    if len(data) > limit:
        raise FileTrouble(f"larger than {limit // 1000} kB")
    return data


def write_atomic(path: str | Path, text: str, *, force: bool = False) -> None:
    """Write `text` to `path` through a temporary file in the same folder, then rename.

    An existing file is replaced only with `force`; a symlink is never followed to create a file."""
    path = Path(path)
    if path.is_symlink() and not force:
        raise FileTrouble("is a symbolic link; add --force to replace the link itself")
    if path.exists() and not force:
        raise FileTrouble("exists; add --force to overwrite it")
    folder = path.parent if str(path.parent) else Path(".")
    try:
        fd, tmp = tempfile.mkstemp(prefix=f".{path.name}.", suffix=".tmp", dir=folder)
    except OSError as exc:
        raise FileTrouble(f"cannot write: {exc.strerror}") from None
    try:
        with os.fdopen(fd, "w", encoding="utf-8", newline="") as fh:
            fh.write(text)
            fh.flush()
            os.fsync(fh.fileno())
        os.replace(tmp, path)
    except OSError as exc:
        try:
            os.unlink(tmp)
        except OSError:
            pass
        raise FileTrouble(f"cannot write: {exc.strerror}") from None
