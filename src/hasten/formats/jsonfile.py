"""The JSON form: one object with ``project``, ``activities``, ``links``, ``crash_steps``
and ``options``.

Layout::

    {"project": {"name": ..., "start": "2025-03-03", "calendar": "mon-fri" or ["mon", ...],
                 "holidays": ["2025-12-25"], "currency": "EUR",
                 "costs": {"indirect_per_day": 850},
                 "contract": {"finish": "2025-06-30", "damages_per_day": 1200, ...},
                 "status": {"data_date": "2025-05-05"},
                 "calendars": {"crane": {"workdays": "all-days", "holidays": []},
                               "six-day": {"workdays": ["mon", ..., "sat"]}}},
     "activities": [{"id": "A", "name": ..., "trade": ..., "duration": 5,
                     "crash_duration": 3, "cost": 12000, "crash_cost": 15000,
                     "predecessors": "B; C:SS+2",
                     "actual_start": "2025-04-07", "actual_finish": null,
                     "remaining": 2, "percent_complete": null, "not_before": null,
                     "deadline": null, "damages_per_day": null, "calendar": "crane"}, ...],
     "links": [{"predecessor": "A", "successor": "B", "type": "FS", "lag": 0}, ...],
     "crash_steps": [{"id": "A", "days": 1, "cost_per_day": 500}, ...],
     "options": [{"id": "A", "option": "second crew", "duration": 3, "added_cost": 2400,
                  "note": "", "crash_duration": null, "cost_per_day": null}, ...]}

``links``, ``crash_steps`` and ``options`` may be left out, and so may ``status``,
``calendars`` (a calendar's ``holidays`` absent or null: the project's holidays), and the
progress, date and calendar keys of an activity (written only when some activity uses
them; a null ``calendar`` is the project calendar). Dates
are ISO text; an absent crash, progress or date value is ``null``. Row numbers in messages are the 1-based position of the item in its list.
"""

from __future__ import annotations

import json
from datetime import date
from pathlib import Path

from hasten.errors import InputError
from hasten.formats.cells import CellRef
from hasten.formats.document import Document
from hasten.formats.files import write_file
from hasten.formats.settings import flatten, nest
from hasten.formats.tables import RepeatedKeys, Settings, Tables, table_from_records

__all__ = ["KEYS", "labels", "read", "write"]

KEYS = {"settings": "project", "activities": "activities", "links": "links",
        "crash_steps": "crash_steps", "options": "options"}
_REQUIRED = ("project", "activities")


def labels(path: Path) -> dict[str, str]:
    """How each table is named in messages: the file and the key."""
    return {key: f"{path} ({name})" for key, name in KEYS.items()}


def _object(pairs: list[tuple[str, object]]) -> dict:
    """A JSON object; keys given twice (which ``json`` would silently keep the last of) are
    remembered so that the reader can refuse them where it knows the place."""
    found = dict(pairs)
    if len(found) == len(pairs):
        return found
    seen: set[str] = set()
    repeated = [k for k, _ in pairs if k in seen or seen.add(k)]
    return RepeatedKeys(found, repeated)


def _check_repeated(value: object, where: CellRef, prefix: str = "", *,
                    inside: bool = True) -> None:
    """Refuse keys given twice in an object (and, if ``inside``, in the objects in it)."""
    if not isinstance(value, dict):
        return
    for key in getattr(value, "repeated", ()):
        raise where.at(prefix + key).error("the key appears twice in one object", key,
                                           "keep one of them")
    for key, inner in value.items() if inside else ():
        _check_repeated(inner, where, f"{prefix}{key}.")


def _load(path: Path) -> dict:
    """The top-level object; syntax errors name their line and column."""
    try:
        data = json.loads(path.read_bytes().decode("utf-8-sig"), object_pairs_hook=_object)
    except json.JSONDecodeError as exc:
        raise InputError(f"not valid JSON: {exc.msg} (column {exc.colno})", file=str(path),
                         row=exc.lineno, fix="check commas, quotes and brackets on that line") from None
    except UnicodeDecodeError:
        raise InputError("the file is not UTF-8 text", file=str(path),
                         fix="save it as UTF-8") from None
    except RecursionError:
        raise InputError("the JSON is nested too deeply to read", file=str(path),
                         fix="a project nests objects and lists only a few levels deep: "
                             "check the brackets") from None
    if not isinstance(data, dict):
        raise InputError("the file must hold one JSON object", file=str(path),
                         value=type(data).__name__, fix='write {"project": {...}, "activities": [...]}')
    return data


def _check_keys(data: dict, path: Path) -> None:
    _check_repeated(data, CellRef(str(path)), inside=False)
    allowed = tuple(KEYS.values())
    for key in data:
        if key not in allowed:
            raise CellRef(str(path), None, key).error(
                "unknown key", key, f"allowed keys: {', '.join(allowed)}")
    for key in _REQUIRED:
        if key not in data:
            raise CellRef(str(path), None, key).error(
                f"the key '{key}' is missing", None, f'add "{key}" to the top-level object')


def read(path: Path) -> Tables:
    """Read a JSON project into tables."""
    data = _load(path)
    _check_keys(data, path)
    names = labels(path)
    project = data["project"]
    if not isinstance(project, dict):
        raise CellRef(names["settings"]).error("expected an object", type(project).__name__,
                                             'write "project": {"name": ..., "start": ...}')
    _check_repeated(project, CellRef(names["settings"]))
    optional = {key: table_from_records(names[key], data[KEYS[key]]) if KEYS[key] in data else None
                for key in ("links", "crash_steps", "options")}
    return Tables(
        settings=Settings(names["settings"], flatten(project, CellRef(names["settings"]))),
        activities=table_from_records(names["activities"], data["activities"]),
        **optional,
    )


def _plain(value: object) -> object:
    """JSON has no dates: write them as ISO text."""
    if isinstance(value, date):
        return value.isoformat()
    if isinstance(value, list):
        return [_plain(v) for v in value]
    return value


def write(document: Document, path: Path) -> None:
    """Write the JSON file whole (temporary file, then rename)."""
    data = {
        "project": nest({k: _plain(v) for k, v in document.settings.items()}),
        "activities": [{k: _plain(v) for k, v in record.items()} for record in document.activities],
        "links": document.links,
        "crash_steps": document.crash_steps,
        "options": document.options,
    }
    text = json.dumps(data, ensure_ascii=False, indent=2) + "\n"
    write_file(path, lambda tmp: tmp.write_text(text, encoding="utf-8", newline="\n"))
