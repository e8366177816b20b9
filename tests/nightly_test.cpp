#include <catch2/catch.hpp>

#include "plan_fixture.h"

#include <re2/re2.h>

#include <set>
#include <sstream>

#include "engine/edit.h"
#include "history/nightly.h"
#include "history_helpers.h"
#include "plan/plan_loader.h"
#include "report/nightly_report.h"
#include "time/zone.h"

using namespace readyby;

namespace {

// feed_a is monitored, feed_b is not; job_c's completions are recorded.
const char kPlan[] = R"(plan: tiny
title: Nightly semantics (fictional)
timezone: Etc/UTC
sources:
  feed_a:
    schedule: "0 1 * * *"
    lands_after: PT30M
  feed_b:
    schedule: "0 2 * * *"
    lands_after: PT1H
jobs:
  join_ab:
    inputs: [feed_a, feed_b]
    run_time: PT10M
  job_c:
    inputs: [feed_b]
    run_time: PT5M
features:
  f_a:
    inputs: [feed_a]
    max_age: PT12H
  f_ab:
    inputs: [join_ab]
    max_age: PT12H
  f_c:
    inputs: [job_c]
    max_age: PT12H
    optional: true
models:
  m:
    features: [f_a, f_ab, f_c]
    runs:
      - at: "0 6 * * *"
)";

Plan load(const char* text) {
  return readyby::testing::plan_from_text(text);
}

Instant at(const char* rfc3339) { return *parse_rfc3339(rfc3339); }

StoredLanding landing(const char* landed, const char* through, LandingStatus status = LandingStatus::ok) {
  return {at(landed), at(through), std::nullopt, status};
}

History tiny_history(const Plan& plan) {
  History h(plan.nodes.size());
  h[static_cast<size_t>(plan.find_node("feed_a"))] = std::vector<StoredLanding>{
      landing("2026-03-01T01:20:00Z", "2026-03-01T00:00:00Z"),
      // Failed: would make f_a ready at 00:50 if it counted.
      landing("2026-03-02T00:50:00Z", "2026-03-02T01:00:00Z", LandingStatus::failed),
      landing("2026-03-02T01:25:00Z", "2026-03-02T00:00:00Z"),
  };
  h[static_cast<size_t>(plan.find_node("job_c"))] = std::vector<StoredLanding>{
      landing("2026-03-01T07:00:00Z", "2026-03-01T02:00:00Z"),
      landing("2026-03-02T07:00:00Z", "2026-03-02T02:00:00Z"),
  };
  return h;
}

std::vector<std::optional<Instant>> first_through(const History& h) {
  std::vector<std::optional<Instant>> out(h.size());
  for (size_t n = 0; n < h.size(); ++n) {
    if (!h[n]) continue;
    for (const StoredLanding& l : *h[n]) out[n] = out[n] ? std::min(*out[n], l.data_through) : l.data_through;
  }
  return out;
}

std::string chain_of(const Plan& plan, const NightlyReport& r, const FeatureResult& f) {
  std::string out;
  for (const ChainLanding& s : r.chain_landings(f)) {
    out += (out.empty() ? "" : ",") + plan.nodes[static_cast<size_t>(s.node)].id + "@" +
           (s.ready_at ? format_rfc3339(*s.ready_at, nullptr) : "never");
  }
  return out;
}

}  // namespace

