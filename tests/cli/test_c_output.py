"""What a C library prints with printf stays off a command's standard output.

HiGHS 1.12 prints a debugging line with C ``printf`` in a rare search path, whatever its output
option; ``homeplan plan --json > plan.json`` must still be JSON. The C library's own ``printf``
(through ctypes) stands in for HiGHS, in a child process so that the file descriptors are real.
"""

from __future__ import annotations

import json
import os
import subprocess
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]

CHILD = r"""
import ctypes, sys
from homeplan.cli.c_output import c_output_aside
libc = ctypes.CDLL(None)
with c_output_aside():
    print("from python, inside")
    libc.printf(b"from C, inside\n")
    libc.fflush(None)
print("from python, after")
sys.stdout.flush()
libc.printf(b"from C, after\n")
libc.fflush(None)
"""


def test_c_printf_is_kept_off_stdout_while_a_command_runs() -> None:
    out = subprocess.run([sys.executable, "-c", CHILD], capture_output=True, text=True, cwd=ROOT,
                         check=True).stdout
    assert out.splitlines() == ["from python, inside", "from python, after", "from C, after"]


def test_plan_json_on_stdout_is_whole_json() -> None:
    out = subprocess.run([sys.executable, "-m", "homeplan.cli", "plan", "--json",
                          str(ROOT / "sample_homes" / "minimal.yaml")],
                         capture_output=True, text=True, cwd=ROOT, check=True).stdout
    assert json.loads(out)["schema_version"]


def test_nothing_changes_under_a_capture_without_a_file_descriptor(capsys) -> None:
    from homeplan.cli.c_output import c_output_aside

    with c_output_aside():
        print("captured")
    assert capsys.readouterr().out == "captured\n"


SIZE_CHILD = r"""
import fcntl, os, shutil, struct, sys, termios
from homeplan.cli.c_output import c_output_aside
fcntl.ioctl(0, termios.TIOCSWINSZ, struct.pack("HHHH", 30, 100, 0, 0))  # a 100 x 30 terminal
before = shutil.get_terminal_size((1, 1))
with c_output_aside():
    inside = shutil.get_terminal_size((1, 1))
print(before == inside, inside)
"""


def test_the_terminal_size_is_still_read_inside() -> None:
    """The app sizes itself from standard output's terminal (shutil.get_terminal_size, Python
    standard library): inside, it reads the same size as outside. A pseudo-terminal stands in
    for the user's terminal."""
    import pty

    pid, fd = pty.fork()
    if pid == 0:  # the child: its standard streams are the pseudo-terminal
        env = {k: v for k, v in os.environ.items() if k not in ("COLUMNS", "LINES")}  # the size
        os.execve(sys.executable, [sys.executable, "-c", SIZE_CHILD], env)  # from the terminal
    out = b""
    while True:
        try:
            chunk = os.read(fd, 1024)
        except OSError:
            break
        if not chunk:
            break
        out += chunk
    os.waitpid(pid, 0)
    assert out.decode().split()[0] == "True" and "columns=100, lines=30" in out.decode(), out
