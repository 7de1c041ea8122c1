"""Notebook helpers (bridgeopt.workbook.notebook) and the report command's input checks."""

import importlib.util
import subprocess
import sys
from pathlib import Path

import nbformat
import pytest

pytest.importorskip("plotly")
pytest.importorskip("ipywidgets")

from bridgeopt import InputError, SolveError  # noqa: E402
from bridgeopt.workbook import notebook as workbook
from bridgeopt.cautions import CAUTION_LINES  # noqa: E402
from bridgeopt.cli import main  # noqa: E402

ROOT = Path(__file__).resolve().parents[2]


def test_param_reads_typed_environment_overrides(monkeypatch):
    monkeypatch.delenv("BRIDGEOPT_FAST", raising=False)
    monkeypatch.setenv("BRIDGEOPT_SPAN", "2400")
    monkeypatch.setenv("BRIDGEOPT_SPANS", "100, 200,300")
    monkeypatch.setenv("BRIDGEOPT_PYLONS", "3")
    assert workbook.param("span", 1800.0) == 2400.0
    assert workbook.param("spans", [1.0]) == [100.0, 200.0, 300.0]
    assert workbook.param("pylons", 2) == 3
    assert workbook.param("divisions", 30, fast=12) == 30
    monkeypatch.setenv("BRIDGEOPT_FAST", "1")
    assert workbook.param("divisions", 30, fast=12) == 12
    monkeypatch.setenv("BRIDGEOPT_PYLONS", "two")
    with pytest.raises(InputError, match="BRIDGEOPT_PYLONS"):
        workbook.param("pylons", 2)


def test_error_text_is_one_readable_line():
    text = workbook.error_text(InputError("bridge.span", -5.0, "a finite number > 0 m"))
    assert "bridge.span" in text and "-5.0" in text and "> 0 m" in text and "\n" not in text
    text = workbook.error_text(SolveError("span-limit", "elements cannot reach"))
    assert "span-limit" in text and "cannot reach" in text
    assert "bridgeopt-error" in workbook.message_html("x < y")
    assert "x &lt; y" in workbook.message_html("x < y")


def test_cautions_html_carries_every_caution():
    html = workbook.cautions_html()
    assert all(line in html for line in CAUTION_LINES)


def test_setup_registers_an_offline_renderer_without_mathjax_or_cdn():
    import plotly.graph_objects as go
    import plotly.io as pio

    workbook.setup()
    assert pio.renderers.default == f"plotly_mimetype+{workbook.RENDERER}"
    bundle = pio.renderers[workbook.RENDERER].to_mimebundle(
        go.Figure(go.Scatter(x=[0, 1], y=[0, 1])).to_plotly_json())
    assert "Plotly.newPlot" in bundle["text/html"]
    assert "http" not in bundle["text/html"].split("Plotly.newPlot")[0]
    assert "mathjax" not in bundle["text/html"].lower().replace("mathjaxconfig", "")


def test_committed_notebooks_match_their_generator(tmp_path):
    spec = importlib.util.spec_from_file_location("make_notebooks",
                                                  ROOT / "studies" / "make_notebooks.py")
    gen = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(gen)
    for name, cells in gen.NOTEBOOKS.items():
        built = gen.build(name, cells)
        committed = nbformat.read(ROOT / "studies" / name, as_version=4)
        assert [c.source for c in committed.cells] == [c.source for c in built.cells], name


def test_report_command_refuses_a_missing_notebook(tmp_path, capsys):
    status = main(["report", str(tmp_path / "nope.ipynb"), "-o", str(tmp_path / "x.html")])
    assert status == 2
    err = capsys.readouterr().err
    assert "NOTEBOOK" in err and "nope.ipynb" in err


def test_report_command_refuses_a_bad_param_and_a_missing_directory(tmp_path, capsys):
    nb = ROOT / "studies" / "explorer.ipynb"
    assert main(["report", str(nb), "-o", str(tmp_path / "x.html"), "--param", "span"]) == 2
    assert "--param" in capsys.readouterr().err
    assert main(["report", str(nb), "-o", str(tmp_path / "no" / "x.html")]) == 2
    assert "-o" in capsys.readouterr().err


@pytest.mark.slow
def test_report_help_lists_the_command():
    run = subprocess.run([sys.executable, "-m", "bridgeopt", "--help"], capture_output=True,
                         text=True, timeout=60)
    assert "report" in run.stdout


