"""The schedule-quality check: is the network fit to be optimised?

Crashing trusts the logic: an activity with no successor from its finish (an open end) is
never critical unless it happens to end the job, so the optimiser never shortens it, however
late it runs. :func:`assess` measures the common faults of a schedule, each with its count,
the activities or links concerned, the threshold used and what to fix:

- open ends: activities whose start no FS/SS predecessor drives or whose finish drives no
  FS/FF successor, other than the first and the last activity of the job;
- leads (negative lags), lags (positive), links other than finish-to-start;
- hard constraints: deadlines (a ``not_before`` date is a soft constraint: it only holds
  work back, never against its logic, and is not counted);
- high total float, long durations;
- negative float against the contract finish;
- dates that contradict progress at the data date (out-of-sequence links, started work
  with nothing left to do);
- the critical path test: one critical activity made longer must move the finish by as
  much.

Thresholds. The measures follow the US Government Accountability Office, *Schedule
Assessment Guide: Best Practices for Project Schedules* (GAO-16-89G, December 2015), whose
text could not be read here; the numbers are the commonly used thresholds of the widely
taught 14-point assessment of a US public agency, written from memory (each marked below).
A project passes its own thresholds as ``overrides`` (keys of :data:`THRESHOLDS`).

Activities counted: those not finished at the data date; links counted: those into them.
"""

from __future__ import annotations

from dataclasses import dataclass

from .cpm import schedule
from .errors import HastenError
from .network import Network
from .progress import DONE, STARTED
from .project import LinkType, Project

__all__ = ["THRESHOLDS", "Measure", "QualityReport", "assess"]

#: Default thresholds, each a share of the activities (or links) counted, or a number of
#: working days. None of them could be read in the source here: the shares are the commonly
#: used values of the 14-point assessment (see the module notes).
THRESHOLDS: dict[str, float] = {
    "open_ends": 0.05,  # from memory: at most 5% of activities with missing logic
    "leads": 0.0,  # from memory: no leads at all
    "lags": 0.05,  # from memory: at most 5% of links with a lag
    "finish_to_start": 0.90,  # from memory: at least 90% of links finish-to-start
    "hard_constraints": 0.05,  # from memory: at most 5% of activities
    "high_float_days": 44,  # from memory: total float over 44 working days (about two months)
    "high_float": 0.05,  # from memory: at most 5% of activities
    "negative_float": 0.0,  # from memory: no activity with negative float
    "high_duration_days": 44,  # from memory: durations over 44 working days
    "high_duration": 0.05,  # from memory: at most 5% of activities
    "invalid_dates": 0.0,  # from memory: no date that contradicts progress
    "critical_path_delay_days": 20,  # common practice: any clear delay; 20 working days here
}


@dataclass(frozen=True)
class Measure:
    """One measure of the check.

    ``share`` is ``count / base`` (None when not assessed); ``limit`` the threshold it is
    compared with (at most, or at least when ``at_least``); ``items`` names what is
    concerned, each with the reason in words."""

    key: str
    title: str
    count: int
    base: int  # activities or links counted
    unit: str  # "activities", "links" or "test"
    share: float | None
    limit: float
    at_least: bool
    passed: bool
    items: tuple[str, ...]
    fix: str
    note: str = ""  # how it was measured, or why it was not

    @property
    def assessed(self) -> bool:
        return self.share is not None


@dataclass(frozen=True)
class QualityReport:
    """Every measure of one project, in a fixed order."""

    project: Project
    measures: tuple[Measure, ...]
    thresholds: dict

    @property
    def failed(self) -> tuple[Measure, ...]:
        return tuple(m for m in self.measures if m.assessed and not m.passed)

    @property
    def assessed(self) -> tuple[Measure, ...]:
        return tuple(m for m in self.measures if m.assessed)

    def summary(self) -> str:
        """``"3 of 10 measures fail (open ends, lags, high float)"`` or ``"all 10 measures pass"``."""
        n = len(self.assessed)
        if not self.failed:
            return f"all {n} measures pass"
        return (f"{len(self.failed)} of {n} measures fail ("
                + ", ".join(m.title for m in self.failed) + ")")

    def notice(self) -> str | None:
        """The one line ``plan``, ``best`` and ``recover`` print when a measure fails."""
        if not self.failed:
            return None
        return f"Schedule check: {self.summary()}; run hasten check for details"


def _thresholds(overrides: dict | None) -> dict:
    out = dict(THRESHOLDS)
    for key, value in (overrides or {}).items():
        if key not in THRESHOLDS:
            raise HastenError(f"unknown schedule-check threshold {key!r}; known: {', '.join(THRESHOLDS)}")
        if isinstance(value, bool) or not isinstance(value, (int, float)) or value < 0:
            raise HastenError(f"the schedule-check threshold {key} = {value!r} must be a number 0 or more")
        out[key] = value
    return out


