"""Save as: the plan still opens from its new folder, permissions follow the original, and the
confirmation mentions a backup only when one was written.

References: POSIX.1-2017 open() (O_CREAT: the mode is modified by the file mode creation mask)
and chmod(); the checks below compare against the umask and stat() results of the system.
"""

from __future__ import annotations

import os
import shutil
import stat
from pathlib import Path

import pytest

from homeplan import cli
from homeplan.plan.relocate import rebase_paths
from homeplan.tui.app import saved_words
from homeplan.tui.session import PlanSession

ROOT = Path(__file__).resolve().parents[1]
SAMPLE = ROOT / "sample_homes" / "cold_gas_100a.yaml"


@pytest.fixture
def home(tmp_path: Path) -> Path:
    """The demo home and its incentive file in a folder of their own."""
    folder = tmp_path / "original"
    (folder / "incentives").mkdir(parents=True)
    shutil.copy(SAMPLE, folder / "home.yaml")
    for f in (ROOT / "sample_homes" / "incentives").iterdir():
        shutil.copy(f, folder / "incentives" / f.name)
    return folder / "home.yaml"


def test_save_as_in_another_folder_reopens_and_checks(home, tmp_path, capsys):
    other = tmp_path / "elsewhere" / "deeper"
    other.mkdir(parents=True)
    session = PlanSession.open(home)
    session.edit([(("budget", "usd_per_year"), 7000)], "budget")
    target = session.save(other / "copy.yaml")
    assert [r.after for r in session.last_rebased] == ["../../original/incentives/demoland_invented.yaml"]
    reopened = PlanSession.open(target)
    assert reopened.plan.incentive_files == ["../../original/incentives/demoland_invented.yaml"]
    # a file outside the plan's folder is read only when allowed; without it, a clear message
    outside = str(home.parent / "incentives" / "demoland_invented.yaml")
    assert cli.main(["check", str(target)]) == 2
    assert "--allow-outside" in capsys.readouterr().err
    assert cli.main(["check", str(target), "--allow-outside", outside]) == 0, capsys.readouterr().err
    # undo keeps the paths right for the new folder, and saving again still checks
    assert session.undo() == "budget"
    session.save()
    assert cli.main(["check", str(target), "--allow-outside", outside]) == 0, capsys.readouterr().err


def test_save_as_in_the_same_folder_keeps_paths(home):
    session = PlanSession.open(home)
    session.save(home.with_name("second.yaml"))
    assert session.last_rebased == []
    assert PlanSession.open(home.with_name("second.yaml")).plan.incentive_files == \
        ["incentives/demoland_invented.yaml"]


def test_absolute_paths_stay_and_relative_ones_are_rebased():
    doc = {"incentive_files": ["/abs/a.yaml", "b.yaml"], "home": {"climate": {"weather_file": "w/x.epw"}}}
    done = rebase_paths(doc, "/data/plans", "/data/other")
    assert doc["incentive_files"] == ["/abs/a.yaml", "../plans/b.yaml"]
    assert doc["home"]["climate"]["weather_file"] == "../plans/w/x.epw"
    assert len(done) == 2


def test_new_file_keeps_the_original_permissions(home, tmp_path):
    os.chmod(home, 0o640)
    session = PlanSession.open(home)
    target = session.save(tmp_path / "copy.yaml")
    assert stat.S_IMODE(os.stat(target).st_mode) == 0o640


def test_a_file_without_an_original_follows_the_umask(tmp_path):
    from homeplan.plan.save import write_atomic

    old = os.umask(0o022)
    try:
        path = write_atomic(tmp_path / "new.yaml", "a: 1\n", backup=False)
    finally:
        os.umask(old)
    assert stat.S_IMODE(os.stat(path).st_mode) == 0o644  # 0666 less the umask 022


def test_the_backup_is_mentioned_only_when_written(home, tmp_path):
    session = PlanSession.open(home)
    target = session.save(tmp_path / "copy.yaml")
    assert session.last_backup is None
    assert not target.with_name("copy.yaml.bak").exists()
    words = saved_words(target, session.last_backup, session.last_rebased)
    assert ".bak" not in words and "rewritten" in words
    session.save()
    assert session.last_backup == target.with_name("copy.yaml.bak")
    assert session.last_backup.exists()
    assert "copy.yaml.bak" in saved_words(target, session.last_backup, session.last_rebased)
