"""An assessment as a JSON-ready dict or a CSV text (the terminal table for people is
:func:`petfall_audit.present.tables.assessment_to_table`).

Openings are listed in the default order (:data:`petfall_audit.risk.DEFAULT_ORDER`, by risk
score). Floats are rounded to 4 significant digits so the
same seed gives byte-identical output. Units: metres, metres per second, probabilities 0..1,
severity index in g. Every output carries the cautions.
"""

from __future__ import annotations

import io
from typing import Any

from petfall_audit import __version__
from petfall_audit.cautions import CAUTIONS
from petfall_audit.injury import BANDS
from petfall_audit.io.csv_safe import csv_writer
from petfall_audit.model import CatProfile, Distribution, Fixed, LogNormal, Normal, Uniform
from petfall_audit.present.numbers import SIGNIFICANT_DIGITS, round_significant
from petfall_audit.reasons import Reason
from petfall_audit.risk import Assessment, OpeningResult, Percentiles

__all__ = [
    "SIGNIFICANT_DIGITS",
    "round_significant",
    "assessment_to_dict",
    "assessment_to_csv",
    "profile_to_dict",
]

_r = round_significant


def _pct(p: Percentiles) -> dict[str, float | None]:
    return {"p5": _r(p.p5), "p50": _r(p.p50), "p95": _r(p.p95)}


def _dist(d: Distribution) -> dict[str, Any]:
    if isinstance(d, Fixed):
        return {"type": "fixed", "value": _r(d.value)}
    if isinstance(d, Normal):
        return {"type": "normal", "mean": _r(d.mean), "sd": _r(d.sd)}
    if isinstance(d, LogNormal):
        return {"type": "lognormal", "mean": _r(d.mean), "sd": _r(d.sd)}
    if isinstance(d, Uniform):
        return {"type": "uniform", "min": _r(d.min), "max": _r(d.max)}
    raise TypeError(f"unknown distribution {d!r}")


def profile_to_dict(profile: CatProfile) -> dict[str, Any]:
    """The cat profile as plain JSON values (SI units)."""
    return {
        "preset": profile.preset,
        "mass_kg": _dist(profile.mass_kg),
        "cda_tense_m2": _dist(profile.cda_tense_m2),
        "cda_spread_m2": _dist(profile.cda_spread_m2),
        "relax_probability": _r(profile.relax_probability),
        "relax_fraction": _dist(profile.relax_fraction),
        "righting_time_s": _dist(profile.righting_time_s),
        "launch_speed_mps": _dist(profile.launch_speed_mps),
    }


def _opening(o: OpeningResult) -> dict[str, Any]:
    from petfall_audit.present.explain import explain_all  # present reads this module's rounding

    return {
        "id": o.id,
        "floor": o.floor,
        "facade": o.facade,
        "kind": str(o.kind),
        "rank": o.rank,
        "risk_rank": o.risk_rank,
        "risk": _r(o.risk),
        "expected_band": BANDS[o.expected_band],
        "expected_band_index": o.expected_band,
        "expected_severity_g": _r(o.expected_severity_g),
        "likelihood": _r(o.annual_probability),
        "one_in_n": _r(o.one_in_n),
        "drop_m": _pct(o.drop_m),
        "impact_speed_mps": _pct(o.impact_speed_mps),
        "landing": {k: _r(v) for k, v in o.landing.items()},
        "bands": {name: _r(o.bands[name]) for name in BANDS},
        "factors": list(explain_all(o.factors)),
        "hazards": list(explain_all(o.hazards)),
        "factor_codes": [_reason(f) for f in o.factors],
        "hazard_codes": [_reason(h) for h in o.hazards],
    }


def _reason(r: Reason) -> dict[str, Any]:
    """A reason's code and its SI values (numbers rounded like every other number)."""
    return {"code": r.code,
            "values": {k: _r(v) if isinstance(v, float) else v for k, v in r.items}}


def _sensitivity(a: Assessment) -> dict[str, Any] | None:
    s = a.sensitivity
    if s is None:
        return None
    return {
        "method": "one-at-a-time: each parameter at its 10th and 90th percentile "
        "(relax_probability ±0.2), others as sampled, same seed",
        "measure": "summed risk score of the top-risk openings",
        "openings": list(s.opening_ids),
        "base_risk": _r(s.base_risk),
        "parameters": [
            {
                "parameter": w.parameter,
                "unit": w.unit,
                "low_value": _r(w.low_value),
                "high_value": _r(w.high_value),
                "risk_low": _r(w.risk_low),
                "risk_high": _r(w.risk_high),
                "swing": _r(w.swing),
            }
            for w in s.swings
        ],
    }


def assessment_to_dict(a: Assessment) -> dict[str, Any]:
    """The assessment as JSON-ready values: building, cat profile, sample count, seed, model
    version, the openings in the default order, the sensitivity summary (or ``None``), cautions."""
    info = a.building.info
    t = a.thresholds
    return {
        "software_version": __version__,
        "model_version": a.model_version,
        "building": {
            "name": info.name,
            "address": info.address,
            "audit_date": info.audit_date,
            "auditor": info.auditor,
            "site_altitude_m": _r(info.site_altitude_m),
            "air_temperature_c": _r(info.air_temperature_c),
        },
        "cat_profile": profile_to_dict(a.building.cat_profile),
        "samples": a.samples,
        "seed": a.seed,
        "air_density_kg_m3": _r(float(a.rho_kg_m3)),
        "bands": list(BANDS),
        "band_thresholds_g": {
            "moderate": _r(t.moderate_g),
            "serious": _r(t.serious_g),
            "life-threatening": _r(t.life_threatening_g),
        },
        "ranking": "openings listed by risk_rank (the default order): HHSRS-style risk score, "
        "highest first; equal scores by the worse expected band, the higher mean severity, "
        "then the opening id. rank: expected band (worst band reached by at least half of the "
        "falls), then likelihood",
        "openings": [_opening(o) for o in a.ranked()],
        "sensitivity": _sensitivity(a),
        "cautions": list(CAUTIONS),
    }


_CSV_COLUMNS = (
    "rank", "risk_rank", "id", "floor", "facade", "kind", "expected_band", "expected_severity_g",
    *(f"p_{name}" for name in BANDS), "likelihood", "one_in_n", "risk",
    "drop_m_p5", "drop_m_p50", "drop_m_p95",
    "impact_speed_mps_p5", "impact_speed_mps_p50", "impact_speed_mps_p95",
    "main_landing", "factors", "hazards",
)


def assessment_to_csv(a: Assessment) -> str:
    """One row per opening in the default order; the cautions first, as ``#`` comment lines."""
    from petfall_audit.present.explain import explain_all

    buf = io.StringIO()
    for line in CAUTIONS:
        buf.write(f"# {line}\n")
    w = csv_writer(buf)
    w.writerow(_CSV_COLUMNS)
    for o in a.ranked():
        main = next(iter(o.landing), "")
        w.writerow([
            o.rank, o.risk_rank, o.id, o.floor, o.facade, str(o.kind), BANDS[o.expected_band],
            _r(o.expected_severity_g), *(_r(o.bands[name]) for name in BANDS),
            _r(o.annual_probability), _r(o.one_in_n), _r(o.risk),
            _r(o.drop_m.p5), _r(o.drop_m.p50), _r(o.drop_m.p95),
            _r(o.impact_speed_mps.p5), _r(o.impact_speed_mps.p50), _r(o.impact_speed_mps.p95),
            main, "; ".join(explain_all(o.factors)), "; ".join(explain_all(o.hazards)),
        ])
    return buf.getvalue()
