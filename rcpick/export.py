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

from rcpick.errors import BadValue, ClashingOptions
from rcpick.notation import format_rkm

#: Excel number formats by the unit named in a column header.
_FORMATS = {
    "(Ω)": "##0.###E+0",
    "(F)": "##0.###E+0",
    "(Ω or F)": "##0.###E+0",
    "(s)": "##0.000E+0",
    "(Hz)": "##0.000E+0",
    "(V)": "0.##",
    "(W)": "0.###",
    "(J)": "0.###",
    "(fraction)": "0.000%",
    "(ppm/°C)": "0",
    "(%)": "0.0#",
    "(each)": "0.0000",
    "(total)": "0.00",
}


def _part_columns(sym: str, detail: dict | None, kind: str) -> dict:
    """Columns describing one physical part (numbers as numbers, units in the headers)."""
    unit = "Ω" if kind == "resistance" else "F"
    d = detail or {}
    tol = d.get("tolerance")
    cols = {
        f"{sym} ({unit})": d.get("value"),
        f"{sym} tol − (%)": tol[0] * 100 if tol else None,
        f"{sym} tol + (%)": tol[1] * 100 if tol else None,
    }
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
        for pos, sym, unit_sym, key, kind in (
            ("r", "R", "Ω", "ohm", "resistance"),
            ("c", "C", "F", "farad", "capacitance"),
        ):
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
        for name, label in (
            ("worst_min", "worst-case min"),
            ("worst_max", "worst-case max"),
            ("p_low", "MC 0.135 %"),
            ("p_median", "MC median"),
            ("p_high", "MC 99.865 %"),
        ):
            row[f"{label} ({unit})"] = sp.get(name)
        row["yield (fraction)"] = sp.get("yield")
        ci = sp.get("yield_ci") or [None, None]
        row["yield 95 % low (fraction)"], row["yield 95 % high (fraction)"] = ci
        row["parts"] = cand["parts"]
        row["cost per board (each)"] = cand.get("cost_per_board")
        stress = cand.get("stress")
        if stress:
            row["R peak power (W)"] = max(stress["r_power_w"])
            row["R peak voltage (V)"] = max(stress["r_voltage_v"])
            row["C peak voltage (V)"] = max(stress["c_voltage_v"])
            row["within ratings"] = "yes" if stress["within_ratings"] else "no"
            if "energy_j" in stress:
                row["stored energy (J)"] = stress["energy_j"]
        row["notes"] = "; ".join(cand.get("flags", [])) or None
        rows.append(row)
    return rows


def order_rows(document: dict, picks: list[int], boards: int, spares: float) -> list[dict]:
    """One row per distinct part of the picked candidates (ranks), with quantities for ``boards``.

    Total = ceil(quantity per board × boards × (1 + spares)). A part taken from a stock line carries its
    part number, package, price, stock on hand and shortfall, from the line recorded in the result.
    """
    by_rank = {c["rank"]: c for c in document["candidates"]}
    lines: dict[tuple, dict] = {}
    for rank in picks:
        cand = by_rank[rank]
        for pos, kind, key in (("r", "resistance", "ohm"), ("c", "capacitance", "farad")):
            if pos not in cand or cand[pos] is None:
                continue
            for d in _details(cand, pos, key):
                tol = tuple(d.get("tolerance") or ())
                tcr = tuple(d.get("tcr_ppm_per_c") or ())
                ident = (kind, d["value"], tol, tcr, d.get("dielectric"), d.get("part_number") or "")
                line = lines.get(ident)
                if line is None:
                    line = {
                        "kind": "R" if kind == "resistance" else "C",
                        "value": format_rkm(d["value"], kind),
                        "value (Ω or F)": d["value"],
                    }
                    part = _part_columns("", d, kind)
                    line.update(
                        {
                            name.strip(): v
                            for name, v in part.items()
                            if not name.startswith(" (") and "part number" not in name
                        }
                    )
                    line.update({"qty per board": 0, "used in ranks": [], "_detail": d})
                    lines[ident] = line
                line["qty per board"] += 1
                if rank not in line["used in ranks"]:
                    line["used in ranks"].append(rank)
    stocked = any((line["_detail"].get("stock") is not None) for line in lines.values())
    rows = []
    for line in lines.values():
        detail = line.pop("_detail")
        stock = detail.get("stock")
        total = order_total(line["qty per board"], boards, spares)
        row = {name: line.get(name) for name in ORDER_PART_COLUMNS}
        row.update(
            {
                "used in ranks": ", ".join(str(r) for r in line["used in ranks"]),
                "boards": boards,
                "spares (%)": spares * 100,
                "total qty": total,
            }
        )
        if stocked:
            price = stock.get("unit_price") if stock else None
            on_hand = stock.get("on_hand") if stock else None
            row.update(
                {
                    "part number": detail.get("part_number"),
                    "stock line": stock.get("line") if stock else None,
                    "package": stock.get("package") if stock else None,
                    "voltage (V)": stock.get("voltage_v") if stock else None,
                    "unit price (each)": price,
                    "extended price (total)": price * total if price is not None else None,
                    "on hand": on_hand,
                    "shortfall": max(0, total - on_hand) if on_hand is not None else None,
                }
            )
        rows.append(row)
    return rows


def order_total(per_board: int, boards: int, spares: float) -> int:
    """Parts to order: quantity per board × boards × (1 + spares), rounded up (a product that is a whole
    number within 1e-9 is not rounded up past it)."""
    return math.ceil(per_board * boards * (1 + spares) - 1e-9)


