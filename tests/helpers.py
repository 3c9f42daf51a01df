"""Shared test material."""

MINIMAL = """
[station]
lat = 45.0
lon = -93.0
[array]
height_m = 10.0
layout = "pair"
spacing_m = 10.5
[[array.state]]
name = "fwd"
phase_deg = [0, -90]
[[band]]
name = "40 m"
freq_mhz = 7.1
[[goal]]
region = "continent:Europe"
"""
