"""Measure one fault cut: position, observed section, fault type, thicknesses and separations.

Whatever found the cut (tops or curves), the evidence reduces to a signed stratigraphic jump Δs
at an MD inside a bracket. :func:`measure_cut` turns that into a :class:`~wellfault.evidence.results.FaultCut`
with the geometry of DESIGN.md §3: section from the sign rule, fault type from the crossing
direction (given fault attitude) or from the stated hanging wall → footwall assumption, TST, TVT,
vertical separation, throw and heave, the MD span of the missing or repeated strata, and with a
pitch, net slip.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..geo import slip
from ..geo import geometry
from ..geo import thickness as geometry_thickness
from ..geo.dip import BedDip
from ..errors import InputError
from .results import FaultCut

__all__ = ["FaultAssumptions", "FaultPlane", "measure_cut", "MIN_BED_COSINE",
           "MIN_FAULT_COSINE"]

#: |t·n| below this (the well within 2° of bedding): "missing" or "repeated" has no meaning
#: (methods.md §3.4, degenerate cases). Common practice.
MIN_BED_COSINE = float(np.sin(np.radians(2.0)))
#: |t·m| below this (the well within 0.5° of the fault plane): no crossing direction.
MIN_FAULT_COSINE = float(np.sin(np.radians(0.5)))
#: Beds steeper than this have no usable vertical thickness (TVT = TST / cos δ blows up).
MAX_BED_DIP_FOR_VERTICAL_DEG = 89.0
#: Within this angle of the fault plane the crossing direction is reported with a warning
#: note: it depends on the fault dip given, which is rarely known that well.
SENSITIVE_FAULT_ANGLE_DEG = 5.0


@dataclass(frozen=True)
class FaultPlane:
    """A mapped fault plane: attitude and one point on it (x, y in metres; z as TVDSS [m]).

    Used as a fault model: a cut is given the attitude of the plane that crosses the well
    inside the cut's bracket (or the nearest plane within ``FaultAssumptions.max_distance_m``).
    """

    name: str
    dip_deg: float
    dip_azimuth_deg: float
    x_m: float
    y_m: float
    tvdss_m: float

    def signed_distance(self, points_xyz) -> np.ndarray:
        """Distance of (x, y, tvdss) points from the plane, positive on the hanging-wall side."""
        m = geometry.fault_normal_up(self.dip_deg, self.dip_azimuth_deg)
        p = np.asarray(points_xyz, dtype=float).reshape(-1, 3)
        return (p - np.array([self.x_m, self.y_m, self.tvdss_m])) @ m


@dataclass(frozen=True)
class FaultAssumptions:
    """What the user told us about the fault(s), shared by all cuts of a run.

    ``fault`` is a (dip, dip azimuth) pair when the attitude is known (``--fault 60/090``);
    ``pitch`` is (pitch, azimuth of the strike-line end it is measured from), e.g. (50, 200)
    for ``--pitch 50/200``; it needs ``fault``. ``planes`` is a fault model (mapped planes): a
    cut takes the attitude of the plane that crosses the well inside its bracket, else of the
    nearest plane within ``max_distance_m``, else ``fault``, else the stated assumption.
    """

    fault: tuple[float, float] | None = None
    pitch: tuple[float, float] | None = None
    planes: tuple[FaultPlane, ...] = ()
    max_distance_m: float = 150.0

    def __post_init__(self):
        if self.pitch is not None and self.fault is None:
            raise InputError("a slickenline pitch needs the fault attitude to know which end of "
                             "the strike line it is measured from; give --fault DIP/AZIMUTH too")
        if self.pitch is not None:
            # validates the named end against the fault's strike line
            slip.rhr_pitch(self.pitch[0], self.pitch[1], fault_dip_azimuth_deg=self.fault[1])
        object.__setattr__(self, "planes", tuple(self.planes))

    def plane_for(self, trajectory, md_top_m: float, md_base_m: float, md_m: float
                  ) -> tuple[FaultPlane | None, float | None]:
        """The model plane for a cut, and the MD where it crosses the well inside the bracket.

        Returns (None, None) without a fault model or when no plane is near.
        """
        if not self.planes:
            return None, None
        elev = getattr(trajectory, "ref_elevation_m", None)
        dz = float(elev) if elev is not None else 0.0
        grid = np.linspace(md_top_m, md_base_m, max(3, int((md_base_m - md_top_m) / 0.5) + 1))
        pos = trajectory.position(grid)
        pos[:, 2] -= dz  # TVD -> TVDSS
        best, best_md, best_d = None, None, np.inf
        for plane in self.planes:
            d = plane.signed_distance(pos)
            change = np.flatnonzero(np.sign(d[:-1]) != np.sign(d[1:]))
            if change.size:
                k = int(change[np.argmin(np.abs(grid[change] - md_m))])
                f = d[k] / (d[k] - d[k + 1])
                cross = float(grid[k] + f * (grid[k + 1] - grid[k]))
                if best_md is None or abs(cross - md_m) < abs(best_md - md_m):
                    best, best_md, best_d = plane, cross, 0.0
            elif best_md is None:
                dmin = float(np.min(np.abs(d)))
                if dmin < best_d and dmin <= self.max_distance_m:
                    best, best_d = plane, dmin
        return best, best_md


def _crossing_text(c: int, given: bool) -> str:
    if not given:
        return "assumed hanging wall -> footwall"
    return {1: "hanging wall -> footwall", -1: "footwall -> hanging wall"}.get(int(c),
                                                                             "undetermined")


def measure_cut(
    *,
    well: str,
    method: str,
    md_m: float,
    md_top_m: float,
    md_base_m: float,
    delta_s_m: float,
    trajectory,
    bed_dip: BedDip,
    assumptions: FaultAssumptions = FaultAssumptions(),
    picks=None,
    surface_above: str = "",
    surface_below: str = "",
    confidence: float = 1.0,
    notes: list[str] | None = None,
    expected_thickness_m: float = math.nan,
    observed_thickness_m: float = math.nan,
) -> FaultCut:
    """Turn a stratigraphic jump at an MD into a fully measured :class:`FaultCut`.

    Parameters
    ----------
    delta_s_m : float
        Signed jump Δs = s(below) − s(above) in TST. [m]
    md_m, md_top_m, md_base_m : float
        Best estimate and bracket of the cut. [m]
    trajectory : Trajectory
        The well path (positions and tangents on the minimum-curvature arc).
    bed_dip : BedDip
        Bed attitude along the well.

    Notes
    -----
    Section: missing when sign(Δs) = sign(r), r = t·n, repeated otherwise (methods.md §3.4).
    Separation sense: Δs·c > 0 is normal (crossing hanging wall → footwall, c = +1, the well
    steps down-section into older rock), < 0 reverse. Without a fault attitude c = +1 is
    assumed and the row says so. VS = |Δs|/cos δ (Groshong 2006, eq. 7.3); throw and heave
    from VS, fault dip θ and the apparent bed dip α in the fault-dip direction:
    T = VS tan θ/(tan θ − tan α), H = VS/(tan θ − tan α) (methods.md §3.2).
    """
    notes = list(notes or [])
    md = float(md_m)
    plane, plane_md = assumptions.plane_for(trajectory, float(md_top_m), float(md_base_m), md)
    if plane_md is not None and plane_md != md:
        md = plane_md
        notes = [n for n in notes if not n.startswith("cut placed mid-bracket")]
        notes.append(f"cut placed where fault-model plane {plane.name} crosses the well")
    pos = trajectory.position(np.array([md]))[0]
    tangent = trajectory.tangent(np.array([md]))[0]
    n = bed_dip.normals_at(np.array([md]), picks)[0]
    bdip, bazi = (float(v[0]) for v in bed_dip.attitude_at(np.array([md]), picks))
    r = float(tangent @ n)
    ds = float(delta_s_m)

    section = str(geometry.section_kind(ds, r, min_abs_r=MIN_BED_COSINE))
    if section == "undetermined":
        notes.append(f"well nearly parallel to bedding at the cut (t.n = {r:+.3f}): the jump "
                     f"in stratigraphic level is {ds:+.1f} m TST, but it is neither clearly "
                     "missing nor repeated section")

    attitude = (plane.dip_deg, plane.dip_azimuth_deg) if plane is not None else assumptions.fault
    given = attitude is not None
    if given:
        fdip, fazi = attitude
        crossing = int(geometry.crossing_direction(tangent, fault_dip_deg=fdip,
                                                   fault_dip_azimuth_deg=fazi,
                                                   min_abs_cos=MIN_FAULT_COSINE))
        fault_type, reason = geometry.classify_fault(ds, r=r, crossing=crossing,
                                                     min_abs_r=MIN_BED_COSINE)
        if reason:
            notes.append(reason)
        m = geometry.fault_normal_up(fdip, fazi)
        angle = float(np.degrees(np.arcsin(min(1.0, abs(float(tangent @ m))))))
        if crossing != 0 and angle < SENSITIVE_FAULT_ANGLE_DEG:
            notes.append(f"well only {angle:.1f} deg from the fault plane at the cut: the "
                         "crossing direction (and so the fault type) depends on the fault dip "
                         "given; check it")
        alpha = float(geometry_thickness.apparent_dip(bdip, bazi, fazi))
        dip_source = f"fault model {plane.name}" if plane is not None else "given"
    else:
        crossing = 1
        fault_type, reason = geometry.classify_fault(ds, r=r, crossing=1,
                                                     min_abs_r=MIN_BED_COSINE)
        if reason:
            notes.append(reason)
        fdip = geometry.andersonian_fault_dip(fault_type) if fault_type != "undetermined" \
            else math.nan
        fazi = math.nan
        alpha = 0.0
        dip_source = f"assumed ({fault_type}, Andersonian)" if fault_type != "undetermined" \
            else "unknown"
        if fault_type != "undetermined":
            notes.append("fault attitude not given: crossing assumed hanging wall -> footwall, "
                         "apparent bed dip in the fault section assumed 0")

    tst = abs(ds)
    if bdip < MAX_BED_DIP_FOR_VERTICAL_DEG:
        tvt = float(geometry_thickness.true_vertical_thickness(tst, dip_deg=bdip))
        vs = float(geometry_thickness.vertical_separation(ds, dip_deg=bdip))
    else:
        tvt = vs = math.nan
        notes.append(f"beds dip {bdip:.1f} deg: vertical thickness and vertical separation are "
                     "undefined for (near-)vertical beds; use the TST")
    if np.isfinite(fdip):
        throw, heave = (float(v) for v in
                        geometry_thickness.throw_and_heave(vs, fault_dip_deg=fdip,
                                                 apparent_bed_dip_deg=alpha)[:2])
    else:
        throw = heave = math.nan
    span = float(geometry.expected_md_span(tst, r))

    net = strike_part = math.nan
    if assumptions.pitch is not None and np.isfinite(throw):
        p = slip.rhr_pitch(assumptions.pitch[0], assumptions.pitch[1],
                           fault_dip_azimuth_deg=assumptions.fault[1])
        net, _dip_part, strike_part = (float(v) for v in
                                       slip.net_slip(throw, fault_dip_deg=fdip, rhr_pitch_deg=p))

    elev = getattr(trajectory, "ref_elevation_m", None)
    tvdss = float(pos[2] - elev) if elev is not None else math.nan
    if elev is None:
        notes.append("depth-reference elevation unknown: TVDSS not computed")

    return FaultCut(
        well=well, method=method, md_m=md, md_top_m=float(md_top_m), md_base_m=float(md_base_m),
        tvd_m=float(pos[2]), tvdss_m=tvdss, x_m=float(pos[0]), y_m=float(pos[1]),
        section=section, fault_type=str(fault_type), delta_s_m=ds, tst_m=tst, tvt_m=tvt,
        md_span_m=span, vertical_separation_m=vs, throw_m=throw, heave_m=heave,
        fault_dip_deg=float(fdip), fault_dip_azimuth_deg=float(fazi),
        fault_dip_source=dip_source, crossing=_crossing_text(crossing, given),
        surface_above=surface_above, surface_below=surface_below,
        confidence=float(confidence), net_slip_m=net, strike_slip_m=strike_part,
        bed_dip_deg=bdip, bed_dip_azimuth_deg=bazi,
        expected_thickness_m=float(expected_thickness_m),
        observed_thickness_m=float(observed_thickness_m),
        notes="; ".join(notes),
        fault_name=plane.name if plane is not None else "",
        extra={"r": r},
    )
