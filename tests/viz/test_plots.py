"""Figures are checked for content (axes, labels, cut markers, ties, traces), not pixels.

The demo field in ``synthetic_wells/`` gives real inputs: VR-2 misses section across a normal
fault, VR-4 repeats section across a reverse fault, VR-6H (high angle) repeats section across
a normal fault. Cut markers carry gids (``cut-missing``/``cut-repeated``) so they can be
counted.
"""

from __future__ import annotations

import functools
import json
import math
import subprocess
import sys

import numpy as np
import pandas as pd
import pytest
from conftest import REPO_ROOT, load_manifest_well

pytest.importorskip("matplotlib", reason="the figures need matplotlib")

import wellfault.viz.well_plots as well_plots
import wellfault.viz.field_plots as field_plots
import wellfault.viz.style as plots  # noqa: E402
from wellfault.geo.column import ReferenceColumn  # noqa: E402
from wellfault.viz.track import track_from_tops  # noqa: E402

FIELD = REPO_ROOT / "synthetic_wells"
needs_field = pytest.mark.skipif(not (FIELD / "field.json").is_file(),
                                 reason="demo field synthetic_wells/ not in the checkout")


@functools.lru_cache(maxsize=None)
def demo_field():
    """(meta, column with the type well's type log, manifest, field cut table in metres)."""
    from wellfault.synth.demo import detect_field
    from wellfault.io import read_column_table, read_manifest

    meta = json.loads((FIELD / "field.json").read_text(encoding="utf-8"))
    col = ReferenceColumn.from_table(read_column_table(FIELD / meta["column_file"]))
    manifest = read_manifest(FIELD / "manifest.csv")
    w, traj, tops, dip = load_manifest_well(manifest, meta["type_well"])
    type_col = ReferenceColumn.from_type_well(w, tops, traj, (dip.dip_deg, dip.dip_azimuth_deg))
    cuts, _, _ = detect_field(FIELD)
    return meta, col.with_type_log(type_col.type_log), manifest, cuts


@functools.lru_cache(maxsize=None)
def demo_well(name):
    """(well, trajectory, tops, bed dip, cuts in the LAS unit, track, column) of a demo well."""
    from wellfault.synth.demo import field_planes
    from wellfault.evidence.detect import find_fault_cuts

    meta, col, manifest, _ = demo_field()
    w, traj, tops, dip = load_manifest_well(manifest, name)
    cuts = find_fault_cuts(w, col, tops=tops, trajectory=traj, bed_dip=dip,
                           planes=field_planes(meta))
    track = track_from_tops(tops, col, traj, dip, cuts, md_m=w.curves.index.to_numpy()[::3],
                            well=name)
    return w, traj, tops, dip, cuts, track, col


def demo_faults():
    meta = demo_field()[0]
    return pd.DataFrame([{"fault_id": f["name"], "strike_deg": (f["dip_azimuth_deg"] - 90) % 360,
                          "dip_deg": f["dip_deg"], "dip_azimuth_deg": f["dip_azimuth_deg"],
                          "sense": f["kind"], "x_m": f["point_x_m"], "y_m": f["point_y_m"],
                          "tvdss_m": f["point_tvdss_m"]} for f in meta["faults"]])


def texts(fig):
    from matplotlib.text import Text

    return [t.get_text() for t in fig.findobj(Text)]


def legend_texts(fig):
    return [t.get_text() for leg in fig.legends for t in leg.get_texts()]


# ------------------------------------------------------------------------ correlation panel
@needs_field
@pytest.mark.parametrize("name,section", [("VR-2", "missing"), ("VR-4", "repeated"),
                                          ("VR-6H", "repeated")])
