"""Figure conventions of the API: widths a paper uses, heights and font sizes that follow, formats.

Inside
------
- :data:`WIDTHS` -- the named widths: ``single`` (one column of a
  two-column page, 3.4 in) and ``double`` (the full text width, 7.0 in).
- :data:`DEFAULT_WIDTH` -- ``"single"``: every figure opens at one column.
- :data:`MIN_WIDTH`, :data:`MAX_WIDTH` -- the widths accepted (inches).
- :func:`figure_width` -- a width in inches from ``"single"``, ``"double"``,
  a number of inches (``4.5``, ``"4.5in"``) or millimetres / centimetres
  (``"89mm"``, ``"8.9cm"``); anything else is refused in one line.
- :class:`FigureStyle` -- one figure's width, the heights that go with it
  and its font sizes (relative to the width, never below 6 pt at one column).
- :data:`FIGURE_FORMATS`, :func:`figure_format` -- PNG, SVG or PDF, chosen by
  the file's extension.
- :func:`new_figure`, :func:`save_figure` -- a matplotlib figure of exactly
  the style's size (constrained layout, no pyplot state), written
  atomically: PNG at :data:`PNG_DPI`, SVG with its text kept as text, PDF
  with TrueType fonts; no run-dependent metadata.

The saved file has the size asked for: the layout fits everything (legends
placed outside the axes included) inside the figure, and files are saved
without cropping, so an SVG says ``width="244.8pt"`` for ``single``.
"""

from __future__ import annotations

import math
import os
import re
from dataclasses import dataclass
from pathlib import Path

from .errors import InputError
from .files import atomic_write
from .limits import quote

__all__ = [
    "WIDTHS",
    "DEFAULT_WIDTH",
    "MIN_WIDTH",
    "MAX_WIDTH",
    "WIDTH_HELP",
    "FIGURE_FORMATS",
    "PNG_DPI",
    "figure_width",
    "figure_format",
    "FigureStyle",
    "new_figure",
    "save_figure",
]

#: Named figure widths in inches: one column of a two-column page, the full text width.
#: (common practice, no source: 3.3-3.5 in and 6.7-7.2 in are the usual column and page
#: widths of two-column journals)
WIDTHS = {"single": 3.4, "double": 7.0}

#: Width of a figure when none is asked for: one column.
DEFAULT_WIDTH = "single"

#: Narrowest and widest figure accepted, in inches.
MIN_WIDTH = 2.0
MAX_WIDTH = 10.0

#: How a width is written (help texts and error messages say the same).
WIDTH_HELP = (
    f"single ({WIDTHS['single']} in, one column), double ({WIDTHS['double']} in, the page) "
    f"or inches from {MIN_WIDTH:g} to {MAX_WIDTH:g} (4.5, 4.5in, 89mm, 8.9cm)"
)

#: Figure formats, chosen by the file's extension.
FIGURE_FORMATS = ("png", "svg", "pdf")

#: Resolution of PNG files (dots per inch): what journals ask of raster figures.
PNG_DPI = 300

_UNITS = {"": 1.0, "in": 1.0, "mm": 1 / 25.4, "cm": 1 / 2.54}
_WIDTH_TEXT = re.compile(r"\s*(\d+(?:\.\d*)?|\.\d+)\s*(in|mm|cm)?\s*", re.IGNORECASE)


def figure_width(width: str | float | int = DEFAULT_WIDTH, what: str = "width") -> float:
    """A figure width in inches.

    Parameters
    ----------
    width : str or float
        ``"single"``, ``"double"``, a number of inches, or a text giving a
        number with ``in``, ``mm`` or ``cm``.
    what : str
        The parameter's name in a refusal (the command line's ``--width``,
        a study's ``width``): one wording everywhere.

    Returns
    -------
    float
        Inches, from :data:`MIN_WIDTH` to :data:`MAX_WIDTH`.

    Raises
    ------
    InputError
        Anything else (one line naming what is accepted).

    Examples
    --------
    >>> figure_width("single"), figure_width("double"), figure_width("4.5")
    (3.4, 7.0, 4.5)
    >>> round(figure_width("89mm"), 3), figure_width(5)
    (3.504, 5.0)
    >>> figure_width("wide")
    Traceback (most recent call last):
    ...
    cyclewright.cycles.errors.InputError: width must be single (3.4 in, one column), double (7.0 in, the page) or inches from 2 to 10 (4.5, 4.5in, 89mm, 8.9cm), got 'wide'
    """
    if isinstance(width, bool):
        inches = None
    elif isinstance(width, (int, float)):
        inches = float(width)
    elif isinstance(width, str):
        named = WIDTHS.get(width.strip().lower())
        if named is not None:
            return named
        m = _WIDTH_TEXT.fullmatch(width)
        inches = float(m.group(1)) * _UNITS[(m.group(2) or "").lower()] if m else None
    else:
        inches = None
    if isinstance(width, str):  # a width written as one shows as written, other text quoted
        shown = width.strip() if _WIDTH_TEXT.fullmatch(width) else quote(width)
    else:
        shown = (
            f"{width:g}"
            if isinstance(width, (int, float)) and not isinstance(width, bool)
            else repr(width)
        )
    if inches is None or not math.isfinite(inches):
        raise InputError(f"{what} must be {WIDTH_HELP}, got {shown}", param=what)
    if not MIN_WIDTH <= inches <= MAX_WIDTH:
        raise InputError(
            f"{what} must be from {MIN_WIDTH:g} to {MAX_WIDTH:g} inches "
            f"(single is {WIDTHS['single']}, double {WIDTHS['double']}), got {shown}",
            param=what,
        )
    return inches


