"""JSON printer: every coefficient with kind, multi-index, species and a sympy-parsable value."""
from __future__ import annotations

import json

import sympy

from ..results import Derivation
from .common import CONVENTIONS


def to_json(derivation: Derivation) -> str:
    system = derivation.system
    names = list(system.species_names)
    document = {
        "conventions": CONVENTIONS,
        "dimension": system.dimension,
        "species": [{"name": s.name, "mass": sympy.sstr(s.mass), "exchange": sympy.sstr(s.exchange)}
                    for s in system.species],
        "mutual": [{"species": [m.first, m.second], "value": sympy.sstr(m.value)} for m in system.mutuals],
        "reference": system.reference,
        "order": system.order,
        "source": system.source.kind,
        "coefficients": [
            {
                "kind": c.kind,
                "index": list(c.index),
                "species": dict(zip(names, c.index)),
                **({"component": c.component} if c.component else {}),
                "value": c.text,
            }
            for c in derivation
        ],
    }
    if system.samplings:
        from ..loops.report import json_items
        document["sampled"] = json_items(derivation.sampled)
    return json.dumps(document, indent=2, sort_keys=False, ensure_ascii=True) + "\n"
