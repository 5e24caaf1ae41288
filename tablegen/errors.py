"""The one exception family of tablegen.

Every user error raises a ``TablegenError`` whose text says what was wrong and
what is allowed; the command line prints it as one line and exits with status 2.
Anything else that escapes is a bug.
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


class Terminated(BaseException):
    """Raised by the command line's SIGTERM/SIGHUP handler, so that clean-up runs."""

    def __init__(self, signum: int = 15):
        super().__init__(signum)
        self.exit_status = 128 + signum
