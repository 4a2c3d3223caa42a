"""Validation of the statements that use derived coefficients: `claim`, `evaluate`, `tabulate`,
`plot` and `typeset`. Called by `build._Builder` once every declaration is known; each error points
at the user's line.
"""
from __future__ import annotations

import re

import lark
import sympy

from ..errors import InputError
from .expressions import ExpressionBuilder
from .hints import did_you_mean
from . import manuscript
from ..model import Claim, CoefficientName, Evaluation, Figure, Table, Typesetting

DEFAULT_DIGITS = 15
MAX_DIGITS = 1000
MAX_TABLE_ROWS = 100_000
MAX_AXIS_POINTS = 10_000
FIGURE_SUFFIXES = (".png", ".pdf", ".svg")
GENERATED_NAME = re.compile(r"^(b|a)((?:_[0-9]+)+)$")

# LaTeX a user may choose for a symbol: what compiles in math mode with amsmath alone
LATEX_COMMANDS = frozenset("""
alpha beta gamma delta epsilon varepsilon zeta eta theta vartheta iota kappa lambda mu nu xi pi varpi
rho varrho sigma varsigma tau upsilon phi varphi chi psi omega Gamma Delta Theta Lambda Xi Pi Sigma
Upsilon Phi Psi Omega mathrm mathit mathbf mathsf mathtt mathcal boldsymbol text textrm textit
operatorname tilde widetilde hat widehat bar overline underline breve check dot ddot vec prime ell hbar
uparrow downarrow Uparrow Downarrow leftarrow rightarrow star ast circ bullet dagger ddagger infty
partial nabla imath jmath wp Re Im aleph pm mp times cdot
""".split())
LATEX_SYMBOL_ESCAPES = set(",;:! {}_|")
LATEX_FORBIDDEN = set("$%#&")


def latex_problem(text: str) -> str | None:
    """Why a user's LaTeX for a symbol would not compile in math mode (None when it would)."""
    if not text.strip():
        return "it is empty"
    if len(text) > 200:
        return "it is longer than 200 characters"
    for char in text:
        if not (char.isascii() and char.isprintable()):
            return f"it contains the character {char!r}; use ASCII LaTeX commands"
        if char in LATEX_FORBIDDEN:
            return f"'{char}' is special in LaTeX and may not stand in a symbol name"
    depth = 0
    i = 0
    while i < len(text):
        char = text[i]
        if char == "\\":
            match = re.match(r"[A-Za-z]+", text[i + 1:])
            if match:
                command = match.group(0)
                if command not in LATEX_COMMANDS:
                    return (f"\\{command} is not a command the document knows (amsmath only); use e.g. Greek "
                            "letters, \\mathrm{...}, \\tilde{...}, \\prime")
                i += 1 + len(command)
                continue
            if i + 1 >= len(text) or text[i + 1] not in LATEX_SYMBOL_ESCAPES:
                return "a backslash must start a command such as \\nu or an escape such as \\_"
            i += 2
            continue
        if char == "{":
            depth += 1
        elif char == "}":
            depth -= 1
            if depth < 0:
                return "a '}' closes a brace that was never opened"
        elif char in "^_":
            following = text[i + 1:i + 2]
            if not following or following in "}^_":
                return f"'{char}' needs something after it"
        i += 1
    if depth:
        return "a '{' is never closed"
    return None


