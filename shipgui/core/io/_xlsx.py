"""Rows of text from one sheet of an XLSX workbook (openpyxl, read-only).

Cells become the text a dispatcher would type into a CSV file, so one set of
validators serves both: 12.3 (not 12.300000000000001), 7:45 as ``07:45``, a
date-time as ISO 8601, a duration past 24 h as ``25:30`` (or minutes in a
minutes column).  Formulas count as the value the spreadsheet last computed;
a formula without one, or a cell showing a spreadsheet error, is reported.

openpyxl parses the XML with defusedxml when it is installed (entity
expansion attacks); the zip container is checked here before it is opened,
so a small file that unpacks to gigabytes is refused up front.  openpyxl is
imported only when a workbook is read, so the rest of the core stays light.
"""

from __future__ import annotations

import math
import re
import warnings
import zipfile
from collections.abc import Iterator
from datetime import date, datetime, time, timedelta
from pathlib import Path

from ..errors import InputError, Problem

__all__ = ["read_xlsx_rows", "MAX_UNCOMPRESSED_BYTES", "cell_text"]

MAX_UNCOMPRESSED_BYTES = 200 * 1024 * 1024
MAX_ZIP_ENTRIES = 5_000
MAX_SHEET_ROWS = 1_048_576  # the most rows a spreadsheet program can hold
MAX_CELL_PROBLEMS = 50
_OLE = b"\xd0\xcf\x11\xe0\xa1\xb1\x1a\xe1"
# Before 1 March 1900 a spreadsheet "date" is a time of day past 24 h shown
# without its date: serial 1.0625 is day 1 (1900-01-01) 01:30, i.e. 25:30.
_TIME_ZERO = datetime(1899, 12, 31)
_FIRST_REAL_DATE = datetime(1900, 3, 1)
_FORMULA_TAG = re.compile(rb"<(?:[A-Za-z_][\w.-]*:)?f[\s>/]")


def read_xlsx_rows(path: Path, head: bytes, *, sheet: str | None, max_rows: int,
                   minutes_columns: frozenset[str],
                   problems: list[Problem]) -> Iterator[tuple[int, list[str]]]:
    """Yield (row number, cell texts) of the sheet, header first.

    Problems of single cells (formula without a value, error cells) are
    appended to ``problems`` and the cell reads as empty.
    """
    _check_container(path, head)
    books = [_open_book(path, data_only=True)]
    try:
        values = _pick_sheet(books[0], sheet, path)
        formulas = None
        if _has_formulas(path, values):
            books.append(_open_book(path, data_only=False))
            formulas = books[1][values.title]
        for ws in (values, formulas):
            if ws is not None:
                ws.reset_dimensions()  # files written by other programs often state wrong ones
        yield from _sheet_rows(path, values, formulas, max_rows, minutes_columns, problems)
    except InputError:
        raise
    except Exception as exc:  # noqa: BLE001 - openpyxl raises many kinds on damaged XML
        raise _damaged(path, exc) from None
    finally:
        for book in books:
            book.close()


def _damaged(path: Path, exc: Exception) -> InputError:
    cause: BaseException | None = exc
    while cause is not None and not type(cause).__module__.startswith("defusedxml"):
        cause = cause.__cause__ or cause.__context__
    if cause is not None:
        return InputError("the workbook holds unsafe XML (entity or DTD declarations, as in "
                          "an 'XML bomb') and is refused; save it again from a spreadsheet "
                          "program", file=path)
    return InputError(f"the workbook is damaged and cannot be read ({_reason(exc)}); open it "
                      "in a spreadsheet program and save it again", file=path)


def _has_formulas(path: Path, worksheet) -> bool:
    """Whether the sheet's XML holds any formula element (scanned in chunks).

    Only then is the workbook read a second time with formulas, to tell an
    empty cell from a formula that has no saved value.
    """
    part = getattr(worksheet, "_worksheet_path", None)
    if not part:
        return True
    with zipfile.ZipFile(path) as archive, archive.open(part.lstrip("/")) as f:
        tail = b""
        while chunk := f.read(1 << 20):
            if _FORMULA_TAG.search(tail + chunk):
                return True
            tail = chunk[-64:]
    return False


