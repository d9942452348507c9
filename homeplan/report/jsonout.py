"""The roadmap result as JSON: ``Roadmap.to_dict()`` plus the plan's hash and provenance.

The extra top-level key ``plan`` (content hash, provenance, homeplan version) is an addition
that readers of docs/roadmap-json.md ignore, so ``Roadmap.from_dict`` still reads the file.

References
----------
RFC 8259, The JavaScript Object Notation (JSON) Data Interchange Format (no NaN/Infinity:
``allow_nan=False``).
"""

from __future__ import annotations

import json
from typing import Any

from homeplan import __version__
from homeplan.plan.hashing import content_hash

__all__ = ["render_json", "roadmap_document"]


def roadmap_document(result: Any) -> dict[str, Any]:
    data = result.roadmap.to_dict()
    data["plan"] = {
        "content_hash": result.content_hash or content_hash(result.plan),
        "provenance": result.plan.provenance.model_dump(mode="json"),
        "homeplan_version": __version__,
    }
    if result.solver is not None:
        data["solver"] = result.solver.to_dict()
    return data


def render_json(result: Any) -> str:
    return json.dumps(roadmap_document(result), indent=2, allow_nan=False, ensure_ascii=False) + "\n"
