"""How much the top risks rest on the cat profile: the one-at-a-time swings of
:mod:`petfall_audit.sensitivity` as bars, largest first.

Each bar is one cat-profile parameter held low and then high (its 10th and 90th percentile
among the sampled cats; the chance of spreading out ±0.2). Risk changes are percentages of the
summed risk score of the building's highest-risk openings; parameter values are SI (kg, m², s,
m/s) or plain shares (0..1).
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass
from typing import TYPE_CHECKING

import numpy as np
from numpy.typing import NDArray

from petfall_audit.present import PARAMETER_LABELS, fmt_number, fmt_percent

if TYPE_CHECKING:
    from petfall_audit.risk import Assessment
    from petfall_audit.sensitivity import SensitivityResult

__all__ = ["SWING_DEFINITION", "SensitivityFigure", "sensitivity_figure",
           "sensitivity_figure_from_result"]

#: Decimals of each parameter's value in the bar labels.
_DECIMALS: dict[str, int] = {
    "mass_kg": 1, "cda_tense_m2": 3, "cda_spread_m2": 3, "relax_probability": 2,
    "relax_fraction": 2, "righting_time_s": 2, "launch_speed_mps": 1,
}

#: What the bars measure, in plain words (the screen and the PDF both print it).
SWING_DEFINITION = (
    "One cat-profile parameter at a time is set to a low and then a high value — its 10th and "
    "90th percentile among the sampled cats (the chance of spreading out 0.2 lower and higher) — "
    "while every other parameter keeps the values the same sampled cats had. The bars show how "
    "the summed risk score of the highest-risk openings changes, as a percentage of its value "
    "with the profile as set; the swing is the change from the low to the high value. The "
    "likelihood of a fall is kept as assessed (although body mass also decides which gaps a cat "
    "gets through), so the swings show the severity side of the risk."
)


@dataclass(frozen=True, slots=True)
class SensitivityFigure:
    """The swings, largest absolute swing first (one entry per parameter).

    ``parameters``: keys of :data:`petfall_audit.sensitivity.PARAMETERS`; ``labels``: plain
    words; ``units``: unit of the values ("" for a share); ``low_value`` / ``high_value``: the
    value held (unit); ``low_pct`` / ``high_pct``: change of the summed top risk with the low /
    high value, % of ``base_risk``; ``swing_pct`` = ``high_pct − low_pct`` (signed, %);
    ``range_text``: "3.1–5.2 kg"; ``low_text`` / ``high_text``: "3.1 kg", "5.2 kg".
    ``opening_ids``: the top-risk openings measured; ``base_risk``: their summed risk score;
    ``samples``: cats per simulation of the analysis; ``assessment_samples``: those of the
    assessment shown (more when the analysis used fewer).
    """

    parameters: tuple[str, ...]
    labels: tuple[str, ...]
    units: tuple[str, ...]
    low_value: NDArray[np.float64]
    high_value: NDArray[np.float64]
    low_pct: NDArray[np.float64]
    high_pct: NDArray[np.float64]
    swing_pct: NDArray[np.float64]
    range_text: tuple[str, ...]
    low_text: tuple[str, ...]
    high_text: tuple[str, ...]
    opening_ids: tuple[str, ...]
    base_risk: float
    samples: int
    assessment_samples: int

    @property
    def reduced(self) -> bool:
        """True when the analysis used fewer cats than the assessment it describes."""
        return self.samples < self.assessment_samples

    @property
    def span_pct(self) -> float:
        """Largest absolute change of any bar end (%), 0 without bars."""
        ends = np.abs(np.concatenate([self.low_pct, self.high_pct]))
        return float(ends.max(initial=0.0))


def _value_text(name: str, unit: str, value: float, with_unit: bool = True) -> str:
    if name == "relax_probability":
        return fmt_percent(value) if with_unit else fmt_number(value * 100, 0)
    return fmt_number(value, _DECIMALS.get(name, 2), unit if with_unit else "")


def _range_text(name: str, unit: str, lo: float, hi: float) -> str:
    return f"{_value_text(name, unit, lo, False)}–{_value_text(name, unit, hi)}"


def sensitivity_figure_from_result(result: SensitivityResult, *, samples: int,
                                   assessment_samples: int | None = None) -> SensitivityFigure:
    """The figure of an analysis already run with ``samples`` cats per simulation."""
    sw = result.swings
    base = float(result.base_risk)
    risk_lo = np.array([s.risk_low for s in sw], dtype=float)
    risk_hi = np.array([s.risk_high for s in sw], dtype=float)
    if base > 0:
        low_pct = (risk_lo / base - 1.0) * 100.0
        high_pct = (risk_hi / base - 1.0) * 100.0
    else:  # nothing at risk: nothing moves
        low_pct = np.zeros(len(sw))
        high_pct = np.zeros(len(sw))
    return SensitivityFigure(
        parameters=tuple(s.parameter for s in sw),
        labels=tuple(PARAMETER_LABELS.get(s.parameter, s.parameter) for s in sw),
        units=tuple(s.unit for s in sw),
        low_value=np.array([s.low_value for s in sw], dtype=float),
        high_value=np.array([s.high_value for s in sw], dtype=float),
        low_pct=low_pct,
        high_pct=high_pct,
        swing_pct=high_pct - low_pct,
        range_text=tuple(_range_text(s.parameter, s.unit, s.low_value, s.high_value) for s in sw),
        low_text=tuple(_value_text(s.parameter, s.unit, s.low_value) for s in sw),
        high_text=tuple(_value_text(s.parameter, s.unit, s.high_value) for s in sw),
        opening_ids=tuple(result.opening_ids),
        base_risk=base,
        samples=int(samples),
        assessment_samples=int(assessment_samples if assessment_samples is not None
                               else samples),
    )


def sensitivity_figure(assessment: Assessment, *, max_samples: int | None = None,
                       cancelled: Callable[[], bool] | None = None) -> SensitivityFigure | None:
    """The swings of ``assessment``'s top risks (``None`` for a building without openings).

    Uses ``assessment.sensitivity`` when it is filled in; otherwise runs the analysis (two
    simulations of the top openings per parameter). With ``max_samples`` below the assessment's
    count, the analysis runs on a fresh assessment with ``max_samples`` cats of the same seed
    (faster; the figure says so). ``cancelled()`` true before the work starts returns ``None``.
    """
    from petfall_audit.sensitivity import sensitivity_analysis

    if not assessment.openings:
        return None
    n = int(assessment.samples)
    result = assessment.sensitivity
    if result is not None:
        return sensitivity_figure_from_result(result, samples=n, assessment_samples=n)
    if cancelled is not None and cancelled():
        return None
    base = assessment
    if max_samples is not None and 0 < max_samples < n:
        from petfall_audit.risk import assess

        base = assess(assessment.building, samples=int(max_samples), seed=assessment.seed,
                      thresholds=assessment.thresholds, stops=assessment.stops)
    return sensitivity_figure_from_result(sensitivity_analysis(base), samples=int(base.samples),
                                          assessment_samples=n)