TEST_CASE("nightly: monitored, unmonitored and job-completion nodes (hand-computed)") {
  Plan plan = load(kPlan);
  History history = tiny_history(plan);
  NightlyReport r = evaluate_nightly(plan, history, first_through(history), *parse_date("2026-03-02"), 1);
  REQUIRE(r.today.size() == 1);
  const RunResult& run = r.evaluation.runs[r.today[0]];
  CHECK(format_rfc3339(run.at, nullptr) == "2026-03-02T06:00:00Z");
  REQUIRE(run.features.size() == 3);
  // Each feature needs data through 06:00 - 12h = 03-01 18:00Z.
  // f_a: feed_a's ok rows with data_through >= 18:00 -> only the 01:25 landing
  // (the failed row is ignored): slack 06:00 - 01:25 = 4h35m.
  CHECK(run.features[0].slack_seconds == 16500);
  CHECK(run.features[0].status == FeatureStatus::ok);
  CHECK(chain_of(plan, r, run.features[0]) == "feed_a@2026-03-02T01:25:00Z,f_a@2026-03-02T01:25:00Z");
  // f_ab: feed_b is unmonitored: declared 02:00 + 1h = 03:00, later than
  // feed_a's actual 01:25; join_ab + 10m = 03:10, slack 2h50m.
  CHECK(run.features[1].slack_seconds == 10200);
  CHECK(chain_of(plan, r, run.features[1]) ==
        "feed_b@2026-03-02T03:00:00Z,join_ab@2026-03-02T03:10:00Z,f_ab@2026-03-02T03:10:00Z");
  // f_c: job_c is monitored by its recorded completions only (its input's
  // schedule is not consulted): 07:00, late by 1h; optional -> degraded.
  CHECK(run.features[2].slack_seconds == -3600);
  CHECK(run.features[2].status == FeatureStatus::late);
  CHECK(chain_of(plan, r, run.features[2]) == "job_c@2026-03-02T07:00:00Z,f_c@2026-03-02T07:00:00Z");
  CHECK(run.status == RunStatus::degraded);
  CHECK(r.ok());
  REQUIRE(r.unmonitored.size() == 1);
  CHECK(plan.nodes[static_cast<size_t>(r.unmonitored[0])].id == "feed_b");
}

TEST_CASE("nightly: a run that is not ok gets its cause and a verified fix") {
  Plan plan = load(kPlan);
  History history = tiny_history(plan);
  NightlyReport r = evaluate_nightly(plan, history, first_through(history), *parse_date("2026-03-02"), 1);
  // The 06:00 run is degraded: job_c's recorded completion came at 07:00.
  REQUIRE(r.advice.size() == 1);
  const NightlyReport::RunAdvice& a = r.advice[0];
  CHECK(a.run == r.today[0]);
  CHECK(a.pattern.status == RunStatus::degraded);
  CHECK(plan.nodes[static_cast<size_t>(a.pattern.blame.cause_node())].id == "job_c");
  CHECK(a.pattern.blame.kind == CauseKind::late_delivery);
  CHECK(a.pattern.blame.steps[0].recorded);
  // job_c runs 5 minutes: it cannot finish an hour sooner. Starting the run
  // at 07:00 finds every feature ready (f_c exactly at 07:00).
  REQUIRE(a.fixes.fixes.size() == 1);
  CHECK(edit_text(plan, a.fixes.fixes[0].edit) == "runs m=0 7 * * *");
  CHECK(a.fixes.fixes[0].seconds == 3600);
  std::ostringstream text;
  write_nightly_text(text, plan, r);
  CHECK(text.str().find("      cause: job 'job_c' lands at 07:00, 1h 00m after the latest landing that keeps the run on "
                        "time (06:00)\n") != std::string::npos);
  CHECK(text.str().find("      fix: start the runs of 'm' 1h 00m later (\"0 6 * * *\" -> \"0 7 * * *\") [runs m=0 7 * * *]\n"
                        "           re-checked: the run of this pattern ok; no other run changes\n") != std::string::npos);
}

