"""The Taylor polynomials that the derivation routes supply for named pieces, in the shifts of the
expansion variables (`pieces.derived_taylor`): how a parameter deviates from its boson, fermion or
integer point, the route's monomials (with |x| at kinks) turned into powers of the shifts, and the tube
pieces' coefficients (`routes.tube_perturbative`, docs/tubes.md (iii))."""
from __future__ import annotations

import sympy


def deviation(expr, point, shift, side):
    """(value at the point, (deviation linear in one shift, sign of |deviation| on the side) or None when
    it does not move), or None where the route does not apply (not an integer there, not linear)."""
    expr = sympy.sympify(expr)
    at = expr.subs(point)
    if not at.is_Integer or not expr.free_symbols <= set(point):
        return None
    dev = sympy.expand(expr.subs({v: point[v] + shift[v] for v in point}) - at)
    if dev == 0:
        return at, None
    variables = [v for v in point if dev.has(shift[v])]
    if len(variables) != 1 or not dev.is_polynomial(shift[variables[0]]) \
            or sympy.degree(dev, shift[variables[0]]) != 1:
        return None
    slope = dev.coeff(shift[variables[0]])
    if not slope.is_Rational:
        return None
    if side[variables[0]] is None:   # analytic there: no |deviation| may appear (checked below)
        return at, (dev, None)
    sign = (1 if slope > 0 else -1) * (1 if side[variables[0]] == "above" else -1)
    return at, (dev, sign)


def tube_taylor(system, tube, deviation, mass, order, shifts, cycle=None):
    """derived_taylor for a tube piece, or for the coverage (tube.tubes = 1) or coverage-squared (2) part
    of b_l of one species (the anyon kind with cycle = l) or of b_{a e_A + b e_B} of two braiding species
    (the braid kind with cycle = (a, b)):
    about an integer flux and, for the anyons, their boson or fermion point, for the braid pieces an
    integer mutual parameter and each species with two or more particles at its boson or fermion point
    (docs/tubes.md (iii))."""
    from .routes.tube_perturbative import EXCHANGE, FLUX, MUTUAL, tube_coefficients
    kind, about, masses, deviations = "two_tubes", "boson", (1, 1), {}
    wanted = [(FLUX, system.tubes.flux)]
    if tube.species is not None:
        kind = "anyon"
        anyon = system.species[system.species_names.index(tube.species)]
        wanted.append((EXCHANGE, anyon.exchange))
        if tube.tubes == 2:   # the coverage-squared part depends on m/m_ref
            masses = (mass(anyon.mass), 1)
            if None in masses:
                return None
    elif tube.pair is not None:
        kind = "braid"
        pair = tube.pair_of(system)
        wanted.append((MUTUAL, system.mutual(*pair)))
        masses = tuple(mass(system.species[system.species_names.index(name)].mass) for name in pair)
        if None in masses:
            return None
        points = []
        for name, count in zip(pair, cycle or (1, 1)):
            found = deviation(system.species[system.species_names.index(name)].exchange) if count >= 2 else (0, None)
            if found is None:   # an anyon away from its boson/fermion point: not this route's expansion
                return None
            points.append("boson" if found[0] % 2 == 0 else "fermion")   # no exchange term at this order
        about = tuple(points)
    for symbol, expr in wanted:
        found = deviation(expr)
        if found is None:
            return None
        if symbol is EXCHANGE:
            about = "boson" if found[0] % 2 == 0 else "fermion"
        if found[1]:
            deviations[symbol] = found[1]
    still = {x: 0 for x in (FLUX, EXCHANGE, MUTUAL) if x not in deviations}
    terms = {m.xreplace(still): v for m, v in tube_coefficients(kind, about, masses, order, cycle, tube.tubes).items()}
    found = in_shifts({m: v for m, v in terms.items() if m != 0}, deviations, shifts)
    return None if found is None else (found[0], order, found[1])


def in_shifts(terms, deviations, shifts):
    """The route's {monomial: value} in the expansion variables' shifts: ({powers: value} known, the
    powers not derived), or None where a |deviation| meets a point the caller took for analytic. A value
    is a number or a named Symbol (not derived: every power it reaches stays unknown)."""
    polynomial, missing = sympy.Integer(0), set()
    for monomial, value in terms.items():
        if value == 0:
            continue
        if any(deviations[a.args[0]][1] is None for a in monomial.atoms(sympy.Abs)):
            return None   # a kink the caller took for an analytic point
        term = monomial.replace(sympy.Abs, lambda x: deviations[x][1] * x)
        term = sympy.expand(term.xreplace({x: dev for x, (dev, _) in deviations.items()}))
        if isinstance(value, sympy.Symbol):
            missing.update(sympy.Poly(term, *shifts).monoms())
            continue
        polynomial += value * term
    polynomial = sympy.Poly(sympy.expand(polynomial), *shifts)
    known = {powers: c for powers, c in zip(polynomial.monoms(), polynomial.coeffs()) if powers not in missing}
    return known, frozenset(missing)


