"""Flux tubes in the input language: what is refused, where, and with what it says is supported
(issue on the three-body problems with tubes; docs/tubes.md)."""
import pytest

import clusterexp
from clusterexp import InputError


@pytest.mark.parametrize("text, needle, where", [
    # tubes with a non-planar dimension: refused at the tubes line, saying what is supported
    ("dimension 3 parameter n species A bose\ntubes flux 1/2 coverage n clusters pairphase",
     "flux tubes thread the plane", "2:1"),
    ("dimension 1 parameter n species A fermi\ntubes flux 1/3 coverage n clusters pairphase",
     "declare `dimension 2`, not 1", "2:1"),
    # a parameter named like a tube piece would be taken for the unknown piece
    ("dimension 2 parameter n\nparameter T_two_tubes species A bose tubes flux 1/2 coverage n clusters pairphase",
     "is the name of a tube piece here", "2:11"),
])
def test_tube_requests_refused_at_their_line(text, needle, where):
    with pytest.raises(InputError) as caught:
        clusterexp.derive(text)
    assert needle in str(caught.value)
    assert str(caught.value.span).endswith(where)
    assert "supported" in str(caught.value) or "choose another name" in str(caught.value)


def test_cli_refusal_has_caret_and_exit_code_2(cli):
    result = cli("run", "-e", "dimension 3 parameter n species A bose tubes flux 1/2 coverage n clusters pairphase "
                 "derive virial up to 2")
    assert result.returncode == 2
    assert "flux tubes thread the plane" in result.stderr and "^" in result.stderr
    assert "Traceback" not in result.stderr
