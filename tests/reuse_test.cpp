#include <catch2/catch.hpp>

#include "catalog/outcome_resolver.h"
#include "catalog/proposal.h"
#include "catalog/reuse.h"
#include "catalog/reuse_writer.h"
#include "catalog_fixture.h"

using namespace readyby;

namespace {

const char kReadmission[] = R"(proposal: readmit-30d
title: 30-day readmission (fictional example)
outcome: unplanned readmission within 30 days
horizon: P30D
settings: [ward]
population: {age_min: 18, condition: adult medical and surgical inpatients}
time_point: discharge
)";

const char kPneumonia[] = R"(proposal: cap-30d
title: Pneumonia 30-day mortality in the ED (fictional example)
outcome: 30-day mortality
horizon: P30D
settings: [emergency-department]
population: {age_min: 18, condition: community-acquired pneumonia}
time_point: presentation
)";

Proposal proposal_of(const std::string& text) {
  Diagnostics diags;
  std::optional<Proposal> p = load_proposal_text(text, "p.yaml", testing::shipped().catalog.vocabulary, &diags);
  INFO(diags.render());
  REQUIRE(p);
  return *p;
}

ReuseReport reuse(const std::string& text, const std::vector<Entry>& entries = testing::shipped().catalog.entries) {
  const Vocabulary& v = testing::shipped().catalog.vocabulary;
  Proposal p = proposal_of(text);
  return match_proposal(p, OutcomeResolver(v).resolve(p.outcome), v, entries);
}

const Candidate* find(const ReuseReport& r, const std::string& id) {
  for (const Candidate& c : r.candidates) {
    if (c.entry->id == id) return &c;
  }
  return nullptr;
}

std::string result_of(const Candidate& c, const std::string& criterion) {
  for (const Criterion& cr : c.criteria) {
    if (cr.name == criterion) return cr.result;
  }
  return "?";
}

std::string replace(std::string text, const std::string& from, const std::string& to) {
  size_t at = text.find(from);
  REQUIRE(at != std::string::npos);
  return text.replace(at, from.size(), to);
}

}  // namespace

TEST_CASE("a 30-day readmission proposal finds the readmission indices as covers") {
  ReuseReport r = reuse(kReadmission);
  CHECK(r.recommendation == Recommendation::reuse);
  CHECK(r.searched == testing::shipped().catalog.entries.size());
  CHECK(r.resolution.concepts == std::vector<std::string>{"readmission-30d"});
  for (const char* id : {"lace-index", "hospital-score"}) {
    INFO(id);
    const Candidate* c = find(r, id);
    REQUIRE(c);
    CHECK(c->coverage == Coverage::covers);
    CHECK(c->criteria.size() == 5);
  }
  CHECK(result_of(*find(r, "lace-index"), "outcome") == "same");
  CHECK(result_of(*find(r, "hospital-score"), "outcome") == "narrower");  // potentially avoidable readmission
  // The shipped in-house model covers too, and is flagged first.
  REQUIRE(!r.candidates.empty());
  CHECK(r.candidates[0].entry->id == "lvmc-readmit-30d");
  CHECK(r.candidates[0].in_house);
  CHECK(r.in_house == std::vector<std::string>{"lvmc-readmit-30d"});
  CHECK(r.summary ==
        "reuse: 3 entries cover this proposal (LVMC 30-day readmission model, LACE index, HOSPITAL score); "
        "already built in-house: lvmc-readmit-30d");
}

TEST_CASE("a pneumonia 30-day mortality proposal in the ED finds the pneumonia severity scores") {
  ReuseReport r = reuse(kPneumonia);
  CHECK(r.recommendation == Recommendation::reuse);
  for (const char* id : {"curb-65", "psi-port"}) {
    INFO(id);
    const Candidate* c = find(r, id);
    REQUIRE(c);
    CHECK(c->coverage == Coverage::covers);
    CHECK(result_of(*c, "population") == "matches");
  }
  // A 30-day mortality score for another condition only partly covers.
  const Candidate* pe = find(r, "pesi");
  REQUIRE(pe);
  CHECK(pe->coverage == Coverage::related);
  CHECK(result_of(*pe, "population") == "excludes");
}

TEST_CASE("a paediatric proposal is not covered by adult-only scores") {
  ReuseReport r = reuse(replace(kPneumonia, "age_min: 18", "age_max: 15"));
  for (const char* id : {"curb-65", "psi-port"}) {
    INFO(id);
    const Candidate* c = find(r, id);
    REQUIRE(c);
    CHECK(c->coverage == Coverage::related);
    CHECK(result_of(*c, "population") == "excludes");
  }
  // "children" in the condition implies under 18 too.
  ReuseReport by_word = reuse(replace(kPneumonia, "age_min: 18, condition: community-acquired pneumonia",
                                      "condition: children with community-acquired pneumonia"));
  CHECK(find(by_word, "curb-65")->coverage == Coverage::related);
}

