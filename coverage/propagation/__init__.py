"""Hop geometry, MUF, climatology and takeoff-angle needs.

The planner's entry points live in :mod:`lobeplan.propagation.needs`
(``prepare_goal``, ``band_needs``); they are not re-exported here so that
loading a site file (which imports ``propagation.model``) stays light.
"""
__all__: list[str] = []
