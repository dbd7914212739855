"""The error a user sees: one line naming the file, the key, what is wrong and what is right."""


class InputError(Exception):
    """Bad input from the user: shown as one line, exit code 2."""

    def __init__(self, source, key, problem):
        where = f"{source}: " if source else ""
        at = f"{key}: " if key else ""
        super().__init__(f"{where}{at}{problem}")
