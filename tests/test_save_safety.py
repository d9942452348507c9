"""Saving never loses work: links kept, the backup written atomically, stale temporary files
removed, the umask followed, read-only and changed files not overwritten without asking, outputs
never written over an input, the user's comments kept when an item is removed.

References: POSIX.1-2017 rename() (atomic replacement), open() with O_CREAT (mode & ~umask),
link() (hard links share one file), symlink().
"""

from __future__ import annotations

import errno
import io
import os
from contextlib import redirect_stderr, redirect_stdout
from pathlib import Path

import pytest

from homeplan import cli
from homeplan.errors import InputError
from homeplan.plan import save
from homeplan.plan.save import TEMP_SUFFIX, ChangedOnDiskError, ReadOnlyFileError, write_atomic
from homeplan.tui.session import DELETE, PlanSession

from .conftest import ROOT

SAMPLE = ROOT / "sample_homes" / "cold_gas_100a.yaml"


def run(*argv: str) -> tuple[int, str]:
    out, err = io.StringIO(), io.StringIO()
    with redirect_stdout(out), redirect_stderr(err):
        code = cli.main(list(argv))
    return code, err.getvalue()


def test_a_symlink_stays_a_link_and_its_target_is_written(tmp_path):
    (tmp_path / "real.yaml").write_text("a: 1\n")
    link = tmp_path / "link.yaml"
    link.symlink_to("real.yaml")
    write_atomic(link, "a: 2\n")
    assert link.is_symlink() and (tmp_path / "real.yaml").read_text() == "a: 2\n"
    assert (tmp_path / "real.yaml.bak").read_text() == "a: 1\n"


def test_hard_links_keep_sharing_the_file(tmp_path):
    one, two = tmp_path / "one.yaml", tmp_path / "two.yaml"
    one.write_text("a: 1\n")
    os.link(one, two)
    write_atomic(one, "a: 22\n")
    assert two.read_text() == "a: 22\n" and one.stat().st_ino == two.stat().st_ino
    assert (tmp_path / "one.yaml.bak").read_text() == "a: 1\n"


def test_a_failed_backup_leaves_the_old_backup_and_the_plan(tmp_path, monkeypatch):
    f = tmp_path / "p.yaml"
    f.write_text("v: 2\n")
    (tmp_path / "p.yaml.bak").write_text("v: 1\n")
    real_replace = os.replace

    def failing(src, dst):
        if str(dst).endswith(".bak"):
            raise OSError(errno.ENOSPC, "No space left on device")
        return real_replace(src, dst)

    monkeypatch.setattr(os, "replace", failing)
    with pytest.raises(OSError):
        write_atomic(f, "v: 3\n")
    assert f.read_text() == "v: 2\n" and (tmp_path / "p.yaml.bak").read_text() == "v: 1\n"
    assert [p for p in tmp_path.iterdir() if p.name.endswith(TEMP_SUFFIX)] == []


def test_stale_temp_files_of_a_killed_save_are_removed(tmp_path):
    f = tmp_path / "p.yaml"
    f.write_text("a: 1\n")
    dead = 2**22 + 12345  # above the default pid_max (4194304 = 2**22): no such process
    stale = [tmp_path / f".p.yaml.{dead}.0a1b2c3d{TEMP_SUFFIX}", tmp_path / f".p.yaml.bak.{dead}.0a1b{TEMP_SUFFIX}"]
    for s in stale:
        s.write_text("half")
    other = tmp_path / f".other.yaml.{dead}.0a1b{TEMP_SUFFIX}"
    other.write_text("not ours to remove")
    write_atomic(f, "a: 2\n")
    assert not any(s.exists() for s in stale) and other.exists()


def test_new_files_follow_the_umask(tmp_path):
    old = os.umask(0o027)
    try:
        write_atomic(tmp_path / "new.txt", "x\n")
    finally:
        os.umask(old)
    assert (tmp_path / "new.txt").stat().st_mode & 0o777 == 0o640  # 0666 & ~0027


def test_a_read_only_file_is_not_written_without_asking(tmp_path):
    f = tmp_path / "p.yaml"
    f.write_text("a: 1\n")
    f.chmod(0o444)
    with pytest.raises(ReadOnlyFileError):
        write_atomic(f, "a: 2\n")
    assert f.read_text() == "a: 1\n"
    write_atomic(f, "a: 2\n", replace_readonly=True)
    assert f.read_text() == "a: 2\n" and f.stat().st_mode & 0o777 == 0o444


