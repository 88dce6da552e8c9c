"""The numbers of a bench CSV's wanted columns, in SI: one numpy.loadtxt on the common path,
a line-by-line parse (estimator.csvtable) that names the first broken row on any trouble.

Used by estimator.bench.reader (which reads the comments and the header first).
"""

import math

from estimator import csvtable
from estimator.bench.columns import EXAMPLE_HEADER


def _head_commas(path, skip):
    """Commas in the first ``skip`` lines of the file (comments and the header)."""
    with open(path, "rb") as fh:
        return sum(fh.readline().count(b",") for _ in range(skip))


def _slow_parse(path, skip, ncols, wanted=None):
    """Line-by-line parse (estimator.csvtable) that names the first broken row; an empty
    cell or 'nan' becomes NaN (a missed reading: the row is dropped and counted later),
    infinity written in a cell is refused with its line. wanted: the column indices read as
    numbers (default all); the others (text, notes, a NaN in a column not used) are left NaN,
    as a flight log's."""
    import numpy as np

    wanted = list(range(ncols)) if wanted is None else list(wanted)
    cells = csvtable.read_head(path, "a bench CSV", EXAMPLE_HEADER).cells  # to name a column in errors
    head = csvtable.Head({}, cells if len(cells) == ncols else [""] * ncols, skip)
    columns = csvtable.read_columns(path, head, wanted, missing_ok=True, what="a bench CSV")
    rows = len(columns[0]) if columns else 0
    table = np.full((rows, ncols), np.nan)
    for index, column in zip(wanted, columns):
        table[:, index] = column
    return table


_LOADTXT = {"delimiter": ",", "comments": "#", "ndmin": 2, "dtype": float, "encoding": "utf-8"}


def load_numbers(path, skip, ncols, wanted, to_si, kept=None):
    """(one contiguous array per column of ``wanted`` in SI, in that order (only the first
    ``kept`` when all are finite); the (min, max) of each if all are finite, else None; the
    file's SHA-256).

    to_si: (scale, offset) of each wanted column (UNITS). One numpy.loadtxt. When the file
    holds other columns too, it parses only ``wanted`` and the last column: a row short of a
    cell then lacks the last one and fails the read, so no row is narrower than the header,
    and the file's commas (counted while hashing) prove that none is wider either (a full
    read checks every row's width by itself). Each column is copied out once, in SI; its
    min and max (NaN or infinity makes one non-finite) decide finiteness and serve the row
    checks. On any trouble (a row of another width, text where a number belongs, NaN or
    infinity or 'nan' in a cell) the slow parse, which names the broken row or turns missing
    readings into NaN.
    """
    import warnings

    import numpy as np
    from estimator.outputs import file_sha256, file_sha256_counting

    every = sorted(wanted) == list(range(ncols))  # one read hashes the file (and counts its commas)
    digest, commas = (file_sha256(path), None) if every else file_sha256_counting(path, ord(","))
    try:
        with warnings.catch_warnings():
            warnings.simplefilter("error")
            read = None if every else list(wanted) + ([] if ncols - 1 in wanted else [ncols - 1])
            table = np.loadtxt(path, skiprows=skip, usecols=read, **_LOADTXT)
        if (table.shape[1] == (ncols if every else len(read))
                and (every or commas - _head_commas(path, skip) == table.shape[0] * (ncols - 1))):
            cols, extremes = _si_columns(table, wanted if every else range(len(wanted)), to_si, kept)
            del table
            if extremes is not None:
                return cols, extremes, digest
    except (ValueError, UserWarning, UnicodeDecodeError, OverflowError):
        pass
    cols, extremes = _si_columns(_slow_parse(path, skip, ncols, wanted), wanted, to_si)
    return cols, extremes, digest


def _si_columns(table, at, to_si, kept=None):
    """(the first ``kept`` (default all) of the table's columns ``at`` in SI, value * scale +
    offset, each a contiguous array; the (min, max) of every one of ``at``, or None when one
    is empty or holds a NaN or an infinity). One pass, BLOCK_ROWS rows at a time: while a
    block is in cache its columns are scaled and scanned (whole columns would read the
    table once per column and each column once per min and max); identical results."""
    import numpy as np
    from estimator.bench.row_sums import BLOCK_ROWS

    rows = table.shape[0]
    kept = len(at) if kept is None else kept
    out = [np.empty(rows) for _ in range(kept)]  # not one 2-D array: mapped afresh on every read
    scratch = np.empty(min(rows, BLOCK_ROWS))  # a block of a column only checked
    if not rows:
        return out, None
    starts = range(0, rows, BLOCK_ROWS)
    lows, highs = np.empty((len(starts), len(at))), np.empty((len(starts), len(at)))
    with np.errstate(invalid="ignore"):
        for b, start in enumerate(starts):
            part = table[start:start + BLOCK_ROWS]
            for j, (k, (scale, offset)) in enumerate(zip(at, to_si)):
                col = out[j][start:start + BLOCK_ROWS] if j < kept else scratch[:part.shape[0]]
                if scale != 1.0:
                    np.multiply(part[:, k], scale, out=col)
                else:
                    col[...] = part[:, k]
                if offset != 0.0:
                    col += offset
                lows[b, j], highs[b, j] = np.min(col), np.max(col)
        extremes = [(float(np.min(lo)), float(np.max(hi))) for lo, hi in zip(lows.T, highs.T)]
    return out, extremes if all(math.isfinite(x) for pair in extremes for x in pair) else None
