"""The timing rule and the result line of `npm run bench`'s reference scripts (shared by them).

best_time(work): best of at least three runs and one second of runs, stopping once they pass 10 s or at 50
runs -- the rule scripts/bench.ts applies to the engine's side -- returning (seconds, last result).
print_result(...): the one JSON line scripts/bench.ts reads as the script's last stdout line.
"""
import json
import resource
import time


def best_time(work):
    runs = []
    while True:
        t0 = time.perf_counter()
        result = work()
        runs.append(time.perf_counter() - t0)
        if sum(runs) > 10.0 or (len(runs) >= 3 and sum(runs) >= 1.0) or len(runs) >= 50:
            return min(runs), result


def print_result(case, n, seconds, blas, method, **extra):
    print(
        json.dumps(
            {
                "case": case,
                "n": n,
                "seconds": seconds,
                "peakRssKb": resource.getrusage(resource.RUSAGE_SELF).ru_maxrss,
                "blas": blas,
                "method": method,
                **extra,
            }
        )
    )
