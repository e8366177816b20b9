#include <catch2/catch.hpp>

#include "catalog_fixture.h"
#include "engine/check.h"
#include "intake/feasibility.h"
#include "plan/plan_loader.h"

using namespace readyby;

namespace {

// A small plan for one model scored at 06:30 every day (America/Chicago).
//   sodium        stream, always fresh
//   claims_ed     claims data reaching 10 days back, max_age 21 days: fresh by
//                 its own rule, stale for a score that wants 48 hours
//   board         weekday-only 07:00 delivery (lands 07:20), max_age 50 hours:
//                 the Monday 06:30 run needs Saturday's data, which only
//                 Monday's 07:20 delivery holds — late on Mondays only
//   ecg           an element the vocabulary calls rarely structured, fresh
const char kPlan[] = R"(plan: feasibility
timezone: America/Chicago
calendars:
  weekdays:
    skip_weekdays: [sat, sun]
sources:
  lab_stream:
    schedule: stream
    lands_after: PT5M
  claims:
    schedule: "0 2 * * *"
    lands_after: PT1H
    data_lag: P10D
  bed_board:
    schedule: "0 7 * * *"
    calendar: weekdays
    lands_after: PT20M
features:
  sodium:
    inputs: [lab_stream]
    max_age: PT1H
    elements: [lab.sodium]
  claims_ed:
    inputs: [claims]
    max_age: P21D
    elements: [util.ed_visits_6m]
  board:
    inputs: [bed_board]
    max_age: PT50H
    elements: [util.length_of_stay_days]
  ecg:
    inputs: [lab_stream]
    max_age: PT1H
    elements: [phys.ecg_abnormal]
  sodium_other_model:
    inputs: [claims]
    max_age: PT1H
    elements: [lab.sodium]
models:
  m:
    features: [sodium, claims_ed, board, ecg]
    runs:
      - at: "30 6 * * *"
)";

const Plan& plan() {
  static const PlanLoadResult kLoaded = load_plan_text(kPlan, "feasibility.plan.yaml");
  INFO(kLoaded.rendered);
  REQUIRE(kLoaded.plan);
  return *kLoaded.plan;
}

// 2026-02-23 is a Monday; 14 days hold two Mondays.
std::vector<Instant> runs() {
  return run_instants(plan(), plan().models[0], *parse_date("2026-02-23"), 14);
}

EntryInput input(const std::string& element, std::optional<Duration> recency = std::nullopt) {
  EntryInput in;
  in.element = element;
  in.label = element;
  in.recency = recency;
  return in;
}

Entry entry_of(std::vector<EntryInput> inputs) {
  Entry e;
  e.id = "test-score";
  e.name = "Test score";
  e.kind = "points";
  e.inputs = std::move(inputs);
  return e;
}

CandidateCheck check(const Entry& e) {
  return assess_entry(plan(), 0, runs(), e, testing::shipped().catalog.vocabulary);
}

const Duration kTwoDays{2 * 86400};

}  // namespace

TEST_CASE("feasibility: each input's status, feature and timing") {
  REQUIRE(testing::shipped().errors.empty());
  REQUIRE(runs().size() == 14);
  struct Case {
    const char* name;
    EntryInput in;
    InputStatus status;
    const char* feature;      // "" when none
    size_t late_runs;
    const char* late_when;
  };
  const std::vector<Case> cases = {
      {"fresh stream feature", input("lab.sodium"), InputStatus::on_time, "sodium", 0, ""},
      {"no feature provides the element", input("demo.age"), InputStatus::missing, "", 0, ""},
      // max_age P21D is the feature's own rule and holds; the score asks for 48 hours.
      {"feature's max_age holds without a stated recency", input("util.ed_visits_6m"), InputStatus::on_time,
       "claims_ed", 0, ""},
      {"feature max_age exceeds the input's recency", input("util.ed_visits_6m", kTwoDays), InputStatus::late,
       "claims_ed", 14, "every run (14 of 14 runs)"},
      {"late only on Mondays", input("util.length_of_stay_days"), InputStatus::late, "board", 2,
       "every Monday (2 of 2 Monday runs)"},
      // Fresh, but the vocabulary says an ECG finding is rarely a structured field.
      {"rarely structured element, even with a fresh feature", input("phys.ecg_abnormal"), InputStatus::unstructured,
       "ecg", 0, ""},
      {"rarely structured element without a feature", input("phys.ecg_rhythm"), InputStatus::unstructured, "", 0, ""},
  };
  for (const Case& c : cases) {
    INFO(c.name);
    CandidateCheck result = check(entry_of({c.in}));
    REQUIRE(result.inputs.size() == 1);
    const InputCheck& in = result.inputs[0];
    CHECK(to_string(in.status) == std::string(to_string(c.status)));
    CHECK(in.feature_id == c.feature);
    CHECK(in.available() == (std::string(c.feature) != ""));
    CHECK(in.late_runs.size() == c.late_runs);
    CHECK(in.late_when == c.late_when);
  }
}

