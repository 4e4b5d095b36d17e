"""lagfold for notebooks: how often a measured horizon-IC peak lands on the
best holding horizon, and what a wrong choice costs.

Every function runs the same engine as the ``lagfold`` command line (with
the GIL released) and returns an object holding the very files the command
writes: its scalars are ``summary.json`` / ``measure.json`` parsed, its
tables pandas data frames read from the CSV files.

    >>> import lagfold
    >>> s = lagfold.study("monthly-steady", paths=400, seed=7)
    >>> s.summary["truth"]["best_horizon"]
    >>> m = lagfold.measure(frame, forecast="signal", ret="fwd_return")
    >>> m.lags.head()

Results are simulations under stated assumptions, not investment advice;
defer to your firm's own risk process and licensed professionals.
"""

from ._wrap import (
    __version__,
    Measurement,
    Outcome,
    PlanResult,
    StressResult,
    StudyResult,
    measure,
    plan,
    preset,
    presets,
    simulate_panel,
    stress,
    study,
)

__all__ = [
    "Measurement",
    "Outcome",
    "PlanResult",
    "StressResult",
    "StudyResult",
    "measure",
    "plan",
    "preset",
    "presets",
    "simulate_panel",
    "stress",
    "study",
]
