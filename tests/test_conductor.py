"""Skin-effect resistance of copper wire against handbook values."""
import math

import pytest

from lobeplan.antenna.conductor import wire_resistance_ohm_per_m


def test_skin_depth_figure_of_copper():
    # Skin depth of copper is 66 um / sqrt(f / 1 MHz) (common practice; 20.9 um
    # at 10 MHz). R' = 1 / (sigma 2 pi a delta) must agree with that depth to 1 %.
    a = 1e-3
    r = wire_resistance_ohm_per_m(10e6, a)
    delta = 1.0 / (5.8e7 * 2 * math.pi * a * r)
    assert delta == pytest.approx(66e-6 / math.sqrt(10.0), rel=0.01)


def test_dc_floor_of_a_thin_wire():
    # At 50 Hz a 0.1 mm wire is thinner than the skin depth (9 mm): the DC value
    # 1/(sigma pi a^2) holds, 0.549 ohm/m for copper of that radius (arithmetic).
    assert wire_resistance_ohm_per_m(50.0, 1e-4) == pytest.approx(1 / (5.8e7 * math.pi * 1e-8), rel=1e-9)


def test_scales_with_root_frequency():
    # Skin-effect loss grows as sqrt(f) (common practice).
    assert wire_resistance_ohm_per_m(28e6, 1e-3) / wire_resistance_ohm_per_m(7e6, 1e-3) == pytest.approx(2.0, rel=1e-9)
