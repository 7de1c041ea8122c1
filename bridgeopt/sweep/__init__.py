"""Option sweeps: every combination of a sweep file's listed values, solved in parallel.

``bridgeopt sweep SWEEP.toml -o DIR`` (see ``docs/formats.md``): a sweep file is
a scenario file in which any value may be a list (:mod:`.expand`); each case is
solved in a worker process or on a Dask cluster (:mod:`.cases`, :mod:`.run`)
and recorded as it finishes, so a sweep is resumable (:mod:`.store`).
"""

from bridgeopt.sweep.cases import RESULT_COLUMNS, solve_case
from bridgeopt.sweep.expand import Case, Sweep, case_key, expand_sweep, load_sweep
from bridgeopt.sweep.run import SweepOutcome, run_sweep
from bridgeopt.sweep.store import Journal, results_frame, write_tables

__all__ = ["RESULT_COLUMNS", "Case", "Sweep", "SweepOutcome", "Journal", "case_key",
           "expand_sweep", "load_sweep", "run_sweep", "results_frame", "solve_case",
           "write_tables"]
