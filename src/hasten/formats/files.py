"""Writing files whole or not at all: write to a temporary name in the same folder, then rename."""

from __future__ import annotations

import os
import shutil
import uuid
from collections.abc import Callable, Iterable, Mapping
from pathlib import Path

__all__ = ["temp_path", "write_file", "write_folder"]

Writer = Callable[[Path], None]


def temp_path(path: Path) -> Path:
    """A fresh hidden name beside ``path`` that keeps its suffix (``.plan.1a2b3c4d.part.xlsx``)."""
    return path.with_name(f".{path.stem}.{uuid.uuid4().hex[:8]}.part{path.suffix}")


def write_file(path: Path, write: Writer) -> None:
    """Call ``write`` on a temporary file, then move it onto ``path`` in one step."""
    tmp = temp_path(path)
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
    if not folder.exists():
        tmp = temp_path(folder)
        tmp.mkdir()
        try:
            for name, write in files.items():
                write(tmp / name)
            os.replace(tmp, folder)
        except BaseException:
            shutil.rmtree(tmp, ignore_errors=True)
            raise
        return
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