class ProductBuilder:
    """Turns the collected statement trees into model objects. `builder` is the `_Builder` (spans,
    expressions, declared parameters and species); `names` the species in declaration order."""

    def __init__(self, builder, names: list[str]):
        self.b = builder
        self.names = names

    # -- coefficient names --------------------------------------------------------------------------
    def coefficient(self, ref) -> CoefficientName:
        word = str(ref.children[0])
        span = self.b.span(ref.children[0])
        kinds = {"b": "cluster", "a": "virial", "rho": "density", "z": "fugacity"}
        letter, _, component = word.partition("_")
        if letter not in kinds or (letter in ("b", "a") and component):
            raise InputError(f"unknown coefficient '{word}[...]'; name b[...], a[...], rho_X[...] (density of "
                             "species X) or z_X[...] (its fugacity)", span)
        index = self.b.multi_index(ref, self.names)
        kind = kinds[letter]
        if kind in ("density", "fugacity"):
            if not component:
                if len(self.names) > 1:
                    raise InputError(f"say whose {'density' if letter == 'rho' else 'fugacity'}: "
                                     f"{letter}_{self.names[0]}[...]", span)
                component = self.names[0]
            if component not in self.names:
                raise InputError(f"unknown species '{component}' in {word}", span, did_you_mean(component, self.names))
            if not index[self.names.index(component)]:
                raise InputError(f"{word}{list(index)} is zero: every term of {letter}_{component} carries at least "
                                 f"one power of {'z' if letter == 'rho' else 'rho'}_{component}", span)
        return CoefficientName(kind, index, self.b.span(ref), component or None)

    def coefficients(self, tree) -> tuple[CoefficientName, ...]:
        return tuple(self.coefficient(ref) for ref in tree.children)

    # -- values and points --------------------------------------------------------------------------
    def parameter(self, token):
        name = str(token)
        if name not in self.b.parameters:
            raise InputError(f"'{name}' is not a declared parameter", self.b.span(token),
                             did_you_mean(name, self.b.parameters))
        return self.b.parameters[name].symbol

    def number(self, tree, what: str) -> sympy.Expr:
        value = self.b.expr(tree)
        if not value.is_number or value.is_real is not True:
            raise InputError(f"{what} must be a real number", self.b.span(tree))
        return value

    def point(self, tree, taken=()) -> tuple[tuple[sympy.Symbol, sympy.Expr], ...]:
        out, seen = [], set(taken)
        for assignment in (tree.children if tree is not None else ()):
            token, value = assignment.children
            symbol = self.parameter(token)
            if symbol in seen:
                raise InputError(f"{token} is given twice", self.b.span(token))
            seen.add(symbol)
            out.append((symbol, self.within_range(token, self.number(value, f"the value of {token}"), value)))
        return tuple(out)

    def within_range(self, token, value: sympy.Expr, tree) -> sympy.Expr:
        """A value of a declared parameter, refused outside the declared range: the derivation may
        have used the range (e.g. one polynomial branch of a periodic closed form)."""
        p = self.b.parameters[str(token)]
        low = p.lower is not None and (value < p.lower or (p.lower_open and value == p.lower))
        high = p.upper is not None and (value > p.upper or (p.upper_open and value == p.upper))
        if low or high:
            interval = (("(" if p.lower_open else "[") + f"{p.lower}, {p.upper}" + (")" if p.upper_open else "]")
                        if p.lower is not None and p.upper is not None else
                        (f"above {p.lower}" if p.lower is not None else f"below {p.upper}"))
            raise InputError(f"{token} = {value} is outside its declared range {interval}; the results assume that "
                             "range (widen the `parameter` declaration)", self.b.span(tree))
        return value

    def digits(self, tree) -> int:
        if tree is None:
            return DEFAULT_DIGITS
        token = tree.children[0]
        if not 1 <= int(token) <= MAX_DIGITS:
            raise InputError(f"digits must be between 1 and {MAX_DIGITS}", self.b.span(token))
        return int(token)

    def path(self, token, suffixes=()) -> str:
        text = str(token)[1:-1]
        if not text.strip() or "\0" in text:
            raise InputError("give a file name", self.b.span(token))
        if suffixes and not text.lower().endswith(suffixes):
            raise InputError(f"a figure is written as {', '.join(suffixes)}; '{text}' has none of these endings",
                             self.b.span(token))
        return text

    # -- statements ---------------------------------------------------------------------------------
    def claim(self, tree) -> Claim:
        from ..expansions import split_truncation
        ref, value_tree, *tolerance = tree.children
        if tolerance:   # `within k errors` (products/sampled_use.py)
            from .sampled_claims import claim_tolerance
            return claim_tolerance(self, tree, tolerance[0])
        target = self.coefficient(ref)
        names = _ClaimNames({p.name: p.symbol for p in self.b.parameters.values()}, len(self.names))
        value = ExpressionBuilder(names, self.b.span).build(value_tree)
        if value.has(sympy.Order):
            exact, limits = split_truncation(value)
            orders = sympy.Add.make_args(value.getO()) if value.getO() is not None else ()
            if not limits or any(o.expr.free_symbols - set(limits) for o in orders if hasattr(o, "expr")):
                raise InputError("a claim ends in O(p^k) with p a parameter and k a whole number, e.g. "
                                 "O(alpha^3)", self.b.span(value_tree))
            value = exact
            if value.has(sympy.Order):
                raise InputError("O(...) may only end the claim", self.b.span(value_tree))
            return Claim(target, value, self.b.span(tree), tuple(sorted(limits.items(), key=lambda kv: kv[0].name)),
                         decimals=_decimals(value_tree))
        return Claim(target, value, self.b.span(tree), decimals=_decimals(value_tree), rounded=_one_decimal(value_tree))

    def evaluation(self, tree) -> Evaluation:
        targets, *rest = tree.children
        point = next((c for c in rest if c.data == "point"), None)
        digits = next((c for c in rest if c.data == "digits"), None)
        return Evaluation(self.coefficients(targets), self.point(point), self.digits(digits), self.b.span(tree))

    def table(self, tree) -> Table:
        targets, *rest = tree.children
        path = rest.pop()
        axes_trees = [c for c in rest if getattr(c, "data", None) in ("axis_steps", "axis_values")]
        point = next((c for c in rest if getattr(c, "data", None) == "point"), None)
        digits = next((c for c in rest if getattr(c, "data", None) == "digits"), None)
        axes, seen, rows = [], set(), 1
        for axis in axes_trees:
            token = axis.children[0]
            symbol = self.parameter(token)
            if symbol in seen:
                raise InputError(f"{token} is a grid axis twice", self.b.span(token))
            seen.add(symbol)
            values = self._axis_values(axis)
            rows *= len(values)
            if rows > MAX_TABLE_ROWS:
                raise InputError(f"the grid has more than {MAX_TABLE_ROWS:,} rows; use fewer points", self.b.span(axis))
            axes.append((symbol, values))
        return Table(self.coefficients(targets), tuple(axes), self.point(point, seen), self.digits(digits),
                     self.path(path), self.b.span(tree))

    def _axis_values(self, axis) -> tuple[sympy.Expr, ...]:
        name = axis.children[0]
        if axis.data == "axis_values":
            values = [self.within_range(name, self.number(v, f"a grid value of {name}"), v) for v in axis.children[1:]]
            if len(set(values)) != len(values):
                raise InputError(f"a grid value of {name} is listed twice", self.b.span(axis))
            return tuple(values)
        start, stop, step = (self.number(v, f"the grid of {name}") for v in axis.children[1:])
        if not step > 0:
            raise InputError("the step must be positive", self.b.span(axis.children[3]))
        if not stop >= start:
            raise InputError(f"the grid of {name} must go from the lower end to the upper", self.b.span(axis))
        self.within_range(name, start, axis.children[1])
        self.within_range(name, stop, axis.children[2])
        count = int(sympy.floor((stop - start) / step)) + 1
        if count > MAX_AXIS_POINTS:
            raise InputError(f"{count:,} points on the axis {name} (at most {MAX_AXIS_POINTS:,})", self.b.span(axis))
        return tuple(sympy.nsimplify(start + k * step) if not (start + k * step).is_Rational else start + k * step
                     for k in range(count))

    def figure(self, tree) -> Figure:
        targets, *rest = tree.children
        path = rest.pop()
        axes_trees = [c for c in rest if getattr(c, "data", None) == "plot_axis"]
        point = next((c for c in rest if getattr(c, "data", None) == "point"), None)
        names = self.coefficients(targets)
        if len(axes_trees) == 2 and len(names) > 1:
            raise InputError("a map over two parameters shows one coefficient; plot the others separately",
                             self.b.span(targets))
        axes, seen = [], set()
        for axis in axes_trees:
            token, *ends = axis.children
            symbol = self.parameter(token)
            if symbol in seen:
                raise InputError(f"{token} is a plot axis twice", self.b.span(token))
            seen.add(symbol)
            span = None
            if ends:
                low, high = (self.within_range(token, self.number(e, f"the plot range of {token}"), e) for e in ends)
                if not low < high:
                    raise InputError(f"the plot range of {token} must go from the lower end to the upper",
                                     self.b.span(axis))
                span = (low, high)
            axes.append((symbol, span))
        return Figure(names, tuple(axes), self.point(point, seen), self.path(path, FIGURE_SUFFIXES),
                      self.b.span(tree))

    def typesetting(self, trees) -> Typesetting:
        symbols, wavelength, seen = {}, None, set()
        for tree in trees:
            if tree.data == "typeset_wavelength":
                token = tree.children[0]
                if "wavelength" in seen:
                    raise InputError("the wavelength symbol is typeset twice", self.b.span(token))
                seen.add("wavelength")
                wavelength = self._latex(token)
                continue
            name, token = tree.children
            if str(name) not in self.b.parameters and str(name) not in self.b.species:
                raise InputError(f"'{name}' is neither a declared parameter nor a species", self.b.span(name),
                                 did_you_mean(str(name), list(self.b.parameters) + list(self.b.species)))
            if str(name) in seen:
                raise InputError(f"{name} is typeset twice", self.b.span(name))
            seen.add(str(name))
            symbols[str(name)] = self._latex(token)
        return Typesetting(tuple(sorted(symbols.items())), wavelength or Typesetting().wavelength)

    def _latex(self, token) -> str:
        text = str(token)[1:-1]
        problem = latex_problem(text)
        if problem:
            raise InputError(f"this LaTeX would not compile: {problem}", self.b.span(token))
        return text


