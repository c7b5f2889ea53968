"""Tops-evidence accuracy on seeded forward-modelled wells: the full table.

Wells: vertical, deviated and high-angle; bed dips 0-25°; 0-2 faults (normal and reverse,
throws 5-80 m); unit thickness +-10 %; pick noise 0.3 m; 10 % of surfaces unpicked.
Goals (tops issue): recall >= 0.95 for |Δs| >= 3x the tolerance floor, <= 0.05 false cuts per
well, fault type right in >= 98 % when the fault attitude is given, TST error median <= 10 %.

Run:  python benchmarks/bench_tops.py [N_WELLS]
"""

from __future__ import annotations

import sys
import time

import numpy as np
import pandas as pd

from wellfault.synth.evaluation import match_cuts, summarise
from wellfault.synth.columns import synthetic_column
from wellfault.evidence.measure import MIN_FAULT_COSINE, FaultAssumptions
from wellfault.synth.scenarios import random_scenario
from wellfault.evidence.topcuts import TopsTolerance, find_cuts_from_tops, smallest_visible_jump


def main(n_wells: int = 1000) -> None:
    column = synthetic_column(14, seed=11, curves=())
    tol = TopsTolerance()
    frames, false_by_kind, wells_by_kind = [], {}, {}
    t_detect = 0.0
    for seed in range(n_wells):
        sc = random_scenario(seed, column, curves=())
        if len(sc.tops) < 2:  # a well that logged under two surfaces has no tops evidence
            continue
        given = len(sc.faults) == 1
        fa = FaultAssumptions(fault=(sc.faults[0].dip_deg, sc.faults[0].dip_azimuth_deg)) \
            if given else FaultAssumptions()
        t0 = time.perf_counter()
        cuts = find_cuts_from_tops(sc.tops, column, sc.trajectory, bed_dip=sc.bed_dip,
                                   well=sc.synthetic.name, assumptions=fa, tolerance=tol)
        t_detect += time.perf_counter() - t0
        rows, false = match_cuts(cuts, sc.truth, slack_m=0.0, shared=True,
                                 md_range=(sc.tops.md_m.min(), sc.tops.md_m.max()))
        false_by_kind[sc.kind] = false_by_kind.get(sc.kind, 0) + false
        wells_by_kind[sc.kind] = wells_by_kind.get(sc.kind, 0) + 1
        if len(rows):
            clear = [given and all(abs(sc.trajectory.tangent(np.array([m]))[0] @ f.normal_up)
                                   > MIN_FAULT_COSINE for f in sc.faults)
                     for m in rows["true_md_m"]]
            frames.append(rows.assign(kind=sc.kind, given=clear, visible=smallest_visible_jump(
                sc.tops, column, sc.trajectory, sc.bed_dip, rows["true_md_m"], tol)))
    rows = pd.concat(frames, ignore_index=True)
    floor3 = 3 * tol.floor_m
    print(f"tops evidence on {n_wells} seeded wells; detection {1e3 * t_detect / n_wells:.2f} "
          "ms per well\n")
    print(f"{'subset':<22}{'wells':>6}{'cuts':>6}{'recall':>8}{'false/well':>11}"
          f"{'section':>9}{'type*':>7}{'|Δs| err':>10}{'bracket':>9}")
    subsets = [("all", rows, sum(false_by_kind.values()), n_wells)]
    for kind in sorted(wells_by_kind):
        subsets.append((kind, rows[rows.kind == kind], false_by_kind[kind], wells_by_kind[kind]))
    for label, lo, hi in [("|Δs| 6-15 m", 6, 15), ("|Δs| 15-40 m", 15, 40),
                          ("|Δs| >= 40 m", 40, 1e9)]:
        a = rows["true_delta_s_m"].abs()
        subsets.append((label, rows[(a >= lo) & (a < hi)], np.nan, np.nan))
    a = rows["true_delta_s_m"].abs()
    subsets.append(("|Δs| >= 3x interval tol", rows[a >= 3 * rows["visible"]], np.nan, np.nan))
    subsets.append(("|Δs| < interval tol", rows[a < rows["visible"]], np.nan, np.nan))
    for label, sub, false, wells in subsets:
        s = summarise(sub, 0 if np.isnan(false) else int(false),
                      1 if np.isnan(wells) else int(wells),
                      min_abs_delta_s_m=0.0 if "interval" in label else floor3,
                      fault_type_mask=sub["given"])
        fw = "" if np.isnan(false) else f"{s.false_per_well:.3f}"
        print(f"{label:<22}{'' if np.isnan(wells) else int(wells):>6}{s.counted_cuts:>6}"
              f"{s.recall:>8.3f}{fw:>11}{s.section_right:>9.3f}{s.fault_type_right:>7.3f}"
              f"{s.delta_s_rel_error_median:>10.1%}{s.bracket_holds:>9.3f}")
    print("\n* fault type with the fault attitude given (one-fault wells, crossing clear of the "
          "plane); recall and errors over cuts with |Δs| >= 3x the 2 m floor")
    print("goals: recall >= 0.95, false/well <= 0.05, type >= 0.98, |Δs| error median <= 10 %")


if __name__ == "__main__":
    main(int(sys.argv[1]) if len(sys.argv) > 1 else 1000)
