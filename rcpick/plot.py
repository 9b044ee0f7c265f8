"""PNG pictures of a spread or a shortlist (matplotlib, an optional extra: ``pip install 'rcpick[plot]'``).

matplotlib is imported inside the functions, with the non-interactive Agg
backend, so no display is needed and start-up stays fast.
"""

from __future__ import annotations

from pathlib import Path

from rcpick.errors import RcpickError
from rcpick.export import atomic_write
from rcpick.notation import format_si


class PlotUnavailable(RcpickError, ImportError):
    """matplotlib is not installed."""


def _pyplot():
    try:
        import matplotlib
    except ImportError:
        raise PlotUnavailable(
            "pictures need matplotlib: pip install 'rcpick[plot]' (or pip install matplotlib)", setting="plot"
        ) from None
    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    return plt


def _save(fig, path: Path, force: bool) -> None:
    def write(temp: Path) -> None:
        fig.savefig(temp, format="png", dpi=120, bbox_inches="tight")

    try:
        atomic_write(Path(path), force, write, option="plot")
    finally:
        import matplotlib.pyplot as plt

        plt.close(fig)


def _scale(unit: str, values: list[float]) -> tuple[float, str]:
    """A display factor and unit label (e.g. 1e3, 'ms') for values in SI ``unit``."""
    label = format_si(max(abs(v) for v in values), unit, 3).split(" ")[-1]
    prefix = label[: -len(unit)] if label.endswith(unit) else ""
    factor = {"f": 1e15, "p": 1e12, "n": 1e9, "µ": 1e6, "m": 1e3, "": 1.0, "k": 1e-3, "M": 1e-6, "G": 1e-9, "T": 1e-12}[
        prefix
    ]
    return factor, f"{prefix}{unit}"


def spread_png(document: dict, path: Path, force: bool = False) -> None:
    """Histogram of a design's Monte Carlo distribution with the window and worst-case limits marked."""
    plt = _pyplot()
    sp = document["spread"]
    edges, counts = document["histogram"]["edges"], document["histogram"]["counts"]
    window = (document.get("target") or {}).get("window")
    factor, label = _scale(document["unit"], edges)
    fig, ax = plt.subplots(figsize=(8, 4.5))
    widths = [(edges[i + 1] - edges[i]) * factor for i in range(len(counts))]
    ax.bar([e * factor for e in edges[:-1]], counts, width=widths, align="edge", color="#4878a8", edgecolor="white")
    ax.axvline(sp["worst_min"] * factor, color="#c03030", linestyle="-", label="worst case")
    ax.axvline(sp["worst_max"] * factor, color="#c03030", linestyle="-")
    ax.axvline(document["nominal"] * factor, color="black", linestyle=":", label="nominal")
    if window:
        ax.axvspan(window["low"] * factor, window["high"] * factor, color="#40a040", alpha=0.12, label="window")
    title = f"R = {document['design']['r']['text']}, C = {document['design']['c']['text']}"
    if sp.get("yield") is not None:
        title += f": yield {sp['yield'] * 100:.1f} %"
    ax.set_title(title)
    ax.set_xlabel(f"{document['quantity']} ({label})")
    ax.set_ylabel("units × temperatures")
    ax.legend(loc="upper right")
    _save(fig, path, force)


def shortlist_png(document: dict, path: Path, force: bool = False) -> None:
    """The shortlist: nominal points, worst-case and Monte Carlo spans as bars, against the window."""
    plt = _pyplot()
    cands = document["candidates"]
    target = document["target"]
    window = target.get("window")
    values = [c["spread"]["worst_min"] for c in cands] + [c["spread"]["worst_max"] for c in cands] + [target["value"]]
    factor, label = _scale(target["unit"], values)
    fig, ax = plt.subplots(figsize=(8, 0.45 * len(cands) + 1.6))
    for i, cand in enumerate(cands):
        sp = cand["spread"]
        y = len(cands) - 1 - i
        ax.plot(
            [sp["worst_min"] * factor, sp["worst_max"] * factor],
            [y, y],
            color="#c03030",
            linewidth=2,
            label="worst case" if i == 0 else None,
        )
        ax.plot(
            [sp["p_low"] * factor, sp["p_high"] * factor],
            [y, y],
            color="#4878a8",
            linewidth=7,
            alpha=0.8,
            label="Monte Carlo 0.135–99.865 %" if i == 0 else None,
            solid_capstyle="butt",
        )
        ax.plot([cand["value"] * factor], [y], "ko", markersize=4, label="nominal" if i == 0 else None)
    if window:
        ax.axvspan(window["low"] * factor, window["high"] * factor, color="#40a040", alpha=0.12, label="window")
    ax.axvline(target["value"] * factor, color="black", linestyle=":", linewidth=1)
    ax.set_yticks(range(len(cands)))
    ax.set_yticklabels(
        [
            f"{c['rank']}. {' | '.join(c[p]['text'] for p in ('r', 'c') if p in c)} "
            f"({c['spread']['yield'] * 100:.0f} %)"
            for c in reversed(cands)
        ]
    )
    ax.set_xlabel(f"{target['kind']} ({label})")
    ax.set_title(f"Shortlist for {target['kind']} = {format_si(target['value'], target['unit'])}")
    height = 0.45 * len(cands) + 1.6
    ax.legend(loc="upper center", bbox_to_anchor=(0.5, -0.5 / height), ncol=4, fontsize=8, frameon=False)
    _save(fig, path, force)
