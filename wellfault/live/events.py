"""What the watcher says and how it decides: :class:`WatchSettings`, :class:`WatchEvent`,
:class:`BitState` (see :mod:`wellfault.live.watch` for the rules they set)."""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np
import pandas as pd

from ..errors import InputError
from ..geo.precision import (
    DEFAULT_DECIMALS, Decimals, column_decimals, lengths_in_text, round_value,
)
from ..evidence.results import FaultCut, cuts_to_frame
from ..geo.units import DepthUnit, parse_depth_unit

__all__ = ["WatchSettings", "WatchEvent", "BitState", "EVENT_KINDS", "REVISION_CHANGES"]

#: Kinds of :class:`WatchEvent`.
EVENT_KINDS = ("update", "cut", "cut-revised", "possible_cut", "forecast", "notice", "summary")
#: ``change`` of a ``cut-revised`` event.
REVISION_CHANGES = ("moved", "resized", "retracted")


@dataclass(frozen=True)
class WatchSettings:
    """How cuts are confirmed and how often the watcher reports (see the module docstring).

    Lengths in metres; ``*_rows`` in DP rows (one type-log sample of stratigraphy each).

    Attributes
    ----------
    confirm_rows, confirm_m : a candidate must stay put while this much stratigraphy (rows)
        and MD is drilled below it.
    min_confidence : the engine's confidence at which the whole-well check confirms a raised
        cut.
    alert_margin, alert_correlation : the live evidence that raises a stable candidate.
    jump_penalty, live_jump_factor : the live engine's jump penalty (None:
        ``live_jump_factor`` times the batch engine's). A jump of the path at the bit is only a
        candidate until the alert rule confirms it, so the live engine may take jumps on less
        evidence than the batch (the whole-well check keeps the batch's settings).
    evaluate_every_m, update_every_m : new hole between evaluations, between ``update`` events.
    lookback_rows : rows traced back from the bit at each evaluation (the window in which
        raised cuts are still revised).
    move_rows, match_rows : a candidate that moves more than ``move_rows`` starts its count
        again; jumps within ``match_rows`` of a candidate or raised cut are the same one.
    revise_md_m, revise_abs_m, revise_rel : a raised cut that moves or changes size by more is
        revised (event ``cut-revised``).
    retract_after_m : new hole without a raised cut's jump before it is retracted.
    recheck_m : new hole between two evidence checks of a candidate below the threshold.
    calibrate_rows, calibrate_growth : first calibration of the well's curves, and the growth
        of the hole between re-calibrations.
    alert_before_calibration : allow alerts before the first calibration.
    null_run_m : hole without a valid value before it is reported.
    forecast_step_m, forecast_horizon_m : MD step of the forecast along the path ahead, and
        how far it looks beyond the bit when no plan is given (straight on).
    breaks : look for abrupt breaks of the log (possible cuts, :mod:`wellfault.live.breaks`).
    break_window_m, break_side_m : hole scanned for change points at each evaluation; hole
        either side of a break over which its step (sharpness) is measured.
    break_penalty : change-point penalty, in noise variances of each curve.
    break_tolerance_m : strat uncertainty of the predicted path [m TST]: the expected step is
        the largest the type log gives within it.
    break_min_excess, break_min_ratio : a break is raised as a possible cut when its step
        exceeds the expected by this many noise standard deviations of the step, and is at
        least this many times the expected step.
    break_max_r : breaks are judged only where the path drills at most this much strat per
        metre of hole (|t·n|); at higher r bed boundaries are as sharp as faults and the
        correlation is quick.
    break_min_correlation : breaks are judged only while the well correlates with the type log
        along the traced tail at least this well (the predicted path is trusted).
    break_noise_m : hole over which each curve's noise is estimated.
    possible_match_m : a cut raised by the correlation within this MD of a possible cut
        confirms it (same identifier).
    possible_catchup_m, possible_withdraw_m : a possible cut the correlation has not confirmed
        is withdrawn once this much strat [m TST], or this much hole, is drilled below it and
        the correlation's path has no jump near it.
    """

    confirm_rows: int = 4
    confirm_m: float = 0.0
    min_confidence: float = 0.7
    alert_margin: float = 3.0
    alert_correlation: float = 0.8
    jump_penalty: float | None = None
    live_jump_factor: float = 0.5
    evaluate_every_m: float = 0.5
    update_every_m: float = 1.0
    lookback_rows: int = 200
    move_rows: int = 3
    match_rows: int = 40
    revise_md_m: float = 3.0
    revise_abs_m: float = 3.0
    revise_rel: float = 0.25
    retract_after_m: float = 2.0
    recheck_m: float = 1.0
    calibrate_rows: int = 400
    calibrate_growth: float = 2.0
    alert_before_calibration: bool = False
    null_run_m: float = 20.0
    forecast_step_m: float = 1.0
    forecast_horizon_m: float = 1000.0
    breaks: bool = True
    break_window_m: float = 8.0
    break_side_m: float = 1.0
    break_penalty: float = 30.0
    break_tolerance_m: float = 1.0
    break_min_excess: float = 5.0
    break_min_ratio: float = 1.5
    break_max_r: float = 0.4
    break_min_correlation: float = 0.7
    break_noise_m: float = 30.0
    possible_match_m: float = 10.0
    possible_catchup_m: float = 12.0
    possible_withdraw_m: float = 45.0

    def __post_init__(self) -> None:
        for name in ("confirm_m", "evaluate_every_m", "update_every_m", "revise_md_m",
                     "revise_abs_m", "retract_after_m", "recheck_m", "null_run_m",
                     "forecast_step_m", "forecast_horizon_m", "break_window_m", "break_side_m",
                     "break_tolerance_m", "break_noise_m", "possible_match_m",
                     "possible_catchup_m", "possible_withdraw_m"):
            v = float(getattr(self, name))
            if not (math.isfinite(v) and v >= 0) or (name.endswith("every_m") and v <= 0) \
                    or (name == "forecast_step_m" and v <= 0):
                raise InputError(f"watch setting {name} must be a positive length in metres "
                                 f"(got {getattr(self, name)!r})")
        if not 0.0 <= float(self.min_confidence) <= 1.0:
            raise InputError(f"min_confidence must lie in [0, 1] (got {self.min_confidence!r})")
        if int(self.lookback_rows) < 4 * int(self.confirm_rows) or int(self.confirm_rows) < 1:
            raise InputError("need confirm_rows >= 1 and lookback_rows >= 4 x confirm_rows")
        if self.jump_penalty is not None and not float(self.jump_penalty) > 0:
            raise InputError(f"jump_penalty must be positive (got {self.jump_penalty!r})")
        if not float(self.live_jump_factor) > 0:
            raise InputError(f"live_jump_factor must be positive (got {self.live_jump_factor!r})")
        if not float(self.calibrate_growth) > 1.0:
            raise InputError("calibrate_growth must be > 1")
        if not (float(self.break_side_m) > 0 and float(self.break_window_m)
                >= 4 * float(self.break_side_m)):
            raise InputError("need break_side_m > 0 and break_window_m >= 4 x break_side_m "
                             f"(got {self.break_side_m!r}, {self.break_window_m!r})")
        for name in ("break_penalty", "break_min_excess", "break_min_ratio", "break_max_r"):
            if not float(getattr(self, name)) > 0:
                raise InputError(f"watch setting {name} must be positive "
                                 f"(got {getattr(self, name)!r})")


