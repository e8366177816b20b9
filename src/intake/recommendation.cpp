#include "intake/recommendation.h"

#include <algorithm>
#include <tuple>

namespace readyby {

const char* to_string(Decision d) {
  switch (d) {
    case Decision::reuse_and_validate: return "reuse-and-validate";
    case Decision::fix_data_plan_first: return "fix-data-plan-first";
    case Decision::close_gaps_or_build: return "close-gaps-or-build";
    case Decision::build: return "build";
  }
  return "?";
}

namespace {

std::string runs_text(size_t n) { return std::to_string(n) + (n == 1 ? " run" : " runs"); }

std::string quoted_list(const std::vector<std::string>& items) {
  std::string out;
  for (size_t i = 0; i < items.size(); ++i) {
    out += (i == 0 ? "" : i + 1 == items.size() ? " and " : ", ") + ("'" + items[i] + "'");
  }
  return out;
}

size_t gap_count(const CandidateCheck& c) {
  return static_cast<size_t>(std::count_if(c.inputs.begin(), c.inputs.end(),
                                           [](const InputCheck& in) { return in.status != InputStatus::on_time; }));
}

// "covers" or "partly covers", with the criteria a partial match misses.
std::string coverage_text(const CandidateCheck& c, const ReuseReport& reuse) {
  if (c.coverage == Coverage::covers) return "covers the proposal on every criterion";
  std::vector<std::string> missed;
  for (const Candidate& cand : reuse.candidates) {
    if (cand.entry != c.entry) continue;
    for (const Criterion& cr : cand.criteria) {
      if (cr.level < 2) missed.push_back(cr.name + " " + cr.result);
    }
  }
  std::string out = "partly covers the proposal";
  if (!missed.empty()) {
    out += " (";
    for (size_t i = 0; i < missed.size(); ++i) out += (i ? ", " : "") + missed[i];
    out += ")";
  }
  return out;
}

// The gaps of a candidate, one sentence per kind, each starting with `prefix`.
std::vector<std::string> gap_reasons(const CandidateCheck& c, const std::string& prefix) {
  std::vector<std::string> out;
  std::string missing, late, unstructured;
  for (const InputCheck& in : c.inputs) {
    std::string name = in.label + " (" + in.element + ")";
    if (in.status == InputStatus::missing) {
      missing += (missing.empty() ? "" : "; ") + name;
    } else if (in.status == InputStatus::late) {
      late += (late.empty() ? "" : "; ") + name + " from '" + in.feature_id + "', late " + in.late_when;
    } else if (in.status == InputStatus::unstructured) {
      unstructured += (unstructured.empty() ? "" : "; ") + name +
                      (in.available() ? " (from '" + in.feature_id + "': check how it is captured)" : "");
    }
  }
  if (!missing.empty()) out.push_back(prefix + "no feature of the plan provides " + missing);
  if (!late.empty()) out.push_back(prefix + "not fresh enough for its runs: " + late);
  if (!unstructured.empty()) out.push_back(prefix + "usually not a structured field in an electronic record: " + unstructured);
  return out;
}

std::string timing_fact(const TimingSummary& t) {
  std::string out = "timing of model '" + t.model + "': " + std::to_string(t.ok) + " of " + runs_text(t.runs) + " ok";
  if (t.degraded) out += ", " + std::to_string(t.degraded) + " degraded";
  if (t.failed) out += ", " + std::to_string(t.failed) + " failed";
  if (t.tightest_slack_seconds) out += "; tightest slack " + human_duration(*t.tightest_slack_seconds);
  if (t.degraded && !t.degraded_features.empty()) {
    out += "; optional " + std::string(t.degraded_features.size() == 1 ? "feature " : "features ") +
           quoted_list(t.degraded_features) + " not always fresh (the model scores without them)";
  }
  return out;
}

std::string pattern_fix_text(const TimingPattern& p) {
  std::string out = p.description + ": ";
  if (!p.cheapest) return out + "no change to one step or to the run time within two days fixes it";
  out += p.cheapest->text;
  const std::optional<TimingFix>& other = p.cheapest->kind == TimingFix::Kind::start_later ? p.data_fix : p.later_start;
  if (other) out += "; or " + other->text;
  return out;
}

// "'unplanned return to theatre'": the outcome the vocabulary did not recognise.
std::string unrecognised(const ReuseReport& reuse) { return "'" + reuse.outcome + "'"; }

std::string outcome_fact(const ReuseReport& reuse) {
  return "searched " + std::to_string(reuse.searched) + " catalogue entries" +
         (reuse.resolution.concepts.empty() ? "; the vocabulary did not recognise the outcome " + unrecognised(reuse)
                                            : "");
}

// The timing in one clause that never calls a degraded run "in time".
std::string timing_clause(const TimingSummary& t) {
  if (t.failed == 0 && t.degraded == 0) return "every run of '" + t.model + "' gets its data in time";
  if (t.failed == 0) {
    return "no run of '" + t.model + "' fails, but " + std::to_string(t.degraded) + " of " + runs_text(t.runs) +
           " are degraded (optional " + (t.degraded_features.size() == 1 ? "feature " : "features ") +
           quoted_list(t.degraded_features) + " not always fresh)";
  }
  return std::to_string(t.failed) + " of " + runs_text(t.runs) + " of '" + t.model + "' fail";
}

IntakeRecommendation reuse_row(const CandidateCheck& chosen, const TimingSummary& timing, const ReuseReport& reuse,
                               const Feasibility& feasibility) {
  IntakeRecommendation r;
  r.decision = Decision::reuse_and_validate;
  r.candidate = chosen.entry->id;
  const std::string& name = chosen.entry->name;
  r.summary = "validate and reuse " + name + " rather than build a new model: it " + coverage_text(chosen, reuse) +
              " and this data plan delivers every input on time at all " + runs_text(feasibility.runs.size()) +
              " of '" + timing.model + "'";
  r.reasons.push_back(name + (chosen.in_house ? " (in-house model) " : " ") + coverage_text(chosen, reuse));
  std::string mapping;
  for (const InputCheck& in : chosen.inputs) mapping += (mapping.empty() ? "" : ", ") + in.element + " <- " + in.feature_id;
  r.reasons.push_back("all " + std::to_string(chosen.inputs.size()) + " of its inputs are in the plan and fresh at every run: " +
                      mapping);
  if (timing.failed) {
    std::string patterns;
    for (const TimingPattern& p : timing.patterns) patterns += (patterns.empty() ? "" : "; ") + p.description;
    r.reasons.push_back("the proposed model '" + timing.model + "' fails " + std::to_string(timing.failed) + " of " +
                        runs_text(timing.runs) + " (" + patterns + "); " + name +
                        " does not wait on the late features, so reuse avoids that problem");
  } else {
    r.reasons.push_back(timing_fact(timing));
  }
  for (const CandidateCheck& c : feasibility.candidates) {
    if (&c == &chosen || c.coverage != Coverage::covers || c.computable == Computable::on_time) continue;
    std::vector<std::string> gaps = gap_reasons(c, "");
    r.reasons.push_back(c.entry->name + (c.in_house ? " (in-house model)" : "") + " also covers but has " +
                        std::to_string(gap_count(c)) + " gap" + (gap_count(c) == 1 ? "" : "s") +
                        (gaps.empty() ? "" : " — " + gaps.front()));
  }
  r.reasons.push_back("validate " + name + " on local data (discrimination and calibration) before any use; "
                      "whether to use it clinically is for model governance and licensed clinicians to decide");
  return r;
}

IntakeRecommendation fix_row(const TimingSummary& timing, const ReuseReport& reuse, const Feasibility& feasibility) {
  IntakeRecommendation r;
  r.decision = Decision::fix_data_plan_first;
  r.summary = "fix the data plan first: " + std::to_string(timing.failed) + " of " + runs_text(timing.runs) +
              " of '" + timing.model + "' fail";
  if (!timing.patterns.empty()) {
    const TimingPattern& worst = timing.patterns.front();
    r.cheapest_fix = worst.cheapest;
    r.summary += worst.cheapest ? "; cheapest fix for the most frequent failure (" + worst.description + "): " +
                                      worst.cheapest->text
                                : "; no single change fixes the most frequent failure (" + worst.description + ")";
    if (timing.patterns.size() > 1) {
      size_t more = timing.patterns.size() - 1;
      r.summary += "; " + std::to_string(more) + " more failure pattern" + (more == 1 ? " needs" : "s need") +
                   " its own fix";
    }
  }
  r.reasons.push_back(timing_fact(timing) + " (verdict " + to_string(timing.verdict) + ")");
  for (const TimingPattern& p : timing.patterns) r.reasons.push_back(pattern_fix_text(p));
  bool any_cover = false;
  for (const CandidateCheck& c : feasibility.candidates) {
    if (c.coverage != Coverage::covers) continue;
    any_cover = true;
    r.reasons.push_back(c.entry->name + " covers the outcome but is computable: " + to_string(c.computable) +
                        "; reconsider it once the data plan is fixed");
  }
  if (!any_cover) {
    r.reasons.push_back("no established score or in-house model covers the proposal (" + outcome_fact(reuse) +
                        "); search the literature before building, and fix the data plan first: no model, new or "
                        "reused, is useful until its data arrives on time");
  }
  return r;
}

IntakeRecommendation gaps_row(const CandidateCheck& chosen, const TimingSummary& timing, const ReuseReport& reuse) {
  IntakeRecommendation r;
  r.decision = Decision::close_gaps_or_build;
  r.candidate = chosen.entry->id;
  const std::string& name = chosen.entry->name;
  size_t gaps = gap_count(chosen);
  if (chosen.computable == Computable::on_time) {
    r.summary = name + " " + coverage_text(chosen, reuse) +
                " and this plan delivers its inputs on time: adapt and validate it for this proposal, or build";
  } else {
    r.summary = "close the gaps to reuse " + name + ", or build: it " + coverage_text(chosen, reuse) + " but " +
                std::to_string(gaps) + " of its " + std::to_string(chosen.inputs.size()) +
                " inputs are not available on time in this plan";
  }
  r.reasons.push_back(name + (chosen.in_house ? " (in-house model) " : " ") + coverage_text(chosen, reuse) +
                      "; computable here: " + to_string(chosen.computable));
  for (std::string& g : gap_reasons(chosen, name + ": ")) r.reasons.push_back(std::move(g));
  r.reasons.push_back(timing_fact(timing));
  r.reasons.push_back("weigh closing " + std::string(chosen.computable == Computable::on_time ? "the coverage gap" : "these gaps") +
                      " against building, validating and maintaining a new model");
  return r;
}

IntakeRecommendation build_row(const TimingSummary& timing, const ReuseReport& reuse) {
  IntakeRecommendation r;
  r.decision = Decision::build;
  std::string found = reuse.resolution.concepts.empty()
                          ? "no catalogue entry matched, and the vocabulary did not recognise " + unrecognised(reuse) +
                                " — search the literature before building"
                          : "no established score or in-house model covers or partly covers the proposal — search "
                            "the literature for a published score before building";
  r.summary = found + "; " + timing_clause(timing);
  r.reasons.push_back("no catalogue entry covers or partly covers the proposal (" + outcome_fact(reuse) + ")");
  r.reasons.push_back(timing_fact(timing));
  r.reasons.push_back("if the literature has nothing either, plan the new model's validation and governance review "
                      "before building");
  return r;
}

}  // namespace

IntakeRecommendation recommend_intake(const TimingSummary& timing, const ReuseReport& reuse,
                                      const Feasibility& feasibility) {
  for (const CandidateCheck& c : feasibility.candidates) {
    if (c.coverage == Coverage::covers && c.computable == Computable::on_time) {
      return reuse_row(c, timing, reuse, feasibility);
    }
  }
  if (timing.failed > 0) return fix_row(timing, reuse, feasibility);
  const CandidateCheck* best = nullptr;
  auto key = [](const CandidateCheck& c) {
    return std::make_tuple(c.coverage == Coverage::covers ? 0 : 1, static_cast<int>(c.computable), gap_count(c), c.rank);
  };
  for (const CandidateCheck& c : feasibility.candidates) {
    if (!best || key(c) < key(*best)) best = &c;
  }
  if (best) return gaps_row(*best, timing, reuse);
  return build_row(timing, reuse);
}

}  // namespace readyby
