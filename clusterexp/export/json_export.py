"""JSON printer: every coefficient with kind, multi-index, species and a sympy-parsable value."""
from __future__ import annotations

from typing import TYPE_CHECKING

if TYPE_CHECKING:  # the results import the printers for their notebook display, not the other way
    from ..results import Derivation

import json

import sympy

from .common import check_record, regime_lines, species_statistics
from .quantities import conventions, given_records, parameter_records, quantities
from .series_lines import series_json
from .state_lines import state_json


def form_record(derivation, c) -> dict:
    """{"form": ..., "form_note": ...} when the input chose how values are written."""
    if derivation.system.presentation.form == "expanded":
        return {}
    shaped = derivation.shaped(c)
    return {"form": shaped.form, **({"form_note": shaped.note} if shaped.note else {})}


def to_json(derivation: Derivation) -> str:
    system = derivation.system
    names = list(system.species_names)
    document = {
        "conventions": conventions(system),
        "regime": _regime(system),
        "dimension": system.dimension,
        "species": [{"name": s.name, "mass": sympy.sstr(s.mass),
                     species_statistics(system, i)[0]: sympy.sstr(species_statistics(system, i)[1])}
                    for i, s in enumerate(system.species)],
        "mutual": [{"species": [m.first, m.second], "value": sympy.sstr(m.value)} for m in system.mutuals],
        "parameters": parameter_records(system),
        **({"given": given_records(system)} if system.source.values else {}),
        "reference": system.reference,
        "order": system.order,
        "source": system.source.kind,
        **({"values_form": {"form": system.presentation.form, "collected_in": list(system.presentation.collect_in)}}
           if system.presentation.form != "expanded" else {}),
        "coefficients": [
            {
                "kind": c.kind,
                "index": list(c.index),
                "species": dict(zip(names, c.index)),
                **({"component": c.component} if c.component else {}),
                "value": derivation.shaped(c).text(c),
                **form_record(derivation, c),
                **series_json(derivation, c),
            }
            for c in derivation
        ],
    }
    if system.claims:
        document["checks"] = [check_record(r) for r in derivation.checks]
    if system.evaluations:
        document["values"] = [{"at": {s.name: sympy.sstr(v) for s, v in e.point}, "digits": e.digits,
                               "values": {label: number for label, number in rows}}
                              for e, rows in derivation.evaluations]
    if system.states:
        document["equation_of_state"] = state_json(derivation)
    if system.tables or system.figures:
        document["files"] = [t.path for t in system.tables] + [f.path for f in system.figures]
    unknowns = derivation.unknowns()
    if unknowns:
        document["unknowns"] = {u.symbol.name: u.description for u in unknowns}
    if system.samplings:
        from ..loops.report import json_items
        document["sampled"] = json_items(derivation.sampled)
    return json.dumps(document, indent=2, sort_keys=False, ensure_ascii=True) + "\n"


def _regime(system) -> dict:
    from ..routes import regime_of
    """The regime, the quantities it computes and its statement (closed forms or the implicit
    equation of state), as the text header says them."""
    q = quantities(system)
    record = {"kind": system.source.kind, "pressure": q.pressure, "density": q.density_of("i"),
              "measured_per": q.unit, "statement": regime_lines(system)}
    if system.source.form:
        record["form"] = system.source.form
    if system.tubes is not None:
        record["tubes"] = {"flux": sympy.sstr(system.tubes.flux), "coverage": sympy.sstr(system.tubes.coverage),
                           **({"coverage_value": sympy.sstr(system.tubes.value)} if system.tubes.value is not None
                              else {}),
                           "known_to": f"O({sympy.sstr(system.tubes.coverage)}^"
                                       f"{regime_of(system).truncation(system)[system.tubes.coverage]})"}
    return record
