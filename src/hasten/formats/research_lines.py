"""Text files of research instances, line by line: plain ASCII text, whole numbers per line,
and errors naming the file and the line (``row`` is the 1-based line number)."""

from __future__ import annotations

import re
import unicodedata
from pathlib import Path

from hasten.errors import InputError
from hasten.formats.cells import WHOLE_LIMIT, shortened

__all__ = ["Lines", "decode", "check_duration"]

_INTEGER = re.compile(r"[+-]?\d+")


class Lines:
    """The file's lines with 1-based numbers, and located errors."""

    def __init__(self, path: Path, text: str, fix: str):
        self.path = path
        self.lines = text.splitlines()
        self.fix = fix

    def error(self, problem: str, line: int | None = None, column: str | None = None,
              value: object = None, fix: str | None = None) -> InputError:
        return InputError(problem, file=str(self.path), row=line, column=column, value=value,
                          fix=fix or self.fix)

    def text(self, line: int) -> str:
        return self.lines[line - 1]

    def integers(self, line: int, names: list[str], minimum: int | None = 0) -> list[int]:
        """The whitespace-separated integers of a line; ``names`` names each position
        (the last name repeats) for the error message."""
        out = []
        for k, token in enumerate(self.text(line).split()):
            name = names[min(k, len(names) - 1)]
            if not _INTEGER.fullmatch(token):
                raise self.error(f"expected a whole number ({name})", line, name,
                                 shortened(token))
            if len(token) > 15:  # Python refuses to read numbers of thousands of digits
                raise self.error(f"the number is too large ({name})", line, name,
                                 shortened(token))
            number = int(token)
            if minimum is not None and number < minimum:
                raise self.error(f"expected a whole number of at least {minimum} ({name})",
                                 line, name, token)
            out.append(number)
        return out



def decode(path: Path) -> str:
    """The file's text; these files are plain ASCII, so anything else is refused (Python's
    ``int`` would read digits of other scripts, such as Arabic-Indic ones, as numbers)."""
    try:
        text = path.read_bytes().decode("utf-8-sig")
    except UnicodeDecodeError as exc:
        raise InputError("the file is not plain text (UTF-8 or ASCII)", file=str(path),
                         value=f"byte {exc.start}", fix="use the instance file as published "
                         "(plain ASCII text)") from None
    except OSError as exc:
        raise InputError(f"cannot read the file: {exc.strerror or exc}", file=str(path),
                         fix="check the path and the file permissions") from None
    if not text.isascii():
        at = next(i for i, char in enumerate(text) if not char.isascii())
        line = text.count("\n", 0, at) + 1
        name = unicodedata.name(text[at], "without a name")
        raise InputError(f"the line holds a character that is not plain ASCII: "
                         f"U+{ord(text[at]):04X} {name}", file=str(path), row=line,
                         value=text.splitlines()[line - 1].strip()[:60],
                         fix="research instance files are plain ASCII: use the file as "
                             "published, with ASCII digits 0-9")
    return text



def check_duration(lines: Lines, line: int, duration: int) -> None:
    """A duration is at most the largest number of working days a project may hold."""
    if duration > WHOLE_LIMIT:
        raise lines.error(f"the duration is more than {WHOLE_LIMIT:,} periods", line, "duration",
                          duration, f"hasten takes durations of up to {WHOLE_LIMIT:,} working "
                          "days; use the file as published")

