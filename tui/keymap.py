"""Remapping keys from a file in the user's config folder.

``$XDG_CONFIG_HOME/docket/keymap.toml`` (``~/.config/docket/keymap.toml`` when the variable
is not set) maps binding ids to keys, in Textual's key names or as the character itself::

    match = "m"
    non-match = "n"
    history-back = "comma"
    find = "ctrl+f"

A ``[keymap]`` table holding the same lines works too. Several keys for one binding are
written comma-separated (``"s,enter"``). Problems (unknown ids, wrong types, a file that is
not TOML) never stop the review: they come back as messages and the defaults stay in place.
"""

from __future__ import annotations

import os
import tomllib
from collections.abc import Iterable
from dataclasses import dataclass, field
from pathlib import Path

from textual.keys import (
    ASCII_KEY_NAMES,
    KEY_NAME_REPLACEMENTS,
    Keys,
    _character_to_key,
    key_to_character,
)

FILE_NAME = "keymap.toml"


@dataclass
class LoadedKeymap:
    path: Path
    keymap: dict[str, str] = field(default_factory=dict)
    problems: list[str] = field(default_factory=list)


def config_dir(environ: dict[str, str] | None = None) -> Path:
    env = os.environ if environ is None else environ
    base = env.get("XDG_CONFIG_HOME") or str(Path(env.get("HOME", "~")).expanduser() /
                                               ".config")
    return Path(base) / "docket"


def keymap_path(environ: dict[str, str] | None = None) -> Path:
    return config_dir(environ) / FILE_NAME


_MODIFIERS = frozenset({"ctrl", "shift", "alt", "meta", "super", "hyper"})
# Names Textual gives key presses that are not one printable character.
_NAMED = ({k.value.rpartition("+")[2] for k in Keys} | set(KEY_NAME_REPLACEMENTS.values())
          | set(ASCII_KEY_NAMES.values()))


def namable(key: str) -> bool:
    """Whether some key press carries this name: a binding to any other name (``"??"``,
    ``"ctrl+"``, a typo) is accepted by Textual and then never fires."""
    *modifiers, last = key.split("+")
    if not last or any(m not in _MODIFIERS for m in modifiers):
        return False
    return len(last) == 1 or last in _NAMED or key_to_character(last) is not None


def _keys(value: object) -> str | None:
    if isinstance(value, str):
        value = value.split(",")
    if not isinstance(value, list) or not all(isinstance(v, str) for v in value):
        return None
    # One key named twice for a binding is one key.
    keys = dict.fromkeys(v.strip() for v in value if v.strip())
    return ",".join(keys) or None


def load_keymap(known_ids: Iterable[str], path: Path | None = None,
                defaults: dict[str, str] | None = None) -> LoadedKeymap:
    """Read the keymap file (if there is one) and keep the entries for known binding ids.

    ``defaults`` (binding id to its default key) lets a key taken from a binding left as it
    is be reported: 'match = "d"' made d record a match and left non-match with no key."""
    path = keymap_path() if path is None else path
    loaded = LoadedKeymap(path)
    if not path.exists():
        return loaded
    try:
        data = tomllib.loads(path.read_text(encoding="utf-8"))
    except (OSError, UnicodeDecodeError, tomllib.TOMLDecodeError) as exc:
        loaded.problems.append(f"{path}: not read ({exc}); using the default keys")
        return loaded
    table = data.get("keymap", data) if isinstance(data.get("keymap"), dict) else data
    known = set(known_ids)
    for binding_id, value in table.items():
        if binding_id not in known:
            loaded.problems.append(f"{path}: no binding '{binding_id}' (known: "
                                   f"{', '.join(sorted(known))})")
            continue
        keys = _keys(value)
        if keys is None:
            loaded.problems.append(f"{path}: '{binding_id}' needs a key name such as \"m\" "
                                   f"or \"ctrl+f\", not {value!r}")
            continue
        unnamed = [k for k in keys.split(",") if not namable(k)]
        if unnamed:
            loaded.problems.append(f"{path}: '{binding_id}' = '{unnamed[0]}' is no key's name "
                                   "(a key is one character, or a name such as \"f2\", "
                                   "\"comma\" or \"ctrl+f\"); its default key stays")
            continue
        loaded.keymap[binding_id] = keys
    clashes = _clashes(loaded.keymap)
    loaded.problems += [f"{path}: key '{k}' is given to {', '.join(ids)}; only the first works"
                        for k, ids in clashes.items()]
    loaded.problems += _taken(loaded.keymap, defaults or {}, path)
    return loaded


def _name(key: str) -> str:
    """A key as Textual names its press: '/' and 'slash' are one key."""
    return _character_to_key(key) if len(key) == 1 else key


def _taken(keymap: dict[str, str], defaults: dict[str, str], path: Path) -> list[str]:
    """A remapped key that is the default key of a binding the file leaves as it is."""
    given = {_name(k): bid for bid, keys in keymap.items() if bid in defaults  # one screen's
             for k in keys.split(",")}
    out = []
    for bid, keys in defaults.items():
        if bid in keymap:
            continue
        for key in keys.split(","):
            if _name(key) in given and given[_name(key)] != bid:
                out.append(f"{path}: key '{key}' is given to {given[_name(key)]}, but it is "
                           f"{bid}'s own key, so {bid} has none now: give {bid} a key too")
    return out


def _clashes(keymap: dict[str, str]) -> dict[str, list[str]]:
    owners: dict[str, list[str]] = {}
    for binding_id, keys in keymap.items():
        for key in keys.split(","):
            owners.setdefault(key, []).append(binding_id)
    return {k: ids for k, ids in owners.items() if len(ids) > 1}