TEST_CASE("an outcome absent from the catalogue gets build, with the count searched") {
  ReuseReport r = reuse(replace(kReadmission, "unplanned readmission within 30 days", "unplanned return to theatre"));
  CHECK(r.recommendation == Recommendation::build);
  CHECK(r.candidates.empty());
  CHECK(r.resolution.unresolved == std::vector<std::string>{"unplanned", "return", "theatre"});
  CHECK(r.summary == "build: no established score found; searched " +
                         std::to_string(testing::shipped().catalog.entries.size()) +
                         " entries; the outcome matched no concept of the vocabulary");
}

TEST_CASE("broader and narrower outcomes") {
  // Proposal broad (any death): scores for 30-day death are narrower and count.
  ReuseReport broad = reuse(replace(kPneumonia, "outcome: 30-day mortality", "outcome: death"));
  CHECK(broad.resolution.concepts == std::vector<std::string>{"mortality"});
  CHECK(result_of(*find(broad, "curb-65"), "outcome") == "narrower");
  CHECK(find(broad, "curb-65")->coverage == Coverage::covers);
  // Proposal narrow (ICU death): an in-hospital death score is broader: partly at best.
  ReuseReport narrow = reuse(replace(kPneumonia, "outcome: 30-day mortality", "outcome: icu mortality"));
  const Candidate* grace = find(narrow, "grace-in-hospital");
  REQUIRE(grace);
  CHECK(result_of(*grace, "outcome") == "broader");
  CHECK(grace->coverage != Coverage::covers);
  // Siblings (30-day vs in-hospital death) only relate.
  CHECK(result_of(*find(reuse(kPneumonia), "grace-in-hospital"), "outcome") == "differs");
  CHECK(find(reuse(kPneumonia), "grace-in-hospital")->coverage == Coverage::related);
}

TEST_CASE("partial cover gives adapt, and horizons compare by ratio") {
  // Same outcome in the ward at admission with a 90-day horizon: setting, time point and horizon differ.
  std::string text = replace(replace(replace(kPneumonia, "[emergency-department]", "[intensive-care]"),
                                     "presentation", "daily"), "P30D", "P90D");
  ReuseReport r = reuse(text);
  const Candidate* curb = find(r, "curb-65");
  REQUIRE(curb);
  CHECK(curb->coverage == Coverage::partly);
  CHECK(result_of(*curb, "setting") == "none");
  CHECK(result_of(*curb, "time_point") == "differs");
  CHECK(result_of(*curb, "horizon") == "differs");
  CHECK(r.recommendation == Recommendation::adapt);
  CHECK(result_of(*find(reuse(replace(kPneumonia, "P30D", "P28D")), "curb-65"), "horizon") == "close");
  CHECK(result_of(*find(reuse(replace(kPneumonia, "P30D", "P365D")), "curb-65"), "horizon") == "far");
  CHECK(result_of(*find(reuse(replace(kPneumonia, "P30D", "in-hospital")), "curb-65"), "horizon") == "differs");
}

TEST_CASE("a local registry's in-house model that covers is flagged first") {
  std::vector<Entry> entries = testing::shipped().catalog.entries;
  Entry mine = *testing::shipped().catalog.find("curb-65");
  mine.id = "lvmc-cap-mortality";
  mine.name = "LVMC pneumonia mortality model";
  mine.kind = "local";
  mine.publication.reset();
  mine.owner = "Analytics";
  mine.status = "live";
  mine.go_live = "2024-01-08";
  mine.layer = 1;
  entries.push_back(mine);
  std::sort(entries.begin(), entries.end(), [](const Entry& a, const Entry& b) { return a.id < b.id; });
  ReuseReport r = reuse(kPneumonia, entries);
  REQUIRE(!r.candidates.empty());
  CHECK(r.candidates[0].entry->id == "lvmc-cap-mortality");
  CHECK(r.candidates[0].rank == 1);
  CHECK(r.in_house == std::vector<std::string>{"lvmc-cap-mortality"});
  CHECK(r.recommendation == Recommendation::reuse);
  CHECK(r.candidates[0].entry->reference() == "in-house model (Analytics; live since 2024-01-08)");
}

