"""Write the study notebooks of this folder (without outputs).

The notebooks are thin: every cell calls bridgeopt.study and bridgeopt.workbook (notebook, plots,
charts, explorer).  Edit the cells here and run

    .venv/bin/python studies/make_notebooks.py

so that every notebook keeps the same opening (question + cautions), one
code cell tagged ``parameters`` (defaults, with ``BRIDGEOPT_<NAME>``
environment overrides and a small fast variant for tests) and no outputs.
"""

from __future__ import annotations

from pathlib import Path

import nbformat
from nbformat.v4 import new_code_cell, new_markdown_cell, new_notebook

from bridgeopt.cautions import CAUTION_LINES

HERE = Path(__file__).resolve().parent


class md(str):
    """A markdown cell's text (any other text is a code cell)."""


def _opening(title: str, answers: str) -> md:
    cautions = "\n".join(f"- {c}" for c in CAUTION_LINES)
    return md(f"# {title}\n\n**What it answers:** {answers}\n\n**Cautions**\n\n{cautions}\n")


SETUP = ("from bridgeopt import study\n"
         "from bridgeopt.workbook import charts, plots\n"
         "from bridgeopt.workbook import notebook as workbook\n"
         "\n"
         "workbook.setup()")

COMMON_PARAMETERS = (
    "from bridgeopt.workbook import notebook as workbook\n"
    "\n"
    "# Defaults; each can be overridden by an environment variable BRIDGEOPT_<NAME>\n"
    "# (bridgeopt report sets them). BRIDGEOPT_FAST=1 selects the small variant used by tests.\n"
)