def test_correlation_panel_marks_each_cut_by_its_section(name, section):
    w, _, tops, _, cuts, track, col = demo_well(name)
    fig = well_plots.correlation_panel(w, col, track, cuts)
    assert fig.__class__.__name__ == "Figure"
    ax_w, ax_t, ax_r, ax_c = fig.axes[:4]
    # lengths in the cut table's unit, here the LAS file's (VR-2, VR-4, VR-6H: feet)
    assert ax_w.get_ylabel() == f"MD [{w.depth_unit.suffix}]"
    assert "TST" in ax_c.get_ylabel() and ax_c.get_ylabel().endswith(f"[{w.depth_unit.suffix}]")
    assert ax_w.get_xlabel() == "GR (well)" and ax_r.get_xlabel() == "GR (type log)"
    assert ax_w.get_ylim()[0] > ax_w.get_ylim()[1]  # depth down
    assert ax_r.get_ylim()[0] > ax_r.get_ylim()[1]
    assert name in fig._suptitle.get_text()
    other = "repeated" if section == "missing" else "missing"
    assert plots.count_cut_markers(fig, section) == len(cuts) == 1
    assert plots.count_cut_markers(fig, other) == 0
    assert len(plots.artists_with_gid(fig, f"cut-{section}-interval")) == 1
    assert len(plots.artists_with_gid(fig, f"cut-{section}-tie")) == 1
    assert len(plots.artists_with_gid(fig, "cut-bracket")) == 1
    legend = " ".join(legend_texts(fig))
    assert "missing section" in legend and "repeated section" in legend and "tie" in legend
    # every unit of the column in the window is named in the column strip
    s_hi, s_lo = ax_c.get_ylim()
    shown = {n for n, a, b in zip(col.names, col.s_m, np.append(col.s_m[1:], col.base_s_m))
             if a >= s_lo and b <= s_hi}
    assert len(shown) >= 8 and shown <= set(texts(fig))


@needs_field
def test_correlation_panel_ties_each_picked_surface_and_none_that_is_missing():
    w, _, tops, _, cuts, track, col = demo_well("VR-2")
    fig = well_plots.correlation_panel(w, col, track, cuts)
    # VR-2 misses Pellow Shale and Hallin Limestone: one tie per pick, none to those two
    assert len(plots.artists_with_gid(fig, "tie-surface")) == len(tops)
    assert {"Pellow Shale", "Hallin Limestone"}.isdisjoint(set(tops["surface"]))
    # the wedge reaches the interval the track jumps over, on the type-log scale
    interval = plots.artists_with_gid(fig, "cut-missing-interval")[0]
    if hasattr(interval, "get_height"):  # a Rectangle (matplotlib >= 3.9)
        lo, hi = sorted((interval.get_y(), interval.get_y() + interval.get_height()))
    else:  # a Polygon
        ys = np.asarray(interval.get_xy())[:, 1]
        lo, hi = float(np.min(ys)), float(np.max(ys))
    dst = cuts["delta_s_ft"].iloc[0] * 0.3048
    assert hi - lo == pytest.approx(dst, abs=1.5)
    assert col.s_of("Pellow Shale") > lo and col.s_of("Hallin Limestone") < hi


@needs_field
def test_correlation_panel_repeat_ties_twice_and_regular_ties():
    w, _, tops, _, cuts, track, col = demo_well("VR-4")
    fig = well_plots.correlation_panel(w, col, track, cuts, tie_every_m=50.0)
    assert len(plots.artists_with_gid(fig, "tie-surface")) == len(tops)
    assert tops["surface"].duplicated().any()  # a surface picked twice: two ties to it
    assert len(plots.artists_with_gid(fig, "tie-regular")) >= 5


@needs_field
def test_correlation_panel_without_type_log_or_track():
    w, _, _, _, cuts, track, col = demo_well("VR-2")
    bare = ReferenceColumn(col.names, col.s_m)
    fig = well_plots.correlation_panel(w, bare, track, cuts)
    assert any("no type log" in t for t in texts(fig))
    assert plots.count_cut_markers(fig, "missing") == 1
    fig = well_plots.correlation_panel(w, col, None, cuts)
    assert plots.count_cut_markers(fig, "missing") == 1
    assert len(plots.artists_with_gid(fig, "tie-surface")) == 0
    fig = well_plots.correlation_panel(w, col, track, None, curve="rhob")
    assert plots.count_cut_markers(fig) == 0
    assert fig.axes[0].get_xlabel() == "RHOB (well)"


# ------------------------------------------------------------------- stratigraphic position
@needs_field
@pytest.mark.parametrize("name,section", [("VR-2", "missing"), ("VR-6H", "repeated")])
def test_strat_position_plot_shows_each_cut_as_a_step(name, section):
    w, _, _, _, cuts, track, col = demo_well(name)
    fig = well_plots.strat_position_plot(track, cuts, column=col)
    ax, ax_c = fig.axes[:2]
    assert ax.get_ylabel() == f"MD [{w.depth_unit.suffix}]"  # the cut table's unit
    assert ax.get_xlabel().startswith("s: stratigraphic position")
    assert ax_c.get_xlabel() == "confidence"
    assert ax.get_ylim()[0] > ax.get_ylim()[1]
    assert plots.count_cut_markers(fig, section) == 1 == plots.count_cut_markers(fig)
    assert name in fig._suptitle.get_text()
    # the track line is broken at the step: a NaN between the two sides of the cut
    line = max((ln for ln in ax.get_lines()), key=lambda ln: len(ln.get_xdata()))
    assert np.isnan(np.asarray(line.get_xdata(), dtype=float)).sum() >= 1
    # unit bands are named (those wide enough to write in)
    assert len(set(col.names) & set(texts(fig))) >= 10
    words = " ".join(legend_texts(fig))
    assert "missing section" in words and "repeated section" in words


