"""Score detected cuts against known true cuts (forward-modelled wells).

Used by the accuracy tests and the benchmark scripts, so the two measure the same thing.

Matching rule: a true cut is found by the detected cut whose bracket, widened by ``slack_m``,
holds the true MD; when several do, the one whose best-estimate MD is nearest. Each detected cut
matches at most one true cut (unless ``shared``); an unmatched detected cut is a false cut.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import pandas as pd

from ..evidence.results import FaultCut

__all__ = ["match_cuts", "match_detected", "CutScores", "summarise", "reliability_table",
           "score_scenario"]


def match_cuts(detected: list[FaultCut], truth: pd.DataFrame, *, slack_m: float = 1.0,
               md_range: tuple[float, float] | None = None, shared: bool = False
               ) -> tuple[pd.DataFrame, int]:
    """Pair true cuts with detected ones: (rows, number of false cuts); see
    :func:`match_detected` for the parameters and the rows."""
    rows, real = match_detected(detected, truth, slack_m=slack_m, md_range=md_range,
                                shared=shared)
    return rows, int((~real).sum())


def match_detected(detected: list[FaultCut], truth: pd.DataFrame, *, slack_m: float = 1.0,
                   md_range: tuple[float, float] | None = None, shared: bool = False
                   ) -> tuple[pd.DataFrame, np.ndarray]:
    """Pair true cuts with detected ones.

    Parameters
    ----------
    detected : list of FaultCut
    truth : DataFrame
        The forward model's true cuts (``md_m, delta_s_m, section, fault_type, crossing``).
    slack_m : float
        Bracket widening for the match. [m]
    md_range : (float, float), optional
        Only true cuts strictly inside this MD range count (e.g. between the first and last
        pick, outside which tops cannot see a cut).
    shared : bool
        Let one detected cut find several true cuts inside its bracket (tops evidence: two
        faults between the same two picks are one net jump and cannot be told apart).

    Returns
    -------
    (rows, real)
        One row per counted true cut with the matched cut's values (NaN when missed), and per
        detected cut (bool array, same order) whether it matched a true cut.
        :func:`match_cuts` returns the number of unmatched detected cuts (false cuts) instead.
    """
    used: set[int] = set()
    rows = []
    for tr in truth.itertuples(index=False):
        if md_range is not None and not (md_range[0] < tr.md_m < md_range[1]):
            continue
        best, best_d = None, np.inf
        for i, c in enumerate(detected):
            if i in used and not shared:
                continue
            if c.md_top_m - slack_m <= tr.md_m <= c.md_base_m + slack_m:
                d = abs(c.md_m - tr.md_m)
                if d < best_d:
                    best, best_d = i, d
        row = {
            "true_md_m": float(tr.md_m), "true_delta_s_m": float(tr.delta_s_m),
            "true_section": tr.section, "true_fault_type": tr.fault_type,
            "true_crossing": int(tr.crossing), "found": best is not None,
        }
        if best is not None:
            used.add(best)
            c = detected[best]
            row.update(md_m=c.md_m, md_top_m=c.md_top_m, md_base_m=c.md_base_m,
                       delta_s_m=c.delta_s_m, section=c.section, fault_type=c.fault_type,
                       crossing=c.crossing, confidence=c.confidence)
        rows.append(row)
    real = np.zeros(len(detected), dtype=bool)
    real[sorted(used)] = True
    return pd.DataFrame(rows), real


@dataclass(frozen=True)
class CutScores:
    """Accuracy figures over a set of wells."""

    wells: int
    true_cuts: int
    counted_cuts: int
    recall: float
    false_per_well: float
    section_right: float
    fault_type_right: float
    fault_type_cases: int
    bracket_holds: float
    delta_s_error_median: float
    delta_s_rel_error_median: float
    md_error_median_m: float
    md_error_p90_m: float

    def as_text(self) -> str:
        return (f"wells {self.wells}, true cuts {self.true_cuts} ({self.counted_cuts} counted): "
                f"recall {self.recall:.3f}, false cuts/well {self.false_per_well:.3f}, "
                f"section right {self.section_right:.3f}, fault type right "
                f"{self.fault_type_right:.3f} (of {self.fault_type_cases}), bracket holds "
                f"{self.bracket_holds:.3f}, |Δs| error median {self.delta_s_error_median:.2f} m "
                f"({self.delta_s_rel_error_median:.1%}), MD error median "
                f"{self.md_error_median_m:.2f} m, p90 {self.md_error_p90_m:.2f} m")


def summarise(rows: pd.DataFrame, false_cuts: int, wells: int, *, min_abs_delta_s_m: float = 0.0,
              fault_type_mask: pd.Series | None = None) -> CutScores:
    """Figures over matched rows from :func:`match_cuts` (concatenated over wells).

    Recall and the error statistics use true cuts with |Δs| ≥ ``min_abs_delta_s_m``; fault-type
    accuracy uses found cuts selected by ``fault_type_mask`` (e.g. cuts whose fault attitude
    was given and whose geometry is not degenerate).
    """
    total = len(rows)
    if total == 0:
        return CutScores(wells, 0, 0, np.nan, false_cuts / max(wells, 1), np.nan, np.nan, 0,
                         np.nan, np.nan, np.nan, np.nan, np.nan)
    big = rows[rows["true_delta_s_m"].abs() >= min_abs_delta_s_m]
    found = big[big["found"]]
    err = (found["delta_s_m"].abs() - found["true_delta_s_m"].abs()).abs()
    rel = err / found["true_delta_s_m"].abs()
    md_err = (found["md_m"] - found["true_md_m"]).abs()
    inside = (found["md_top_m"] <= found["true_md_m"]) & (found["true_md_m"] <= found["md_base_m"])
    ft = found if fault_type_mask is None else found[fault_type_mask.reindex(found.index,
                                                                              fill_value=False)]
    return CutScores(
        wells=wells, true_cuts=total, counted_cuts=len(big),
        recall=float(big["found"].mean()) if len(big) else np.nan,
        false_per_well=false_cuts / max(wells, 1),
        section_right=float((found["section"] == found["true_section"]).mean())
        if len(found) else np.nan,
        fault_type_right=float((ft["fault_type"] == ft["true_fault_type"]).mean())
        if len(ft) else np.nan,
        fault_type_cases=len(ft),
        bracket_holds=float(inside.mean()) if len(found) else np.nan,
        delta_s_error_median=float(err.median()) if len(found) else np.nan,
        delta_s_rel_error_median=float(rel.median()) if len(found) else np.nan,
        md_error_median_m=float(md_err.median()) if len(found) else np.nan,
        md_error_p90_m=float(md_err.quantile(0.9)) if len(found) else np.nan,
    )


def reliability_table(confidence: np.ndarray, real: np.ndarray,
                      edges: tuple[float, ...] = (0.0, 0.3, 0.5, 0.7, 0.9, 0.97, 1.0)
                      ) -> pd.DataFrame:
    """Calibration of reported confidences: per confidence bin ``[lo, hi)`` (the last one
    closed), the number of reported cuts, their mean confidence and the fraction that are real
    (matched a true cut).

    A calibrated detector has ``fraction_real`` close to ``mean_confidence`` in every bin; the
    issue's goal reads it at the top: among cuts with confidence >= 0.9, at least 90 % real.
    """
    c = np.asarray(confidence, dtype=float)
    r = np.asarray(real, dtype=bool)
    out = []
    for k, (lo, hi) in enumerate(zip(edges[:-1], edges[1:])):
        last = k == len(edges) - 2
        sel = (c >= lo) & ((c <= hi) if last else (c < hi))
        out.append({"bin": f"[{lo:.2f}, {hi:.2f}{']' if last else ')'}",
                    "cuts": int(sel.sum()),
                    "mean_confidence": float(c[sel].mean()) if sel.any() else np.nan,
                    "fraction_real": float(r[sel].mean()) if sel.any() else np.nan})
    return pd.DataFrame(out)


def score_scenario(detected: list[FaultCut], scenario, *, slack_m: float = 1.0
                   ) -> tuple[pd.DataFrame, pd.DataFrame]:
    """Score one forward-modelled well (:class:`wellfault.synth.scenarios.Scenario`).

    Detection runs without the fault attitude (so the cut depth is the detector's own); the
    fault type is then judged as the user would get it with the attitude given: each matched
    cut is measured again with the attitude of the fault it crosses (its ``fault_type``; the
    type under the default assumption is kept as ``fault_type_assumed``). ``crossing_clear``
    is False where the well runs within 0.5° of that fault plane: the geometry is degenerate
    and the type is reported "undetermined" by design (DESIGN.md §3); use it as
    ``summarise(..., fault_type_mask=rows["crossing_clear"])``.

    Returns
    -------
    (rows, detected)
        ``rows`` as :func:`match_detected`, plus ``fault_type_assumed``, ``crossing_clear``;
        ``detected``: one row per detected cut — ``md_m, delta_s_m, confidence, real`` and the
        cut's ``extra`` evidence (``margin``, ``correlation`` from the curves).
    """
    from ..evidence.measure import MIN_FAULT_COSINE, FaultAssumptions, measure_cut

    rows, real = match_detected(detected, scenario.truth, slack_m=slack_m)
    if len(rows):
        rows["fault_type_assumed"] = rows.get("fault_type", pd.Series(np.nan, rows.index))
        types, clear = [], []
        for k, tr in enumerate(scenario.truth.itertuples(index=False)):
            f = scenario.faults[int(tr.fault)]
            t = scenario.trajectory.tangent(np.array([tr.md_m]))[0]
            clear.append(bool(abs(t @ f.normal_up) > MIN_FAULT_COSINE))
            if not rows["found"].iloc[k]:
                types.append(np.nan)
                continue
            r = rows.iloc[k]
            cut = measure_cut(well="", method="eval", md_m=float(r.md_m),
                              md_top_m=float(r.md_top_m), md_base_m=float(r.md_base_m),
                              delta_s_m=float(r.delta_s_m), trajectory=scenario.trajectory,
                              bed_dip=scenario.bed_dip,
                              assumptions=FaultAssumptions(fault=(f.dip_deg, f.dip_azimuth_deg)))
            types.append(cut.fault_type)
        rows["fault_type"] = types
        rows["crossing_clear"] = clear
    det = pd.DataFrame({
        "md_m": [c.md_m for c in detected], "delta_s_m": [c.delta_s_m for c in detected],
        "confidence": [c.confidence for c in detected], "real": real,
        "margin": [c.extra.get("margin", np.nan) for c in detected],
        "correlation": [c.extra.get("correlation", np.nan) for c in detected]})
    return rows, det
