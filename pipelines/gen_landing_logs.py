#!/usr/bin/env python3
# Generates the demo landing logs for the fictional Larkspur Valley Medical
# Centre plan (larkspur.plan.yaml): 60 days of deliveries, 2026-01-03 to
# 2026-03-03, into pipelines/landing-logs/.
#
# FICTIONAL DATA: every feed, time and row count is invented for readyby's
# demo. No real organisation and no patient data (the logs hold metadata only).
#
# What the data shows:
# - Most feeds land a few minutes before their declared `lands_after`, with an
#   occasional slightly late delivery.
# - lab_results drifts later by about ten minutes a week; by early March its
#   landing misses the 03:00 start of hie_merge, so outside_labs is late for
#   the readmission model (`readyby nightly --date 2026-03-03` exits 1).
# - Four deliveries fail (status failed) and are re-delivered two hours later.
# - adt_events and nurse_staffing are not logged: nightly lists them as
#   unmonitored and uses their declared schedule.
# - census_snapshot (a job) logs its completions from the integration server
#   in JSON Lines with its own column names (load_end_ts, watermark), to be
#   recorded with --map.
#
# Usage: python3 pipelines/gen_landing_logs.py [--seed N] [--out DIR]
# Deterministic for a given seed (default 20260303). Every output file starts
# with, or is accompanied by, the note "generated data: do not edit the output
# by hand"; re-run this script instead.

import argparse
import csv
import datetime as dt
import json
import os
import random
from zoneinfo import ZoneInfo

CHICAGO = ZoneInfo("America/Chicago")
PHOENIX = ZoneInfo("America/Phoenix")
FIRST_DAY = dt.date(2026, 1, 3)
DAYS = 60
NOTE = "generated data: do not edit the output by hand (pipelines/gen_landing_logs.py)"

# node: (zone, hour, minute, weekday or None (0 = Monday), weekdays only,
#        lands_after min, data_lag min, logs scheduled_at)
FEEDS = {
    "ehr_nightly": (CHICAGO, 1, 15, None, False, 80, 75, True),
    "lab_results": (CHICAGO, 1, 0, None, False, 40, 60, True),
    "pharmacy_dispense": (CHICAGO, 0, 45, None, False, 35, 45, True),
    "bed_board": (CHICAGO, 7, 0, None, True, 20, 0, True),
    "reference_lab": (PHOENIX, 1, 0, None, False, 30, 60, False),  # the partner does not log it
    "claims_weekly": (CHICAGO, 4, 0, 6, False, 180, 10 * 24 * 60, True),
    "social_needs": (CHICAGO, 6, 0, 0, False, 60, 0, True),
}
SKIPPED_DATES = {dt.date(2026, 12, 25), dt.date(2027, 1, 1)}
LAB_DRIFT_MIN_PER_WEEK = 10.0
# Deliveries that fail (logged with status failed) and are re-delivered later.
FAILED = {("pharmacy_dispense", dt.date(2026, 1, 20)), ("social_needs", dt.date(2026, 1, 12)),
          ("pharmacy_dispense", dt.date(2026, 2, 10)), ("pharmacy_dispense", dt.date(2026, 2, 24))}


def rfc3339(t):
    return t.isoformat(timespec="seconds")


def occurrences(zone, hour, minute, weekday, weekdays_only):
    for k in range(DAYS):
        day = FIRST_DAY + dt.timedelta(days=k)
        if weekday is not None and day.weekday() != weekday:
            continue
        if weekdays_only and (day.weekday() >= 5 or day in SKIPPED_DATES):
            continue
        yield k, dt.datetime(day.year, day.month, day.day, hour, minute, tzinfo=zone)


def offset_minutes(rng, node, day_index, lands_after):
    if node == "lab_results":
        # Starts about 8 minutes early and slips ~10 minutes a week.
        return lands_after - 8 + LAB_DRIFT_MIN_PER_WEEK * day_index / 7 + rng.uniform(-5, 3)
    if rng.random() < 0.04:
        return lands_after + rng.uniform(1, 6)  # a little late now and then
    return lands_after - rng.uniform(1, 10)


def feed_rows(rng):
    rows = []
    for node, (zone, hour, minute, weekday, weekdays_only, lands_after, lag, logs_sched) in FEEDS.items():
        for k, scheduled in occurrences(zone, hour, minute, weekday, weekdays_only):
            landed = scheduled + dt.timedelta(minutes=offset_minutes(rng, node, k, lands_after))
            landed = landed.replace(microsecond=0)
            through = scheduled - dt.timedelta(minutes=lag)
            row = {
                "node": node,
                "scheduled_at": rfc3339(scheduled) if logs_sched else "",
                "landed_at": rfc3339(landed.astimezone(CHICAGO)),
                "data_through": rfc3339(through.astimezone(CHICAGO)),
                "rows": rng.randint(800, 60000),
                "status": "ok",
            }
            # A few failed deliveries, each re-delivered two hours later.
            if (node, scheduled.date()) in FAILED:
                failed = dict(row, status="failed", rows=0)
                rows.append((landed, failed))
                landed = landed + dt.timedelta(hours=2)
                row["landed_at"] = rfc3339(landed.astimezone(CHICAGO))
            rows.append((landed, row))
    rows.sort(key=lambda r: (r[0], r[1]["node"]))
    return rows


def census_rows(rng):
    out = []
    for k, start in occurrences(CHICAGO, 2, 30, None, False):
        done = (start + dt.timedelta(minutes=75 + rng.uniform(-5, 4))).replace(microsecond=0)
        out.append({"task": "census_snapshot", "load_end_ts": rfc3339(done), "watermark": rfc3339(start),
                    "state": "ok", "rows": rng.randint(300, 420)})
    return out


def main():
    parser = argparse.ArgumentParser(description=__doc__)
    parser.add_argument("--seed", type=int, default=20260303)
    parser.add_argument("--out", default=os.path.join(os.path.dirname(os.path.abspath(__file__)), "landing-logs"))
    args = parser.parse_args()
    rng = random.Random(args.seed)
    os.makedirs(args.out, exist_ok=True)
    by_month = {}
    for landed, row in feed_rows(rng):
        by_month.setdefault(landed.astimezone(CHICAGO).strftime("%Y-%m"), []).append(row)
    for month, rows in sorted(by_month.items()):
        with open(os.path.join(args.out, f"feeds-{month}.csv"), "w", newline="") as f:
            w = csv.DictWriter(f, fieldnames=["node", "scheduled_at", "landed_at", "data_through", "rows", "status"],
                               lineterminator="\n")
            w.writeheader()
            w.writerows(rows)
    with open(os.path.join(args.out, "integration-server.jsonl"), "w") as f:
        for row in census_rows(rng):
            f.write(json.dumps(row) + "\n")
    with open(os.path.join(args.out, "README.md"), "w") as f:
        f.write("# Demo landing logs (fictional)\n\n" + NOTE + ".\n\n"
                "Fictional deliveries for the Larkspur Valley Medical Centre demo plan, "
                f"{FIRST_DAY} to {FIRST_DAY + dt.timedelta(days=DAYS - 1)}, seed {args.seed}.\n"
                "`feeds-*.csv` use readyby's column names; `integration-server.jsonl` uses the\n"
                "integration server's names and is recorded with\n"
                "`--map node=task,landed_at=load_end_ts,data_through=watermark,status=state`.\n")


if __name__ == "__main__":
    main()
