"""Notebook helpers: set-up, parameters, messages, progress and figure display.

The study notebooks in ``studies/`` call only this module,
:mod:`bridgeopt.study.options`, :mod:`bridgeopt.workbook.plots` and :mod:`bridgeopt.workbook.charts`.

* :func:`setup` makes plotly figures show in JupyterLab *and* survive export to
  HTML with plotly.js inlined (never a CDN, never MathJax from the web).
* :func:`param` reads a ``BRIDGEOPT_<NAME>`` environment override in a
  notebook's ``parameters`` cell; :func:`fast_mode` is ``BRIDGEOPT_FAST=1``
  (small grids for tests); :func:`report_mode` is ``BRIDGEOPT_REPORT=1``
  (set by ``bridgeopt report``: figures are shown as static outputs, no live
  widgets, so the exported file is complete without a kernel).
* :func:`error_text` turns an error into one readable line; callbacks built
  here show it in the notebook, never only in a log console.
* :func:`sweep` runs a study sweep under a progress bar.

The interactive explorer is in :mod:`bridgeopt.workbook.explorer`.
"""

from __future__ import annotations

import html
import os
import subprocess
import sys
from pathlib import Path
from typing import Any, Callable

from bridgeopt.cautions import CAUTION_LINES
from bridgeopt.workbook.params import convert_text
from bridgeopt.errors import BridgeoptError, InputError, SolveError

__all__ = ["setup", "param", "fast_mode", "report_mode", "error_text", "message_html",
           "cautions_html", "forms_note", "scenario_html", "results_html", "number",
           "show", "show_cautions", "sweep", "export_button", "RENDERER"]

#: Name of the plotly renderer registered by :func:`setup`.
RENDERER = "bridgeopt_offline"


def _offline_renderer():
    """A notebook renderer writing plotly's HTML without plotly.js and without MathJax.

    plotly.js is written once by :func:`setup`; the stock notebook renderer
    would add a MathJax script from a CDN to every figure, and writes
    plotly.js only on the first figure shown (inside a widget, where an
    exported file loses it).
    """
    import plotly.io as pio
    from plotly.io._base_renderers import HtmlRenderer

    class OfflineNotebookRenderer(HtmlRenderer):
        def to_mimebundle(self, fig_dict):
            text = pio.to_html(fig_dict, config=self.config, include_plotlyjs=False,
                               include_mathjax=False, full_html=False, default_width="100%",
                               default_height=480, validate=False)
            return {"text/html": text}

    return OfflineNotebookRenderer(config={"displaylogo": False, "responsive": True},
                                   global_init=False)


def setup() -> None:
    """Prepare plotly for the notebook: JupyterLab's own view plus self-contained HTML.

    Registers :data:`RENDERER`, makes ``"plotly_mimetype+bridgeopt_offline"``
    the default renderer and writes plotly.js into this cell's output once, so
    an exported HTML file draws every figure with no network.
    """
    import plotly.io as pio
    from IPython.display import HTML, display
    from plotly.offline import get_plotlyjs

    if RENDERER not in pio.renderers:
        pio.renderers[RENDERER] = _offline_renderer()
    pio.renderers.default = f"plotly_mimetype+{RENDERER}"
    display(HTML('<script type="text/javascript">window.PlotlyConfig = {MathJaxConfig: '
                 f"'local'}};</script>\n<script type=\"text/javascript\">{get_plotlyjs()}"
                 "</script>"))


def _flag(name: str) -> bool:
    return os.environ.get(name, "").strip().lower() in ("1", "true", "yes", "on")


def fast_mode() -> bool:
    """True when ``BRIDGEOPT_FAST`` is set (tests: coarse grids, few sweep points).

    Returns
    -------
    bool
    """
    return _flag("BRIDGEOPT_FAST")


def report_mode() -> bool:
    """True when ``BRIDGEOPT_REPORT`` is set (static figures, no live widgets).

    Returns
    -------
    bool
    """
    return _flag("BRIDGEOPT_REPORT")