def _share(key: str, title: str, items: list[str], base: int, unit: str, limit: float, fix: str,
           note: str = "", at_least: bool = False, count: int | None = None) -> Measure:
    """A measure of a share: ``count`` (default: the items) of ``base``."""
    count = len(items) if count is None else count
    if base == 0:
        return Measure(key, title, 0, 0, unit, None, limit, at_least, True, (), fix, f"no {unit} to count")
    share = count / base
    passed = share >= limit - 1e-12 if at_least else share <= limit + 1e-12
    return Measure(key, title, count, base, unit, share, limit, at_least, passed, tuple(items), fix, note)


def _link(link) -> str:
    return f"{link.pred} -> {link.succ} ({link.text().split(':', 1)[1] if ':' in link.text() else 'FS'})"


def assess(project: Project, overrides: dict | None = None, *, network: Network | None = None) -> QualityReport:
    """The schedule-quality check of ``project`` (see the module notes).

    Parameters
    ----------
    project : Project
    overrides : dict, optional
        Thresholds to use instead of :data:`THRESHOLDS`, by the same keys: shares as
        fractions (``{"lags": 0.10}``), days as whole working days.
    network : Network, optional
        The project's compiled network, when the caller has it already.

    Examples
    --------
    >>> from datetime import date
    >>> from hasten.project import Activity, Link, Project
    >>> p = Project("three", date(2027, 1, 4), (Activity("A", 5), Activity("B", 3), Activity("C", 2)),
    ...             (Link("A", "B"),))
    >>> report = assess(p)
    >>> report.summary()
    '1 of 8 measures fail (open ends)'
    >>> report.failed[0].items
    ('C (no predecessor, no successor)',)
    """
    limits = _thresholds(overrides)
    net = network if network is not None else Network(project)
    acts = project.activities
    states = net.progress.activities
    live = [k for k, s in enumerate(states) if s.state != DONE]
    is_live = [s.state != DONE for s in states]
    pos = net.index
    sched = schedule(net)
    rows = sched.activities
    measures = [_open_ends(project, net, live, rows, limits)]
    links = [k for k in project.links if is_live[pos[k.succ]]]
    measures.append(_share("leads", "leads", [_link(k) for k in links if k.lag < 0], len(links), "links",
                           limits["leads"], "replace each lead by the logic it stands for (split the "
                           "predecessor, or link from its start with a positive lag)"))
    measures.append(_share("lags", "lags", [_link(k) for k in links if k.lag > 0], len(links), "links",
                           limits["lags"], "model waits that take time as activities (curing, "
                           "approvals, deliveries) so they show and can be reviewed"))
    measures.append(_share("finish_to_start", "links other than FS",
                           [_link(k) for k in links if k.type is not LinkType.FS], len(links), "links",
                           limits["finish_to_start"], "use finish-to-start links where the work allows; "
                           "SS and FF pairs hide the path that drives the finish",
                           at_least=True, count=sum(1 for k in links if k.type is LinkType.FS)))
    dated = [f"{acts[k].id} (deadline {acts[k].deadline.isoformat()})" for k in live if acts[k].deadline]
    soft = sum(1 for k in live if acts[k].not_before)
    measures.append(_share("hard_constraints", "hard constraints", dated, len(live), "activities",
                           limits["hard_constraints"], "keep deadlines for the contract's own dates; "
                           "let logic drive the rest",
                           note=f"deadlines counted; {soft} not-before date{'' if soft == 1 else 's'} "
                                "(soft constraints) not counted"))
    days = int(limits["high_float_days"])
    high = [f"{rows[k].id} (float {rows[k].total_float})" for k in live if rows[k].total_float > days]
    measures.append(_share("high_float", "high float", high, len(live), "activities", limits["high_float"],
                           "tie the work to what really follows it; high float usually means a missing "
                           "successor", note=f"total float over {days} working days"))
    measures.append(_negative_float(project, net, live, limits))
    days = int(limits["high_duration_days"])
    long = [f"{acts[k].id} ({net.durations[k]} working days)" for k in live if net.durations[k] > days]
    measures.append(_share("high_duration", "long durations", long, len(live), "activities",
                           limits["high_duration"], "split long activities into parts that can be "
                           "tracked and linked", note=f"durations (still to do) over {days} working days"))
    measures.append(_invalid_dates(project, net, limits))
    measures.append(_critical_path_test(net, sched, limits))
    return QualityReport(project, tuple(measures), limits)


