"""Rendering: HTML site, PDF package, formulas and plots. Rendering never computes."""
