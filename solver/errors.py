"""One exception family for everything the solver and file layer refuse.

Every message names the offending value and says what to do about it.
"""


class SlacklineError(ValueError):
    """Base of every error Slackline raises on purpose; its message is one bounded line."""

    def __init__(self, message="", *args):
        from solver.messages import one_line
        super().__init__(one_line(message), *args)


class InputError(SlacklineError):
    """Points, labels or settings that cannot be fitted as given."""


class NotSeparableError(SlacklineError):
    """A hard margin was asked for, but no boundary separates the classes."""


class ConvergenceError(SlacklineError):
    """The interior-point solver stopped before reaching its tolerance.

    ``best`` holds the FitResult built from the last iterate, so callers can
    still show its figures (marked as not converged).
    """

    def __init__(self, message, best=None):
        super().__init__(message)
        self.best = best


class FileFormatError(SlacklineError):
    """A data or experiment file that cannot be read; lists every problem."""

    def __init__(self, message, problems=()):
        from solver.messages import one_line
        super().__init__(message)
        self.problems = [one_line(p) for p in problems]
