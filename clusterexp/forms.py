"""How a coefficient's value is written (`values factored`, `values collected in nu, r`, `values
collected in pieces`, `values mass_prefactor`; `values expanded` is the default): the algebra that
rearranges an exact value without changing it. Every format (text, LaTeX, JSON) prints the same
rearranged value; when the algebra does not finish within its bound, or the rearranged value cannot be
verified equal to the expanded one, the expanded value is printed and the output says why.

The bound needs no thread and no alarm: a value with more than `TERM_LIMIT` terms is not attempted,
a small one (at most `IN_PROCESS_TERMS` terms) is rearranged here, and anything in between in a worker
process that is stopped after `SECONDS_PER_COEFFICIENT` seconds. The worker returns plain structures
(numbers, factors and exponents), never an unevaluated sympy expression, so that pickling cannot
re-evaluate (and re-expand) it; the unevaluated product is assembled here.

>>> import sympy
>>> nu, r = sympy.symbols("nu r")
>>> value = sympy.expand((1 + r) * nu * (1 - nu) / (2 * r))
>>> sympy.sstr(shape(value, "factored").expr)
'nu*(1 - nu)*(r + 1)/(2*r)'
"""
from __future__ import annotations

import multiprocessing
import os
from dataclasses import dataclass

import sympy

from .export.latex_width import TEXT_WIDTH_PT, widest_term

FORMS = ("expanded", "factored", "collected", "mass_prefactor")
TERM_LIMIT = 400
IN_PROCESS_TERMS = 12
WIDEST_PRINTED_PT = TEXT_WIDTH_PT - 110.0   # one unbreakable product must fit beside `a_{...} =`
SECONDS_PER_COEFFICIENT = float(os.environ.get("CLUSTEREXP_FORM_SECONDS", "10"))


@dataclass(frozen=True)
class Shaped:
    """A value as written: `expr` the rearranged exact part (None: print the expanded value as it is),
    `orders` its O terms, `form` the form actually used and `note` why it differs from the form asked
    for (None when it does not)."""

    expr: sympy.Expr | None
    form: str
    orders: tuple = ()
    note: str | None = None
    structure: tuple | None = None

    def text(self, coefficient) -> str:
        """Sympy-parsable text of `coefficient` (a `results.Coefficient`) as written."""
        if self.expr is None:
            return coefficient.text
        if self.structure[0] == "sum":   # the terms in the written order, each printed as sympy does
            texts = [sympy.sstr(t) for t in self.expr.args] if isinstance(self.expr, sympy.Add) else [sympy.sstr(self.expr)]
            written = texts[0] + "".join(f" - {t[1:]}" if t.startswith("-") else f" + {t}" for t in texts[1:])
        else:
            written = sympy.sstr(self.expr)
        return " + ".join([written] + [sympy.sstr(o) for o in self.orders])

    def latex_terms(self, names: dict) -> list[str] | None:
        """The LaTeX as terms with their signs (break points of a long line); None: expanded."""
        if self.expr is None:
            return None
        def tex(e):
            return sympy.latex(e, symbol_names=names)
        if self.structure[0] == "prefactor":
            prefactor = tex(sympy.Mul(*[f ** k for f, k in self.structure[1]]))
            inner = _signed([tex(t) for t in sympy.sympify(self.structure[2]).as_ordered_terms()])
            if len(inner) == 1:
                terms = [rf"{prefactor} \left({inner[0]}\right)"]
            else:
                terms = [rf"{prefactor} \Bigl({inner[0]}", *inner[1:-1], rf"{inner[-1]}\Bigr)"]
        elif self.structure[0] == "sum":
            terms = _signed([_term_latex(m, part, tex) for m, part in self.structure[1]])
        elif self.structure[0] == "product":
            terms = [_term_latex(sympy.Integer(1), self.structure, tex)]
        else:
            terms = _signed([tex(t) for t in sympy.sympify(self.structure[1]).as_ordered_terms()])
        return terms + [f"+ {tex(o)}" for o in self.orders]


def _inner_fraction(f) -> bool:
    return f.is_Add and any(not t.as_coeff_Mul()[0].is_Integer for t in f.args)