def _reason(exc: Exception) -> str:
    text = str(exc).splitlines()[0][:120] if str(exc) else ""
    return f"{type(exc).__name__}: {text}" if text else type(exc).__name__


def _check_container(path: Path, head: bytes) -> None:
    if head.startswith(_OLE):
        raise InputError("this is an old Excel (.xls) workbook; save it as .xlsx or CSV UTF-8",
                         file=path)
    if not head.startswith(b"PK\x03\x04"):
        raise InputError("the file is named like a spreadsheet but is not one (or it is "
                         "damaged); save it as .xlsx or CSV UTF-8", file=path)
    try:
        with zipfile.ZipFile(path) as archive:
            entries = archive.infolist()
            if len(entries) > MAX_ZIP_ENTRIES:
                raise InputError(f"the workbook holds {len(entries)} parts; this is not a "
                                 "planning spreadsheet", file=path)
            unpacked = sum(e.file_size for e in entries)
            names = {e.filename for e in entries}
            mimetype = archive.read("mimetype")[:100] if "mimetype" in names else b""
    except InputError:
        raise
    except (zipfile.BadZipFile, zipfile.LargeZipFile, OSError, EOFError, ValueError,
            NotImplementedError, KeyError):
        raise InputError("the workbook is damaged (not a complete .xlsx file, perhaps cut off "
                         "while copying); save it again", file=path) from None
    if unpacked > MAX_UNCOMPRESSED_BYTES:
        raise InputError(f"the workbook unpacks to {unpacked // (1024 * 1024)} MB; over "
                         f"{MAX_UNCOMPRESSED_BYTES // (1024 * 1024)} MB is not read", file=path)
    if b"opendocument" in mimetype:
        raise InputError("this is an OpenDocument spreadsheet (.ods); save it as .xlsx or "
                         "CSV UTF-8", file=path)
    if "xl/workbook.xml" not in names or "[Content_Types].xml" not in names:
        raise InputError("this is a zip archive, not an Excel workbook (.xlsx)", file=path)


def _open_book(path: Path, *, data_only: bool):
    """The workbook read-only: cached values (``data_only``) or formulas."""
    try:
        import openpyxl
    except ImportError:
        raise InputError("reading .xlsx files needs the openpyxl package; install it or save "
                         "the sheet as CSV UTF-8", file=path) from None
    try:
        with warnings.catch_warnings():  # unsupported extensions are harmless for reading
            warnings.simplefilter("ignore")
            return openpyxl.load_workbook(path, read_only=True, data_only=data_only,
                                          keep_links=False)
    except Exception as exc:  # noqa: BLE001 - see read_xlsx_rows
        raise _damaged(path, exc) from None


def _pick_sheet(book, sheet: str | None, path: Path):
    sheets = book.worksheets
    if not sheets:
        raise InputError("the workbook has no sheet with cells", file=path)
    if sheet is None:
        return sheets[0]
    for ws in sheets:
        if ws.title == sheet:
            return ws
    for ws in sheets:
        if ws.title.strip().casefold() == sheet.strip().casefold():
            return ws
    names = ", ".join(f"'{ws.title}'" for ws in sheets[:10])
    raise InputError(f"the workbook has no sheet named '{sheet}' (it has {names})", file=path)


