"""Claims truncated in each parameter apart (`+ O(alpha^2) + O(f^2)`, a box of powers) among flux tubes:
the box holds the mixed monomial alpha f, of total degree 2, which the perturbative route derives
(docs/tubes.md (iii)); it must be used, not named as an unknown Taylor coefficient (which would leave a
wrong claim "undecided").

Outside reference: the contact law of docs/tubes.md (ii), derived there from the loops (Re X -> -|f|/2
per loop of duration 1), not from the perturbative route: the part of the anyon-tube piece even in the
flux is -|f| b_2(alpha) + O(f^2), b_2 = 1/4 - |alpha| + alpha^2/2 (Arovas, Schrieffer, Wilczek, Zee,
Nucl. Phys. B 251 (1985) 117), so its |alpha||f| coefficient is 1, and the alpha f coefficients of b[2]
on the two sides of f = 0 (alpha > 0) differ by exactly 2.
"""
import json

import sympy

GAS = """dimension 2
parameter f in {flux}
parameter alpha in [0, 1]
parameter n nonnegative
species T exchange alpha
tubes flux f coverage n
clusters pairphase
derive cluster up to 2
claim b[2] = 1/4 - alpha + n*(-f/4) * {sign} + O(alpha^2) + O(f^2) + O(n^2)
"""


def _alpha_f_coefficient(cli, tmp_path, flux, sign):
    path = tmp_path / "box.gas"
    path.write_text(GAS.format(flux=flux, sign=sign))
    result = cli("run", str(path), "--format", "json", "--no-files")
    document = json.loads(result.stdout)
    (check,) = document["checks"]
    # the claim leaves out the alpha f n term: it is wrong exactly when that term is not zero, and the
    # tool must say so (a mismatch, exit code 1), not leave a named coefficient of alpha f undecided
    assert check["status"] in ("mismatch", "proven"), check
    assert not [u for u in document.get("unknowns", {}) if "alpha_1" in u and "f_1" in u], document.get("unknowns")
    alpha, f, n = sympy.symbols("alpha f n", real=True)
    difference = sympy.expand(sympy.sympify(check.get("difference", "0"), locals={"alpha": alpha, "f": f, "n": n}))
    assert sympy.expand(difference - difference.coeff(alpha, 1).coeff(f, 1) * alpha * f) == 0, difference
    return -difference.coeff(alpha, 1).coeff(f, 1).coeff(n, 1), result.returncode


def test_box_claim_uses_the_derived_mixed_coefficient_on_both_sides_of_zero_flux(cli, tmp_path):
    above, code_above = _alpha_f_coefficient(cli, tmp_path, "[0, 1/2]", 1)
    below, code_below = _alpha_f_coefficient(cli, tmp_path, "[-1/2, 0]", -1)
    assert above - below == 2          # the |alpha||f| contact coefficient 1, counted with |f| = +-f
    assert (code_above, code_below) == ((1 if above else 0), (1 if below else 0))
