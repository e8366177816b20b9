#include <catch2/catch.hpp>

#include "plan/plan_loader.h"

using namespace readyby;

namespace {

const char kValid[] = R"(plan: ward-aki
title: Ward example (fictional)
timezone: America/Chicago
calendars:
  weekdays-only:
    skip_weekdays: [sat, sun]
    skip_dates: [2026-12-25]
sources:
  lab_batch:
    schedule: "30 2 * * *"
    lands_after: PT40M
    data_lag: PT2H30M
    history: P400D
  adt_stream:
    schedule: stream
    lands_after: PT5M
jobs:
  labs_clean:
    inputs: [lab_batch]
    run_time: PT15M
  nightly_rollup:
    inputs: [labs_clean, adt_stream]
    trigger: "0 4 * * *"
    timezone: Etc/UTC
    calendar: weekdays-only
features:
  creat_delta:
    inputs: [labs_clean]
    max_age: PT8H
    lookback: P365D
    optional: true
    elements: [lab.creatinine]
models:
  ward_risk:
    features: [creat_delta]
    runs:
      - at: "0 6 * * *"
        calendar: weekdays-only
)";

std::vector<std::string> errors_of(const std::string& text) {
  PlanLoadResult r = load_plan_text(text, "plan.yaml");
  std::vector<std::string> out;
  for (const Diagnostic& d : r.errors) out.push_back(d.str());
  return out;
}

// kValid with lines first..last (1-based) replaced by `replacement` (may
// hold newlines).
std::string with_lines(int first, int last, const std::string& replacement) {
  std::string text = kValid;
  size_t start = 0;
  for (int i = 1; i < first; ++i) start = text.find('\n', start) + 1;
  size_t end = start;
  for (int i = first; i <= last; ++i) end = text.find('\n', end) + 1;
  return text.substr(0, start) + replacement + "\n" + text.substr(end);
}

std::string with_line(int line, const std::string& replacement) { return with_lines(line, line, replacement); }

}  // namespace

TEST_CASE("a valid plan loads into plain structs") {
  PlanLoadResult r = load_plan_text(kValid, "plan.yaml");
  INFO(r.rendered);
  REQUIRE(r.plan);
  const Plan& p = *r.plan;
  CHECK(p.id == "ward-aki");
  CHECK(p.zone->name() == "America/Chicago");
  REQUIRE(p.nodes.size() == 5);
  const Node& lab = p.nodes[static_cast<size_t>(p.find_node("lab_batch"))];
  CHECK(lab.kind == NodeKind::source);
  CHECK(lab.lands_after.seconds == 2400);
  CHECK(lab.data_lag.seconds == 9000);
  CHECK(lab.history->seconds == 400 * 86400);
  CHECK(p.nodes[static_cast<size_t>(p.find_node("adt_stream"))].stream);
  const Node& rollup = p.nodes[static_cast<size_t>(p.find_node("nightly_rollup"))];
  CHECK(rollup.trigger->text == "0 4 * * *");
  CHECK(rollup.zone->name() == "Etc/UTC");
  CHECK(p.calendar(rollup.calendar).name == "weekdays-only");
  CHECK(rollup.inputs == std::vector<int>{p.find_node("labs_clean"), p.find_node("adt_stream")});
  const Node& creat = p.nodes[static_cast<size_t>(p.find_node("creat_delta"))];
  CHECK(creat.max_age.seconds == 8 * 3600);
  CHECK(creat.optional);
  CHECK(creat.elements == std::vector<std::string>{"lab.creatinine"});
  REQUIRE(p.models.size() == 1);
  CHECK(p.models[0].zone == p.zone);
  CHECK(p.models[0].runs[0].calendar == 0);
}