@dataclass(frozen=True)
class BitState:
    """Where the bit is: MD, TVD, TVDSS [m], stratigraphic position s [m TST below the column
    top], the unit it is in (None above the column top or below its base) and how far below
    that unit's top [m TST], ``fit`` in [0, 1] (local match of the last rows to the type log),
    samples read, and whether the well's curves have been calibrated yet."""

    md_m: float
    tvd_m: float
    tvdss_m: float
    s_m: float
    unit: str | None
    below_unit_top_m: float
    fit: float
    samples: int
    calibrated: bool


@dataclass(frozen=True)
class WatchEvent:
    """One thing the watcher has to say (kinds: :data:`EVENT_KINDS`).

    ``bit_md_m`` is the MD of the bit (deepest sample) when it was said. ``cut``/``cut-revised``
    carry ``cut_id`` and the :class:`FaultCut` (for a retraction: the cut withdrawn);
    ``cut-revised`` also ``change`` (:data:`REVISION_CHANGES`), ``previous`` and ``message``
    (why); ``notice`` carries ``notice`` (its kind) and ``message``; ``update`` and ``summary``
    carry ``state``; ``forecast`` (and ``summary``) the forecast frame in metres.
    ``possible_cut`` carries ``cut_id`` and ``possible`` (a :class:`wellfault.live.breaks.PossibleCut`,
    ``status`` raised or withdrawn, ``message`` why withdrawn); a ``cut`` that confirms one
    carries it too (status confirmed). While possible cuts stand, ``forecast`` carries
    ``cases``: for each, the forecast with no fault and with its most likely separation.
    """

    kind: str
    bit_md_m: float
    cut_id: int | None = None
    cut: FaultCut | None = None
    change: str = ""
    previous: FaultCut | None = None
    message: str = ""
    notice: str = ""
    state: BitState | None = None
    forecast: pd.DataFrame | None = None
    summary: dict = field(default_factory=dict)
    cuts: tuple = ()
    possible: object | None = None
    cases: tuple = ()

    def to_dict(self, unit: DepthUnit | str = "m", decimals: Decimals = DEFAULT_DECIMALS) -> dict:
        """JSON-ready dict; lengths in ``unit`` with the unit in the key (``bit_md_ft``); cut
        fields named as in the cut table (:func:`wellfault.evidence.results.cuts_to_frame`); numbers at
        the precision they carry and the lengths in sentences in ``unit`` too
        (:func:`_formatted`, :mod:`wellfault.geo.precision`)."""
        return _formatted(self._raw_dict(unit), parse_depth_unit(unit), decimals)

    def _raw_dict(self, unit: DepthUnit | str) -> dict:
        u = parse_depth_unit(unit)
        k = 1.0 / u.metres
        sx = u.suffix
        out: dict = {"event": self.kind, f"bit_md_{sx}": _num(self.bit_md_m * k)}
        if self.kind == "update" and self.state is not None:
            out.update(_state_dict(self.state, u))
        if self.kind in ("cut", "cut-revised"):
            out["cut_id"] = self.cut_id
            if self.kind == "cut-revised":
                out["change"] = self.change
                out["reason"] = self.message
                if self.previous is not None:
                    out[f"previous_md_{sx}"] = _num(self.previous.md_m * k)
                    out[f"previous_tst_{sx}"] = _num(self.previous.tst_m * k)
            if self.cut is not None:
                row = cuts_to_frame([self.cut], u).iloc[0].to_dict()
                out.update({key: _num(v) for key, v in row.items()})
                live = self.cut.extra.get("live") if isinstance(self.cut.extra, dict) else None
                if live:
                    out["evidence"] = {key: _num(v) for key, v in live.items()}
            if self.kind == "cut" and self.possible is not None:
                out["possible_cut"] = {f"break_md_{sx}": _num(self.possible.break_md_m * k),
                                       f"raised_bit_md_{sx}":
                                           _num(self.possible.raised_bit_md_m * k)}
        if self.kind == "possible_cut" and self.possible is not None:
            out.update(_possible_dict(self.possible, u))
            if self.message:
                out["reason"] = self.message
        if self.kind == "notice":
            out["kind"] = self.notice
            out["message"] = self.message
        if self.kind in ("forecast", "summary") and self.forecast is not None:
            out["surfaces"] = _surfaces(self.forecast, u)
        if self.kind == "forecast" and self.cases:
            out["cases"] = [{"cut_id": c["cut_id"],
                             f"break_md_{sx}": _num(c["break_md_m"] * k),
                             f"delta_s_{sx}": _num(c["delta_s_m"] * k),
                             "no_fault": _surfaces(c["no_fault"], u),
                             "with_fault": _surfaces(c["with_fault"], u)} for c in self.cases]
        if self.kind == "summary":
            if self.state is not None:
                out.update(_state_dict(self.state, u))
            out.update({key: _num(v) for key, v in self.summary.items()})
            out["cut_table"] = [{key: _num(v) for key, v in r.items()}
                                for r in cuts_to_frame(self.cuts, u).to_dict("records")]
        return out


