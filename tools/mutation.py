"""Mutation testing over a listed set of realistic mutants (a developer tool, not part of CI).

Each mutant in :mod:`mutants` (``tools/mutants.py``) replaces one exact piece of text in one
source file of ``src/hasten`` by another: a bug someone could plausibly write. For every
mutant this runner

1. copies the working tree once (the files git tracks or would add, as they are on disk;
   never ``.git`` or ignored files) into a temporary directory, and writes the mutant into that copy only: the worktree's
   own files are never changed;
2. runs the test files listed for the mutated module (``mutants.TESTS``) with
   ``pytest -x -q -p no:cacheprovider`` under a time limit;
3. if they all pass, runs the whole suite: a mutant *survives* only when every test passes;
4. restores the file before the next mutant.

A mutant is *killed* when a test fails or errors, *timeout* when the tests ran past the limit
(counted as detected: the suite did not pass), *survived* when the whole suite passes. A
mutant whose original text is not found exactly once in its file is an *error*: the list must
be kept up to date with the code. Equivalent mutants (no behaviour anyone can observe
changes) carry their reason in the list and are not run unless ``--equivalent`` is given.

Hypothesis runs with a fixed seed (``--hypothesis-seed``) so that a score is repeatable, its
example database stays in the temporary copy, and it does not shrink a failing example
(``HASTEN_NO_SHRINK``, read by ``tests/conftest.py``): that a test fails is all the runner
needs, and shrinking took minutes for some mutants (they ran into the time limit).

Score: detected (killed + timeout) / non-equivalent mutants run. The exit code is 0 when the
score is at least ``--minimum`` (default 95 %) and no mutant is an error, 1 otherwise.

Usage (from the repository root, in the project's environment)::

    python tools/mutation.py                   # every mutant, one at a time
    python tools/mutation.py --check           # only check that every original text is found
    python tools/mutation.py --only cpm-critical-zero --only passes-ff-loop
    python tools/mutation.py --module progress.py --markdown
    python tools/mutation.py --jobs 2          # two copies in parallel (a quiet machine only)
    python tools/mutation.py --module planner.py --whole-seconds 230   # suite timed before
    python tools/mutation.py --only progress-allowance-up --tests tests/test_progress.py
"""

from __future__ import annotations

import argparse
import concurrent.futures
import os
import re
import shutil
import subprocess
import sys
import tempfile
import threading
import time
from dataclasses import dataclass
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(Path(__file__).resolve().parent))

from mutants import MUTANTS, TESTS, Mutant  # noqa: E402

__all__ = ["main", "Outcome", "apply", "check"]

PACKAGE = Path("src") / "hasten"
PYTEST = ("-m", "pytest", "-x", "-q", "-p", "no:cacheprovider")


@dataclass
class Outcome:
    mutant: Mutant
    status: str  # killed, timeout, survived, equivalent, error
    stage: str = ""  # "module tests" or "whole suite"
    by: str = ""  # the first test that failed, or why it is an error
    seconds: float = 0.0


def _occurrences(mutant: Mutant, root: Path = ROOT) -> int:
    path = root / PACKAGE / mutant.file
    if not path.exists():
        return -1
    return path.read_text(encoding="utf-8").count(mutant.original)


def check(mutants=MUTANTS) -> list[str]:
    """Problems with the list: unknown files, originals not found exactly once, mutated
    files that do not compile, duplicate ids, modules without tests, replacements equal to
    their originals."""
    problems, seen = [], set()
    for m in mutants:
        if m.id in seen:
            problems.append(f"{m.id}: the id is used twice")
        seen.add(m.id)
        count = _occurrences(m)
        if count < 0:
            problems.append(f"{m.id}: no file src/hasten/{m.file}")
        elif count != 1:
            problems.append(f"{m.id}: the original text is found {count} times in {m.file} "
                            "(it must be found exactly once; give more of the line)")
        elif count == 1:  # a mutant that does not compile would look killed
            path = ROOT / PACKAGE / m.file
            try:
                compile(apply(path.read_text(encoding="utf-8"), m), str(path), "exec")
            except SyntaxError as exc:
                problems.append(f"{m.id}: the mutated file does not compile ({exc.msg}, line {exc.lineno})")
        if m.original == m.replacement:
            problems.append(f"{m.id}: the replacement is the original")
        if m.file not in TESTS:
            problems.append(f"{m.id}: no test files listed for {m.file} in mutants.TESTS")
        for test in TESTS.get(m.file, ()):
            if not (ROOT / test).exists():
                problems.append(f"{m.id}: the listed test file {test} does not exist")
    return problems


def apply(text: str, mutant: Mutant) -> str:
    """``text`` with the mutant's one replacement."""
    if text.count(mutant.original) != 1:
        raise ValueError(f"{mutant.id}: original text not found exactly once")
    return text.replace(mutant.original, mutant.replacement, 1)


