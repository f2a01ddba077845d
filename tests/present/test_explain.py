"""Factors, hazards and guard-rule reasons in words: one function, the reader's units."""

from __future__ import annotations

import json
import re
from dataclasses import replace

import pytest

from petfall_audit.demo import sample_building
from petfall_audit.io.results_export import assessment_to_dict
from petfall_audit.model import CAT_PRESETS, Opening, OpeningKind, Screen
from petfall_audit.present.explain import REASON_CODES, explain, explain_all
from petfall_audit.reasons import Reason
from petfall_audit.risk import assess

#: A metric unit after a number ("3.1 m", "100 mm", "18.5 m/s", "2 cm", "40 km/h").
METRIC = re.compile(r"\d\s*(?:mm|cm|km/h|km|m/s|m)\b")
#: One value of every name a reason carries, SI (lengths in m, speeds in m/s).
VALUES = {"gap_m": 0.1, "mesh_m": 0.03, "share": 0.4, "perch_m": 1.1, "drop_m": 12.0,
          "speed_mps": 15.0, "limit_m": 30.0, "band": 2, "surface": "lawn",
          "landing_id": "garden", "flat_rail_top": 1,
          # problems of a building file
          "value": 2.5, "limit": 1.0, "quantity": "length", "unit": "m", "open": 0, "why": "",
          "level": 2, "elevation_m": 3.0, "below_level": 1, "below_m": 3.1, "surface_m": 4.0,
          "opening_id": "S-01", "opening_m": 3.0, "more": 2, "facade": "street",
          "out_from_m": 3.0, "out_to_m": 8.0, "along_from_m": 0.0, "along_to_m": 6.0,
          "floor_m": 3.0}


def _all_reasons(building):  # type: ignore[no-untyped-def]
    a = assess(building, samples=64, seed=1)
    return [r for o in a.openings for r in (*o.factors, *o.hazards)]


def test_every_code_reads_in_words_and_imperial_has_no_metric_unit() -> None:
    for code in sorted(REASON_CODES):
        reason = Reason.of(code, **VALUES)
        metric, imperial = explain(reason, "metric"), explain(reason, "imperial")
        assert metric and imperial and "{" not in metric
        assert not METRIC.search(imperial), (code, imperial)
        # the same finding, only the units differ: both read differently where a length is
        # shown, and identically where none is
        assert (metric == imperial) == (not METRIC.search(metric)), code


def test_imperial_factors_of_real_buildings_show_feet_inches_and_mph() -> None:
    """A property manager working in imperial units: no factor or hazard of the demo buildings
    (plus a netted, limited and gappy one) shows a metric unit."""
    window = Opening(id="W", floor=3, facade="street", kind=OpeningKind.WINDOW_CASEMENT,
                     x_m=1.0, width_m=1.0, perch_height_m=0.9)
    balcony = Opening(id="B", floor=3, facade="street", kind=OpeningKind.BALCONY, x_m=4.0,
                      width_m=2.0, perch_height_m=1.1, projection_m=1.2, largest_gap_mm=140.0,
                      bottom_gap_mm=80.0, climbable_infill=True, netting_mesh_mm=60.0)
    walkup = sample_building("walkup")
    extra = replace(walkup, openings=(*walkup.openings,
                                      replace(window, id="W1", limiter_gap_mm=150.0),
                                      replace(window, id="W2", limiter_gap_mm=90.0,
                                              screen=Screen.INSECT),
                                      balcony), cat_profile=CAT_PRESETS["adult"])
    reasons = _all_reasons(extra)
    codes = {r.code for r in reasons}
    # a wide sample of the codes: lengths (drop, gaps, meshes, sills) and speeds among them
    assert {"drop_landing", "impact_speed", "limiter_gap_large", "guard_gap",
            "net_mesh_large"} <= codes
    texts = explain_all(reasons, "imperial")
    offending = [t for t in texts if METRIC.search(t)]
    assert offending == []
    assert any(" ft " in t for t in texts) and any("mph" in t for t in texts)
    # 150 mm is 5.9 in (1 in = 25.4 mm exactly, international yard and pound agreement, 1959)
    assert any("5.9 in" in t for t in explain_all(
        [r for r in reasons if r.code == "limiter_gap_large"], "imperial"))


def test_an_unknown_code_reads_as_its_words_not_an_error() -> None:
    assert explain(Reason.of("from_a_newer_version", x=1.0)) == "From a newer version"
    assert explain(Reason.of("guard_gap")) == "Guard gap"  # values missing: still words


def test_json_export_carries_codes_values_and_text() -> None:
    a = assess(sample_building("walkup"), samples=64, seed=1)
    d = json.loads(json.dumps(assessment_to_dict(a)))
    o = d["openings"][0]
    assert len(o["factors"]) == len(o["factor_codes"])
    assert all(isinstance(t, str) for t in o["factors"])
    first = a.ranked()[0]  # the default order of every output
    assert o["factor_codes"][0]["code"] == first.factors[0].code
    assert o["factors"][0] == explain(first.factors[0])
    drop = next(f for f in o["factor_codes"] if f["code"] == "drop_landing")
    assert drop["values"]["drop_m"] == pytest.approx(first.drop_m.p50, rel=1e-3)
