"""pockmark: probability of no penetration of a spacecraft by meteoroids and orbital debris."""

__version__ = "0.1.0"
