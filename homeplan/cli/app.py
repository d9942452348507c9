"""``homeplan open [FILE]``: the terminal application (``homeplan open RESULTS``: a portfolio's
results, read-only).

The plan is read and checked before Textual is imported, so a bad file is reported like every
other command (file:line:col, exit code 2) without starting the full-screen app. A FILE that does
not exist yet starts the guided new-plan form, which writes it.
"""

from __future__ import annotations

from pathlib import Path

from homeplan.cli.parser import EXIT_BAD_INPUT
from homeplan.cli.say import say
from homeplan.errors import InputError
from homeplan.portfolio.store import Store, store_path
from homeplan.tui.session import PlanSession

__all__ = ["cmd_open", "run", "run_portfolio"]


def _portfolio(path: str | None) -> Path | None:
    """The results store when ``path`` is a portfolio's results folder or its ``.sqlite`` file."""
    if path is None:
        return None
    p = Path(path)
    if p.suffix == ".sqlite" or p.is_dir():
        return store_path(p)
    return None


def run_portfolio(store: Path, light: bool | None = None) -> int:
    """Open a portfolio's results read-only; returns an exit code."""
    try:
        Store.open(store, readonly=True).close()
    except InputError as err:
        for problem in err.problems:
            say(problem, err=True)
        return EXIT_BAD_INPUT
    # textual (~0.3 s) is imported only once the results are known to be readable
    from homeplan.tui.portfolio import PortfolioApp

    app = PortfolioApp(store, light=light)
    result = app.run()
    return int(result or 0) if app.return_code in (None, 0) else int(app.return_code)


def run(path: str | None, light: bool | None = None, allow: tuple[str, ...] = (),
        use_store: bool = True) -> int:
    """Open ``path`` (or the new-plan form when it does not exist); returns an exit code.
    ``allow``: files outside the plan's folder the user lets it name (``--allow-outside``).
    ``use_store`` False (``--no-cache``) keeps nothing in the user's cache folder. A portfolio's
    results folder (or its ``.sqlite`` file) opens read-only."""
    store = _portfolio(path)
    if store is not None:
        return run_portfolio(store, light)
    session = None
    new_path = None
    if path is not None and Path(path).exists():
        try:
            session = PlanSession.open(path)
            for outside in allow:
                session.allow_outside(outside)
        except InputError as err:
            for problem in err.problems:
                say(problem, err=True)
            say(f"{len(err.problems)} problem(s) found; fix the file and open it again "
                "(`homeplan check FILE` lists them too).", err=True)
            return EXIT_BAD_INPUT
    else:
        new_path = path
    # textual (~0.3 s) is imported only once the file is known to be good
    from homeplan.tui.app import EnginePlanner, HomeplanApp

    app = HomeplanApp(session=session, new_path=new_path, light=light,
                      planner=EnginePlanner(use_store=use_store))
    result = app.run()
    return int(result or 0) if app.return_code in (None, 0) else int(app.return_code)


def cmd_open(args) -> int:
    """CLI entry: ``args.file`` (may not exist yet) and optional ``args.light``."""
    return run(getattr(args, "file", None), light=getattr(args, "light", None) or None,
               allow=tuple(getattr(args, "allow_outside", None) or ()),
               use_store=not getattr(args, "no_cache", False))
