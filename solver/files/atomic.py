"""Atomic file writes: a reader sees the old file or the new one, never half of one.

The new content goes to a temporary file ``.NAME.XXXX.tmp`` in the
destination's folder (same file system, so the rename is atomic), is flushed
and fsync'ed, and then ``os.replace`` swaps it in.  A crash or a kill before
the swap leaves the old file untouched.

Two guards against silent losses:

* Leftovers: a writer killed by SIGKILL cannot remove its temporary file, so
  every new write into a folder first removes ``.NAME.*.tmp`` siblings of its
  target that nobody has touched for ``STALE_SECONDS`` (a live writer's file
  is younger: its modification time moves while it writes).
* Lost updates: the caller says what it expects on disk (``file_stamp`` taken
  when it read or checked the target; by default, when the write began).
  Just before the swap, under an exclusive ``flock`` of the folder (released
  by the kernel even when the process dies), the target is stamped again; if
  another process wrote it meanwhile, nothing is replaced and
  ``FileChangedError`` says so.  Two concurrent saves to one path: the first
  wins, the second is refused, neither is lost silently.
"""

from __future__ import annotations

import contextlib
import os
import tempfile
import time
from pathlib import Path

from solver.errors import FileFormatError

try:
    import fcntl
except ImportError:  # not POSIX: no folder lock, the stamp check still runs
    fcntl = None

STALE_SECONDS = 60.0
_NOW = object()   # ``expect`` default: the target as it is when the write begins


class FileChangedError(FileFormatError):
    """The target changed on disk since it was read or checked; nothing was replaced."""


def file_stamp(path):
    """What identifies the file's current content cheaply, or None when it does not exist."""
    try:
        st = os.stat(path)
    except FileNotFoundError:
        return None
    except OSError:
        return ("unreadable",)
    return (st.st_dev, st.st_ino, st.st_size, st.st_mtime_ns)


def folder_of(path) -> Path:
    path = Path(path)
    return path.parent if str(path.parent) else Path(".")


def remove_stale_temporaries(path, older_than: float = STALE_SECONDS) -> int:
    """Delete ``.NAME.*.tmp`` beside ``path`` untouched for ``older_than`` seconds."""
    path, removed = Path(path), 0
    prefix, now = f".{path.name}.", time.time()
    try:
        entries = list(os.scandir(folder_of(path)))
    except OSError:
        return 0
    for entry in entries:
        if not (entry.name.startswith(prefix) and entry.name.endswith(".tmp")):
            continue
        with contextlib.suppress(OSError):
            if entry.is_file(follow_symlinks=False) and \
                    now - entry.stat(follow_symlinks=False).st_mtime > older_than:
                os.unlink(entry.path)
                removed += 1
    return removed


def stage(path) -> Path:
    """A new empty temporary file beside ``path`` to write into before ``commit``."""
    path = Path(path)
    folder = folder_of(path)
    if not folder.is_dir():
        raise FileFormatError(f"cannot write {path}: the folder {folder} does not exist")
    remove_stale_temporaries(path)
    try:
        handle, temporary = tempfile.mkstemp(dir=folder, prefix=f".{path.name}.", suffix=".tmp")
    except OSError as exc:
        raise FileFormatError(f"cannot write in {folder}: {exc.strerror}") from None
    os.close(handle)
    return Path(temporary)


def commit(pairs, expected=None, nonempty: bool = True) -> None:
    """Swap each staged file onto its target: all of them, or none.

    ``pairs`` is a list of (staged, target); ``expected`` maps a target to the
    ``file_stamp`` it must still have (targets not in it are not checked).
    ``nonempty``: an empty staged file means its writer failed silently.
    Staged files are removed whatever happens.
    """
    pairs = [(Path(staged), Path(target)) for staged, target in pairs]
    expected = {Path(k): v for k, v in (expected or {}).items()}
    try:
        with _folder_locks(sorted({folder_of(t) for _, t in pairs}, key=str)):
            for staged, target in pairs:
                _check_written(staged, target, nonempty)
                if target in expected and file_stamp(target) != expected[target]:
                    raise FileChangedError(
                        f"{target} was changed by another program while this one was writing "
                        f"it; nothing was replaced, so look at {target.name} and then try again")
            _replace_all(pairs)
    finally:
        for staged, _target in pairs:
            with contextlib.suppress(OSError):
                os.unlink(staged)
    for folder in {folder_of(t) for _, t in pairs}:
        _sync_folder(folder)