def _term_latex(monomial, part, tex) -> str:
    """One term, a monomial times a structure; a factor with fractions inside is not put over a common
    denominator: (1/r)(-alpha^2/2 + alpha - 1/4), not a fraction within a fraction."""
    if part[0] == "number":
        value = sympy.sympify(part[1])
        if monomial == 1 or not value.is_Add:
            return tex(value * monomial)
        return rf"{tex(monomial)} \left({tex(value)}\right)"
    coefficient, factors = part[1], part[2]
    if not any(_inner_fraction(f) for f, k in factors if k > 0):
        return tex(assemble(("sum", [(monomial, part)])))
    prefix = coefficient / sympy.Mul(*[f ** -k for f, k in factors if k < 0])
    pieces = [] if monomial == 1 else [tex(monomial)]
    for f, k in factors:
        if k > 0:
            body = rf"\left({tex(f)}\right)" if f.is_Add else tex(f)
            pieces.append(body if k == 1 else f"{body}^{{{k}}}")
    head = "" if prefix == 1 else "-" if prefix == -1 else tex(prefix) + " "
    return head + " ".join(pieces)


class FormUnreached(Exception):
    """The rearrangement did not finish or could not be verified."""


def shape(value: sympy.Expr, form: str, collect_in: tuple = (), masses: tuple = (), runner=None) -> Shaped:
    """`value` written in `form` (see the module docstring); `collect_in` the symbols of a collected
    form, `masses` the mass symbols of `mass_prefactor`; `runner` a `WorkerRunner` for the bound."""
    if form == "expanded":
        return Shaped(None, "expanded")
    value = sympy.sympify(value)
    exact, orders = value.removeO(), tuple(t for t in sympy.Add.make_args(value) if isinstance(t, sympy.Order))
    terms = len(sympy.Add.make_args(exact))
    if exact.is_number or exact.is_Atom or (terms == 1 and not _has_fraction(exact)):
        return Shaped(None, form, orders)  # one term: every form is the expanded one
    if terms > TERM_LIMIT:
        return Shaped(None, "expanded", orders,
                      f"{terms} terms, more than the {TERM_LIMIT} the {_word(form)} form is tried for: printed expanded")
    job = (exact, form, tuple(collect_in), tuple(masses))
    try:
        structure = _in_process(job) if terms <= IN_PROCESS_TERMS or runner is None else runner.run(job)
    except FormUnreached as why:
        return Shaped(None, "expanded", orders, f"{_word(form)} form {why}: printed expanded")
    return Shaped(assemble(structure), form, orders, structure=structure)


def _signed(texts: list[str]) -> list[str]:
    """Printed terms with their signs: the first as printed, the others led by `+ ` or `- `."""
    return texts[:1] + [f"- {t[1:].lstrip()}" if t.startswith("-") else f"+ {t}" for t in texts[1:]]


def _in_process(job):
    try:
        return structure_of(*job)
    except FormUnreached:
        raise
    except Exception as why:  # noqa: BLE001 -- any failure of the algebra means: print expanded
        raise FormUnreached(f"failed in sympy ({type(why).__name__})") from None


def _word(form: str) -> str:
    return form.replace("_", " ")


def _has_fraction(expr) -> bool:
    return any(isinstance(f, sympy.Pow) and f.exp.is_negative and f.base.is_Add for f in sympy.Mul.make_args(expr))


# -- the algebra (runs in the worker for all but small values) -----------------------------------------

def structure_of(exact, form, collect_in, masses):
    """Plain data describing the rearranged value, verified equal to `exact`."""
    if form == "factored":
        structure = _product(exact)
    elif form == "mass_prefactor":
        coefficient, factors = _factors(exact)
        outside = [(f, k) for f, k in factors if f.free_symbols and f.free_symbols <= set(masses)]
        inside = [(f, k) for f, k in factors if (f, k) not in outside]
        if not outside:
            structure = ("number", sympy.expand(exact))
        else:
            rest = sympy.expand(coefficient * sympy.Mul(*[f ** k for f, k in inside]))
            structure = ("prefactor", outside, rest)
    elif form == "collected":
        expanded = sympy.expand(exact)
        groups = sympy.collect(expanded, list(collect_in), evaluate=False) if collect_in else {sympy.Integer(1): expanded}
        rows = sorted(groups.items(), key=lambda kv: (sum(kv[0].as_powers_dict().get(x, 0) for x in collect_in),
                                                      sympy.default_sort_key(kv[0])))   # ascending powers
        structure = ("sum", [(monomial, _product(part)) for monomial, part in rows])
    else:
        raise ValueError(form)
    if sympy.cancel(sympy.together(evaluated(structure) - exact)) != 0:
        raise FormUnreached("could not be verified equal to the expanded value")
    return structure


