#include <catch2/catch.hpp>

#include <random>
#include <set>
#include <sstream>

#include "engine/check.h"
#include "engine/fixes.h"
#include "engine/patterns.h"
#include "plan/plan_loader.h"
#include "plan_fixture.h"
#include "random_plan.h"
#include "reference.h"

using namespace readyby;

namespace {

// ---------------------------------------------------------------------------
// An edit written into a copy of the plan, independently of the engine: the
// plan struct is changed field by field as DESIGN §9 defines each edit, and
// a moved schedule is built from the bit masks, not from cron text.

// `c` with every occurrence moved by `minutes` of local time, or nullopt when
// the test cannot say (several minutes, or days that do not move with it).
std::optional<Cron> moved_cron(const Cron& c, int64_t minutes) {
  if (__builtin_popcountll(c.minutes) != 1) return std::nullopt;
  const int minute = __builtin_ctzll(c.minutes);
  Cron out = c;
  out.minutes = 0;
  out.hours = 0;
  std::set<int64_t> carries;
  for (int h = 0; h < 24; ++h) {
    if (!((c.hours >> h) & 1)) continue;
    int64_t t = h * 60 + minute + minutes;
    int64_t day = t >= 0 ? t / 1440 : -((-t + 1439) / 1440);
    t -= day * 1440;
    out.hours |= 1u << (t / 60);
    out.minutes = uint64_t{1} << (t % 60);
    carries.insert(day);
  }
  const bool every_day = c.days == 0xFFFFFFFEu && c.months == 0x1FFE && (c.weekdays & 0x7F) == 0x7F;
  if (carries.size() == 1 && *carries.begin() == 0) return out;
  if (every_day) return out;
  if (carries.size() != 1 || c.days != 0xFFFFFFFEu || c.months != 0x1FFE) return std::nullopt;
  const int64_t carry = *carries.begin();
  out.weekdays = 0;
  for (int d = 0; d < 7; ++d) {
    if ((c.weekdays >> d) & 1) out.weekdays |= static_cast<uint8_t>(1u << (((d + carry) % 7 + 7) % 7));
  }
  return out;
}

// The plan with `fix`'s edit scaled to `minutes` written in; nullopt when the
// test cannot write it.
std::optional<Plan> edited(const Plan& plan, const Fix& fix, int64_t minutes) {
  Plan out = plan;
  switch (fix.edit.kind) {
    case FixEdit::Kind::delay: {
      Node& n = out.nodes[static_cast<size_t>(fix.edit.node)];
      (n.kind == NodeKind::source ? n.lands_after : n.run_time).seconds -= minutes * 60;
      return out;
    }
    case FixEdit::Kind::schedule: {
      Node& n = out.nodes[static_cast<size_t>(fix.edit.node)];
      std::optional<Cron> c = moved_cron(*n.trigger, fix.later ? minutes : -minutes);
      if (!c) return std::nullopt;
      n.trigger = *c;
      return out;
    }
    case FixEdit::Kind::runs: {
      Model& m = out.models[static_cast<size_t>(fix.edit.model)];
      std::optional<Cron> c = moved_cron(m.runs.front().at, minutes);
      if (!c) return std::nullopt;
      m.runs.front().at = *c;
      return out;
    }
  }
  return std::nullopt;
}

// Where a run scheduled at `at` is in the edited plan: a runs edit moves it
// by `minutes` of local time.
Instant moved_run(const Plan& plan, const Fix& fix, int model, Instant at, int64_t minutes) {
  if (fix.edit.kind != FixEdit::Kind::runs || fix.edit.model != model) return at;
  const Zone& zone = *plan.models[static_cast<size_t>(model)].zone;
  return zone.from_local(zone.to_local(at) + Seconds(minutes * 60));
}

// A run's status by the literal recursion (DESIGN §4 "A run").
RunStatus reference_status(const Plan& plan, reference::Freshness& ref, int model, Instant at,
                           bool* optional_bad = nullptr) {
  bool fail = false, degraded = false;
  for (int f : plan.models[static_cast<size_t>(model)].features) {
    const Node& node = plan.nodes[static_cast<size_t>(f)];
    reference::Freshness::Result r = ref.at(f, at - Seconds(node.max_age.seconds));
    if (!r.ready || *r.ready > at) (node.optional ? degraded : fail) = true;
  }
  if (optional_bad) *optional_bad = degraded;
  return fail ? RunStatus::fail : degraded ? RunStatus::degraded : RunStatus::ok;
}

bool clears(RunStatus after, RunStatus pattern_status, bool also_degraded) {
  return after == RunStatus::ok ||
         (pattern_status == RunStatus::fail && also_degraded && after == RunStatus::degraded);
}

}  // namespace

