"""The low-character type logs (wellfault.synth.low_character.low_character_log, degrade_log): degraded
real gamma-ray logs of ../shared/reference_data (the ``refdata`` fixture skips without them;
provenance in wellfault.synth.real_logs.REAL_GR_LOGS). Seeds 500+ (tests), apart from calibration
(10000+) and benchmarks (0+)."""

from __future__ import annotations

import numpy as np
import pytest

from wellfault.align import robust_location_scale
from wellfault.synth.real_logs import REAL_GR_LOGS, curve_spread
from wellfault.synth.low_character import (
    LowCharacterSpec, degrade_log, low_character_log, low_character_scenario,
)


def test_tool_response_has_the_drawn_vertical_resolution():
    # full width at half maximum of the response to a thin bed (an impulse): the definition of
    # a tool's vertical resolution (Ellis & Singer 2007, ch. 7, from memory)
    spec = LowCharacterSpec(monotonous_fraction=(0.0, 0.0), contrast=(1.0, 1.0),
                            type_noise_rel=(0.0, 0.0), resolution_m=(1.5, 1.5))
    ds = 0.01
    v = np.zeros(2001)
    v[1000] = 1.0
    signal, recorded, stretches, _ = degrade_log(v, ds, 500, spec)
    assert stretches == [] and np.allclose(signal, recorded)
    above = np.flatnonzero(signal >= signal.max() / 2)
    assert (above[-1] - above[0] + 1) * ds == pytest.approx(1.5, abs=2 * ds)


def test_same_seed_same_log_and_seeds_differ(refdata):
    a = low_character_log("P-129", refdata, 500)
    b = low_character_log("P-129", refdata, 500)
    c = low_character_log("P-129", refdata, 501)
    assert a.type_log == b.type_log and a.drawn == b.drawn
    assert not np.allclose(a.type_log.type_log["GR"], c.type_log.type_log["GR"])


@pytest.mark.parametrize("name", list(REAL_GR_LOGS))
def test_degraded_real_log_has_less_character(refdata, name):
    lg = low_character_log(name, refdata, 502)
    s = lg.rock.type_log.index.to_numpy(float)
    gr = lg.rock.type_log["GR"].to_numpy(float)
    rec = lg.type_log.type_log["GR"].to_numpy(float)
    # contrast reduced by the drawn factor, within what smoothing and the stretches take
    assert curve_spread(lg.rock) < lg.drawn["contrast"] * lg.spread_original * 1.05
    # the type well's counting noise has the drawn size in units of the original spread
    noise = rec - gr
    assert np.std(noise) == pytest.approx(lg.drawn["type_noise_rel"] * lg.spread_original,
                                          rel=0.05)
    # inside a monotonous stretch the rock varies far less than the whole log
    length = s[-1] - s[0]
    assert 0.25 <= lg.drawn["monotonous_fraction"] <= 0.45 + 250.0 / length  # one stretch over
    for top, base in lg.monotonous:
        sel = (s > top + 10.0) & (s < base - 10.0)
        if sel.sum() > 100:
            assert np.std(np.diff(gr[sel])) < 0.7 * np.std(np.diff(gr))
    # same surfaces for the rock the wells are drawn through and the recorded type log
    assert lg.rock.names == lg.type_log.names
    assert robust_location_scale(rec)[1][0] > 0


def test_scenarios_span_the_issue_cases(refdata):
    lg = low_character_log("Wellington", refdata, 503)
    sizes, kinds = [], set()
    for seed in range(500, 530):
        sc = low_character_scenario(seed, lg)
        kinds.add(sc.kind)
        sizes += sc.truth["delta_s_m"].abs().tolist()
    assert kinds == {"vertical", "deviated", "high-angle"}
    assert min(sizes) < 30 and 60 < max(sizes) <= 250
    close = low_character_scenario(540, lg, close_faults=True)
    md = close.truth["md_m"].to_numpy()
    assert md.size >= 2 and 5.0 < abs(md[1] - md[0]) < 80.0
