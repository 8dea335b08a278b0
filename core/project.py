"""The facade: one object per open project, offering the verbs the front ends need.

The CLI and the TUI call only this (and the plain dataclasses in ``types``); they hold no SQL
and no statistics.
"""

from __future__ import annotations

import threading
from collections.abc import Collection
from typing import TYPE_CHECKING, Any

from .errors import DocketError
from .matcher_verbs import MatcherVerbs
from .matching import name_swap
from .matching.explain import explanation
from .ordering import queue
from .queue_verbs import QueueVerbs
from .report_verbs import ReportVerbs
from .reviewing import gold, missed
from .reviewing.gold import Gold, gold_labels
from .reviewing.missed import MissedMatch
from .storage import decisions as log
from .storage import roles, search, store
from .storage.refit import RefitResult, decision_mark, refit
from .team_verbs import TeamVerbs
from .types import ROLES, Decision, FieldComparison, PairCard, QueueItem

if TYPE_CHECKING:  # building needs pandas; opening a project does not
    from .storage.build import Built, NewProject, Progress


class Project(TeamVerbs, ReportVerbs, MatcherVerbs, QueueVerbs):
    """The facade: an open project file plus the verbs the front ends need.

    The verbs over people's labels, reports, stored matchers and the review queue live in
    ``team_verbs``, ``report_verbs``, ``matcher_verbs`` and ``queue_verbs``; pairs and
    decisions here.

    Thread-safe for one writer: calls are serialised by the file's lock.
    """

    @staticmethod
    def create(spec: NewProject, progress: Progress | None = None,
               cancel: threading.Event | None = None) -> Built:
        from .storage.build import build
        return build(spec, progress, cancel)

    # -- reviewers ---------------------------------------------------------------------------
    def ensure_reviewer(self, name: str, role: str = "reviewer") -> str:
        """Register ``name`` if new; returns the name to work under (see ``roles.as_kept``)."""
        name = roles.plain_name(name)
        if role not in ROLES:
            raise DocketError(f"unknown role '{role}'; use reviewer or adjudicator")
        with self._lock:  # a role beyond reviewer is only ever granted (team.add_reviewer)
            return roles.enter(self._conn, name)

    # -- pairs -------------------------------------------------------------------------------
    def _record(self, side: str, record_id: str) -> dict[str, str | None]:
        table = "right_records" if side == "right" and self.link else "left_records"
        column = self.meta["right_id_column" if table == "right_records" else "left_id_column"]
        cur = self._conn.execute(f"SELECT * FROM {table} WHERE {store.quote(column)} = ?",
                                 (record_id,))
        row = cur.fetchone()
        if row is None:
            return {}
        names = [d[0] for d in cur.description]
        return {k: v for k, v in zip(names, row, strict=True) if k != column}

    def record_columns(self) -> list[str]:
        """Every column of the project's records, left table first (ids included)."""
        tables = ["left_records", "right_records"] if self.link else ["left_records"]
        with self._lock:
            names = [r[1] for t in tables
                     for r in self._conn.execute(f"PRAGMA table_info({t})")]
        return list(dict.fromkeys(names))

    def record(self, side: str, record_id: str) -> dict[str, str | None]:
        with self._lock:
            return self._record(side, record_id)

    def card(self, pair_id: int, reason: str | None = None) -> PairCard:
        """Everything the pair card and evidence panel show for one pair: its probability and
        the model's factors read together, whoever refit last."""
        with self._lock, self._snapshot():
            self.reload_if_refit()
            sims = ", ".join(store.similarity_column(f.name) for f in self.fields)
            row = self._conn.execute(
                f"SELECT p.left_id, p.right_id, p.audit, p.overlap, p.n_labels, t.levels, "
                f"t.probability, {sims} FROM pairs p JOIN patterns t "
                "ON t.pattern_id = p.pattern_id WHERE p.pair_id = ?", (pair_id,)).fetchone()
            if row is None:
                raise DocketError(f"no pair {pair_id} in {self.path}")
            left_id, right_id, audit, overlap, n_labels, levels, prob = row[:7]
            names = {(f, lv): name for f, lv, name in self._conn.execute(
                "SELECT field, level, level_name FROM model")}
            left = self._record("left", left_id)
            right = self._record("right", right_id)
            if self.link:
                counts = [self._conn.execute(f"SELECT count(*) - 1 FROM pairs WHERE {col} = ?",
                                             (rid,)).fetchone()[0]
                          for col, rid in (("left_id", left_id), ("right_id", right_id))]
            else:  # one table: a record can sit on either side of a pair
                counts = [self._conn.execute(
                    "SELECT count(*) - 1 FROM pairs WHERE left_id = ? OR right_id = ?",
                    (rid, rid)).fetchone()[0] for rid in (left_id, right_id)]
        lvls = [int(x) for x in levels.split(",")]
        table = explanation(self.meta)
        rows = []
        swapped = name_swap.swapped_fields(self.fields, left, right)
        frequent = self.meta.get("fs_model", {}).get("frequent", {})
        for j, (f, lv, sim) in enumerate(zip(self.fields, lvls, row[7:], strict=True)):
            level_name = names[(f.name, lv)]
            if f.name in swapped and lv == name_swap.close_level(f, frequent):
                level_name = name_swap.SWAPPED
            rows.append(FieldComparison(f.name, f.kind, left.get(f.left_column),
                                        right.get(f.right_column), sim, lv, level_name,
                                        float(table.parts[j][lv])))
        compared_l = {f.left_column for f in self.fields}
        compared_r = {f.right_column for f in self.fields}
        if reason is None:
            reason = queue.reason_for(float(prob), self.threshold, bool(audit),
                                      bool(overlap and n_labels))
        log_odds = table.base + sum(r.contribution for r in rows)
        return PairCard(
            pair_id, left_id, right_id, float(prob), log_odds, table.base, reason,
            tuple(rows), {k: v for k, v in left.items() if k not in compared_l},
            {k: v for k, v in right.items() if k not in compared_r}, int(counts[0]),
            int(counts[1]), self.link, table.model)

    def candidates_of(self, side: str, record_id: str) -> list[QueueItem]:
        """Every candidate pair that names this record (the evidence panel's 'others')."""
        where = ("p.left_id = ? OR p.right_id = ?" if not self.link else
                 f"p.{'left' if side == 'left' else 'right'}_id = ?")
        args = (record_id, record_id) if not self.link else (record_id,)
        with self._lock:
            rows = self._conn.execute(
                "SELECT p.pair_id, p.left_id, p.right_id, t.probability FROM pairs p "
                f"JOIN patterns t ON t.pattern_id = p.pattern_id WHERE {where} "
                "ORDER BY t.probability DESC, p.pair_id", args).fetchall()
        return [QueueItem(int(a), b, c, float(d), "candidate") for a, b, c, d in rows]

    def find(self, text: str, limit: int = 50, skip: Collection[str] = ()) -> list[int]:
        """Pairs by pair id and by record id, else by the words of a record on either side.

        ``skip``: columns (compared case-insensitively) whose text is never searched, so a
        masked value cannot be confirmed by guessing it.
        """
        with self._lock:
            return search.find_pairs(self._conn, self.meta, self.link, text, limit, skip)

    # -- decisions ---------------------------------------------------------------------------
    def current_label(self, pair_id: int, reviewer: str,
                      role: str = "reviewer") -> Decision | None:
        with self._lock:
            return log.current_of(self._conn, pair_id, reviewer, role)

    def history(self, reviewer: str, role: str = "reviewer") -> list[Decision]:
        with self._lock:
            return log.history(self._conn, reviewer, role)

    def decisions(self, pair_id: int | None = None) -> list[Decision]:
        with self._lock:
            return log.log(self._conn, pair_id)

    def decisions_by_others(self, reviewer: str) -> tuple[int, int]:
        """(decisions in the log, distinct reviewers) from anyone but ``reviewer``."""
        with self._lock:
            n, people = self._conn.execute(
                "SELECT count(*), count(DISTINCT reviewer) FROM decisions WHERE reviewer != ?",
                (reviewer,)).fetchone()
        return int(n), int(people)

    def decisions_since_refit(self) -> int:
        with self._lock:
            return int(self._conn.execute("SELECT count(*) FROM decisions WHERE decided_at > ?",
                                          (self.meta.get("refit_at", ""),)).fetchone()[0])

    # -- model -------------------------------------------------------------------------------
    def refit(self) -> RefitResult:
        with self._lock:
            mark = decision_mark(self._conn)
            result = refit(self._conn, gold.fitting_labels(self._conn), mark)
            if not result.superseded:
                store.set_meta(self._conn, refit_at=log.stamp())
            self.meta = store.get_meta(self._conn)
        return result

    # -- matches that are not candidates ----------------------------------------------------
    def record_missed(self, left_id: str, right_id: str, reviewer: str,
                      note: str = "") -> MissedMatch:
        """A true match blocking did not pair, by its two record ids (see reviewing.missed)."""
        return missed.record(self, left_id, right_id, reviewer, note)

    def remove_missed(self, left_id: str, right_id: str) -> bool:
        return missed.remove(self, left_id, right_id)

    def missed_matches(self) -> list[MissedMatch]:
        with self._lock:
            return missed.listing(self._conn)

    # -- gold --------------------------------------------------------------------------------
    def gold_labels(self) -> list[Gold]:
        """The gold labels under the project's policy, read under the lock."""
        with self._lock:
            return gold_labels(self._conn)

    def gold_policy(self) -> dict[str, Any]:
        with self._lock:
            return gold.policy(self._conn)

    def set_gold_policy(self, **changes: Any) -> dict[str, Any]:
        """Change rules of the gold-label policy (see reviewing.gold); the policy now."""
        if "min_reviews" in changes and int(changes["min_reviews"]) < 1:
            raise DocketError("--min-reviews: give 1 or more")
        with self.transaction() as conn:
            changed = gold.set_policy(conn, **changes)
        self.meta = store.get_meta(self._conn)
        return changed
