"""Every background job reports exactly one outcome, and a failure reaches the user in words."""

from PySide6.QtCore import Qt

from app.jobs.job_thread import JobThread, error_text
from solver import InvalidModelError


class _Job(JobThread):
    def __init__(self, outcome) -> None:
        super().__init__()
        self.outcome = outcome

    def work(self):
        if isinstance(self.outcome, BaseException):
            raise self.outcome
        return self.outcome


def _run(qtbot, outcome):
    job = _Job(outcome)
    reports = []
    job.finished_with.connect(lambda result, error: reports.append((result, error)))
    with qtbot.waitSignal(job.finished_with, timeout=5000):
        job.start()
    job.wait()
    qtbot.waitUntil(lambda: len(reports) == 1)
    return reports


def test_a_result_is_reported_once(qtbot):
    assert _run(qtbot, 42) == [(42, None)]


def test_a_solver_error_is_reported_in_its_own_words(qtbot):
    error = InvalidModelError("Conductor 'L1': the width must be positive.")
    [(result, reported)] = _run(qtbot, error)
    assert result is None and reported is error
    assert error_text(reported) == "Conductor 'L1': the width must be positive."


def test_an_unexpected_error_is_reported_not_lost(qtbot):
    [(result, reported)] = _run(qtbot, ZeroDivisionError("division by zero"))
    assert result is None
    assert error_text(reported) == "Unexpected error in the solver: ZeroDivisionError: division by zero"


class _JobWithIdleWork(_Job):
    def __init__(self, outcome, idle) -> None:
        super().__init__(outcome)
        self.idle = idle
        self.order: list[str] = []
        # called in the worker thread at the emit itself, so the order is the thread's
        self.finished_with.connect(lambda *_: self.order.append("reported"), Qt.DirectConnection)

    def after_report(self) -> None:
        self.order.append("idle work")
        self.idle()


def test_work_after_the_report_runs_after_it_and_its_failure_is_logged_not_reported(qtbot, caplog):
    def fail():
        raise RuntimeError("preparation broke")

    job = _JobWithIdleWork(7, fail)
    reports = []
    job.finished_with.connect(lambda result, error: reports.append((result, error)))
    job.start()
    job.wait()
    qtbot.waitUntil(lambda: len(reports) == 1)
    qtbot.wait(20)
    assert reports == [(7, None)]  # one report, the result's
    assert job.order == ["reported", "idle work"]
    assert "work after the report failed" in caplog.text


def test_no_work_after_a_failed_job(qtbot):
    job = _JobWithIdleWork(InvalidModelError("bad"), lambda: None)
    job.start()
    job.wait()
    assert "idle work" not in job.order
