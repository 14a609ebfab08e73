#!/usr/bin/env python3
"""numpy counterpart of MonteCarloAlphaBench: probability that each arm is best for 5 Beta arms
(rates 0.10 .. 0.14 on 1,000 trials each, uniform prior) from 10,000 joint draws, written the way a
data scientist would: one vectorised Generator.beta call over a (10000, 5) array, argmax, bincount.

Prints the median milliseconds per evaluation over several timeit repeats, by the wall clock and by the
process's CPU time (time.process_time; on a machine shared with other builds the CPU time is the figure to
set beside SideBySide's thread CPU time for the Java side).
Usage: python3 src/bench/alpha_numpy.py [repeats]
"""
import sys
import time
import timeit

import numpy as np

DRAWS = 10_000
TRIALS = 1_000
RATES = np.array([0.10, 0.11, 0.12, 0.13, 0.14])
SUCCESSES = np.round(RATES * TRIALS)
A = 1 + SUCCESSES
B = 1 + TRIALS - SUCCESSES


def alpha(rng):
    draws = rng.beta(A, B, size=(DRAWS, len(A)))
    wins = np.bincount(np.argmax(draws, axis=1), minlength=len(A))
    return wins / DRAWS


def main():
    repeats = int(sys.argv[1]) if len(sys.argv) > 1 else 15
    rng = np.random.default_rng(12345)
    print("alpha", alpha(rng))
    for name, clock in (("wall", time.perf_counter), ("cpu", time.process_time)):
        timer = timeit.Timer(lambda: alpha(rng), timer=clock)
        number, _ = timer.autorange()
        per_call_ms = [t / number * 1e3 for t in timer.repeat(repeat=repeats, number=number)]
        print(f"numpy {np.__version__} ({name}): median {np.median(per_call_ms):.3f} ms per evaluation "
              f"(min {min(per_call_ms):.3f}, max {max(per_call_ms):.3f}; {repeats} repeats of {number} calls)")


if __name__ == "__main__":
    main()
