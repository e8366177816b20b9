#include <catch2/catch.hpp>

#include "catalog/outcome_resolver.h"
#include "catalog/proposal.h"
#include "catalog/reuse.h"
#include "report/reuse_writer.h"
#include "catalog_fixture.h"

using namespace readyby;

// The matching engine (catalog/reuse.h) on the shipped catalogue: verdicts
// criterion by criterion, coverage, ranking and the recommendation. Every
// entry is offered to the engine here; catalog retrieval is tested in
// retrieval_test.cpp.

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

const Vocabulary& vocabulary() { return testing::shipped().catalog.vocabulary; }

const OutcomeResolver& resolver() {
  static const OutcomeResolver kResolver(vocabulary());
  return kResolver;
}

Proposal proposal_of(const std::string& text) {
  Diagnostics diags;
  std::optional<Proposal> p = load_proposal_text(text, "p.yaml", vocabulary(), &diags);
  INFO(diags.render());
  REQUIRE(p);
  return *p;
}

ReuseReport reuse(const std::string& text, const std::vector<Entry>& entries = testing::shipped().catalog.entries) {
  return match_proposal(proposal_of(text), resolver(), vocabulary(), entries);
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

size_t rank_of(const ReuseReport& r, const std::string& id) {
  const Candidate* c = find(r, id);
  return c ? static_cast<size_t>(c->rank) : 0;
}

}  // namespace

TEST_CASE("a 30-day readmission proposal: LACE and the in-house model cover, HOSPITAL partly") {
  // The demo hospital's registry layered over the shipped catalogue.
  const std::vector<Entry>& demo = testing::with_demo_registry().catalog.entries;
  ReuseReport r = reuse(kReadmission, demo);
  CHECK(r.recommendation == Recommendation::reuse);
  CHECK(r.searched == demo.size());
  CHECK(r.resolution.concepts == std::vector<std::string>{"readmission-30d"});
  for (const char* id : {"lace-index", "hospital-score"}) {
    INFO(id);
    const Candidate* c = find(r, id);
    REQUIRE(c);
    CHECK(c->criteria.size() == 5);
  }
  CHECK(result_of(*find(r, "lace-index"), "outcome") == "same");
  CHECK(find(r, "lace-index")->coverage == Coverage::covers);
  // HOSPITAL predicts potentially avoidable readmission, a narrower outcome: partly.
  CHECK(result_of(*find(r, "hospital-score"), "outcome") == "narrower");
  CHECK(find(r, "hospital-score")->coverage == Coverage::partly);
  // The in-house model covers too, and is listed first.
  REQUIRE(!r.candidates.empty());
  CHECK(r.candidates[0].entry->id == "lvmc-readmit-30d");
  CHECK(r.candidates[0].in_house);
  CHECK(r.in_house == std::vector<std::string>{"lvmc-readmit-30d"});
  CHECK(r.summary.starts_with("reuse: 2 entries cover this proposal (LVMC 30-day readmission model, LACE index)"));
  CHECK(r.summary.ends_with("; validate the one chosen on local data before use; already built in-house: lvmc-readmit-30d"));
  // The shipped catalogue alone holds no in-house model.
  ReuseReport shipped = reuse(kReadmission);
  CHECK(shipped.in_house.empty());
  CHECK_FALSE(find(shipped, "lvmc-readmit-30d"));
}

