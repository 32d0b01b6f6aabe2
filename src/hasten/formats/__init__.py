"""File formats: a project as a folder (TOML + CSV), an .xlsx workbook or a .json file.

All three hold the same fields (discrete options included) and convert into each other
without loss. Every form is read into :class:`Tables` and validated by the one pure
:func:`parse_tables`; bad input raises :class:`hasten.errors.InputError` naming file, row,
column, value and the fix.

:func:`read_research` imports research benchmark instances (PSPLIB ``.mm`` / ``.sm``,
Patterson ``.rcp``) as projects; it is one-way (:func:`import_research` reads and writes).

:func:`read_project_with_notes` also returns the reading notes (values read as written that
are probably slips). Outputs of the commands are checked before the work
(:func:`check_output_target`, :func:`check_output_folder`) and result tables written by
:func:`write_table` / :func:`write_workbook` (:mod:`hasten.formats.output`).

The package, by concern: the forms (:mod:`~hasten.formats.folder`,
:mod:`~hasten.formats.workbook`, :mod:`~hasten.formats.jsonfile`) read files into
:mod:`~hasten.formats.tables`; :mod:`~hasten.formats.parse` validates them with
:mod:`~hasten.formats.settings`, :mod:`~hasten.formats.activities`,
:mod:`~hasten.formats.links`, :mod:`~hasten.formats.shortening` and
:mod:`~hasten.formats.reach`, on cells read by :mod:`~hasten.formats.cells` (whose refusals
:mod:`~hasten.formats.advice` explains); :mod:`~hasten.formats.document` is the canonical
written form; :mod:`~hasten.formats.files` writes whole or not at all.
"""

from hasten.formats.api import (convert, import_research, read_project, read_project_with_notes,
                                write_project)
from hasten.formats.output import (TableSheet, check_output_folder, check_output_target,
                                   write_table, write_workbook)
from hasten.formats.parse import parse_tables, parse_tables_with_notes
from hasten.formats.predecessors import parse_predecessors
from hasten.formats.research import read_research
from hasten.formats.tables import Row, Settings, Table, Tables

__all__ = [
    "read_project",
    "read_project_with_notes",
    "write_project",
    "convert",
    "read_research",
    "import_research",
    "check_output_target",
    "check_output_folder",
    "write_table",
    "write_workbook",
    "TableSheet",
    "parse_predecessors",
    "parse_tables",
    "parse_tables_with_notes",
    "Tables",
    "Table",
    "Row",
    "Settings",
]
