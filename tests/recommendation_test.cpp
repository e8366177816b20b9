#include <catch2/catch.hpp>

#include "intake/recommendation.h"

using namespace readyby;

// The intake decision table (intake/recommendation.h), every row reached by a
// small hand-made case.

namespace {

Entry entry(const std::string& id, const std::string& name) {
  Entry e;
  e.id = id;
  e.name = name;
  e.kind = "points";
  return e;
}

InputCheck input(const std::string& element, InputStatus status, const std::string& feature = "") {
  InputCheck in;
  in.element = element;
  in.label = element;
  in.status = status;
  in.feature_id = feature;
  in.feature = feature.empty() ? -1 : 0;
  if (status == InputStatus::late) in.late_when = "every Monday (4 of 4 Monday runs)";
  return in;
}

CandidateCheck candidate(const Entry& e, Coverage coverage, Computable computable, std::vector<InputCheck> inputs,
                         int rank = 1) {
  CandidateCheck c;
  c.entry = &e;
  c.coverage = coverage;
  c.computable = computable;
  c.inputs = std::move(inputs);
  c.rank = rank;
  return c;
}

TimingSummary on_time() {
  TimingSummary t;
  t.model = "m";
  t.runs = t.ok = 20;
  t.tightest_slack_seconds = 600;
  return t;
}

TimingSummary failing() {
  TimingSummary t;
  t.model = "m";
  t.verdict = TimingVerdict::at_risk;
  t.runs = 28;
  t.ok = 23;
  t.failed = 5;
  t.tightest_slack_seconds = -3000;
  TimingPattern monday;
  monday.description = "fails every Monday (4 of 4 Monday runs)";
  monday.runs = 4;
  monday.data_fix = TimingFix{TimingFix::Kind::land_earlier, "bed_board", 3000, "'bed_board' must land 50m earlier", "", "", false};
  monday.later_start = TimingFix{TimingFix::Kind::start_later, "m", 3000, "start the runs of 'm' 50m later", "", "", false};
  monday.cheapest = monday.data_fix;
  TimingPattern dst;
  dst.description = "fails on 2026-03-08, a daylight-saving change";
  dst.runs = 1;
  dst.later_start = TimingFix{TimingFix::Kind::start_later, "m", 900, "start the runs of 'm' 15m later", "", "", false};
  dst.cheapest = dst.later_start;
  t.patterns = {monday, dst};
  return t;
}

ReuseReport reuse_of(size_t searched) {
  ReuseReport r;
  r.searched = searched;
  return r;
}

bool any_reason(const IntakeRecommendation& r, const std::string& text) {
  for (const std::string& reason : r.reasons) {
    if (reason.find(text) != std::string::npos) return true;
  }
  return false;
}

}  // namespace