def _sheet_rows(path: Path, values, formulas, max_rows: int, minutes_columns: frozenset[str],
                problems: list[Problem]) -> Iterator[tuple[int, list[str]]]:
    columns: list[str] | None = None
    named: list[int] = []
    filled = 0
    formula_rows = formulas.iter_rows() if formulas is not None else None
    for number, cells in enumerate(values.iter_rows(), start=1):
        # Both views list the same rows: they are read from the same sheet part.
        formula_cells = next(formula_rows, ()) if formula_rows is not None else ()
        if number > MAX_SHEET_ROWS:
            raise InputError("the sheet has more rows than a spreadsheet can hold; the file "
                             "is damaged", file=path)
        if all(c.value is None for c in cells) and all(c.value is None for c in formula_cells):
            continue
        filled += 1
        if filled > max_rows + 1:
            raise InputError(f"more than {max_rows} rows; this is not a one-day file",
                             file=path, row=number)
        if columns is None:  # the header: every cell
            texts = [_cell(path, number, None, cell,
                           formula_cells[k] if k < len(formula_cells) else None,
                           minutes_columns, problems) for k, cell in enumerate(cells)]
            columns = [t.strip().lower() for t in texts]
            named = [k for k, name in enumerate(columns) if name]
            yield number, texts
            continue
        # Data rows: only the named columns are read, so a stray cell far to the
        # right (which pads the row to its column) costs nothing per cell.
        texts = [""] * min(len(cells), named[-1] + 1 if named else 0)
        for k in named:
            if k < len(cells):
                formula = formula_cells[k] if k < len(formula_cells) else None
                texts[k] = _cell(path, number, columns[k], cells[k], formula, minutes_columns,
                                 problems)
        yield number, texts


def _cell(path: Path, row: int, column: str | None, cell, formula, minutes_columns,
          problems: list[Problem]) -> str:
    value = cell.value
    if getattr(cell, "data_type", None) == "e":
        _problem(problems, f"the cell shows the spreadsheet error {value}; correct the "
                 "formula or type the value", path, row, column, cell)
        return ""
    if value is None:
        if formula is not None and getattr(formula, "data_type", None) == "f":
            _problem(problems, "the cell holds a formula whose value was never computed "
                     "(the file was written by a program, not a spreadsheet); open it in a "
                     "spreadsheet program to recalculate and save it", path, row, column, cell)
        return ""
    return cell_text(value, minutes=column in minutes_columns)


def _problem(problems: list[Problem], message: str, path: Path, row: int,
             column: str | None, cell) -> None:
    if len(problems) < MAX_CELL_PROBLEMS:
        where = getattr(cell, "coordinate", None)
        problems.append(Problem(f"cell {where}: {message}" if where else message,
                                str(path), row, column))


def cell_text(value, *, minutes: bool = False) -> str:
    """The text a dispatcher would type for a spreadsheet cell value."""
    if isinstance(value, bool):
        return "TRUE" if value else "FALSE"
    if isinstance(value, int):
        return str(value)
    if isinstance(value, float):
        return _number(value)
    if isinstance(value, datetime):
        if value.tzinfo is None and value < _FIRST_REAL_DATE:
            return _duration(value - _TIME_ZERO, minutes)
        return _iso(value)
    if isinstance(value, date):
        return value.isoformat()
    if isinstance(value, time):
        return _duration(timedelta(hours=value.hour, minutes=value.minute,
                                   seconds=value.second, microseconds=value.microsecond),
                         minutes)
    if isinstance(value, timedelta):
        return _duration(value, minutes)
    return str(value)


def _number(value: float) -> str:
    if not math.isfinite(value):
        return str(value)
    if value.is_integer() and abs(value) < 1e15:
        return str(int(value))
    # 15 significant digits is what spreadsheets show: 12.3, not 12.300000000000001.
    return format(value, ".15g")


def _duration(value: timedelta, minutes: bool) -> str:
    seconds = round(value.total_seconds())
    if minutes:
        return _number(seconds / 60)
    sign = "-" if seconds < 0 else ""
    h, rest = divmod(abs(seconds), 3600)
    m, s = divmod(rest, 60)
    return f"{sign}{h:02d}:{m:02d}" + (f":{s:02d}" if s else "")


def _iso(value: datetime) -> str:
    # Spreadsheets store times as fractions of a day: round off the float noise.
    whole = value.replace(microsecond=0)
    if value.microsecond >= 500_000:
        whole += timedelta(seconds=1)
    text = whole.strftime("%Y-%m-%dT%H:%M") if whole.year >= 1000 else whole.isoformat()[:16]
    if whole.second:
        text += f":{whole.second:02d}"
    offset = whole.isoformat()[19:]
    return text + offset