class _ClaimNames:
    """Names a claim may use: the declared parameters and the generated b_2_1, a_3, ... of K species."""

    def __init__(self, parameters: dict, K: int):
        self.parameters, self.K = parameters, K

    def __contains__(self, name) -> bool:
        match = GENERATED_NAME.match(str(name))
        return name in self.parameters or (bool(match) and len(match.group(2).split("_")[1:]) == self.K)

    def __getitem__(self, name):
        return self.parameters[name] if name in self.parameters else sympy.Symbol(name)

    def __iter__(self):   # the names a hint may suggest
        return iter(self.parameters)


def build_products(builder, trees, names: list[str]) -> dict:
    """The product fields of `model.System` from the collected (tree, file) pairs."""
    products = ProductBuilder(builder, names)
    out = {"claims": [], "evaluations": [], "tables": [], "figures": []}
    typeset = []
    make = {"claim": ("claims", products.claim), "evaluate": ("evaluations", products.evaluation),
            "tabulate": ("tables", products.table), "plot": ("figures", products.figure)}
    presentation = []
    for tree, file in trees:
        builder.file = file
        if tree.data in make:
            field, function = make[tree.data]
            out[field].append(function(tree))
        elif tree.data in manuscript.STATEMENTS:
            presentation.append((tree, file))
        else:
            typeset.append(tree)
    builder.file = builder.main
    seen = {}
    for item in (*out["tables"], *out["figures"]):
        if item.path in seen:
            raise InputError(f"{item.path} is also written by the statement at line {seen[item.path].line}; "
                             "give each table and figure its own file", item.span)
        seen[item.path] = item.span
    result = {k: tuple(v) for k, v in out.items()}
    result["typesetting"] = products.typesetting(typeset)
    result["presentation"] = manuscript.presentation(products, presentation, latex_problem)
    return result