TEST_CASE("nightly: a monitored node with no qualifying delivery is not landed") {
  Plan plan = load(kPlan);
  History history = tiny_history(plan);
  NightlyReport r = evaluate_nightly(plan, history, first_through(history), *parse_date("2026-03-03"), 2);
  // The window starts the day after the latest first data_through (job_c:
  // 03-01), so both 03-02 and 03-03 are evaluated.
  CHECK(format_date(r.window_from) == "2026-03-02");
  REQUIRE(r.today.size() == 1);
  const RunResult& run = r.evaluation.runs[r.today[0]];
  CHECK(run.features[0].status == FeatureStatus::never);
  CHECK_FALSE(run.features[0].ready_at);
  CHECK(std::string(nightly_status(run.features[0].status)) == "not-landed");
  CHECK(chain_of(plan, r, run.features[0]) == "feed_a@never,f_a@never");
  CHECK(run.status == RunStatus::fail);
  CHECK_FALSE(r.ok());
  // On time: 1 of 2 — the degraded run of 03-02 is on time (every required
  // feature was fresh), the failed run of 03-03 is not. 95% Wilson score
  // interval (Wilson EB. Probable inference, the law of succession, and
  // statistical inference. J Am Stat Assoc 1927;22(158):209-212 — citation
  // checked against the paper's first page; the closed form from memory):
  // centre (p + z^2/2n) / (1 + z^2/n) = 0.5, half-width
  // z sqrt(pq/n + z^2/4n^2) / (1 + z^2/n) = 1.96 x sqrt(0.125 + 0.2401) / 2.9208
  // = 0.4055: [0.0945, 0.9055].
  REQUIRE(r.on_time.size() == 1);
  CHECK(r.on_time[0].at_local == "06:00");
  CHECK(r.on_time[0].days == 2);
  CHECK(r.on_time[0].on_time == 1);
  CHECK(r.on_time[0].degraded == 1);
  CHECK(r.on_time[0].interval.low == Approx(0.0945).margin(0.0001));
  CHECK(r.on_time[0].interval.high == Approx(0.9055).margin(0.0001));
  REQUIRE(r.weakest_link);
  CHECK(plan.nodes[static_cast<size_t>(r.weakest_link->node)].id == "feed_a");
  CHECK(r.weakest_link->failing_runs == 1);
  CHECK(r.weakest_link->total_failing_runs == 1);
}

TEST_CASE("nightly: a node whose only rows failed is monitored and not landed") {
  Plan plan = load(kPlan);
  History history(plan.nodes.size());
  history[static_cast<size_t>(plan.find_node("feed_b"))] =
      std::vector<StoredLanding>{landing("2026-03-02T03:00:00Z", "2026-03-02T02:00:00Z", LandingStatus::failed)};
  NightlyReport r = evaluate_nightly(plan, history, {}, *parse_date("2026-03-02"), 1);
  const RunResult& run = r.evaluation.runs[r.today[0]];
  CHECK(run.features[0].status == FeatureStatus::ok);     // feed_a declared: 01:30
  CHECK(run.features[0].slack_seconds == 16200);
  CHECK(run.features[1].status == FeatureStatus::never);  // through feed_b, which has no ok row
  CHECK(chain_of(plan, r, run.features[1]) == "feed_b@never,join_ab@never,f_ab@never");
  std::vector<std::string> unmonitored;
  for (int n : r.unmonitored) unmonitored.push_back(plan.nodes[static_cast<size_t>(n)].id);
  CHECK(unmonitored == std::vector<std::string>{"feed_a"});
}

namespace {

NightlyReport failing_report(const Plan& plan) {
  static History history;
  history = tiny_history(plan);
  return evaluate_nightly(plan, history, first_through(history), *parse_date("2026-03-03"), 2);
}

}  // namespace

TEST_CASE("nightly JSON carries the issue's keys") {
  Plan plan = load(kPlan);
  NightlyReport r = failing_report(plan);
  std::ostringstream out;
  write_nightly_json(out, plan, r);
  const std::string json = out.str();
  for (const char* key : {"\"plan\": \"tiny\"", "\"date\": \"2026-03-03\"", "\"ok\": false", "\"runs\": [",
                          "\"unmonitored\": [\"feed_b\"]", "\"drift\": [", "\"p50_offset_seconds\"",
                          "\"p90_offset_seconds\"", "\"declared_seconds\": 1800", "\"trend_seconds_per_week\"",
                          "\"drifting\": ", "\"on_time\": [", "\"at_local\": \"06:00\"", "\"days\": 2",
                          "\"on_time\": 1", "\"degraded\": 1", "\"rate\": 0.5000", "\"low\": 0.0945",
                          "\"high\": 0.9055", "\"silent_after_days\": 3", "\"silent\": []",
                          "\"status\": \"not-landed\"", "\"chain\": [\"feed_a\", \"f_a\"]"}) {
    INFO(key);
    CHECK(json.find(key) != std::string::npos);
  }
}

