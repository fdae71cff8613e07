"""Errors that carry a message meant for the person at the keyboard.

Every error raised for bad input says what was wrong and what to do about it.
Front ends print ``str(error)`` and (for the CLI) exit with code 2.
"""


class RobtuiError(Exception):
    """Base class: an error whose message is fit to show a user as it is."""


class InputError(RobtuiError):
    """Bad input from a user: a wrong answer code, an unknown question, a bad argument."""


class DataFileError(RobtuiError):
    """A file on disk could not be read or understood (path and problem in the message)."""


class NewerSchemaError(DataFileError):
    """A file was written by a newer robtui than this one."""


class ReadingError(RobtuiError):
    """A report file could not be turned into a document (named file, named problem)."""


class ReaderBugError(ReadingError):
    """Reading failed because of a bug in robtui's own code, not because of the file."""


class ModelFileError(RobtuiError):
    """The evidence ranker's weights are missing or damaged."""
