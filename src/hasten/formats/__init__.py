"""File formats: a project as a folder (TOML + CSV), an .xlsx workbook or a .json file.

All three hold the same fields (discrete options included) and convert into each other
without loss. Every form is read into :class:`Tables` and validated by the one pure
:func:`parse_tables`; bad input raises :class:`hasten.errors.InputError` naming file, row,
column, value and the fix.

:func:`read_research` imports research benchmark instances (PSPLIB ``.mm`` / ``.sm``,
Patterson ``.rcp``) as projects; it is one-way (write them with :func:`write_project`).
"""

from hasten.formats.api import (convert, import_research, read_project, read_project_with_notes,
                                write_project)
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
    "parse_predecessors",
    "parse_tables",
    "parse_tables_with_notes",
    "Tables",
    "Table",
    "Row",
    "Settings",
]
