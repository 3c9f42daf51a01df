"""Small builders shared by the antenna tests (invented example arrays)."""
from __future__ import annotations

from lobeplan.antenna.layout import layout_positions_m
from lobeplan.antenna.model import GROUND_CLASSES, ArrayOption, ArraySpec, Feed, State
from lobeplan.antenna.mom import C0_M_S

FREQ_HZ = 7.1e6
WAVELENGTH_M = C0_M_S / FREQ_HZ
THIN_RADIUS_M = 5e-5 * WAVELENGTH_M  # the radius the issue quotes its MoM numbers at


def spec(ground="perfect", loss_ohm=0.0, height_m=None, radius_m=THIN_RADIUS_M, feed=Feed(), options=()):
    g = GROUND_CLASSES[ground] if isinstance(ground, str) else ground
    h = 0.25 * WAVELENGTH_M if height_m is None else height_m
    return ArraySpec(height_m=h, radius_m=radius_m, ground=g, ground_loss_ohm=loss_ohm, feed=feed,
                     options=tuple(options))


def option(layout, states, spacing_m=None, elements=None, custom_m=None, name="test"):
    pos = layout_positions_m(layout, spacing_m, elements, custom_m)
    return ArrayOption(name=name, layout=layout, spacing_m=spacing_m, positions_m=pos, states=tuple(states))


def forced(name, *phase_deg, amplitude=None):
    return State(name=name, phase_deg=tuple(float(p) for p in phase_deg),
                 amplitude=None if amplitude is None else tuple(amplitude))


def fed(name, *line_m):
    return State(name=name, line_m=tuple(float(x) for x in line_m))
