#pragma once
// The timing half of an intake screening: one model's runs over the horizon,
// summarised into a verdict, and each pattern of failing or degraded runs
// with its verified fixes (engine/patterns.h, engine/fixes.h): every fix shown
// was re-evaluated and clears every run of its pattern (DESIGN §9). The fix
// texts come from the shared advice sentences (report/advice_text.h).
//
// Verdict: `on-time` when every run is ok, `infeasible` when every run fails,
// `at-risk` otherwise (some runs fail or are degraded).
//
// Cheapest fix of a pattern: of the data-plan fix (a delivery that must land
// earlier, or a fixed job start that must move) and starting the model's runs
// later, each verified on every run of the pattern,
// the one that moves a clock by less; a tie goes to the data-plan fix, which
// leaves the clinical workflow's time alone.

#include <optional>
#include <string>
#include <vector>

#include "engine/check.h"
#include "plan/plan.h"

namespace readyby {

enum class TimingVerdict { on_time, at_risk, infeasible };
/// "on-time" | "at-risk" | "infeasible".
const char* to_string(TimingVerdict v);

/// One way to make a failure pattern's runs pass.
struct TimingFix {
  enum class Kind { land_earlier, move_start, start_later };
  Kind kind = Kind::land_earlier;
  std::string node;        // the delivery or job to change; the model's id for start_later
  int64_t seconds = 0;     // how far its clock must move
  std::string text;        // for people: what changes, with the edit
  std::string effect;      // for people: the re-check ("all 4 runs of this pattern ok; no other run changes")
  std::string edit;        // the edit as `what-if` takes it, e.g. "delay bed_board=-PT50M"
  bool breaks_others = false;  // the edit turns some other run worse
};
/// "land-earlier" | "move-start" | "start-later".
const char* to_string(TimingFix::Kind k);

struct TimingPattern {
  std::string description;               // "fails every Monday (4 of 4 Monday runs)"
  bool degraded = false;                 // a pattern of degraded runs (optional features), else failing runs
  size_t runs = 0;                       // runs in the pattern
  std::vector<std::string> failing_features;
  std::vector<std::string> chain;        // critical chain, source first
  std::string cause;                     // why its worst run is late (empty when unknown)
  std::optional<TimingFix> data_fix;     // nullopt: no single verified edit of one step clears the pattern
  std::optional<TimingFix> later_start;  // nullopt: no later start within two days clears it
  std::string no_fix;                    // when neither exists: why
  std::optional<TimingFix> cheapest;     // the smaller of the two (see above)
};

struct TimingSummary {
  std::string model;
  TimingVerdict verdict = TimingVerdict::on_time;
  size_t runs = 0, ok = 0, degraded = 0, failed = 0;
  std::optional<int64_t> tightest_slack_seconds;   // over non-optional features ready at all; nullopt: none
  std::optional<Instant> tightest_at;              // the run with that slack
  std::vector<std::string> degraded_features;      // optional features not fresh in some run
  std::optional<int64_t> tightest_optional_seconds; // the same over optional features
  std::vector<TimingPattern> patterns;             // failing patterns first, most runs first, then order of first run
};

/// Summarises the runs of model `model` in `ev` (an evaluation of the whole plan).
TimingSummary summarise_timing(const Plan& plan, int model, const Evaluation& ev);

}  // namespace readyby