def figure_format(path: str | os.PathLike) -> str:
    """``png``, ``svg`` or ``pdf`` from the file's extension (one-line :class:`InputError` otherwise).

    >>> figure_format("a/b.SVG")
    'svg'
    """
    ext = Path(path).suffix.lower().lstrip(".")
    if ext not in FIGURE_FORMATS:
        raise InputError(
            f"plot file {str(path)[-80:]}: the extension must be .png, .svg or .pdf "
            "(it chooses the format)"
        )
    return ext


@dataclass(frozen=True)
class FigureStyle:
    """The size and font sizes of one figure.

    Heights are given for one column and grow with the square root of the
    width, so a double-width figure is wider rather than much taller. Font
    sizes grow with the fourth root of the width (8 pt labels at one column,
    9.6 pt at the page's width): text read at print size stays readable, and
    no font is smaller than 6 pt at one column.

    Attributes
    ----------
    width : float
        Inches.

    Examples
    --------
    >>> s = FigureStyle.of("double")
    >>> s.width, round(s.height(2.4), 2), round(s.label, 1)
    (7.0, 3.44, 9.6)
    >>> FigureStyle.of("single").label
    8.0
    """

    width: float

    @classmethod
    def of(cls, width: str | float | int = DEFAULT_WIDTH) -> FigureStyle:
        """The style of a figure ``width`` wide (see :func:`figure_width`)."""
        return cls(figure_width(width))

    @property
    def scale(self) -> float:
        """This width over one column's, to the power 1/4 (the font scale)."""
        return (self.width / WIDTHS["single"]) ** 0.25

    def height(self, single: float) -> float:
        """The height (inches) of a figure that is ``single`` inches high at one column."""
        return single * math.sqrt(self.width / WIDTHS["single"])

    def _pt(self, size: float) -> float:
        return round(size * self.scale, 1)

    @property
    def title(self) -> float:
        return self._pt(8.0)

    @property
    def label(self) -> float:
        return self._pt(8.0)

    @property
    def tick(self) -> float:
        return self._pt(7.0)

    @property
    def legend(self) -> float:
        return self._pt(6.5)

    @property
    def small(self) -> float:
        """Annotations inside the axes."""
        return self._pt(6.0)

    def columns(self, panel: float, most: int) -> int:
        """How many panels of at least ``panel`` inches fit side by side (1 .. ``most``)."""
        return max(1, min(most, int(self.width // panel)))


def new_figure(style: FigureStyle, height: float):
    """A matplotlib :class:`~matplotlib.figure.Figure` ``style.width`` by ``height`` inches.

    Drawn with the Agg canvas and the constrained layout (which keeps labels
    and legends outside the axes inside the figure), never through pyplot,
    so the caller's backend and figures are untouched.
    """
    from matplotlib.backends.backend_agg import FigureCanvasAgg
    from matplotlib.figure import Figure

    fig = Figure(figsize=(style.width, height), dpi=PNG_DPI, layout="constrained")
    fig.get_layout_engine().set(w_pad=0.02, h_pad=0.02, wspace=0.04, hspace=0.04)
    FigureCanvasAgg(fig)
    return fig


def save_figure(fig, path: str | os.PathLike) -> Path:
    """Write ``fig`` atomically in the format its extension names (PNG, SVG or PDF).

    The file has the figure's size exactly (no cropping). SVG text stays
    text (searchable, editable); PDF fonts are embedded as TrueType
    (Type 42), which journals accept; no creation dates or software names,
    so the same figure gives the same bytes.
    """
    import matplotlib

    fmt = figure_format(path)
    meta = {
        "png": {"Software": None},
        "svg": {"Creator": None, "Date": None},
        "pdf": {"Creator": None, "Producer": None, "CreationDate": None},
    }[fmt]
    rc = {"svg.fonttype": "none", "pdf.fonttype": 42, "ps.fonttype": 42, "svg.hashsalt": "cw"}

    def write(tmp: str) -> None:
        with matplotlib.rc_context(rc):
            fig.savefig(tmp, format=fmt, metadata=meta, dpi=PNG_DPI)

    target = Path(path)
    directory = target.parent if str(target.parent) else Path(".")
    if not directory.is_dir():
        raise InputError(f"cannot write {target}: directory {directory} does not exist")
    return atomic_write(target, write)
