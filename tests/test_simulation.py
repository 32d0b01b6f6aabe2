"""Monte Carlo simulation of the schedule (hasten.simulation).

Sources of the checks:

- exact distributions computed in this file: each uncertain duration is ``ceil(X)``, so
  ``P(D = k) = F(k) - F(k - 1)`` with ``F`` from scipy.stats (beta, triang); the finish of a
  chain is the convolution of its durations (``numpy.convolve``) shifted by the lags; two
  independent parallel paths finish by ``t`` with probability ``P(path <= t)^2``;
- sampling error: the one-sample Kolmogorov-Smirnov bound ``1.628 / sqrt(n)`` at the 1 %
  level (Smirnov 1948 table; conservative for discrete distributions; # from memory), and
  4 binomial standard errors for a share # common practice; fixed seeds throughout;
- the CPM engine (hasten.network.schedule), run once per run on the very durations the
  simulation drew, and an independent forward pass (conftest.own_forward) on one calendar:
  every run's finish, early starts and critical set must agree (with zero uncertainty every
  run is the deterministic CPM schedule);
- scipy.stats.spearmanr on the per-run durations and finishes for the drivers' rho;
- dates written out with Python's datetime for the contract and milestone damages (per
  calendar day late, as hasten.time_costs counts them).
"""

from __future__ import annotations

import math
from datetime import date, timedelta

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st
from scipy import stats

from conftest import PROPERTY, START, make_project, own_forward, projects
from hasten.errors import HastenError, InputError
from hasten.cpm import schedule
from hasten.network import Network
from hasten.project import Activity, Calendar, Contract, Link, LinkType, Project
from hasten.simulation import BLOCK, RiskModel, run_chunk, simulate
from hasten.uncertainty import duration_ranges

FS, SS, FF, SF = LinkType.FS, LinkType.SS, LinkType.FF, LinkType.SF
CRANE = Calendar((0, 1, 2, 3, 4, 5, 6), (), "crane")  # works every day
SIX = Calendar((0, 1, 2, 3, 4, 5), (), "six-day")
KS_1PCT = 1.628


def day_pmf(a, m, b, distribution="pert"):
    """Whole days k (from 0) and P(ceil(X) = k), from scipy's distribution function."""
    ks = np.arange(0, math.ceil(b) + 1)
    if a == b:
        return (ks == m).astype(float)
    r = (m - a) / (b - a)
    if distribution == "pert":
        f = stats.beta.cdf(ks.astype(float), 1 + 4 * r, 1 + 4 * (1 - r), loc=a, scale=b - a)
    else:
        f = stats.triang.cdf(ks.astype(float), r, loc=a, scale=b - a)
    return np.diff(f, prepend=0.0)


def ks_distance(sample: np.ndarray, pmf: np.ndarray) -> float:
    counts = np.bincount(sample, minlength=len(pmf))
    assert len(counts) == len(pmf), "a draw fell outside the exact support"
    return float(np.abs(np.cumsum(counts) / len(sample) - np.cumsum(pmf)).max())


def finishes(model: RiskModel, runs: int) -> tuple[np.ndarray, np.ndarray]:
    """Every run's durations and finish, straight from the chunk function."""
    blocks = math.ceil(runs / BLOCK)
    return model.durations(runs, 0, blocks), run_chunk(model, runs, 0, blocks)["finish"]


# -- exact distributions --------------------------------------------------------------------

CHAIN = {"A": (2, 4, 9), "B": (3, 5, 6), "C": (7, 10, 14)}


@pytest.mark.parametrize("distribution", ["pert", "triangular"])
def test_a_chain_finishes_as_the_convolution_of_its_durations(distribution):
    acts = [Activity(k, m) for k, (a, m, b) in CHAIN.items()]
    project = make_project(acts, [Link("A", "B", FS, 2), Link("B", "C", FS, -1)])
    ranges = duration_ranges(project, ranges={k: (a, b) for k, (a, m, b) in CHAIN.items()},
                             distribution=distribution)
    runs = 20_000
    res = simulate(project, ranges, runs, seed=4)
    exact = np.convolve(np.convolve(day_pmf(*CHAIN["A"], distribution), day_pmf(*CHAIN["B"], distribution)),
                        day_pmf(*CHAIN["C"], distribution))
    exact = np.concatenate([np.zeros(1), exact])  # lags +2 and -1: the finish is the sum + 1
    sample = np.repeat([f for f, _ in res.finish_counts], [c for _, c in res.finish_counts])
    assert ks_distance(sample, exact) < KS_1PCT / math.sqrt(runs)
    mean = float((np.arange(len(exact)) * exact).sum())
    sd = math.sqrt(float(((np.arange(len(exact)) - mean) ** 2 * exact).sum()))
    assert abs(res.mean_finish - mean) < 4 * sd / math.sqrt(runs)
    # the percentiles are the sample's: the least finish reached by that share of runs
    for key, p in (("p10", 10), ("p50", 50), ("p80", 80), ("p90", 90)):
        assert (sample <= res.percentiles[key]).mean() >= p / 100 > (sample <= res.percentiles[key] - 1).mean()


