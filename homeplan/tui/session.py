"""One open plan in the app: its YAML document, edits, undo/redo and saving.

No Textual here: the session is plain Python so that it can be tested and reused. Every edit is
applied to a copy of the round-trip document (comments and key order kept), re-validated with the
plan loader, and only then becomes the current state; a rejected edit leaves nothing changed.
Undo/redo keep a private deep copy of the document for each state (a plan file is a few
kilobytes; copying is ~10x faster than re-parsing the YAML text).
"""

from __future__ import annotations

import contextlib
import copy
import os
import stat
from collections.abc import Sequence
from dataclasses import dataclass
from pathlib import Path
from typing import Any

from homeplan.errors import InputError, Problem
from homeplan.plan.files import PlanFolder
from homeplan.plan.load import load_for_editing, parse_document, parse_roundtrip, validate_document
from homeplan.plan.migrate import upgrade_document
from homeplan.plan.model import Plan
from homeplan.plan.relocate import Rebased, rebase_paths
from homeplan.plan.save import (
    ChangedOnDiskError,
    DiskStamp,
    delete_in,
    disk_stamp,
    dump_text,
    save_document,
    set_in,
)

__all__ = ["DELETE", "PlanSession", "State", "check_new_plan"]

DELETE = object()
"""Value meaning "remove this key" in an edit."""

Change = tuple[tuple, Any]


@dataclass(frozen=True)
class State:
    document: Any  # never modified once stored
    plan: Plan
    what: str  # description of the edit that produced this state


