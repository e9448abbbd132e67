"""The core without a user interface: one room being studied, the rules of editing it, and
its answers (the result by the formula in force, target check, exposure, plan, comparison).
The command line and the terminal interface both call it; neither assembles the pipeline.

Layers: ``roomcalc.engine`` <- ``roomcalc.io`` <- ``roomcalc.study`` <- ``roomcalc.present``
<- ``roomcalc.cli`` / ``roomcalc.tui``.
"""

from roomcalc.study.assessment import (LevelCheck, Occupancy, PlanRun, TargetCheck, exposures,
                                       make_plan, target_check)
from roomcalc.study.study import Answer, Study

__all__ = ["Answer", "LevelCheck", "Occupancy", "PlanCancelled", "PlanProgress", "PlanRun",
           "Study", "TargetCheck", "exposures", "make_plan", "target_check"]


def __getattr__(name: str):
    """The plan's progress types are imported when first asked for (the interface's Plan tab,
    ``roomcalc plan``), not by every report's start-up."""
    if name in ("PlanCancelled", "PlanProgress"):
        from roomcalc.engine import progress

        return getattr(progress, name)
    raise AttributeError(f"module {__name__!r} has no attribute {name!r}")
