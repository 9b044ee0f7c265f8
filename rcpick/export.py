"""Spreadsheet and CSV export of a shortlist: ``shortlist``, ``order`` and ``query`` sheets.

Built from the JSON documents of ``find`` and ``spread`` (docs/json.md), so
the export says exactly what the screen says. pandas and openpyxl are
imported inside the functions. Files are written atomically: to a temporary
file beside the target, renamed into place only when complete.
"""

from __future__ import annotations

import math
import os
import tempfile
from collections.abc import Callable
from pathlib import Path

from rcpick.errors import BadValue
from rcpick.notation import format_rkm

SHEETS = ("shortlist", "order", "query")

#: Excel number formats by the unit named in a column header.
_FORMATS = {"(Ω)": "##0.###E+0", "(F)": "##0.###E+0", "(Ω or F)": "##0.###E+0", "(s)": "##0.000E+0", "(Hz)": "##0.000E+0", "(V)": "0.##",
            "(fraction)": "0.000%", "(ppm/°C)": "0", "(%)": "0.0#", "(each)": "0.0000", "(total)": "0.00"}


def _part_columns(sym: str, detail: dict | None, kind: str) -> dict:
    """Columns describing one physical part (numbers as numbers, units in the headers)."""
    unit = "Ω" if kind == "resistance" else "F"
    d = detail or {}
    tol = d.get("tolerance")
    cols = {f"{sym} ({unit})": d.get("value"),
            f"{sym} tol − (%)": tol[0] * 100 if tol else None,
            f"{sym} tol + (%)": tol[1] * 100 if tol else None}
    if kind == "resistance":
        tcr = d.get("tcr_ppm_per_c")
        cols[f"{sym} TCR min (ppm/°C)"] = tcr[0] if tcr else None
        cols[f"{sym} TCR max (ppm/°C)"] = tcr[1] if tcr else None
    else:
        cols[f"{sym} dielectric"] = d.get("dielectric")
    cols[f"{sym} part number"] = d.get("part_number")
    return cols


def _details(cand: dict, pos: str, key: str) -> list[dict]:
    return cand[pos].get("parts_detail") or [{"value": v} for v in cand[pos][f"parts_{key}"]]


def shortlist_rows(document: dict) -> list[dict]:
    """One row per candidate: wiring, every part's value and model, nominal, error, spread, parts."""
    target = document.get("target") or {}
    unit = document.get("unit") or target.get("unit", "s")
    rows = []
    for cand in document["candidates"]:
        row = {"rank": cand["rank"]}
        for pos, sym in (("r", "R"), ("c", "C")):
            if pos in cand:
                row[f"{sym} wiring"] = cand[pos]["text"]
        for pos, sym, unit_sym, key, kind in (("r", "R", "Ω", "ohm", "resistance"), ("c", "C", "F", "farad", "capacitance")):
            if pos not in cand:
                continue
            details = _details(cand, pos, key)
            for k in range(2):
                row.update(_part_columns(f"{sym}{k + 1}", details[k] if k < len(details) else None, kind))
            row[f"{sym} eff ({unit_sym})"] = cand[pos][key]
        if "tau_s" in cand:
            row["tau (s)"] = cand["tau_s"]
        row[f"nominal ({unit})"] = cand["value"]
        row["error (fraction)"] = cand["error"]
        sp = cand.get("spread", {})
        for name, label in (("worst_min", "worst-case min"), ("worst_max", "worst-case max"), ("p_low", "MC 0.135 %"),
                            ("p_median", "MC median"), ("p_high", "MC 99.865 %")):
            row[f"{label} ({unit})"] = sp.get(name)
        row["yield (fraction)"] = sp.get("yield")
        row["parts"] = cand["parts"]
        rows.append(row)
    return rows


