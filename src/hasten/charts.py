"""Charts drawn with matplotlib (non-interactive backend), written to a file."""

from __future__ import annotations

from typing import TYPE_CHECKING

if TYPE_CHECKING:
    from .results import Curve

__all__ = ["curve_chart"]


def curve_chart(curve: Curve, path: str) -> None:
    """The least-cost curve: added direct cost against finish, as a PNG."""
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    xs = [p.finish for p in curve]
    ys = [p.added_cost for p in curve]
    fig, ax = plt.subplots(figsize=(8, 4.5), dpi=110)
    ax.plot(xs, ys, marker="o", markersize=3, linewidth=1.5, color="#2b6f8e")
    ax.set_xlabel("project finish (working days from start)")
    ax.set_ylabel(f"added direct cost ({curve.project.currency or 'money'})")
    ax.set_title(f"Least-cost acceleration: {curve.project.name}")
    ax.grid(True, alpha=0.3)
    ax.invert_xaxis()
    fig.tight_layout()
    fig.savefig(path, format="png")
    plt.close(fig)