NOTEBOOKS = {
    "explorer.ipynb": [
        _opening("Span-and-form explorer",
                 "for this span, height, load and material, how little material could any "
                 "structure use, and how much more does the chosen form need?"),
        COMMON_PARAMETERS
        + 'span = workbook.param("span", 1800.0)             # m\n'
          'rise = workbook.param("rise", 360.0)              # m above the deck\n'
          'depth = workbook.param("depth", 180.0)            # m below the deck\n'
          'deck_load = workbook.param("deck_load", 2.0e5)    # N/m\n'
          'material = workbook.param("material", "steel")\n'
          'arrangement = workbook.param("arrangement", "single")\n'
          'form = workbook.param("form", "suspension")\n'
          'pylons = workbook.param("pylons", 1)  # per span; more stand on their own piers\n'
          'divisions = workbook.param("divisions", 30, fast=12)  # 30 = the meeting grid\n'
          'name = workbook.param("name", "Quillmarsh Sound crossing (fictional)")',
        SETUP + "\nfrom bridgeopt.workbook.explorer import Explorer",
        md("Move a control: the reference optimum (the least material any structure on this "
        "grid can use) and the chosen form are re-solved and redrawn at one scale. Line "
        "width follows the member force; blue is tension, orange is compression."),
        "explorer = Explorer(span=span, rise=rise, depth=depth, deck_load=deck_load,\n"
        "                    material=material, arrangement=arrangement, form=form,\n"
        "                    pylons=pylons, divisions=divisions, name=name)\n"
        "explorer.show()",
        md("Export this study as one HTML file for the client (or run "
        "`bridgeopt report studies/explorer.ipynb -o explorer.html` in a terminal):"),
        'workbook.export_button("explorer.ipynb", "explorer.html")',
    ],
    "span_study.ipynb": [
        _opening("Span study",
                 "how does the least possible volume, and each form's volume over it, grow "
                 "with span up to 10 km and beyond, and where does each form become "
                 "impossible?"),
        COMMON_PARAMETERS
        + 'spans = workbook.param("spans", [250.0, 500.0, 1000.0, 1500.0, 2000.0, 3000.0,\n'
          '                                  4000.0, 5000.0, 6500.0, 8000.0, 10000.0, 12000.0,\n'
          '                                  14000.0, 16000.0],\n'
          '                       fast=[500.0, 2000.0, 10000.0])   # m\n'
          'rise_ratio = workbook.param("rise_ratio", 0.2)    # rise above deck / span\n'
          'depth_ratio = workbook.param("depth_ratio", 0.1)  # depth below deck / span\n'
          'deck_load = workbook.param("deck_load", 2.0e5)    # N/m\n'
          'material = workbook.param("material", "steel")\n'
          'arrangement = workbook.param("arrangement", "single")\n'
          'pylons = workbook.param("pylons", 1)  # per span; more stand on their own piers\n'
          'divisions = workbook.param("divisions", 16, fast=12)  # fast: rise still 2+ grid steps',
        SETUP + "\nfrom bridgeopt import PRESETS, BridgeScenario",
        "bridge = BridgeScenario(span=spans[0], rise=rise_ratio * spans[0],\n"
        "                        depth=depth_ratio * spans[0], deck_load=deck_load,\n"
        "                        material=PRESETS[material], arrangement=arrangement,\n"
        "                        divisions=divisions, name='span study')\n"
        "forms = list(study.available_forms())\n"
        "workbook.show(workbook.forms_note(forms))\n"
        "table = workbook.sweep(study.span_sweep, bridge, spans, forms, {'pylons': pylons},\n"
        "                       description='spans')",
        md("Volume in the normalised form volume / (deck load x span^2 / strength) against "
        "span / (strength / (density g)); shaded: spans where an option found no structure. "
        "Every form stands on the crossing's own supports (abutments, back spans and their "
        "anchor points for a single span) and is compared with the reference optimum of "
        "that crossing; a form on other supports (pylons on their own piers) is named with "
        "its crossing, beside that crossing's reference."),
        "workbook.show(charts.span_volume_figure(table))\n"
        "workbook.show(charts.ratio_figure(table, x_title='span / (strength / (density g)) "
        "[-]'))",
        "workbook.show(table.pivot_table(index='span_m', columns='series',\n"
        "                                values='normalised_volume').round(4))",
        md("## Inputs\n\nBase scenario, at the first span; rise and depth scale with the span, spans swept: see the table above."),
        "workbook.show(workbook.scenario_html(bridge))\n"
        "workbook.show(study.inputs_table(bridge).style.hide(axis='index')\n"
        "              .format(workbook.number))",
    ],
    "height_study.ipynb": [
        _opening("Height-limit study",
                 "how fast do the least possible volume and each form's volume grow as the "
                 "height allowed above the deck is cut?"),
        COMMON_PARAMETERS
        + 'span = workbook.param("span", 1800.0)             # m\n'
          'span_to_rise = workbook.param("span_to_rise",\n'
          '                              [2.0, 3.0, 4.0, 4.5, 5.0, 6.0, 8.0, 10.0, 12.0, 15.0,\n'
          '                               20.0], fast=[2.0, 5.0, 10.0])  # span / rise\n'
          'depth = workbook.param("depth", 180.0)            # m below the deck\n'
          'deck_load = workbook.param("deck_load", 2.0e5)    # N/m\n'
          'material = workbook.param("material", "steel")\n'
          'arrangement = workbook.param("arrangement", "single")\n'
          'pylons = workbook.param("pylons", 1)  # per span; more stand on their own piers\n'
          'divisions = workbook.param("divisions", 40, fast=20)',
        SETUP + "\nfrom bridgeopt import PRESETS, BridgeScenario",
        "bridge = BridgeScenario(span=span, rise=span / 2, depth=depth, deck_load=deck_load,\n"
        "                        material=PRESETS[material], arrangement=arrangement,\n"
        "                        divisions=divisions, name='height study')\n"
        "forms = list(study.available_forms())\n"
        "workbook.show(workbook.forms_note(forms))\n"
        "rises = [span / r for r in span_to_rise]\n"
        "table = workbook.sweep(study.height_sweep, bridge, rises, forms, {'pylons': pylons},\n"
        "                       description='heights')",
        md("Shaded bands: ratios of built bridges (common practice figures, not from a code): "
        "span / pylon height above the deck 3.4 to 4.9 for cable-stayed bridges, span / sag "
        "8.5 to 13.5 for suspension bridges. The horizontal axis is span / allowed rise, the "
        "most a pylon or tower may rise."),
        "workbook.show(charts.height_figure(table))\n"
        "workbook.show(charts.ratio_figure(table, 'span_to_rise',\n"
        "                                  x_title='span / allowed rise above deck [-]'))",
        "workbook.show(table.pivot_table(index='rise_m', columns='series',\n"
        "                                values='volume_m3').round(1))",
        md("## Inputs\n\nBase scenario; the allowed rise is swept (see the table above)."),
        "workbook.show(workbook.scenario_html(bridge))\n"
        "workbook.show(study.inputs_table(bridge).style.hide(axis='index')\n"
        "              .format(workbook.number))",
    ],
    "pylon_study.ipynb": [
        _opening("Pylon-count study",
                 "with 1 to 4 pylons per span, each intermediate pylon on its own pier in the "
                 "water, how do the volume and cost of superstructure, piers and foundations "
                 "add up, and which pylon count is cheapest?"),
        COMMON_PARAMETERS
        + 'spans = workbook.param("spans", [500.0, 1000.0, 1500.0, 2000.0, 3000.0, 4000.0,\n'
          '                                  5000.0], fast=[1000.0, 3000.0])   # m\n'
          'pylon_counts = workbook.param("pylon_counts", [1, 2, 3, 4], fast=[1, 2])\n'
          'rise_ratio = workbook.param("rise_ratio", 0.2)    # rise above deck / span\n'
          'depth_ratio = workbook.param("depth_ratio", 0.1)  # depth below deck / span\n'
          'foundation_depth = workbook.param("foundation_depth", 60.0)  # m below the deck\n'
          '# costs in one currency: steel at 1 per m3 in place, a deep-water pier foundation\n'
          '# about as much as 1000 m3 of steel (order of magnitude, from memory)\n'
          'steel_cost = workbook.param("steel_cost", 1.0)    # per m3 of tension or compression\n'
          'foundation_cost = workbook.param("foundation_cost", 1000.0)  # per pier foundation\n'
          'deck_load = workbook.param("deck_load", 2.0e5)    # N/m\n'
          'material = workbook.param("material", "steel")\n'
          'arrangement = workbook.param("arrangement", "repeating")\n'
          'divisions = workbook.param("divisions", 24, fast=12)',
        SETUP + "\nfrom bridgeopt import PRESETS, BridgeScenario, UnitCosts",
        "bridge = BridgeScenario(span=spans[0], rise=rise_ratio * spans[0],\n"
        "                        depth=depth_ratio * spans[0], deck_load=deck_load,\n"
        "                        material=PRESETS[material], arrangement=arrangement,\n"
        "                        divisions=divisions, foundation_depth=foundation_depth,\n"
        "                        name='pylon study')\n"
        "study.register_legs()   # intermediate pylons carried by legs, no foundation\n"
        "forms = [f for f in study.available_forms() if f.startswith('cable-stayed')]\n"
        "workbook.show(workbook.forms_note(forms))\n"
        "table = workbook.sweep(study.pylon_sweep, bridge, spans, pylon_counts, forms,\n"
        "                       description='pylons', keep_proportions=True)\n"
        "costs = study.pylon_costs(table, costs=UnitCosts(steel_cost, steel_cost),\n"
        "                          foundation_cost=foundation_cost)",
        md("Two meanings of a pylon count, named apart. **Pylons on their own piers** (the "
        "cable-stayed fan, semi-fan and harp): each count is its own crossing (\"1 pier\", "
        "\"2 piers\" ... per span), and each form is drawn and tabulated against the "
        "reference optimum of the same crossing (dotted), never against the plain span's; "
        "the pier shafts run down to the foundation level and are members of the structure "
        "(sized in compression, with their self-weight), and each foundation has the cost "
        "given above, in the currency of the unit costs. **Pylons on legs** (\"cable-stayed "
        "fan, pylons on legs\"): the intermediate pylons have no foundation; inclined "
        "compression legs from the piers carry their tops, sized and height-optimized with "
        "the rest, on the plain crossing and against its plain reference."),
        "for s in sorted(set(costs['span_m'])):\n"
        "    workbook.show(charts.pylon_cost_figure(costs, s))\n"
        "workbook.show(charts.pylon_figure(table))\n"
        "workbook.show(charts.ratio_figure(table, 'span_m', by_pylons=True,\n"
        "                                  x_title='span [m]'))",
        "workbook.show(costs.round(1).style.hide(axis='index'))",
        md("## Inputs\n\nBase scenario, at the first span; rise and depth scale with the span, "
        "the foundation level does not."),
        "workbook.show(workbook.scenario_html(bridge))\n"
        "workbook.show(study.inputs_table(bridge).style.hide(axis='index')\n"
        "              .format(workbook.number))",
    ],
    "client_report.ipynb": [
        _opening("Option study report",
                 "for the scenario below, how much material does each bridge form need "
                 "compared with the least any structure could use?"),
        COMMON_PARAMETERS
        + 'scenario_file = workbook.param("scenario", "scenarios/demo.toml")\n'
          'forms = workbook.param("forms", ["cable-stayed fan", "suspension", "arch"])\n'
          'pylons = workbook.param("pylons", 1)  # per span; more stand on their own piers\n'
          'divisions = workbook.param("divisions", 0, fast=12)  # 0: as in the scenario file',
        SETUP,
        "bridge = study.bridge_from_file(scenario_file, divisions=divisions or None)\n"
        "results = study.solve_options(bridge, forms, {'pylons': pylons})\n"
        "comparison = study.comparison_table(bridge, results)\n"
        "workbook.show(workbook.scenario_html(bridge, scenario_file))",
        md("## Inputs"),
        "workbook.show(study.inputs_table(bridge).style.hide(axis='index').format(workbook.number))",
        md("## Results"),
        "workbook.show(workbook.results_html(comparison))\n"
        "workbook.show(workbook.forms_note(forms))\n"
        "workbook.show(comparison.drop(columns=['seconds', 'option']).style.hide(axis='index')\n"
        "              .format({'volume_m3': '{:,.5g}', 'weight_N': '{:,.5g}',\n"
        "                       'ratio_to_reference': '{:.3g}', 'normalised_volume': '{:.4g}'},\n"
        "                      na_rep='-'))",
        "workbook.show(plots.options_figure(study.options_by_series(results, comparison),\n"
        "                                   title=bridge.name))\n"
        "workbook.show(plots.ratio_bar(comparison))",
        md("## Quantities by element group"),
        "for name, option in results.items():\n"
        "    if option.design is not None:\n"
        "        workbook.show(f'<b>{name}</b>')\n"
        "        workbook.show(study.quantities(option.design).round(3).style.hide(axis='index'))",
        md("## Cautions"),
        "workbook.show_cautions()",
    ],
}