TEST_CASE("nightly JUnit XML is well-formed (xmllint)") {
  if (std::system("command -v xmllint >/dev/null 2>&1") != 0) {
    WARN("xmllint is not installed (Debian package libxml2-utils): JUnit XML not validated");
    return;
  }
  Plan plan = load(kPlan);
  NightlyReport r = failing_report(plan);
  std::ostringstream out;
  write_nightly_junit(out, plan, r);
  readyby_test::TempDir dir;
  readyby_test::write_text(dir.file("junit.xml"), out.str());
  CHECK(std::system(("xmllint --noout " + dir.file("junit.xml") + " 2>" + dir.file("lint.txt")).c_str()) == 0);
  INFO(readyby_test::read_text(dir.file("lint.txt")));
  CHECK(out.str().find("<testsuite name=\"readyby nightly tiny\"") != std::string::npos);
  CHECK(out.str().find("<property name=\"date\" value=\"2026-03-03\"/>") != std::string::npos);
  CHECK(out.str().find("<testcase classname=\"tiny.m\" name=\"m at 06:00\"") != std::string::npos);
  CHECK(out.str().find("run at 2026-03-03T06:00:00+00:00\n") != std::string::npos);
  CHECK(out.str().find("<failure type=\"fail\" message=\"f_a: not landed; f_ab: not landed\">") != std::string::npos);
  CHECK(out.str().find("f_a: not landed\n  chain: feed_a@not-landed f_a@not-landed") != std::string::npos);
}

