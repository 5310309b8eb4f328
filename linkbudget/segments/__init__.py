"""Segment kinds: each turns its validated spec into arrays over the wavelength axis."""
