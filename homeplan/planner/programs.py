"""The incentive programs a plan lists: its own ``incentives:`` and the files named in
``incentive_files:``, parsed and checked.

Kept apart from :mod:`homeplan.planner.incentives` (what the programs pay, for the scheduler and
the roadmap) so that ``homeplan check`` reads and checks the programs without loading the
planner's numerical stages.
"""

from __future__ import annotations

from pathlib import Path

from homeplan.errors import InputError, PlanRuleError, Problem
from homeplan.money.incentives import IncentiveDataError, Program, parse_catalog
from homeplan.plan.files import INCENTIVES, PlanFolder, as_folder, decode_utf8
from homeplan.plan.model import Plan
from homeplan.plan.preflight import incentive_records, not_incentive_file
from homeplan.plan.text import clean
from homeplan.plan.yamlread import INCENTIVE_LIMITS, position, read_yaml

__all__ = ["load_programs", "read_incentive_file"]


def load_programs(plan: Plan, base_dir: PlanFolder | Path | None) -> tuple[Program, ...]:
    """Parse the plan's programs and its incentive files.

    A problem in the plan points at the plan's key (PlanRuleError); a problem inside an incentive
    file is reported at its own line and column in that file (InputError). Files are read the one
    safe way (:class:`homeplan.plan.files.PlanFolder`): inside the plan's folder unless allowed.
    """
    programs: list[Program] = []
    if plan.incentives:
        try:
            programs.extend(parse_catalog(list(plan.incentives)))
        except IncentiveDataError as exc:
            loc = ("incentives", *(exc.keys or ()))
            raise PlanRuleError(loc, str(exc), "see docs/plan-format.md#incentives") from None
        except (ValueError, TypeError) as exc:  # e.g. a date like 2027-02-30
            raise PlanRuleError(("incentives",), f"an incentive program has a bad value: {clean(exc)[:120]}",
                                "check the dates (YYYY-MM-DD) and numbers of the programs") from None
    folder = as_folder(base_dir)
    for i, name in enumerate(plan.incentive_files):
        programs.extend(read_incentive_file(folder, name, ("incentive_files", i)))
    seen: set[str] = set()
    for p in programs:
        if p.id in seen:
            raise PlanRuleError(("incentives",), f"two incentive programs share the id '{p.id}'",
                                "give each program its own id")
        seen.add(p.id)
    return tuple(programs)


def read_incentive_file(folder: PlanFolder, name: str, loc: tuple) -> tuple[Program, ...]:
    """The programs of one incentive file the plan names at ``loc``."""
    path, data = folder.read(name, loc, INCENTIVES)
    text = decode_utf8(data, name, INCENTIVES)
    doc = read_yaml(text, name, INCENTIVE_LIMITS)
    if incentive_records(doc) is None:
        raise not_incentive_file(loc, name)
    try:
        return parse_catalog(doc)
    except IncentiveDataError as exc:
        top = ("programs",) if isinstance(doc, dict) else ()
        line, col = position(doc, (*top, *exc.keys))
        raise InputError(Problem(name, line, col, clean(exc.problem),
                                 f"{clean(exc.fix)}; in program '{clean(exc.program_id)}' of the "
                                 f"incentive file {path.name}")) from None
    except (ValueError, TypeError) as exc:
        raise PlanRuleError(loc, f"{name}: a program has a value that cannot be used: {clean(exc)[:120]}",
                            "check the file's dates (YYYY-MM-DD) and numbers") from None