#: Keys of an event whose text states lengths (in metres, as wellfault writes them).
_TEXT_KEYS = ("reason", "message", "notes")


def _formatted(value, unit: DepthUnit, decimals: Decimals, key: str = ""):
    """An event dict made ready to print: each number rounded by its key's rule (6 decimals
    without one), the lengths in its sentences restated in ``unit``. The one place where watch
    events take their output precision and unit."""
    if isinstance(value, dict):
        return {k: _formatted(v, unit, decimals, str(k)) for k, v in value.items()}
    if isinstance(value, list):
        return [_formatted(v, unit, decimals, key) for v in value]
    if isinstance(value, str) and key in _TEXT_KEYS:
        return lengths_in_text(value, unit, decimals)
    if isinstance(value, float) and math.isfinite(value):
        nd = column_decimals(key, decimals)
        return round_value(value, 6 if nd is None and not decimals.full else nd)
    return value


def _num(v):
    if isinstance(v, (np.floating, float)):
        return float(v) if math.isfinite(float(v)) else None
    if isinstance(v, np.integer):
        return int(v)
    if isinstance(v, np.bool_):
        return bool(v)
    if v is pd.NA or v is None:
        return None
    return v


def _surfaces(df: pd.DataFrame, u: DepthUnit) -> list[dict]:
    return [{key: _num(v) for key, v in r.items()}
            for r in _frame_in_unit(df, u).to_dict("records")]