class PlanSession:
    """The current plan, its document and its history of edits."""

    def __init__(self, path: Path, document: Any, plan: Plan, migrated_from: int | None = None,
                 saved: bool = True):
        self.path = Path(path)
        if migrated_from:  # saving writes the current format, the user's comments kept
            upgrade_document(document, migrated_from)
        self.document = document
        self.plan = plan
        self.migrated_from = migrated_from
        self._states: list[State] = [State(copy.deepcopy(document), plan, "opened")]
        self._pos = 0
        self._saved_pos: int | None = 0 if saved else None
        self._disk: DiskStamp | None = disk_stamp(self.path) if saved else None
        self.folder = PlanFolder.of(self.path.parent)
        self.last_backup: Path | None = None
        self.last_rebased: list[Rebased] = []

    # ------------------------------------------------------------------ opening

    @classmethod
    def open(cls, path: str | os.PathLike) -> PlanSession:
        loaded = load_for_editing(path)
        return cls(loaded.path, loaded.document, loaded.plan, loaded.migrated_from)

    @classmethod
    def from_text(cls, text: str, path: str | os.PathLike, saved: bool = False) -> PlanSession:
        doc = parse_roundtrip(text, str(path))
        plan, migrated = validate_document(doc, str(path))
        return cls(Path(path), doc, plan, migrated, saved=saved)

    # ------------------------------------------------------------------ state

    @property
    def name(self) -> str:
        return self.plan.home.name or self.path.stem

    @property
    def dirty(self) -> bool:
        return self._saved_pos != self._pos

    @property
    def base_dir(self) -> Path:
        return self.path.parent if str(self.path.parent) else Path(".")

    def allow_outside(self, path: str | os.PathLike) -> None:
        """Let the plan name this file outside its folder (the user said so in the app)."""
        self.folder = self.folder.allowing(path)

    @property
    def text(self) -> str:
        """The plan file text of the current state (what saving would write)."""
        return dump_text(self.document)

    @property
    def can_undo(self) -> bool:
        return self._pos > 0

    @property
    def can_redo(self) -> bool:
        return self._pos < len(self._states) - 1

    def get(self, loc: Sequence, default: Any = None) -> Any:
        """The value at a path of keys/indices in the document, or ``default``."""
        node = self.document
        for part in loc:
            try:
                node = node[part]
            except (KeyError, IndexError, TypeError):
                return default
        return node

    # ------------------------------------------------------------------ edits

    def edit(self, changes: Sequence[Change], what: str) -> Plan:
        """Apply changes to a copy of the document; keep them only if the plan is still valid.

        Raises InputError (nothing changed) when the result does not validate.
        """
        doc = copy.deepcopy(self._states[self._pos].document)
        for loc, value in changes:
            if value is DELETE:
                with contextlib.suppress(KeyError, IndexError, TypeError):
                    delete_in(doc, loc)
            else:
                set_in(doc, loc, value)
        _prune_empty(doc, [loc for loc, _ in changes])
        plan, _ = validate_document(doc, str(self.path))
        del self._states[self._pos + 1:]
        if self._saved_pos is not None and self._saved_pos > self._pos:
            self._saved_pos = None
        self._states.append(State(doc, plan, what))
        self._pos += 1
        self.document, self.plan = doc, plan  # read-only: edits copy it first
        return plan

    def _goto(self, pos: int) -> None:
        state = self._states[pos]
        self._pos, self.document, self.plan = pos, state.document, state.plan

    def undo(self) -> str | None:
        """Step back one edit; returns what was undone, or None when there is nothing."""
        if not self.can_undo:
            return None
        what = self._states[self._pos].what
        self._goto(self._pos - 1)
        return what

    def redo(self) -> str | None:
        if not self.can_redo:
            return None
        self._goto(self._pos + 1)
        return self._states[self._pos].what

    # ------------------------------------------------------------------ saving

    def changed_on_disk(self) -> bool:
        """True when the file is not what this session read or last wrote: another program
        changed or removed it. Its time, size and content hash are kept; a file only touched
        (same content) has not changed."""
        now = disk_stamp(self.path)
        if self._disk is None:
            return now is not None
        if now is None:
            return True
        return now != self._disk and now.sha256 != self._disk.sha256

    def save(self, path: str | os.PathLike | None = None, *, overwrite_changed: bool = False,
             replace_readonly: bool = False) -> Path:
        """Write atomically (the previous file kept as .bak); ``path`` saves as a new file.

        Raises ChangedOnDiskError when the file changed on disk since it was read or written
        (unless ``overwrite_changed``), ReadOnlyFileError for a read-only file (unless
        ``replace_readonly``): the app asks the user, then calls again.

        Saved in another folder, the plan's relative file paths are rewritten to name the same
        files from there, in every state of the history (so undo keeps them right), and those
        files stay allowed for this session; a new file gets the permissions of the file the
        plan was opened from. ``last_backup`` is the .bak written (None when there was no file
        to keep) and ``last_rebased`` the rewritten paths.
        """
        target = Path(path) if path is not None else self.path
        same = target == self.path
        if same and not overwrite_changed and self.changed_on_disk():
            raise ChangedOnDiskError(Problem(str(target), 0, 0, "the file changed on disk since it was "
                                             "opened or last saved (another program edited it)",
                                             "overwrite it (the version on disk is kept as .bak), "
                                             "or save under another name"))
        rebased: list[Rebased] = []
        new_dir = target.parent if str(target.parent) else Path(".")
        if os.path.abspath(new_dir) != os.path.abspath(self.base_dir):
            rebased = self._rebase_all(new_dir)
        try:
            mode = stat.S_IMODE(os.stat(self.path).st_mode)
        except OSError:
            mode = None  # a new plan: the umask decides
        existed = target.exists()
        save_document(target, self.document, replace_readonly=replace_readonly, mode=mode)
        if not same:
            folder = PlanFolder(new_dir, self.folder.allowed)
            for r in rebased:  # the same files as before, now named from the new folder
                folder = folder.allowing(new_dir / r.after)
            self.folder = folder
        self.path = target
        self._saved_pos = self._pos
        self._disk = disk_stamp(target)
        self.last_backup = target.with_name(target.name + ".bak") if existed else None
        self.last_rebased = rebased
        return target

    def _rebase_all(self, new_dir: Path) -> list[Rebased]:
        """Rewrite relative file paths for ``new_dir`` in the current document and the history."""
        old_dir = self.base_dir
        done = rebase_paths(self.document, old_dir, new_dir)
        if not done:
            return []
        for i, state in enumerate(self._states):
            doc = state.document if i != self._pos else self.document
            if i != self._pos:
                rebase_paths(doc, old_dir, new_dir)
            plan, _ = validate_document(doc, str(self.path))
            self._states[i] = State(doc, plan, state.what)
        self.plan = self._states[self._pos].plan
        return done


def _prune_empty(doc: Any, locs: Sequence[tuple]) -> None:
    """Remove sections an edit left empty (e.g. ``pins: {}`` after the last release)."""
    for loc in locs:
        for n in range(len(loc), 0, -1):
            parent_loc, key = loc[: n - 1], loc[n - 1]
            parent = doc
            try:
                for part in parent_loc:
                    parent = parent[part]
                node = parent[key]
            except (KeyError, IndexError, TypeError):
                continue  # removed by the edit itself: look at the section holding it
            if isinstance(node, dict | list) and len(node) == 0 and not isinstance(parent, list):
                delete_in(doc, (*parent_loc, key))  # keeps the comment above the next key
            else:
                break


def check_new_plan(text: str, name: str) -> InputError | None:
    """None when the text is a valid plan, else the error to show."""
    try:
        validate_document(parse_document(text, name), name)
    except InputError as err:
        return err
    return None
