"""Battery arithmetic against its published sources (speccheck/formulas/battery.py)."""

from __future__ import annotations

import pytest

from speccheck.formulas import battery


def test_nominal_cell_voltages_are_the_standards():
    # IEC 60086-1: zinc-manganese dioxide (alkaline, zinc-carbon) and lithium-iron disulphide 1.5 V
    assert battery.CHEMISTRY["alkaline"].nominal == 1.5
    assert battery.CHEMISTRY["carbon-zinc"].nominal == 1.5
    # IEC 61951-2 / 61951-1: nickel-metal hydride and nickel-cadmium 1.2 V
    assert battery.CHEMISTRY["nimh"].nominal == 1.2 and battery.CHEMISTRY["nicd"].nominal == 1.2
    # IEC 60896: lead-acid 2.0 V per cell
    assert battery.CHEMISTRY["lead-acid"].nominal == 2.0
    # a 9 V block (IEC 60086-2 6LR61 class) is six 1.5 V cells: 6 x 1.5 = 9 V
    assert battery.pack(battery.CHEMISTRY["alkaline"].nominal, 6) == pytest.approx(9.0)


def test_every_end_voltage_lies_below_the_nominal_and_the_fresh_above():
    for name, chem in battery.CHEMISTRY.items():
        assert chem.end < chem.nominal <= chem.fresh, name
        assert chem.peukert >= 1.0, name


def test_loaded_voltage_is_a_source_with_series_resistance():
    # Thevenin: 9.6 V open-circuit, 1.5 ohm inside, 200 mA -> 9.6 - 0.2 x 1.5 = 9.3 V (Ohm's law)
    assert battery.loaded_voltage(9.6, 0.2, 1.5) == pytest.approx(9.3)


def test_running_time_without_a_rating_is_capacity_over_current():
    # t = C / I: 2.5 Ah at 0.5 A lasts 5 h (definition of the ampere-hour)
    assert battery.running_hours(2.5, 0.5) == pytest.approx(5.0)


def test_peukert_law_as_written_in_the_handbook():
    # Peukert's law t = H (C / (I H))^k (Linden's Handbook of Batteries): a 100 Ah battery rated at the
    # 20 h rate (5 A), k = 1.2, discharged at 10 A: t = 20 x (100 / 200)^1.2 = 20 x 0.5^1.2 = 8.7055 h
    assert battery.running_hours(100.0, 10.0, 5.0, 1.2) == pytest.approx(20 * 0.5 ** 1.2)
    assert battery.running_hours(100.0, 10.0, 5.0, 1.2) == pytest.approx(8.7055, abs=1e-3)
    # at the rated current the law gives back H: 100 Ah at 5 A -> 20 h whatever k is
    assert battery.running_hours(100.0, 5.0, 5.0, 1.3) == pytest.approx(20.0)