def coverage_part_at(system, root, power: int, point, value_of_root):
    """The exact value at `point` ({parameter: exact number}) of the coefficient of coverage^power in the
    generated b piece `root` (power 0: the tube-free piece), where it is known, else None: every power
    >= 1 is 0 at an integer flux (no Aharonov-Bohm phase on any loop: the tubes drop out), and where the
    regime knows the whole b at the point (`value_of_root`: its species bosons or fermions there, b_l =
    (+-1)^(l+1)[r/l^2 + n F/l + ...], or species that do not braid, b = 0) the coefficient is read off.
    The pieces are continuous in the statistics parameters and the flux, so this is also the order-0
    Taylor coefficient from either side."""
    from .routes.tube_pieces import _exactly_integer
    coverage = system.tubes.coverage
    if power >= 1 and _exactly_integer(sympy.sympify(system.tubes.flux).subs(point)):
        return sympy.Integer(0)
    point = {v: p for v, p in point.items() if v != coverage}   # the part, not the whole at that coverage
    whole = value_of_root(system, root, point)
    if whole is None:
        return None
    whole = sympy.expand(sympy.sympify(whole).removeO() if hasattr(whole, "removeO") else whole)
    if not whole.is_polynomial(coverage):
        return None
    part = sympy.Poly(whole, coverage).coeff_monomial(coverage ** power)
    from .routes.tube_pieces import tube_piece
    if any(tube_piece(s) is not None for s in sympy.sympify(part).free_symbols):
        return None   # a sampled tube piece (T_two_tubes in the n^2 part): not an exact value
    return sympy.expand(part)


def line_coefficient(line, rest):
    """The coefficient of prod (v - p)^e in `line`, the exact value of a piece on the whole line (or plane)
    where the other expansion variables sit at their points, a function of the variables `rest` ([(v, p,
    e, side)], side "above"/"below" at a kink, else None): the periodic parts frozen on each side, then
    the Taylor coefficient of what is left; None when that is not a polynomial there."""
    from .exact.periods import frozen_at
    eps = sympy.Rational(1, 10 ** 9)
    probes = {v: p + (-eps if s == "below" else eps if s == "above" else 0) for v, p, _, s in rest}
    frozen, undecided = frozen_at(sympy.sympify(line), probes)
    if undecided is not None:
        return None
    shifts = {v: sympy.Symbol(f"u_{v.name}") for v, _, _, _ in rest}
    shifted = sympy.expand(frozen.subs({v: p + shifts[v] for v, p, _, _ in rest}, simultaneous=True))
    if not shifted.is_polynomial(*shifts.values()):
        return None
    poly = sympy.Poly(shifted, *shifts.values())
    return sympy.expand(poly.coeff_monomial(sympy.Mul(*(shifts[v] ** e for v, _, e, _ in rest))))


def expanded(expr: sympy.Expr) -> sympy.Expr:
    """sympy.expand(expr), by ring arithmetic over QQ in its symbols where expr is a polynomial in them
    with rational coefficients (many times faster for the virial coefficients' products of pieces)."""
    from sympy.polys.rings import ring
    symbols = sorted(expr.free_symbols, key=lambda x: x.name)
    if symbols:
        try:
            R, *_ = ring(symbols, sympy.QQ)
            return R(expr).as_expr()
        except Exception:  # noqa: BLE001 - not a polynomial over QQ in its symbols: sympy's expand
            pass
    return sympy.expand(expr)


def carried(coefficient, numbers: dict) -> sympy.Expr:
    """`coefficient` with each irrational numeric factor of its terms (sqrt(3), log(2 + sqrt(3)): the closed
    forms of docs/perturbative.md 4k) replaced by a symbol from `numbers` (filled here): sympy expands
    products of such numbers slowly, so they are put back only after the expansion."""
    coefficient = sympy.sympify(coefficient)
    if coefficient.is_Rational:
        return coefficient
    coefficient = sympy.expand(coefficient)
    for term in sympy.Add.make_args(coefficient):
        for factor in sympy.Mul.make_args(term):
            if factor.is_number and not factor.is_Rational:
                numbers.setdefault(factor, sympy.Dummy("number"))
    return coefficient.xreplace(numbers)

