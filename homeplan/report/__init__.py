"""Views of a result: the printed summary (``view`` builds it in words; ``text``, ``html`` and
``svg`` lay it out), the exports (``csvout``, ``ics``, ``jsonout``) and what changed between two
plans (``diff``). Nothing here computes physics or money: every figure comes from the
:class:`~homeplan.result.PlanResult`.
"""

__all__: list[str] = []