def _copy_tree(dest: Path) -> None:
    """The working tree as git sees it (tracked files and untracked ones not ignored, as
    they are on disk), without .git or anything ignored."""
    listed = subprocess.run(["git", "ls-files", "-z", "--cached", "--others", "--exclude-standard"],
                            cwd=ROOT, capture_output=True, check=True).stdout.decode().split("\0")
    for name in filter(None, listed):
        src = ROOT / name
        if src.is_file():
            (dest / name).parent.mkdir(parents=True, exist_ok=True)
            shutil.copy2(src, dest / name)


def _first_failure(output: str) -> str:
    found = re.search(r"^(?:FAILED|ERROR) (\S+)", output, re.MULTILINE)
    if found:
        return found.group(1)
    tail = [line for line in output.strip().splitlines() if line.strip()]
    return tail[-1][:120] if tail else "(no output)"


class Copy:
    """One temporary copy of the worktree in which mutants are written and tested."""

    def __init__(self, seed: int):
        self.dir = Path(tempfile.mkdtemp(prefix="hasten-mutants-"))
        _copy_tree(self.dir)
        self.seed = seed
        # HASTEN_NO_SHRINK (tests/conftest.py): hypothesis does not shrink a failing example
        self.env = dict(os.environ, PYTHONPATH=str(self.dir / "src"), HASTEN_NO_SHRINK="1")
        self.env.pop("PYTHONDONTWRITEBYTECODE", None)

    def close(self) -> None:
        shutil.rmtree(self.dir, ignore_errors=True)

    def pytest(self, tests, timeout: float) -> tuple[str, float, str]:
        """Run pytest on ``tests`` (all tests when empty): ("passed" | "failed" | "timeout",
        seconds, output)."""
        cmd = [sys.executable, *PYTEST, f"--hypothesis-seed={self.seed}", *tests]
        start = time.perf_counter()
        proc = subprocess.Popen(cmd, cwd=self.dir, env=self.env, stdout=subprocess.PIPE,
                                stderr=subprocess.STDOUT, text=True, start_new_session=True)
        try:
            out, _ = proc.communicate(timeout=timeout)
        except subprocess.TimeoutExpired:
            os.killpg(proc.pid, 9)  # this run's own process group (pytest and its children)
            out, _ = proc.communicate()
            return "timeout", time.perf_counter() - start, out
        state = "passed" if proc.returncode == 0 else "failed"
        return state, time.perf_counter() - start, out

    def _forget_bytecode(self, file: str) -> None:
        cache = self.dir / PACKAGE / Path(file).parent / "__pycache__"
        for pyc in cache.glob(f"{Path(file).stem}.*.pyc"):
            pyc.unlink()

    def run(self, mutant: Mutant, limits: dict, whole_limit, tests=None) -> Outcome:
        """Test one mutant: its module's tests, then (if they pass) the whole suite; with
        ``tests``, only those files."""
        path = self.dir / PACKAGE / mutant.file
        pristine = path.read_text(encoding="utf-8")
        start = time.perf_counter()
        try:
            path.write_text(apply(pristine, mutant), encoding="utf-8")
            self._forget_bytecode(mutant.file)
            state, _, out = self.pytest(tests or TESTS[mutant.file], limits[mutant.file])
            stage = "given tests" if tests else "module tests"
            if state == "passed" and not tests:
                state, _, out = self.pytest((), whole_limit())
                stage = "whole suite"
        finally:
            path.write_text(pristine, encoding="utf-8")
            self._forget_bytecode(mutant.file)
        seconds = time.perf_counter() - start
        if state == "passed":
            return Outcome(mutant, "survived", stage, "", seconds)
        if state == "timeout":
            return Outcome(mutant, "timeout", stage, "time limit", seconds)
        return Outcome(mutant, "killed", stage, _first_failure(out), seconds)


def _table(outcomes: list[Outcome], markdown: bool) -> str:
    head = ("mutant", "file", "status", "stage", "caught by / reason")
    rows = []
    for o in outcomes:
        why = o.mutant.equivalent if o.mutant.equivalent else o.by
        rows.append((o.mutant.id, o.mutant.file, o.status, o.stage, why))
    if markdown:
        lines = ["| " + " | ".join(head) + " |", "|" + "---|" * len(head)]
        lines += ["| " + " | ".join(str(c).replace("|", "\\|") for c in r) + " |" for r in rows]
        return "\n".join(lines)
    widths = [max(len(str(r[k])) for r in rows + [head]) for k in range(4)]
    fmt = "  ".join(f"{{:{w}}}" for w in widths) + "  {}"
    return "\n".join(fmt.format(*r) for r in [head] + rows)


