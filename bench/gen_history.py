#!/usr/bin/env python3
# Generates a benchmark data plan and landing log for `readyby record` and
# `readyby nightly` (bench/run.sh, section "history"). Generated data:
# fictional, deterministic for a seed; written to the paths given, never into
# the repository.
#
#   gen_history.py PLAN_OUT LOG_OUT --sources 500 --days 365 --end 2026-03-01 [--seed 1]
#
# The plan has SOURCES daily sources, one job per 10 sources, two features per
# job and one model per 10 features (runs at 07:00 local). The log has one
# delivery per source per day for DAYS days ending on END, about 1% failed.

import argparse
import datetime as dt
import random
import time


def main():
    p = argparse.ArgumentParser()
    p.add_argument("plan_out")
    p.add_argument("log_out")
    p.add_argument("--sources", type=int, default=500)
    p.add_argument("--days", type=int, default=365)
    p.add_argument("--end", default="2026-03-01")
    p.add_argument("--seed", type=int, default=1)
    a = p.parse_args()
    rng = random.Random(a.seed)
    n = a.sources
    minutes = [rng.randrange(0, 240) for _ in range(n)]  # 00:00 to 03:59 UTC
    with open(a.plan_out, "w") as f:
        f.write("plan: bench-history\ntitle: Generated benchmark plan (fictional)\ntimezone: America/Chicago\nsources:\n")
        for s in range(n):
            f.write(f"  src_{s:04d}:\n    schedule: \"{minutes[s] % 60} {minutes[s] // 60} * * *\"\n"
                    f"    timezone: Etc/UTC\n    lands_after: PT30M\n    data_lag: PT1H\n")
        jobs = (n + 9) // 10
        f.write("jobs:\n")
        for j in range(jobs):
            inputs = ", ".join(f"src_{s:04d}" for s in range(j * 10, min(n, j * 10 + 10)))
            f.write(f"  job_{j:04d}:\n    inputs: [{inputs}]\n    run_time: PT10M\n")
        f.write("features:\n")
        features = []
        for j in range(jobs):
            for k in range(2):
                name = f"feat_{j:04d}_{k}"
                features.append(name)
                f.write(f"  {name}:\n    inputs: [job_{j:04d}]\n    max_age: PT30H\n")
        f.write("models:\n")
        for m in range((len(features) + 9) // 10):
            chosen = ", ".join(features[m * 10:m * 10 + 10])
            f.write(f"  model_{m:03d}:\n    features: [{chosen}]\n    runs:\n      - at: \"0 7 * * *\"\n")
    end = dt.date.fromisoformat(a.end)
    first = end - dt.timedelta(days=a.days - 1)
    base = int(dt.datetime(first.year, first.month, first.day, tzinfo=dt.timezone.utc).timestamp())
    fmt = lambda t: time.strftime("%Y-%m-%dT%H:%M:%SZ", time.gmtime(t))
    with open(a.log_out, "w") as f:
        f.write("node,landed_at,data_through,rows,status\n")
        for d in range(a.days):
            day = base + d * 86400
            lines = []
            for s in range(n):
                occurrence = day + minutes[s] * 60
                landed = occurrence + 1500 + rng.randrange(-600, 600)
                status = "failed" if rng.random() < 0.01 else "ok"
                lines.append(f"src_{s:04d},{fmt(landed)},{fmt(occurrence - 3600)},{rng.randrange(100, 100000)},{status}\n")
            f.writelines(lines)


if __name__ == "__main__":
    main()
