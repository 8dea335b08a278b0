"""The project file deleted, replaced or made read-only by another process while the review
screen has it open: a decision fails in one line on screen and nothing is written anywhere."""

from __future__ import annotations

import shutil
from pathlib import Path

from docket.tui.screens import ReviewScreen
from tests.fixtures_review import SIZE, log, pilot_test, press, settle


def _errors(app) -> list[str]:
    return [n.message for n in app._notifications if n.severity == "error"]


def _project_files(path: Path) -> list[Path]:
    return sorted(path.parent.glob(path.name + "*"))


@pilot_test
async def test_a_decision_on_a_deleted_project_file_fails_in_one_line(review_sample,
                                                                       review_app, tmp_path):
    app = review_app(review_sample)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await press(pilot, "s")
        aside = tmp_path / "aside"
        aside.mkdir()
        for f in _project_files(review_sample):  # another process moves the project away
            shutil.move(f, aside / f.name)
        await press(pilot, "d")
        errors = _errors(app)
        assert len(errors) == 1 and "\n" not in errors[0]
        assert "deleted, moved or replaced while it was open; nothing was written" in errors[0]
        assert isinstance(app.screen, ReviewScreen)
        assert not review_sample.exists()  # no empty file made in its place either
    assert [row[2] for row in log(aside / review_sample.name)] == ["match"]


@pilot_test
async def test_a_decision_on_a_file_made_read_only_meanwhile_fails_in_one_line(review_sample,
                                                                               review_app):
    app = review_app(review_sample)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await press(pilot, "s")
        review_sample.chmod(0o444)  # honoured even for root, as on opening
        try:
            await press(pilot, "d", "z")
            errors = _errors(app)
        finally:
            review_sample.chmod(0o644)
    assert len(errors) == 2 and all("made read-only while it was open" in e for e in errors)
    assert [row[2] for row in log(review_sample)] == ["match"]
