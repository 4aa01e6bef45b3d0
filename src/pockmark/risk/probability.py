"""Poisson probability of no penetration and aggregation of per-face counts."""

import numpy as np


def probability_of_no_penetration(expected_penetrations):
    """PNP = exp(−N) for a Poisson count with mean N [unitless]."""
    return np.exp(-np.asarray(expected_penetrations, dtype=np.float64))


def sum_by_group(values, groups, n_groups):
    """Sum per-face ``values`` (m,) into ``n_groups`` bins given by integer ``groups`` (m,)."""
    return np.bincount(groups, weights=values, minlength=n_groups)
