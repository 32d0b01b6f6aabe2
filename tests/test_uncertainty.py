"""Duration ranges and their draws (hasten.uncertainty).

Sources of the checks:

- scipy.stats (a general-purpose reference library): ``beta.cdf``, ``triang.cdf``,
  ``norm.ppf`` and ``multivariate_normal.cdf``; the incomplete beta function, both
  distribution functions and the copula's joint probabilities are checked against them;
- the PERT mean ``(a + 4m + b) / 6``: Malcolm, Roseboom, Clark & Fazar, "Application of a
  technique for research and development program evaluation", Operations Research 7(5),
  1959 (the PERT-beta with alpha = 1 + 4(m-a)/(b-a), beta = 1 + 4(b-m)/(b-a) has exactly
  that mean, alpha / (alpha + beta) = alpha / 6 of the range: Johnson, Kotz & Balakrishnan,
  Continuous Univariate Distributions vol. 2, 2nd ed., 1995, ch. 25, the beta mean);
- the triangular mean ``(a + m + b) / 3``: Kotz & van Dorp, Beyond Beta, 2004, ch. 1
  (# from memory);
- the whole-day rule, written out here: ``D = ceil(X)`` so ``P(D = k) = F(k) - F(k - 1)``
  with ``F`` from scipy; the exact discrete mean is computed in the test;
- Pearson's chi-square goodness-of-fit test (scipy.stats.chisquare) for the frequencies of
  whole-day draws, at the 0.1 % level, with a fixed seed;
- sampling error: a sample mean lies within 4 standard errors of the true mean (the
  normal approximation; a 4-sigma miss has probability 6e-5) # common practice.
"""

from __future__ import annotations

import math
from dataclasses import replace

import numpy as np
import pytest
from scipy import stats

from conftest import make_project
from hasten.errors import InputError
from hasten.project import Activity
from hasten.uncertainty import (DurationSampler, Spread, cdf, continuous_durations, duration_ranges,
                                parse_spread, regularized_beta)

RANGES = [(2.0, 4.0, 9.0), (3.0, 5.0, 6.0), (7.5, 10.0, 14.2), (1.0, 1.0, 6.0), (0.0, 3.0, 3.0)]


def scipy_cdf(x, a, m, b, distribution):
    if distribution == "pert":
        r = (m - a) / (b - a)
        return stats.beta.cdf(x, 1 + 4 * r, 1 + 4 * (1 - r), loc=a, scale=b - a)
    return stats.triang.cdf(x, (m - a) / (b - a), loc=a, scale=b - a)


def exact_pmf(a, m, b, distribution):
    """Whole days k and P(ceil(X) = k) from scipy's distribution function."""
    ks = np.arange(math.floor(a), math.ceil(b) + 1)
    f = scipy_cdf(ks.astype(float), a, m, b, distribution)
    return ks[1:], np.diff(f)


# -- the text of a range --------------------------------------------------------------------

@pytest.mark.parametrize("text, shorter, longer", [
    ("-10%, +25%", 0.10, 0.25), ("-10%,+25%", 0.10, 0.25), (" - 5.5 % , + 0 % ", 0.055, 0.0),
    ("0%, +25%", 0.0, 0.25), ("\u221210%, +25%", 0.10, 0.25), ("-0%, 0%", 0.0, 0.0)])
def test_a_range_is_read_from_its_text(text, shorter, longer):
    s = parse_spread(text)
    assert s.shorter == pytest.approx(shorter) and s.longer == pytest.approx(longer)


@pytest.mark.parametrize("text, words", [
    ("+25%", "is not two percentages"), ("-10%", "is not two percentages"),
    ("-10, +25", "is not two percentages"), ("ten, twenty", "is not two percentages"),
    ("-10%, +25%, +3%", "is not two percentages"), ("+10%, +25%", "shorter side first"),
    ("10%, +25%", "shorter side first"), ("-10%, -25%", "shorter side first"),
    ("-100%, +25%", "zero or negative")])
def test_a_bad_range_says_what_to_write(text, words):
    with pytest.raises(InputError) as err:
        parse_spread(text, column="range")
    assert words in str(err.value)
    assert err.value.column == "range" and err.value.value == text
    assert "-10%, +25%" in err.value.fix or "below 100%" in err.value.fix


