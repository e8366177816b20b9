#!/usr/bin/env python3
# Generates a benchmark data plan and landing log for `readyby record` and
# `readyby nightly` (bench/run.sh, section "history"). Generated data:
# fictional, deterministic for a seed; written to the paths given, never into
# the repository.
#
#   gen_history.py PLAN_OUT LOG_OUT --sources 500 --days 365 --end 2026-03-01 [--seed 1]
#   gen_history.py --for-plan PLAN LOG_OUT --monitor 500 --days 365 --end 2026-02-28 [--seed 1]
#
# The plan has SOURCES daily sources, one job per 10 sources, two features per
# job and one model per 10 features (runs at 07:00 local). The log has one
# delivery per source per day for DAYS days ending on END, about 1% failed.
#
# --for-plan writes a log for an existing plan from bench/gen_plan.py instead
# (for `readyby forecast`): its first MONITOR scheduled sources get every
# occurrence of their cron schedule (hourly, daily, weekday-only, weekly; in
# their zones, local times read as RFC 5545 §3.3.5 says) over DAYS days ending
# on END. Each source has its own offset distribution around its lands_after
# (normal spread, a long late tail, a tenth of them drifting later each week),
# about 2% of occurrences missing and 1% delivered first as failed. No
# scheduled_at is written, so readyby infers each row's occurrence.

import argparse
import datetime as dt
import random
import re
import time
from zoneinfo import ZoneInfo

UTC = dt.timezone.utc


def read_generated_sources(path):
    """The sources of a bench/gen_plan.py plan: id -> its fields (a line parser for that output only)."""
    sources, plan_zone, current, section = {}, "Etc/UTC", None, None
    for line in open(path):
        if line.startswith("timezone:"):
            plan_zone = line.split(":", 1)[1].strip()
        elif re.match(r"^[a-z]+:\s*$", line):
            section = line.strip()[:-1]
        elif section == "sources" and re.match(r"^  \S+:\s*$", line):
            current = line.strip()[:-1]
            sources[current] = {}
        elif section == "sources" and current and line.startswith("    "):
            key, value = line.strip().split(":", 1)
            sources[current][key] = value.strip().strip('"')
    for fields in sources.values():
        fields.setdefault("timezone", plan_zone)
    return sources


def minutes_of(duration):
    m = re.fullmatch(r"PT(?:(\d+)H)?(?:(\d+)M)?", duration or "PT0M")
    return int(m.group(1) or 0) * 60 + int(m.group(2) or 0)


def local_to_utc(day, hour, minute, zone):
    # fold=0: a gap time takes the offset before the gap, a repeated time its first occurrence (RFC 5545 §3.3.5).
    return dt.datetime(day.year, day.month, day.day, hour, minute, tzinfo=zone).astimezone(UTC)


def occurrences(fields, first, last):
    minute, hour, _, _, weekday = fields["schedule"].split()
    zone = ZoneInfo(fields["timezone"])
    weekdays_only = fields.get("calendar") == "weekdays"
    out = set()
    day = first - dt.timedelta(days=1)
    while day <= last + dt.timedelta(days=1):
        cron_weekday = (day.weekday() + 1) % 7  # cron: 0 = Sunday
        if (weekday == "*" or int(weekday) == cron_weekday) and not (weekdays_only and day.weekday() >= 5):
            for h in (range(24) if hour == "*" else [int(hour)]):
                t = local_to_utc(day, h, int(minute), zone)
                if first <= t.date() <= last:
                    out.add(t)
        day += dt.timedelta(days=1)
    return sorted(out)


def history_for_plan(a):
    rng = random.Random(a.seed)
    sources = read_generated_sources(a.for_plan)
    chosen = [s for s, f in sources.items() if f.get("schedule", "stream") != "stream"][:a.monitor]
    end = dt.date.fromisoformat(a.end)
    first = end - dt.timedelta(days=a.days - 1)
    fmt = lambda t: t.strftime("%Y-%m-%dT%H:%M:%SZ")
    rows = []
    for s in chosen:
        f = sources[s]
        lands = minutes_of(f.get("lands_after")) * 60
        lag = minutes_of(f.get("data_lag")) * 60
        spread = rng.choice([60, 300, 900])
        drift = rng.choice([0] * 9 + [300])  # seconds later per week
        for k, o in enumerate(occurrences(f, first, end)):
            if rng.random() < 0.02:
                continue
            offset = lands + rng.gauss(0, spread) + drift * (o.date() - first).days / 7
            if rng.random() < 0.05:
                offset += rng.expovariate(1 / 1800)
            landed = o + dt.timedelta(seconds=max(0, int(offset)))
            through = o - dt.timedelta(seconds=lag)
            if rng.random() < 0.01:
                failed = max(landed - dt.timedelta(minutes=5), through)
                rows.append((failed, f"{s},{fmt(failed)},{fmt(through)},0,failed\n"))
            rows.append((landed, f"{s},{fmt(landed)},{fmt(through)},{rng.randrange(100, 100000)},ok\n"))
    rows.sort(key=lambda r: r[0])
    with open(a.log_out, "w") as out:
        out.write("node,landed_at,data_through,rows,status\n")
        out.writelines(r[1] for r in rows)


def main():
    p = argparse.ArgumentParser()
    p.add_argument("plan_out", nargs="?")
    p.add_argument("log_out")
    p.add_argument("--for-plan")
    p.add_argument("--monitor", type=int, default=500)
    p.add_argument("--sources", type=int, default=500)
    p.add_argument("--days", type=int, default=365)
    p.add_argument("--end", default="2026-03-01")
    p.add_argument("--seed", type=int, default=1)
    a = p.parse_args()
    if a.for_plan:
        return history_for_plan(a)
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
