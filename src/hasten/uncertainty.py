"""Duration uncertainty: three-point ranges, their distributions and whole-day draws.

Each activity may have a range of working days: ``optimistic`` <= ``duration`` (the most
likely) <= ``pessimistic``. Ranges come, in this order of precedence, from the activity
itself (fields ``optimistic`` / ``pessimistic``, or a mapping passed in), from a default for
its trade, or from a default for every activity, the defaults written as text such as
``"-10%, +25%"`` (at most 10 % shorter, at most 25 % longer). An activity with none of
these has no uncertainty; nor has a milestone (it takes no time) or finished work.

Two distributions over ``[a, b]`` with mode ``m``:

- **triangular**: density rising linearly from ``a`` to ``m`` and falling to ``b``; mean
  ``(a + m + b) / 3`` (Kotz & van Dorp, *Beyond Beta*, 2004, ch. 1; Johnson, Kotz &
  Balakrishnan, *Continuous Univariate Distributions*, vol. 2, 2nd ed., 1995);
- **PERT-beta**: ``a + (b - a) Y`` with ``Y ~ Beta(alpha, beta)``,
  ``alpha = 1 + 4 (m - a) / (b - a)``, ``beta = 1 + 4 (b - m) / (b - a)``; its mean is the
  PERT mean ``(a + 4 m + b) / 6`` of Malcolm, Roseboom, Clark & Fazar, "Application of a
  technique for research and development program evaluation", *Operations Research* 7(5),
  1959, pp. 646-669 (this parameterisation as in Vose, *Risk Analysis*, 3rd ed., 2008).

**Whole days.** A drawn duration ``X`` is rounded up, ``D = ceil(X)``: part of a working day
occupies the day. So ``P(D <= k) = F(k)``, the distribution function at whole days, and a
draw is the least whole ``k`` with ``u <= F(k)`` for a uniform ``u``: hasten tabulates
``F`` at the whole days of each range once and looks draws up in the table, which is exact
and needs no inverse distribution function. (Rounding up adds about half a day to the
mean: ``E[D] = sum_k k (F(k) - F(k - 1))``.)

**Correlation by trade** (optional): a one-factor Gaussian copula. Each trade ``g`` with a
weight ``w_g`` in [0, 1] draws one standard normal ``z_g`` per run and each of its
activities ``z_i = w_g z_g + sqrt(1 - w_g^2) e_i`` with its own ``e_i``; ``u_i = Phi(z_i)``
(Nelsen, *An Introduction to Copulas*, 2nd ed., 2006, section 3.3.1). Each activity keeps its
own distribution; two activities of one trade have normal scores correlated ``w_g^2``.
The table is then held in normal scores, ``Phi^-1(F(k))`` (``statistics.NormalDist``), so
``D <= k`` exactly when ``z_i <= Phi^-1(F(k))``.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass
from statistics import NormalDist
from typing import Mapping

import numpy as np

from .errors import InputError
from .project import Project

__all__ = [
    "DISTRIBUTIONS",
    "Spread",
    "parse_spread",
    "Ranges",
    "duration_ranges",
    "project_ranges",
    "cdf",
    "regularized_beta",
    "continuous_durations",
    "DurationSampler",
]

DISTRIBUTIONS = ("pert", "triangular")

_PART = re.compile(r"^\s*([+-]?)\s*(\d+(?:\.\d*)?|\.\d+)\s*%\s*$")
_SPREAD_FIX = ('write two percentages, how much shorter and how much longer than the duration, '
               'e.g. "-10%, +25%"')


@dataclass(frozen=True)
class Spread:
    """A range relative to the duration: at most ``shorter`` and at most ``longer`` of it
    (fractions: 0.1 is 10 %)."""

    shorter: float
    longer: float

    def bounds(self, duration: float) -> tuple[float, float]:
        """Optimistic and pessimistic working days for ``duration``."""
        # (rounded to a billionth: 10 * 1.1 is 11.000000000000002 in floating point)
        return round(duration * (1.0 - self.shorter), 9), round(duration * (1.0 + self.longer), 9)


def parse_spread(text: str | Spread, *, column: str = "range") -> Spread:
    """Read a range written as ``"-10%, +25%"``.

    >>> parse_spread("-10%, +25%")
    Spread(shorter=0.1, longer=0.25)
    >>> parse_spread("+25%")
    Traceback (most recent call last):
    ...
    hasten.errors.InputError: column 'range': the range '+25%' is not two percentages (value: '+25%'). Fix: write two percentages, how much shorter and how much longer than the duration, e.g. "-10%, +25%"
    """
    if isinstance(text, Spread):
        return text
    raw = str(text).replace("\u2212", "-")
    parts = raw.split(",")
    found = [_PART.match(p) for p in parts]
    if len(parts) != 2 or not all(found):
        raise InputError(f"the range {text!r} is not two percentages", column=column, value=text,
                         fix=_SPREAD_FIX)
    (s1, v1), (s2, v2) = [(m.group(1), float(m.group(2))) for m in found]
    if (s1 == "+" and v1) or (s2 == "-" and v2) or (not s1 and v1):
        raise InputError(f"the range {text!r} must give the shorter side first (minus) and the "
                         f"longer side second (plus)", column=column, value=text, fix=_SPREAD_FIX)
    if v1 >= 100:
        raise InputError(f"the range {text!r} would make durations zero or negative", column=column,
                         value=text, fix="keep the shorter side below 100%")
    return Spread(v1 / 100.0, v2 / 100.0)


@dataclass(frozen=True)
class Ranges:
    """Three-point ranges of every activity of a project, in project activity order.

    ``optimistic[i] <= likely[i] <= pessimistic[i]`` in working days (the defaults in
    percent may give fractions); equal values mean no uncertainty. ``group[i]`` is the index
    in ``trades`` of the activity's correlated trade, or -1; ``weights`` holds each trade's
    weight ``w_g``.
    """

    optimistic: tuple[float, ...]
    likely: tuple[int, ...]
    pessimistic: tuple[float, ...]
    distribution: str = "pert"
    group: tuple[int, ...] = ()
    trades: tuple[str, ...] = ()
    weights: tuple[float, ...] = ()

    @property
    def correlated(self) -> bool:
        return any(w > 0 for w in self.weights)


def _whole(act_id: str, column: str, value) -> int:
    if isinstance(value, bool) or not isinstance(value, (int, float)) or value != int(value) or value < 0:
        raise InputError(f"activity {act_id} has {column} {value!r}, not a whole number of working days",
                         column=column, value=value, fix="give a whole number of working days, 0 or more")
    return int(value)


def duration_ranges(project: Project, *, default: str | Spread | None = None,
                    by_trade: Mapping[str, str | Spread] | None = None,
                    ranges: Mapping[str, tuple[int | None, int | None]] | None = None,
                    distribution: str = "pert",
                    correlation: Mapping[str, float] | None = None) -> Ranges:
    """The range of every activity of ``project``.

    Parameters
    ----------
    default : text such as ``"-10%, +25%"`` for every activity without a range of its own.
    by_trade : such text per trade; it takes precedence over ``default``.
    ranges : ``{activity id: (optimistic, pessimistic)}`` in working days, taking precedence
        over the activity's own ``optimistic`` / ``pessimistic`` fields (when the project
        has them) and over the defaults. A side given as ``None`` comes from the default
        that applies to the activity, or is the duration itself.
    distribution : ``"pert"`` (PERT-beta) or ``"triangular"``.
    correlation : ``{trade: weight}``, each weight in [0, 1] (see the module notes).
    """
    if distribution not in DISTRIBUTIONS:
        raise InputError(f"unknown distribution {distribution!r}", column="distribution", value=distribution,
                         fix=f"use one of: {', '.join(DISTRIBUTIONS)}")
    trades_present = {a.trade for a in project.activities if a.trade}
    base = None if default is None else parse_spread(default, column="default range")
    per_trade: dict[str, Spread] = {}
    for trade, text in (by_trade or {}).items():
        if trade not in trades_present:
            raise InputError(f"a range is given for trade {trade!r}, which no activity has",
                             column="trade", value=trade,
                             fix=f"use one of the project's trades: {', '.join(sorted(trades_present)) or 'none'}")
        per_trade[trade] = parse_spread(text, column=f"range of trade {trade}")
    known = {a.id for a in project.activities}
    for act_id in (ranges or {}):
        if act_id not in known:
            raise InputError(f"a range is given for activity {act_id!r}, which the project does not have",
                             column="id", value=act_id, fix="check the activity id")
    trades = tuple(sorted((correlation or {}).keys()))
    weights = []
    for trade in trades:
        w = correlation[trade]
        if trade not in trades_present:
            raise InputError(f"a correlation is given for trade {trade!r}, which no activity has",
                             column="trade", value=trade,
                             fix=f"use one of the project's trades: {', '.join(sorted(trades_present)) or 'none'}")
        if isinstance(w, bool) or not isinstance(w, (int, float)) or not 0.0 <= w <= 1.0:
            raise InputError(f"the correlation weight of trade {trade} is {w!r}", column="correlation",
                             value=w, fix="give a weight from 0 (independent) to 1 (moving together)")
        weights.append(float(w))
    slot = {t: k for k, t in enumerate(trades)}
    lows, highs, group = [], [], []
    for a in project.activities:
        spread = per_trade.get(a.trade, base)
        lo, hi = spread.bounds(a.duration) if spread is not None else (a.duration, a.duration)
        own = (ranges or {}).get(a.id)
        if own is None:
            own = (getattr(a, "optimistic", None), getattr(a, "pessimistic", None))
        o, p = own
        if o is not None:
            lo = _whole(a.id, "optimistic", o)
            if lo > a.duration:
                raise InputError(f"activity {a.id} has optimistic {lo} days, more than its duration "
                                 f"{a.duration}", column="optimistic", value=lo,
                                 fix="the optimistic duration is the shortest: at most the duration")
        if p is not None:
            hi = _whole(a.id, "pessimistic", p)
            if hi < a.duration:
                raise InputError(f"activity {a.id} has pessimistic {hi} days, less than its duration "
                                 f"{a.duration}", column="pessimistic", value=hi,
                                 fix="the pessimistic duration is the longest: at least the duration")
        if a.duration == 0:
            if (o is not None and lo) or (p is not None and hi):
                raise InputError(f"activity {a.id} is a milestone (duration 0) and takes no time, so it "
                                 f"has no range", column="pessimistic" if hi else "optimistic",
                                 value=hi or lo, fix="leave optimistic and pessimistic empty for a milestone")
            lo = hi = 0
        lows.append(float(lo))
        highs.append(float(hi))
        group.append(slot.get(a.trade, -1))
    return Ranges(tuple(lows), tuple(a.duration for a in project.activities), tuple(highs), distribution,
                  tuple(group), trades, tuple(weights))


def project_ranges(project: Project) -> Ranges:
    """The ranges the project itself gives: each activity's own ``optimistic`` /
    ``pessimistic`` days, then its trade's range, then the default of ``project.risk``
    (the ``[risk]`` section), with its distribution and trade correlations."""
    risk = project.risk
    return duration_ranges(project, default=risk.default, by_trade=dict(risk.trades),
                           distribution=risk.distribution, correlation=dict(risk.correlation))


# -- distribution functions ---------------------------------------------------------------

def _lentz(x: np.ndarray, a: np.ndarray, b: np.ndarray) -> np.ndarray:
    """Continued fraction of the incomplete beta function, by the modified Lentz method
    (Press et al., *Numerical Recipes*, 3rd ed., 2007, section 6.4, ``betacf``)."""
    tiny, eps = 1e-300, 4e-16
    qab, qap, qam = a + b, a + 1.0, a - 1.0
    c = np.ones_like(x)
    d = 1.0 - qab * x / qap
    d = 1.0 / np.where(np.abs(d) < tiny, tiny, d)
    h = d.copy()
    for m in range(1, 1000):
        m2 = 2 * m
        for aa in (m * (b - m) * x / ((qam + m2) * (a + m2)),
                   -(a + m) * (qab + m) * x / ((a + m2) * (qap + m2))):
            d = 1.0 + aa * d
            d = 1.0 / np.where(np.abs(d) < tiny, tiny, d)
            c = 1.0 + aa / c
            c = np.where(np.abs(c) < tiny, tiny, c)
            delta = d * c
            h = h * delta
        if np.all(np.abs(delta - 1.0) < eps):
            return h
    raise ArithmeticError("the incomplete beta continued fraction did not converge")  # pragma: no cover


def regularized_beta(x, a, b) -> np.ndarray:
    """The regularized incomplete beta function ``I_x(a, b)``, the distribution function of
    ``Beta(a, b)`` at ``x`` (arrays broadcast), by its continued fraction (Press et al. 2007,
    section 6.4), with ``I_x(a, b) = 1 - I_{1-x}(b, a)`` where the fraction converges slowly."""
    x, a, b = np.broadcast_arrays(*(np.asarray(v, dtype=float) for v in (x, a, b)))
    out = np.where(x <= 0.0, 0.0, 1.0).astype(float)
    inner = (x > 0.0) & (x < 1.0)
    if not inner.any():
        return out
    xi, ai, bi = x[inner], a[inner], b[inner]
    flip = xi >= (ai + 1.0) / (ai + bi + 2.0)
    xs, as_, bs = np.where(flip, 1.0 - xi, xi), np.where(flip, bi, ai), np.where(flip, ai, bi)
    lg = np.vectorize(math.lgamma, otypes=[float])
    front = np.exp(lg(as_ + bs) - lg(as_) - lg(bs) + as_ * np.log(xs) + bs * np.log1p(-xs)) / as_
    value = front * _lentz(xs, as_, bs)
    out[inner] = np.where(flip, 1.0 - value, value)
    return out


def cdf(x, a, m, b, distribution: str = "pert") -> np.ndarray:
    """``P(X <= x)`` for the distribution on ``[a, b]`` with mode ``m`` (arrays broadcast;
    requires ``a < b``)."""
    x, a, m, b = np.broadcast_arrays(*(np.asarray(v, dtype=float) for v in (x, a, m, b)))
    width = b - a
    y = np.clip((x - a) / width, 0.0, 1.0)
    r = (m - a) / width  # where the mode lies, 0..1
    if distribution == "pert":
        return regularized_beta(y, 1.0 + 4.0 * r, 1.0 + 4.0 * (1.0 - r))
    if distribution == "triangular":
        with np.errstate(divide="ignore", invalid="ignore"):
            rising = np.where(r > 0, y * y / r, 0.0)
            falling = np.where(r < 1, 1.0 - (1.0 - y) ** 2 / (1.0 - r), 1.0)
        return np.where(y <= r, rising, falling)
    raise InputError(f"unknown distribution {distribution!r}", column="distribution", value=distribution,
                     fix=f"use one of: {', '.join(DISTRIBUTIONS)}")


def continuous_durations(rng: np.random.Generator, a, m, b, distribution: str, size) -> np.ndarray:
    """Continuous draws (before rounding up): triangular by its inverse distribution
    function, PERT-beta with ``Generator.beta``. ``a < b`` required."""
    a, m, b = (np.asarray(v, dtype=float) for v in (a, m, b))
    r = (m - a) / (b - a)
    if distribution == "triangular":
        u = rng.random(size)
        y = np.where(u <= r, np.sqrt(u * r), 1.0 - np.sqrt((1.0 - u) * (1.0 - r)))
    else:
        y = rng.beta(1.0 + 4.0 * r, 1.0 + 4.0 * (1.0 - r), size)
    return a + (b - a) * y


# -- whole-day draws ----------------------------------------------------------------------

class DurationSampler:
    """Whole-day durations drawn for the activities with a range (see the module notes).

    ``low``, ``mode``, ``high``: arrays over activities; ``group`` / ``weight``: each
    activity's correlated trade (-1: none) and the trades' weights. The activities with
    ``high > low`` are :attr:`uncertain`; the others keep ``mode``.
    """

    def __init__(self, low, mode, high, distribution: str = "pert", group=None, weight=()):
        low, high = np.asarray(low, dtype=float), np.asarray(high, dtype=float)
        mode = np.asarray(mode, dtype=float)
        self.uncertain = np.flatnonzero(high > low)
        u = self.uncertain
        self.group = (np.full(len(u), -1, dtype=np.int64) if group is None
                      else np.asarray(group, dtype=np.int64)[u])
        self.weight = np.asarray(weight, dtype=float)
        own_weight = np.zeros(len(u))
        if len(self.weight):
            own_weight = np.where(self.group >= 0, self.weight[np.maximum(self.group, 0)], 0.0)
        self._w = own_weight
        self.correlated = bool(np.any(own_weight > 0))
        self.first = np.floor(low[u]).astype(np.int64) + 1  # least duration that can be drawn
        self.last = np.ceil(high[u]).astype(np.int64)
        self.width = int((self.last - self.first + 1).max()) if len(u) else 0
        # F at the whole days first..last of each range, tabulated once per distinct range
        keys = np.stack([low[u], mode[u], high[u]], axis=1) if len(u) else np.zeros((0, 3))
        distinct, kind = np.unique(keys, axis=0, return_inverse=True)
        kind = kind.reshape(-1)
        self._members = [np.flatnonzero(kind == k) for k in range(len(distinct))]
        self.cdfs: list[np.ndarray] = []  # F(first), F(first + 1), ..., F(last) = 1
        self.tables: list[np.ndarray] = []  # the same, as normal scores when correlated
        normal = NormalDist()
        for a, m, b in distinct.tolist():
            days = np.arange(math.floor(a) + 1, math.ceil(b) + 1, dtype=float)
            f = cdf(days, a, m, b, distribution)
            f[-1] = 1.0
            self.cdfs.append(f)
            if self.correlated:
                f = np.array([-math.inf if v <= 0 else math.inf if v >= 1 else normal.inv_cdf(v)
                              for v in f.tolist()])
            self.tables.append(f)

    def pmf(self) -> np.ndarray:
        """``P(D = first + k)`` for each uncertain activity (rows) and offset ``k`` (columns)."""
        out = np.zeros((len(self.uncertain), self.width))
        for f, rows in zip(self.cdfs, self._members):
            out[np.ix_(rows, np.arange(len(f)))] = np.diff(f, prepend=0.0)
        return out

    def scores(self, rng: np.random.Generator, runs: int) -> np.ndarray:
        """The raw draws of one block of ``runs``: uniforms, or normal scores when correlated;
        shape (uncertain activities, runs)."""
        n = len(self.uncertain)
        if not self.correlated:
            return rng.random((runs, n)).T
        common = rng.standard_normal((runs, len(self.weight)))
        own = rng.standard_normal((runs, n))
        shared = common[:, np.maximum(self.group, 0)]
        return (self._w * shared + np.sqrt(1.0 - self._w * self._w) * own).T

    def durations(self, scores: np.ndarray) -> np.ndarray:
        """Whole-day durations (uncertain activities x runs) for raw draws ``scores``: the
        least day ``k`` with ``score <= table(k)``."""
        out = np.empty(scores.shape, dtype=np.int64)
        for table, rows in zip(self.tables, self._members):
            out[rows] = np.searchsorted(table, scores[rows], side="left")
        out += self.first[:, None]
        return out