namespace {

// A check of the OpenMetrics text format (OpenMetrics 1.0 ABNF, the parts
// readyby uses): metadata lines, samples with labels, every family's
// metadata before its samples and its samples contiguous, unit suffixes, and
// `# EOF` as the last line.
std::vector<std::string> openmetrics_problems(const std::string& text) {
  std::vector<std::string> problems;
  const std::string name = "[a-zA-Z_:][a-zA-Z0-9_:]*";
  const std::string label_value = R"("(?:[^"\\\n]|\\\\|\\"|\\n)*")";
  const std::string labels = "\\{(?:[a-zA-Z_][a-zA-Z0-9_]*=" + label_value + "(?:,[a-zA-Z_][a-zA-Z0-9_]*=" +
                             label_value + ")*)?\\}";
  const std::string number = R"([-+]?(?:[0-9]+(?:\.[0-9]*)?(?:[eE][-+]?[0-9]+)?|\.[0-9]+|Inf|NaN))";
  const RE2 type_line("# TYPE (" + name + ") (gauge|counter|info|stateset|unknown)");
  const RE2 unit_line("# UNIT (" + name + ") ([a-zA-Z0-9_:]+)");
  const RE2 help_line("# HELP (" + name + ") (?:[^\\\\\n]|\\\\\\\\|\\\\n|\\\\\")*");
  const RE2 sample_line("(" + name + ")(?:" + labels + ")? " + number);
  for (const RE2* re : {&type_line, &unit_line, &help_line, &sample_line}) REQUIRE(re->ok());
  if (text.empty() || text.back() != '\n') problems.push_back("does not end with a newline");
  std::istringstream in(text);
  std::string line, current;
  std::set<std::string> families;
  bool eof = false;
  int number_of_line = 0;
  while (std::getline(in, line)) {
    ++number_of_line;
    std::string where = "line " + std::to_string(number_of_line) + ": ";
    std::string family, unit;
    if (eof) problems.push_back(where + "text after # EOF");
    if (line == "# EOF") {
      eof = true;
    } else if (RE2::FullMatch(line, type_line, &family)) {
      if (!families.insert(family).second) problems.push_back(where + "family declared twice: " + family);
      current = family;
    } else if (RE2::FullMatch(line, unit_line, &family, &unit)) {
      if (family != current) problems.push_back(where + "UNIT for another family");
      if (!current.ends_with("_" + unit)) problems.push_back(where + "name lacks the unit suffix");
    } else if (RE2::FullMatch(line, help_line, &family)) {
      if (family != current) problems.push_back(where + "HELP for another family");
    } else if (RE2::FullMatch(line, sample_line, &family)) {
      if (family != current) problems.push_back(where + "sample outside its family: " + family);
    } else {
      problems.push_back(where + "not OpenMetrics: " + line);
    }
  }
  if (!eof) problems.push_back("missing # EOF");
  return problems;
}

}  // namespace

TEST_CASE("nightly OpenMetrics exposition follows the text format") {
  Plan plan = load(kPlan);
  NightlyReport r = failing_report(plan);
  std::ostringstream out;
  write_nightly_metrics(out, plan, r);
  INFO(out.str());
  CHECK(openmetrics_problems(out.str()).empty());
  for (const std::string& p : openmetrics_problems(out.str())) INFO(p);
  CHECK(out.str().find("readyby_feature_landed{plan=\"tiny\",model=\"m\",run=\"06:00\",feature=\"f_a\"} 0\n") !=
        std::string::npos);
  CHECK(out.str().find("readyby_run_ok{plan=\"tiny\",model=\"m\",run=\"06:00\"} 0\n") != std::string::npos);
  CHECK(out.str().find("readyby_run_degraded{plan=\"tiny\",model=\"m\",run=\"06:00\"} 0\n") != std::string::npos);
  CHECK(out.str().find("readyby_run_on_time_ratio{plan=\"tiny\",model=\"m\",run=\"06:00\"} 0.5\n") !=
        std::string::npos);
  // The date evaluated, as a value: 2026-03-03T00:00:00Z is 1772496000 (Unix time).
  CHECK(out.str().find("readyby_nightly_date_timestamp_seconds{plan=\"tiny\"} 1772496000\n") != std::string::npos);
  // No status label: the status is the value.
  CHECK(out.str().find("status=") == std::string::npos);
  // The checker itself rejects what it should.
  CHECK_FALSE(openmetrics_problems("# TYPE a gauge\nb 1\n# EOF\n").empty());
  CHECK_FALSE(openmetrics_problems("# TYPE a gauge\na 1\n").empty());
  CHECK_FALSE(openmetrics_problems("# TYPE a gauge\n# UNIT a seconds\na{x=\"1} 1\n# EOF\n").empty());
}

namespace {

// The series of an OpenMetrics text: each sample line without its value.
std::vector<std::string> series_of(const std::string& metrics) {
  std::vector<std::string> out;
  std::istringstream in(metrics);
  for (std::string line; std::getline(in, line);) {
    if (line.empty() || line[0] == '#') continue;
    out.push_back(line.substr(0, line.rfind(' ')));
  }
  return out;
}

// The test case names of a JUnit text, and its suite names.
std::vector<std::string> junit_names(const std::string& xml) {
  std::vector<std::string> out;
  re2::StringPiece input(xml);
  std::string name;
  while (RE2::FindAndConsume(&input, R"re(<(?:testcase|testsuite|testsuites) (?:classname="[^"]*" )?name="([^"]*)")re", &name)) {
    out.push_back(name);
  }
  return out;
}

}  // namespace

