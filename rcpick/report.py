"""Search results as plain data: the JSON document and flat CSV rows.

No I/O here: the command line prints what these functions return. The JSON
schema is documented in ``docs/json.md``; change both together.
"""

from __future__ import annotations

from rcpick.combos import ARRANGEMENTS, Combos
from rcpick.notation import format_rkm
from rcpick.search import Shortlist
from rcpick.target import Target

SCHEMA_VERSION = 1


def wiring_text(combos: Combos, i: int) -> str:
    """RKM text of one candidate with its wiring: ``4K7``, ``4K7 + 330R``, ``10K ∥ 10K``."""
    parts = [format_rkm(v, combos.kind) for v in combos.parts_of(i)]
    joiner = {1: " + ", 2: " ∥ "}.get(int(combos.wiring[i]), "")
    return joiner.join(parts)


def position_dict(combos: Combos, i: int, unit_key: str, models=None) -> dict:
    out = {
        unit_key: float(combos.value[i]),
        "arrangement": ARRANGEMENTS[int(combos.wiring[i])],
        f"parts_{unit_key}": combos.parts_of(i),
        "text": wiring_text(combos, i),
    }
    if models is not None:
        out["parts_detail"] = [part_detail(combos.kind, value, model) for value, model in zip(out[f"parts_{unit_key}"], models)]
    return out


def part_detail(kind: str, value: float, model) -> dict:
    """One physical part: value, tolerance band, TCR (R) or dielectric (C), part number."""
    detail = {"value": value, "rkm": format_rkm(value, kind), "tolerance": list(model.tolerance)}
    if kind == "resistance":
        detail["tcr_ppm_per_c"] = [model.drift.cold[0] * 1e6, model.drift.cold[1] * 1e6] if model.drift.shared else None
        detail["technology"] = model.name
    else:
        detail["dielectric"] = model.name
    detail["part_number"] = model.part_number or None
    return detail


def target_dict(target: Target) -> dict:
    """The ``target`` member of the JSON document."""
    out = {"kind": target.kind, "value": target.value, "unit": target.unit, "tau_s": target.tau_s}
    if target.kind == "delay":
        out["threshold"] = target.threshold
        out["falling"] = target.falling
    return out


def spread_dict(assessed, k: int) -> dict:
    """The ``spread`` member of candidate ``k`` (target's unit; yield a fraction)."""
    return {
        "worst_min": float(assessed.worst_min[k]),
        "worst_max": float(assessed.worst_max[k]),
        "p_low": float(assessed.p_low[k]),
        "p_median": float(assessed.p_median[k]),
        "p_high": float(assessed.p_high[k]),
        "sigma": float(assessed.sigma[k]),
        "yield": float(assessed.yield_[k]),
    }


def candidates(shortlist: Shortlist, target: Target, assessed=None) -> list[dict]:
    """One dict per result, best first (the ``candidates`` member of the JSON document).

    ``assessed`` (an :class:`rcpick.assess.Assessed` for the same shortlist) adds each one's ``spread``.
    """
    rows = []
    tau = shortlist.tau_s
    value = target.quantity(tau)
    for rank, (ri, ci) in enumerate(zip(shortlist.r_index, shortlist.c_index), start=1):
        k = rank - 1
        rows.append({
            "rank": rank,
            "tau_s": float(tau[k]),
            "value": float(value[k]),
            "error": float(value[k] / target.value - 1.0),
            "parts": int(shortlist.parts[k]),
            "r": position_dict(shortlist.r, int(ri), "ohm", assessed.r_models[k] if assessed is not None else None),
            "c": position_dict(shortlist.c, int(ci), "farad", assessed.c_models[k] if assessed is not None else None),
        })
        if assessed is not None:
            rows[-1]["spread"] = spread_dict(assessed, k)
    return rows


def find_document(shortlist: Shortlist, target: Target, assessed=None, analysis: dict | None = None,
                  warnings: list[str] | None = None) -> dict:
    """The whole JSON document of ``rcpick find``.

    With ``assessed`` the candidates carry their spread and the target its window.
    """
    doc = {
        "schema": SCHEMA_VERSION,
        "target": target_dict(target),
        "searched": {
            "r_combinations": len(shortlist.r),
            "c_combinations": len(shortlist.c),
        },
    }
    if assessed is not None:
        doc["target"]["window"] = {"low": assessed.window[0], "high": assessed.window[1]}
        shortlist = assessed.shortlist
    if analysis is not None:
        doc["analysis"] = analysis
    doc["warnings"] = list(warnings or [])
    doc["candidates"] = candidates(shortlist, target, assessed)
    return doc


def flat_rows(document: dict) -> list[dict]:
    """CSV rows: one per candidate, flat columns with units in their names."""
    unit = document["target"]["unit"]
    rows = []
    for cand in document["candidates"]:
        row = {
            "rank": cand["rank"],
            "r_wiring": cand["r"]["text"],
            "r_arrangement": cand["r"]["arrangement"],
            "r_ohm": cand["r"]["ohm"],
            "r1_ohm": cand["r"]["parts_ohm"][0],
            "r2_ohm": cand["r"]["parts_ohm"][1] if len(cand["r"]["parts_ohm"]) > 1 else "",
            "c_wiring": cand["c"]["text"],
            "c_arrangement": cand["c"]["arrangement"],
            "c_farad": cand["c"]["farad"],
            "c1_farad": cand["c"]["parts_farad"][0],
            "c2_farad": cand["c"]["parts_farad"][1] if len(cand["c"]["parts_farad"]) > 1 else "",
            "tau_s": cand["tau_s"],
        }
        if document["target"]["kind"] != "tau":
            row[f"{document['target']['kind']}_{unit.lower()}"] = cand["value"]
        row["error"] = cand["error"]
        for key, value in cand.get("spread", {}).items():
            row[f"{key}_{unit.lower()}" if key != "yield" else "yield"] = value
        row["parts"] = cand["parts"]
        rows.append(row)
    return rows
