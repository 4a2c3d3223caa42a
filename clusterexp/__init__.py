"""clusterexp: exact cluster and virial expansions of gases with statistical pair phases.

Front door:

    >>> import clusterexp
    >>> d = clusterexp.derive("dimension 2 species A bose clusters generic derive virial up to 3")
    >>> d.value("virial", (3,))
    4*b_2**2 - 2*b_3

Each stage is public too: `build_system` (text -> validated model), `derive_system`
(model -> `Derivation`), and the printers in `clusterexp.export`.
"""
from __future__ import annotations

from pathlib import Path

from .errors import InputError, NotSupportedYet
from .results import Coefficient, Derivation

__version__ = "0.1.0"


def __getattr__(name: str):
    # the language stages load lark and the grammar; import them on first use only
    if name in ("build_system", "build_system_from_file"):
        from .language import build
        return getattr(build, name)
    if name == "derive_system":
        from .derivation import derive_system
        return derive_system
    raise AttributeError(f"module 'clusterexp' has no attribute {name!r}")


def derive(text: str, filename: str = "<input>", base_dir: str | Path | None = None,
           size_limit: int | None = None, progress=None) -> Derivation:
    """Parse, validate and derive an input given as text. `size_limit` (estimated terms) overrides
    the default and the input's own `size limit`; `progress` is a `progress.Progress`."""
    from .language.build import build_system
    from .derivation import derive_system
    return derive_system(build_system(text, filename, Path(base_dir) if base_dir else None), size_limit, progress)


def derive_file(path: str | Path, size_limit: int | None = None, progress=None) -> Derivation:
    """Parse, validate and derive an input file."""
    from .language.build import build_system_from_file
    from .derivation import derive_system
    return derive_system(build_system_from_file(Path(path)), size_limit, progress)


__all__ = ["Coefficient", "Derivation", "InputError", "NotSupportedYet", "build_system",
           "build_system_from_file", "derive", "derive_file", "derive_system"]
