"""The output folder: every file put in place whole, nothing written outside it, one run at a time.

A writer writes to a temporary name beside its file (``.results.csv.<pid>.part``) and the file
is renamed into place only when complete, so an interrupted run never leaves a file that looks
finished, and a temporary is removed on any failure, Ctrl-C included.  A destination that is a
symbolic link, and a sub-folder that is one, are refused before anything is written: a rename
would not follow the link, but a link an engineer put there means something, and writing
through a linked sub-folder would leave ``--out``.  A lock file (``.lagaudit.lock``, held with
``flock`` while the run writes) makes a second run into the same folder stop with one line
instead of interleaving its files with the first's.
"""

from __future__ import annotations

import errno
import fcntl
import os
from contextlib import contextmanager
from pathlib import Path

from audit.errors import LagauditError

LOCK_NAME = ".lagaudit.lock"


class OutputFolder:
    """``--out``: checked, created and locked on entry, unlocked on exit.

    ``with OutputFolder(path) as out: with out.writing("results.csv") as temporary: ...``
    """

    def __init__(self, path):
        self.root = Path(path)
        self._lock = None
        self._created = False

    def __enter__(self) -> OutputFolder:
        self.prepare()
        self._lock = _take_lock(self.root)
        return self

    def __exit__(self, kind, value, traceback) -> None:
        handle, self._lock = self._lock, None
        if handle is not None:
            _remove(self.root / LOCK_NAME)  # still ours: removed while held
            os.close(handle)
        if kind is not None and self._created:  # a refused run leaves no empty folder behind
            try:
                self.root.rmdir()
            except OSError:  # something was written: keep it
                pass

    def prepare(self) -> None:
        """Refuse an ``--out`` that is a file, create it if missing, say so if it is read-only."""
        root = self.root
        if root.exists() and not root.is_dir():
            raise LagauditError(f"--out {_shown(root)} is a file, not a folder",
                                expected="a folder to write the outputs into (it is created if missing)")
        self._created = not root.exists()
        try:
            root.mkdir(parents=True, exist_ok=True)
        except OSError as exc:
            raise _unwritable(root, exc) from None
        if not os.access(root, os.W_OK | os.X_OK):
            raise _unwritable(root, PermissionError(errno.EACCES, "read-only"))

    def check(self, relative: str, *, create: bool = True) -> Path:
        """The path of ``relative`` inside the folder, refused if it or a folder on the way is a
        symbolic link or the destination is a folder; missing sub-folders are created unless
        ``create`` is false."""
        parts = Path(relative).parts
        if not parts or Path(relative).is_absolute() or ".." in parts:
            raise ValueError(f"output name {relative!r} must stay inside the output folder")
        here = self.root
        for part in parts[:-1]:
            here = here / part
            if here.is_symlink():
                raise _linked(here, self.root)
            if not create and not here.exists():
                return self.root.joinpath(*parts)
            try:
                here.mkdir(exist_ok=True)
            except OSError as exc:
                raise _unwritable(here, exc) from None
            if not here.is_dir():
                raise LagauditError(f"{_shown(here)} in --out is a file, where lagaudit writes a folder",
                                    expected="move it away or choose another --out")
        target = here / parts[-1]
        if target.is_symlink():
            raise _linked(target, self.root)
        if target.is_dir():
            raise LagauditError(f"{_shown(target)} in --out is a folder, where lagaudit writes a file",
                                expected="move it away or choose another --out")
        return target

    @contextmanager
    def writing(self, relative: str):
        """A temporary path to write ``relative`` to; renamed into place when the block ends
        without an error, removed when it does not."""
        target = self.check(relative)
        temporary = temporary_for(target)
        try:
            yield temporary
            self.check(relative)  # nothing swapped in for it meanwhile
            os.replace(temporary, target)
        except OSError as exc:  # a full disk, a folder made read-only meanwhile: one line
            _remove(temporary)
            raise _unwritable(target, exc) from None
        except BaseException:
            _remove(temporary)
            raise


def temporary_for(target: Path) -> Path:
    """The temporary name of ``target``: hidden, beside it, this process's own."""
    return target.with_name(f".{target.name}.{os.getpid()}.part")


def _take_lock(root: Path) -> int:
    path = root / LOCK_NAME
    while True:
        try:
            handle = os.open(path, os.O_RDWR | os.O_CREAT | os.O_NOFOLLOW | os.O_CLOEXEC, 0o644)
        except OSError as exc:
            raise _unwritable(root, exc) from None
        try:
            fcntl.flock(handle, fcntl.LOCK_EX | fcntl.LOCK_NB)
        except BlockingIOError:
            os.close(handle)
            raise LagauditError(
                f"another lagaudit run is writing into {_shown(root)} (it holds {LOCK_NAME})",
                expected="wait for it to finish, or choose another --out") from None
        try:  # the holder before us may have removed the file after we opened it: retry
            if os.fstat(handle).st_ino == os.stat(path, follow_symlinks=False).st_ino:
                os.ftruncate(handle, 0)
                os.write(handle, f"{os.getpid()}\n".encode())
                return handle
        except FileNotFoundError:
            pass
        os.close(handle)


def _remove(path: Path) -> None:
    try:
        os.unlink(path)
    except FileNotFoundError:
        pass


def _linked(path: Path, root: Path) -> LagauditError:
    return LagauditError(
        f"{_shown(path)} in --out is a symbolic link (to {_shown(Path(os.readlink(path)))}); "
        "lagaudit writes only inside --out and does not follow links there",
        expected=f"remove the link or choose another --out than {_shown(root)}")


def _unwritable(path: Path, exc: OSError) -> LagauditError:
    reason = {errno.EACCES: "permission denied", errno.EPERM: "permission denied",
              errno.EROFS: "read-only file system", errno.ENOSPC: "no space left on the device",
              errno.ENOTDIR: "a part of the path is a file"}.get(exc.errno, exc.strerror or str(exc))
    return LagauditError(f"cannot write into {_shown(path)}: {reason}",
                         expected="a folder you may write to (--out)")


def _shown(path: Path) -> str:
    return repr(str(path))