def _possible_dict(pc, u: DepthUnit) -> dict:
    """The fields of a ``possible_cut`` event (README, "While drilling")."""
    k, sx = 1.0 / u.metres, u.suffix
    ev = {key: _num(v) for key, v in pc.evidence().items()}
    ev[f"side_{sx}"] = _num(pc.side_m * k)
    return {"cut_id": pc.cut_id, "status": pc.status,
            f"break_md_{sx}": _num(pc.break_md_m * k),
            f"raised_bit_md_{sx}": _num(pc.raised_bit_md_m * k),
            "evidence": ev, "confidence": _num(pc.confidence),
            f"delta_s_{sx}": _num(pc.delta_s_m * k), "separation_from": pc.separation_from}


def _state_dict(st: BitState, u: DepthUnit) -> dict:
    k, sx = 1.0 / u.metres, u.suffix
    return {f"bit_tvd_{sx}": _num(st.tvd_m * k), f"bit_tvdss_{sx}": _num(st.tvdss_m * k),
            "unit": st.unit, f"s_{sx}": _num(st.s_m * k),
            f"below_unit_top_{sx}": _num(st.below_unit_top_m * k), "fit": _num(st.fit),
            "calibrated": st.calibrated}


def _frame_in_unit(df: pd.DataFrame, u: DepthUnit) -> pd.DataFrame:
    out = pd.DataFrame(index=df.index)
    for c in df.columns:
        if c.endswith("_m"):
            out[c[:-2] + "_" + u.suffix] = df[c].astype(float) / u.metres
        else:
            out[c] = df[c]
    return out
