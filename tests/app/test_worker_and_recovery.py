"""The solve worker (progress, cancel) and recovery of unsaved work on the next start."""


from PySide6.QtWidgets import QMessageBox

from app import edits
from app.files import project_files as files
from solver import Circle, Conductor, Model, Ring

COAX = Model(unit="mm", mesh_density="coarse", conductors=(
    Conductor("inner", (Circle((0.0, 0.0), 1.0),), potential_V=1.0),
    Conductor("shield", (Ring((0.0, 0.0), 3.5, 4.0),), role="reference"),
))


def test_worker_reports_progress_and_a_result(qtbot):
    from app.jobs.worker import SolveRunner

    runner = SolveRunner(grid_points=12, n_field_lines=4)
    fractions = []
    runner.progress_changed.connect(lambda f, m: fractions.append(f))
    with qtbot.waitSignal(runner.solution_ready, timeout=30000) as ready:
        runner.start(COAX)
    runner.wait()
    assert ready.args[0].solution.capacitance_maxwell_F_per_m.shape == (1, 1)
    assert fractions and fractions[-1] == 1.0


def test_worker_can_be_cancelled(qtbot):
    from app.jobs.worker import SolveRunner

    runner = SolveRunner(grid_points=12, n_field_lines=4)
    with qtbot.waitSignal(runner.solve_cancelled, timeout=30000):
        runner.start(COAX)
        runner.cancel()
    runner.wait()
    assert not runner.is_busy


#: The recovery-file owner of an instance that is not running (no such process id).
GONE = "999999999-0a0b0c0d"


def test_recovery_is_offered_on_the_next_start(qtbot, settings, tmp_path, shown_messages):
    from app.__main__ import build_window

    model, _ = edits.add_conductor(Model(), Circle((0.0, 5.0), 2.0))
    files.write_recovery(model, tmp_path / "work.json", instance=GONE)
    shown_messages.answer = QMessageBox.Yes
    window = build_window(None, settings)
    try:
        assert [m[1] for m in shown_messages] == ["Recover unsaved work?"]
        assert window.document.model == model
        assert window.document.is_modified
        assert window.document.path == tmp_path / "work.json"
    finally:
        window.runner.cancel()
        window.runner.wait()
        window.document.mark_saved(tmp_path / "work.json")
        window.close()


def test_declined_recovery_is_discarded_and_the_sample_opens(qtbot, settings, tmp_path, shown_messages):
    from app.__main__ import build_window

    model, _ = edits.add_conductor(Model(), Circle((0.0, 5.0), 2.0))
    files.write_recovery(model, None, instance=GONE)
    shown_messages.answer = QMessageBox.No
    window = build_window(None, settings)
    try:
        assert files.read_recovery() is None
        assert window.document.path == files.SAMPLES_DIR / files.DEFAULT_SAMPLE
    finally:
        window.runner.cancel()
        window.runner.wait()
        window.close()


def test_a_file_named_at_start_opens_and_only_its_own_unsaved_work_is_offered(qtbot, settings, tmp_path,
                                                                                shown_messages):
    from app.__main__ import build_window

    other, _ = edits.add_conductor(Model(), Circle((0.0, 5.0), 2.0))
    files.write_recovery(other, tmp_path / "other.json", instance=GONE)
    asked = files.sample_paths()[0]
    window = build_window(asked, settings)
    try:
        assert [m[1] for m in shown_messages] == []  # nothing offered
        assert window.document.path == asked
    finally:
        window.runner.cancel()
        window.runner.wait()
        window.close()
    assert files.read_recovery() is not None  # the other file's work waits for a start without a file
    files.discard_recovery()

    mine, _ = edits.add_conductor(files.open_model(asked), Circle((50.0, 50.0), 2.0))
    files.write_recovery(mine, asked, instance=GONE)
    shown_messages.answer = QMessageBox.Yes
    window = build_window(asked, settings)
    try:
        assert [m[1] for m in shown_messages] == ["Recover unsaved work?"]
        assert window.document.model == mine and window.document.is_modified
    finally:
        window.runner.cancel()
        window.runner.wait()
        window.document.mark_saved(tmp_path / "mine.json")
        window.close()
