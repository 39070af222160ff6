import pytest
from scipy import stats

from bayesgrowth.scoring.verdict import calibration_verdict, combine_verdicts


def test_clear_cases():
    assert calibration_verdict(80, 100, 0.8) == "calibrated"
    assert calibration_verdict(50, 100, 0.8) == "bands too narrow"
    assert calibration_verdict(100, 100, 0.5) == "bands too wide"
    assert calibration_verdict(1, 5, 0.8) == "too few outcomes"
    assert calibration_verdict(9, 9, 0.5, min_n=10) == "too few outcomes"


def test_verdict_switches_at_clopper_pearson_limit():
    # Clopper-Pearson upper limit for 70/100 at 95%: beta.ppf(0.975, 71, 30)
    # (Clopper & Pearson 1934, Biometrika 26:404-413), computed here with scipy.
    high = stats.beta.ppf(0.975, 71, 30)
    assert calibration_verdict(70, 100, high - 1e-6) == "calibrated"
    assert calibration_verdict(70, 100, high + 1e-6) == "bands too narrow"
    low = stats.beta.ppf(0.025, 70, 31)
    assert calibration_verdict(70, 100, low + 1e-6) == "calibrated"
    assert calibration_verdict(70, 100, low - 1e-6) == "bands too wide"


def test_nominal_must_be_fraction():
    with pytest.raises(ValueError, match="0.8 for an 80% band"):
        calibration_verdict(80, 100, 80)


@pytest.mark.parametrize(
    ("verdicts", "expected"),
    [
        (["calibrated", "calibrated"], "calibrated"),
        (["calibrated", "bands too narrow", "bands too narrow"], "bands too narrow"),
        (["bands too wide", "calibrated"], "bands too wide"),
        (["bands too wide", "bands too narrow"], "mixed"),
        (["too few outcomes", "bands too narrow"], "bands too narrow"),
        (["too few outcomes"], "too few outcomes"),
        ([], "too few outcomes"),
    ],
)
def test_combine(verdicts, expected):
    assert combine_verdicts(verdicts) == expected


def test_combine_rejects_unknown():
    with pytest.raises(ValueError, match="unknown verdict"):
        combine_verdicts(["fine"])