def score(outcomes: list[Outcome]) -> tuple[int, int, float]:
    """(detected, non-equivalent mutants run, detected share)."""
    run = [o for o in outcomes if not o.mutant.equivalent and o.status in ("killed", "timeout", "survived")]
    detected = sum(1 for o in run if o.status != "survived")
    return detected, len(run), (detected / len(run) if run else 1.0)


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("--only", action="append", default=[], help="run this mutant id (repeatable)")
    parser.add_argument("--module", action="append", default=[], help="run the mutants of this file")
    parser.add_argument("--check", action="store_true", help="only check the list against the code")
    parser.add_argument("--equivalent", action="store_true",
                        help="run the equivalent mutants too (they should survive)")
    parser.add_argument("--jobs", type=int, default=1, help="copies run in parallel (default 1)")
    parser.add_argument("--seed", type=int, default=0, help="hypothesis seed (default 0)")
    parser.add_argument("--minimum", type=float, default=95.0, help="least score in %% (default 95)")
    parser.add_argument("--markdown", action="store_true", help="print the table as Markdown")
    parser.add_argument("--whole-seconds", type=float, default=None,
                        help="the whole suite's time without a mutant, measured before: not "
                             "measured again (it sets the whole suite's time limit)")
    parser.add_argument("--tests", action="append", default=[],
                        help="run only these test files (repeatable), never the whole suite: to "
                             "see whether a new test catches a mutant (no score is kept)")
    args = parser.parse_args(argv)

    problems = check()
    if problems:
        print("The mutant list does not match the code:", *problems, sep="\n  ")
        return 1
    if args.check:
        print(f"{len(MUTANTS)} mutants, every original text found once")
        return 0
    chosen = [m for m in MUTANTS if (not args.only or m.id in args.only)
              and (not args.module or m.file in args.module)]
    if args.only and len(chosen) != len(set(args.only)):
        print("unknown mutant id:", ", ".join(sorted(set(args.only) - {m.id for m in chosen})))
        return 1
    outcomes = [Outcome(m, "equivalent") for m in chosen if m.equivalent and not args.equivalent]
    to_run = [m for m in chosen if not m.equivalent or args.equivalent]

    copies = [Copy(args.seed) for _ in range(max(1, args.jobs))]
    try:
        # The unmutated tests must pass, or every mutant would look killed; their times set
        # the limits (three times the clean run plus a minute).
        limits = {}
        for file in sorted({m.file for m in to_run}):
            state, seconds, out = copies[0].pytest(args.tests or TESTS[file], 3600)
            if state != "passed":
                print(f"the tests for {file} fail without any mutant:\n{out[-3000:]}")
                return 1
            limits[file] = 3 * seconds + 60
        print(f"{len(to_run)} mutants to run", flush=True)
        free = list(copies)
        lock = threading.Lock()
        whole: list[float] = []  # the whole suite's limit, measured when first needed
        if args.whole_seconds is not None:
            whole.append(3 * args.whole_seconds + 60)
        whole_lock = threading.Lock()

        def whole_limit() -> float:
            with whole_lock:
                if not whole:  # in a copy of its own: the others may hold a mutant now
                    clean = Copy(args.seed)
                    try:
                        state, seconds, out = clean.pytest((), 3600)
                    finally:
                        clean.close()
                    if state != "passed":
                        raise SystemExit(f"the whole suite fails without any mutant:\n{out[-3000:]}")
                    whole.append(3 * seconds + 60)
                    print(f"  (whole suite {seconds:.0f} s without a mutant)", flush=True)
            return whole[0]

        def one(m: Mutant) -> Outcome:
            with lock:
                copy = free.pop()
            try:
                o = copy.run(m, limits, whole_limit, args.tests)
            finally:
                with lock:
                    free.append(copy)
            print(f"  {o.status:9} {m.id} ({o.seconds:.0f} s) {o.by}", flush=True)
            return o

        with concurrent.futures.ThreadPoolExecutor(len(copies)) as pool:
            done = list(pool.map(one, to_run))
    finally:
        for c in copies:
            c.close()
    order = {m.id: k for k, m in enumerate(MUTANTS)}
    outcomes = sorted(outcomes + done, key=lambda o: order[o.mutant.id])
    print(_table(outcomes, args.markdown))
    if args.tests:
        print("\n(only the given tests ran: this is no score)")
        return 0
    detected, total, share = score(outcomes)
    equivalent = sum(1 for m in chosen if m.equivalent)
    print(f"\nscore: {detected} of {total} non-equivalent mutants detected = {100 * share:.1f} % "
          f"(minimum {args.minimum:g} %); {equivalent} equivalent listed; "
          f"{sum(o.status == 'survived' and not o.mutant.equivalent for o in outcomes)} survived")
    wrong = [o.mutant.id for o in outcomes if o.mutant.equivalent and o.status in ("killed", "timeout")]
    if wrong:
        print("listed as equivalent but a test fails with them (not equivalent):", ", ".join(wrong))
    return 0 if 100 * share >= args.minimum - 1e-9 else 1


if __name__ == "__main__":
    sys.exit(main())
