"""Necessary bandwidth and designators: Carson B = 2·(Δf + f_m); ITU-R SM.1138 Annex: FM
Bn = 2M + 2DK (K = 1), AM Bn = 2M, SSB Bn = M; Radio Regulations Appendix 1 bandwidth codes
(2.4 kHz -> 2K40, 12.5 kHz -> 12K5, 180.5 kHz -> 181K, 16 kHz NBFM -> 16K0F3E)."""

from __future__ import annotations

import pytest

from speccheck.formulas import bandwidth


def test_carson_and_sm1138():
    assert bandwidth.carson_bandwidth(5e3, 3e3) == pytest.approx(16e3)
    assert bandwidth.necessary_bandwidth("fm", 5e3, 3e3) == pytest.approx(16e3)
    assert bandwidth.necessary_bandwidth("fm", 5e3, 3e3, k=0.5) == pytest.approx(11e3)
    assert bandwidth.necessary_bandwidth("am", None, 3e3) == pytest.approx(6e3)
    assert bandwidth.necessary_bandwidth("ssb", None, 3e3) == pytest.approx(3e3)
    assert bandwidth.necessary_bandwidth("fm", None, 3e3) is None
    assert bandwidth.necessary_bandwidth("cw", None, 3e3) is None
    assert bandwidth.necessary_bandwidth("fm", 5e3, None) is None


@pytest.mark.parametrize("hz, code", [
    (2.4e3, "2K40"), (12.5e3, "12K5"), (180.5e3, "181K"), (16e3, "16K0"), (0.1, "H100"),
    (1.0, "1H00"), (999.0, "999H"), (1e6, "1M00"), (6.25e6, "6M25"), (1.5e9, "1G50"),
    # the rounding edges: three significant figures, halves up (RR Appendix 1 as read from memory)
    (0.9996, "1H00"), (1.5, "1H50"), (0.0125, "H013"), (0.5, "H500"), (0.0004, "H001"),
    (1.005e6, "1M01"), (1.005e9, "1G01"), (999.5e3, "1M00"),
])
def test_bandwidth_codes(hz, code):
    assert bandwidth.bandwidth_code(hz) == code


def test_designators_and_their_limits():
    assert bandwidth.emission_designator(16e3, "fm") == "16K0F3E"
    assert bandwidth.emission_designator(16e3, "fm", "data") == "16K0F2D"
    assert bandwidth.emission_designator(6e3, "am") == "6K00A3E"
    assert bandwidth.emission_designator(3e3, "ssb") == "3K00J3E"
    assert bandwidth.emission_designator(100.0, "cw") == "100HA1A"
    assert bandwidth.emission_designator(16e3, "pm") is None
    assert bandwidth.emission_designator(2e12, "fm") is None  # beyond 999 GHz: no spelling
    with pytest.raises(ValueError, match="a bandwidth must be a positive number"):
        bandwidth.bandwidth_code(0.0)
    with pytest.raises(ValueError, match="a bandwidth above 999 GHz has no designator"):
        bandwidth.bandwidth_code(1e12)
