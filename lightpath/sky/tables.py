"""Results as tables for notebooks: ``to_frame()`` (a pandas DataFrame) and an HTML view (``_repr_html_``).

Every result type mixes in :class:`Tabular`.  A table's columns are the result's own field names, which
carry their units (``duration_min``, ``peak_area_m2``, ``sun_azimuth_deg``, ``start_jd_ut``), plus two kinds
of columns made for people:

- a local apparent **day** (an integer Julian day number, e.g. ``day``, ``division_day``) is followed by its
  date in the project's own form (``date``, ``division_date``: ``YYYY-MM-DD`` with astronomical years, so
  2600 BC is ``-2599``) in the calendar of the row's ``calendar`` column; this works at every epoch;
- an instant in UT (``start_jd_ut``, ``jd_ut``) is followed by a timezone-aware ``pandas.Timestamp``
  (``start_utc``, ``utc``) for Gregorian-calendar dates that pandas can hold (1677–2262), NaT otherwise;
  a result that knows the site's IANA zone (a visit plan) also gets ``start_local`` in that zone.

Nested values are flattened: a dict ``first_day_percentiles`` becomes ``first_day_percentiles_p5`` …, a pair
``probability_interval`` becomes ``probability_interval_low`` / ``_high``, a nested result's fields join the row
(prefixed with the field's name where they would clash).  Lists and arrays of other lengths are left out.

pandas is an optional dependency (``pip install 'lightpath[tables]'``); without it ``to_frame`` raises an
ImportError saying so, and ``_repr_html_`` still draws a plain HTML table.

>>> from lightpath.sky.calendar import julian_day
>>> from lightpath.sky.divisions import divisions
>>> d = divisions(2027, "longitude", 4)
>>> df = to_frame(d)
>>> list(df.columns[:6])
['scheme', 'index', 'name', 'jd_tt', 'jd_ut', 'utc']
>>> str(df["utc"].dt.tz), df.loc[0, "name"]
('UTC', 'december_solstice')
"""

from __future__ import annotations

import dataclasses
import html
import math
from collections.abc import Sequence
from typing import Any, ClassVar

import numpy as np

__all__ = ["PANDAS_MISSING", "Tabular", "row_values", "to_frame"]

#: What ``to_frame`` says when pandas is not installed.
PANDAS_MISSING = "to_frame() needs pandas, an optional dependency: pip install 'lightpath[tables]'"
_GREGORIAN_START_JD = 2299160.5  # 1582-10-15 00:00 (Gregorian)
_UNIX_EPOCH_JD = 2440587.5  # 1970-01-01 00:00 UT
_PANDAS_RANGE_JD = (2305814.5, 2547339.5)  # 1677-09-22 .. 2262-04-10, inside datetime64[ns]
_HTML_ROWS = 20


def _pandas():
    try:
        import pandas
    except ImportError:
        raise ImportError(PANDAS_MISSING) from None
    return pandas


def _scalar(value: Any) -> bool:
    return value is None or isinstance(value, bool | int | float | str | np.generic)


def _date_name(day_column: str) -> str:
    return day_column[: -len("day")] + "date" if day_column.endswith("day") else day_column + "_date"


def row_values(obj: Any, extra: dict[str, Any] | None = None) -> dict[str, Any]:
    """One result row (a dataclass) as ``{column: value}``, flattened, with a date beside each day column.

    >>> from lightpath.sky.calendar import julian_day
    >>> from lightpath.sky.year_structure import QuarterDay
    >>> day = int(julian_day(-2599, 6, 26.5, "julian"))  # the local apparent day 2600 BC June 26 (Julian)
    >>> v = row_values(QuarterDay("june_solstice", -2599, day - 0.2, day - 0.2, day, "julian", 11.9, 2000.0))
    >>> v["local_apparent_day"], v["local_apparent_date"], v["calendar"]
    (771950, '-2599-06-26', 'julian')
    """
    from lightpath.sky.calendar import format_date

    out: dict[str, Any] = dict(extra or {})
    nested = []
    for f in dataclasses.fields(obj):
        value = getattr(obj, f.name)
        if dataclasses.is_dataclass(value) and not isinstance(value, type):
            nested.append((f.name, value))
        elif isinstance(value, dict):
            out.update({f"{f.name}_{k}": v for k, v in value.items() if _scalar(v)})
        elif isinstance(value, tuple) and len(value) == 2 and all(_scalar(v) for v in value):
            out[f"{f.name}_low"], out[f"{f.name}_high"] = value
        elif _scalar(value):
            out[f.name] = value.item() if isinstance(value, np.generic) else value
            if f.name in getattr(type(obj), "_day_columns", ()):
                ok = value is not None and math.isfinite(float(value))
                out[_date_name(f.name)] = str(format_date(float(value), obj.calendar)) if ok else None
    for name, value in nested:
        for k, v in row_values(value).items():
            out[k if k not in out else f"{name}_{k}"] = v
    return out


def _timestamps(pd, jd_ut: np.ndarray):
    """UT Julian dates → timezone-aware UTC timestamps (NaT before the Gregorian calendar or out of range)."""
    jd = np.asarray(jd_ut, dtype=float)
    ok = np.isfinite(jd) & (jd >= max(_GREGORIAN_START_JD, _PANDAS_RANGE_JD[0])) & (jd < _PANDAS_RANGE_JD[1])
    ms = np.where(ok, np.round((np.where(ok, jd, _UNIX_EPOCH_JD) - _UNIX_EPOCH_JD) * 86_400_000.0), 0)
    stamps = pd.to_datetime(ms.astype(np.int64), unit="ms", utc=True)
    return stamps.where(ok, pd.NaT)