def order_rows(document: dict, picks: list[int], boards: int, spares: float, stock=None) -> list[dict]:
    """One row per distinct part of the picked candidates (ranks), with quantities for ``boards``.

    Total = ceil(quantity per board × boards × (1 + spares)). With a stock
    (:class:`rcpick.stock.Stock`) the row carries its part number, price, stock
    on hand and shortfall.
    """
    by_rank = {c["rank"]: c for c in document["candidates"]}
    lines: dict[tuple, dict] = {}
    for rank in picks:
        cand = by_rank[rank]
        for pos, kind, key in (("r", "resistance", "ohm"), ("c", "capacitance", "farad")):
            if pos not in cand:
                continue
            for d in _details(cand, pos, key):
                tol = tuple(d.get("tolerance") or ())
                tcr = tuple(d.get("tcr_ppm_per_c") or ())
                ident = (kind, d["value"], tol, tcr, d.get("dielectric"), d.get("part_number") or "")
                line = lines.get(ident)
                if line is None:
                    line = {"kind": "R" if kind == "resistance" else "C", "value": format_rkm(d["value"], kind),
                            "value (Ω or F)": d["value"]}
                    part = _part_columns("", d, kind)
                    line.update({name.strip(): v for name, v in part.items() if not name.startswith(" (")
                                 and "part number" not in name})
                    line.update({"qty per board": 0, "used in ranks": [],
                                 "_stock": stock.find(kind, d["value"]) if stock is not None else None})
                    lines[ident] = line
                line["qty per board"] += 1
                if rank not in line["used in ranks"]:
                    line["used in ranks"].append(rank)
    rows = []
    for line in lines.values():
        stocked = line.pop("_stock")
        total = math.ceil(line["qty per board"] * boards * (1 + spares) - 1e-9)
        row = {name: line.get(name) for name in ORDER_PART_COLUMNS}
        row.update({"used in ranks": ", ".join(str(r) for r in line["used in ranks"]), "boards": boards,
                    "spares (%)": spares * 100, "total qty": total})
        if stock is not None:
            price = stocked.unit_price if stocked else None
            row.update({
                "part number": stocked.part_number if stocked else None,
                "package": stocked.package if stocked else None,
                "voltage (V)": stocked.voltage if stocked else None,
                "unit price (each)": price,
                "extended price (total)": price * total if price is not None else None,
                "on hand": stocked.on_hand if stocked else None,
                "shortfall": max(0, total - stocked.on_hand) if stocked and stocked.on_hand is not None else None,
            })
        rows.append(row)
    return rows


ORDER_PART_COLUMNS = ("kind", "value", "value (Ω or F)", "tol − (%)", "tol + (%)", "TCR min (ppm/°C)",
                      "TCR max (ppm/°C)", "dielectric", "qty per board")


def query_rows(provenance: list[tuple[str, object, str]]) -> list[dict]:
    """The ``query`` sheet: every setting with its value and where it came from."""
    return [{"setting": name, "value": "" if value is None else str(value), "source": source}
            for name, value, source in provenance]


def _umask() -> int:
    mask = os.umask(0)
    os.umask(mask)
    return mask


def atomic_write(path: Path, force: bool, write: Callable[[Path], None], option: str = "--out") -> None:
    """Write through ``write(temporary_path)``, then rename into ``path``; refuse to overwrite unless ``force``."""
    path = Path(path)
    if path.exists() and not force:
        raise BadValue(f"{path} exists; add --force to overwrite it", option=option, value=str(path))
    parent = path.parent if str(path.parent) else Path(".")
    if not parent.is_dir():
        raise BadValue(f"cannot write {path}: folder {parent} does not exist", option=option, value=str(path))
    try:
        handle, temp = tempfile.mkstemp(prefix=".rcpick-", suffix=path.suffix, dir=parent)
    except OSError as error:
        raise BadValue(f"cannot write {path}: {error.strerror}", option=option, value=str(path)) from None
    os.close(handle)
    temp = Path(temp)
    try:
        write(temp)
        os.chmod(temp, 0o666 & ~_umask())
        os.replace(temp, path)
    except OSError as error:
        temp.unlink(missing_ok=True)
        raise BadValue(f"cannot write {path}: {error.strerror or error}", option=option, value=str(path)) from None
    except BaseException:
        temp.unlink(missing_ok=True)
        raise


def _format_sheet(sheet, frame) -> None:
    """Freeze the header row, set number formats by the unit in each header, fit column widths."""
    from openpyxl.utils import get_column_letter

    sheet.freeze_panes = "A2"
    for index, header in enumerate(frame.columns, start=1):
        letter = get_column_letter(index)
        fmt = next((f for unit, f in _FORMATS.items() if str(header).endswith(unit)), None)
        longest = max([len(str(header))] + [len(str(v)) for v in frame.iloc[:, index - 1].tolist()])
        sheet.column_dimensions[letter].width = min(max(10, longest + 2), 60)
        if fmt:
            for row in range(2, len(frame) + 2):
                sheet.cell(row=row, column=index).number_format = fmt


def write_xlsx(path: Path, sheets: dict[str, list[dict]], force: bool = False) -> None:
    """Write the sheets (name → rows) to one workbook, atomically."""
    import pandas as pd

    def write(temp: Path) -> None:
        with pd.ExcelWriter(temp, engine="openpyxl") as writer:
            for name, rows in sheets.items():
                frame = pd.DataFrame(rows)
                frame.to_excel(writer, sheet_name=name, index=False)
                _format_sheet(writer.sheets[name], frame)

    atomic_write(path, force, write)


def write_csv(path: Path, rows: list[dict], force: bool = False) -> None:
    """Write one table as CSV (UTF-8), atomically."""
    import pandas as pd

    atomic_write(path, force, lambda temp: pd.DataFrame(rows).to_csv(temp, index=False))
