"""Views of one :class:`~homeplan.result.PlanResult` for people and other programs.

- ``view``: the printed summary as plain data (cleaned strings, small tables); no physics.
- ``text``: plain text for the terminal and ``.txt``; Markdown for ``.md``.
- ``html`` + ``svg``: one self-contained printable page with an inline SVG timeline.
- ``csvout``, ``ics``, ``jsonout``: exports (CSV, iCalendar, JSON).
- ``commands``: the ``print``, ``export`` and ``diff`` CLI commands.
- ``table``: aligned text tables and household money formatting used across the CLI.
"""
