"""A table written as CSV byte for byte as ``DataFrame.to_csv`` writes it, several times faster.

``to_csv`` formats every float with numpy's per-element formatter (about a microsecond each:
a 100,000-item results table has six million) and hands every cell to the csv module one by
one.  Here runs of float64 columns are formatted as whole arrays into rows of bytes (a few
columns at once on threads: numpy lets go of the GIL in its loops), other columns become lists of finished cell texts (text quoted once per distinct value: registers
repeat their texts heavily), and rows are joined and written a chunk at a time.  The output
equals ``frame.to_csv(path, index=False, encoding="utf-8", lineterminator="\\r\\n")``:

- float64: Python's ``repr`` (the same shortest round-trip text as numpy's ``astype(str)``,
  which ``to_csv`` uses), NaN as an empty cell;
- int and bool: ``str`` of the value (``True``/``False``);
- text (``str`` dtype) and object columns: the cell's own text, ``str()`` of anything else
  (what the csv module does), missing values (``pandas.isna``) as empty cells;
- quoting as ``csv.QUOTE_MINIMAL`` with ``"\\r\\n"`` line ends: a cell holding a comma, a double
  quote, CR or LF is quoted and its quotes doubled; a record of one empty field is ``""``.

Any other dtype (nullable, categorical, datetime, ...) has its cell texts made by ``to_csv``
itself, one column at a time, so no text is guessed.
"""

from __future__ import annotations

import csv
import io
import os
from concurrent.futures import ThreadPoolExecutor
from pathlib import Path

import numpy as np
import pandas as pd

#: Rows formatted and written at once: bounds the memory held by cell texts (about 200 MiB
#: at the peak for a 100,000 x 72 results table; 50,000 rows took twice that, no faster).
CHUNK_ROWS = 20_000
#: Threads formatting float columns side by side (each column's rows are its own).
_THREADS = min(4, os.cpu_count() or 1)

_POW10 = 10.0 ** np.arange(23)  # 1 .. 1e22, each exact in float64
_SPLITTER = 134217729.0  # 2**27 + 1: Dekker's split of a double into two 26-bit halves
WIDTH = 24  # the longest repr of a float64, '-1.2345678901234567e-308'
_TIGHT = 1e-9  # margin in units of the 17th digit: only exact or near ties go to repr
_E_MIN, _E_MAX = -4, 15  # repr writes 1e-4 <= |x| < 1e16 without an exponent


def write_frame_csv(frame: pd.DataFrame, path: Path, *, text=None) -> Path:
    """``frame`` as UTF-8 CSV without its index, CRLF line ends; the bytes ``to_csv`` writes.

    ``text``, if given, rewrites each column label (as ``str``) and each text cell (a cell of
    type ``str`` in an object column, every present cell of a string column) before it is
    quoted, once per distinct text: the bytes are then those of ``to_csv`` on the rewritten
    frame (:func:`audit.io.writers.safety.neutralise_text` makes text inert in a spreadsheet).
    """
    if text is not None:
        frame = frame.set_axis([text(str(c)) for c in frame.columns], axis=1)
    if frame.shape[1] == 0 or isinstance(frame.columns, pd.MultiIndex):
        frame.to_csv(path, index=False, encoding="utf-8", lineterminator="\r\n")
        return path
    header = frame.iloc[:0].to_csv(None, index=False, lineterminator="\r\n")
    try:
        segments = _segments(frame, text)
    except csv.Error:  # a fallback column's cell beyond the csv module's field size limit
        frame.to_csv(path, index=False, encoding="utf-8", lineterminator="\r\n")
        return path
    lone = frame.shape[1] == 1  # the csv module writes a record of one empty field as ""
    with open(path, "w", encoding="utf-8", newline="") as handle:
        handle.write(header)
        for start in range(0, len(frame), CHUNK_ROWS):
            parts = [texts(start, start + CHUNK_ROWS) for texts in segments]
            lines = ['""' if not t else t for t in parts[0]] if lone else \
                parts[0] if len(parts) == 1 else list(map(",".join, zip(*parts)))
            handle.write("\r\n".join(lines))
            handle.write("\r\n")
    return path


