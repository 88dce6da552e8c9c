"""The passes over a bench sweep's rows that gather them into command levels (estimator.bench.
levels): each row's level key, the rows and sums per level, and the sums and largest values
of the squared deviations from the level means.

They go BLOCK_ROWS rows at a time, so that all the steps of a block run while it stays in
the processor's cache, and keep no full-length temporaries beyond the level number of each
row. numpy.add.at adds the rows in their order, as numpy.bincount does: every sum is the
same to the last bit as one made over whole columns.
"""

import numpy as np

# width of a supply band as a share of the sweep's lowest bus voltage [-]: 1 %
VOLTAGE_BAND = 0.01
# rows per block of the passes over the rows: the arrays a block touches (a few columns of
# 8 bytes, 32768 rows) stay inside a processor core's own (L2) cache between the steps [-]
BLOCK_ROWS = 32768


def bands(v, v_lo, v_hi, out=None):
    """(supply band number of each voltage v [V] (whole numbers as floats), number of
    bands) for a sweep whose bus voltage spans v_lo..v_hi [V] (v_lo > 0); out: an array
    for the band numbers (else a new one)."""
    per_volt = 1.0 / (VOLTAGE_BAND * v_lo)  # band k holds the voltages nearest (k + 100) % of v_lo
    number = np.multiply(v, per_volt, out=out)
    number -= 1.0 / VOLTAGE_BAND - 0.5
    np.trunc(number, out=number)
    return number, int(v_hi * per_volt - 1.0 / VOLTAGE_BAND + 0.5) + 1


def blocks(rows):
    """(start, stop) of the blocks of BLOCK_ROWS rows that cover ``rows`` rows."""
    return [(start, min(start + BLOCK_ROWS, rows)) for start in range(0, rows, BLOCK_ROWS)]


def level_sums(u, v, t, p, width, v_lo, v_hi):
    """Level of every row at command step ``width`` [-] (v_lo..v_hi: the voltage span [V])
    and the sums of the rows per level: (dense level number of each row, in command order;
    rows per level; command step index of each level; supply band of each level; [sums of
    u, v, t, p per level]).

    A row's key is its command step index x the number of bands + its supply band. Two
    passes over the rows, BLOCK_ROWS at a time: the keys and the rows per key, then the
    dense level numbers and the sums. Each block's steps run while it stays in the
    processor's cache, and numpy.add.at adds the rows in their order as numpy.bincount
    does: the sums are the same to the last bit."""
    n_bands = bands(np.empty(0), v_lo, v_hi)[1]
    size = (int(round(1.0 / width)) + 2) * n_bands  # commands 0..1 (grown for larger ones)
    count = np.zeros(size)
    key = np.empty(u.size, dtype=np.intp)
    step, band = np.empty(min(BLOCK_ROWS, u.size)), np.empty(min(BLOCK_ROWS, u.size))
    for start, stop in blocks(u.size):
        k, b = step[:stop - start], band[:stop - start]
        np.multiply(u[start:stop], 1.0 / width, out=k)
        np.rint(k, out=k)
        bands(v[start:stop], v_lo, v_hi, out=b)
        k *= n_bands
        k += b
        lo, hi = float(np.min(k)), float(np.max(k))
        if not lo >= 0.0:
            raise ValueError("a command below 0, a voltage below the sweep's lowest, or a NaN reached "
                             "the command levels")
        if hi >= size:
            count = np.r_[count, np.zeros(int(hi) + 1 - size)]
            size = count.size
        rows = key[start:stop]
        np.copyto(rows, k, casting="unsafe")  # whole numbers: the float -> integer cast is exact
        np.add.at(count, rows, 1.0)
    raw = np.flatnonzero(count)
    index = np.cumsum(count > 0) - 1
    sums = [np.zeros(raw.size) for _ in range(4)]
    dense = np.empty(u.size, dtype=np.intp)
    for start, stop in blocks(u.size):
        rows = dense[start:stop]
        np.take(index, key[start:stop], out=rows, mode="wrap")  # every key is in range
        for total, x in zip(sums, (u, v, t, p)):
            np.add.at(total, rows, x[start:stop])
    return dense, count[raw], raw // n_bands, raw % n_bands, sums


def deviation_sums(key, n_keys, columns, means):
    """For each column x (with its level means): the sum and the largest of the squared
    deviations x - its level's mean, per level. One pass over the rows, BLOCK_ROWS at a
    time (as level_sums); the squared deviations of the rows are not kept (the spike screen,
    estimator.bench.levels, makes those of the few rows it needs again, by the same steps)."""
    out = [(np.zeros(n_keys), np.zeros(n_keys)) for _ in columns]
    d = np.empty(min(BLOCK_ROWS, key.size))
    for start, stop in blocks(key.size):
        rows, dev = key[start:stop], d[:stop - start]
        for x, mean, (total, largest) in zip(columns, means, out):
            np.take(mean, rows, out=dev, mode="wrap")  # every level number is in range
            np.subtract(x[start:stop], dev, out=dev)
            np.square(dev, out=dev)
            np.add.at(total, rows, dev)
            np.maximum.at(largest, rows, dev)
    return out
