"""Executed notebook -> one self-contained HTML report.

:func:`write_report` runs a study notebook in a fresh kernel with
``BRIDGEOPT_REPORT=1`` (the notebooks then show static figures rather than
live widgets; see :func:`bridgeopt.workbook.notebook.report_mode`), optionally with
parameter overrides, and writes one HTML file that opens offline:

* plotly.js is inlined once (by :func:`bridgeopt.workbook.notebook.setup`);
* the page template drops every script the stock template loads from the web
  (require.js, MathJax, mermaid, the widget manager) and the notebook's
  widget state;
* the finished file is checked: any remaining reference to a web address in
  a ``src``/``href``/``@import``/``url(...)`` makes it fail;
* code cells are hidden unless asked for, and the cautions are added at the
  top when the notebook does not already state them.

Parameter overrides are passed as ``BRIDGEOPT_<NAME>`` environment variables
to the kernel, which the notebooks' ``parameters`` cells read.
"""

from __future__ import annotations

import os
import re
import subprocess
from pathlib import Path
from typing import Mapping

from bridgeopt.cautions import CAUTION_LINES, CAUTIONS
from bridgeopt.errors import InputError, SolveError

__all__ = ["execute_notebook", "export_html", "write_report", "remote_references",
           "TEMPLATE"]

#: nbconvert template: JupyterLab's page without any script loaded from the web.
TEMPLATE = """{%- extends 'lab/index.html.j2' -%}
{%- block html_head_js -%}{%- endblock html_head_js -%}
{%- block jupyter_widgets -%}{%- endblock jupyter_widgets -%}
{%- block html_head_js_mathjax -%}{%- endblock html_head_js_mathjax -%}
{%- block html_head_js_mermaidjs -%}{%- endblock html_head_js_mermaidjs -%}
"""

_REMOTE = re.compile(r"""(?:\b(?:src|href)\s*=\s*["']?\s*(?:https?:)?//"""
                     r"""|@import\s+(?:url\()?\s*["']?\s*(?:https?:)?//"""
                     r"""|url\(\s*["']?\s*(?:https?:)?//"""
                     r"""|\bimport\s*\(?\s*["'](?:https?:)?//)""", re.I)


_SCRIPT_BODY = re.compile(r"(<script\b[^>]*>).*?(</script>)", re.I | re.S)


def remote_references(html_text: str) -> list[str]:
    """Snippets of ``html_text`` that would make a browser fetch from the network.

    Looks at the page's tags and styles (``src``, ``href``, ``@import``,
    ``url(...)``); the bodies of inline scripts are skipped (plotly.js names
    web addresses in strings it never fetches unless asked to).

    Parameters
    ----------
    html_text : str
        An HTML page.

    Returns
    -------
    list of str
        Each reference with some text around it ([] for a self-contained page).
    """
    page = _SCRIPT_BODY.sub(r"\1\2", html_text)
    return [page[max(0, m.start() - 20):m.end() + 60] for m in _REMOTE.finditer(page)]


