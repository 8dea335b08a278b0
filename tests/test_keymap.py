"""Keymap files: their forms, the problems they report, and the review screen under one."""

from __future__ import annotations

from pathlib import Path

from docket.tui.keymap import keymap_path, load_keymap
from tests.fixtures_review import SIZE, log, pilot_test, press, screen_text, settle


@pilot_test
async def test_keymap_file_remaps_keys(review_sample, review_app, tmp_path):
    keymap = tmp_path / "keymap.toml"
    keymap.write_text('match = "m"\nno-such-binding = "k"\n')
    app = review_app(review_sample, keymap_file=keymap)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        assert any("no-such-binding" in p for p in app.keymap.problems)
        await pilot.press("s")  # no longer bound
        await pilot.pause()
        assert log(review_sample) == []
        await press(pilot, "m")
        assert "m match" in screen_text(app)
    assert log(review_sample)[0][2] == "match"


def test_keymap_file_forms_and_problems(tmp_path):
    ids = ["match", "non-match", "find"]
    path = tmp_path / "keymap.toml"
    path.write_text('[keymap]\nmatch = ["m", "enter"]\nfind = "ctrl+f"\nnon-match = 3\n')
    loaded = load_keymap(ids, path)
    assert loaded.keymap == {"match": "m,enter", "find": "ctrl+f"}
    assert any("'non-match' needs a key name" in p for p in loaded.problems)
    path.write_text('match = "x"\nnon-match = "x"\n')
    assert any("key 'x' is given to match, non-match" in p
               for p in load_keymap(ids, path).problems)
    path.write_text("match = \n")
    broken = load_keymap(ids, path)
    assert broken.keymap == {} and "not read" in broken.problems[0]
    assert load_keymap(ids, tmp_path / "absent.toml").problems == []
    assert keymap_path({"XDG_CONFIG_HOME": "/x"}) == Path("/x/docket/keymap.toml")
    assert keymap_path({"HOME": "/home/u"}) == Path("/home/u/.config/docket/keymap.toml")


def test_a_key_taken_from_a_binding_left_as_it_is_is_reported(tmp_path):
    # 'match = "d"' made d record a match and left non-match without a key, unsaid: a
    # reviewer pressing d for a non-match recorded a match
    defaults = {"match": "s", "non-match": "d", "find": "slash"}
    path = tmp_path / "keymap.toml"
    path.write_text('match = "d"\n')
    problems = load_keymap(list(defaults), path, defaults).problems
    assert problems == [f"{path}: key 'd' is given to match, but it is non-match's own key, "
                        "so non-match has none now: give non-match a key too"]
    path.write_text('match = "d"\nnon-match = "n"\n')  # both moved: nothing to say
    assert load_keymap(list(defaults), path, defaults).problems == []
    path.write_text('match = "/"\n')  # '/' is the key named 'slash'
    assert "find has none now" in load_keymap(list(defaults), path, defaults).problems[0]
    path.write_text('note = "d"\n')  # a binding of another screen takes nothing from this one
    assert load_keymap(["note", *defaults], path, defaults).problems == []


def test_the_review_app_checks_the_keys_the_file_takes(review_sample, review_app, tmp_path):
    keymap = tmp_path / "keymap.toml"
    keymap.write_text('match = "d"\n')
    app = review_app(review_sample, keymap_file=keymap)
    app.project.close()  # never run: only its keymap is looked at
    assert any("non-match has none now" in p for p in app.keymap.problems)


def test_keymap_keys_no_press_is_named_are_refused_and_the_default_stays(tmp_path):
    ids = ["match", "non-match", "find", "help"]
    path = tmp_path / "keymap.toml"
    path.write_text('match = "??"\nfind = "ctrl+"\nnon-match = " , "\nhelp = "crtl+h"\n')
    loaded = load_keymap(ids, path)
    assert loaded.keymap == {}
    assert any("'match' = '??' is no key's name" in p for p in loaded.problems)
    assert any("'find' = 'ctrl+'" in p for p in loaded.problems)
    assert any("'help' = 'crtl+h'" in p for p in loaded.problems)
    assert any("'non-match' needs a key name" in p for p in loaded.problems)
    path.write_text('match = "f2,f2"\nfind = "comma, ctrl+shift+f"\nhelp = "!"\n'
                    'non-match = "é"\n')
    named = load_keymap(ids, path)
    assert named.problems == []  # one key named twice is no clash with itself
    assert named.keymap == {"match": "f2", "find": "comma,ctrl+shift+f", "help": "!",
                            "non-match": "é"}


@pilot_test
async def test_a_keymap_key_no_press_is_named_leaves_the_decision_key_working(
        review_sample, review_app, tmp_path):
    keymap = tmp_path / "keymap.toml"
    keymap.write_text('match = "??"\n')
    app = review_app(review_sample, keymap_file=keymap)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await press(pilot, "s")
    assert log(review_sample)[0][2] == "match"
