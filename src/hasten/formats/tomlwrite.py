"""A small TOML writer for the settings file: text, numbers, dates, lists and nested sections.

The standard library reads TOML (``tomllib``) but cannot write it; this covers exactly the
value types of ``project.toml`` and nothing more.
"""

from __future__ import annotations

from collections.abc import Mapping
from datetime import date

from hasten.formats.cells import number_text

__all__ = ["toml_text"]

_ESCAPES = {'"': '\\"', "\\": "\\\\", "\n": "\\n", "\r": "\\r", "\t": "\\t",
            "\b": "\\b", "\f": "\\f"}


def _string(text: str) -> str:
    """A TOML basic string; control characters are escaped, other characters kept as they are."""
    out = []
    for char in text:
        if char in _ESCAPES:
            out.append(_ESCAPES[char])
        elif ord(char) < 0x20 or ord(char) == 0x7F:
            out.append(f"\\u{ord(char):04X}")
        else:
            out.append(char)
    return '"' + "".join(out) + '"'


def _value(value: object) -> str:
    if isinstance(value, str):
        return _string(value)
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, (int, float)):
        return number_text(value)
    if isinstance(value, date):
        return value.isoformat()
    if isinstance(value, list):
        return "[" + ", ".join(_value(v) for v in value) + "]"
    raise TypeError(f"cannot write {type(value).__name__} to TOML")


def _key(key: str) -> str:
    """A bare key when possible, else a quoted one."""
    bare = key and all(c.isascii() and (c.isalnum() or c in "-_") for c in key)
    return key if bare else _string(key)


def _tables(path: tuple[str, ...], table: Mapping[str, object]) -> list[str]:
    """The lines of ``[a.b]`` tables for the dicts in ``table`` (``path`` leads to it), each
    followed by its own tables; a table holding only tables gets no header of its own."""
    lines = []
    for name, inner in table.items():
        if not isinstance(inner, Mapping):
            continue
        here = path + (name,)
        plain = [f"{_key(k)} = {_value(v)}" for k, v in inner.items() if not isinstance(v, Mapping)]
        if plain or all(not isinstance(v, Mapping) for v in inner.values()):
            lines += ["", "[" + ".".join(_key(p) for p in here) + "]", *plain]
        lines += _tables(here, inner)
    return lines


def toml_text(document: Mapping[str, object]) -> str:
    """TOML for plain keys followed by ``[section]`` tables (``[section.name]`` for dicts in them)."""
    lines = [f"{_key(k)} = {_value(v)}" for k, v in document.items() if not isinstance(v, Mapping)]
    return "\n".join(lines + _tables((), document)) + "\n"
