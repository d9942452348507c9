"""Saving: atomic (a crash leaves the old file), a backup kept, comments and order kept."""

from __future__ import annotations

import os

import pytest

from homeplan.plan import save
from homeplan.plan.load import load_for_editing, load_plan

from .conftest import SAMPLES


def test_round_trip_keeps_comments_and_order(tmp_path):
    src = SAMPLES[0].read_text()
    f = tmp_path / "plan.yaml"
    f.write_text(src)
    loaded = load_for_editing(f)
    save.save_document(f, loaded.document)
    assert f.read_text() == src  # byte-for-byte when nothing changed
    assert (tmp_path / "plan.yaml.bak").read_text() == src


def test_edit_keeps_comments(tmp_path):
    f = tmp_path / "plan.yaml"
    f.write_text(SAMPLES[0].read_text())
    loaded = load_for_editing(f)
    save.set_in(loaded.document, ("budget", "usd_per_year"), 12000)
    save.save_document(f, loaded.document)
    text = f.read_text()
    assert "usd_per_year: 12000" in text
    assert "# heating degree days, base 65 F" in text
    assert load_plan(f).plan.budget.usd_per_year == 12000


def test_crash_mid_save_leaves_old_file(tmp_path, monkeypatch):
    f = tmp_path / "plan.yaml"
    f.write_text("old: content\n")

    def boom(*_args, **_kwargs):
        raise OSError("disk full")

    monkeypatch.setattr(os, "replace", boom)
    with pytest.raises(OSError):
        save.write_atomic(f, "new: content\n")
    assert f.read_text() == "old: content\n"
    assert [p.name for p in tmp_path.iterdir() if p.name.endswith(".tmp")] == []


def test_crash_during_write_leaves_old_file(tmp_path, monkeypatch):
    f = tmp_path / "plan.yaml"
    f.write_text("old: content\n")
    real_fsync = os.fsync
    calls = []

    def failing_fsync(fd):
        calls.append(fd)
        raise OSError("I/O error")

    monkeypatch.setattr(os, "fsync", failing_fsync)
    with pytest.raises(OSError):
        save.write_atomic(f, "new: content\n")
    monkeypatch.setattr(os, "fsync", real_fsync)
    assert calls
    assert f.read_text() == "old: content\n"


def test_new_file_has_no_backup(tmp_path):
    f = tmp_path / "new.yaml"
    save.write_atomic(f, "a: 1\n")
    assert f.read_text() == "a: 1\n"
    assert not (tmp_path / "new.yaml.bak").exists()


def test_permissions_kept(tmp_path):
    f = tmp_path / "p.yaml"
    f.write_text("a: 1\n")
    os.chmod(f, 0o600)
    save.write_atomic(f, "a: 2\n")
    assert (os.stat(f).st_mode & 0o777) == 0o600
