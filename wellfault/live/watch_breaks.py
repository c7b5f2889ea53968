"""Possible cuts while drilling: the break detector of :mod:`wellfault.live.breaks` run on the live
samples of a :class:`wellfault.live.watch.WellWatcher`, and the life of each possible cut.

At each evaluation (every ``evaluate_every_m`` of new hole) the last ``break_window_m`` of hole
is segmented (:func:`wellfault.live.breaks.find_breaks`); each change point with ``break_side_m`` of
hole below it is assessed once (:func:`wellfault.live.breaks.assess_break`) against the type log
read along the predicted path — the correlation's position ``break_side_m`` above the break,
continued by the predicted strat increment of every sample. A break much sharper than expected
(``break_min_excess``, ``break_min_ratio``) where the path drills at most ``break_max_r`` m of
strat per metre of hole, while the well correlates with the type log along the traced tail at
``break_min_correlation`` or more (else the predicted path, and so the expectation, is not to
be trusted) and once the well's curves are calibrated (as for cuts), is raised as a
*possible cut* (event ``possible_cut``, status ``raised``), unless a cut or possible cut
already stands within ``possible_match_m``.

A possible cut never enters the cut table. It is

* **confirmed** when the correlation raises a cut within ``possible_match_m`` of its break:
  that ``cut`` event carries the possible cut's identifier and the possible cut;
* **withdrawn** (event ``possible_cut``, status ``withdrawn``, with the reason) once the
  correlation has had ``possible_catchup_m`` of strat below the break (about the 90th
  percentile of its latency in strat) or ``possible_withdraw_m`` of hole, and its path has no
  jump within ``possible_match_m`` of the break (a young jump there is the correlation still
  weighing the cut: at r = 0.1, 45 m of hole is under 5 m of strat), and at the end of input
  when the whole-well check has no cut there.

While it stands, every ``forecast`` event also gives the surfaces ahead in two cases: no fault
(the path continued from above the break) and the fault with its most likely separation — the
size of the correlation's young jump at the break when its path already has one, otherwise the
shift of the type log that best matches the hole drilled below the break (at least the
smallest cut, at most ``SEPARATION_SEARCH_M``).
"""

from __future__ import annotations

import dataclasses
import math

import numpy as np

from .breaks import (
    PossibleCut, assess_break, break_confidence, find_breaks, noise_sigma, read_along,
)
from .events import WatchEvent

__all__ = ["SEPARATION_SEARCH_M", "PossibleCuts"]

#: Largest separation [m TST] tried when matching the hole below a break to the type log.
SEPARATION_SEARCH_M = 150.0


