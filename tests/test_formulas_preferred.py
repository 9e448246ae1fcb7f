"""Preferred values: IEC 60063 E12/E24 as published (2.7 and 3.3, not the rounded powers
2.61 and 3.16) and the R10 fuse ratings of IEC 60127-1 Annex A (3.15 and 6.3)."""

from __future__ import annotations

import math

import pytest

from speccheck.formulas import preferred


def test_series_as_published():
    assert preferred.E12 == (1.0, 1.2, 1.5, 1.8, 2.2, 2.7, 3.3, 3.9, 4.7, 5.6, 6.8, 8.2)
    assert len(preferred.E24) == 24 and 9.1 in preferred.E24 and 3.0 in preferred.E24
    assert preferred.R10 == (1.0, 1.25, 1.6, 2.0, 2.5, 3.15, 4.0, 5.0, 6.3, 8.0)


def test_nearest_on_a_log_scale():
    assert preferred.nearest_preferred(4.5e-9, preferred.E12) == pytest.approx((4.7e-9, 4.7 / 4.5 - 1))
    # 2.45 lies between 2.2 and 2.7: log distance to 2.2 is 0.1076, to 2.7 0.0972 -> 2.7
    assert preferred.nearest_preferred(2.45, preferred.E12)[0] == pytest.approx(2.7)
    assert preferred.nearest_preferred(9.6, preferred.E12)[0] == pytest.approx(10.0)  # next decade
    assert preferred.nearest_preferred(1.04, preferred.E24)[0] == pytest.approx(1.0)
    with pytest.raises(ValueError):
        preferred.nearest_preferred(0.0)


def test_r10_up_just_at_and_just_above_a_step():
    assert preferred.r10_up(3.15) == pytest.approx(3.15)
    assert preferred.r10_up(3.16) == pytest.approx(4.0)
    assert preferred.r10_up(0.0801) == pytest.approx(0.1)
    assert preferred.r10_up(12.0) == pytest.approx(12.5)
    with pytest.raises(ValueError):
        preferred.r10_up(0.0)


@pytest.mark.parametrize("bad", [0.0, -1.0, math.inf, math.nan])
def test_r10_up_refuses_what_is_not_a_current(bad):
    with pytest.raises(ValueError, match="a rating must be a positive number"):
        preferred.r10_up(bad)


def test_r10_up_crosses_decades():
    assert preferred.r10_up(0.99) == pytest.approx(1.0)
    assert preferred.r10_up(8.5) == pytest.approx(10.0)


def test_decade_values():
    assert preferred.decade_values(-9, preferred.E12)[5] == pytest.approx(2.7e-9)
    assert len(preferred.decade_values(3, preferred.E24)) == 24
