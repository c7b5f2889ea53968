"""Row-at-a-time forward pass of the alignment engine (a well being drilled).

:class:`StreamingAligner` owns the DP state: the resampler state, a ring of the last few cost
and misfit rows (O(M)), the per-row and per-sample arrays (O(N)) and the move codes, one byte
per (row, reference sample), in blocks of rows. ``AlignmentEngine.align`` is a single push of
the whole well, so batch and streaming results are identical by construction.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING

import numpy as np

from .._buffers import BlockPool
from .._buffers import GrowBuffer as _Grow
from ..errors import AlignmentError, input_error
from . import _kernels as K
from .evidence import build_alignment, path_and_score
from .resample import max_new_rows, new_resampler_state, resample_chunk

if TYPE_CHECKING:
    from .alignment import Alignment
    from .engine import AlignmentEngine

__all__ = ["StreamingAligner", "TailAlignment"]


def _as_curves(values, n_curves: int, what: str) -> np.ndarray:
    x = np.asarray(values, dtype=float)
    if x.ndim == 1 and n_curves == 1:
        x = x[:, None]
    if x.ndim != 2 or x.shape[1] != n_curves:
        raise input_error(f"{what} curves must have shape (N, {n_curves})", value=x.shape,
                          fix="pass the same curves, in the same order, as the reference")
    return x


@dataclass(frozen=True)
class TailAlignment:
    """The optimal path's last rows, as :meth:`StreamingAligner.tail` returns them.

    ``alignment`` is the :class:`~wellfault.align.alignment.Alignment` of rows ``row0`` to
    ``n_rows - 1`` and of well samples ``sample0`` to ``sample_end - 1`` (the samples of
    committed rows): its row and sample numbers, jump brackets included, count from ``row0``
    and ``sample0``. Its jumps, sizes, placements, margins and confidences have the batch
    definitions (:mod:`wellfault.align.evidence`), computed on the tail alone.
    """

    row0: int
    sample0: int
    sample_end: int
    n_rows: int
    evidence: bool
    alignment: Alignment


def _as_anchors(anchors) -> np.ndarray:
    """Anchors as a (K, 3) float array sorted by sample (engine.py, "Anchors")."""
    if anchors is None:
        return np.zeros((0, 3))
    a = np.asarray(anchors, dtype=float).reshape(-1, 3) if np.size(anchors) else np.zeros((0, 3))
    if not np.all(np.isfinite(a)) or np.any(a[:, 0] < 0) or np.any(a[:, 2] < 0):
        raise input_error("anchors must be finite rows (sample >= 0, position, tolerance >= 0)",
                          value=a.tolist()[:3], fix="pass (K, 3) rows: well sample, reference "
                          "position and tolerance [reference samples]")
    return a[np.argsort(a[:, 0], kind="stable")]


#: move-code blocks given back by finished whole-well alignments (:meth:`StreamingAligner.release`)
CODE_BLOCKS = BlockPool(160 * 2**20)

_NO_ANCHORS = (np.zeros(0, np.int64), np.zeros(0, np.int64), np.zeros(0, np.int64))


class _Arr:
    __slots__ = ("a",)

    def __init__(self, a: np.ndarray) -> None:
        self.a = a


class _TailView:
    """A streaming aligner seen from row ``lo`` and sample ``i_lo`` on (views, re-based row
    numbers): what :func:`~wellfault.align.evidence.build_alignment` reads."""

    def __init__(self, al: StreamingAligner, lo: int, n: int, i_lo: int, i_hi: int) -> None:
        self.engine, self._p, self.center, self.scale = al.engine, al._p, al.center, al.scale
        self.n_samples = i_hi - i_lo
        for name in ("_meta", "_rows", "_Rr", "_sig", "_run", "_rowmin", "_rowarg",
                     "_rowmean", "_jsrc"):
            setattr(self, name, _Arr(getattr(al, name).a[lo:n]))
        self._srow = _Arr(al._srow.a[i_lo:i_hi] - lo)
        self._spos = _Arr(al._spos.a[i_lo:i_hi])
        self._z = _Arr(al._z.a[i_lo:i_hi])
        self._al, self._lo = al, lo

    def anchor_bands(self, r0: int, r1: int):
        rows, lo, hi = self._al.anchor_bands(self._lo + r0, self._lo + r1)
        return rows - self._lo, lo, hi


class StreamingAligner:
    """Row-at-a-time forward pass of an :class:`AlignmentEngine` (a well being drilled).

    ``push`` standardises and resamples new samples and runs the DP over every completed row;
    ``current`` returns the optimal alignment of everything pushed so far (the unfinished last
    row included, without committing it). Pushing a whole well and pushing it sample by sample
    give identical results.
    """

    def __init__(self, engine: AlignmentEngine, center, scale, anchors=None) -> None:
        self.engine = engine
        p = engine._prepared()
        self._p = p
        nc = p["n_curves"]
        self.center = np.zeros(nc) if center is None else np.broadcast_to(
            np.asarray(center, float), (nc,)).copy()
        self.scale = np.ones(nc) if scale is None else np.broadcast_to(
            np.asarray(scale, float), (nc,)).copy()
        if np.any(~(self.scale > 0)):
            raise input_error("scale must be positive", value=self.scale.tolist())
        self._anchors = _as_anchors(anchors)
        m = p["lo_t"].shape[1]                # DP columns: the type log and its off-log margins
        width = m + 2 * p["pad"]
        self._F = np.full((p["nb"], width), np.inf)
        self._E = np.full((p["nb"], width), np.inf)
        self._st, self._acc = new_resampler_state(nc)
        self._z = _Grow((nc,), float)       # standardised well samples
        self._spos = _Grow((), float)
        self._srow = _Grow((), np.int64)
        self._rows = _Grow((nc,), float)
        self._meta = _Grow((5,), float)
        self._Rr = _Grow((), np.int64)
        self._sig = _Grow((), np.int64)
        self._run = _Grow((), np.int64)
        self._rowmin = _Grow((), float)
        self._rowarg = _Grow((), np.int64)
        self._rowmean = _Grow((), float)
        b = p["jump_bin"]
        self._jsrc = _Grow(((m + b - 1) // b if b > 0 else 1,), np.int64)   # jump sources
        self._block_rows = int(np.clip(2**22 // m, 16, 4096))
        self._blocks: list[np.ndarray] = []
        self._tpath = _Grow((), np.int64)    # traceback of the tail (tail())
        self._tland = _Grow((), np.uint8)
        self._tjump = _Grow((), np.uint8)
        self.n_samples = 0
        self.n_rows = 0
        self._released = False

    # -- forward ------------------------------------------------------------------------------
    def push(self, values, step) -> None:
        """Add one sample (``values`` (C,), scalar ``step``) or several ((n, C), (n,))."""
        p = self._p
        x = np.asarray(values, dtype=float)
        s = np.atleast_1d(np.asarray(step, dtype=float)).ravel()
        if x.ndim <= 1 and s.shape[0] == 1 and x.size == p["n_curves"]:
            x = x.reshape(1, -1)
        x = _as_curves(x, p["n_curves"], "well")
        if s.shape[0] != x.shape[0] or not np.all(np.isfinite(s)):
            raise input_error("step must be finite, one value per pushed sample",
                              value=s.shape[0], fix="pass the predicted strat increments")
        n = x.shape[0]
        if self._released:
            raise AlignmentError("this aligner was released; start a new one")
        if n == 0:
            return
        z = np.ascontiguousarray((x - self.center) / self.scale if self.engine.standardise
                                 else x)
        n0 = self.n_samples
        self._z.ensure(n0 + n)[n0 : n0 + n] = z
        r0 = self.n_rows
        cap = r0 + max_new_rows(s, self.engine.min_rate)
        rows, meta = self._rows.ensure(cap), self._meta.ensure(cap)
        spos, srow = self._spos.ensure(n0 + n), self._srow.ensure(n0 + n)
        r1 = resample_chunk(z, np.ascontiguousarray(s), float(self.engine.min_rate), self._st,
                            self._acc, rows, meta, spos, srow, False)
        self.n_samples = n0 + n
        self._advance(r0, r1)
        self.n_rows = r1

    def anchor_bands(self, r0: int, r1: int) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        """(row, first, last column) of the anchors on rows r0..r1-1 of samples pushed so far,
        sorted by row: the DP columns whose position is within the anchor's tolerance."""
        a = self._anchors
        if a.shape[0] == 0:
            return _NO_ANCHORS
        a = a[a[:, 0] < self.n_samples]
        i = np.rint(a[:, 0]).astype(np.int64)
        rows = self._srow.a[i]
        sel = (rows >= r0) & (rows < r1)
        if not sel.any():
            return _NO_ANCHORS
        i, rows, a = i[sel], rows[sel], a[sel]
        shift = self._meta.a[rows, 2] - self._spos.a[i] + self._p["off"]   # position -> column
        lo = np.ceil(a[:, 1] - a[:, 2] + shift - 1e-9).astype(np.int64)
        hi = np.floor(a[:, 1] + a[:, 2] + shift + 1e-9).astype(np.int64)
        order = np.argsort(rows, kind="stable")
        return rows[order], lo[order], hi[order]

    def _row_geometry(self, r0: int, r1: int) -> None:
        K.row_geometry(self._meta.a, r0, r1, self._Rr.ensure(r1), self._sig.ensure(r1),
                       self._run.ensure(r1))

    def _advance(self, r0: int, r1: int, codes_out: list | None = None) -> None:
        """Run the DP over rows r0..r1-1 (into the code blocks, or into ``codes_out``)."""
        if r1 <= r0:
            return
        self._row_geometry(r0, r1)
        for buf in (self._rowmin, self._rowarg, self._rowmean, self._jsrc):
            buf.ensure(r1)
        p, e = self._p, self.engine
        arow, alo, ahi = self.anchor_bands(r0, r1)
        r = r0
        while r < r1:
            if codes_out is None:
                b = r // self._block_rows
                while len(self._blocks) <= b:
                    self._blocks.append(CODE_BLOCKS.take((self._block_rows,
                                                          p["lo_t"].shape[1])))
                blk, row0 = self._blocks[b], b * self._block_rows
                rend = min(r1, row0 + self._block_rows)
            else:
                blk = np.empty((r1 - r, p["lo_t"].shape[1]), np.uint8)
                row0, rend = r, r1
                codes_out.append((row0, blk))
            K.forward_rows(r, rend, 0, -1, 0, p["lo_t"].shape[1], self._rows.a, p["lo_t"],
                           p["hi_t"], p["ref_nan"], p["w"], p["kind"],
                           float(e.huber_delta), float(e.null_misfit), self._Rr.a, self._sig.a,
                           self._run.a, p["bf"], p["bs"], float(e.jump_penalty),
                           float(e.strain_penalty), self._F, self._E, self._rowmin.a,
                           self._rowarg.a, self._rowmean.a, blk, row0, p["off"],
                           p["off"] + p["m_ref"], p["off_cost"], p["jump_bin"],
                           p["jump_wbins"], p["slope_bin"], self._jsrc.a, arow, alo, ahi,
                           p["anchor_cost"])
            r = rend

    # -- state ---------------------------------------------------------------------------------
    @property
    def best_cost(self) -> float:
        """Total cost of the optimal path through the committed rows (inf before the first)."""
        return float(self._rowmin.a[self.n_rows - 1]) if self.n_rows else np.inf

    @property
    def sample_row(self) -> np.ndarray:
        """DP row of each pushed sample (read-only view; the last samples may belong to the
        unfinished row ``n_rows``)."""
        v = self._srow.a[: self.n_samples].view()
        v.flags.writeable = False
        return v

    @property
    def sample_position(self) -> np.ndarray:
        """Predicted strat position of each pushed sample [reference samples, from the first
        sample] (read-only view)."""
        v = self._spos.a[: self.n_samples].view()
        v.flags.writeable = False
        return v

    # -- result -------------------------------------------------------------------------------
    def tail(self, rows: int, evidence: bool = True) -> TailAlignment | None:
        """The alignment of about the last ``rows`` committed rows of the optimal path.

        The path is traced back from the best cell of the last committed row over ``rows``
        rows only, the tail's start put on the first cell there that the path enters by a
        one-row move (or its start), and the alignment evidence computed on that tail. Cost
        O(rows), whatever was pushed before: what a well being drilled needs at each step.
        None when the tail is too short (fewer than 16 rows pushed, or no such start cell).
        """
        from .evidence import build_alignment, path_and_score

        n = self.n_rows
        if n < 16:
            return None
        rows = max(int(rows), 16)
        path, landing = self._tpath.ensure(n), self._tland.ensure(n)
        jumped = self._tjump.ensure(n)
        stop = max(0, n - rows)
        landing[stop:n] = 0
        jumped[stop:n] = 0
        p, B = self._p, self._block_rows
        r, j = n - 1, int(self._rowarg.a[n - 1])
        while r >= stop:
            b = r // B
            k0 = max(0, stop - b * B)
            r, j = K.traceback_block(self._blocks[b][k0:], b * B + k0, r, j, self._Rr.a,
                                     self._sig.a, p["bf"], p["bs"], self._rowarg.a, path,
                                     landing, jumped, p["jump_bin"], self._jsrc.a)
            if r < 0:
                break
        # start on a landing cell entered by FOLLOW (or the path's START): a traceback from the
        # tail's last row then ends exactly there
        for lo in range(r + 1, n - 8):
            if landing[lo] and self._blocks[lo // B][lo % B, path[lo]] in (K.FOLLOW, K.START):
                break
        else:
            return None
        srow = self._srow.a[: self.n_samples]
        i_lo = int(np.searchsorted(srow, lo, "left"))
        i_hi = int(np.searchsorted(srow, n, "left"))        # samples of committed rows
        if i_hi - i_lo < 2:
            return None
        blocks = []
        for b in range(lo // B, (n - 1) // B + 1):
            k0 = max(0, lo - b * B)
            blocks.append((b * B + k0 - lo, self._blocks[b][k0:]))
        alignment = build_alignment(_TailView(self, lo, n, i_lo, i_hi), n - lo, blocks,
                                    evidence)
        return TailAlignment(lo, i_lo, i_hi, n, bool(evidence), alignment)

    def current(self) -> Alignment:
        """The optimal alignment of all samples pushed so far."""
        return self._result(evidence=True)

    def release(self) -> None:
        """Give the move codes back for reuse (:data:`CODE_BLOCKS`): the aligner is spent, and
        any later push or result raises."""
        CODE_BLOCKS.give(self._blocks)
        self._blocks = []
        self._released = True

    def _finished(self) -> tuple[int, list]:
        """(rows, code blocks) of everything pushed so far, the unfinished last row run on
        copies without committing it."""
        if self._released:
            raise AlignmentError("this aligner was released; start a new one")
        if self.n_samples == 0:
            raise AlignmentError("no well samples pushed yet; push(values, step) first")
        p = self._p
        extra: list = []
        nrows = self.n_rows
        if self._st[0] > 0.0:  # unfinished last row: emit it on copies, run it uncommitted
            st, acc = self._st.copy(), self._acc.copy()
            rows, meta = self._rows.ensure(nrows + 1), self._meta.ensure(nrows + 1)
            nrows = resample_chunk(np.empty((0, p["n_curves"])), np.empty(0),
                                   float(self.engine.min_rate), st, acc, rows, meta,
                                   self._spos.a, self._srow.a, True)
            self._advance(self.n_rows, nrows, extra)
        return nrows, [(i * self._block_rows, b) for i, b in enumerate(self._blocks)] + extra

    def _result(self, evidence: bool) -> Alignment:
        nrows, blocks = self._finished()
        return build_alignment(self, nrows, blocks, evidence)

    def _path_and_score(self) -> tuple[np.ndarray, float]:
        """Per-sample positions and the path's cost (:func:`~.evidence.path_and_score`)."""
        nrows, blocks = self._finished()
        return path_and_score(self, nrows, blocks)

    def _score(self) -> float:
        """The optimal path's cost, without its traceback."""
        nrows, _ = self._finished()
        return float(self._rowmin.a[nrows - 1])
