"""The exceptions of patternproof: one class per kind of failure.

Every message is the one the command line prints after
``patternproof: error:`` (what is wrong, where, and a line starting
``what to do:``). Catch :class:`Error` for all of them; the classes for bad
input and bad settings are also ``ValueError``\\ s.

>>> import patternproof
>>> try:
...     patternproof.recheck("64")
... except patternproof.SettingError as e:
...     print(str(e).splitlines()[0])
nothing to recheck: only n was given
"""

__all__ = [
    "Error",
    "InputError",
    "SettingError",
    "TooFewPointsError",
    "NoTestableWindowError",
    "ProtocolError",
    "SitesError",
    "InputGoneError",
    "NotFiniteError",
    "StoppedError",
    "InternalError",
]


class Error(Exception):
    """Base class of every patternproof failure."""


class InputError(Error, ValueError):
    """An input file could not be read or makes no sense (the CLI's exit code 2)."""


class SettingError(Error, ValueError):
    """An option or an in-memory input that cannot be used (a bad alpha, coords left to guess)."""


class TooFewPointsError(Error):
    """Fewer points than the statistic needs."""


class NoTestableWindowError(Error):
    """Every window was skipped, so nothing could be tested."""


class ProtocolError(Error):
    """A protocol file that was changed after it was written, or is not one."""


class SitesError(Error):
    """The sites and their boundaries do not fit together."""


class InputGoneError(Error, OSError):
    """An input file could not be read again for its checksum."""


class NotFiniteError(Error, ValueError):
    """A coordinate that is not a finite number (NaN or infinite)."""


class StoppedError(Error):
    """The run was asked to stop before it finished (Ctrl-C itself raises
    KeyboardInterrupt, as everywhere in Python)."""


class InternalError(Error):
    """Something that should not happen: a bug in patternproof."""
