"""Exception and warning hierarchy of pockmark.

Every error that a user can cause derives from :class:`PockmarkError` and also from the
matching builtin, so callers may catch either. The command line turns a ``PockmarkError``
into one line on stderr and exit code 1.
"""


class PockmarkError(Exception):
    """Root of every error pockmark raises on purpose."""


class InputError(PockmarkError, ValueError):
    """A value passed to the library is outside its physical domain or has the wrong shape."""


class MeshError(PockmarkError, ValueError):
    """A mesh file is unreadable, empty or geometrically unusable."""


class FormatError(PockmarkError, OSError):
    """A file is missing, is not a file, or is not in the expected format."""


class ConfigError(PockmarkError, ValueError):
    """A case file is invalid; the message names the file, the key and the line."""


class ModelRangeWarning(UserWarning):
    """An input lies inside the physical domain but outside a model's fitted or stated range."""