def _frame(pd, data, timezone: str | None):
    """A DataFrame of records or columns; whole-number columns with gaps as nullable ``Int64``; timestamps added."""
    frame = pd.DataFrame(data)
    if isinstance(data, list):
        for column in frame.columns:
            values = [r.get(column) for r in data]
            kinds = {type(v) for v in values if v is not None}
            if kinds == {int} and None in values:
                frame[column] = pd.array(values, dtype="Int64")
    return _add_timestamps(pd, frame, timezone)


def _add_timestamps(pd, frame, timezone: str | None):
    for column in list(frame.columns):
        if not (column == "jd_ut" or column.endswith("_jd_ut")):
            continue
        values = pd.to_numeric(frame[column], errors="coerce").to_numpy(dtype=float)
        stem = column[: -len("jd_ut")]
        stamps = _timestamps(pd, values)
        where = frame.columns.get_loc(column) + 1
        frame.insert(where, f"{stem}utc", stamps)
        if timezone:
            frame.insert(where + 1, f"{stem}local", stamps.tz_convert(timezone))
    return frame


class Tabular:
    """Mixin for result dataclasses: ``to_frame()`` and ``_repr_html_``.

    A class sets ``_tables`` to the names of its list fields whose items are the rows (the first is the default
    table; none: the result itself is one row), ``_day_columns`` to its fields that hold local apparent day
    numbers, and ``_columnar = True`` when its fields are arrays of one shape (a Sun table).
    """

    _tables: ClassVar[tuple[str, ...]] = ()
    _day_columns: ClassVar[tuple[str, ...]] = ()
    _columnar: ClassVar[bool] = False

    def _table_rows(self, table: str) -> list[tuple[dict[str, Any], Any]]:
        """(constant columns, row object) for each row of ``table``."""
        return [({}, row) for row in getattr(self, table)]

    def _timezone(self) -> str | None:
        zone = getattr(self, "timezone", None)
        return zone if isinstance(zone, str) and zone else None

    def _columns(self, table: str | None = None) -> dict[str, list] | list[dict[str, Any]]:
        """The table as records (one dict per row), or as columns for a columnar result."""
        if self._columnar:
            arrays = {f.name: getattr(self, f.name) for f in dataclasses.fields(self)}
            n = max((np.size(v) for v in arrays.values() if isinstance(v, np.ndarray)), default=1)
            return {k: (np.ravel(v) if isinstance(v, np.ndarray) else [v] * n) for k, v in arrays.items()}
        if not self._tables:
            return [row_values(self)]
        table = table or self._tables[0]
        if table not in self._tables:
            raise ValueError(f"table: {table!r} is not one of {', '.join(self._tables)}")
        return [row_values(row, extra) for extra, row in self._table_rows(table)]

    def to_frame(self, table: str | None = None):
        """The result as a :class:`pandas.DataFrame` (see :mod:`lightpath.sky.tables` for the columns).

        ``table`` picks one of the result's tables (``_tables``); the first by default.
        """
        pd = _pandas()
        return _frame(pd, self._columns(table), self._timezone())

    def _repr_html_(self) -> str:
        title = html.escape(type(self).__name__)
        try:
            frame = self.to_frame()
        except ImportError:
            cols = self._columns()
            records = [dict(zip(cols, r, strict=True)) for r in zip(*cols.values(), strict=True)] if isinstance(
                cols, dict) else cols  # fmt: skip
            return f"<p><b>{title}</b></p>" + _plain_html(records[:_HTML_ROWS])
        shown = f" ({len(frame)} rows)" if self._tables or self._columnar else ""
        return f"<p><b>{title}</b>{shown}</p>" + frame.to_html(max_rows=_HTML_ROWS, na_rep="—")


def _plain_html(records: list[dict[str, Any]]) -> str:
    """A plain HTML table of records, for notebooks without pandas."""
    if not records:
        return "<p>(no rows)</p>"
    names = list(records[0])
    head = "".join(f"<th>{html.escape(str(n))}</th>" for n in names)
    body = "".join(
        "<tr>" + "".join(f"<td>{html.escape(str(r.get(n, '')))}</td>" for n in names) + "</tr>" for r in records
    )
    return f"<table><thead><tr>{head}</tr></thead><tbody>{body}</tbody></table>"


def to_frame(result: Any, table: str | None = None):
    """Any result, or a list of result rows (e.g. what :func:`lightpath.sky.divisions.divisions` returns),
    as a :class:`pandas.DataFrame`.
    """
    if isinstance(result, Tabular):
        return result.to_frame(table)
    if isinstance(result, Sequence) and not isinstance(result, str):
        pd = _pandas()
        return _frame(pd, [row_values(r) for r in result], None)
    if dataclasses.is_dataclass(result) and not isinstance(result, type):
        pd = _pandas()
        return _frame(pd, [row_values(result)], None)
    raise TypeError(f"to_frame: {type(result).__name__} is not a lightpath result or a list of result rows")
