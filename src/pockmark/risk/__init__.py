"""Risk integration: per-face expected impacts and penetrations, and probabilities."""

from pockmark.risk.probability import probability_of_no_penetration, sum_by_group

__all__ = ["probability_of_no_penetration", "sum_by_group"]