def execute_notebook(path: str | os.PathLike, *, parameters: Mapping[str, object] | None = None,
                     report: bool = True, timeout: int = 600, extra_env=None):
    """Run a notebook in a fresh kernel; return the executed ``nbformat`` notebook.

    Parameters
    ----------
    path : path
        The ``.ipynb`` file (it is not modified).
    parameters : mapping, optional
        Overrides read by the notebook's ``parameters`` cell, e.g.
        ``{"span": 2400}`` -> ``BRIDGEOPT_SPAN=2400``; lists are written
        comma-separated.
    report : bool
        Run in report mode (static figures).
    timeout : int
        Per-cell time limit. [s]
    extra_env : mapping of str to str, optional
        More environment variables for the kernel, set last.

    Returns
    -------
    nbformat.NotebookNode
        The notebook with its outputs.

    Raises
    ------
    InputError
        The file is missing or not a notebook.
    SolveError
        A cell failed (status ``"notebook"``; the message names the cell and
        the error).
    """
    import nbformat
    from jupyter_client import KernelManager
    from nbclient import NotebookClient
    from nbclient.exceptions import CellExecutionError

    path = Path(path)
    if not path.is_file() or path.suffix != ".ipynb":
        raise InputError("NOTEBOOK", str(path), "an existing .ipynb file")
    try:
        nb = nbformat.read(path, as_version=4)
    except Exception as err:  # nbformat raises several kinds for a broken file
        raise InputError("NOTEBOOK", str(path), f"a readable notebook ({err})") from None
    env = dict(os.environ)
    env.pop("BRIDGEOPT_REPORT", None)
    if report:
        env["BRIDGEOPT_REPORT"] = "1"
    for key, value in (parameters or {}).items():
        if isinstance(value, (list, tuple)):
            value = ",".join(str(v) for v in value)
        env["BRIDGEOPT_" + str(key).upper()] = str(value)
    env.update(extra_env or {})
    # cache_ports=False: a cached port of the last kernel may still be held by it as it
    # shuts down, and a kernel started on it dies (seen with runs one after another).
    km = KernelManager(kernel_name="python3", cache_ports=False)
    client = NotebookClient(nb, km=km, timeout=timeout, kernel_name="python3",
                            resources={"metadata": {"path": str(path.parent.resolve())}})
    try:
        # the kernel's own log lines (transport warnings) are not the user's business
        client.execute(env=env, stderr=subprocess.DEVNULL)
    except CellExecutionError as err:
        lines = [ln for ln in str(err).splitlines() if ln.strip()]
        raise SolveError("notebook", f"{path.name}: a cell failed: {lines[-1] if lines else err}") \
            from None
    return nb


def export_html(nb, *, show_code: bool = False, title: str | None = None) -> str:
    """An executed notebook as one self-contained HTML page.

    Parameters
    ----------
    nb : nbformat.NotebookNode
        An executed notebook (:func:`execute_notebook`); it is not modified.
    show_code : bool
        Keep the code cells (default: outputs and text only).
    title : str, optional
        Title of the page (default: the notebook's).

    Returns
    -------
    str
        The HTML page, plotly.js inline; the cautions are added first when the
        notebook's text does not carry them.

    Raises
    ------
    SolveError
        The page would still fetch something from the network (status
        ``"not-self-contained"``).
    """
    import jinja2
    from nbconvert import HTMLExporter

    nb = nb.copy()
    nb.metadata = dict(nb.metadata)
    nb.metadata.pop("widgets", None)
    if title:
        nb.metadata["title"] = title
    text = "".join(c.source for c in nb.cells if c.cell_type == "markdown")
    if not all(line in text for line in CAUTION_LINES):
        import nbformat

        nb.cells = [nbformat.v4.new_markdown_cell(CAUTIONS)] + list(nb.cells)
    exporter = HTMLExporter(template_name="lab",
                            extra_loaders=[jinja2.DictLoader({"bridgeopt.html.j2": TEMPLATE})],
                            template_file="bridgeopt.html.j2", exclude_input=not show_code,
                            exclude_input_prompt=True, exclude_output_prompt=True)
    page, _ = exporter.from_notebook_node(nb)
    remote = remote_references(page)
    if remote:
        raise SolveError("not-self-contained", "the report would load from the network: "
                         + " | ".join(remote[:3]))
    return page


def write_report(notebook: str | os.PathLike, output: str | os.PathLike, *,
                 parameters: Mapping[str, object] | None = None, show_code: bool = False,
                 timeout: int = 600) -> Path:
    """Execute ``notebook`` and write its self-contained HTML report to ``output``.

    Parameters
    ----------
    notebook : path
        The study notebook (``studies/*.ipynb``).
    output : path
        The HTML file to write (its folder must exist).
    parameters : mapping, optional
        Overrides of the notebook's ``parameters`` cell (see :func:`execute_notebook`),
        in the units the notebook states (SI: m, N/m).
    show_code : bool
        Keep the code cells in the report.
    timeout : int
        Per-cell time limit. [s]

    Returns
    -------
    pathlib.Path
        The file written (written whole: a temporary file, then renamed).
    """
    output = Path(output)
    parent = output.parent if str(output.parent) else Path(".")
    if not parent.is_dir():
        raise InputError("-o", str(output), f"a path in an existing directory ({parent})")
    nb = execute_notebook(notebook, parameters=parameters, timeout=timeout)
    text = export_html(nb, show_code=show_code, title=Path(notebook).stem.replace("_", " "))
    tmp = output.with_name(f".{output.name}.tmp")
    tmp.write_text(text, encoding="utf-8")
    os.replace(tmp, output)
    return output