def check_ranks(picks: list[int], count: int) -> list[int]:
    """The ranks of the order sheet: each must be one of the ``count`` listed; duplicates dropped."""
    bad = [r for r in picks if not 1 <= r <= count]
    if not picks or bad:
        raise BadValue(
            f"rank {bad[0] if bad else picks} is not listed; {count} candidate(s) are (1…{count})", setting="order"
        )
    return list(dict.fromkeys(picks))


ORDER_PART_COLUMNS = (
    "kind",
    "value",
    "value (Ω or F)",
    "tol − (%)",
    "tol + (%)",
    "TCR min (ppm/°C)",
    "TCR max (ppm/°C)",
    "dielectric",
    "qty per board",
)


def query_rows(provenance: list[tuple[str, object, str]]) -> list[dict]:
    """The ``query`` sheet: every setting with its value and where it came from."""
    return [
        {"setting": name, "value": "" if value is None else str(value), "source": source}
        for name, value, source in provenance
    ]


def _umask() -> int:
    mask = os.umask(0)
    os.umask(mask)
    return mask


def check_writable(path: Path, force: bool, setting: str = "out") -> None:
    """Refuse to replace an existing file without ``force``, or to write into a folder that does not exist."""
    if path.exists() and not force:
        raise BadValue(f"{path} exists; add {{force}} to overwrite it", setting=setting, value=str(path))
    parent = path.parent if str(path.parent) else Path(".")
    if not parent.is_dir():
        raise BadValue(f"cannot write {path}: folder {parent} does not exist", setting=setting, value=str(path))


def check_target(path: Path, force: bool, sheet: str | None, setting: str = "out") -> None:
    """An export target: .xlsx or .csv, writable, and ``sheet`` only for a .csv."""
    suffix = path.suffix.lower()
    if suffix not in (".xlsx", ".csv"):
        raise BadValue(f"{str(path)!r} must end in .xlsx or .csv", setting=setting, value=str(path))
    if sheet is not None and suffix != ".csv":
        raise ClashingOptions("{sheet} applies to a .csv {out} (a .xlsx holds every sheet)", setting="sheet")
    check_writable(path, force, setting)


#: Temporary files of an unfinished write: ``.rcpick-<pid>-<random>.part<suffix>`` beside the target.
TEMP_PREFIX = ".rcpick-"
TEMP_MARK = ".part"
#: A temporary file older than this (seconds) whose writer is gone is removed at the next write there.
STALE_AFTER = 600


def _remove_stale(folder: Path) -> None:
    """Remove temporary files left by writes that were killed (their process no longer runs)."""
    import time

    for leftover in folder.glob(f"{TEMP_PREFIX}*{TEMP_MARK}*"):
        pid_text = leftover.name[len(TEMP_PREFIX) :].split("-", 1)[0]
        try:
            old = time.time() - leftover.stat().st_mtime > STALE_AFTER
            alive = pid_text.isdigit() and _running(int(pid_text))
            if not alive or old:
                leftover.unlink()
        except OSError:
            continue


def _running(pid: int) -> bool:
    if pid == os.getpid():
        return True
    try:
        os.kill(pid, 0)
    except ProcessLookupError:
        return False
    except PermissionError:
        return True
    return True


def atomic_write(path: Path, force: bool, write: Callable[[Path], None], option: str = "out") -> None:
    """Write through ``write(temporary_path)``, then rename into ``path``; refuse to overwrite unless ``force``.

    The file it replaces keeps its permission bits; a new file gets the usual ones (umask).
    """
    path = Path(path)
    check_writable(path, force, option)
    parent = path.parent if str(path.parent) else Path(".")
    _remove_stale(parent)
    try:
        handle, temp_name = tempfile.mkstemp(
            prefix=f"{TEMP_PREFIX}{os.getpid()}-", suffix=f"{TEMP_MARK}{path.suffix}", dir=parent
        )
    except OSError as error:
        raise BadValue(f"cannot write {path}: {error.strerror}", setting=option, value=str(path)) from None
    os.close(handle)
    temp = Path(temp_name)
    try:
        mode = (path.stat().st_mode & 0o7777) if path.exists() else (0o666 & ~_umask())
        write(temp)
        os.chmod(temp, mode)
        os.replace(temp, path)
    except OSError as error:
        temp.unlink(missing_ok=True)
        raise BadValue(f"cannot write {path}: {error.strerror or error}", setting=option, value=str(path)) from None
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
        with _quiet_unraisable(), pd.ExcelWriter(temp, engine="openpyxl") as writer:
            for name, rows in sheets.items():
                frame = pd.DataFrame(rows)
                frame.to_excel(writer, sheet_name=name, index=False)
                _format_sheet(writer.sheets[name], frame)

    atomic_write(path, force, write)


class _quiet_unraisable:
    """While writing: a failed write (a full disk) is reported once as an error; the zip library's own
    complaint when its half-written file is collected afterwards is not printed."""

    def __enter__(self):
        import sys

        self.hook = sys.unraisablehook
        sys.unraisablehook = lambda unraisable: None
        return self

    def __exit__(self, *exc):
        import gc
        import sys

        gc.collect()
        sys.unraisablehook = self.hook
        return False


def write_csv(path: Path, rows: list[dict], force: bool = False) -> None:
    """Write one table as CSV (UTF-8), atomically."""
    import pandas as pd

    atomic_write(path, force, lambda temp: pd.DataFrame(rows).to_csv(temp, index=False))
