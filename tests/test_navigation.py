"""The walker both review screens share, without Textual: queue, history and aside."""

from __future__ import annotations

from docket.tui.navigation import Move, Navigator


def test_back_starts_at_the_newest_decision_and_parks_the_queue_pair() -> None:
    nav: Navigator[str] = Navigator()
    assert nav.back(lambda: [], "q1", "none yet", "first") == Move("stay", message="none yet")
    assert nav.parked is None  # nothing to walk: the queue pair stays where it is
    assert nav.back(lambda: [10, 11, 12], "q1", "none yet", "first") == Move("history", 12)
    nav.mode = "history"
    assert nav.parked == "q1" and nav.where("history") == "history 3 of 3"
    assert nav.back(lambda: [99], "ignored", "none yet", "first") == Move("history", 11)
    assert nav.back(lambda: [99], None, "none yet", "first") == Move("history", 10)
    assert nav.back(lambda: [99], None, "none yet", "first") == Move("stay", message="first")


def test_forward_walks_to_the_end_then_returns_to_the_queue() -> None:
    nav: Navigator[int] = Navigator()
    assert nav.forward("newest") == Move("stay", message="newest")
    nav.back(lambda: [1, 2], 7, "", "")
    nav.mode = "history"
    nav.pos = 0
    assert nav.forward("newest") == Move("history", 2)
    assert nav.forward("newest") == Move("queue")
    assert nav.take_parked() == 7 and nav.take_parked() is None


def test_deciding_in_history_moves_to_the_next_history_pair() -> None:
    nav: Navigator[int] = Navigator()
    nav.back(lambda: [1, 2, 3], 9, "", "")
    nav.mode = "history"
    nav.pos = 1
    assert nav.after_decision() == Move("history", 3)
    assert nav.after_decision() == Move("queue")
    nav.mode = "aside"
    assert nav.after_decision() == Move("queue")


def test_an_aside_pair_parks_only_a_queue_pair() -> None:
    nav: Navigator[int] = Navigator()
    nav.open_aside(5)
    assert nav.parked == 5
    nav.mode, nav.parked = "history", None
    nav.open_aside(6)  # leaving history for aside: the trail pair is not a queue pair
    assert nav.parked is None