def _open_ends(project: Project, net: Network, live: list[int], rows, limits) -> Measure:
    """Activities with no FS/SS predecessor driving their start, or no FS/FF successor
    from their finish, other than the first and the last activity of the job."""
    acts = project.activities
    pos = net.index
    start_in, finish_out = set(), set()
    any_in, any_out = set(), set()
    for k in project.links:
        any_in.add(k.succ)
        any_out.add(k.pred)
        if k.type in (LinkType.FS, LinkType.SS):
            start_in.add(k.succ)
        if k.type in (LinkType.FS, LinkType.FF):
            finish_out.add(k.pred)
    no_start = [a.id for a in acts if a.id not in start_in]
    no_finish = [a.id for a in acts if a.id not in finish_out]
    # the first activity: the first without a predecessor that starts at day 0 (or the
    # first without one); the last: the last without a successor that ends at the finish
    ends = net.latest_finish(net.forward_finish())  # the project finish in each activity's calendar
    first = next((i for i in no_start if rows[pos[i]].es <= 0), no_start[0] if no_start else None)
    last = next((i for i in reversed(no_finish) if rows[pos[i]].ef >= ends[pos[i]]),
                no_finish[-1] if no_finish else None)
    items = []
    for k in live:
        a = acts[k]
        why = []
        if a.id not in start_in and a.id != first:
            why.append("no predecessor" if a.id not in any_in else "start not driven (only FF/SF in)")
        if a.id not in finish_out and a.id != last:
            why.append("no successor" if a.id not in any_out else "finish drives nothing (only SS/SF out)")
        if why:
            items.append(f"{a.id} ({', '.join(why)})")
    return _share("open_ends", "open ends", items, len(live), "activities", limits["open_ends"],
                  "link each to the work it really waits for and to the work that waits for it; an "
                  "open end is never critical, so the optimiser never shortens it",
                  note=f"first activity {first}, last {last} not counted")


def _negative_float(project: Project, net: Network, live: list[int], limits) -> Measure:
    fix = "the forecast misses the contract finish: recover (hasten recover) or agree a new date"
    contract = project.contract.finish
    if contract is None:
        return Measure("negative_float", "negative float", 0, len(live), "activities", None,
                       limits["negative_float"], False, True, (), fix, "no contract finish: not assessed")
    late = schedule(net, deadline=contract)
    items = [f"{late.activities[k].id} (float {late.activities[k].total_float})" for k in live
             if late.activities[k].total_float < 0]
    return _share("negative_float", "negative float", items, len(live), "activities", limits["negative_float"],
                  fix, note=f"backward pass from the contract finish {contract.isoformat()}")


def _invalid_dates(project: Project, net: Network, limits) -> Measure:
    """Dates that contradict progress at the data date. (Actual dates on or after the data
    date are refused when the project is read, and work not started is never scheduled
    before the data date.)"""
    fix = "bring the progress up to date: actual finishes for work that is done, logic that matches the order work was done"
    if project.data_date is None:
        return Measure("invalid_dates", "invalid dates", 0, len(project.activities), "activities", None,
                       limits["invalid_dates"], False, True, (), fix, "no data date: not assessed")
    items = []
    for e in sorted(net.progress.dropped):
        k = project.links[e]
        items.append(f"{k.succ} (out of sequence: link {_link(k)} broken by progress)")
    for a, s in zip(project.activities, net.progress.activities):
        if s.state == STARTED and s.duration == 0 and a.duration > 0:
            items.append(f"{a.id} (started, nothing left to do but no actual finish)")
    return _share("invalid_dates", "invalid dates", items, len(project.activities), "activities",
                  limits["invalid_dates"], fix, count=len(items))


def _critical_path_test(net: Network, sched, limits) -> Measure:
    """Make the first critical activity still to do longer by the test delay: the finish
    must move by as much (on one calendar; with calendars of their own, later at all)."""
    delay = int(limits["critical_path_delay_days"])
    fix = "find the link or constraint that absorbs the delay (a lag, an SS/FF pair, a date) and correct the logic"
    ids = [i for path in sched.critical_paths for i in path]
    k = next((net.index[i] for i in ids if not net.fixed[net.index[i]] and net.durations[net.index[i]] > 0), None)
    if k is None or delay <= 0:
        return Measure("critical_path_test", "critical path test", 0, 1, "test", None, 1.0, True, True, (), fix,
                       "no critical work left to delay: not assessed")
    d = list(net.durations)
    d[k] += delay
    moved = net.forward_finish(d) - sched.finish
    ok = moved == delay if not net.several else moved > 0
    item = f"{net.ids[k]} made {delay} working days longer: the finish moved {moved}"
    return Measure("critical_path_test", "critical path test", 0 if ok else 1, 1, "test", 0.0 if ok else 1.0,
                   0.0, False, ok, (item,), fix, item)

