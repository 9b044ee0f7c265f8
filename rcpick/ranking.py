"""The order in which analysed candidates are listed: by yield (with its uncertainty), error, spread or cost.

Ranking by yield treats candidates whose 95 % yield intervals overlap as tied,
and breaks ties as an experienced engineer would: fewer parts, a narrower
worst-case span (relative to the design's own nominal), a worst case inside
the window, a smaller nominal error, an impedance nearer the middle of the
allowed range. A design with more parts ranks above one with fewer only when
its yield interval lies wholly above the other's (docs/model.md).

Every ranking first lists the candidates that are practical (part values in
their family's practical range) and within their derated ratings; a one-sided
limit lists first the candidates whose worst case meets it.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

RANKINGS = ("yield", "error", "spread", "cost")
#: Relative worst-case spans closer than this count as equal (0.1 % of nominal).
SPAN_DECIMALS = 3
ERROR_DECIMALS = 12
#: Nominal errors closer than this count as equal among designs tied on yield (0.01 %).
TIE_ERROR_DECIMALS = 4

RULES = {
    "yield": (
        "Ranked by yield; designs whose 95 % yield intervals overlap count as tied and are ordered by fewer "
        "parts, then a narrower worst case, a worst case inside the window, a smaller error (to 0.01 %), an "
        "impedance nearer the middle of the range, a higher yield."
    ),
    "error": "Ranked by the nominal error alone, then fewer parts, then lower R and C.",
    "spread": "Ranked by the narrowest worst-case span, then fewer parts, then a smaller error.",
    "cost": (
        "Ranked by cost per board among the designs whose yield reaches the minimum asked; then by yield as usual."
    ),
}
LIMIT_RULE = "Designs whose worst case meets the limit come first, then as usual."
DISCHARGE_RULE = (
    "Designs whose worst case meets the limit come first, those stressing their parts least first (the least "
    "power: the largest resistance), then as usual."
)


@dataclass(frozen=True)
class Scores:
    """What the ranking looks at, one entry per candidate."""

    yield_: np.ndarray
    yield_low: np.ndarray
    yield_high: np.ndarray
    parts: np.ndarray
    span: np.ndarray  # worst-case span relative to the design's nominal
    inside: np.ndarray  # worst case wholly inside the window (or meeting the limit)
    abs_error: np.ndarray
    off_middle: np.ndarray  # |ln(R / middle of the R range)|
    r_ohm: np.ndarray
    c_farad: np.ndarray
    sound: np.ndarray  # practical values and within derated ratings
    stress: np.ndarray  # highest share of a derated rating used (NaN when unknown)
    cost: np.ndarray  # per board (NaN when a price is unknown)


def _tiebreak(s: Scores, i: int) -> tuple:
    # differences far below any tolerance (an error of 0.001 % against 0.002 %) do not decide: the yield does
    return (
        int(s.parts[i]),
        round(float(s.span[i]), SPAN_DECIMALS),
        not bool(s.inside[i]),
        round(float(s.abs_error[i]), TIE_ERROR_DECIMALS),
        round(float(s.off_middle[i]), 2),
        -float(s.yield_[i]),
        float(s.r_ohm[i]),
        float(s.c_farad[i]),
    )


def by_yield(s: Scores, rows: np.ndarray) -> list[int]:
    """``rows`` in yield order with intervals respected (see the module docstring)."""
    remaining = [int(i) for i in rows]
    out: list[int] = []
    while remaining:
        rem = np.array(remaining)
        parts, low, high = s.parts[rem], s.yield_low[rem], s.yield_high[rem]
        # eligible: clearly better than every remaining design with fewer parts (else those go first)
        ceiling = np.array([high[parts < p].max(initial=-np.inf) for p in parts])
        pool = rem[low > ceiling]
        best = pool[np.argmax(s.yield_[pool])]
        tied = [int(i) for i in pool if s.yield_high[i] >= s.yield_low[best]]
        pick = min(tied, key=lambda i: _tiebreak(s, i))
        out.append(pick)
        remaining.remove(pick)
    return out


def order(
    s: Scores, rank: str, *, limit: str | None = None, min_yield: float = 0.0, discharge: bool = False
) -> list[int]:
    """Indices of the candidates, best first, by the named ranking.

    ``discharge``: the timing discharges stored energy, so under a limit the qualifying designs that stress
    their parts least (the least power) come first.
    """
    every = np.arange(len(s.parts))
    if rank == "error":
        return [int(i) for i in np.lexsort((s.c_farad, s.r_ohm, s.parts, np.round(s.abs_error, ERROR_DECIMALS)))]
    if rank == "spread":
        keys = np.lexsort((s.abs_error, s.parts, np.round(s.span, 9), ~s.sound))
        return [int(i) for i in keys]
    out: list[int] = []
    groups = [every[s.sound], every[~s.sound]]
    if limit is not None:
        groups = [g[s.inside[g]] for g in groups] + [g[~s.inside[g]] for g in groups]
    for k, group in enumerate(groups):
        if rank == "cost":
            meets = group[s.yield_[group] >= min_yield]
            priced = sorted(meets, key=lambda i: (np.nan_to_num(s.cost[i], nan=np.inf), -s.yield_[i], _tiebreak(s, i)))
            out += [int(i) for i in priced]
            out += by_yield(s, np.setdiff1d(group, meets))
        elif limit is not None and discharge and k < 2 and np.any(np.isfinite(s.stress[group])):
            # least stress first, then as usual among equals
            ranked = by_yield(s, group)
            out += sorted(
                ranked, key=lambda i: (round(float(np.nan_to_num(s.stress[i], nan=np.inf)), 9), ranked.index(i))
            )
        else:
            out += by_yield(s, group)
    return out


def rule_text(rank: str, limit: str | None, discharge: bool = False) -> str:
    text = RULES[rank]
    if limit is not None and rank in ("yield", "cost"):
        return f"{DISCHARGE_RULE if discharge else LIMIT_RULE} {text}"
    return text