def product_names(fields: dict) -> list[CoefficientName]:
    """Every coefficient the products name, in statement order within each kind."""
    names = [c.target for c in fields["claims"]]
    for group in ("evaluations", "tables", "figures"):
        names += [t for item in fields[group] for t in item.targets]
    names += list(fields["presentation"].snippet) if "presentation" in fields else []
    return names


def product_order(fields: dict) -> int:
    """The highest total order any product names."""
    return max([sum(n.index) for n in product_names(fields)] + [s.order for s in fields.get("states", ())], default=0)


def _is_decimal(token) -> bool:
    return isinstance(token, lark.Token) and token.type == "NUMBER" and ("." in token or "e" in token.lower())


def _decimals(tree) -> tuple[str, ...]:
    """The decimal numbers written in an expression, in order."""
    return tuple(str(t) for t in tree.scan_values(_is_decimal)) if isinstance(tree, lark.Tree) else ()


def _one_decimal(tree) -> str | None:
    """The text (sign included) of an expression that is one nonzero decimal number, else None."""
    sign = ""
    while isinstance(tree, lark.Tree) and tree.data == "neg":
        sign = "" if sign else "-"
        tree = tree.children[0]
    if isinstance(tree, lark.Tree) and tree.data == "number" and _is_decimal(tree.children[0]):
        mantissa = str(tree.children[0]).lower().partition("e")[0]
        if not mantissa.replace(".", "").strip("0"):
            return None  # 0.0 claims that the value vanishes: exactly
        return sign + str(tree.children[0])
    return None
