"""The one exception type the command line turns into a single ``error:`` line (exit 2)."""


class InputError(Exception):
    """Bad input from a person or a file.

    The message names the file, row/column or JSON path and the likely cause.
    The command line prints ``error: <message>`` on stderr and exits with code 2.
    """