def test_strat_position_plot_without_column_or_cuts():
    track = pd.DataFrame({"md_m": [1000.0, 1010.0, 1020.0], "s_m": [0.0, 10.0, 20.0],
                          "unit": ["A", "A", "B"], "confidence": [1.0, 1.0, 1.0]})
    fig = well_plots.strat_position_plot(track)
    assert plots.count_cut_markers(fig) == 0
    assert fig.axes[0].get_ylabel() == "MD [m]"


# ------------------------------------------------------------------------------- field map
@needs_field
def test_field_map_counts_wells_cuts_and_faults():
    meta, _, manifest, cuts = demo_field()
    paths = {n: demo_well(n)[1] for n in manifest.loc[manifest["survey"] != "", "well"]}
    fig = field_plots.field_map(manifest, cuts, demo_faults(), paths=paths)
    ax = fig.axes[0]
    assert ax.get_xlabel() == "easting x [m]" and ax.get_ylabel() == "northing y [m]"
    n_missing = int((cuts["section"] == "missing").sum())
    n_repeated = int((cuts["section"] == "repeated").sum())
    assert plots.count_cut_markers(fig, "missing") == n_missing == 5
    assert plots.count_cut_markers(fig, "repeated") == n_repeated == 4
    assert len(plots.artists_with_gid(fig, "fault-trace")) == len(meta["faults"])
    heads = plots.artists_with_gid(fig, "well-head")
    assert sum(len(h.get_offsets()) for h in heads) == len(manifest)
    assert len(plots.artists_with_gid(fig, "well-path")) == len(paths)
    words = " ".join(legend_texts(fig))
    assert "missing section" in words and "repeated section" in words
    assert "fault trace at" in words and "hanging wall" in words
    # each cut is posted with its vertical separation, signed by section
    posted = [t for t in texts(fig) if t[:1] in ("\u2212", "+") and t[1:].isdigit()]
    assert len(posted) == len(cuts)
    assert set(meta["faults"][k]["name"] for k in range(4)) <= set(texts(fig))
    assert ax.get_aspect() == 1.0


@needs_field
def test_field_map_without_faults_and_in_feet():
    _, _, manifest, cuts = demo_field()
    ft = cuts.copy()
    for c in [c for c in ft.columns if c.endswith("_m")]:
        if pd.api.types.is_numeric_dtype(ft[c]):
            ft[c.replace("_m", "_ft")] = ft.pop(c) / 0.3048
    fig = field_plots.field_map(manifest, ft, None)
    assert plots.count_cut_markers(fig) == len(cuts)
    assert len(plots.artists_with_gid(fig, "fault-trace")) == 0
    pts = np.vstack([a.get_offsets() for a in plots.artists_with_gid(fig, "cut-missing")])
    assert pts[:, 0].min() > 480000  # plotted in metres, not feet


def test_fault_trace_geometry():
    # a plane dipping 45 deg east through (0, 0, 1000 m): 100 m deeper its trace lies 100 m
    # further east, striking north (right-hand rule: dip azimuth 90 -> strike 000)
    p, u = field_plots.fault_trace({"dip_deg": 45.0, "dip_azimuth_deg": 90.0, "x_m": 0.0, "y_m": 0.0,
                              "tvdss_m": 1000.0}, 1100.0)
    np.testing.assert_allclose(p, [100.0, 0.0], atol=1e-9)
    np.testing.assert_allclose(u, [0.0, 1.0], atol=1e-12)
    p, _ = field_plots.fault_trace({"dip_deg": 60.0, "dip_azimuth_deg": 180.0, "x_m": 10.0,
                              "y_m": 20.0, "tvdss_m": 500.0}, 400.0)
    np.testing.assert_allclose(p, [10.0, 20.0 + 100.0 / math.tan(math.radians(60.0))],
                               atol=1e-9)
    assert field_plots.fault_trace({"dip_deg": 0.0, "dip_azimuth_deg": 0.0, "x_m": 0, "y_m": 0,
                              "tvdss_m": 0}, 10.0) is None


