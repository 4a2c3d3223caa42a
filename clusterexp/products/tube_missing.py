"""Why a tube piece has no value at a point, in the user's words (`products.sampled_use`): the parameters
it still needs, where it is exactly known, and the `sample` statement that would estimate it (or, for the
four-body pieces of `tubes ... to order 2`, that none does yet)."""
from __future__ import annotations

import sympy

from ..naming import bracket_label
from ..routes.tube_pieces import tube_piece


def point_text(point: dict) -> str:
    return ", ".join(f"{s.name} = {sympy.sstr(v)}" for s, v in sorted(point.items(), key=lambda kv: kv[0].name))


def sampled_in(system, piece) -> str:
    """A coefficient that holds the piece and that `sample` takes: b[l e_i] of the first bose/fermi
    species (T_two_tubes), b[2 e_i] of the anyons (B_anyon_tube_<i>), b[e_A + e_B] of the pair."""
    from ..exact.periods import species_statistics
    found = tube_piece(piece)
    names = system.species_names
    index = [0] * len(names)
    if found.pair is not None:
        for name in found.pair_of(system):
            index[names.index(name)] = 1
    elif found.species is not None:
        index[names.index(found.species)] = 2
    else:
        params = {p.symbol: p for p in system.parameters}
        ideal = [k for k, s in enumerate(system.species) if species_statistics(s, params) in ("bose", "fermi")]
        index[ideal[0] if ideal else 0] = 1
    return f"b{bracket_label(tuple(index))}"


def _exact_where(piece) -> str:
    found = tube_piece(piece)
    if found.pair is not None:
        return "at an integer flux or an integer mutual parameter"
    if found.species is not None:
        return f"at an integer flux or where {found.species} is a boson or a fermion"
    return "at an integer flux"


def missing_piece(system, piece, point: dict) -> str:
    """Why `piece` has no value at `point`, and the `sample` statement that would give it one."""
    found = tube_piece(piece)
    definitions = found.definitions(system)
    depends = sorted(set().union(*(sympy.sympify(e).free_symbols for _, e in definitions)), key=lambda s: s.name)
    unset = [s.name for s in depends if s not in point]
    if unset:
        return (f"{piece} depends on {', '.join(unset)} (through the "
                f"{', '.join(kind for kind, e in definitions if sympy.sympify(e).free_symbols)}): give "
                f"{'it a value' if len(unset) == 1 else 'them values'}")
    head = f"no value for {piece} at {point_text(point) or 'this point'}: it is known exactly only {_exact_where(piece)}"
    if system.tubes.order == 2 and (found.species is not None or found.pair is not None):
        return head + (", and with `to order 2` the loop estimator does not sample the pieces of b[2] of anyons and "
                       "b[1,1] (not supported yet: declare the tubes without `to order 2` to sample them through the "
                       "first order in the coverage)")
    at = ", ".join(f"{s.name} = {sympy.sstr(point[s])}" for s in depends)
    statement = f"sample {sampled_in(system, piece)}" + (f" at {at}" if at else "")
    return head + (f", and no `sample` statement of this input estimates it there; add `{statement}` (or put the point "
                   "into a `sample ... over` list)")
