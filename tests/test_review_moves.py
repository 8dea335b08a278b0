"""Pilot tests for the review screen's moves, against the sample project: back and forward
through history (changing a past decision), find by pair id or by text, and another record's
candidates; deciding a pair opened aside returns to the queue."""

from __future__ import annotations

import re

from rich.cells import cell_len
from textual.widgets import OptionList

from docket.core import Project
from docket.tui.screens import PairPicker
from tests.fixtures_review import (
    SIZE,
    log,
    pilot_test,
    press,
    review,
    rows,
    screen_text,
    settle,
)


@pilot_test
async def test_history_back_forward_and_changing_a_past_decision(review_sample, review_app):
    app = review_app(review_sample)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        decided = []
        for key in "sss":
            decided.append(review(app).item.pair_id)
            await press(pilot, key)
        waiting = review(app).item.pair_id
        await press(pilot, "left_square_bracket", "left_square_bracket")
        screen = review(app)
        assert (screen.mode, screen.item.pair_id, screen.mine.label) == ("history", decided[1],
                                                                         "match")
        assert "history 2 of 3" in screen_text(app)
        await pilot.press("d")  # change it: appends, then steps forward
        await pilot.pause()
        assert review(app).item.pair_id == decided[2]
        await pilot.press("right_square_bracket")  # past the newest: back to the queue
        await pilot.pause()
        assert (review(app).mode, review(app).item.pair_id) == ("queue", waiting)
        assert review(app).decided == 3
    changed = rows(review_sample, "SELECT label, supersedes IS NOT NULL FROM decisions "
                                   "WHERE pair_id = ? ORDER BY decided_at", (decided[1],))
    assert changed == [("match", 0), ("non-match", 1)]
    with Project.open(review_sample) as project:
        assert project.current_label(decided[1], "maya").label == "non-match"


@pilot_test
async def test_find_by_pair_id_opens_it_and_deciding_returns_to_the_queue(review_sample,
                                                                         review_app):
    app = review_app(review_sample)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        waiting = review(app).item.pair_id
        target = 4242 if waiting != 4242 else 4243
        await press(pilot, "slash")
        assert isinstance(app.screen, PairPicker)
        await press(pilot, *str(target), "enter")
        await press(pilot, "enter")
        assert (review(app).mode, review(app).item.pair_id) == ("aside", target)
        await press(pilot, "h")
        assert (review(app).mode, review(app).item.pair_id) == ("queue", waiting)
    assert log(review_sample)[0][:3] == (target, "maya", "hold")


@pilot_test
async def test_find_by_text_and_escape_back_to_the_queue(review_sample, review_app):
    app = review_app(review_sample)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        waiting = review(app).item.pair_id
        await press(pilot, "slash", *"Fjelholm", "enter")
        found = screen_text(app)
        assert "Fjelholm" in found
        # each side's first values, not the owner alone: the pets tell the Fjelholms apart
        assert any(pet in found for pet in ("Parsnip", "Nimbus", "Gubwick", "Fenble", "Marlet"))
        await press(pilot, "enter")
        assert review(app).mode == "aside"
        await press(pilot, "escape")
        assert (review(app).mode, review(app).item.pair_id) == ("queue", waiting)
    assert log(review_sample) == []


@pilot_test
async def test_other_candidates_can_be_opened(review_sample, review_app):
    app = review_app(review_sample)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        card = review(app).card
        await press(pilot, "c")
        assert isinstance(app.screen, PairPicker)
        assert "left record" in screen_text(app)
        await press(pilot, "enter")
        opened = review(app).card
        assert opened.pair_id != card.pair_id
        assert card.left_id in (opened.left_id, opened.right_id) or \
            card.right_id in (opened.left_id, opened.right_id)


@pilot_test
async def test_a_key_with_nothing_to_do_shows_its_toast_once(review_sample, review_app):
    # Pressed again and again, ']' at the newest pair stacked one toast per press.
    app = review_app(review_sample)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await press(pilot, *["right_square_bracket"] * 5)
        shown = [n.message for n in app._notifications]
        assert shown == ["You are at the newest pair."]