def _product(expr):
    """The factored structure of expr; a polynomial that does not factor (one factor, no denominator)
    stays expanded: -1/4 + alpha - alpha^2/2 reads better than -(2 alpha^2 - 4 alpha + 1)/4."""
    coefficient, factors = _factors(expr)
    if len(factors) == 1 and factors[0][1] == 1 and factors[0][0].is_Add:
        return ("number", sympy.expand(expr))
    long = [k for k, (f, e) in enumerate(factors) if e == 1 and f.is_Add and len(f.args) >= 3]
    if len(long) == 1 and abs(coefficient) != 1:   # (-alpha^2/2 + alpha - 1/4)/r, not -(2 alpha^2 - ...)/(4 r)
        f, _ = factors[long[0]]
        factors = [*factors[:long[0]], (sympy.expand(coefficient * f), 1), *factors[long[0] + 1:]]
        coefficient = sympy.Integer(1)
    return ("product", coefficient, factors)


def _factors(expr):
    """(rational coefficient, [(factor, exponent)]) of a rational function; the sign of each factor
    chosen so that its constant (else its first) term is positive."""
    numerator, denominator = sympy.fraction(sympy.together(expr))
    c_top, top = sympy.factor_list(numerator)
    c_bottom, bottom = sympy.factor_list(denominator)
    coefficient = sympy.sympify(c_top) / sympy.sympify(c_bottom)
    factors = []
    for f, k in [(f, k) for f, k in top] + [(f, -k) for f, k in bottom]:
        if f.is_Add and _leading_negative(f):
            f, coefficient = sympy.expand(-f), coefficient * (-1) ** k
        factors.append((f, k))
    # symbols first, then sums by size: nu (1 - nu) (r + 1), as written by hand
    factors.sort(key=lambda fk: (fk[0].is_Add, len(fk[0].args), sympy.default_sort_key(fk[0])))
    return coefficient, factors


def _leading_negative(f) -> bool:
    constant = f.as_coeff_Add()[0]
    if constant != 0:
        return bool(constant.is_negative)
    first = sorted(sympy.Add.make_args(f), key=sympy.default_sort_key)[0]
    return bool(first.as_coeff_Mul()[0].is_negative)


def evaluated(structure) -> sympy.Expr:
    """The structure as an ordinary (evaluated) sympy expression."""
    kind = structure[0]
    if kind == "number":
        return structure[1]
    if kind == "product":
        return structure[1] * sympy.Mul(*[f ** k for f, k in structure[2]])
    if kind == "prefactor":
        return sympy.Mul(*[f ** k for f, k in structure[1]]) * structure[2]
    return sympy.Add(*[m * evaluated(part) for m, part in structure[1]])


def assemble(structure) -> sympy.Expr:
    """The structure as an unevaluated sympy expression that prints as it reads."""
    kind = structure[0]
    if kind == "number":
        return structure[1]
    if kind == "product":
        coefficient, factors = structure[1], structure[2]
        parts = [f if k == 1 else sympy.Pow(f, k, evaluate=False) for f, k in factors]
        if not parts:
            return coefficient
        if coefficient == 1:
            return parts[0] if len(parts) == 1 else sympy.Mul(*parts, evaluate=False)
        return sympy.Mul(coefficient, *parts, evaluate=False)
    if kind == "prefactor":
        outside = [f if k == 1 else sympy.Pow(f, k, evaluate=False) for f, k in structure[1]]
        return sympy.Mul(*outside, structure[2], evaluate=False)
    terms = []
    for monomial, part in structure[1]:
        inner = assemble(part)
        if monomial == 1:
            terms.append(inner)
        elif isinstance(inner, sympy.Mul) and not inner.is_number:
            coefficient = inner.args[0] if inner.args[0].is_Rational else sympy.Integer(1)
            rest = inner.args[1:] if inner.args[0].is_Rational else inner.args
            terms.append(sympy.Mul(*([coefficient] if coefficient != 1 else []), monomial, *rest, evaluate=False))
        elif inner.is_Rational:
            terms.append(sympy.Mul(inner, monomial, evaluate=False) if inner != 1 else monomial)
        else:
            terms.append(sympy.Mul(monomial, inner, evaluate=False))
    return terms[0] if len(terms) == 1 else sympy.Add(*terms, evaluate=False)


