"""The console script: start the command line, and stop quietly (exit code 130) when
interrupted while it is still loading, before its own handling of Ctrl-C is in place."""

from __future__ import annotations

import sys

__all__ = ["main"]


def main() -> None:  # pragma: no cover - exercised through a subprocess in the tests
    try:
        from .cli import main as run
    except KeyboardInterrupt:
        sys.stderr.write("hasten: interrupted\n")
        raise SystemExit(130) from None
    run()
