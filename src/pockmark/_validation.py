"""Coercion and checks of array inputs at the library's public boundary."""

import numpy as np

from pockmark.errors import InputError


def as_float_array(name, value, shape=None):
    """Return ``value`` as a C-contiguous float64 array, checking shape and finiteness.

    ``shape`` is a tuple in which ``None`` matches any length, e.g. ``(None, 3)``.
    """
    array = np.ascontiguousarray(value, dtype=np.float64)
    if shape is not None:
        if array.ndim != len(shape) or any(
            want is not None and got != want for got, want in zip(array.shape, shape)
        ):
            wanted = "(" + ", ".join("n" if s is None else str(s) for s in shape) + ")"
            raise InputError(f"{name} must have shape {wanted}; got {array.shape}")
    if not np.all(np.isfinite(array)):
        index = int(np.flatnonzero(~np.isfinite(array.ravel()))[0])
        raise InputError(f"{name} must be finite; got {array.ravel()[index]} at flat index {index}")
    return array


def require_positive(name, value, unit=""):
    """Raise :class:`InputError` unless every element of ``value`` is finite and > 0."""
    array = np.asarray(value, dtype=np.float64)
    bad = ~(np.isfinite(array) & (array > 0))
    if np.any(bad):
        index = int(np.flatnonzero(bad.ravel())[0])
        suffix = f" [{unit}]" if unit else ""
        raise InputError(
            f"{name} must be positive and finite{suffix}; got {array.ravel()[index]:g}"
            + (f" at index {index}" if array.ndim else "")
        )
    return array


def require_nonnegative(name, value, unit=""):
    """Raise :class:`InputError` unless every element of ``value`` is finite and ≥ 0."""
    array = np.asarray(value, dtype=np.float64)
    bad = ~(np.isfinite(array) & (array >= 0))
    if np.any(bad):
        index = int(np.flatnonzero(bad.ravel())[0])
        suffix = f" [{unit}]" if unit else ""
        raise InputError(
            f"{name} must be zero or positive and finite{suffix}; got {array.ravel()[index]:g}"
            + (f" at index {index}" if array.ndim else "")
        )
    return array