class PossibleCuts:
    """The break detector's part of :class:`~wellfault.live.watch.WellWatcher` (mixed in): reads
    its samples, standardisation, predicted path and tail; writes ``possible_cut`` events."""

    def _init_breaks(self) -> None:
        self._possible: list[PossibleCut] = []
        self._assessed: list[int] = []
        self.n_possible = {"raised": 0, "confirmed": 0, "withdrawn": 0}

    # ------------------------------------------------------------------ helpers
    def _side_samples(self) -> int:
        step = self._nominal if self._nominal > 0 else float(np.median(np.diff(
            self._md.a[max(0, self._n - 32): self._n]))) if self._n > 2 else 0.1524
        return max(3, round(self.settings.break_side_m / max(step, 1e-6)))

    def _position_of(self, tail, i: int) -> float | None:
        """The correlation's position of sample ``i`` [reference samples] (None outside the
        tail); samples of the unfinished row move on as predicted."""
        if tail is None or i < tail.sample0:
            return None
        spos = self._al.sample_position
        k = min(i, tail.sample_end - 1) - tail.sample0
        return float(tail.alignment.path[k]) + float(spos[i] - spos[k + tail.sample0])

    def _predicted(self, anchor: float, a: int, lo: int, hi: int) -> np.ndarray:
        """Positions of samples lo..hi-1 with no fault, from ``anchor`` at sample ``a``."""
        spos = self._al.sample_position
        return anchor + (np.asarray(spos[lo:hi], float) - float(spos[a]))

    def _standardised(self, lo: int, hi: int) -> np.ndarray:
        return (self._val.a[lo:hi] - self._center) / self._scale

    def _claim_id(self, md_m: float) -> tuple[int, PossibleCut | None]:
        """Identifier of a cut raised at ``md_m``: a standing possible cut's within
        ``possible_match_m`` (now confirmed), or a new one."""
        best = None
        for pc in self._possible:
            if pc.status == "raised" and abs(pc.break_md_m - md_m) <= \
                    self.settings.possible_match_m and \
                    (best is None or abs(pc.break_md_m - md_m) < abs(best.break_md_m - md_m)):
                best = pc
        if best is not None:
            best.status = "confirmed"
            self.n_possible["confirmed"] += 1
            return best.cut_id, dataclasses.replace(best)
        cid = self._next_id
        self._next_id += 1
        return cid, None

    # ------------------------------------------------------------------ detection
    def _scan_breaks(self, tail, jumps, events: list[WatchEvent]) -> bool:
        """Assess the new change points of the last window; raise the sharp ones. Returns
        whether a possible cut was raised."""
        s = self.settings
        n = self._n
        if not s.breaks or tail is None or n < 16 or \
                not (self._calibrated or s.alert_before_calibration):
            return False
        md = self._md.a[:n]
        bit = float(md[-1])
        side = self._side_samples()
        i0 = int(np.searchsorted(md, bit - s.break_window_m))
        z = self._standardised(i0, n)
        bad = np.flatnonzero(~np.all(np.isfinite(z), axis=1))
        if bad.size:                             # nulls: only the run after the last one
            i0 += int(bad[-1]) + 1
            z = z[int(bad[-1]) + 1:]
        if z.shape[0] < 4 * side:
            return False
        j0 = int(np.searchsorted(md, bit - s.break_noise_m))
        sigma = noise_sigma(self._standardised(j0, n))
        if not np.all(np.isfinite(sigma) & (sigma > 0)):
            return False
        found = find_breaks(z / sigma, s.break_penalty, max(2, side // 2)) + i0
        raised = False
        corr = float(tail.alignment.correlation)
        tol = round(s.break_tolerance_m / self._ds)
        ref_t = self.engine._prepared()["ref_t"]
        for b in found:
            b = int(b)
            if b - side < max(i0, tail.sample0) or b + side > n or \
                    any(abs(b - a) <= side for a in self._assessed):
                continue
            self._assessed.append(b)
            del self._assessed[:-64]
            a = b - side
            anchor = self._position_of(tail, a)
            if anchor is None:
                continue
            pos = self._predicted(anchor, a, a, b + side)
            spos = self._al.sample_position
            r = abs(float(spos[b + side - 1] - spos[a])) * self._ds / max(
                float(md[b + side - 1] - md[a]), 1e-9)
            brk = assess_break(self._standardised(a, b + side), side, side, pos, ref_t, sigma,
                               tol, self.engine._prepared()["w"])
            break_md = 0.5 * float(md[b - 1] + md[b])
            if not self._is_possible_cut(brk, r, corr, break_md):
                continue
            if any(not lv.retracted and abs(lv.md - break_md) <= s.possible_match_m
                   for lv in self._live) or \
                    any(pc.status != "withdrawn" and abs(pc.break_md_m - break_md)
                        <= s.possible_match_m for pc in self._possible):
                continue
            c = brk.curve
            pc = PossibleCut(
                cut_id=self._next_id, break_md_m=break_md, raised_bit_md_m=bit, sample=b,
                curve=self.curves[c], observed=brk.observed * float(self._scale[c]),
                expected=brk.expected * float(self._scale[c]),
                noise=brk.noise * float(self._scale[c]), ratio=brk.ratio, excess=brk.excess,
                confidence=break_confidence(brk.excess, brk.ratio),
                side_m=float(md[b + side - 1] - md[b - side]) * side / (2 * side - 1), r=r,
                s_above_m=self._s0 + anchor * self._ds)
            self._next_id += 1
            self._separation(pc, jumps)
            self._possible.append(pc)
            self.n_possible["raised"] += 1
            events.append(WatchEvent("possible_cut", bit, cut_id=pc.cut_id,
                                     possible=dataclasses.replace(pc)))
            raised = True
        return raised

    def _is_possible_cut(self, brk, r: float, corr: float, break_md: float) -> bool:
        """The rule that raises a break as a possible cut (module docstring); ``corr`` is the
        correlation of the well with the type log along the traced tail (is the correlation's
        position, on which the expectation rests, locked on?). benchmarks/bench_watch.py
        --calibrate-breaks logs every break it judges."""
        s = self.settings
        return r <= s.break_max_r and corr >= s.break_min_correlation and \
            brk.excess >= s.break_min_excess and brk.ratio >= s.break_min_ratio

    # ------------------------------------------------------------------ life of a possible cut
    def _separation(self, pc: PossibleCut, jumps) -> bool:
        """Most likely separation of a possible cut (module docstring); True when it changed
        by more than the revision threshold."""
        s = self.settings
        near = [j for j in jumps if abs(j.md - pc.break_md_m) <= s.possible_match_m]
        old = pc.delta_s_m
        if near:
            j = min(near, key=lambda j: abs(j.md - pc.break_md_m))
            pc.delta_s_m, pc.separation_from = j.ds_m, "correlation (young jump of its path)"
        else:
            ds = self._level_match(pc)
            if ds is not None:
                pc.delta_s_m, pc.separation_from = ds, "type log matched to the hole below"
        if math.isnan(old):
            return not math.isnan(pc.delta_s_m)
        return abs(pc.delta_s_m - old) > max(s.revise_abs_m, s.revise_rel * abs(old))

    def _level_match(self, pc: PossibleCut) -> float | None:
        """Shift [m TST] of the type log that best matches the samples below the break
        (least squares over the standardised curves), |shift| from the smallest cut to
        :data:`SEPARATION_SEARCH_M`."""
        n, b = self._n, pc.sample
        hi = min(n, b + 64)
        z = self._standardised(b, hi)
        ok = np.all(np.isfinite(z), axis=1)
        if ok.sum() < 3:
            return None
        anchor = (pc.s_above_m - self._s0) / self._ds
        a = max(b - self._side_samples(), 0)
        pos = self._predicted(anchor, a, b, hi)[ok]
        z = z[ok]
        kmax = int(SEPARATION_SEARCH_M / self._ds)
        kmin = max(1, math.ceil(self.curve_settings.min_jump_m / self._ds))
        shifts = np.r_[-np.arange(kmin, kmax + 1), np.arange(kmin, kmax + 1)].astype(float)
        y = read_along(self.engine._prepared()["ref_t"], pos[None, :] + shifts[:, None])  # C,S,k
        w = np.asarray(self.engine._prepared()["w"], float)
        mis = np.einsum("c,csk->s", w, (y - z.T[:, None, :]) ** 2)
        m = self.engine._prepared()["ref_t"].shape[1]
        inside = (pos.min() + shifts >= 0) & (pos.max() + shifts <= m - 1)
        if not inside.any():
            return None
        mis[~inside] = np.inf
        return float(shifts[int(np.argmin(mis))] * self._ds)

    def _follow_possible(self, jumps, events: list[WatchEvent]) -> bool:
        """Withdraw the possible cuts the correlation has caught up with; refresh the
        separation of the others. Returns whether anything changed."""
        s = self.settings
        n = self._n
        bit = float(self._md.a[n - 1])
        spos = self._al.sample_position
        changed = False
        for pc in self._possible:
            if pc.status != "raised" or pc.sample >= n:
                continue
            hole = bit - pc.break_md_m
            strat = abs(float(spos[n - 1] - spos[pc.sample])) * self._ds
            young = any(abs(j.md - pc.break_md_m) <= s.possible_match_m for j in jumps)
            if not young and (hole >= s.possible_withdraw_m or strat >= s.possible_catchup_m):
                self._withdraw(pc, bit, events, f"the correlation has {strat:.1f} m of strat "
                               f"({hole:.1f} m of hole) below the break and no cut there")
                changed = True
            elif self._separation(pc, jumps):
                changed = True
        return changed

    def _withdraw(self, pc: PossibleCut, bit: float, events: list[WatchEvent],
                  reason: str) -> None:
        pc.status, pc.reason = "withdrawn", reason
        self.n_possible["withdrawn"] += 1
        events.append(WatchEvent("possible_cut", bit, cut_id=pc.cut_id,
                                 possible=dataclasses.replace(pc), message=reason))

    def _withdraw_all(self, bit: float, events: list[WatchEvent], reason: str,
                      from_sample: int = 0) -> None:
        for pc in self._possible:
            if pc.status == "raised" and pc.sample >= from_sample:
                self._withdraw(pc, bit, events, reason)

    def _forecast_cases(self) -> tuple:
        """For each standing possible cut: the forecast with no fault and with the fault's
        most likely separation (metres)."""
        out = []
        n = self._n
        for pc in self._possible:
            if pc.status != "raised" or pc.sample >= n:
                continue
            a = max(pc.sample - self._side_samples(), 0)
            anchor = (pc.s_above_m - self._s0) / self._ds
            s_bit = self._s0 + float(self._predicted(anchor, a, n - 1, n)[0]) * self._ds
            ds = pc.delta_s_m if math.isfinite(pc.delta_s_m) else 0.0
            out.append({"cut_id": pc.cut_id, "break_md_m": pc.break_md_m,
                        "delta_s_m": pc.delta_s_m,
                        "no_fault": self._forecast_m(s_bit=s_bit),
                        "with_fault": self._forecast_m(s_bit=s_bit + ds)})
        return tuple(out)

    @property
    def possible_cuts(self) -> list[PossibleCut]:
        """Every possible cut raised so far, with its status (raised, confirmed, withdrawn)."""
        return list(self._possible)