@pilot_test
async def test_the_candidates_list_gives_values_the_room_the_box_has(review_sample, review_app):
    # Values were cut at 18 cells at any width: product titles all read 'Ashgrove silent f…'
    # on a 120-column terminal, 40 cells of each line left empty.
    for size, room, lines in (((80, 24), 4, 2), ((120, 40), 22, 1)):
        app = review_app(review_sample)
        async with app.run_test(size=size) as pilot:
            await settle(pilot)
            await press(pilot, "c")
            assert isinstance(app.screen, PairPicker)
            # 50 cells of pair id, record ids and probability; the box is 108 wide at 120, 94 inside
            assert app.screen._value_cells(50) == room
            # At 80 columns the values wrapped mid-line, the second under the pair id: there
            # they take a line of their own, under the ids
            results = app.screen.query_one(OptionList)
            prompts = [o.prompt for o in results._options if not o.disabled]
            assert prompts and all(len(p.plain.splitlines()) == lines for p in prompts)
            box = results.scrollable_content_region.width
            assert all(cell_len(line) <= box for p in prompts for line in p.plain.splitlines())
            # more than the owner's name, which many candidates of one person share
            assert all(p.plain.count(" · ") >= 2 for p in prompts)


@pilot_test
async def test_found_pairs_line_up_and_the_heading_says_more_may_match(review_sample,
                                                                     review_app):
    # 'p 0.00002' and 'p 0.0004' lines began their values a cell apart, and a search cut at
    # its limit was headed '50 pairs (first 50)'.
    app = review_app(review_sample)
    async with app.run_test(size=(120, 40)) as pilot:
        await settle(pilot)
        await press(pilot, "slash", *"Hofmann", "enter")
        results = app.screen.query_one(OptionList)
        heading = results._options[0].prompt.plain
        lines = [o.prompt.plain for o in results._options if not o.disabled]
        assert len(lines) == 50 and heading.startswith("the first 50 pairs found; more may")
        assert len({line.index("  p ") for line in lines}) == 1
        starts = {re.match(r".*?  p (?:[<>] )?\S+\s+", line).end() for line in lines}  # type: ignore[union-attr]
        assert len(starts) == 1, "every line's values start at one column"
        await press(pilot, "escape", "slash", *"zzzqqq", "enter")
        heading = app.screen.query_one(OptionList)._options[0].prompt.plain
        assert heading.startswith("no pair found") and "masked" not in heading
    # an e-mail typed in while e-mails are masked found nothing, and said not why
    app = review_app(review_sample, mask=["email"])
    async with app.run_test(size=(120, 40)) as pilot:
        await settle(pilot)
        await press(pilot, "slash", *"example.org", "enter")
        heading = app.screen.query_one(OptionList)._options[0].prompt.plain
        assert heading.endswith("(masked columns are never searched)")


@pilot_test
async def test_a_slow_search_leaves_the_screen_answering(review_sample, review_app):
    # find searched on the main thread: text no index finds is looked for in every value
    # (0.16 s over 200,000 records of four short fields, longer over long text), and until it
    # was done no key, not even Escape, was read
    import threading

    app = review_app(review_sample)
    release, searched = threading.Event(), []

    def slow_find(text, limit, skip):
        searched.append(threading.current_thread() is not threading.main_thread())
        release.wait(timeout=30)  # held until the test has pressed its keys
        return []

    app.find = slow_find
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await press(pilot, "slash", *"zzzqqq")
        await pilot.press("enter")
        await pilot.pause()
        heading = app.screen.query_one(OptionList)._options[0].prompt.plain
        assert heading == "searching for ‘zzzqqq’ …"
        await pilot.press("escape")  # read while the search still runs
        await pilot.pause()
        assert not isinstance(app.screen, PairPicker)
        release.set()
        await settle(pilot)
    assert searched == [True]  # in a worker thread


def _prompts(results: OptionList) -> list[str]:
    return [o.prompt.plain for o in results._options if not o.disabled]


@pilot_test
async def test_found_and_candidate_lines_are_laid_out_again_when_the_terminal_narrows(
        review_sample, review_app):
    # Found at 120 columns and narrowed to 80, the lines kept their wide layout: the values
    # beside the ids wrapped mid-value, their second half under the pair id.
    app = review_app(review_sample)
    async with app.run_test(size=(120, 40)) as pilot:
        await settle(pilot)
        for keys in (("slash", *"Hartfield", "enter"), ("c",)):
            await press(pilot, *keys)
            results = app.screen.query_one(OptionList)
            await press(pilot, "down")
            chosen = results.get_option_at_index(results.highlighted).id
            assert all(len(p.splitlines()) == 1 for p in _prompts(results))
            await pilot.resize_terminal(80, 24)
            await settle(pilot)
            box = results.scrollable_content_region.width
            assert all(len(p.splitlines()) == 2 for p in _prompts(results))
            assert all(cell_len(line) <= box for p in _prompts(results) for line in p.splitlines())
            assert results.get_option_at_index(results.highlighted).id == chosen
            await pilot.resize_terminal(120, 40)
            await settle(pilot)
            assert all(len(p.splitlines()) == 1 for p in _prompts(results))
            await press(pilot, "escape")
