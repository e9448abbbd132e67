"""Progress and cancellation of a plan: what the planner (:mod:`roomcalc.engine.planner`)
reports between its steps, and how the caller stops it. Plain callables; the engine starts no
threads and waits on nothing. Kept apart from the planner so that a front end can name these
without loading it.

- :class:`PlanProgress` -- one step reached (building, solving, a cutting-plane round, checking
  the treated room), numbered in order, with the time since the plan started;
- :class:`PlanCancelled` -- raised between steps when the caller's cancel check says stop;
- :class:`PlanWatch` -- the two callables together, called by the planner between its steps
  (before each solver call and before each evaluation of a treated room).

A solver call itself is not interrupted: a cancel takes effect when it returns (one call of
HiGHS, at most ``MILP_TIME_LIMIT_S``).
"""

from __future__ import annotations

import time
from collections.abc import Callable
from dataclasses import dataclass

__all__ = ["PlanProgress", "PlanCancelled", "PlanWatch", "STAGES"]

#: The stages a plan goes through, in words.
STAGES = {"building": "building the programme", "solving": "solving",
          "cutting": "cutting plane", "checking": "checking the treated room"}


class PlanCancelled(Exception):
    """The caller's cancel check asked the planner to stop; nothing was planned."""

    def __init__(self, message: str = "the plan was stopped") -> None:
        super().__init__(message)


@dataclass(frozen=True, kw_only=True)
class PlanProgress:
    """One step of a plan: ``step`` counts from 1 in the order reported; ``stage`` one of
    :data:`STAGES`; ``cut`` the cutting-plane round (stage "cutting") of at most ``max_cuts``;
    ``attempt`` the plan made (more than one when a formula not linear in the amounts is
    planned through tightened bounds) of at most ``max_attempts``; ``elastic`` the search for
    the least total shortfall (no plan meets every goal); ``integral`` whole units or panels
    (mixed-integer programme); ``elapsed_s`` since the plan started [s]."""

    step: int
    stage: str
    elapsed_s: float
    cut: int = 0
    max_cuts: int = 0
    attempt: int = 1
    max_attempts: int = 1
    elastic: bool = False
    integral: bool = False
    detail: str = ""

    @property
    def text(self) -> str:
        """The step in words, e.g. "plan 2 of at most 25: cutting plane 3 of at most 49"."""
        if self.stage == "cutting":
            what = f"cutting plane {self.cut} of at most {self.max_cuts}"
        elif self.stage == "solving":
            what = "solving (" + ("mixed-integer" if self.integral else "linear") + \
                " programme)"
        else:
            what = STAGES.get(self.stage, self.stage)
        if self.detail:
            what += f" ({self.detail})"
        if self.elastic:
            what = "no plan meets every goal; least shortfall: " + what
        if self.attempt > 1:
            what = f"plan {self.attempt} of at most {self.max_attempts}: " + what
        return what


def _as_check(cancel) -> Callable[[], bool] | None:
    """A cancel check from a callable returning True to stop, or an object with ``is_set``
    (e.g. ``threading.Event``); None: never."""
    if cancel is None:
        return None
    is_set = getattr(cancel, "is_set", None)
    if callable(is_set):
        return is_set
    if callable(cancel):
        return cancel
    raise TypeError("cancel must be a callable returning True to stop, or have is_set()")


class PlanWatch:
    """The caller's ``progress`` callback (called with a :class:`PlanProgress` at each step)
    and ``cancel`` check (a callable, or an object with ``is_set()``), numbered and timed from
    the moment the watch is made. Either may be None."""

    def __init__(self, progress: Callable[[PlanProgress], object] | None = None,
                 cancel=None, *, clock: Callable[[], float] = time.perf_counter) -> None:
        self._progress = progress
        self._cancel = _as_check(cancel)
        self._clock = clock
        self._t0 = clock()
        self.last: PlanProgress | None = None
        #: The plan being made (set by the planner while it tightens bounds), and its most.
        self.attempt, self.max_attempts = 1, 1

    @property
    def cancelled(self) -> bool:
        return bool(self._cancel is not None and self._cancel())

    def check(self) -> None:
        """Raise PlanCancelled if the caller asked to stop."""
        if self.cancelled:
            raise PlanCancelled()

    def step(self, stage: str, **fields) -> None:
        """A step is about to start: stop here if asked (PlanCancelled), else report it."""
        self.check()
        p = PlanProgress(step=(self.last.step + 1) if self.last else 1, stage=stage,
                         elapsed_s=self._clock() - self._t0, attempt=self.attempt,
                         max_attempts=self.max_attempts, **fields)
        self.last = p
        if self._progress is not None:
            self._progress(p)