def param(name: str, default: Any, fast: Any = None) -> Any:
    """A notebook parameter: ``BRIDGEOPT_<NAME>`` from the environment, else a default.

    Parameters
    ----------
    name : str
        Parameter name, e.g. ``"span"`` (read from ``BRIDGEOPT_SPAN``).
    default : object
        Value used normally; its type (bool, int, float, str, or a list of
        numbers written comma-separated) converts the environment text.
    fast : object, optional
        Value used in :func:`fast_mode` when the environment does not set one.

    Returns
    -------
    object
        Of the type of ``default``, in the notebook's (SI) unit for it: m, N/m ...

    Raises
    ------
    InputError
        The environment value cannot be converted.
    """
    key = "BRIDGEOPT_" + name.upper()
    text = os.environ.get(key)
    if text is None:
        return fast if (fast is not None and fast_mode()) else default
    try:
        return convert_text(text, default)
    except ValueError:
        raise InputError(key, text, f"a value like {default!r}") from None


def error_text(err: BaseException) -> str:
    """One readable line for ``err``.

    Parameters
    ----------
    err : BaseException
        Any error; :class:`SolveError` and :class:`InputError` get their own wording.

    Returns
    -------
    str
    """
    if isinstance(err, SolveError):
        return f"The solve failed ({err.status}): {err.message}"
    if isinstance(err, InputError):
        return f"Invalid input: {err}"
    if isinstance(err, BridgeoptError):
        return str(err)
    return f"Internal error ({type(err).__name__}): {err}"


def message_html(text: str, kind: str = "error") -> str:
    """``text`` as a boxed HTML paragraph.

    Parameters
    ----------
    text : str
        Plain text (HTML-escaped here).
    kind : {"error", "note", "ok"}
        Colour of the box: rust, blue or green.

    Returns
    -------
    str
    """
    colour = {"error": "#9a3412", "note": "#1f5c99", "ok": "#2f6b3a"}.get(kind, "#333333")
    return (f'<div class="bridgeopt-{kind}" style="border-left:4px solid {colour};'
            f'padding:4px 10px;margin:4px 0;color:{colour}">{html.escape(text)}</div>')


def cautions_html() -> str:
    """The cautions as an HTML block.

    Returns
    -------
    str
        An HTML ``<div>`` holding the list of :data:`~bridgeopt.cautions.CAUTION_LINES`.
    """
    items = "".join(f"<li>{html.escape(c)}</li>" for c in CAUTION_LINES)
    return f'<div class="bridgeopt-cautions"><b>Cautions</b><ul>{items}</ul></div>'


def forms_note(forms) -> str:
    """HTML note naming the forms of ``forms`` that are not available yet ("" if none).

    Parameters
    ----------
    forms : iterable of str
        Form names as a study lists them (``"cable-stayed"``, ``"suspension"`` ...).

    Returns
    -------
    str
    """
    from bridgeopt.study.options import FORM_SOLVERS

    missing = [f for f in forms if f not in FORM_SOLVERS]
    if not missing:
        return ""
    return message_html("Not yet available in this version (shown when their solvers are "
                        "registered): " + ", ".join(missing) + ". Only the reference optimum "
                        "is drawn for them.", "note")


def scenario_html(bridge, source: str | os.PathLike | None = None) -> str:
    """One paragraph stating the scenario of a report, with units.

    Parameters
    ----------
    bridge : BridgeScenario
        The crossing of the report (span, rise, depth, deck load, material).
    source : path, optional
        The scenario file, named at the end of the paragraph.

    Returns
    -------
    str
        An HTML ``<p>``; lengths in m, deck load in kN/m, stress in MPa.
    """
    kind = {"single": "a single span between anchored abutments",
            "repeating": "one span of a long run of equal spans"}.get(bridge.arrangement,
                                                                      bridge.arrangement)
    text = (f"Scenario: {bridge.name}, {kind}, span {bridge.span:,.0f} m, structure allowed "
            f"{bridge.rise:,.0f} m above and {bridge.depth:,.0f} m below the deck, deck load "
            f"{bridge.deck_load / 1e3:,.0f} kN/m, {bridge.material.name} "
            f"({bridge.material.tension_strength / 1e6:,.0f} MPa, "
            f"{bridge.material.density:,.0f} kg/m3), grid of {bridge.divisions} divisions.")
    if source is not None:
        text += f" Scenario file: {Path(source).name}."
    return f"<p>{html.escape(text)}</p>"


