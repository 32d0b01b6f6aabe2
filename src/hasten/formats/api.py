"""Reading, writing and converting projects in any of the three forms.

The form follows the path: an existing folder or a path without suffix is the folder form,
``.xlsx`` the workbook form, ``.json`` the JSON form. All forms are parsed by the same
:func:`~hasten.formats.parse.parse_tables`, and written from the same canonical
:class:`~hasten.formats.document.Document`.
"""

from __future__ import annotations

import gc
import os
from collections.abc import Iterator
from contextlib import contextmanager
from pathlib import Path
from types import ModuleType

from hasten.errors import CycleError, InputError
from hasten.formats import folder, jsonfile, workbook
from hasten.formats.cells import one_line_errors
from hasten.formats.document import document_tables, first_difference, to_document
from hasten.formats.parse import parse_tables, parse_tables_with_notes
from hasten.formats.research import read_research
from hasten.project import Project

__all__ = ["read_project", "read_project_with_notes", "write_project", "convert",
           "import_research"]

_FORMS: dict[str, ModuleType] = {"": folder, ".xlsx": workbook, ".json": jsonfile}
_FORMS_FIX = "use a folder (project.toml + CSV files), a .xlsx workbook or a .json file"


def _form(path: Path) -> ModuleType:
    """The module that reads and writes the form ``path`` stands for."""
    suffix = path.suffix.lower()
    if path.is_dir():
        if suffix in _FORMS and suffix and not (path / folder.FILES["settings"]).exists():
            raise InputError(f"this is a folder, not a {suffix} file", file=str(path),
                             fix=f"give the path of the {suffix} file, or of a project folder "
                                 "(with project.toml)")
        return folder
    if suffix not in _FORMS:
        raise InputError("unknown project form", file=str(path), value=path.suffix, fix=_FORMS_FIX)
    if suffix == "" and path.exists():
        raise InputError("expected a project folder but found a file", file=str(path),
                         fix=_FORMS_FIX)
    return _FORMS[suffix]


@contextmanager
def _collector_paused() -> Iterator[None]:
    """Pause Python's cycle collector while a project is read, then restore it.

    Reading builds a few small objects per cell that all stay alive. Every time their
    number grows by a quarter the collector walks all of them, which on a 50,000-activity
    project cost as much time as the reading itself. Reading builds no reference cycles and
    reference counting still frees everything else at once. The collector is process-wide:
    other threads get no cycle collection during the read either.
    """
    enabled = gc.isenabled()
    gc.disable()
    try:
        yield
    finally:
        if enabled:
            gc.enable()


@one_line_errors
def read_project(path: str | os.PathLike[str]) -> Project:
    """Read and validate a project folder, ``.xlsx`` workbook or ``.json`` file.

    Parameters
    ----------
    path : str or path-like
        A folder (``project.toml``, ``activities.csv`` and the optional tables), a workbook
        or a JSON file; the form is told by the path.

    Returns
    -------
    Project
        The input is never modified.

    Raises
    ------
    InputError
        For anything wrong with the input (its subclass CycleError for a loop of links),
        naming the file, row, column, value and the fix.

    Examples
    --------
    >>> import hasten
    >>> p = hasten.read_project("cases/clinic-fitout")
    >>> p.activities[0].id, p.currency
    ('A010', 'EUR')
    >>> hasten.read_project("no/such/project")
    Traceback (most recent call last):
    ...
    hasten.errors.InputError: no/such/project: not found...
    """
    return read_project_with_notes(path)[0]


@one_line_errors
def read_project_with_notes(path: str | os.PathLike[str]) -> tuple[Project, tuple[str, ...]]:
    """As :func:`read_project`, and the reading notes: one text per value read as written
    that is probably a slip (e.g. every percent complete between 0 and 1), naming the file,
    the column and what was assumed. A project without such values has none."""
    path = Path(path)
    if not path.exists():
        raise InputError("not found", file=str(path),
                         fix=f"check the path; {_FORMS_FIX}")
    with _collector_paused():
        return parse_tables_with_notes(_form(path).read(path))


def _is_empty(path: Path) -> bool:
    if path.is_dir():
        return not any(path.iterdir())
    return path.stat().st_size == 0