TEST_CASE("every bad-input class gets its exact message and position") {
  struct Case {
    const char* name;
    std::string text;
    std::vector<std::string> errors;
  };
  const std::vector<Case> cases = {
      {"yaml syntax", with_line(11, "   lands_after: PT40M"),
       {"plan.yaml:11:4: error: YAML syntax error: end of map not found"}},
      {"duplicate key", with_line(11, "    lands_after: PT40M\n    lands_after: PT1H"),
       {"plan.yaml:12:5: error: duplicate key 'lands_after' (first defined at line 11)"}},
      {"unknown key", with_line(20, "    run_tme: PT15M"),
       {"plan.yaml:20:5: error: unknown key 'run_tme' in job 'labs_clean' (did you mean 'run_time'?)"}},
      {"list where a map is expected", with_lines(9, 13, "  lab_batch: [\"30 2 * * *\"]"),
       {"plan.yaml:9:14: error: source 'lab_batch' must be a map of settings, found a list"}},
      {"list where a run map is expected", with_lines(37, 38, "      - [\"0 6 * * *\"]"),
       {"plan.yaml:37:9: error: each run of model 'ward_risk' must be a map such as {at: \"0 6 * * *\"}, found a list"}},
      {"number where a duration is expected", with_line(11, "    lands_after: 40"),
       {"plan.yaml:11:18: error: 'lands_after' of source 'lab_batch' must be an ISO 8601 duration such as PT30M or "
        "P1D, found the number 40 (a bare number has no unit)"}},
      {"missing plan", with_line(1, "title2: x"),
       {"plan.yaml:1:1: error: unknown key 'title2' in plan (did you mean 'title'?)",
        "plan.yaml:1:1: error: missing required key 'plan' (the plan's id)"}},
      {"missing timezone", with_line(3, "#"),
       {"plan.yaml:1:1: error: missing required key 'timezone' (the plan's IANA time zone, e.g. America/Chicago)"}},
      {"missing schedule", with_line(10, "    description: x"),
       {"plan.yaml:9:3: error: source 'lab_batch' is missing required key 'schedule' (a cron expression, or stream)"}},
      {"missing inputs", with_line(19, "    description: x"),
       {"plan.yaml:18:3: error: job 'labs_clean' is missing required key 'inputs'"}},
      {"missing max_age", with_line(29, "    description: x"),
       {"plan.yaml:27:3: error: feature 'creat_delta' is missing required key 'max_age' (how old its data may be at "
        "scoring time)"}},
      {"missing features", with_line(35, "    description: x"),
       {"plan.yaml:34:3: error: model 'ward_risk' is missing required key 'features'"}},
      {"missing runs", with_lines(36, 38, "    description: x"),
       {"plan.yaml:34:3: error: model 'ward_risk' is missing required key 'runs'"}},
      {"missing at", with_lines(37, 38, "      - calendar: weekdays-only"),
       {"plan.yaml:37:9: error: a run of model 'ward_risk' is missing required key 'at'"}},
      {"invalid id", with_line(9, "  lab batch:"),
       {"plan.yaml:9:3: error: invalid id 'lab batch' (use letters, digits, '_', '.' and '-')",
        "plan.yaml:19:14: error: unknown input 'lab_batch' (did you mean 'lab batch'?)"}},
      {"id used twice", with_line(18, "  lab_batch:"),
       {"plan.yaml:18:3: error: id 'lab_batch' is already used by the source at line 9 (sources, jobs and features "
        "share one namespace)",
        "plan.yaml:22:14: error: unknown input 'labs_clean'",
        "plan.yaml:28:14: error: unknown input 'labs_clean'"}},
      {"dangling reference", with_line(28, "    inputs: [labs_clen]"),
       {"plan.yaml:28:14: error: unknown input 'labs_clen' (did you mean 'labs_clean'?)"}},
      {"inputs on a source", with_line(13, "    history: P400D\n    inputs: [adt_stream]"),
       {"plan.yaml:14:5: error: source 'lab_batch' cannot have inputs: a source is fed from outside the plan; declare "
        "it as a job instead"}},
      {"model lists a job", with_line(35, "    features: [creat_delta, labs_clean]"),
       {"plan.yaml:35:29: error: 'labs_clean' is a job, not a feature; a model lists features only (declare one that "
        "takes 'labs_clean' as input)"}},
      {"cycle", with_line(19, "    inputs: [lab_batch, creat_delta]"),
       {"plan.yaml:18:3: error: cycle in the lineage: labs_clean -> creat_delta -> labs_clean"}},
      {"bad cron", with_line(10, "    schedule: \"30 2 * * mon-fry\""),
       {"plan.yaml:10:29: error: bad cron '30 2 * * mon-fry' in the schedule of source 'lab_batch': day-of-week "
        "field: 'fry' is not a valid value (use 0-7 or sun-sat)"}},
      {"unknown zone", with_line(3, "timezone: America/Chicgo"),
       {"plan.yaml:3:11: error: unknown time zone 'America/Chicgo' (did you mean 'America/Chicago'?)"}},
      {"negative duration", with_line(12, "    data_lag: -PT2H"),
       {"plan.yaml:12:15: error: bad duration '-PT2H' for 'data_lag' of source 'lab_batch': negative durations are "
        "not allowed"}},
      {"months in a duration", with_line(13, "    history: P13M"),
       {"plan.yaml:13:17: error: bad duration 'P13M' for 'history' of source 'lab_batch': years (Y) and months (M) "
        "are not allowed in a duration: their length varies; use days (D) or weeks (W)"}},
      {"unknown calendar", with_line(38, "        calendar: weekday-only"),
       {"plan.yaml:38:19: error: unknown calendar 'weekday-only' (did you mean 'weekdays-only'?)"}},
      {"run that never fires", with_line(37, "      - at: \"0 6 * * sat\""),
       {"plan.yaml:37:13: error: the run '0 6 * * sat' of model 'ward_risk' never fires under calendar "
        "'weekdays-only' (defined at line 5) (no occurrence within 1,462 days)"}},
      // Regression: a duration longer than the engine's horizon validated and
      // then took minutes; `history` and `lookback` are only compared and may
      // be longer.
      {"timing duration beyond the horizon", with_line(11, "    lands_after: P1000W"),
       {"plan.yaml:11:18: error: 'lands_after' of source 'lab_batch' is P1000W, longer than 1462 days, the longest a "
        "plan's timing may span (P1462D)"}},
      {"long history is fine", with_line(13, "    history: P3650D"), {}},
      // Regression: the never-fires error pointed at the node's key; it
      // points at the schedule that never fires.
      {"schedule that never fires", with_line(10, "    schedule: \"0 0 31 4 *\""),
       {"plan.yaml:10:15: error: the schedule '0 0 31 4 *' of source 'lab_batch' never fires (no occurrence within "
        "1,462 days)"}},
      // Independent of today's date: skip dates that silence a yearly
      // schedule for five years make it never fire in some 1,462-day window.
      // (1 January 2028 and 2033 are Saturdays, 2034 a Sunday: the calendar
      // skips them too; the next delivery after 2026-01-01 is 2035-01-01.)
      {"schedule silenced by skip dates",
       with_lines(7, 10, "    skip_dates: [2027-01-01, 2029-01-01, 2030-01-01, 2031-01-01, 2032-01-01]\n"
                         "sources:\n  lab_batch:\n    calendar: weekdays-only\n    schedule: \"0 0 1 1 *\""),
       {"plan.yaml:11:15: error: the schedule '0 0 1 1 *' of source 'lab_batch' never fires under calendar "
        "'weekdays-only' (defined at line 5): no occurrence within 1,462 days after 2026-01-01T06:00:00Z"}},
      {"zone on an inputs-triggered job", with_line(20, "    run_time: PT15M\n    timezone: Etc/UTC"),
       {"plan.yaml:21:5: error: 'timezone' of job 'labs_clean' applies to a cron trigger only; this node runs when "
        "its inputs land"}},
      {"data_lag on a stream", with_line(16, "    lands_after: PT5M\n    data_lag: PT1H"),
       {"plan.yaml:17:5: error: 'data_lag' does not apply to the stream source 'adt_stream' (a stream's data reaches "
        "the moment it is sent; use lands_after for its delay)"}},
      {"empty file", "  \n# nothing here\n",
       {"plan.yaml: error: empty file: expected a plan (a map with at least 'plan', 'timezone' and 'models')"}},
      {"not UTF-8", with_line(2, "title: caf\xe9"),
       {"plan.yaml:2:11: error: the file is not valid UTF-8 (bad byte at this position); save it as UTF-8"}},
      {"optional must be boolean", with_line(31, "    optional: yes please"),
       {"plan.yaml:31:15: error: 'optional' of feature 'creat_delta' must be true or false, found the text 'yes please'"}},
  };
  for (const Case& c : cases) {
    INFO(c.name);
    CHECK(errors_of(c.text) == c.errors);
  }
}

TEST_CASE("diagnostics render the source line and a caret") {
  PlanLoadResult r = load_plan_text(with_line(28, "    inputs: [labs_clen]"), "plan.yaml");
  CHECK(r.rendered ==
        "plan.yaml:28:14: error: unknown input 'labs_clen' (did you mean 'labs_clean'?)\n"
        "      inputs: [labs_clen]\n"
        "               ^\n");
}

TEST_CASE("every error of a file is reported in one pass") {
  std::string text = with_line(3, "timezone: Mars/Base");
  text = text.substr(0, text.find("features:")) + "features:\n  f:\n    inputs: [nope]\n    max_age: 8h\n";
  auto errors = errors_of(text);
  CHECK(errors.size() >= 4);  // zone, dangling input, bad duration, missing models
}