def quote(text: str) -> str:
    """``text`` as a CSV field, quoted the way ``csv.QUOTE_MINIMAL`` with CRLF line ends does."""
    if "," in text or '"' in text or "\r" in text or "\n" in text:
        return '"' + text.replace('"', '""') + '"'
    return text


def _segments(frame: pd.DataFrame, text=None) -> list:
    """Functions ``(start, stop) -> list of texts``, one per run of float64 columns (the texts
    of several cells, comma-joined) or per other column, in column order."""
    return column_segments(frame, lambda j, series: series.to_numpy() if _is_float64(series) else None,
                           _float_block, lambda j, series: _column_texts(series, text))


def column_segments(frame: pd.DataFrame, float_values, float_block, other) -> list:
    """Functions ``(start, stop) -> list of texts`` in column order: one per run of adjacent
    columns that ``float_values(j, series)`` turns into something (not None), made by
    ``float_block(list of those)``, and one per other column, ``other(j, series)``.  The
    writers of CSV, JSON and XLSX format runs of float columns as whole arrays this way."""
    segments, run = [], []
    for j in range(frame.shape[1]):
        series = frame.iloc[:, j]
        values = float_values(j, series)
        if values is not None:
            run.append(values)
            continue
        if run:
            segments.append(float_block(run))
            run = []
        segments.append(other(j, series))
    if run:
        segments.append(float_block(run))
    return segments


def _is_float64(series: pd.Series) -> bool:
    return isinstance(series.dtype, np.dtype) and series.dtype == np.float64


def _float_block(columns: list[np.ndarray]):
    """Texts of adjacent float64 columns, one comma-joined text per row.

    Each cell is laid out in a fixed-width slot of bytes, NUL-padded, followed by its
    separator; deleting the NULs leaves the rows: no Python object per cell.
    """
    def texts(start, stop):
        rows = len(columns[0][start:stop])
        matrix = np.empty((rows, len(columns), WIDTH + 1), np.uint8)
        with ThreadPoolExecutor(_THREADS) as pool:  # numpy lets go of the GIL in its loops
            list(pool.map(lambda c: float_into(columns[c][start:stop], matrix[:, c, :WIDTH]),
                          range(len(columns))))
        matrix[:, :, WIDTH] = ord(",")
        matrix[:, -1, WIDTH] = ord("\n")
        return matrix.tobytes().translate(None, b"\0").decode("ascii").split("\n")[:-1]
    return texts


def float_texts(values: np.ndarray) -> list[str]:
    """The cell texts ``to_csv`` writes for a float64 array: ``repr``, NaN as empty."""
    chars = np.empty((len(values), WIDTH), np.uint8)
    float_into(np.asarray(values, np.float64), chars)
    return [bytes(row).rstrip(b"\0").decode("ascii") for row in chars]


def _column_texts(series: pd.Series, text=None):
    """A function ``(start, stop) -> list of finished cell texts`` for one column."""
    dtype = series.dtype
    numpy = isinstance(dtype, np.dtype)
    if numpy and dtype.kind in "iu":
        values = series.to_numpy()
        return lambda start, stop: list(map(str, values[start:stop].tolist()))
    if numpy and dtype == np.bool_:
        texts = np.where(series.to_numpy(), "True", "False").astype(object)
        return lambda start, stop: texts[start:stop].tolist()
    if isinstance(dtype, pd.StringDtype):
        return _by_text(series.array, text)
    if numpy and dtype == object:
        values = series.to_numpy(object)
        missing = pd.isna(values)
        # the csv module writes a str as it is and anything else as str(); missing is empty
        texts = np.array(["" if gone else v if isinstance(v, str) else str(v)
                          for v, gone in zip(values, missing)], dtype=object)
        if text is not None:  # only cells that are exactly str are text to rewrite
            exact = np.fromiter((type(v) is str for v in values), bool, len(values)) & ~missing
            texts[exact] = [text(v) for v in texts[exact]]
        return _by_text(texts)
    return _by_pandas(series)