def _check_written(staged: Path, target: Path, nonempty: bool) -> None:
    """A writer that reported success but left nothing is a failure, said so."""
    try:
        size = os.stat(staged).st_size
    except OSError:
        size = -1
    if size < 0 or (nonempty and size == 0):
        raise FileFormatError(f"nothing was written to {target}; check that its folder is "
                              "writable and has free space")


def _replace_all(pairs) -> None:
    """os.replace each pair; if one fails, put back the targets already replaced."""
    done = []   # (target, backup or None)
    try:
        for staged, target in pairs:
            backup = None
            if os.path.lexists(target):
                backup = Path(tempfile.mktemp(dir=folder_of(target), prefix=f".{target.name}.",
                                              suffix=".tmp"))
                os.link(target, backup)
            os.chmod(staged, _mode_for(target))
            os.replace(staged, target)
            done.append((target, backup))
    except OSError as exc:
        for target, backup in reversed(done):
            with contextlib.suppress(OSError):
                if backup is None:
                    os.unlink(target)
                else:
                    os.replace(backup, target)
        raise FileFormatError(f"cannot write {pairs[len(done)][1]}: {exc.strerror or exc}; "
                              "no file was changed") from None
    finally:
        for _target, backup in done:
            if backup is not None:
                with contextlib.suppress(OSError):
                    os.unlink(backup)


@contextlib.contextmanager
def _folder_locks(folders):
    """Exclusive flock on each folder (sorted, so two writers cannot deadlock)."""
    handles = []
    try:
        for folder in folders:
            if fcntl is None:
                break
            try:
                fd = os.open(folder, os.O_RDONLY)
            except OSError:
                continue
            handles.append(fd)
            with contextlib.suppress(OSError):
                fcntl.flock(fd, fcntl.LOCK_EX)
        yield
    finally:
        for fd in handles:
            os.close(fd)   # closing releases the lock


@contextlib.contextmanager
def atomic_open(path, mode: str = "w", encoding: str | None = "utf-8", newline=None,
                expect=_NOW):
    """Open a temporary file that replaces ``path`` when the block ends cleanly.

    ``mode`` is "w" (text) or "wb" (bytes).  If the block raises, the
    temporary file is removed and ``path`` is left exactly as it was.
    ``expect``: the ``file_stamp`` the target must still have at the swap
    (default: its stamp now); None means it must not exist.
    """
    if mode not in ("w", "wb"):
        raise ValueError(f"atomic_open writes whole files; mode must be 'w' or 'wb', got {mode!r}")
    path = Path(path)
    stamp = file_stamp(path) if expect is _NOW else expect
    temporary = stage(path)
    try:
        kwargs = {} if "b" in mode else {"encoding": encoding, "newline": newline}
        with open(temporary, mode, **kwargs) as stream:
            yield stream
            stream.flush()
            os.fsync(stream.fileno())
    except BaseException as exc:
        with contextlib.suppress(OSError):
            os.unlink(temporary)
        if isinstance(exc, OSError):
            raise FileFormatError(f"cannot write {path}: {exc.strerror or exc}; the old "
                                  "file, if any, is unchanged") from None
        raise
    commit([(temporary, path)], {path: stamp}, nonempty=False)


def atomic_write_bytes(path, data: bytes, expect=_NOW) -> None:
    with atomic_open(path, "wb", expect=expect) as stream:
        stream.write(data)


def atomic_write_text(path, text: str, encoding: str = "utf-8", expect=_NOW) -> None:
    with atomic_open(path, "w", encoding=encoding, newline="", expect=expect) as stream:
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
