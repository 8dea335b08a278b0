"""Runs the real review app (headless) on a project and decides pairs when told to.

    python tests/review_driver.py PROJECT REVIEWER

Prints ``ready`` once the first pair is on screen. Then, for every line read on stdin, presses
the decision key and prints ``decided N`` once the next pair has been painted, so a parent
process knows exactly how many decisions the app has reported before it kills it.
"""

from __future__ import annotations

import asyncio
import sys
from pathlib import Path

from textual import events

from docket.tui.review_app import make_app

KEYS = "sdsh"  # match, non-match, match, hold, ...


async def drive(path: Path, reviewer: str) -> None:
    app = make_app(path, reviewer, keymap_file=path.with_suffix(".no-keymap"))
    painted = asyncio.Event()
    async with app.run_test(size=(100, 30)) as pilot:
        await pilot.pause()
        app.on_painted = painted.set
        print("ready", flush=True)
        n = 0
        while True:
            line = await asyncio.to_thread(sys.stdin.readline)
            if not line:
                break
            painted.clear()
            key = KEYS[n % len(KEYS)]
            app.post_message(events.Key(key, key))
            await painted.wait()
            n += 1
            print(f"decided {n}", flush=True)


if __name__ == "__main__":
    asyncio.run(drive(Path(sys.argv[1]), sys.argv[2]))