def test_two_independent_parallel_paths_meet_a_date_with_the_square():
    # two identical paths of two activities each, joined by a milestone
    acts = [Activity(x, 5) for x in ("A1", "A2", "B1", "B2")] + [Activity("END", 0)]
    links = [Link("A1", "A2"), Link("B1", "B2"), Link("A2", "END"), Link("B2", "END")]
    project = make_project(acts, links)
    ranges = duration_ranges(project, default="-20%, +60%")  # 4 to 8 days each
    path = np.convolve(day_pmf(4, 5, 8), day_pmf(4, 5, 8))
    runs = 20_000
    for t in (10, 11, 12, 13):
        one = float(path[:t + 1].sum())
        res = simulate(project, ranges, runs, seed=8, target=t)
        assert abs(res.p_meet_target - one ** 2) < 4 * math.sqrt(one ** 2 * (1 - one ** 2) / runs)
    # correlated fully (one trade, weight 1): all four durations are one draw D, the
    # finish is 2 D, and it meets t = 11 when D <= 5
    same = make_project([Activity(a.id, a.duration, trade="fitout" if a.duration else "") for a in acts], links)
    tied = duration_ranges(same, default="-20%, +60%", correlation={"fitout": 1.0})
    t = 11
    one = float(day_pmf(4, 5, 8)[:6].sum())
    res = simulate(same, tied, runs, seed=8, target=t)
    assert abs(res.p_meet_target - one) < 4 * math.sqrt(one * (1 - one) / runs)


def test_started_work_varies_only_what_remains():
    # A: 10 days with range 5..20, started on the project start, 4 days remaining at the
    # data date (Monday 2024-01-15 = working day 10); its range scales by 4/10 to 2..8
    acts = [Activity("A", 10, actual_start=START, remaining=4), Activity("P", 3, actual_start=START,
                                                                        actual_finish=date(2024, 1, 3))]
    project = Project("status", START, tuple(acts), (Link("P", "A", SS),), data_date=date(2024, 1, 15))
    ranges = duration_ranges(project, ranges={"A": (5, 20), "P": (1, 9)})
    runs = 20_000
    res = simulate(project, ranges, runs, seed=2)
    exact = np.concatenate([np.zeros(10), day_pmf(2.0, 4.0, 8.0)])  # finish = 10 + remaining
    sample = np.repeat([f for f, _ in res.finish_counts], [c for _, c in res.finish_counts])
    assert ks_distance(sample, exact) < KS_1PCT / math.sqrt(runs)
    assert res.criticality["P"] == 0.0 and res.criticality["A"] == 1.0  # finished work: never critical
    assert "P" not in res.sensitivity  # finished work carries no uncertainty


# -- the CPM engine, run by run ---------------------------------------------------------------

def _mixed_calendars_project() -> Project:
    acts = (Activity("A", 4, calendar="crane"), Activity("B", 6), Activity("C", 3, calendar="six-day"),
            Activity("D", 5), Activity("E", 2, calendar="crane"), Activity("F", 7, calendar="six-day"),
            Activity("G", 0), Activity("H", 4))
    links = (Link("A", "B", FS, 1), Link("A", "C", SS, 2), Link("B", "D", FF, 1), Link("C", "D", FS),
             Link("C", "E", SF, 3), Link("D", "F", SS, -1), Link("E", "F"), Link("F", "G"), Link("D", "H", FS, 2),
             Link("H", "G", FF))
    return Project("mixed", START, acts, links, calendars=(CRANE, SIX))


