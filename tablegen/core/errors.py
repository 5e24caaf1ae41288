"""The one exception family of tablegen.

Every user error raises a ``TablegenError`` whose text says what was wrong and
what is allowed; the command line prints it as one line and exits with status 2.
Anything else that escapes is a bug.

Raise the kind that says what went wrong, so an API caller can tell them apart:

====================  ==========================================================
kind                  raised when
====================  ==========================================================
``NameLookupError``   a substance, species, data set, key or option value is not known
``RangeError``        a number lies outside what is allowed (``DataRangeError``:
                      a temperature outside the data, where extrapolation may be asked)
``UnitError``         a unit is unknown, missing or does not fit the quantity
``InputError``        any other bad argument or typed text (also a ``ValueError``);
                      ``UsageError`` for command-line arguments
``SpecError``         a book spec or other structured input breaks a rule
``DataError``         a coefficient or reference file cannot be read or fails validation
``FitError``          a fit cannot be made or is not good enough
``OutputError``       a file cannot be written (``OutputExistsError``, ``OutputBusyError``)
====================  ==========================================================

A bare ``TablegenError`` is only for what fits none of these.
"""


class TablegenError(Exception):
    """A user-facing error: bad input, unknown name, out-of-range request."""

    exit_status = 2


class SpecError(TablegenError):
    """A table-book spec (or other structured input) breaks a rule."""


class DataError(TablegenError):
    """Coefficient data cannot be read or fails validation."""


class RangeError(TablegenError):
    """A temperature or value lies outside the range of the data."""


class DataRangeError(RangeError):
    """A temperature outside the data range, where extrapolation may be asked for.

    The way to ask depends on who asks: a Python caller passes
    ``extrapolate=True`` (the default text says so), a command its
    ``--extrapolate`` option, a book spec its ``extrapolate`` key.
    :meth:`offering` gives the same message naming the way the caller has, or
    none (then only the data range is allowed), so a message never names an
    option the command does not have.
    """

    def __init__(self, what: str, allowed: str, how: str | None = "extrapolate=True"):
        self.what, self.allowed, self.how = what, allowed, how
        text = f"{what}; allowed: {allowed}"
        if how:
            text += f", or opt in to extrapolation ({how}), which marks every extrapolated value"
        super().__init__(text)

    def offering(self, how: str | None) -> "DataRangeError":
        """The same refusal, naming ``how`` as the way to opt in (None: no way offered)."""
        return DataRangeError(self.what, self.allowed, how)


class UnitError(TablegenError):
    """A unit is unknown or does not fit the quantity."""


class NameLookupError(TablegenError):
    """A substance name resolves to nothing in the library."""


class OutputExistsError(TablegenError):
    """A file to be written exists and --force was not given."""


class OutputError(TablegenError):
    """The operating system refused a write: no space, read-only, no permission, bad path."""


class OutputBusyError(TablegenError):
    """Another tablegen run is writing the same output folder."""


class Interrupted(TablegenError):
    """A run stopped by Ctrl-C or a termination signal; the text says what was left."""

    def __init__(self, text: str, exit_status: int = 130):
        super().__init__(text)
        self.exit_status = exit_status


class InputError(TablegenError, ValueError):
    """A Python API argument of the wrong type, shape or value (also a ValueError)."""


class UsageError(InputError):
    """Command-line arguments that argparse refuses (the text names the command's --help)."""


class FitError(TablegenError):
    """A fit cannot be made or is not good enough; the text says why."""


class Terminated(BaseException):
    """Raised by the command line's SIGTERM/SIGHUP handler, so that clean-up runs."""

    def __init__(self, signum: int = 15):
        super().__init__(signum)
        self.exit_status = 128 + signum
