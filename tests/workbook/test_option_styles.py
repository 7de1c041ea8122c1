"""No form is drawn in the reference optimum's line style, however many forms a chart has.

With eight forms the eighth took the reference's black solid line (seen in the span study:
"suspension, V-towers" drawn like the reference optimum), which misleads a reader (issue 11:
charts never mislead). Common practice in chart design (no source): one style per series.
"""

from bridgeopt.workbook.plots import OPTION_COLOURS, option_style


def test_no_form_takes_the_reference_style():
    ref = option_style(0)
    for i in range(1, 40):
        style = option_style(i)
        assert style["color"] != ref["color"]


def test_the_first_forms_all_differ():
    styles = [tuple(option_style(i).items()) for i in range(1, len(OPTION_COLOURS))]
    assert len(set(styles)) == len(styles)
