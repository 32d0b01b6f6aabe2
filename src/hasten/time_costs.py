"""Time-related costs of a finish: indirect cost, liquidated damages and early bonus.

Indirect (site overhead) cost runs per working day of project duration. Damages and
bonus run per calendar day between the finish date (the last day worked) and the
contract finish date, as most contracts count them; the bonus may be capped in days.
"""

from __future__ import annotations

from dataclasses import dataclass

from .calendar import CalendarClock
from .project import Project

__all__ = ["TimeCosts", "time_costs", "net_time_costs"]


@dataclass(frozen=True)
class TimeCosts:
    indirect: float
    damages: float
    bonus: float
    days_late: int  # calendar days after the contract finish
    days_early: int  # calendar days before the contract finish

    @property
    def net(self) -> float:
        """What time costs in all: indirect plus damages less bonus."""
        return self.indirect + self.damages - self.bonus


def time_costs(project: Project, clock: CalendarClock, finish: int, *, floor: int = 0) -> TimeCosts:
    """Time-related costs of finishing after ``finish`` working days; ``floor``: the first
    working day the finish may be dated on (a milestone that cannot happen before it, see
    :meth:`hasten.network.Network.finish_date`)."""
    indirect = project.costs.indirect_per_day * finish
    contract = project.contract
    if contract.finish is None:
        return TimeCosts(indirect, 0.0, 0.0, 0, 0)
    delta = (clock.date_of(max(finish - 1, floor, 0)) - contract.finish).days
    late = max(delta, 0)
    early = max(-delta, 0)
    paid_early = early if contract.bonus_cap_days is None else min(early, contract.bonus_cap_days)
    return TimeCosts(indirect, contract.damages_per_day * late, contract.bonus_per_day * paid_early,
                     late, early)


def net_time_costs(project: Project, clock: CalendarClock, last: int, *, floor: int = 0):
    """``time_costs(project, clock, t, floor=floor).net`` for every finish ``t`` from 0 to
    ``last``, as a numpy array (the same arithmetic, one calendar lookup for all days)."""
    import numpy as np

    finish = np.arange(last + 1, dtype=np.int64)
    indirect = project.costs.indirect_per_day * finish.astype(float)
    contract = project.contract
    if contract.finish is None:
        return indirect
    offsets = np.maximum(finish - 1, max(floor, 0))
    days = np.array(clock.dates_of(offsets), dtype="datetime64[D]")
    delta = (days - np.datetime64(contract.finish, "D")).astype(np.int64)
    late = np.maximum(delta, 0)
    early = np.maximum(-delta, 0)
    paid_early = early if contract.bonus_cap_days is None else np.minimum(early, contract.bonus_cap_days)
    return indirect + contract.damages_per_day * late - contract.bonus_per_day * paid_early