def number(value) -> str:
    """A table cell: numbers to 6 significant figures with thousands separators.

    Parameters
    ----------
    value : object
        The cell's value; anything but an int or a float is shown as ``str(value)``.

    Returns
    -------
    str
    """
    if isinstance(value, bool) or not isinstance(value, (int, float)):
        return str(value)
    return f"{value:,.6g}" if isinstance(value, float) else f"{value:,d}"


def results_html(table) -> str:
    """The comparison's headline numbers as a sentence per option.

    Parameters
    ----------
    table : pandas.DataFrame
        :func:`bridgeopt.study.options.compare` output (``volume_m3``, ``weight_N``,
        ``ratio_to_reference``, ``status`` per option).

    Returns
    -------
    str
        An HTML list; volumes in m3, weights in kN.
    """
    from bridgeopt.study.options import REFERENCE

    items = []
    for r in table.to_dict("records"):
        if r["status"] == "optimal":
            what = ("the least volume any structure on this grid can have"
                    if r["option"] == REFERENCE else
                    f"{r['ratio_to_reference']:.3g} times the reference optimum")
            items.append(f"{r['option']}: volume {r['volume_m3']:,.5g} m3, weight "
                         f"{r['weight_N'] / 1e3:,.5g} kN, {what}")
        else:
            items.append(f"{r['option']}: {r['status']}")
    return "<ul>" + "".join(f"<li>{html.escape(i)}</li>" for i in items) + "</ul>"


def show(obj) -> None:
    """Display a figure, table or HTML text in the current output.

    Parameters
    ----------
    obj : object
        A plotly figure, a pandas table, a widget, or a string of HTML.
    """
    from IPython.display import HTML, display

    display(HTML(obj) if isinstance(obj, str) else obj)


def show_cautions() -> None:
    """Display the cautions."""
    show(cautions_html())


def sweep(fn: Callable, *args, description: str = "solving", **kwargs):
    """Run ``fn(*args, progress=..., **kwargs)`` under a progress bar; return its result.

    Outside :func:`report_mode` an :class:`ipywidgets.IntProgress` bar is
    shown and advanced by the ``progress(done, total)`` callback.  A
    :class:`~bridgeopt.errors.BridgeoptError` is shown as a message and
    re-raised.

    Parameters
    ----------
    fn : callable
        A study function taking ``progress=callback`` (``span_sweep`` ...).
    *args, **kwargs
        Passed to ``fn``.
    description : str
        Label of the progress bar.

    Returns
    -------
    object
        What ``fn`` returns.
    """
    from IPython.display import HTML, display

    bar = None
    if not report_mode():
        import ipywidgets as w

        bar = w.IntProgress(value=0, min=0, max=1, description=description,
                            layout=w.Layout(width="60%"))
        display(bar)

    def progress(done: int, total: int) -> None:
        if bar is not None:
            bar.max = max(1, total)
            bar.value = done

    try:
        result = fn(*args, progress=progress, **kwargs)
    except BridgeoptError as err:
        display(HTML(message_html(error_text(err))))
        raise
    finally:
        if bar is not None:
            bar.bar_style = "success"
    return result


def export_button(notebook: str | os.PathLike, output: str | os.PathLike):
    """A button that runs ``bridgeopt report NOTEBOOK -o OUTPUT`` and says where the file is.

    Parameters
    ----------
    notebook : path
        The study notebook to execute.
    output : path
        The HTML file to write.

    Returns
    -------
    ipywidgets.VBox or None
        The button and its status line; ``None`` in :func:`report_mode` (a report
        has no buttons).
    """
    if report_mode():
        return None
    import ipywidgets as w

    button = w.Button(description="Export HTML report", icon="file",
                      layout=w.Layout(width="220px"))
    note = w.HTML()

    def click(_):
        note.value = message_html(f"Running {notebook} and writing {output} ...", "note")
        cmd = [sys.executable, "-m", "bridgeopt", "report", str(notebook), "-o", str(output)]
        try:
            run = subprocess.run(cmd, capture_output=True, text=True, timeout=1800)
        except (OSError, subprocess.TimeoutExpired) as err:
            note.value = message_html(error_text(err))
            return
        if run.returncode == 0:
            note.value = message_html(f"Report written: {Path(output).resolve()}", "ok")
        else:
            last = (run.stderr.strip().splitlines() or ["unknown error"])[-1]
            note.value = message_html(f"Export failed: {last}")

    button.on_click(click)
    return w.VBox([button, note])