# ------------------------------------------------------------------ separation along strike
def test_separation_along_strike_distances_and_markers():
    faults = pd.DataFrame({"fault_id": ["FA", "FB"], "strike_deg": [0.0, 90.0],
                           "dip_deg": [60.0, 60.0], "dip_azimuth_deg": [90.0, 180.0],
                           "sense": ["normal", "reverse"], "x_m": [0.0, 0.0],
                           "y_m": [0.0, 0.0], "tvdss_m": [1000.0, 1000.0]})
    cuts = pd.DataFrame({"well": ["W1", "W2", "W3"], "fault_id": ["FA", "FA", "FB"],
                         "x_m": [5.0, -3.0, 250.0], "y_m": [300.0, 100.0, 7.0],
                         "vertical_separation_m": [40.0, 30.0, 12.0],
                         "section": ["missing", "missing", "repeated"]})
    fig = field_plots.separation_along_strike(faults, cuts)
    ax = fig.axes[0]
    assert ax.get_ylabel() == "vertical separation [m]"
    assert "along strike" in ax.get_xlabel()
    assert plots.count_cut_markers(fig, "missing") == 2
    assert plots.count_cut_markers(fig, "repeated") == 1
    lines = plots.artists_with_gid(fig, "fault-separation")
    assert len(lines) == 2
    xs = sorted(float(x) for ln in lines for x in ln.get_xdata())
    # FA strikes north: distances are the northings; FB strikes east: the easting
    assert xs == pytest.approx([100.0, 250.0, 300.0])
    words = " ".join(legend_texts(fig))
    assert "fault FA" in words and "fault FB" in words and "missing section" in words


@needs_field
def test_separation_along_strike_on_the_demo_field():
    _, _, _, cuts = demo_field()
    fig = field_plots.separation_along_strike(demo_faults(), cuts)  # cuts carry fault_name
    assert plots.count_cut_markers(fig) == len(cuts) == 9


def test_separation_along_strike_without_assignments():
    faults = pd.DataFrame({"fault_id": ["FA"], "dip_deg": [60.0], "dip_azimuth_deg": [90.0],
                           "x_m": [0.0], "y_m": [0.0]})
    fig = field_plots.separation_along_strike(faults, pd.DataFrame({"x_m": [1.0], "y_m": [1.0]}))
    assert any("no cut is assigned" in t for t in texts(fig))


# ------------------------------------------------------------------------ figure hygiene
def test_figures_do_not_touch_pyplot_and_matplotlib_loads_lazily():
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    before = plt.get_fignums()
    track = pd.DataFrame({"md_m": [1.0, 2.0], "s_m": [0.0, 1.0], "unit": ["A", "A"],
                          "confidence": [1.0, 1.0]})
    well_plots.strat_position_plot(track)
    assert plt.get_fignums() == before
    code = ("import sys, wellfault, wellfault.viz.well_plots, wellfault.viz.report, wellfault.viz.track; "
            "print('matplotlib' in sys.modules)")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                         check=True)
    assert out.stdout.strip() == "False"


def test_bad_inputs_name_what_is_missing():
    from wellfault.errors import InputError

    with pytest.raises(InputError, match="well, x_m, y_m"):
        field_plots.field_map(pd.DataFrame({"name": ["A"]}), None)
    with pytest.raises(InputError, match="fault_id"):
        field_plots.field_map(pd.DataFrame({"well": ["A"], "x_m": [0.0], "y_m": [0.0]}), None,
                        pd.DataFrame({"dip_deg": [60.0]}))
    with pytest.raises(InputError, match="empty"):
        well_plots.strat_position_plot(pd.DataFrame(columns=["md_m", "s_m", "unit", "confidence"]))


def test_field_map_takes_paths_as_tables():
    wells = pd.DataFrame({"well": ["A", "B"], "x_m": [0.0, 1000.0], "y_m": [0.0, 0.0]})
    paths = {"A": pd.DataFrame({"east_m": [0.0, 100.0, 400.0], "north_m": [0.0, 50.0, 300.0]}),
             "B": pd.DataFrame({"x_m": [1000.0, 900.0], "y_m": [0.0, -200.0]})}
    cuts = pd.DataFrame({"well": ["A"], "x_m": [100.0], "y_m": [50.0], "tvdss_m": [900.0],
                         "section": ["repeated"], "vertical_separation_m": [12.0],
                         "confidence": [0.2]})
    fig = field_plots.field_map(wells, cuts, paths=paths)
    lines = plots.artists_with_gid(fig, "well-path")
    assert len(lines) == 2
    np.testing.assert_allclose(lines[0].get_xydata()[-1], [400.0, 300.0])
    assert plots.count_cut_markers(fig, "repeated") == 1
    words = " ".join(legend_texts(fig))
    assert "confidence below" in words  # a weak cut is drawn open and the legend says so
