"""fieldkit: an offline field assistant for fibre-optic crews."""

__version__ = "0.1.0"
