"""Keep what C libraries print off the commands' standard output.

HiGHS 1.12 prints a line of its own debugging with C ``printf`` in a rare search path
("HighsMipSolverData::transformNewIntegerFeasibleSolution tmpSolver.run();"), whatever its
``output_flag``. On the terminal it is noise; in ``homeplan plan --json > plan.json`` it breaks
the JSON. While a command runs, file descriptor 1 (where C's ``stdout`` writes) points at
the null device and Python's ``sys.stdout`` writes to a duplicate of the real standard output,
so everything homeplan prints arrives as before (``sys.__stdout__`` too, from which the
terminal's size is read). The app is unaffected: Textual draws on standard error.
"""

from __future__ import annotations

import contextlib
import os
import sys
from collections.abc import Iterator

__all__ = ["c_output_aside"]


@contextlib.contextmanager
def c_output_aside() -> Iterator[None]:
    """Point file descriptor 1 at the null device for the duration, with ``sys.stdout`` on a
    duplicate of it. Does nothing when ``sys.stdout`` is not file descriptor 1 (a test's
    capture, an embedding program's own stream)."""
    try:
        real = sys.stdout.fileno() == 1
    except (AttributeError, OSError, ValueError):
        real = False
    if not real:
        yield
        return
    sys.stdout.flush()
    saved = os.dup(1)
    null = os.open(os.devnull, os.O_WRONLY)
    os.dup2(null, 1)
    os.close(null)
    old, old_original = sys.stdout, sys.__stdout__
    new = os.fdopen(os.dup(saved), "w", encoding=old.encoding, errors=old.errors,
                    newline=None, buffering=-1 if not old.line_buffering else 1)
    sys.stdout = new
    if old_original is old:  # the terminal's size is read from it (shutil.get_terminal_size)
        sys.__stdout__ = new
    try:
        yield
    finally:
        with contextlib.suppress(OSError, ValueError):
            new.flush()  # a closed pipe is the caller's to report
        with contextlib.suppress(OSError, ValueError):
            new.close()
        sys.stdout, sys.__stdout__ = old, old_original
        os.dup2(saved, 1)
        os.close(saved)
