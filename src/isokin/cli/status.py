"""What a long command is doing: a status line on standard error, for a terminal only.

Nothing is shown in the first :data:`QUIET_FOR_S` of a command, nor when standard error is
not a terminal (logs, pipes and tests get the results and nothing else). A stage's count is
updated in place; the line is finished when the stage changes or other output follows.
"""

from __future__ import annotations

import sys
import time

#: A command quicker than this, s, shows no status at all.
QUIET_FOR_S = 1.0


class Status:
    """``status(stage)`` or ``status(stage, done, total)`` reports; :meth:`finish` ends the line."""

    def __init__(self, stream=None, clock=time.monotonic):
        self._stream, self._clock = stream, clock
        self.restart()

    def restart(self):
        """The command starts now (its first second is quiet)."""
        self._started, self._stage = self._clock(), None

    @property
    def stream(self):
        return self._stream or sys.stderr

    def __call__(self, stage: str, done=None, total=None):
        stream = self.stream
        if not _is_terminal(stream) or self._clock() - self._started < QUIET_FOR_S:
            return
        if self._stage is not None and stage != self._stage:
            stream.write("\n")
        text = stage if total is None else f"{stage}: {done} of {total}"
        stream.write(f"\r\x1b[Kisokin: {text}")
        stream.flush()
        self._stage = stage

    def finish(self):
        """End the status line, so that what is printed next starts on a line of its own."""
        if self._stage is not None:
            self.stream.write("\n")
            self.stream.flush()
            self._stage = None


def _is_terminal(stream) -> bool:
    try:
        return bool(stream.isatty())
    except (AttributeError, ValueError):
        return False


#: The status of the command being run (restarted as each command starts).
status = Status()