TEST_CASE("nightly metrics and JUnit names are the same from night to night") {
  Plan plan = load(kPlan);
  History history = tiny_history(plan);
  NightlyReport first = evaluate_nightly(plan, history, first_through(history), *parse_date("2026-03-02"), 2);
  NightlyReport second = evaluate_nightly(plan, history, first_through(history), *parse_date("2026-03-03"), 2);
  first.evaluated_at = at("2026-03-02T07:30:00Z");
  second.evaluated_at = at("2026-03-03T07:30:00Z");
  std::ostringstream m1, m2, j1, j2;
  write_nightly_metrics(m1, plan, first);
  write_nightly_metrics(m2, plan, second);
  write_nightly_junit(j1, plan, first);
  write_nightly_junit(j2, plan, second);
  INFO(m1.str());
  INFO(m2.str());
  REQUIRE_FALSE(series_of(m1.str()).empty());
  CHECK(series_of(m1.str()) == series_of(m2.str()));
  // No label value holds a date.
  CHECK_FALSE(RE2::PartialMatch(m2.str(), R"(="[^"]*\d{4}-\d\d-\d\d)"));
  // The values differ: the runs, and when each check was made.
  CHECK(m1.str() != m2.str());
  CHECK(m2.str().find("readyby_nightly_last_evaluated_timestamp_seconds{plan=\"tiny\"} 1772523000\n") !=
        std::string::npos);  // 2026-03-03T07:30:00Z
  CHECK(openmetrics_problems(m2.str()).empty());

  const std::vector<std::string> names = junit_names(j1.str());
  CHECK(names == std::vector<std::string>{"readyby nightly tiny", "readyby nightly tiny", "m at 06:00"});
  CHECK(names == junit_names(j2.str()));
}

TEST_CASE("nightly: degraded runs count as on time in the rate, the metrics and the exit status alike") {
  Plan plan = load(kPlan);
  History history = tiny_history(plan);
  // 03-02 alone: f_c (optional) is late, the run is degraded.
  NightlyReport r = evaluate_nightly(plan, history, first_through(history), *parse_date("2026-03-02"), 1);
  REQUIRE(r.today.size() == 1);
  REQUIRE(r.evaluation.runs[r.today[0]].status == RunStatus::degraded);
  CHECK(r.ok());
  REQUIRE(r.on_time.size() == 1);
  CHECK(r.on_time[0].on_time == 1);
  CHECK(r.on_time[0].degraded == 1);
  CHECK(r.on_time[0].rate == 1.0);
  std::ostringstream metrics, text;
  write_nightly_metrics(metrics, plan, r);
  write_nightly_text(text, plan, r);
  CHECK(metrics.str().find("readyby_run_ok{plan=\"tiny\",model=\"m\",run=\"06:00\"} 1\n") != std::string::npos);
  CHECK(metrics.str().find("readyby_run_degraded{plan=\"tiny\",model=\"m\",run=\"06:00\"} 1\n") != std::string::npos);
  CHECK(metrics.str().find("readyby_run_on_time_ratio{plan=\"tiny\",model=\"m\",run=\"06:00\"} 1\n") !=
        std::string::npos);
  CHECK(text.str().find("  m 06:00: 1/1 = 100% (") != std::string::npos);
  CHECK(text.str().find("; 1 degraded\n") != std::string::npos);
}

namespace {

const char kWeeklyPlan[] = R"(plan: quiet
title: Silent nodes (fictional)
timezone: Etc/UTC
sources:
  daily:
    schedule: "0 1 * * *"
    lands_after: PT30M
  weekly:
    schedule: "0 1 * * mon"
    lands_after: PT30M
  events:
    schedule: stream
features:
  f_daily:
    inputs: [daily]
    max_age: P2D
  f_weekly:
    inputs: [weekly]
    max_age: P8D
  f_events:
    inputs: [events]
    max_age: P10D
models:
  m:
    features: [f_daily, f_weekly, f_events]
    runs:
      - at: "0 6 * * *"
)";

std::vector<std::string> silent_ids(const Plan& plan, const NightlyReport& r) {
  std::vector<std::string> out;
  for (const SilentNode& q : r.silent) out.push_back(plan.nodes[static_cast<size_t>(q.node)].id);
  return out;
}

}  // namespace

