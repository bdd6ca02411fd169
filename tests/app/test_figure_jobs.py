"""The background runner of the figure sections: latest job wins, errors reach the user."""

import time

from test_line_figures_view import wait_until

from app.jobs.figure_jobs import FigureJobRunner, wait_for_all
from solver import InvalidModelError


def slow(value, delay_s):
    time.sleep(delay_s)
    return value


def test_a_new_job_drops_the_outcome_of_the_running_one(qtbot):
    runner = FigureJobRunner()
    got = []
    runner.result_ready.connect(got.append)
    runner.start(slow, "old", 0.3)
    runner.start(slow, "new", 0.0)
    wait_until(lambda: not runner.is_busy)
    wait_for_all()
    qtbot.wait(50)  # deliver any queued signal of the finished thread
    assert got == ["new"]


def test_cancel_drops_the_result(qtbot):
    runner = FigureJobRunner()
    got = []
    runner.result_ready.connect(got.append)
    runner.start(slow, "dropped", 0.2)
    runner.cancel()
    assert not runner.is_busy
    wait_for_all()
    qtbot.wait(50)  # deliver any queued signal of the finished thread
    assert got == []


def test_errors_are_reported_with_their_message(qtbot):
    def bad_model():
        raise InvalidModelError("Conductor 'x' is invalid: no shapes; draw one.")

    def broken():
        raise ZeroDivisionError("division by zero")

    runner = FigureJobRunner()
    messages = []
    runner.job_failed.connect(messages.append)
    runner.start(bad_model)
    wait_until(lambda: not runner.is_busy)
    runner.start(broken)
    wait_until(lambda: not runner.is_busy)
    assert messages == ["Conductor 'x' is invalid: no shapes; draw one.",
                        "Unexpected error in the solver: ZeroDivisionError: division by zero"]


def test_a_new_job_waits_for_a_dropped_thread_so_only_one_computes(qtbot):
    runner = FigureJobRunner()
    got = []
    runner.result_ready.connect(got.append)
    runner.start(slow, "first", 0.3)
    runner.start(slow, "second", 0.0)
    runner.start(slow, "third", 0.0)
    assert runner.is_busy and runner._queued is not None  # the later jobs wait for the first thread
    wait_until(lambda: not runner.is_busy)
    assert got == ["third"]