def _agree_run_by_run(project: Project, ranges, runs: int = 40, seed: int = 1) -> None:
    net = Network(project)
    model = RiskModel(net, ranges, seed)
    d = model.durations(runs, 0, math.ceil(runs / BLOCK))
    es = model.forward(d)
    finish = model.finish(es + d)
    ls = model.backward(d, finish)
    for r in range(runs):
        sched = schedule(net, d[:, r].tolist())
        assert sched.finish == finish[r]
        waiting = [k for k, shown in enumerate(net.shown_start) if shown is None]  # (started: actual start shown)
        assert [sched.activities[k].es for k in waiting] == es[waiting, r].tolist()
        tf = ls[:, r] - es[:, r]
        live = ~np.asarray(net.fixed)
        crit = (tf == tf[live].min()) & live if live.any() else live
        assert [a.critical for a in sched.activities] == crit.tolist()


def test_each_run_is_the_cpm_schedule_of_its_durations_with_calendars_and_mixed_links():
    project = _mixed_calendars_project()
    _agree_run_by_run(project, duration_ranges(project, default="-30%, +60%"))


def test_with_progress_each_run_is_the_cpm_schedule_of_its_durations():
    acts = (Activity("A", 4, calendar="crane", actual_start=START, actual_finish=date(2024, 1, 3)),
            Activity("B", 6, actual_start=date(2024, 1, 4), remaining=3), Activity("C", 3, calendar="six-day"),
            Activity("D", 5, not_before=date(2024, 1, 22)), Activity("E", 2, calendar="crane"), Activity("F", 7))
    links = (Link("A", "B"), Link("A", "C", SS, 2), Link("B", "D", FF, 1), Link("C", "D"), Link("C", "E", SF, 3),
             Link("D", "F", SS, -1), Link("E", "F"))
    project = Project("status", START, acts, links, calendars=(CRANE, SIX), data_date=date(2024, 1, 10))
    _agree_run_by_run(project, duration_ranges(project, default="-30%, +60%"))


@PROPERTY
@given(projects(max_n=8, crashable=False), st.lists(st.sampled_from(["", "crane", "six-day"]), min_size=8,
                                                     max_size=8), st.integers(0, 2 ** 32))
def test_random_networks_agree_with_the_engine_run_by_run(base, cals, seed):
    acts = tuple(Activity(a.id, a.duration, calendar=c) for a, c in zip(base.activities, cals))
    project = Project("random", START, acts, base.links, calendars=(CRANE, SIX))
    _agree_run_by_run(project, duration_ranges(project, default="-40%, +80%", distribution="triangular"),
                      runs=12, seed=seed)


@PROPERTY
@given(projects(max_n=8, crashable=False), st.integers(0, 2 ** 32))
def test_on_one_calendar_each_run_matches_an_independent_forward_pass(project, seed):
    net = Network(project)
    model = RiskModel(net, duration_ranges(project, default="-40%, +80%"), seed)
    d, finish = finishes(model, 12)
    for r in range(12):
        own, _ = own_forward(project, dict(zip(net.ids, d[:, r].tolist())))
        assert own == finish[r]


@pytest.mark.parametrize("build", ["mixed", "hendrickson"])
def test_zero_uncertainty_gives_the_cpm_finish_and_critical_set(build):
    if build == "mixed":
        project = _mixed_calendars_project()
    else:
        from conftest import load_json, project_from_example
        project = project_from_example(load_json("examples/hendrickson_9act_cpm.json"))
    sched = schedule(project)
    res = simulate(project, duration_ranges(project), 250, seed=3)
    assert res.finish_counts == ((sched.finish, 250),)
    assert res.percentiles == {"p10": sched.finish, "p50": sched.finish, "p80": sched.finish, "p90": sched.finish}
    assert res.p_meet_planned == 1.0 and res.planned_finish == sched.finish
    assert {k for k, v in res.criticality.items() if v == 1.0} == set(sched.critical_ids)
    assert all(v in (0.0, 1.0) for v in res.criticality.values())
    assert res.sensitivity == {} and res.drivers == ()


# -- reproducibility ------------------------------------------------------------------------

def test_the_same_seed_gives_the_same_figures_whatever_the_chunks():
    project = _mixed_calendars_project()
    ranges = duration_ranges(project, default="-30%, +60%", correlation={})
    one = simulate(project, ranges, 1_050, seed=21, chunk=10_000)
    many = simulate(project, ranges, 1_050, seed=21, chunk=BLOCK)
    odd = simulate(project, ranges, 1_050, seed=21, chunk=250)
    assert one == many == odd
    assert simulate(project, ranges, 1_050, seed=22) != one


def test_block_streams_are_the_spawned_children_of_the_seed():
    # numpy: SeedSequence(seed).spawn(n)[b] is SeedSequence(seed, spawn_key=(b,))
    child = np.random.SeedSequence(21).spawn(5)[3]
    assert np.array_equal(child.generate_state(4), np.random.SeedSequence(21, spawn_key=(3,)).generate_state(4))


