"""JSON: one object ``{"version": 1, "findings": [...], "summary": {...}}``."""
from __future__ import annotations

import json

from .checking import CheckResult


def render(result: CheckResult) -> str:
    c = result.counts()
    doc = {
        "version": 1,
        "findings": [f.to_dict() for f in result.active],
        "suppressed": [f.to_dict() for f in result.suppressed],
        "summary": {
            "files": len(result.files),
            "errors": c["error"],
            "warnings": c["warning"],
            "infos": c["info"],
            "suppressed": len(result.suppressed),
            "fixes_applied": result.fixes_applied,
        },
    }
    return json.dumps(doc, indent=2, ensure_ascii=False) + "\n"
