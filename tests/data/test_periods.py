import pytest

from bayesgrowth.data.periods import PeriodError, parse_periods


@pytest.mark.parametrize(
    ("labels", "style", "t", "future"),
    [
        (["2024Q1", "2024Q2", "2024Q4"], "quarter", [0, 1, 3], "2025Q1"),
        (["2024-Q3", "2024-Q4", "2025-Q1"], "quarter", [0, 1, 2], "2025Q2"),
        (["2024 q4", "2025 q1", "2025 q2"], "quarter", [0, 1, 2], "2025Q3"),
        (["2024-11", "2024-12", "2025-01"], "month", [0, 1, 2], "2025-02"),
        (["2019", "2020", "2021"], "year", [0, 1, 2], "2022"),
        (["1", "2", "5"], "integer", [0, 1, 4], "6"),
        (["2024-03-31", "2024-06-30", "2024-09-30"], "date", [0, 1, 2], "2024-12-31"),
        (["2024-01-15", "2024-02-15", "2024-03-15"], "date", [0, 1, 2], "2024-04-15"),
        (["2021-12-31", "2022-12-31", "2023-12-31"], "date", [0, 1, 2], "2024-12-31"),
    ],
)
def test_styles_and_calendar_continuation(labels, style, t, future):
    axis, ts = parse_periods(labels)
    assert axis.style == style
    assert ts == t
    assert axis.label(max(ts) + 1) == future


def test_unsorted_labels_get_their_true_index():
    axis, ts = parse_periods(["2024Q3", "2024Q1", "2024Q2"])
    assert ts == [2, 0, 1]
    assert axis.label(0) == "2024Q1"


def test_quarterly_dates_are_quarterly():
    axis, _ = parse_periods(["2024-03-31", "2024-06-30", "2024-12-31"])
    assert axis.step == 3
    assert axis.frequency == "quarterly"
    assert axis.periods_per_year == 4


def test_mixed_styles_name_the_position():
    with pytest.raises(PeriodError) as err:
        parse_periods(["2024Q1", "2024Q2", "2024-07"])
    assert err.value.position == 2
    assert "one frequency" in str(err.value)


def test_unreadable_label():
    with pytest.raises(PeriodError) as err:
        parse_periods(["2024Q1", "spring", "2024Q3"])
    assert err.value.position == 1


def test_bad_month_number():
    with pytest.raises(PeriodError, match="between 1 and 12"):
        parse_periods(["2024-11", "2024-13", "2025-01"])
