"""The later key puts the queue's pair off: nothing is written, its claim is given back, and
it comes back once the queue holds nothing else."""

from __future__ import annotations

import sqlite3
from pathlib import Path

from docket.core import NewProject, Project
from tests.fixtures_review import pilot_test, press, review, rows, settle
from tests.test_review_claims import claims_of


@pilot_test
async def test_later_shows_the_next_pair_and_writes_no_decision(review_sample, review_app):
    app = review_app(review_sample)
    async with app.run_test(size=(120, 40)) as pilot:
        await settle(pilot)
        first = review(app).item.pair_id
        await press(pilot, "l")
        second = review(app).item.pair_id
        assert second != first and review(app).mode == "queue"
        assert claims_of(review_sample) == [(second, "maya")]  # the first is free for others
        await press(pilot, "s")
        assert review(app).item.pair_id not in (first, second)  # still put off
        assert review(app).decided == 1
    assert rows(review_sample, "SELECT pair_id FROM decisions") == [(second,)]


@pilot_test
async def test_pairs_put_off_come_back_when_nothing_else_is_left(tmp_path: Path, review_app):
    csv = tmp_path / "three.csv"  # invented: three records, so three pairs in all
    csv.write_text("id,name\na1,Arlo Vesk\na2,Arlo Vesk\na3,Bo Rask\n", encoding="utf-8")
    path = tmp_path / "three.docket"
    Project.create(NewProject(path=path, left=csv, id_column="id", rules=["*"]))
    app = review_app(path)
    async with app.run_test(size=(120, 40)) as pilot:
        await settle(pilot)
        seen = [review(app).item.pair_id]
        for _ in range(2):
            await press(pilot, "l")
            seen.append(review(app).item.pair_id)
        assert len(set(seen)) == 3
        await press(pilot, "l")  # nothing else: the pairs put off come back, in turn
        assert review(app).item is not None and review(app).item.pair_id in seen
        for _ in range(3):
            await press(pilot, "d")
        assert review(app).item is None and review(app).decided == 3
    with sqlite3.connect(path) as conn:
        assert conn.execute("SELECT count(DISTINCT pair_id) FROM decisions").fetchone()[0] == 3


@pilot_test
async def test_later_outside_the_queue_says_how_back(review_sample, review_app):
    app = review_app(review_sample)
    async with app.run_test(size=(120, 40)) as pilot:
        await settle(pilot)
        await press(pilot, "s", "z")  # undone: the pair is shown aside, to decide again
        undone = review(app).item.pair_id
        await press(pilot, "l")
        assert review(app).item.pair_id == undone and review(app).mode == "aside"
