"""Field screening, pass 1: the neighbour-thickness model from every well's picks, and the wells
whose intervals pass 2 must read again."""

from __future__ import annotations

import numpy as np

from ..evidence.topcuts import TopsTolerance
from ..geo.column import ReferenceColumn
from .neighbours import NeighbourThickness, thickness_samples


def _auto_tolerance(model: NeighbourThickness, base: TopsTolerance,
                    floor: TopsTolerance) -> TopsTolerance:
    """6 % (or 3 × the neighbours' robust relative scatter, when larger), never looser than
    the column tolerance."""
    scatter = model.relative_scatter[np.isfinite(model.relative_scatter)]
    rel = floor.relative
    if scatter.size:
        rel = max(rel, 3.0 * float(np.median(scatter)))
    rel = min(rel, base.relative)
    return TopsTolerance(relative=rel, floor_m=floor.floor_m,
                         pick_uncertainty_m=base.pick_uncertainty_m)


def _neighbour_model(col, intervals: dict, k: int, max_distance):
    """The neighbour-thickness model from pass 1, and each well's expected intervals."""
    wells = sorted(intervals)
    parts = [[], [], [], [], [], []]
    for i in wells:
        ia, ib, d, x, y = intervals[i]
        parts[0].append(np.full(ia.size, i, dtype=np.int64))
        for p, v in zip(parts[1:], (ia, ib, d, x, y)):
            p.append(np.asarray(v, dtype=float))
    if wells:
        w = np.concatenate(parts[0])
        ia, ib, d, x, y = (np.concatenate(p) for p in parts[1:])
    else:
        w = np.zeros(0, np.int64)
        ia = ib = d = x = y = np.zeros(0)
    samples = thickness_samples(w, ia.astype(np.int64), ib.astype(np.int64), d, x, y)
    model = NeighbourThickness(col, samples, k=k, max_distance_m=max_distance)
    exp = model.expected_intervals(w, ia.astype(np.int64), ib.astype(np.int64), x, y) \
        if w.size else np.zeros(0)
    flat: dict[int, np.ndarray] = {}
    start = 0
    for i, part in zip(wells, parts[0]):
        flat[i] = exp[start:start + part.size]
        start += part.size
    pairs = (w, ia.astype(np.int64), ib.astype(np.int64), d, exp)
    return model, flat, pairs


def _dirty_wells(col: ReferenceColumn, pairs, tol_n: TopsTolerance, tol_c: TopsTolerance):
    """Wells that tops evidence may find a cut in, from pass 1's intervals (vectorised).

    The comparison of :func:`_clean_by_tops` for every interval of the field at once:
    expected from the neighbours where every interval of the well has a prediction (else the
    column, with the column's tolerance), flagged beyond 90 % of the allowed difference. Wells
    with a surface picked twice are always 'dirty' (certain repeats, repeated keys).
    Returns (dirty well indices, wells judged against their neighbours).
    """
    w, ia, ib, d, exp = pairs
    if w.size == 0:
        return set(), set()
    s = np.asarray(col.s_m, dtype=float)
    sq = np.concatenate([[0.0], np.cumsum(np.nan_to_num(
        np.asarray(col.thicknesses_m, dtype=float)) ** 2)])
    lo, hi = np.minimum(ia, ib), np.maximum(ia, ib)
    col_exp = s[ib] - s[ia]
    col_spread = np.sqrt(np.maximum(sq[hi] - sq[lo], 0.0))
    wells, start = np.unique(w, return_index=True)
    finite = np.isfinite(exp)
    all_finite = np.minimum.reduceat(finite.astype(np.int8), start).astype(bool)
    neigh = np.zeros(w.size, dtype=bool)
    neigh[:] = np.repeat(all_finite, np.diff(np.append(start, w.size)))
    use = neigh & (ia != ib)
    expected = np.where(use, exp, col_exp)
    spread = np.where(use, np.abs(exp), col_spread)
    rel = np.where(neigh, tol_n.relative, tol_c.relative)
    floor = np.where(neigh, tol_n.floor_m, tol_c.floor_m)
    allowed = rel * spread + floor
    flagged = ~(np.abs(expected - d) <= 0.9 * allowed - 1e-9)
    dirty = set(np.unique(w[flagged]).tolist())
    # a surface picked twice: the picks of a well are ia (each pair's upper) + the last ib
    last = np.append(start[1:] - 1, w.size - 1)
    pw = np.concatenate([w, w[last]])
    pidx = np.concatenate([ia, ib[last]])
    order = np.lexsort((pidx, pw))
    same = (pw[order][1:] == pw[order][:-1]) & (pidx[order][1:] == pidx[order][:-1])
    dirty |= set(pw[order][1:][same].tolist())
    return dirty, set(wells[all_finite].tolist())


def _pairs_from_picks(pick_ix: dict):
    """(well, index above, index below) of consecutive picks, from each well's pick indices."""
    w, a, b = [], [], []
    for i in sorted(pick_ix):
        ix = pick_ix[i]
        ix = ix[ix >= 0]
        if ix.size >= 2:
            w.append(np.full(ix.size - 1, i, dtype=np.int64))
            a.append(ix[:-1])
            b.append(ix[1:])
    if not w:
        z = np.zeros(0, dtype=np.int64)
        return z, z, z
    return np.concatenate(w), np.concatenate(a), np.concatenate(b)


def _crossing_counts(col: ReferenceColumn, pairs) -> dict[int, int]:
    """Wells whose consecutive picks bracket each column surface (could show a gap there)."""
    w, ia, ib = pairs[0], pairs[1], pairs[2]
    lo, hi = np.minimum(ia, ib), np.maximum(ia, ib)
    span = hi - lo
    rep = np.repeat(np.arange(w.size), span)
    surface = np.repeat(lo + 1, span) + (np.arange(rep.size) - np.repeat(np.cumsum(span) - span,
                                                                         span))
    key = np.unique(w[rep] * (len(col) + 1) + surface)
    counts = np.bincount(key % (len(col) + 1), minlength=len(col) + 1)
    return {j: int(counts[j]) for j in range(len(col))}