TEST_CASE("ranking does not depend on the order of the catalogue") {
  // The same entries given in reverse order rank the same: ties are broken by
  // id, never by position.
  std::vector<Entry> reversed(testing::shipped().catalog.entries.rbegin(), testing::shipped().catalog.entries.rend());
  ReuseReport a = reuse(kPneumonia);
  ReuseReport b = reuse(kPneumonia, reversed);
  REQUIRE(a.candidates.size() >= 5);
  REQUIRE(a.candidates.size() == b.candidates.size());
  bool tie = false;
  for (size_t i = 0; i < a.candidates.size(); ++i) {
    INFO("rank " << i + 1 << ": " << a.candidates[i].entry->id << " / " << b.candidates[i].entry->id);
    CHECK(a.candidates[i].entry->id == b.candidates[i].entry->id);
    CHECK(a.candidates[i].rank == static_cast<int>(i) + 1);
    if (i > 0) {
      CHECK(static_cast<int>(a.candidates[i - 1].coverage) <= static_cast<int>(a.candidates[i].coverage));
      tie = tie || a.candidates[i - 1].coverage == a.candidates[i].coverage;
    }
  }
  CHECK(tie);  // at least one pair with the same coverage, where the tie-breaking matters
}

TEST_CASE("the reports carry the keys and the cautions") {
  Proposal p = proposal_of(kReadmission);
  ReuseReport r = reuse(kReadmission);
  std::string json = reuse_json(p, r);
  for (const char* key : {"\"proposal\": \"readmit-30d\"", "\"concepts\": [\"readmission-30d\"]", "\"searched\": ",
                          "\"recommendation\": \"reuse\"", "\"candidates\": [", "\"id\": \"lace-index\"",
                          "\"kind\": \"points\"", "\"coverage\": \"covers\"", "\"rank\": 1", "\"criteria\": [",
                          "\"name\": \"outcome\"", "\"result\": \"same\"", "\"detail\": ", "\"reference\": ",
                          "\"cautions\": [", "validated on local data", "gives no clinical advice"}) {
    INFO(key);
    CHECK(json.find(key) != std::string::npos);
  }
  std::string text = reuse_text(p, r, testing::shipped().catalog.vocabulary);
  CHECK(text.find("recommendation: reuse") != std::string::npos);
  CHECK(text.find("already built in-house: LVMC 30-day readmission model") != std::string::npos);
  for (const std::string& c : catalogue_cautions()) CHECK(text.find(c) != std::string::npos);
}

TEST_CASE("bad proposals get exact messages and positions") {
  const Vocabulary& v = testing::shipped().catalog.vocabulary;
  struct Case {
    const char* name;
    std::string text;
    std::vector<std::string> errors;
  };
  const std::vector<Case> cases = {
      {"unknown setting", replace(kReadmission, "[ward]", "[wards]"),
       {"p.yaml:5:12: error: unknown setting 'wards' (did you mean 'ward'?)"}},
      {"unknown time point", replace(kReadmission, "time_point: discharge", "time_point: discharged"),
       {"p.yaml:7:13: error: unknown time point 'discharged' (did you mean 'discharge'?)"}},
      {"bad horizon", replace(kReadmission, "P30D", "P1M"),
       {"p.yaml:4:12: error: bad horizon 'P1M' of the proposal: years (Y) and months (M) are not allowed in a "
        "duration: their length varies; use days (D) or weeks (W) (use an ISO 8601 duration such as P30D, or "
        "in-hospital)"}},
      {"inverted ages", replace(kReadmission, "age_min: 18", "age_min: 65, age_max: 18"),
       {"p.yaml:6:23: error: age_min 65 of the proposal is greater than age_max 18"}},
      {"unknown key", replace(kReadmission, "title:", "titel:"),
       {"p.yaml:2:1: error: unknown key 'titel' in the proposal (did you mean 'title'?)"}},
      {"missing outcome", replace(kReadmission, "outcome: unplanned readmission within 30 days\n", ""),
       {"p.yaml:1:1: error: missing required key 'outcome' in the proposal (free text or an outcome concept id)"}},
      {"age as text", replace(kReadmission, "age_min: 18", "age_min: adult"),
       {"p.yaml:6:23: error: 'age_min' of the population must be a whole number from 0 to 130, found the text "
        "'adult'"}},
  };
  for (const Case& c : cases) {
    INFO(c.name);
    Diagnostics diags;
    CHECK_FALSE(load_proposal_text(c.text, "p.yaml", v, &diags));
    std::vector<std::string> got;
    for (const Diagnostic& d : diags.sorted()) got.push_back(d.str());
    CHECK(got == c.errors);
  }
  Diagnostics diags;
  std::optional<Proposal> p =
      load_proposal_text(std::string(kReadmission) + "plan: larkspur.plan.yaml\nmodel: readmit_risk\n",
                         "pipelines/readmit.proposal.yaml", v, &diags);
  REQUIRE(p);
  CHECK(p->plan == "pipelines/larkspur.plan.yaml");
  CHECK(p->model == "readmit_risk");
}