# -- the bound: one worker process, stopped when a value takes too long ---------------------------------

def _serve(connection):
    import signal
    signal.signal(signal.SIGINT, signal.SIG_IGN)   # Ctrl-C is the parent's to handle; it ends the worker
    while True:
        try:
            job = connection.recv()
        except (EOFError, OSError):   # the parent is gone: end quietly
            return
        if job is None:
            return
        try:
            connection.send(("ok", structure_of(*job)))
        except FormUnreached as why:
            connection.send(("unreached", str(why)))
        except Exception as why:  # noqa: BLE001 -- any failure of the algebra means: print expanded
            connection.send(("unreached", f"failed in sympy ({type(why).__name__})"))


class WorkerRunner:
    """Runs `structure_of` in one worker process, `seconds` per value; a worker that overruns is
    ended and replaced. Use as a context manager (the worker ends with it)."""

    def __init__(self, seconds: float = SECONDS_PER_COEFFICIENT):
        self.seconds = seconds
        self.process = None
        self.connection = None

    def _start(self):
        methods = multiprocessing.get_all_start_methods()
        context = multiprocessing.get_context("fork" if "fork" in methods else "spawn")
        ours, theirs = context.Pipe()
        self.process = context.Process(target=_serve, args=(theirs,), daemon=True)
        self.process.start()
        theirs.close()
        self.connection = ours

    def run(self, job):
        if self.process is None or not self.process.is_alive():
            try:
                self._start()
            except OSError as why:
                raise FormUnreached(f"not tried: no worker process could be started ({why.strerror})") from None
        try:
            self.connection.send(job)
            if not self.connection.poll(self.seconds):
                self.close(kill=True)
                raise FormUnreached(f"not reached within {self.seconds:g} s")
            status, payload = self.connection.recv()
        except (EOFError, OSError):   # the worker died (memory, a signal): the next value gets a new one
            self.close(kill=True)
            raise FormUnreached("not reached: the worker process ended") from None
        if status != "ok":
            raise FormUnreached(payload)
        return payload

    def close(self, kill: bool = False):
        if self.process is None:
            return
        if kill:
            self.process.kill()
        else:
            try:
                self.connection.send(None)
            except OSError:
                pass
        self.process.join(5)
        if self.process.is_alive():
            self.process.kill()
            self.process.join()
        self.connection.close()
        self.process = self.connection = None

    def __enter__(self):
        return self

    def __exit__(self, *exc):
        self.close()


# -- a derivation's values ---------------------------------------------------------------------------

def form_symbols(system, value) -> tuple[tuple, tuple]:
    """(symbols to collect in, mass symbols) of `system`'s presentation for one value: `pieces` are
    the value's symbols that are not declared parameters (generated b/a symbols, Taylor coefficients)."""
    p = system.presentation
    parameters = {q.name: q.symbol for q in system.parameters}
    if p.collect_in == ("pieces",):
        collect = tuple(sorted(value.free_symbols - set(parameters.values()), key=sympy.default_sort_key))
    else:
        collect = tuple(parameters[name] for name in p.collect_in)
    masses = tuple(sorted(set().union(*(sympy.sympify(s.mass).free_symbols for s in system.species)),
                          key=sympy.default_sort_key))
    return collect, masses


def shape_all(system, coefficients, progress=None) -> dict:
    """{(kind, index, component): Shaped} for `coefficients`, in one worker (see `WorkerRunner`)."""
    form = system.presentation.form
    out = {}
    with WorkerRunner() as runner:
        for c in coefficients:
            if progress is not None:
                progress.step(f"{_word(form)} form of {c.label}", order=c.order)
            collect, masses = form_symbols(system, c.value)
            shaped = shape(c.value, form, collect, masses, runner)
            if shaped.expr is not None and widest_term(shaped.latex_terms({})) > WIDEST_PRINTED_PT:
                shaped = Shaped(None, "expanded", shaped.orders,
                                f"the {_word(form)} form does not fit a printed line: printed expanded")
            out[(c.kind, c.index, c.component)] = shaped
    return out