def _by_text(values, text=None):
    """Cell texts of a text column (str or missing), each distinct text rewritten by ``text``
    (if given) and quoted once."""
    codes, uniques = pd.factorize(values)
    uniques = np.asarray(uniques, dtype=object).tolist()
    if text is not None:
        uniques = [text(u) for u in uniques]
    quoted = np.array([quote(u) for u in uniques] + [""], dtype=object)  # code -1: missing
    return lambda start, stop: quoted[codes[start:stop]].tolist()


def _by_pandas(series: pd.Series):
    """Cell texts of a column of any other dtype, as ``to_csv`` itself formats them."""
    written = series.to_frame().to_csv(None, index=False, header=False, lineterminator="\r\n")
    texts = np.array([quote(row[0]) for row in csv.reader(io.StringIO(written, newline=""))],
                     dtype=object)
    return lambda start, stop: texts[start:stop].tolist()


def _two_product(a, b):
    """Dekker's exact product: a*b == hi + lo (no overflow or underflow here)."""
    hi = a * b
    t = _SPLITTER * a
    ah = t - (t - a)
    al = a - ah
    t = _SPLITTER * b
    bh = t - (t - b)
    bl = b - bh
    return hi, ((ah * bh - hi) + ah * bl + al * bh) + al * bl


def float_into(values: np.ndarray, chars: np.ndarray) -> None:
    """``repr`` of each float64 written into the rows of ``chars`` (n x 24 bytes), NUL-padded;
    NaN as an all-NUL row.

    A column that repeats its values (temperatures, thicknesses, conditions of a scenario) is
    formatted once per distinct value, told apart by its bits (so -0.0 stays apart from 0.0).
    """
    codes, uniques = pd.factorize(np.asarray(values, np.float64).view(np.uint64))
    if uniques.size <= values.size // 2:
        once = np.empty((uniques.size, chars.shape[1]), np.uint8)
        _float_into_each(uniques.view(np.float64), once)
        chars[:] = once[codes]
        return
    _float_into_each(values, chars)


