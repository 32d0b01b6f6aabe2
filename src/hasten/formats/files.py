"""Writing files whole or not at all: write to a temporary name in the same folder, then rename.

The temporary ``.part`` files are removed when writing fails, on Ctrl-C (SIGINT, which
Python raises as KeyboardInterrupt) and on SIGTERM (the polite request to stop that job
schedulers and ``kill`` send): while writing, SIGTERM raises ``SystemExit(143)`` in the main
thread so that the same clean-up runs, and the previous handler is put back afterwards.
(Only when no handler of its own was installed: a program that handles SIGTERM itself
keeps doing so.)
"""

from __future__ import annotations

import os
import shutil
import signal
import threading
import uuid
from collections.abc import Callable, Iterable, Iterator, Mapping
from contextlib import contextmanager
from pathlib import Path

__all__ = ["temp_path", "name_limit", "write_file", "write_folder", "stopped_by_sigterm"]

Writer = Callable[[Path], None]
_DEFAULT_NAME_LIMIT = 255  # bytes: the limit of common Linux, macOS and Windows file systems


def name_limit(folder: Path) -> int:
    """The longest file name (in bytes) the file system of ``folder`` takes."""
    try:
        return int(os.pathconf(folder, "PC_NAME_MAX"))
    except (OSError, ValueError, AttributeError):  # no such folder, or not known here
        return _DEFAULT_NAME_LIMIT


def temp_path(path: Path) -> Path:
    """A fresh hidden name beside ``path`` that keeps its suffix (``.plan.1a2b3c4d.part.xlsx``),
    its stem shortened so that the name stays within the file system's limit."""
    tag = f".{uuid.uuid4().hex[:8]}.part{path.suffix}"
    room = name_limit(path.parent) - len(f".{tag}".encode())
    stem = path.stem.encode()[:max(room, 0)].decode("utf-8", "ignore")
    return path.with_name(f".{stem}{tag}")


def _terminate(signum: int, frame: object) -> None:
    raise SystemExit(128 + signum)


@contextmanager
def stopped_by_sigterm() -> Iterator[None]:
    """While inside, SIGTERM raises ``SystemExit(143)`` (so clean-up code runs, as on
    Ctrl-C); the previous handler is restored on leaving. Does nothing outside the main
    thread or when the program handles SIGTERM itself."""
    if threading.current_thread() is not threading.main_thread():
        yield
        return
    previous = signal.getsignal(signal.SIGTERM)
    if previous is not signal.SIG_DFL:
        yield
        return
    signal.signal(signal.SIGTERM, _terminate)
    try:
        yield
    finally:
        signal.signal(signal.SIGTERM, previous)


def write_file(path: Path, write: Writer) -> None:
    """Call ``write`` on a temporary file, then move it onto ``path`` in one step."""
    tmp = temp_path(path)
    with stopped_by_sigterm():
        try:
            write(tmp)
            os.replace(tmp, path)
        except BaseException:
            tmp.unlink(missing_ok=True)
            raise


def write_folder(folder: Path, files: Mapping[str, Writer], stale: Iterable[str] = ()) -> None:
    """Write the named files into ``folder`` and remove the ``stale`` ones.

    A new folder is built under a temporary name and renamed into place. In an existing
    folder every file is first written under a temporary name; only when all succeeded are
    they renamed into place (other files in the folder are left alone).
    """
    with stopped_by_sigterm():
        if not folder.exists():
            _write_new_folder(folder, files)
        else:
            _write_into_folder(folder, files, stale)


def _write_new_folder(folder: Path, files: Mapping[str, Writer]) -> None:
    tmp = temp_path(folder)
    tmp.mkdir()
    try:
        for name, write in files.items():
            write(tmp / name)
        os.replace(tmp, folder)
    except BaseException:
        shutil.rmtree(tmp, ignore_errors=True)
        raise


def _write_into_folder(folder: Path, files: Mapping[str, Writer], stale: Iterable[str]) -> None:
    staged: list[tuple[Path, Path]] = []
    try:
        for name, write in files.items():
            staged.append((temp_path(folder / name), folder / name))
            write(staged[-1][0])
    except BaseException:
        for tmp, _ in staged:
            tmp.unlink(missing_ok=True)
        raise
    for tmp, final in staged:
        os.replace(tmp, final)
    for name in stale:
        (folder / name).unlink(missing_ok=True)