TEST_CASE("recommendation table: every row") {
  const Entry lace = entry("lace-index", "LACE index");
  const Entry hospital = entry("hospital-score", "HOSPITAL score");
  const CandidateCheck lace_on_time =
      candidate(lace, Coverage::covers, Computable::on_time, {input("util.ed_visits_6m", InputStatus::on_time, "ed")});
  const CandidateCheck hospital_gaps = candidate(
      hospital, Coverage::covers, Computable::gaps,
      {input("lab.sodium", InputStatus::on_time, "labs"), input("proc.any_procedure_during_stay", InputStatus::missing),
       input("util.length_of_stay_days", InputStatus::late, "board")},
      2);
  const CandidateCheck lace_partly =
      candidate(lace, Coverage::partly, Computable::on_time, {input("util.ed_visits_6m", InputStatus::on_time, "ed")});
  const CandidateCheck hospital_none =
      candidate(hospital, Coverage::covers, Computable::no, {input("proc.any_procedure_during_stay", InputStatus::missing)});

  struct Case {
    const char* name;
    TimingSummary timing;
    std::vector<CandidateCheck> candidates;
    Decision decision;
    const char* candidate;      // "" when none
    const char* in_summary;
    const char* in_reasons;
  };
  TimingSummary degraded_only = on_time();
  degraded_only.verdict = TimingVerdict::at_risk;
  degraded_only.ok = 18;
  degraded_only.degraded = 2;
  degraded_only.degraded_features = {"social_risk"};
  const std::vector<Case> cases = {
      {"covers and on time", on_time(), {lace_on_time}, Decision::reuse_and_validate, "lace-index",
       "validate and reuse LACE index", "validate LACE index on local data"},
      {"covers and on time beats failing timing", failing(), {hospital_gaps, lace_on_time},
       Decision::reuse_and_validate, "lace-index", "every input on time", "does not wait on the late features"},
      {"other covering entries with gaps are named", on_time(), {lace_on_time, hospital_gaps},
       Decision::reuse_and_validate, "lace-index", "LACE index", "HOSPITAL score also covers but has 2 gaps"},
      {"timing fails and nothing covers", failing(), {}, Decision::fix_data_plan_first, "",
       "cheapest fix for the most frequent failure (fails every Monday (4 of 4 Monday runs)): 'bed_board' must land "
       "50m earlier; 1 more failure pattern needs its own fix",
       "a new model is justified only once its data arrives on time"},
      {"timing fails and the covering score has gaps", failing(), {hospital_gaps}, Decision::fix_data_plan_first, "",
       "5 of 28 runs of 'm' fail", "HOSPITAL score covers the outcome but is computable: gaps"},
      {"covers with gaps, timing holds", on_time(), {hospital_gaps}, Decision::close_gaps_or_build, "hospital-score",
       "close the gaps to reuse HOSPITAL score, or build", "no feature of the plan provides proc.any_procedure_during_stay"},
      {"covers with nothing available", on_time(), {hospital_none}, Decision::close_gaps_or_build, "hospital-score",
       "1 of its 1 inputs", "computable here: no"},
      {"partly covers, on time", on_time(), {lace_partly}, Decision::close_gaps_or_build, "lace-index",
       "adapt and validate it", "weigh closing the coverage gap"},
      {"covers with gaps beats partly on time", on_time(), {lace_partly, hospital_gaps}, Decision::close_gaps_or_build,
       "hospital-score", "HOSPITAL score", "late every Monday"},
      {"nothing covers, timing holds", on_time(), {}, Decision::build, "", "a new model is justified",
       "searched 134 catalogue entries"},
      {"nothing covers, only optional features miss", degraded_only, {}, Decision::build, "",
       "a new model is justified", "optional feature 'social_risk' not always fresh"},
  };
  for (const Case& c : cases) {
    INFO(c.name);
    Feasibility f;
    f.candidates = c.candidates;
    f.runs.resize(c.timing.runs);
    IntakeRecommendation r = recommend_intake(c.timing, reuse_of(134), f);
    CHECK(to_string(r.decision) == std::string(to_string(c.decision)));
    CHECK(r.candidate == c.candidate);
    INFO(r.summary);
    CHECK(r.summary.find(c.in_summary) != std::string::npos);
    CHECK(any_reason(r, c.in_reasons));
    CHECK(r.cheapest_fix.has_value() == (c.decision == Decision::fix_data_plan_first));
  }
}

TEST_CASE("recommendation: fix-data-plan-first names each pattern's cheapest fix and the alternative") {
  IntakeRecommendation r = recommend_intake(failing(), reuse_of(10), Feasibility{});
  REQUIRE(r.cheapest_fix);
  CHECK(r.cheapest_fix->node == "bed_board");
  CHECK(r.cheapest_fix->kind == TimingFix::Kind::land_earlier);
  CHECK(r.cheapest_fix->seconds == 3000);
  CHECK(any_reason(r, "fails every Monday (4 of 4 Monday runs): 'bed_board' must land 50m earlier; or start the runs of 'm' 50m later"));
  CHECK(any_reason(r, "fails on 2026-03-08, a daylight-saving change: start the runs of 'm' 15m later"));
  CHECK(any_reason(r, "verdict at-risk"));
}

TEST_CASE("decision names are the JSON values") {
  CHECK(std::string(to_string(Decision::reuse_and_validate)) == "reuse-and-validate");
  CHECK(std::string(to_string(Decision::fix_data_plan_first)) == "fix-data-plan-first");
  CHECK(std::string(to_string(Decision::close_gaps_or_build)) == "close-gaps-or-build");
  CHECK(std::string(to_string(Decision::build)) == "build");
  CHECK(std::string(to_string(TimingVerdict::infeasible)) == "infeasible");
  CHECK(std::string(to_string(Computable::gaps)) == "gaps");
  CHECK(std::string(to_string(InputStatus::unstructured)) == "unstructured");
}
