"""How values are written (`values ...`, clusterexp/forms.py): every form equals the expanded value
(sympy, on every worked example), the fallbacks say so, and bad `values` statements are refused."""
import json

import pytest
import sympy

from clusterexp import InputError, build_system, derive
from clusterexp.forms import Shaped, WorkerRunner, shape
from conftest import ROOT, run_cli

WORKED = sorted(p for p in (ROOT / "worked").iterdir() if (p / "input.gas").is_file())
MIXTURE = ("dimension 2 parameter nu in [0, 1) parameter r positive species L exchange 1/3 "
           "species H mass r exchange 1/3 mutual L H = nu clusters pairphase derive virial up to 2 ")


def _forms(text: str) -> list[str]:
    system = build_system(text)
    forms = ["values factored", "values collected in pieces", "values mass_prefactor"]
    return forms + [f"values collected in {p.name}" for p in system.parameters[:1]]


@pytest.mark.parametrize("folder", WORKED, ids=[p.name for p in WORKED])
def test_every_form_equals_the_expanded_value_on_every_worked_example(folder):
    text = "\n".join(line for line in (folder / "input.gas").read_text().splitlines()
                     if not line.startswith("values "))   # each form in turn, instead of the example's own
    for form in _forms(text):
        d = derive(text + "\n" + form + "\n", base_dir=str(folder))
        symbols = {p.name: p.symbol for p in d.system.parameters}   # with their assumptions
        for c in d:
            shaped = d.shaped(c)
            own = {s.name: s for s in c.value.free_symbols}       # named pieces keep their assumptions too
            written = sympy.sympify(shaped.text(c), locals={**own, **symbols})
            # independent of the rearranging code: sympy's simplify of the difference
            assert sympy.simplify(written.removeO() - c.value.removeO()) == 0, (folder.name, form, c.label)


def test_the_mixed_second_virial_coefficient_factors_as_the_two_body_formula():
    # a_11 = -b_11/(b_10 b_01) with b_11 = -((m_L + m_H)/(2 m_L)) nu(1 - nu) and b_01 = m_H/m_L = r
    # (physics.md section 3, R3; Arovas-type two-body closed form), so a_11 = (1 + r) nu (1 - nu)/(2 r)
    result = run_cli("run", "-e", MIXTURE + "values factored", "--format", "json")
    assert result.returncode == 0, result.stderr
    record = {tuple(c["index"]): c for c in json.loads(result.stdout)["coefficients"]}[(1, 1)]
    nu, r = sympy.symbols("nu r")
    assert sympy.simplify(sympy.sympify(record["value"]) - (1 + r) * nu * (1 - nu) / (2 * r)) == 0  # plain symbols
    assert record["value"] == "nu*(1 - nu)*(r + 1)/(2*r)" and record["form"] == "factored"


def test_the_same_written_value_in_text_latex_and_json():
    outputs = {f: run_cli("run", "-e", MIXTURE + "values factored", "--format", f).stdout
               for f in ("text", "latex", "json")}
    assert "a[1,1] = nu*(1 - nu)*(r + 1)/(2*r)" in outputs["text"]
    assert r"\frac{\nu \left(1 - \nu\right) \left(r + 1\right)}{2 r}" in outputs["latex"]
    assert '"value": "nu*(1 - nu)*(r + 1)/(2*r)"' in outputs["json"]


def test_collected_in_a_parameter_groups_its_powers():
    d = derive(MIXTURE + "values collected in nu")
    c = d.coefficient("virial", (1, 1))
    nu = sympy.Symbol("nu")
    written = d.shaped(c).expr
    assert isinstance(written, sympy.Add) and len(written.args) == 2   # one term per power of nu
    assert sympy.simplify(written - c.value) == 0


def test_mass_prefactor_pulls_the_mass_ratio_out():
    d = derive(MIXTURE + "values mass_prefactor")
    c = d.coefficient("virial", (1, 1))
    terms = d.shaped(c).latex_terms({})
    assert terms[0].startswith(r"\frac{r + 1}{r} \Bigl(")


def test_o_terms_are_kept():
    nu = sympy.Symbol("nu")
    shaped = shape(sympy.expand(nu * (1 - nu)) + sympy.Order(nu ** 3), "factored")
    assert shaped.orders == (sympy.Order(nu ** 3),)


def test_a_value_over_the_time_bound_is_printed_expanded_and_says_so():
    x = sympy.symbols("x0:4")
    value = sympy.expand(sympy.prod(xi + 1 for xi in x) ** 2)      # 81 terms: goes to the worker
    with WorkerRunner(seconds=1e-6) as runner:
        shaped = shape(value, "factored", runner=runner)
    assert shaped.expr is None and shaped.form == "expanded" and "not reached within" in shaped.note
    with WorkerRunner(seconds=30) as runner:                         # the same value within a real bound
        shaped = shape(value, "factored", runner=runner)
    assert shaped.form == "factored" and sympy.expand(shaped.expr - value) == 0


def test_a_value_over_the_size_guard_is_printed_expanded():
    x = sympy.symbols("x0:6")
    value = sympy.expand(sympy.prod(xi + 2 for xi in x) ** 2)       # 729 terms
    shaped = shape(value, "factored")
    assert shaped.expr is None and "more than the 400" in shaped.note


def test_a_fallback_is_said_in_the_text_output(monkeypatch):
    import clusterexp.forms as forms
    monkeypatch.setattr(forms, "TERM_LIMIT", 1)
    d = derive(MIXTURE + "values factored")
    from clusterexp.export import to_text
    assert "(4 terms, more than the 1 the factored form is tried for: printed expanded)" in to_text(d)


@pytest.mark.parametrize("statement, message, column", [
    ("values colected", "unknown form 'colected'", 8),
    ("values collected", "say what to collect in", 8),
    ("values factored in nu", "only `values collected` takes", 20),
    ("values collected in mu", "'mu' is neither a declared parameter nor `pieces`", 21),
    ("values collected in nu, pieces", "collect either in parameters or in `pieces`", 21),
    ("values factored values expanded", "`values` is given twice", 17),
    ('title "a $\\nu"', "a `$` is not closed", 7),
    ("figures footnote", "unknown figure option 'footnote'", 9),
])
def test_bad_presentation_statements(statement, message, column):
    with pytest.raises(InputError) as error:
        build_system("dimension 2 parameter nu species A exchange nu\n" + statement)
    assert str(error.value.message).startswith(message), error.value.message
    assert (error.value.span.line, error.value.span.column) == (2, column)


def test_shaped_expanded_default():
    assert derive(MIXTURE).shaped(derive(MIXTURE).coefficients[0]) == Shaped(None, "expanded")


def test_a_worker_that_dies_is_replaced():
    x = sympy.symbols("x0:4")
    value = sympy.expand(sympy.prod(xi + 1 for xi in x) ** 2)
    with WorkerRunner(seconds=30) as runner:
        assert shape(value, "factored", runner=runner).form == "factored"
        runner.process.kill()
        runner.process.join()
        first = shape(value, "factored", runner=runner)     # noticed: printed expanded, said so
        second = shape(value, "factored", runner=runner)    # a new worker
    assert first.form == "factored" or "worker process ended" in first.note
    assert second.form == "factored"
