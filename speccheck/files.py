"""The one place that opens files: bounded reads of what the tool checks, atomic writes of
what it is asked to write, and the rules that keep both inside the project.

Every module that reads a build file, a parts file, the project file or a baseline, and every
command that writes a report, a deck, a baseline or a changed plan, goes through here.

Reads: only regular files. The type is looked at before the file is opened (a FIFO, a device
or a folder is never opened, so it can neither block nor have a side effect), the file is then
opened non-blocking and looked at again (it may have been swapped in between), and at most
`limit + 1` bytes are read, so a huge or endless file costs no more than the limit.

Writes: a temporary file in the same folder, flushed to disk, then renamed over the target, so a
reader sees the old file or the new one, never half of one. An existing file (or a symbolic
link, even a dangling one) is replaced only when the caller says `force`, and then the link
itself is replaced: a link is never followed to create a file somewhere else.
"""

from __future__ import annotations

import contextlib
import os
import stat
from pathlib import Path

_READ_FLAGS = os.O_RDONLY | getattr(os, "O_NONBLOCK", 0) | getattr(os, "O_NOCTTY", 0)


class FileTrouble(Exception):
    """A file could not be read or written; the message is fit to show the user."""


def _kind_of(mode: int) -> str | None:
    """Why a file of this mode is not read, or None for a regular file."""
    if stat.S_ISREG(mode):
        return None
    if stat.S_ISDIR(mode):
        return "is a folder, not a file"
    if stat.S_ISFIFO(mode):
        return "is a named pipe, not a regular file"
    if stat.S_ISCHR(mode) or stat.S_ISBLK(mode):
        return "is a device, not a regular file"
    if stat.S_ISSOCK(mode):
        return "is a socket, not a regular file"
    return "is not a regular file"


def not_regular(path: str | Path) -> str | None:
    """Why `path` will not be read (not a regular file, or cannot be looked at), or None.

    Looks at the file's type only (stat, following links); never opens it."""
    try:
        return _kind_of(os.stat(path).st_mode)
    except OSError as exc:
        return f"cannot be read: {exc.strerror}"


def read_bytes_bounded(path: str | Path, limit: int) -> bytes:
    """Read a regular file of at most `limit` bytes; refuse anything larger or not a regular file."""
    return _read(path, limit, whole=True)


def read_head(path: str | Path, size: int) -> bytes:
    """The first `size` bytes of a regular file (for telling a build file from other YAML)."""
    return _read(path, size, whole=False)


def _read(path: str | Path, limit: int, whole: bool) -> bytes:
    why = not_regular(path)
    if why:
        raise FileTrouble(why)
    try:
        fd = os.open(path, _READ_FLAGS)
    except OSError as exc:
        raise FileTrouble(f"cannot be read: {exc.strerror}") from None
    try:
        why = _kind_of(os.fstat(fd).st_mode)  # swapped for something else since the look above?
        if why:
            raise FileTrouble(why)
        chunks, left = [], limit + 1 if whole else limit
        while left > 0:
            chunk = os.read(fd, min(left, 1 << 20))
            if not chunk:
                break
            chunks.append(chunk)
            left -= len(chunk)
        data = b"".join(chunks)
    except BlockingIOError:
        raise FileTrouble("is not ready to be read") from None
    except OSError as exc:
        raise FileTrouble(f"cannot be read: {exc.strerror}") from None
    finally:
        os.close(fd)
    if whole and len(data) > limit:
        raise FileTrouble(f"is larger than {limit // 1000} kB")
    return data


# ---- staying inside the project -------------------------------------------------------------

def inside(path: str | Path, root: str | Path) -> bool:
    """Whether `path`, with every symbolic link on the way resolved, lies in the folder `root`.

    Works the same whether or not the file exists, so the answer reveals nothing about files
    outside the root."""
    real = Path(os.path.realpath(path))
    base = Path(os.path.realpath(root))
    return real == base or base in real.parents


def confined(entry: str, base_dir: str | Path, root: str | Path,
             written_in: str = "the build file") -> tuple[Path | None, str]:
    """The file a relative `entry` (as written in a build or project file) names from `base_dir`,
    if it stays inside `root` -> (path, ""), else (None, why). `why` speaks of the entry as
    written only."""
    if not entry.strip():
        return None, "is empty"
    if "\x00" in entry:
        return None, "holds a NUL character"
    if os.path.isabs(entry) or entry.startswith(("~", "\\")) or (len(entry) > 1 and entry[1] == ":"):
        return None, f"is an absolute path; name a file relative to {written_in}, inside the project"
    target = Path(base_dir) / entry
    if not inside(target, root):
        return None, "leads outside the project folder (through '..' or a link); keep the file inside it"
    return target, ""


# ---- writing --------------------------------------------------------------------------------

def same_file(a: str | Path, b: str | Path) -> bool:
    """Whether two paths name the same file (after links); False when either does not exist."""
    try:
        return os.path.samefile(a, b)
    except OSError:
        return os.path.realpath(a) == os.path.realpath(b)


def write_atomic(path: str | Path, text: str, *, force: bool = False, mode: int | None = None) -> None:
    """Write `text` to `path` through a temporary file in the same folder, then rename.

    An existing file is replaced only with `force`; a symlink is never followed to create a file.
    `mode` sets the permission bits (a rewritten plan keeps its own); by default as any new file."""
    path = Path(path)
    if path.is_symlink() and not force:
        raise FileTrouble("is a symbolic link; add --force to replace the link itself")
    if path.exists() and not force:
        raise FileTrouble("exists; add --force to overwrite it")
    if path.is_dir() and not path.is_symlink():
        raise FileTrouble("is a folder")
    import tempfile  # only a writing command needs it; a plain check must not start slower

    folder = path.parent if str(path.parent) else Path(".")
    try:
        fd, tmp = tempfile.mkstemp(prefix=f".{path.name}.", suffix=".tmp", dir=folder)
    except OSError as exc:
        raise FileTrouble(f"cannot be written: {exc.strerror}") from None
    try:
        with os.fdopen(fd, "w", encoding="utf-8", newline="") as fh:
            fh.write(text)
            fh.flush()
            os.fsync(fh.fileno())
        os.chmod(tmp, mode if mode is not None else 0o666 & ~_umask())  # mkstemp makes 0600
        os.replace(tmp, path)
    except OSError as exc:
        with contextlib.suppress(OSError):
            os.unlink(tmp)
        raise FileTrouble(f"cannot be written: {exc.strerror}") from None


def _umask() -> int:
    mask = os.umask(0o022)
    os.umask(mask)
    return mask
