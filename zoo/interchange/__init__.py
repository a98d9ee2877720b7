"""Nets in and out of zoo: PNML, the net text format, DOT, JSON, and identifying foreign nets."""
