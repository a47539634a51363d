"""Atomic file writes: a reader sees the old file or the new one, never half of one.

The new content goes to a temporary file in the destination's folder (same
file system, so the rename is atomic), is flushed and fsync'ed, and then
``os.replace`` swaps it in.  A crash or a kill before the swap leaves the old
file untouched (and at worst a stray ``.NAME.*.tmp`` file beside it).
"""

from __future__ import annotations

import contextlib
import os
import tempfile
from pathlib import Path

from solver.errors import FileFormatError


@contextlib.contextmanager
def atomic_open(path, mode: str = "w", encoding: str | None = "utf-8", newline=None):
    """Open a temporary file that replaces ``path`` when the block ends cleanly.

    ``mode`` is "w" (text) or "wb" (bytes).  If the block raises, the
    temporary file is removed and ``path`` is left exactly as it was.
    """
    if mode not in ("w", "wb"):
        raise ValueError(f"atomic_open writes whole files; mode must be 'w' or 'wb', got {mode!r}")
    path = Path(path)
    folder = path.parent if str(path.parent) else Path(".")
    if not folder.is_dir():
        raise FileFormatError(f"cannot write {path}: the folder {folder} does not exist")
    try:
        handle, temporary = tempfile.mkstemp(dir=folder, prefix=f".{path.name}.", suffix=".tmp")
    except OSError as exc:
        raise FileFormatError(f"cannot write in {folder}: {exc.strerror}") from None
    try:
        kwargs = {} if "b" in mode else {"encoding": encoding, "newline": newline}
        with os.fdopen(handle, mode, **kwargs) as stream:
            yield stream
            stream.flush()
            os.fsync(stream.fileno())
        os.chmod(temporary, _mode_for(path))
        os.replace(temporary, path)
    except BaseException:
        with contextlib.suppress(OSError):
            os.unlink(temporary)
        raise
    _sync_folder(folder)


def atomic_write_bytes(path, data: bytes) -> None:
    with atomic_open(path, "wb") as stream:
        stream.write(data)


def atomic_write_text(path, text: str, encoding: str = "utf-8") -> None:
    with atomic_open(path, "w", encoding=encoding, newline="") as stream:
        stream.write(text)


def _mode_for(path: Path) -> int:
    """Keep an existing file's permissions; a new file gets the usual 0666 & ~umask."""
    try:
        return os.stat(path).st_mode & 0o7777
    except OSError:
        umask = os.umask(0)
        os.umask(umask)
        return 0o666 & ~umask


def _sync_folder(folder: Path) -> None:
    """Make the rename itself durable (POSIX); harmless where unsupported."""
    if not hasattr(os, "O_DIRECTORY"):
        return
    try:
        fd = os.open(folder, os.O_RDONLY | os.O_DIRECTORY)
    except OSError:
        return
    try:
        os.fsync(fd)
    except OSError:
        pass
    finally:
        os.close(fd)