def test_outputs_never_replace_an_input(tmp_path):
    plan = tmp_path / "plan.yaml"
    plan.write_text(SAMPLE.read_text())
    (tmp_path / "incentives").mkdir()
    for f in (ROOT / "sample_homes" / "incentives").iterdir():
        (tmp_path / "incentives" / f.name).write_text(f.read_text())
    before = plan.read_text()
    (tmp_path / "link.json").symlink_to("plan.yaml")
    os.link(plan, tmp_path / "hard.ics")
    for argv in (["export", str(plan), "--json", str(plan)], ["export", str(plan), "--ics", str(tmp_path / "hard.ics")],
                 ["print", str(plan), "-o", str(tmp_path / "link.json"), "--format", "txt"],
                 ["export", str(plan), "--json", str(tmp_path / "incentives" / "demoland_invented.yaml")]):
        code, err = run(*argv)
        assert code == 2 and "a file this command reads" in err
    assert plan.read_text() == before


def test_an_unwritable_output_folder_is_an_input_error(tmp_path, monkeypatch):
    real_open = os.open

    def refusing(path, flags, *args, **kwargs):
        if str(path).endswith(TEMP_SUFFIX):
            raise PermissionError(errno.EACCES, "Permission denied", str(path))
        return real_open(path, flags, *args, **kwargs)

    monkeypatch.setattr(os, "open", refusing)
    with pytest.raises(InputError, match="cannot write here: Permission denied"):
        write_atomic(tmp_path / "out.json", "{}")
    code, err = run("schema", "-o", str(tmp_path / "schema.json"))
    assert code == 2 and "Permission denied" in err and "internal error" not in err


def test_a_full_disk_is_reported_without_please_report(tmp_path, monkeypatch):
    def full(*_args, **_kwargs):
        raise OSError(errno.ENOSPC, "No space left on device")

    monkeypatch.setattr(save, "_write_all", full)
    code, err = run("schema", "-o", str(tmp_path / "schema.json"))
    assert code == 1 and "No space left on device" in err and "please report" not in err


# ------------------------------------------------------------------ the app's session


def _session(tmp_path: Path, text: str | None = None) -> PlanSession:
    f = tmp_path / "home.yaml"
    f.write_text(text or (ROOT / "sample_homes" / "minimal.yaml").read_text())
    return PlanSession.open(f)


def test_a_change_on_disk_is_not_overwritten_without_asking(tmp_path):
    s = _session(tmp_path)
    s.edit([(("budget", "usd_per_year"), 8000)], "budget")
    edited_elsewhere = s.path.read_text().replace("usd_per_year: 7000", "usd_per_year: 7500")
    s.path.write_text(edited_elsewhere)
    with pytest.raises(ChangedOnDiskError):
        s.save()
    assert s.path.read_text() == edited_elsewhere
    s.save(overwrite_changed=True)
    assert "usd_per_year: 8000" in s.path.read_text()
    assert (tmp_path / "home.yaml.bak").read_text() == edited_elsewhere  # the other edit is kept
    s.edit([(("budget", "usd_per_year"), 8100)], "budget")
    s.save()  # what this session wrote itself is not a change on disk
    os.utime(s.path, ns=(1, 1))  # touched, same content: not a change either
    s.save()


def test_removing_an_item_keeps_the_comment_above_the_next_key(tmp_path):
    text = ("home:\n  location: {latitude: 41.9, longitude: -87.6}\n  floor_area_ft2: 1600\n"
            "  electrical: {service_amps: 100}\nappliances:\n  - kind: furnace\n    year_installed: 2009\n"
            "  # the water heater was replaced in 2015\n  - kind: water_heater\n    year_installed: 2015\n"
            "vehicles:\n  - fuel: gasoline\n    mpg: 30\n# we can spend this much each year\n"
            "budget: {usd_per_year: 7000, first_year: 2027}\n")
    s = _session(tmp_path, text)
    s.edit([(("vehicles", 0), DELETE)], "remove the car")
    s.edit([(("appliances", 0), DELETE)], "remove the furnace")
    s.save()
    saved = s.path.read_text()
    assert "# we can spend this much each year\nbudget:" in saved
    assert "  # the water heater was replaced in 2015\n  - kind: water_heater" in saved
    assert "vehicles" not in saved and "furnace" not in saved