TEST_CASE("a cron expression moved by minutes") {
  struct Case {
    const char* cron;
    int64_t minutes;
    bool calendar;
    const char* expected;  // "" when not expressible
  } cases[] = {
      {"0 3 * * *", 30, false, "30 3 * * *"},
      {"30 2 * * *", -15, false, "15 2 * * *"},
      {"0 13 * * *", -50, false, "10 12 * * *"},
      {"45 23 * * *", 30, false, "15 0 * * *"},          // every day: the day moves with it
      {"45 23 * * mon-fri", 30, false, "15 0 * * 2,3,4,5,6"},
      {"15 0 * * 1", -30, false, "45 23 * * 0"},
      {"45 23 * * *", 30, true, ""},                     // a calendar skips local dates: not across midnight
      {"0 2,14 * * *", 90, false, "30 3,15 * * *"},
      {"17 * * * *", 50, false, "7 * * * *"},
      {"17 * * * 1", 50, false, ""},                     // hourly on Mondays: 23:17 would move to Tuesday
      {"0,30 6 * * *", 10, false, ""},                   // two minutes
      {"0 6 1,15 * *", 1200, false, ""},                 // day of month cannot move
      {"@daily", 90, false, "30 1 * * *"},
      {"30 6 * * *", 50, false, "20 7 * * *"},
  };
  for (const Case& c : cases) {
    INFO(c.cron << " by " << c.minutes);
    CronParse parsed = parse_cron(c.cron);
    REQUIRE(parsed.value);
    std::optional<std::string> out = shifted_cron(*parsed.value, c.minutes, c.calendar);
    CHECK(out.value_or("") == c.expected);
  }
}