TEST_CASE("feasibility: allowed age, worst lateness and the vocabulary's facts") {
  CandidateCheck late = check(entry_of({input("util.ed_visits_6m", kTwoDays)}));
  const InputCheck& claims = late.inputs[0];
  CHECK(claims.allowed_age == kTwoDays);
  CHECK(claims.recency == kTwoDays);
  CHECK(claims.model_feature);
  CHECK(claims.worst_late_seconds > 7 * 86400);   // data reaches 10 days back; the score wants 2
  CHECK_FALSE(claims.never);
  CHECK(claims.label == "Emergency department visits in the previous 6 months");

  CandidateCheck monday = check(entry_of({input("util.length_of_stay_days")}));
  CHECK(monday.inputs[0].allowed_age == Duration{50 * 3600});   // the feature's max_age
  CHECK(monday.inputs[0].worst_late_seconds == 50 * 60);        // lands 07:20 for a 06:30 run
  CHECK(monday.inputs[0].structured);
  CHECK_FALSE(check(entry_of({input("phys.ecg_abnormal")})).inputs[0].structured);
}

TEST_CASE("feasibility: the fresher provider wins, then the model's own feature") {
  // lab.sodium is listed by `sodium` (the model's, stream) and by
  // `sodium_other_model` (a daily feed: never fresh within an hour).
  CandidateCheck c = check(entry_of({input("lab.sodium")}));
  CHECK(c.inputs[0].feature_id == "sodium");
  CHECK(c.inputs[0].model_feature);
}

TEST_CASE("feasibility: banded inputs are one element with the strictest recency") {
  Entry e = entry_of({input("util.ed_visits_6m"), input("util.ed_visits_6m", kTwoDays),
                      input("util.ed_visits_6m", Duration{5 * 86400}), input("lab.sodium")});
  CandidateCheck c = check(e);
  REQUIRE(c.inputs.size() == 2);
  CHECK(c.inputs[0].element == "util.ed_visits_6m");
  CHECK(c.inputs[0].recency == kTwoDays);
  CHECK(c.inputs[1].element == "lab.sodium");
}

TEST_CASE("feasibility: computable is on-time, gaps or no") {
  struct Case {
    const char* name;
    std::vector<EntryInput> inputs;
    Computable computable;
  };
  const std::vector<Case> cases = {
      {"every input fresh", {input("lab.sodium"), input("util.ed_visits_6m")}, Computable::on_time},
      {"one missing", {input("lab.sodium"), input("demo.age")}, Computable::gaps},
      {"one late on Mondays", {input("lab.sodium"), input("util.length_of_stay_days")}, Computable::gaps},
      {"one rarely structured", {input("lab.sodium"), input("phys.ecg_abnormal")}, Computable::gaps},
      {"nothing available", {input("demo.age"), input("phys.ecg_rhythm")}, Computable::no},
  };
  for (const Case& c : cases) {
    INFO(c.name);
    CHECK(to_string(check(entry_of(c.inputs)).computable) == std::string(to_string(c.computable)));
  }
  CandidateCheck gaps = check(entry_of({input("lab.sodium"), input("demo.age"), input("util.length_of_stay_days"),
                                        input("phys.ecg_abnormal")}));
  CHECK(gaps.elements_with(InputStatus::missing) == std::vector<std::string>{"demo.age"});
  CHECK(gaps.elements_with(InputStatus::late) == std::vector<std::string>{"util.length_of_stay_days"});
  CHECK(gaps.elements_with(InputStatus::unstructured) == std::vector<std::string>{"phys.ecg_abnormal"});
  CHECK(gaps.elements_with(InputStatus::on_time) == std::vector<std::string>{"lab.sodium"});
}

TEST_CASE("feasibility: only covering and partly covering candidates are checked, in rank order") {
  Entry covers = entry_of({input("lab.sodium")});
  covers.id = "a";
  Entry partly = entry_of({input("demo.age")});
  partly.id = "b";
  Entry related = entry_of({input("lab.sodium")});
  related.id = "c";
  ReuseReport reuse;
  auto candidate = [](const Entry* e, Coverage coverage, int rank, bool in_house) {
    Candidate c;
    c.entry = e;
    c.coverage = coverage;
    c.rank = rank;
    c.in_house = in_house;
    return c;
  };
  reuse.candidates = {candidate(&covers, Coverage::covers, 1, false), candidate(&partly, Coverage::partly, 2, true),
                      candidate(&related, Coverage::related, 3, false)};
  Feasibility f = assess_feasibility(plan(), 0, runs(), reuse, testing::shipped().catalog.vocabulary);
  REQUIRE(f.candidates.size() == 2);
  CHECK(f.candidates[0].entry->id == "a");
  CHECK(f.candidates[0].computable == Computable::on_time);
  CHECK(f.candidates[1].entry->id == "b");
  CHECK(f.candidates[1].in_house);
  CHECK(f.candidates[1].rank == 2);
  CHECK(f.candidates[1].computable == Computable::no);
  CHECK(f.runs.size() == 14);
}
