"""The sources panel ('w') on every view: each figure with its value and where it comes from,
formatted (no ids, file-format keys or Python values)."""

from __future__ import annotations

import re

from homeplan.report.fmt import money
from homeplan.tui.screens.forms import TextScreen

from .conftest import make_app, settle

FORBIDDEN = re.compile(r"\b[a-z]+_[a-z0-9_]+\b|\bTrue\b|\bFalse\b|\bNone\b|\bnan\b|[{}\[\]]"
                       r"|from memory|common practice")


async def test_sources_panel_on_every_view(plan_file):
    app = make_app(plan_file)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        texts = {}
        for key in "1234567":
            await pilot.press(key, "w")
            await pilot.pause()
            screen = app.screen
            assert isinstance(screen, TextScreen)
            texts[key] = str(screen.body)
            await pilot.press("escape")
            await pilot.pause()
        for key, text in texts.items():
            # the planner's notes may name a key to add to the file (a how-to, not a figure)
            rest = re.sub(r"\S+\.ya?ml\b", "", text.split("Notes from the planner:")[0])
            assert not FORBIDDEN.search(rest), (key, FORBIDDEN.search(rest))
            assert "from your plan file" in text  # every view names where its inputs come from
        first = app.result.roadmap.steps[0]
        # Next: the first year's steps with the values the view shows and their sources
        assert f"You pay: {money(first.net_cost_usd)}" in texts["1"]
        assert "computed: the price less the incentives" in texts["1"]
        year = app.result.roadmap.years[0]
        assert f"Bills: {money(year.total_bills_usd)}" in texts["4"]
        assert "Pays in this roadmap" in texts["7"]
        assert "Typical life" in texts["2"]
