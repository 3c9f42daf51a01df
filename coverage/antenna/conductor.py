"""Resistance of round copper wire at radio frequency (skin effect).

At HF the current in a round wire of radius a flows in a skin of depth
delta = 1 / sqrt(pi f mu0 sigma) (about 21 um in copper at 10 MHz), far
thinner than any practical radial wire, so the resistance per metre is the
surface resistance R_s = sqrt(pi f mu0 / sigma) spread over the
circumference: R' = R_s / (2 pi a). Below the frequency where delta reaches
the radius the direct-current value 1 / (sigma pi a^2) is the floor.

References
----------
S. Ramo, J. R. Whinnery and T. Van Duzer, *Fields and Waves in
Communication Electronics*, 3rd ed., sec. 5.6 (skin effect in a round wire,
from memory). Conductivity of annealed copper: the International Annealed
Copper Standard, 5.8e7 S/m (IEC 60028).
"""
from __future__ import annotations

import math

__all__ = ["COPPER_S_M", "wire_resistance_ohm_per_m"]

COPPER_S_M = 5.8e7
"""Conductivity of annealed copper (IACS, IEC 60028), S/m."""

_MU0_H_M = 4e-7 * math.pi


def wire_resistance_ohm_per_m(freq_hz: float, wire_radius_m: float, sigma_s_m: float = COPPER_S_M) -> float:
    """Resistance per metre of a round wire, skin effect included.

    Parameters
    ----------
    freq_hz : float
    wire_radius_m : float
    sigma_s_m : float
        Conductivity, default annealed copper.

    Returns
    -------
    float
        Ohm per metre: R_s / (2 pi a) with R_s = sqrt(pi f mu0 / sigma), never
        below the direct-current value.
    """
    if not (freq_hz > 0 and wire_radius_m > 0 and sigma_s_m > 0):
        raise ValueError("freq_hz, wire_radius_m and sigma_s_m must be positive")
    r_s = math.sqrt(math.pi * freq_hz * _MU0_H_M / sigma_s_m)
    r_ac = r_s / (2.0 * math.pi * wire_radius_m)
    r_dc = 1.0 / (sigma_s_m * math.pi * wire_radius_m ** 2)
    return max(r_ac, r_dc)
