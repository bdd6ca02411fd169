"""The numbers tab: figures to the digits their error supports, two self capacitances named apart."""

import re

import pytest

import solver
from app.jobs.results import compute_results
from app.panels.matrices_view import MatricesView
from app.units import digits_for


@pytest.fixture(scope="module")
def results():
    return compute_results(solver.load_project("sample_geometries/three_traces_over_ground.json"),
                           grid_points=0, n_field_lines=0)


@pytest.fixture
def view(qtbot, results):
    v = MatricesView()
    qtbot.addWidget(v)
    v.show_results(results)
    return v


def _cells(table):
    return [table.item(i, j).text() for i in range(table.rowCount()) for j in range(table.columnCount())]


def test_the_two_self_capacitances_have_names_that_cannot_be_confused(view):
    assert "Maxwell diagonal C_ii" in view.maxwell_label.text()
    assert "capacitance to earth C_i0" in view.mutual_label.text()
    assert "self capacitance" not in (view.maxwell_label.text() + view.mutual_label.text()).lower()
    for tip in (view.maxwell_label.toolTip(), view.mutual_label.toolTip()):
        assert "Maxwell diagonal C_ii" in tip and "Capacitance to earth C_i0" in tip


def test_figures_carry_the_digits_their_error_supports_and_no_exponents(view, results):
    shown = _cells(view.maxwell) + _cells(view.mutual) + _cells(view.conductors)
    assert not any(re.search(r"\de[+-]?\d", text) for text in shown), shown
    assert any(text.startswith("\u2212") for text in _cells(view.maxwell))  # true minus signs off the diagonal
    assert not any("-" in text for text in _cells(view.maxwell))
    err = results.solution.estimated_relative_error
    figures = [len(re.sub(r"\D", "", t).lstrip("0")) for t in _cells(view.maxwell)]
    assert max(figures) == digits_for(err)  # no more figures than the error supports
    assert f"{digits_for(err)} significant digits" in view.error_label.text()
    assert "%" in view.error_label.text() and "e-" not in view.error_label.text()


def test_no_empty_table_frames_before_a_solve(qtbot, results):
    v = MatricesView()
    qtbot.addWidget(v)
    v.show()
    tables = (v.maxwell, v.mutual, v.conductors)
    assert not any(t.isVisible() for t in tables) and not any(b.isVisible() for b in v.copy_buttons)
    assert v.status.isVisible() and "Solve" in v.status.text()
    v.show_results(results)
    assert all(t.isVisible() and t.columnCount() == 3 for t in tables) and all(b.isVisible() for b in v.copy_buttons)


def test_each_row_of_the_per_conductor_table_has_one_unit_in_its_heading():
    # a column once mixed "5.09117 kV" and "0 V" per cell, and four conductors scrolled sideways
    from app.panels.matrices_view import cells_in_one_unit

    assert cells_in_one_unit([5091.168825, -2545.584412, 0.0], "V", 6) == ("kV", ["5.09117", "\u22122.54558", "0"])
    assert cells_in_one_unit([7.4211e-7, 3.1e-20, None], "C/m", 4, largest=7.4211e-7) == ("nC/m", ["742.1", "0", "n/a"])
    assert cells_in_one_unit([0.0, 0.0], "V", 4) == ("V", ["0", "0"])
    # the shielded cable's screen carries 3.1e-14 C/m beside 7.4e-7 C/m known to 1e-4: not "3.1222e-05"
    assert cells_in_one_unit([7.4211e-7, 3.1222e-14], "C/m", 4, 7.4211e-7, 1e-4)[1] == ["742.1", "0"]


def test_per_conductor_cells_are_numbers_under_a_heading_with_the_unit(view):
    rows = [view.conductors.verticalHeaderItem(i).text().replace("\n", " ") for i in range(view.conductors.rowCount())]
    assert rows[0] == "potential (V)" and rows[1].startswith("charge/length (") and rows[1].endswith("C/m)")
    assert rows[2].startswith("peak |E| at surface (") and rows[2].endswith("V/m)")
    for i in range(3):
        for j in range(view.conductors.columnCount()):
            float(view.conductors.item(i, j).text().replace("\u2212", "-"))  # a bare number


def test_counts_agree_with_their_nouns(qtbot):
    """One conductor reads "1 conductor", not "1 conductors"."""
    one = compute_results(solver.load_project("sample_geometries/microstrip_on_substrate.json"),
                          grid_points=0, n_field_lines=0)
    v = MatricesView()
    qtbot.addWidget(v)
    v.show_results(one)
    assert len(one.model.conductors) == 1
    assert "Solved: 1 conductor," in v.status.text() and "conductors" not in v.status.text()


def test_a_number_and_its_unit_stay_on_one_line_of_a_wrapping_label(view):
    """"0.029 %" must not break between the number and the % sign: a no-break space joins them."""
    text = view.error_label.text()
    assert view.error_label.wordWrap()
    assert re.search(r"\d\u00a0%", text) and not re.search(r"\d %", text), text
    assert re.search(r"\d\u00a0%", view.asymmetry_label.text()), view.asymmetry_label.text()


def test_the_status_bar_shows_c_to_the_digits_of_the_numbers_section(view, results):
    """The status bar's C' has the figures the error estimate supports, as the Numbers tab."""
    import dataclasses

    from app.main_window import live_figures_text
    from app.units import format_measured

    sol = results.solution
    c = float(sol.capacitance_maxwell_F_per_m[0, 0])
    text = live_figures_text(sol)
    assert f"{format_measured(c, 'F/m', sol.estimated_relative_error)} " in text
    # an estimate of 0.3 % supports 3 figures: the status bar shows 3, not a fixed 5
    rough = dataclasses.replace(sol, estimated_relative_error=3e-3)
    assert f"{format_measured(c, 'F/m', digits=3)} " in live_figures_text(rough)
    assert f"C'({sol.signal_names[0]}) {format_measured(c, 'F/m', sol.estimated_relative_error)} " in text
    shown = re.search(r"C'\(\S+\) ([0-9.]+) pF/m", text).group(1)
    assert len(shown.replace(".", "").lstrip("0")) <= digits_for(sol.estimated_relative_error)
    assert shown in _cells(view.maxwell)  # the same number as the matrix's diagonal entry
