"""The treatment planner: the cheapest (or smallest) treatment that brings a room to its goals.

Modules (each public name is documented where it is defined):

- :mod:`.goals` -- the data model: :class:`Candidate`, :class:`LevelGoal`, :class:`Goals`,
  :class:`Plan`, :class:`PlanItem`, :data:`PLAN_METHODS`, :data:`OBJECTIVES`;
- :mod:`.bounds` -- RT goals as bounds on absorption (Sabine, Eyring);
- :mod:`.inputs` -- checks of candidates and goals;
- :mod:`.model` -- the linear programme as typed records, goal keys, tolerances;
- :mod:`.build` -- the programme built from a room; :mod:`.solve` -- LP / MILP (HiGHS),
  cutting planes, elastic form; :mod:`.explain` -- the engine's verdict and the reasons;
- :mod:`.apply` -- a treatment applied to a room; :mod:`.plan` -- :func:`plan`;
- the steps a plan reports and how a caller stops it (:class:`PlanProgress`,
  :class:`PlanCancelled`, :class:`PlanWatch`) live in :mod:`roomcalc.engine.progress`, which
  a front end may import without loading the planner.
"""

from roomcalc.engine.planner.apply import apply_to_room
from roomcalc.engine.planner.bounds import (eyring_required_absorption,
                                            sabine_required_absorption)
from roomcalc.engine.planner.goals import (KINDS, OBJECTIVES, PLAN_METHODS, Candidate, Goals,
                                           LevelGoal, Plan, PlanItem, cover_shares,
                                           cover_surfaces)
from roomcalc.engine.planner.inputs import ALPHA_MAX
from roomcalc.engine.planner.model import (AMOUNT_STEP, LEVEL_TOL_DB, LOW_FREQUENCY_HZ,
                                           MAX_CUT_ROUNDS, MAX_SURROGATE_ROUNDS,
                                           MILP_TIME_LIMIT_S, RT_TOL_S, SURROGATE_MARGIN,
                                           TIE_WEIGHT)
from roomcalc.engine.planner.plan import plan
from roomcalc.engine.progress import PlanCancelled, PlanProgress, PlanWatch

__all__ = ["plan", "apply_to_room", "PlanCancelled", "PlanProgress", "PlanWatch", "Candidate",
           "Goals", "LevelGoal", "Plan", "PlanItem", "cover_surfaces", "cover_shares",
           "PLAN_METHODS", "OBJECTIVES", "KINDS", "ALPHA_MAX", "sabine_required_absorption",
           "eyring_required_absorption", "LEVEL_TOL_DB", "RT_TOL_S", "MAX_CUT_ROUNDS",
           "MAX_SURROGATE_ROUNDS", "SURROGATE_MARGIN", "AMOUNT_STEP", "TIE_WEIGHT",
           "MILP_TIME_LIMIT_S", "LOW_FREQUENCY_HZ"]

#: The examples doctest finds through this package (they live in .bounds).
__test__ = {"sabine_required_absorption": sabine_required_absorption,
            "eyring_required_absorption": eyring_required_absorption}