def test_percent_ranges_of_a_ten_day_activity():
    # hand calculation: 10 days, "-10%, +25%" -> 9 to 12.5 working days
    assert Spread(0.10, 0.25).bounds(10) == (9.0, 12.5)
    # 10 * 1.1 is 11.000000000000002 in floating point; the bound is 11
    assert Spread(0.0, 0.10).bounds(10) == (10.0, 11.0)


# -- ranges of a project --------------------------------------------------------------------

def _project():
    return make_project([Activity("A", 10, trade="concrete"), Activity("B", 20, trade="steel"),
                         Activity("C", 8), Activity("M", 0, trade="concrete")], [])


def test_precedence_activity_then_trade_then_default():
    r = duration_ranges(_project(), default="-10%, +20%", by_trade={"steel": "-5%, +50%"},
                        ranges={"A": (7, None)})
    assert r.optimistic == (7.0, 19.0, 7.2, 0.0)  # A own; B steel 20*0.95; C default 8*0.9
    assert r.pessimistic == (12.0, 30.0, 9.6, 0.0)  # A's other side from the default: 10*1.2
    assert r.likely == (10, 20, 8, 0)


def test_activity_fields_are_read_when_the_project_has_them():
    act = Activity("A", 10)
    object.__setattr__(act, "optimistic", 8)  # a field the formats will add
    object.__setattr__(act, "pessimistic", 15)
    r = duration_ranges(make_project([act], []))
    assert (r.optimistic, r.pessimistic) == ((8.0,), (15.0,))


def test_without_ranges_nothing_is_uncertain():
    r = duration_ranges(_project())
    assert r.optimistic == r.pessimistic == (10.0, 20.0, 8.0, 0.0)


@pytest.mark.parametrize("kwargs, column, words", [
    ({"ranges": {"A": (11, None)}}, "optimistic", "more than its duration"),
    ({"ranges": {"A": (None, 9)}}, "pessimistic", "less than its duration"),
    ({"ranges": {"A": (2.5, None)}}, "optimistic", "not a whole number"),
    ({"ranges": {"M": (None, 2)}}, "pessimistic", "is a milestone"),
    ({"ranges": {"Z": (1, 2)}}, "id", "does not have"),
    ({"by_trade": {"glazing": "-5%, +5%"}}, "trade", "which no activity has"),
    ({"correlation": {"steel": 1.5}}, "correlation", "correlation weight"),
    ({"correlation": {"roofing": 0.5}}, "trade", "which no activity has"),
    ({"distribution": "normal"}, "distribution", "unknown distribution"),
    ({"default": "+10%"}, "default range", "not two percentages")])
def test_bad_ranges_are_refused_clearly(kwargs, column, words):
    with pytest.raises(InputError) as err:
        duration_ranges(_project(), **kwargs)
    assert err.value.column == column and words in str(err.value) and err.value.fix


def test_a_milestone_has_no_uncertainty_even_under_a_default():
    r = duration_ranges(_project(), default="-50%, +50%")
    assert (r.optimistic[3], r.pessimistic[3]) == (0.0, 0.0)


# -- distribution functions against scipy ---------------------------------------------------

@pytest.mark.parametrize("alpha", [1.0, 1.3, 2.0, 2.7, 3.9, 5.0])
def test_incomplete_beta_matches_scipy(alpha):
    x = np.linspace(0.0, 1.0, 201)
    got = regularized_beta(x, alpha, 6.0 - alpha)
    assert np.abs(got - stats.beta.cdf(x, alpha, 6.0 - alpha)).max() < 1e-13


@pytest.mark.parametrize("distribution", ["pert", "triangular"])
@pytest.mark.parametrize("a, m, b", RANGES)
def test_distribution_functions_match_scipy(distribution, a, m, b):
    x = np.linspace(a - 1, b + 1, 97)
    assert np.abs(cdf(x, a, m, b, distribution) - scipy_cdf(x, a, m, b, distribution)).max() < 1e-13


# -- the continuous draws: published means ---------------------------------------------------