TEST_CASE("a pneumonia 30-day mortality proposal in the ED finds the pneumonia severity scores") {
  ReuseReport r = reuse(kPneumonia);
  CHECK(r.recommendation == Recommendation::reuse);
  CHECK(r.condition.concepts == std::vector<std::string>{"community-acquired-pneumonia"});
  for (const char* id : {"curb-65", "psi-port"}) {
    INFO(id);
    const Candidate* c = find(r, id);
    REQUIRE(c);
    CHECK(c->coverage == Coverage::covers);
    CHECK(result_of(*c, "population") == "matches");
  }
  // A 30-day mortality score for another condition only relates.
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

TEST_CASE("an outcome the vocabulary does not know: build, saying exactly what was found") {
  ReuseReport r = reuse(replace(kReadmission, "unplanned readmission within 30 days", "unplanned return to theatre"));
  CHECK(r.recommendation == Recommendation::build);
  CHECK(r.candidates.empty());
  CHECK(r.resolution.unresolved == std::vector<std::string>{"unplanned", "return", "theatre"});
  CHECK(r.summary == "build: no catalogue entry matched, and the vocabulary did not recognise 'unplanned return to "
                     "theatre' — search the literature before building (searched " +
                         std::to_string(testing::shipped().catalog.entries.size()) + " entries)");
  CHECK(r.summary.find("justified") == std::string::npos);
  // A recognised outcome with nothing that covers says so, and still sends to the literature first.
  ReuseReport known = reuse(
      replace(kReadmission, "unplanned readmission within 30 days", "leaving the emergency department before being seen"));
  CHECK(known.recommendation == Recommendation::build);
  CHECK(known.summary.starts_with("build: no catalogue entry covers or partly covers this proposal (the outcome read "
                                  "as 'Leaving the emergency department before being seen'; searched "));
  CHECK(known.summary.ends_with("— search the literature for a published score before building"));
}

TEST_CASE("outcome relations: same, narrower, broader, overlapping, differs") {
  // Proposal broad (any death): a score for 30-day death is narrower, so it only partly covers.
  ReuseReport broad = reuse(replace(kPneumonia, "outcome: 30-day mortality", "outcome: death"));
  CHECK(broad.resolution.concepts == std::vector<std::string>{"mortality"});
  CHECK(result_of(*find(broad, "curb-65"), "outcome") == "narrower");
  CHECK(find(broad, "curb-65")->coverage == Coverage::partly);
  // Proposal narrow (ICU death): an in-hospital death score is broader: partly at best.
  ReuseReport narrow = reuse(replace(kPneumonia, "outcome: 30-day mortality", "outcome: icu mortality"));
  const Candidate* grace = find(narrow, "grace-in-hospital");
  REQUIRE(grace);
  CHECK(result_of(*grace, "outcome") == "broader");
  CHECK(grace->coverage != Coverage::covers);
  // Siblings (30-day vs in-hospital death) only relate.
  CHECK(result_of(*find(reuse(kPneumonia), "grace-in-hospital"), "outcome") == "differs");
  CHECK(find(reuse(kPneumonia), "grace-in-hospital")->coverage == Coverage::related);
  // Stroke and thromboembolism overlap in ischaemic stroke: CHA2DS2-VASc partly answers a stroke question.
  ReuseReport stroke = reuse(R"(proposal: af-stroke
outcome: stroke
horizon: P365D
settings: [specialty-clinic]
population: {condition: atrial fibrillation}
time_point: outpatient-visit
)");
  const Candidate* vasc = find(stroke, "cha2ds2-vasc");
  REQUIRE(vasc);
  CHECK(result_of(*vasc, "outcome") == "overlapping");
  CHECK(vasc->coverage == Coverage::partly);
  CHECK(vasc->criteria[0].detail.find("both include 'Ischaemic stroke'") != std::string::npos);
}

TEST_CASE("criteria the proposal leaves unstated never downgrade") {
  ReuseReport r = reuse("proposal: pe\noutcome: pulmonary embolism\n");
  for (const char* id : {"simplified-wells-pe", "revised-geneva"}) {
    INFO(id);
    const Candidate* c = find(r, id);
    REQUIRE(c);
    CHECK(c->coverage == Coverage::covers);
    CHECK(result_of(*c, "setting") == "not-stated");
    CHECK(result_of(*c, "population") == "not-stated");
    CHECK(result_of(*c, "time_point") == "not-stated");
    CHECK(result_of(*c, "horizon") == "not-stated");
  }
  CHECK(r.recommendation == Recommendation::reuse);
}

TEST_CASE("a score narrower than the proposal on a stated criterion partly covers") {
  struct Case {
    const char* name;
    std::string proposal;
    const char* id;
    const char* criterion;
    const char* result;
  };
  const std::vector<Case> cases = {
      // CURB-65 was developed for community-acquired pneumonia, a kind of pneumonia.
      {"narrower condition (by concept)", replace(kPneumonia, "condition: community-acquired pneumonia", "condition: pneumonia"),
       "curb-65", "population", "partly"},
      // The proposal names a general population; PESI is for acute pulmonary embolism only.
      {"general population stated", "proposal: x\noutcome: 30-day mortality\npopulation: {condition: adult inpatients}\n",
       "pesi", "population", "partly"},
      {"part of the ages", replace(kPneumonia, "age_min: 18", "age_min: 10"), "curb-65", "population", "partly"},
      {"some settings", replace(kPneumonia, "[emergency-department]", "[emergency-department, intensive-care]"),
       "curb-65", "setting", "some"},
  };
  for (const Case& c : cases) {
    INFO(c.name);
    ReuseReport r = reuse(c.proposal);
    const Candidate* cand = find(r, c.id);
    REQUIRE(cand);
    CHECK(result_of(*cand, c.criterion) == c.result);
    CHECK(cand->coverage == Coverage::partly);
  }
}

TEST_CASE("partial cover gives adapt, a criterion not met only relates; horizons compare by ratio") {
  std::string text = replace(replace(replace(kPneumonia, "[emergency-department]", "[emergency-department, intensive-care]"),
                                     "presentation", "daily"), "P30D", "P90D");
  ReuseReport r = reuse(text);
  const Candidate* curb = find(r, "curb-65");
  REQUIRE(curb);
  CHECK(curb->coverage == Coverage::partly);
  CHECK(result_of(*curb, "setting") == "some");
  CHECK(result_of(*curb, "time_point") == "differs");
  CHECK(result_of(*curb, "horizon") == "differs");
  CHECK(r.recommendation == Recommendation::adapt);
  // A setting where the score is not used at all is not met: the score only relates.
  ReuseReport icu = reuse(replace(kPneumonia, "[emergency-department]", "[intensive-care]"));
  CHECK(result_of(*find(icu, "curb-65"), "setting") == "none");
  CHECK(find(icu, "curb-65")->coverage == Coverage::related);
  CHECK(result_of(*find(reuse(replace(kPneumonia, "P30D", "P28D")), "curb-65"), "horizon") == "close");
  CHECK(result_of(*find(reuse(replace(kPneumonia, "P30D", "P365D")), "curb-65"), "horizon") == "far");
  CHECK(result_of(*find(reuse(replace(kPneumonia, "P30D", "in-hospital")), "curb-65"), "horizon") == "differs");
}

TEST_CASE("ranking: coverage, then evidence, then relevance; never the number of inputs") {
  // Adult ward deterioration: NEWS2 (checked against its publication) ranks above MEWS and NEWS (2012).
  ReuseReport ward = reuse(R"(proposal: ward
outcome: clinical deterioration
horizon: PT24H
settings: [ward]
population: {age_min: 18}
)");
  REQUIRE(find(ward, "news2"));
  REQUIRE(find(ward, "mews"));
  CHECK(find(ward, "news2")->coverage == Coverage::covers);
  CHECK(rank_of(ward, "news2") < rank_of(ward, "mews"));
  CHECK(rank_of(ward, "news2") < rank_of(ward, "news-2012"));

  // Two otherwise identical entries: the one with evidence wins whatever its number of inputs.
  Entry few = *testing::shipped().catalog.find("curb-65");
  few.id = "a-few-inputs";
  few.provenance = "from-memory";
  few.performance.clear();
  Entry many = few;
  many.id = "b-many-inputs";
  many.inputs.insert(many.inputs.end(), few.inputs.begin(), few.inputs.end());
  many.provenance = "checked";
  std::vector<Entry> both = {few, many};
  ReuseReport r = reuse(kPneumonia, both);
  REQUIRE(r.candidates.size() == 2);
  CHECK(r.candidates[0].entry->id == "b-many-inputs");
  // Equal evidence: a validation c-statistic first, then the higher one.
  both[1].provenance = "from-memory";
  both[0].performance = {{"c-statistic", 0.70, "validation"}};
  both[1].performance = {{"c-statistic", 0.80, "derivation"}};
  CHECK(reuse(kPneumonia, both).candidates[0].entry->id == "a-few-inputs");
  both[1].performance = {{"c-statistic", 0.80, "validation"}};
  CHECK(reuse(kPneumonia, both).candidates[0].entry->id == "b-many-inputs");
  // No evidence either way: relevance, then id.
  both[0].performance.clear();
  both[1].performance.clear();
  CHECK(reuse(kPneumonia, both).candidates[0].entry->id == "a-few-inputs");
}

TEST_CASE("evidence summarises provenance and published performance") {
  struct Case {
    const char* name;
    std::string provenance;
    std::vector<Performance> performance;
    const char* brief;
    const char* text;
  };
  const std::vector<Case> cases = {
      {"nothing", "from-memory", {}, "from memory",
       "from memory (not checked against its publication); no validation figure in the catalogue"},
      {"checked, derivation only", "checked", {{"c-statistic", 0.82, "derivation"}}, "checked, c 0.82",
       "checked against its publication; no validation figure in the catalogue; c-statistic 0.82 (derivation)"},
      {"validation preferred to a higher derivation figure", "checked",
       {{"c-statistic", 0.90, "derivation"}, {"c-statistic", 0.77, "validation"}, {"c-statistic", 0.79, "validation"}},
       "checked, validated, c 0.79", "checked against its publication; validated; c-statistic 0.79 (validation)"},
  };
  for (const Case& c : cases) {
    INFO(c.name);
    Entry e;
    e.provenance = c.provenance;
    e.performance = c.performance;
    Evidence ev = evidence_of(e);
    CHECK(ev.brief() == c.brief);
    CHECK(ev.str() == c.text);
  }
}

TEST_CASE("an in-house model that covers is listed first") {
  std::vector<Entry> entries = testing::shipped().catalog.entries;
  Entry mine = *testing::shipped().catalog.find("curb-65");
  mine.id = "lvmc-cap-mortality";
  mine.name = "LVMC pneumonia mortality model";
  mine.kind = "local";
  mine.publication.reset();
  mine.provenance = "from-memory";
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

TEST_CASE("retrieval signals bring in candidates whose outcome does not relate") {
  // qSOFA predicts in-hospital death, not sepsis; full-text retrieval finds it for a sepsis question.
  const char* sepsis = "proposal: s\noutcome: sepsis\nsettings: [emergency-department]\n";
  CHECK_FALSE(find(reuse(sepsis), "qsofa"));
  RetrievalSignals signals;
  signals.text["qsofa"] = 0.9;
  ReuseReport r = match_proposal(proposal_of(sepsis), resolver(), vocabulary(), testing::shipped().catalog.entries, signals);
  const Candidate* q = find(r, "qsofa");
  REQUIRE(q);
  CHECK(q->coverage == Coverage::related);
  CHECK(result_of(*q, "outcome") == "differs");
  signals.text["qsofa"] = kTextCandidate - 0.01;
  CHECK_FALSE(find(match_proposal(proposal_of(sepsis), resolver(), vocabulary(), testing::shipped().catalog.entries,
                                  signals),
                   "qsofa"));
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
    CHECK(a.candidates[i].relevance >= 0);
    CHECK(a.candidates[i].relevance <= 1);
    if (i > 0) {
      CHECK(static_cast<int>(a.candidates[i - 1].coverage) <= static_cast<int>(a.candidates[i].coverage));
      tie = tie || a.candidates[i - 1].coverage == a.candidates[i].coverage;
    }
  }
  CHECK(tie);  // at least one pair with the same coverage, where the tie-breaking matters
}

TEST_CASE("the reports carry the keys, provenance, evidence and the cautions") {
  Proposal p = proposal_of(kReadmission);
  ReuseReport r = reuse(kReadmission, testing::with_demo_registry().catalog.entries);
  std::string json = reuse_json(p, r);
  for (const char* key : {"\"proposal\": \"readmit-30d\"", "\"concepts\": [\"readmission-30d\"]", "\"searched\": ",
                          "\"condition\": \"adult medical and surgical inpatients\"", "\"condition_concepts\": []",
                          "\"recommendation\": \"reuse\"", "\"candidates\": [", "\"id\": \"lace-index\"",
                          "\"kind\": \"points\"", "\"coverage\": \"covers\"", "\"rank\": 1", "\"relation\": \"same\"",
                          "\"relevance\": 0.", "\"provenance\": \"from-memory\"",
                          "\"evidence\": {\"checked\": false, \"validated\": ", "\"c_statistic\": ", "\"criteria\": [",
                          "\"name\": \"outcome\"", "\"result\": \"same\"", "\"detail\": ", "\"reference\": ",
                          "\"cautions\": [", "validated on local data", "gives no clinical advice"}) {
    INFO(key);
    CHECK(json.find(key) != std::string::npos);
  }
  std::string text = reuse_text(p, r, vocabulary());
  CHECK(text.find("recommendation: reuse") != std::string::npos);
  CHECK(text.find("already built in-house: LVMC 30-day readmission model") != std::string::npos);
  CHECK(text.find("  evidence    from memory (not checked against its publication)") != std::string::npos);
  CHECK(text.find("  relevance   0.") != std::string::npos);
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