def _with_export(name: str, cells: list[str]) -> list[str]:
    """``cells`` ending with the export button (added when the notebook has none)."""
    if any("export_button" in c for c in cells):
        return cells
    stem = Path(name).stem
    return cells + [md("Export this study as one HTML file (or run `bridgeopt report "
                       f"studies/{name} -o {stem}.html` in a terminal):"),
                    f'workbook.export_button("{name}", "{stem}.html")']


def build(name: str, cells: list[str]):
    """The notebook ``name`` from its cells (:class:`md` texts are markdown)."""
    nb = new_notebook()
    nb.metadata["kernelspec"] = {"display_name": "Python 3", "language": "python",
                                 "name": "python3"}
    nb.metadata["language_info"] = {"name": "python"}
    code_seen = 0
    for text in _with_export(name, cells):
        if isinstance(text, md):
            nb.cells.append(new_markdown_cell(text))
            continue
        cell = new_code_cell(text)
        if code_seen == 0:
            cell.metadata["tags"] = ["parameters"]
        code_seen += 1
        nb.cells.append(cell)
    for k, cell in enumerate(nb.cells):
        cell["id"] = f"{Path(name).stem.replace('_', '-')}-{k}"
    return nb


def main() -> None:
    for name, cells in NOTEBOOKS.items():
        nbformat.write(build(name, cells), HERE / name)


if __name__ == "__main__":
    main()
