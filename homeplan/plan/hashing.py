"""A stable content hash of a plan: the same inputs give the same hash on every machine.

The hash covers the *validated* content (``Plan.model_dump(mode="json", exclude_defaults=True)``),
so it ignores what does not change the plan's meaning: comments, key order, whitespace, quoting,
SI spellings that convert to the same internal value, and defaults written out or left implicit
- and a new optional field added to the format does not change the hash of existing plans. It is shown on
printouts and in the app so an installer and a homeowner can tell at a glance whether they are
looking at the same plan.

References
----------
FIPS 180-4, Secure Hash Standard (SHA-256). RFC 8785 (JSON Canonicalization Scheme) is the idea
behind the canonical form used here: sorted keys, no insignificant whitespace, UTF-8.
"""

from __future__ import annotations

import hashlib
import json
from typing import Any

__all__ = ["canonical_json", "content_hash", "sha256_hex"]

HASH_CHARS = 12
"""Hex characters kept: 48 bits, plenty to tell plans of one household apart by eye."""


def canonical_json(data: Any) -> str:
    """JSON text with sorted keys and no insignificant whitespace (UTF-8, no ASCII escaping)."""
    return json.dumps(data, sort_keys=True, separators=(",", ":"), ensure_ascii=False,
                      allow_nan=False)


def sha256_hex(text: str) -> str:
    """SHA-256 (FIPS 180-4) of the UTF-8 bytes of ``text``, as 64 hex characters."""
    return hashlib.sha256(text.encode("utf-8")).hexdigest()


def content_hash(plan: Any) -> str:
    """First 12 hex characters of SHA-256 over the canonical JSON of the validated plan."""
    data = plan.model_dump(mode="json", exclude_defaults=True)
    return sha256_hex(canonical_json(data))[:HASH_CHARS]
