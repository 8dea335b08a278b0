"""Snapshots of the review screen on the sample, at 80×24 and 120×40.

The app is built by the test factory with a frozen clock, so pace and time on the pair are
the same on every run; background workers are waited for before the picture is taken.
Regenerate after an intended change with ``pytest tests/test_review_snapshots.py
--snapshot-update`` and look at the pictures before committing them.
"""

from __future__ import annotations


async def _settled(pilot) -> None:
    await pilot.pause()
    await pilot.app.workers.wait_for_complete()
    await pilot.pause()


def test_review_80x24(snap_compare, review_sample, review_app):
    assert snap_compare(review_app(review_sample), terminal_size=(80, 24),
                        run_before=_settled)


def test_review_120x40(snap_compare, review_sample, review_app):
    assert snap_compare(review_app(review_sample), terminal_size=(120, 40),
                        run_before=_settled)


def test_review_masked_after_two_decisions_120x40(snap_compare, review_sample, review_app):
    async def run_before(pilot) -> None:
        await _settled(pilot)
        await pilot.press("s", "d")
        await _settled(pilot)

    assert snap_compare(review_app(review_sample, mask=["email", "phone", "owner"]),
                        terminal_size=(120, 40), run_before=run_before)


def test_review_history_80x24(snap_compare, review_sample, review_app):
    async def run_before(pilot) -> None:
        await _settled(pilot)
        await pilot.press("s", "d", "left_square_bracket")
        await _settled(pilot)

    assert snap_compare(review_app(review_sample), terminal_size=(80, 24),
                        run_before=run_before)


def test_help_80x24(snap_compare, review_sample, review_app):
    async def run_before(pilot) -> None:
        await _settled(pilot)
        await pilot.press("question_mark")
        await _settled(pilot)

    assert snap_compare(review_app(review_sample), terminal_size=(80, 24),
                        run_before=run_before)


def test_hostile_values_120x40(snap_compare, review_hostile, review_app):
    assert snap_compare(review_app(review_hostile), terminal_size=(120, 40),
                        run_before=_settled)
