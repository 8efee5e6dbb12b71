"""How fast this machine runs the kind of work a query is made of, so figures from different machines compare.

Latency figures in microseconds depend on the machine as much as on the code:
the same query code measured 46-53 us on one session's VM and over 100 us on
another's.  Two fixed workloads give a yardstick recorded beside every
latency table:

* ``python_loop_ns``: nanoseconds per iteration of a plain Python loop adding
  integers (interpreter speed);
* ``numpy_call_ns``: nanoseconds per small numpy call (``searchsorted`` of 8
  values in a 4,096-element array, the size of call a suggestion makes dozens
  of times).

Each is the median of seven timed runs.
"""

from __future__ import annotations

import os
import platform
import time
from collections.abc import Callable
from typing import Any

import numpy as np


def _median_ns(run: Callable[[], None], repeats: int, per_run: int) -> float:
    """Nanoseconds per unit of work: the median over ``repeats`` runs of ``per_run`` units each."""
    samples = []
    for _ in range(repeats):
        started = time.perf_counter_ns()
        run()
        samples.append((time.perf_counter_ns() - started) / per_run)
    return float(np.median(samples))


def reference_speed(repeats: int = 7) -> dict[str, float]:
    """The two yardstick figures (see the module docstring), in nanoseconds."""
    loops = 1_000_000

    def python_loop() -> None:
        total = 0
        for i in range(loops):
            total += i

    haystack = np.arange(0, 4096 * 3, 3, dtype=np.int64)
    needles = np.array([5, 300, 1200, 2400, 4000, 7000, 9000, 12000], dtype=np.int64)
    calls = 20_000

    def numpy_calls() -> None:
        search = haystack.searchsorted
        for _ in range(calls):
            search(needles)

    return {"python_loop_ns": _median_ns(python_loop, repeats, loops), "numpy_call_ns": _median_ns(numpy_calls, repeats, calls)}


def machine_facts() -> dict[str, Any]:
    """What a benchmark records of the machine when it starts: cores, versions, load and the yardstick."""
    return {
        "cpus": os.cpu_count(),
        "python": platform.python_version(),
        "numpy": np.__version__,
        "platform": platform.platform(),
        "load_average_at_start": os.getloadavg(),
        "yardstick_at_start": reference_speed(),
    }


def finish_facts(machine: dict[str, Any]) -> None:
    """Add the load and the yardstick at the end of the run (the machine may have changed meanwhile)."""
    machine["load_average_at_end"] = os.getloadavg()
    machine["yardstick_at_end"] = reference_speed()


def describe(speed: dict[str, float]) -> str:
    """One line for a printed table."""
    return f"machine yardstick: Python loop {speed['python_loop_ns']:.0f} ns/iteration, small numpy call {speed['numpy_call_ns']:.0f} ns"


if __name__ == "__main__":
    print(describe(reference_speed()))
