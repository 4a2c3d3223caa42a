"""How a figure looks and what is written with it, for a journal: fonts that match the document
(matplotlib's mathtext in Computer Modern by default; the LaTeX engine with `figures latex_engine`),
no text footer unless `figures footer` asks for one, every figure written both as vector PDF and as
PNG (and as SVG when its name asks for it), its caption beside it as `<name>.caption.tex` (the LaTeX
document uses the same text), and the conventions kept in each file's metadata (PDF Subject, PNG and
SVG Description), so that they can be recovered from the figure alone.

The style is applied through `matplotlib.rc_context`, which restores every setting when the figure is
saved; no backend is chosen and pyplot is not used.
"""
from __future__ import annotations

import contextlib
import io
import logging
import shutil
import subprocess
from pathlib import Path

from ..errors import InputError

CAPTION_SUFFIX = ".caption.tex"
VECTOR_AND_RASTER = (".pdf", ".png")
COMPUTER_MODERN = {
    "mathtext.fontset": "cm",
    "font.family": "serif",
    "font.serif": ["cmr10", "DejaVu Serif"],
    "axes.formatter.use_mathtext": True,   # tick labels through mathtext: Computer Modern digits
    "axes.unicode_minus": False,           # cmr10 has no Unicode minus sign
    "svg.fonttype": "path",
    "pdf.fonttype": 42,                    # TrueType in the PDF: text stays text, journals accept it
    "font.size": 11,
}


def figure_paths(path: Path) -> list[Path]:
    """Every file a figure named `path` writes: the name asked for, its PDF and PNG versions and the
    caption beside them (in that order, each once)."""
    path = Path(path)
    out = [path] + [path.with_suffix(s) for s in VECTOR_AND_RASTER if path.suffix.lower() != s]
    return out + [caption_path(path)]


def caption_path(path: Path) -> Path:
    return Path(path).with_suffix(CAPTION_SUFFIX)


def engine_missing() -> str | None:
    """What matplotlib's LaTeX engine needs for PDF and PNG and does not find (None: all there)."""
    missing = [tool for tool in ("latex", "dvipng", "kpsewhich") if shutil.which(tool) is None]
    if not missing:
        found = subprocess.run(["kpsewhich", "type1ec.sty"], capture_output=True, text=True).stdout.strip()
        missing += [] if found else ["the cm-super fonts (type1ec.sty)"]
    return ", ".join(missing) or None


@contextlib.contextmanager
def style(options=()):
    """The figure style as a context (matplotlib settings restored on leaving)."""
    import matplotlib
    settings = dict(COMPUTER_MODERN)
    if "latex_engine" in options:
        missing = engine_missing()
        if missing:
            raise InputError(f"`figures latex_engine` needs {missing}; install it or leave the option out "
                             "(the default draws with mathtext in Computer Modern)")
        settings.update({"text.usetex": True, "font.serif": ["Computer Modern Roman"],
                         "text.latex.preamble": r"\usepackage{amsmath}"})
    with matplotlib.rc_context(settings):
        yield


def metadata(fmt: str, title: str, description: str) -> dict | None:
    """File metadata without a date (same input, same bytes): the title and the conventions."""
    if fmt == "pdf":
        return {"Title": title, "Subject": description, "Creator": "clusterexp", "Producer": "clusterexp",
                "CreationDate": None}
    if fmt == "png":
        return {"Title": title, "Description": description, "Software": "clusterexp"}
    if fmt == "svg":
        return {"Title": title, "Description": description, "Date": None, "Creator": "clusterexp"}
    return None


def save_all(figure, path: Path, title: str, description: str, write, options=(), caption_tex: str | None = None):
    """Render `figure` into every file of `figure_paths(path)` and hand each (path, bytes) to `write`;
    `description` (plain text: conventions, fixed values) goes into the metadata, `caption_tex` (when
    given) into the caption file."""
    formats = {p.suffix.lower().lstrip("."): p for p in figure_paths(path)[:-1]}
    fonts = logging.getLogger("fontTools")   # subsetting the TrueType fonts logs their old timestamps
    level = fonts.level
    fonts.setLevel(logging.ERROR)
    try:
        rendered = {}
        for fmt in formats:
            buffer = io.BytesIO()
            figure.savefig(buffer, format=fmt, dpi=300 if fmt == "png" else 150,
                           metadata=metadata(fmt, title, description))
            rendered[fmt] = buffer.getvalue()
    finally:
        fonts.setLevel(level)
    for fmt, target in formats.items():
        write(target, rendered[fmt])
    if caption_tex is not None:
        write(caption_path(path), (caption_tex.rstrip("\n") + "\n").encode("utf-8"))
