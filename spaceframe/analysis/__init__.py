"""Analyses of a frame: equilibrium matrix, rank and null spaces, audit."""