def test_progress_is_reported_per_chunk():
    project = _mixed_calendars_project()
    seen = []
    simulate(project, duration_ranges(project, default="-10%, +10%"), 450, seed=1, chunk=200,
             progress=lambda done, total: seen.append((done, total)))
    assert seen == [(200, 450), (400, 450), (450, 450)]


def test_a_seed_is_chosen_and_reported_when_none_is_given():
    project = _mixed_calendars_project()
    ranges = duration_ranges(project, default="-10%, +30%")
    res = simulate(project, ranges, 200)
    assert simulate(project, ranges, 200, seed=res.seed) == res


# -- drivers, contract, milestones -------------------------------------------------------------

def test_drivers_rho_is_spearmans_of_duration_and_finish():
    project = _mixed_calendars_project()
    ranges = duration_ranges(project, default="-30%, +60%")
    runs = 3_000
    res = simulate(project, ranges, runs, seed=5, drivers=3)
    d, finish = finishes(RiskModel(Network(project), ranges, 5), runs)
    ids = [a.id for a in project.activities]
    for k, act_id in enumerate(ids):
        if act_id in res.sensitivity:
            assert res.sensitivity[act_id] == pytest.approx(stats.spearmanr(d[k], finish).statistic, abs=1e-9)
    ranked = sorted((v for v in res.sensitivity.values() if v > 0), reverse=True)[:3]
    assert [x.rho for x in res.drivers] == ranked
    assert all(x.criticality == res.criticality[x.id] for x in res.drivers)


def test_contract_and_milestone_damages_per_calendar_day_late():
    # A then B then the milestone M; damages 1000 per calendar day past the contract date,
    # 300 per calendar day past M's deadline. Mon-Fri from Monday 2024-01-01.
    acts = (Activity("A", 5), Activity("B", 4), Activity("M", 0, deadline=date(2024, 1, 10), damages_per_day=300))
    project = Project("lds", START, acts, (Link("A", "B"), Link("B", "M")),
                      contract=Contract(finish=date(2024, 1, 11), damages_per_day=1000.0))
    ranges = duration_ranges(project, ranges={"A": (3, 9), "B": (2, 8)})
    runs = 4_000
    res = simulate(project, ranges, runs, seed=6, target=8)

    def last_day(finish: int) -> date:  # the last working day of `finish` working days, by hand
        day, left = START, max(finish, 1) - 1
        while left:
            day += timedelta(days=1)
            left -= day.weekday() < 5
        return day

    total = sum(c for _, c in res.finish_counts)
    assert total == runs
    late = {f: max(0, (last_day(f) - date(2024, 1, 11)).days) for f, _ in res.finish_counts}
    assert res.expected_damages == pytest.approx(sum(c * 1000 * late[f] for f, c in res.finish_counts) / runs)
    assert res.p_meet_contract == sum(c for f, c in res.finish_counts if last_day(f) <= date(2024, 1, 11)) / runs
    assert res.p_meet_target == sum(c for f, c in res.finish_counts if f <= 8) / runs
    (m,) = res.milestones
    # M finishes with B: its date is the last day of the finish, as for the project
    m_late = {f: max(0, (last_day(f) - date(2024, 1, 10)).days) for f, _ in res.finish_counts}
    assert m.p_meet == sum(c for f, c in res.finish_counts if m_late[f] == 0) / runs
    assert m.expected_damages == pytest.approx(sum(c * 300 * m_late[f] for f, c in res.finish_counts) / runs)
    assert res.percentile_dates["p50"] == last_day(res.percentiles["p50"])
    assert 0 < res.p_meet_contract < 1 and res.expected_damages > 0


# -- bad input ------------------------------------------------------------------------------

@pytest.mark.parametrize("runs, seed, column", [(0, 1, "runs"), (2.5, 1, "runs"), (10, -1, "seed"),
                                                (10, "x", "seed")])
def test_bad_runs_or_seed(runs, seed, column):
    project = _mixed_calendars_project()
    with pytest.raises(InputError) as err:
        simulate(project, duration_ranges(project), runs, seed)
    assert err.value.column == column and err.value.fix


def test_ranges_of_another_project_are_refused():
    project = _mixed_calendars_project()
    other = make_project([Activity("A", 1)], [])
    with pytest.raises(HastenError, match="another project"):
        simulate(project, duration_ranges(other), 10, 1)
