"""The accuracy benchmark's rows: the high-order solver meets each tolerance against the closed
forms it names (Cheng 1989; Ransford 1995) and reports its unknowns."""

from solver.bench.accuracy import run


def test_accuracy_rows_meet_their_tolerance_and_compare_with_the_low_order_solver(capsys):
    rows = run(tolerances=(1e-6,), levels=(0.5,))
    high = [r for r in rows if r["solver"] == "high-order"]
    low = [r for r in rows if r["solver"] == "low-order"]
    assert len(high) == len(low) == 4
    for r in high:
        assert r["true_error"] < 1e-6 and r["estimated_error"] <= 1e-6 and r["unknowns"] < 2000
    assert "accuracy per unknown" in capsys.readouterr().out