@pytest.fixture
def stand_in_form():
    """A registered stand-in form: the optimum with half the rise."""
    import dataclasses

    from bridgeopt import optimize_layout, study

    def low(bridge, options):
        if options["pylons"] > 3:
            raise SolveError("infeasible", "stand-in form: too many pylons")
        return optimize_layout(dataclasses.replace(bridge, rise=bridge.rise / 2).to_problem())

    study.register_form("stand-in", low)
    yield "stand-in"
    study.unregister_form("stand-in")


def test_explorer_shows_a_registered_form_beside_the_reference(stand_in_form):
    from bridgeopt import study
    from bridgeopt.workbook.explorer import Explorer

    ex = Explorer(span=1200.0, rise=300.0, depth=100.0, form=stand_in_form, divisions=12)
    assert "stand-in" in ex.controls["form"].options
    assert ex.error is None and ex.message.value == ""
    table = ex.comparison.set_index("option")
    assert list(table["status"]) == ["optimal", "optimal"]
    assert table.loc["stand-in", "ratio_to_reference"] >= 1 - 1e-7
    assert len([t for t in ex.figure.data if t.name == "deck level"]) == 2  # two panels
    assert list(ex.bar_figure.data[0].x) == [study.REFERENCE, "stand-in"]
    # the pylon control reaches the form's solver; its failure is a note, not a crash
    ex.controls["pylons"].value = 4
    assert ex.error is None and "too many pylons" in ex.message.value
    assert ex.comparison.set_index("option").loc["stand-in", "status"] == "failed"


def test_explorer_caches_solves_on_the_slider_values(stand_in_form):
    from bridgeopt.workbook.explorer import Explorer

    ex = Explorer(span=1200.0, rise=300.0, depth=100.0, form=stand_in_form, divisions=12)
    first = ex.results["stand-in"]
    ex.controls["span"].value = 1500.0
    ex.controls["span"].value = 1200.0
    assert ex.results["stand-in"] is first  # the same solved object, not a new solve
    assert all(isinstance(w.continuous_update, bool) and not w.continuous_update
               for k, w in ex.controls.items() if k in ("span", "rise", "depth", "deck_load",
                                                       "pylons"))


@pytest.mark.slow
def test_export_button_writes_the_report(tmp_path, monkeypatch):
    monkeypatch.delenv("BRIDGEOPT_REPORT", raising=False)
    nb = nbformat.v4.new_notebook(cells=[
        nbformat.v4.new_markdown_cell("# tiny study\n\n" + "\n".join(CAUTION_LINES)),
        nbformat.v4.new_code_cell("from bridgeopt.workbook import notebook as workbook\nworkbook.setup()\n"
                                  "import plotly.graph_objects as go\n"
                                  "workbook.show(go.Figure(go.Bar(x=['a'], y=[1])))")])
    nb.metadata["kernelspec"] = {"name": "python3", "display_name": "Python 3",
                                 "language": "python"}
    path = tmp_path / "tiny.ipynb"
    nbformat.write(nb, path)
    box = workbook.export_button(path, tmp_path / "tiny.html")
    button, note = box.children
    button.click()
    assert "Report written" in note.value, note.value
    text = (tmp_path / "tiny.html").read_text(encoding="utf-8")
    assert text.count("Plotly.newPlot(") == 1
    monkeypatch.setenv("BRIDGEOPT_REPORT", "1")
    assert workbook.export_button(path, tmp_path / "x.html") is None


@pytest.mark.slow
def test_explorer_traffic_cases_are_solved_drawn_and_summarised():
    """Traffic cases on top of the deck load: the several-case optimum must carry the
    heaviest case too, so (weightless, same grid) it is at least that case's own optimum
    (LP lower bound, Hemp 1973 / common practice); a change of traffic load re-solves."""
    from bridgeopt import study
    from bridgeopt.workbook.explorer import Explorer

    ex = Explorer(span=600.0, rise=150.0, depth=0.0, material="weightless-steel",
                  form=study.REFERENCE, divisions=12, traffic="full and half span",
                  traffic_load=5.0e4)
    assert ex.error is None
    design, single = ex.cases
    assert design.volume >= single.volume * (1 - 1e-6)
    assert sum(design.governing_counts().values()) == len(design.start)
    assert "with traffic cases" in ex.summary.value
    assert ex.cases_figure is not None and len(ex.cases_figure.data) == len(design.start)
    before = ex.state()["traffic_volume"]
    ex.controls["traffic_load"].value = 150.0
    assert ex.state()["traffic_volume"] > before          # more traffic, more material
    ex.controls["traffic"].value = "none"
    assert ex.cases is None and ex.state()["traffic_volume"] is None
    assert "with traffic cases" not in ex.summary.value