def _float_into_each(values: np.ndarray, chars: np.ndarray) -> None:
    """:func:`float_into`, value by value.

    ``|x|`` in [1e-4, 1e16) (printed without an exponent) is done for the whole array at once:
    Dekker's exact product gives ``x * 10**(16 - e)`` as an integer and a fraction, the 15-,
    16- and 17-digit decimals nearest to ``x`` follow from it, and the first that reads back as
    ``x`` is repr's (the shortest that round-trips; at 15 digits at most one can).  Whatever
    that reasoning does not settle with a margin (exact or near ties, powers of two, whose
    rounding interval is lopsided, other magnitudes, zeros, infinities) goes to ``repr``.
    """
    n = len(values)
    lengths = np.zeros(n, np.int64)
    a = np.abs(values)
    with np.errstate(invalid="ignore"):
        fast = (a >= 1e-4) & (a < 1e16)
    where = np.flatnonzero(fast)
    x = a[where]
    e = np.clip(np.floor(np.log10(x)).astype(np.int64), _E_MIN, _E_MAX)
    hi, lo = _two_product(x, _POW10[16 - e])
    low = (hi < 1e16) | ((hi == 1e16) & (lo < 0))
    high = (hi > 1e17) | ((hi == 1e17) & (lo >= 0))
    e = e - low + high
    ok = (e >= _E_MIN) & (e <= _E_MAX)
    redo = np.flatnonzero((low | high) & ok)
    if len(redo):
        hi[redo], lo[redo] = _two_product(x[redo], _POW10[16 - e[redo]])
    e = np.clip(e, _E_MIN, _E_MAX)
    scale = _POW10[16 - e]
    ok &= ((hi > 1e16) | ((hi == 1e16) & (lo >= 0))) & (hi < 1e17)
    whole = hi.astype(np.int64) + np.floor(lo).astype(np.int64)  # hi is an integer above 2**53
    frac = lo - np.floor(lo)
    up = (np.nextafter(x, np.inf) - x) * 0.5 * scale  # exact: a power of two times 10**k
    ok &= (x.view(np.int64) & (2**52 - 1)) != 0  # at a power of two the interval is lopsided
    ok &= np.abs(frac - 0.5) > _TIGHT
    low_part = (whole % 10**9).astype(np.uint32)  # rounding to 15 or 16 digits reads the last two
    digits_q = whole + (frac > 0.5)
    chosen = np.zeros(len(x), bool)
    for r in (100, 10):  # 15 then 16 significant digits, in units of the 17th
        part = (low_part % np.uint32(r)) + frac  # distance above the p-digit number below
        up_one = part > r / 2
        d = up_one * float(r) - part  # nearest p-digit number minus x
        trip = (d < up - _TIGHT) & (d > -up + _TIGHT)
        near = (np.abs(np.abs(d) - up) <= _TIGHT) | (np.abs(part - r / 2) <= _TIGHT)
        ok &= chosen | ~near
        take = trip & ~chosen
        digits_q = np.where(take, whole - (low_part % np.uint32(r)) + up_one * r, digits_q)
        chosen |= take
    carry = digits_q >= 10**17
    digits_q = np.where(carry, digits_q // 10, digits_q)
    e = e + carry
    ok &= e <= _E_MAX  # 9999999999999999.5 and up print as 1e+16
    top, bottom = np.divmod(digits_q, 10**9)
    top = top.astype(np.uint32)
    bottom = bottom.astype(np.uint32)
    good = where[ok]
    e = e[ok]
    order = np.argsort(e.astype(np.int8), kind="stable")  # one decimal point position at a time
    e = e[order]
    top, bottom = top[ok][order], bottom[ok][order]
    digits = np.empty((len(e), 17), np.uint8)
    nd = np.zeros(len(e), np.uint8)  # significant digits: the last non-zero one
    for j in range(16, 7, -1):
        bottom, digits[:, j] = np.divmod(bottom, np.uint32(10))
        np.maximum(nd, (digits[:, j] != 0) * np.uint8(j + 1), out=nd)
    for j in range(7, -1, -1):
        top, digits[:, j] = np.divmod(top, np.uint32(10))
        np.maximum(nd, (digits[:, j] != 0) * np.uint8(j + 1), out=nd)
    digits += ord("0")
    nd = nd.astype(np.int64)
    text = np.empty((len(e), WIDTH), np.uint8)
    size = np.empty(len(e), np.int64)
    bounds = np.searchsorted(e, np.arange(_E_MIN, _E_MAX + 2))
    for g, lo_, hi_ in zip(range(_E_MIN, _E_MAX + 1), bounds[:-1], bounds[1:]):
        if lo_ == hi_:
            continue
        slab = text[lo_:hi_]
        if g >= 0:  # d...d.d..., at least one digit after the point
            slab[:, :g + 1] = digits[lo_:hi_, :g + 1]
            slab[:, g + 1] = ord(".")
            slab[:, g + 2:18] = digits[lo_:hi_, g + 1:]
            size[lo_:hi_] = g + 2 + np.maximum(nd[lo_:hi_] - g - 1, 1)
        else:  # 0.0...0d...d
            head = 1 - g
            slab[:, :head] = ord("0")
            slab[:, 1] = ord(".")
            slab[:, head:head + 17] = digits[lo_:hi_]
            size[lo_:hi_] = head + nd[lo_:hi_]
    rows = good[order]
    chars[rows] = text
    lengths[rows] = size
    negative = good[values[good] < 0]
    chars[negative, 1:] = chars[negative, :-1]
    chars[negative, 0] = ord("-")
    lengths[negative] += 1
    rest = np.ones(n, bool)
    rest[good] = False
    rest &= ~np.isnan(values)
    slow = np.flatnonzero(rest)
    if len(slow):  # ASCII: a float's repr is digits, '.', 'e', '+', '-' or 'inf'
        texts = [repr(v).encode("ascii").ljust(WIDTH, b"\0") for v in values[slow].tolist()]
        chars[slow] = np.frombuffer(b"".join(texts), np.uint8).reshape(-1, WIDTH)
        lengths[slow] = [len(t.rstrip(b"\0")) for t in texts]
    np.multiply(chars, np.arange(WIDTH) < lengths[:, None], out=chars)  # NUL after the text