@pytest.mark.parametrize("a, m, b", RANGES)
def test_continuous_draws_have_the_published_means(a, m, b):
    rng = np.random.default_rng(11)
    n = 200_000
    tri = continuous_durations(rng, a, m, b, "triangular", n)
    pert = continuous_durations(rng, a, m, b, "pert", n)
    assert tri.min() >= a and tri.max() <= b and pert.min() >= a and pert.max() <= b
    # Kotz & van Dorp 2004 ch. 1: (a + m + b) / 3  # from memory
    assert abs(tri.mean() - (a + m + b) / 3) < 4 * tri.std() / math.sqrt(n)
    # Malcolm, Roseboom, Clark & Fazar 1959: (a + 4m + b) / 6
    assert abs(pert.mean() - (a + 4 * m + b) / 6) < 4 * pert.std() / math.sqrt(n)


# -- whole days ------------------------------------------------------------------------------

@pytest.mark.parametrize("distribution", ["pert", "triangular"])
def test_whole_day_draws_follow_the_rounded_up_distribution(distribution):
    a, m, b = np.array(RANGES).T
    sampler = DurationSampler(a, m, b, distribution)
    assert sampler.uncertain.tolist() == [0, 1, 2, 3, 4]
    n = 100_000
    d = sampler.durations(sampler.scores(np.random.default_rng(5), n))
    for row, (lo, mode, hi) in enumerate(RANGES):
        ks, p = exact_pmf(lo, mode, hi, distribution)
        mean = float((ks * p).sum())  # the exact discrete expectation E[ceil(X)]
        sd = math.sqrt(float(((ks - mean) ** 2 * p).sum()))
        assert abs(d[row].mean() - mean) < 4 * sd / math.sqrt(n)
        assert d[row].min() >= ks[p > 0].min() and d[row].max() <= ks[p > 0].max()
        seen = np.array([(d[row] == k).sum() for k in ks[p > 0]])
        assert seen.sum() == n
        assert stats.chisquare(seen, p[p > 0] / p[p > 0].sum() * n).pvalue > 1e-3
        # the sampler's own table gives the same probabilities
        own = sampler.pmf()[row]
        assert np.allclose(own[:len(p)], p, atol=1e-12) and np.allclose(own[len(p):], 0)


def test_no_range_no_draw():
    sampler = DurationSampler([3, 5, 0], [3, 5, 0], [3, 6, 0])
    assert sampler.uncertain.tolist() == [1]


# -- correlation by trade --------------------------------------------------------------------

def test_full_weight_moves_a_trade_together():
    sampler = DurationSampler([8, 8, 8], [10, 10, 10], [15, 15, 15], "pert", [0, 0, -1], [1.0])
    d = sampler.durations(sampler.scores(np.random.default_rng(3), 20_000))
    assert (d[0] == d[1]).all()
    assert (d[0] != d[2]).mean() > 0.5


@pytest.mark.parametrize("distribution", ["pert", "triangular"])
def test_the_copula_keeps_each_distribution_and_couples_by_weight_squared(distribution):
    w = 0.8
    a, m, b = (2.0, 5.0, 11.0)
    sampler = DurationSampler([a, a], [m, m], [b, b], distribution, [0, 0], [w])
    n = 100_000
    d = sampler.durations(sampler.scores(np.random.default_rng(9), n))
    ks, p = exact_pmf(a, m, b, distribution)
    for row in (0, 1):  # each marginal is still the rounded-up distribution
        seen = np.array([(d[row] == k).sum() for k in ks[p > 0]])
        assert stats.chisquare(seen, p[p > 0] / p[p > 0].sum() * n).pvalue > 1e-3
    # P(D1 <= k1, D2 <= k2) = bivariate normal at Phi^-1(F(k)) with correlation w^2
    # (the one-factor model z_i = w z + sqrt(1 - w^2) e_i; Nelsen 2006 s. 3.3.1, # from memory)
    biv = stats.multivariate_normal(mean=[0, 0], cov=[[1, w * w], [w * w, 1]])
    for k1, k2 in [(4, 4), (5, 6), (3, 7), (6, 6)]:
        z = stats.norm.ppf(scipy_cdf(np.array([k1, k2], float), a, m, b, distribution))
        exact = biv.cdf(z)
        got = ((d[0] <= k1) & (d[1] <= k2)).mean()
        assert abs(got - exact) < 4 * math.sqrt(exact * (1 - exact) / n)


def test_ranges_carry_the_trade_weights():
    r = duration_ranges(_project(), default="-10%, +20%", correlation={"concrete": 0.5})
    assert r.trades == ("concrete",) and r.weights == (0.5,) and r.group == (0, -1, -1, 0)
    assert r.correlated and not replace(r, weights=(0.0,)).correlated