TEST_CASE("nightly: a monitored node with no landing for 3 days, when one was due, is silent") {
  Plan plan = load(kWeeklyPlan);
  History h(plan.nodes.size());
  // 2026-03-02 is a Monday. Every node last landed on it.
  h[static_cast<size_t>(plan.find_node("daily"))] = std::vector<StoredLanding>{
      landing("2026-03-01T01:20:00Z", "2026-03-01T00:00:00Z"), landing("2026-03-02T01:25:00Z", "2026-03-02T00:00:00Z")};
  h[static_cast<size_t>(plan.find_node("weekly"))] =
      std::vector<StoredLanding>{landing("2026-03-02T01:40:00Z", "2026-03-01T00:00:00Z")};
  h[static_cast<size_t>(plan.find_node("events"))] =
      std::vector<StoredLanding>{landing("2026-03-02T05:00:00Z", "2026-03-02T04:59:00Z", LandingStatus::failed)};
  struct Case {
    const char* date;
    std::vector<std::string> silent;
  };
  // as_of is the day's 06:00 run; silent when nothing landed after as_of - 3 days.
  const Case cases[] = {
      // Thu 06:00: every node landed after Mon 06:00? daily (Mon 01:25) did not, and
      // was due Tue 01:30; weekly (Mon 01:40) was not due again; events landed Mon 05:00.
      {"2026-03-05", {"daily", "events"}},
      {"2026-03-04", {}},  // Wed 06:00: the last three days reach back to Sun 06:00
      // The following Tuesday: weekly's Monday delivery (due 01:30) did not come.
      {"2026-03-10", {"daily", "weekly", "events"}},
  };
  for (const Case& c : cases) {
    INFO(c.date);
    NightlyReport r = evaluate_nightly(plan, h, {}, *parse_date(c.date), 7);
    CHECK(silent_ids(plan, r) == c.silent);
  }
  NightlyReport r = evaluate_nightly(plan, h, {}, *parse_date("2026-03-05"), 7);
  CHECK(format_rfc3339(r.as_of, nullptr) == "2026-03-05T06:00:00Z");
  REQUIRE(r.silent.size() == 2);
  CHECK(format_rfc3339(*r.silent[0].last_landed_at, nullptr) == "2026-03-02T01:25:00Z");
  CHECK(silent_warning(plan, r.silent[0], plan.zone) ==
        "no landing of daily recorded for 3 days (last 2026-03-02 01:25 +00:00) though one was due: has the feed "
        "stopped, or is its log no longer recorded?");
  // Landings after as_of do not count: on Mon 03-02 the daily landing of 01:25 is before the 06:00 run.
  NightlyReport monday = evaluate_nightly(plan, h, {}, *parse_date("2026-03-02"), 1);
  CHECK(silent_ids(plan, monday).empty());
  CHECK(format_rfc3339(*monday.last_landed[static_cast<size_t>(plan.find_node("daily"))], nullptr) ==
        "2026-03-02T01:25:00Z");

  std::ostringstream text, json, metrics, junit;
  write_nightly_text(text, plan, r);
  write_nightly_json(json, plan, r);
  write_nightly_metrics(metrics, plan, r);
  write_nightly_junit(junit, plan, r);
  CHECK(text.str().find("\nwarning: no landing of daily recorded for 3 days") != std::string::npos);
  CHECK(json.str().find("\"silent\": [{\"node\": \"daily\", \"last_landed_at\": \"2026-03-02T01:25:00+00:00\"}, "
                        "{\"node\": \"events\", \"last_landed_at\": \"2026-03-02T05:00:00+00:00\"}]") !=
        std::string::npos);
  CHECK(metrics.str().find("readyby_node_silent{plan=\"quiet\",node=\"daily\"} 1\n") != std::string::npos);
  CHECK(metrics.str().find("readyby_node_silent{plan=\"quiet\",node=\"weekly\"} 0\n") != std::string::npos);
  // 2026-03-02T01:25:00Z is 1772414700 (Unix time).
  CHECK(metrics.str().find("readyby_node_last_landed_timestamp_seconds{plan=\"quiet\",node=\"daily\"} 1772414700\n") !=
        std::string::npos);
  CHECK(openmetrics_problems(metrics.str()).empty());
  CHECK(junit.str().find("<system-err>no landing of daily recorded for 3 days") != std::string::npos);
}