TEST_CASE("every fix shown on random plans clears its pattern by the literal reference, one minute less does not") {
  std::mt19937_64 rng(20260329);
  // Windows around 2026 daylight-saving changes (US, EU, Australia).
  const char* windows[] = {"2026-03-06", "2026-10-30", "2026-03-27", "2026-10-23", "2026-04-03", "2026-10-02"};
  int plans = 0, patterns_seen = 0, fixes_checked = 0, minimal_checked = 0, effects_checked = 0;
  std::set<FixKind> kinds;
  for (int i = 0; plans < 300; ++i) {
    const std::string text = testing::random_plan(rng, 1000 + i);
    PlanLoadResult loaded = load_plan_text(text, "random.yaml");
    INFO(text);
    if (!loaded.plan) continue;  // a random schedule that never fires under its calendar
    const Plan& plan = *loaded.plan;
    const LocalDays from = *parse_date(windows[i % 6]);
    const int days = 8;
    Evaluation ev = evaluate_lazily(plan, from, days);
    PatternCollector collector(plan, ev);
    collect_runs(ev, &collector);
    FixFinder finder(collector);
    reference::Freshness original(plan);
    // Every run of the window, by the reference.
    std::vector<std::pair<int, Instant>> window_runs;
    for (size_t m = 0; m < plan.models.size(); ++m) {
      for (Instant t : reference::run_instants(plan, plan.models[m], from, days)) {
        window_runs.emplace_back(static_cast<int>(m), t);
      }
    }
    ++plans;
    for (const Pattern& p : collector.patterns()) {
      ++patterns_seen;
      FixSearch search = finder.find(p);
      for (const Fix& fix : search.fixes) {
        INFO("pattern of " << plan.models[static_cast<size_t>(p.model)].id << " first run "
                           << format_rfc3339(p.runs.front(), nullptr) << ", fix " << to_string(fix.kind) << " "
                           << fix.seconds << " s, edit " << to_string(fix.edit.kind) << " " << fix.edit.cron);
        REQUIRE(fix.seconds > 0);
        REQUIRE(fix.seconds % 60 == 0);
        const int64_t minutes = fix.seconds / 60;
        std::optional<Plan> after = edited(plan, fix, minutes);
        if (fix.edit.kind != FixEdit::Kind::delay) {
          // The fix's own cron text says the same as the test's moved masks.
          REQUIRE(after);
          CronParse own = parse_cron(fix.edit.cron);
          REQUIRE(own.value);
          const Cron& test_cron = fix.edit.kind == FixEdit::Kind::schedule
                                      ? *after->nodes[static_cast<size_t>(fix.edit.node)].trigger
                                      : after->models[static_cast<size_t>(fix.edit.model)].runs.front().at;
          CHECK(own.value->minutes == test_cron.minutes);
          CHECK(own.value->hours == test_cron.hours);
          CHECK((own.value->weekdays & 0x7F) == (test_cron.weekdays & 0x7F));
        }
        REQUIRE(after);
        reference::Freshness edited_ref(*after);
        // 1. Every run of the pattern clears.
        std::set<Instant> in_pattern(p.runs.begin(), p.runs.end());
        for (Instant at : p.runs) {
          bool optional_bad = false;
          reference_status(plan, original, p.model, at, &optional_bad);
          const Instant moved = moved_run(plan, fix, p.model, at, minutes);
          INFO("run " << format_rfc3339(at, nullptr));
          CHECK(clears(reference_status(*after, edited_ref, p.model, moved), p.status,
                       p.status == RunStatus::fail && optional_bad));
        }
        ++fixes_checked;
        kinds.insert(fix.kind);
        // 2. One minute less leaves a run of the pattern not clear.
        if (minutes > 1) {
          std::optional<Plan> less = edited(plan, fix, minutes - 1);
          REQUIRE(less);
          reference::Freshness less_ref(*less);
          bool some_run_not_clear = false;
          for (Instant at : p.runs) {
            bool optional_bad = false;
            reference_status(plan, original, p.model, at, &optional_bad);
            const Instant moved = moved_run(plan, fix, p.model, at, minutes - 1);
            if (!clears(reference_status(*less, less_ref, p.model, moved), p.status,
                        p.status == RunStatus::fail && optional_bad)) {
              some_run_not_clear = true;
            }
          }
          CHECK(some_run_not_clear);
          ++minimal_checked;
        }
        // 3. The other runs that change are exactly those the fix reports.
        std::set<std::tuple<int, int64_t, int, int>> expected, reported;
        for (const auto& [m, at] : window_runs) {
          if (m == p.model && in_pattern.count(at)) continue;
          const RunStatus before = reference_status(plan, original, m, at);
          const RunStatus now = reference_status(*after, edited_ref, m, moved_run(plan, fix, m, at, minutes));
          if (before != now) expected.insert({m, to_unix(at), static_cast<int>(before), static_cast<int>(now)});
        }
        for (const RunChange& c : fix.other_changes) {
          reported.insert({c.model, to_unix(c.at), static_cast<int>(c.before), static_cast<int>(c.after)});
        }
        CHECK(reported == expected);
        ++effects_checked;
      }
    }
  }
  CHECK(plans == 300);
  CHECK(patterns_seen > 200);
  // Random plans are harsh (weekly and twice-monthly schedules, several late
  // features per run): about a quarter of their patterns have a single-edit fix.
  CHECK(fixes_checked >= 100);
  CHECK(minimal_checked >= 80);
  CHECK(effects_checked == fixes_checked);
  // Every kind of fix occurs.
  CHECK(kinds.count(FixKind::land_earlier) == 1);
  CHECK(kinds.count(FixKind::move_start) == 1);
  CHECK(kinds.count(FixKind::start_later) == 1);
}