def _check_target(path: Path, form: ModuleType, overwrite: bool) -> None:
    """The target's folder must exist; an existing non-empty target needs ``overwrite``."""
    if not path.parent.is_dir():
        raise InputError("the folder to write into does not exist", file=str(path.parent),
                         fix="create the folder first or choose another path")
    if not path.exists():
        return
    if (form is folder) != path.is_dir():
        kind = "a folder" if path.is_dir() else "a file"
        raise InputError(f"the target exists and is {kind}", file=str(path),
                         fix="choose another path or remove it")
    if not overwrite and not _is_empty(path):
        raise InputError("the target already exists and is not empty", file=str(path),
                         fix="choose a new path, or allow overwriting")


_NEUTRAL_LABELS = {"settings": "settings", "activities": "activities", "links": "links",
                   "crash_steps": "crash steps", "options": "options"}


def _check_lossless(project: Project, document, source: str | None) -> None:
    """Validate the project and make sure reading the written form gives it back exactly.

    The check reads the tables the writer would write, before anything is written: an
    error must not name the target's files (they do not exist), so it names ``source``,
    the file the project came from, or "the project to write", and says which activity
    or table entry is wrong.
    """
    try:
        again = parse_tables(document_tables(document, _NEUTRAL_LABELS))
    except CycleError as error:
        raise CycleError(error.cycle, file=source) from None
    except InputError as error:
        raise _unwritten(error, document, source) from None
    difference = first_difference(project, again)
    if difference:
        raise InputError(f"the project cannot be saved without loss: {difference}", file=source,
                         fix="use the value that would be read back (e.g. strip spaces from "
                             "texts, give the calendar its canonical name)")


def _unwritten(error: InputError, document, source: str | None) -> InputError:
    """``error`` (found in the tables about to be written) told in terms of the project:
    which activity or table entry and which column, not a row of a file never written."""
    table = next((key for key, label in _NEUTRAL_LABELS.items() if error.file == label), None)
    records = getattr(document, table, None) if table and table != "settings" else None
    parts = []
    if records and isinstance(error.row, int) and 2 <= error.row < len(records) + 2:
        record = records[error.row - 2]
        ident = record.get("id", record.get("successor"))
        parts.append(f"activity {ident}" if table == "activities" else
                     f"{_NEUTRAL_LABELS[table]} entry {error.row - 1}"
                     + (f" (activity {ident})" if ident else ""))
    elif table and table != "settings":
        parts.append(_NEUTRAL_LABELS[table])
    if error.column:
        parts.append(f"{'setting' if table == 'settings' else 'column'} '{error.column}'")
    head = ("the project cannot be written" if source is None
            else "the project read from here cannot be written")
    where = f" ({', '.join(parts)})" if parts else ""
    return InputError(f"{head}{where}: {error.problem}", file=source, value=error.value,
                      fix=error.fix)


@one_line_errors
def write_project(project: Project, path: str | os.PathLike[str], *,
                  overwrite: bool = False, source: str | os.PathLike[str] | None = None) -> None:
    """Write ``project`` whole (or not at all) in the form chosen by the path.

    Refuses an existing non-empty target unless ``overwrite``; refuses a project that is
    invalid or would not read back equal, naming ``source`` (the file the project was read
    from, when there is one), never the target's files, which were not written.
    """
    path = Path(path)
    form = _form(path)
    _check_target(path, form, overwrite)
    document = to_document(project)
    _check_lossless(project, document, None if source is None else str(source))
    try:
        form.write(document, path)
    except OSError as exc:
        raise InputError(f"cannot write: {exc.strerror or exc}", file=str(path),
                         fix="check the permissions and the free space") from None


@one_line_errors
def convert(src: str | os.PathLike[str], dst: str | os.PathLike[str], *,
            overwrite: bool = False) -> Project:
    """Read ``src`` and write it to ``dst`` (any forms); returns the project."""
    project = read_project(src)
    write_project(project, dst, overwrite=overwrite, source=src)
    return project


@one_line_errors
def import_research(src: str | os.PathLike[str], dst: str | os.PathLike[str], *,
                    overwrite: bool = False) -> Project:
    """Read a research instance (:func:`~hasten.formats.research.read_research`) and write
    it as a project to ``dst`` (any form); returns the project. Errors name ``src``."""
    project = read_research(src)
    write_project(project, dst, overwrite=overwrite, source=src)
    return project
