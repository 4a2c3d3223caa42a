"""`claim c = value within k errors`: a claim compared with Monte Carlo numbers at a stated tolerance
(k standard errors; products/sampled_use.py decides it)."""
from __future__ import annotations

import math
from dataclasses import replace

import lark

from ..errors import InputError


def claim_tolerance(products, tree, token):
    """The claim of `tree` without its tolerance, then the tolerance k attached (k > 0, finite)."""
    k = float(str(token))
    if not (math.isfinite(k) and k > 0):
        raise InputError("`within k errors` needs a positive number of standard errors, e.g. `within 3 errors`",
                         products.b.span(token))
    claim = products.claim(lark.Tree(tree.data, tree.children[:2], tree.meta))
    return replace(claim, errors=k)
