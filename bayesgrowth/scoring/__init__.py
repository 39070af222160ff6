"""Pure scoring functions for probabilistic growth forecasts.

Array functions take numpy-compatible inputs with predictive draws on the
last axis and return numpy floats or arrays. Lower is better for CRPS, log
score, interval score and percentage error.
"""

from bayesgrowth.scoring.crps import crps_ensemble, crps_normal, crps_point, crps_t
from bayesgrowth.scoring.draws import draws_from_log_t
from bayesgrowth.scoring.intervals import (
    abs_pct_error,
    coverage,
    coverage_counts,
    coverage_interval,
    interval_score,
)
from bayesgrowth.scoring.logscore import kde_bandwidth, log_score, log_score_log_t, log_score_t
from bayesgrowth.scoring.pit import pit, pit_histogram, pit_log_t, pit_t, pit_uniformity
from bayesgrowth.scoring.table import ALL_STEPS, score_table
from bayesgrowth.scoring.verdict import (
    CALIBRATED,
    MIXED,
    TOO_FEW,
    TOO_NARROW,
    TOO_WIDE,
    calibration_verdict,
    combine_verdicts,
)

__all__ = [
    "ALL_STEPS",
    "CALIBRATED",
    "MIXED",
    "TOO_FEW",
    "TOO_NARROW",
    "TOO_WIDE",
    "abs_pct_error",
    "calibration_verdict",
    "combine_verdicts",
    "coverage",
    "coverage_counts",
    "coverage_interval",
    "crps_ensemble",
    "crps_normal",
    "crps_point",
    "crps_t",
    "draws_from_log_t",
    "interval_score",
    "kde_bandwidth",
    "log_score",
    "log_score_log_t",
    "log_score_t",
    "pit",
    "pit_histogram",
    "pit_log_t",
    "pit_t",
    "pit_uniformity",
    "score_table",
]
