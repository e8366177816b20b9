#include "catalog/reuse.h"

#include <algorithm>
#include <cctype>
#include <cmath>
#include <cstdio>
#include <map>
#include <set>
#include <tuple>

namespace readyby {

namespace {

// Words that describe a care context or an age group rather than a clinical
// condition; a condition made only of these is a general population.
const std::set<std::string> kGeneralWords = {
    "adult",     "patient",    "inpatient", "outpatient", "people",     "person",   "individual", "hospital",
    "hospitalised", "hospitalized", "admitted", "admission", "discharged", "discharge", "alive",  "medical",
    "surgical",  "general",    "community", "ward",       "service",    "any",      "all",        "aged",
    "older",     "over",       "year",      "presenting", "care",       "acute",    "unselected", "emergency",
    "department", "child",     "children",  "paediatric", "pediatric",  "and",      "the",        "from",
    "with",      "who",        "their",     "into",       "for",        "under",    "than",       "attending",
    "stay",      "internal",   "medicine",  "acutely",    "ill",        "unwell",   "critically", "critical",
    "intensive", "unit",       "elective",  "undergoing", "having",     "seen",     "clinic",     "primary",
    "visit",    "new",       "first",      "after",      "before",   "during",     "within",     "preoperative",
    "perioperative", "operative", "postoperative"};
const std::set<std::string> kChildWords = {"child", "children", "paediatric", "pediatric", "infant", "neonate",
                                           "newborn", "toddler", "adolescent", "febrile-infant"};

constexpr long kOldest = 130;

// Lower-case words of `text`, plurals reduced (ies → y, trailing s dropped).
std::vector<std::string> words_of(const std::string& text) {
  std::vector<std::string> out;
  std::string w;
  auto flush = [&] {
    if (w.size() > 4 && w.ends_with("ies")) w = w.substr(0, w.size() - 3) + "y";
    else if (w.size() > 3 && w.back() == 's' && !w.ends_with("ss") && w != "children") w.pop_back();
    if (!w.empty()) out.push_back(w);
    w.clear();
  };
  for (char c : text) {
    if (std::isalnum(static_cast<unsigned char>(c))) w += static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
    else flush();
  }
  flush();
  return out;
}

struct AgeRange {
  std::optional<long> min, max;   // nullopt: not stated
  bool known() const { return min || max; }
  std::string str() const {
    if (min && max) return std::to_string(*min) + "-" + std::to_string(*max);
    if (min) return std::to_string(*min) + "+";
    if (max) return "up to " + std::to_string(*max);
    return "any age";
  }
};

// Stated ages, else what the condition implies ("adults": 18+; "children": under 18).
AgeRange age_range(std::optional<long> age_min, std::optional<long> age_max, const std::string& condition) {
  AgeRange r{age_min, age_max};
  std::vector<std::string> words = words_of(condition);
  auto has = [&](const std::set<std::string>& set) {
    return std::any_of(words.begin(), words.end(), [&](const std::string& w) { return set.count(w) > 0; });
  };
  if (!r.min && !r.max) {
    if (has({"adult"})) r.min = 18;
    else if (has(kChildWords)) r.max = 17;
  }
  return r;
}

std::string label_of(const std::vector<Term>& terms, const std::string& id) {
  for (const Term& t : terms) {
    if (t.id == id) return t.label;
  }
  return id;
}

std::string quoted_outcome(const Vocabulary& v, const std::string& id) {
  const Term* t = v.outcome(id);
  return "'" + (t ? t->label : id) + "'";
}

Criterion judge_outcome(const std::vector<std::string>& concepts, const Entry& e, const Vocabulary& v,
                        ConceptRelation* best) {
  *best = ConceptRelation::unrelated;
  std::string proposed;
  for (const std::string& c : concepts) {
    ConceptRelation r = v.relate(c, e.outcome);
    if (static_cast<int>(r) < static_cast<int>(*best)) {
      *best = r;
      proposed = c;
    }
  }
  std::string detail = e.outcome_detail.empty() ? "" : " (" + e.outcome_detail + ")";
  std::string theirs = quoted_outcome(v, e.outcome);
  switch (*best) {
    case ConceptRelation::same:
      return {"outcome", "same", "both predict " + theirs + detail, 2};
    case ConceptRelation::narrower:
      return {"outcome", "narrower",
              "the score predicts " + theirs + detail + ", a kind of " + quoted_outcome(v, proposed) +
                  ": it answers only part of the proposal's question",
              1};
    case ConceptRelation::broader:
      return {"outcome", "broader",
              "the score predicts " + theirs + detail + ", broader than " + quoted_outcome(v, proposed) +
                  ": its risk also counts other events",
              1};
    case ConceptRelation::overlapping:
      return {"outcome", "overlapping",
              "the score predicts " + theirs + detail + ", which overlaps " + quoted_outcome(v, proposed) +
                  " (both include " + quoted_outcome(v, v.shared_narrower(proposed, e.outcome)) + ")",
              1};
    case ConceptRelation::sibling: {
      const std::vector<std::string>& up_a = v.ancestors(proposed);
      std::string shared;
      for (const std::string& x : v.ancestors(e.outcome)) {
        if (std::binary_search(up_a.begin(), up_a.end(), x)) shared = x;
      }
      return {"outcome", "differs",
              "the score predicts " + theirs + detail + "; it shares only the broader concept " + quoted_outcome(v, shared) +
                  " with " + quoted_outcome(v, proposed),
              0};
    }
    case ConceptRelation::unrelated:
      break;
  }
  return {"outcome", "differs",
          "the score predicts " + theirs + detail +
              (concepts.empty() ? "; the proposal's outcome matched no concept" : ", unrelated to the proposal's outcome"),
          0};
}

Criterion judge_setting(const Proposal& p, const Entry& e, const Vocabulary& v) {
  auto labels = [&](const std::vector<std::string>& ids) {
    std::string out;
    for (const std::string& id : ids) out += (out.empty() ? "" : ", ") + label_of(v.settings, id);
    return out;
  };
  if (p.settings.empty()) {
    return {"setting", "not-stated", "the proposal names no setting; the score is used in: " + labels(e.settings), 2};
  }
  std::vector<std::string> shared, missing;
  for (const std::string& s : p.settings) {
    (std::find(e.settings.begin(), e.settings.end(), s) != e.settings.end() ? shared : missing).push_back(s);
  }
  if (missing.empty()) return {"setting", "all", "used in " + labels(shared), 2};
  if (!shared.empty()) {
    return {"setting", "some", "used in " + labels(shared) + " but not in " + labels(missing), 1};
  }
  return {"setting", "none", "the score is used in " + labels(e.settings) + ", not in " + labels(p.settings), 0};
}

struct Judgement {
  int level = 0;
  std::string result;
  std::string detail;
};

Judgement judge_age(const Proposal& p, const Entry& e) {
  AgeRange theirs = age_range(e.age_min, e.age_max, e.condition);
  AgeRange ours = age_range(p.age_min, p.age_max, p.condition);
  if (!ours.known()) {
    return {2, "not-stated", "the proposal states no ages" + (theirs.known() ? "; the score is for ages " + theirs.str() : "")};
  }
  if (!theirs.known()) return {2, "within", "the score states no age range (check its population)"};
  long our_lo = ours.min.value_or(0), our_hi = ours.max.value_or(kOldest);
  long their_lo = theirs.min.value_or(0), their_hi = theirs.max.value_or(kOldest);
  if (our_hi < their_lo || their_hi < our_lo) {
    return {0, "excludes", "the score is for ages " + theirs.str() + ", the proposal for " + ours.str()};
  }
  if (their_lo <= our_lo && our_hi <= their_hi) {
    return {2, "within", "ages " + ours.str() + " lie within the score's " + theirs.str()};
  }
  return {1, "partly", "the score covers ages " + theirs.str() + ", only part of the proposal's " + ours.str()};
}

// How an entry's condition relates to the proposal's: by concept when both
// name one, else by shared specific words.
// The concepts each distinct condition text names, resolved once per match.
class ConditionConcepts {
 public:
  explicit ConditionConcepts(const OutcomeResolver& resolver) : resolver_(resolver) {}
  const std::vector<std::string>& of(const std::string& condition) {
    auto it = cache_.find(condition);
    if (it == cache_.end()) {
      it = cache_.emplace(condition, resolver_.resolve(condition_before_exclusion(condition)).concepts).first;
    }
    return it->second;
  }

 private:
  const OutcomeResolver& resolver_;
  std::map<std::string, std::vector<std::string>> cache_;
};

Judgement judge_condition(const Proposal& p, const std::vector<std::string>& our_concepts, const Entry& e,
                          ConditionConcepts* concepts, const Vocabulary& v) {
  std::set<std::string> their_words = specific_condition_words(e.condition);
  if (p.condition.empty()) {
    return {2, "not-stated",
            "the proposal states no condition" +
                (their_words.empty() ? std::string() : "; the score was developed for " + e.condition)};
  }
  if (their_words.empty()) {
    return {2, "general",
            e.condition.empty() ? "no condition restricts the score"
                                : "the score's population is general (" + e.condition + ")"};
  }
  std::set<std::string> our_words = specific_condition_words(p.condition);
  if (our_words.empty()) {
    return {1, "narrower",
            "the score was developed for " + e.condition + " only, narrower than the proposal's " + p.condition};
  }
  ConceptRelation best = ConceptRelation::unrelated;
  const std::vector<std::string>& their_concepts = concepts->of(e.condition);
  for (const std::string& theirs : their_concepts) {
    for (const std::string& ours : our_concepts) {
      ConceptRelation r = v.relate(ours, theirs);
      if (static_cast<int>(r) < static_cast<int>(best)) best = r;
    }
  }
  if (best == ConceptRelation::same || best == ConceptRelation::broader) {
    return {2, "matches", "condition matches: the score is for " + e.condition};
  }
  if (best == ConceptRelation::narrower || best == ConceptRelation::overlapping) {
    return {1, "narrower",
            "the score was developed for " + e.condition + ", " +
                (best == ConceptRelation::narrower ? "narrower than" : "only partly the same as") +
                " the proposal's " + p.condition};
  }
  // Words decide only when a side names no concept: two different concepts
  // ("upper GI haemorrhage", "intracerebral haemorrhage") are different conditions.
  std::vector<std::string> shared;
  std::set_intersection(our_words.begin(), our_words.end(), their_words.begin(), their_words.end(),
                        std::back_inserter(shared));
  // By words: at least two thirds of the smaller side's words are shared
  // ("pulmonary" alone does not make COPD a pulmonary embolism).
  bool by_concept = !our_concepts.empty() && !their_concepts.empty();
  size_t smaller = std::min(our_words.size(), their_words.size());
  if (!by_concept && !shared.empty() && 3 * shared.size() >= 2 * smaller) {
    return {2, "matches", "condition matches: the score is for " + e.condition};
  }
  return {0, "differs", "condition differs: the score is for " + e.condition};
}

Criterion population_criterion(const Judgement& age, const Judgement& condition) {
  int level = std::min(age.level, condition.level);
  const char* result = level == 2 ? (age.result == "not-stated" && condition.result == "not-stated" ? "not-stated" : "matches")
                       : level == 1 ? "partly"
                                    : "excludes";
  return {"population", result, age.detail + "; " + condition.detail, level};
}

Criterion judge_time_point(const Proposal& p, const Entry& e, const Vocabulary& v) {
  std::string theirs = label_of(v.time_points, e.time_point);
  if (p.time_point.empty()) {
    return {"time_point", "not-stated", "the proposal names no time point; the score is made at: " + theirs, 2};
  }
  if (p.time_point == e.time_point) return {"time_point", "same", "both predict at: " + theirs, 2};
  return {"time_point", "differs",
          "the score is made at: " + theirs + "; the proposal at: " + label_of(v.time_points, p.time_point), 1};
}

Criterion judge_horizon(const Proposal& p, const Entry& e) {
  if (!p.horizon) {
    return {"horizon", "not-stated",
            "the proposal states no horizon" + (e.horizon ? "; the score's is " + e.horizon->str() : std::string()), 2};
  }
  std::string ours = p.horizon->str();
  if (!e.horizon) {
    return {"horizon", "unknown", "the catalogue states no horizon for the score (check its publication); the proposal's is " + ours, 2};
  }
  std::string theirs = e.horizon->str();
  if (p.horizon->in_hospital || e.horizon->in_hospital) {
    if (p.horizon->in_hospital && e.horizon->in_hospital) return {"horizon", "same", "both in-hospital", 2};
    return {"horizon", "differs", "not comparable: the score's horizon is " + theirs + ", the proposal's " + ours, 1};
  }
  double a = static_cast<double>(std::max<int64_t>(1, p.horizon->duration.seconds));
  double b = static_cast<double>(std::max<int64_t>(1, e.horizon->duration.seconds));
  double ratio = std::max(a, b) / std::min(a, b);
  char factor[32];
  std::snprintf(factor, sizeof factor, "%.1f", ratio);
  if (ratio == 1) return {"horizon", "same", "both " + ours, 2};
  std::string detail = "the score's horizon is " + theirs + ", the proposal's " + ours + " (a factor " + factor + ")";
  if (ratio <= 1.5) return {"horizon", "close", detail, 2};
  if (ratio <= 4) return {"horizon", "differs", detail, 1};
  return {"horizon", "far", detail, 0};
}

double outcome_weight(ConceptRelation r) {
  switch (r) {
    case ConceptRelation::same: return 1.0;
    case ConceptRelation::narrower: return 0.8;
    case ConceptRelation::broader: return 0.6;
    case ConceptRelation::overlapping: return 0.5;
    case ConceptRelation::sibling: return 0.2;
    case ConceptRelation::unrelated: return 0.0;
  }
  return 0.0;
}

// For entries that only relate: how specifically their population is the
// proposal's (matches 3, narrower 2, general or not stated 1, differs 0).
int condition_rank(const Judgement& condition) {
  if (condition.result == "matches") return 3;
  if (condition.result == "narrower") return 2;
  if (condition.result == "differs") return 0;
  return 1;
}

double condition_weight(const Proposal& p, const Judgement& condition) {
  if (p.condition.empty()) return 0.5;
  if (condition.result == "matches") return 1.0;
  if (condition.result == "general") return 0.6;
  if (condition.result == "narrower") return 0.5;
  return 0.0;
}

std::string name_list(const std::vector<Candidate>& cs, Coverage level, size_t* count) {
  std::string out;
  *count = 0;
  for (const Candidate& c : cs) {
    if (c.coverage != level) continue;
    ++*count;
    if (*count <= 4) out += (out.empty() ? "" : ", ") + c.entry->name;
  }
  if (*count > 4) out += ", ...";
  return out;
}

std::string build_summary(const Proposal& p, const ReuseReport& r, const Vocabulary& v) {
  std::string searched = "searched " + std::to_string(r.searched) + (r.searched == 1 ? " entry" : " entries");
  if (r.resolution.concepts.empty()) {
    return "build: no catalogue entry matched, and the vocabulary did not recognise '" + p.outcome + "'" +
           " — search the literature before building (" + searched + ")";
  }
  std::string concepts;
  for (const std::string& c : r.resolution.concepts) concepts += (concepts.empty() ? "" : ", ") + quoted_outcome(v, c);
  std::string related = r.candidates.empty() ? "" : "; " + std::to_string(r.candidates.size()) + " only related";
  return "build: no catalogue entry covers or partly covers this proposal (the outcome read as " + concepts + "; " +
         searched + related + ") — search the literature for a published score before building";
}

}  // namespace

std::string condition_before_exclusion(const std::string& condition) {
  size_t end = condition.size();
  for (const char* marker : {"excluding", "except", "without", "no", "not"}) {
    std::string m = marker;
    for (size_t at = condition.find(m); at != std::string::npos; at = condition.find(m, at + 1)) {
      bool starts = at == 0 || !std::isalnum(static_cast<unsigned char>(condition[at - 1]));
      bool ends = at + m.size() == condition.size() || !std::isalnum(static_cast<unsigned char>(condition[at + m.size()]));
      if (starts && ends) {
        end = std::min(end, at);
        break;
      }
    }
  }
  return condition.substr(0, end);
}

std::set<std::string> specific_condition_words(const std::string& condition) {
  std::set<std::string> out;
  for (const std::string& w : words_of(condition_before_exclusion(condition))) {
    bool digits = std::all_of(w.begin(), w.end(), [](unsigned char c) { return std::isdigit(c); });
    if (w.size() >= 3 && !digits && !kGeneralWords.count(w) && !kChildWords.count(w)) out.insert(w);
  }
  return out;
}

const char* to_string(Coverage c) {
  switch (c) {
    case Coverage::covers: return "covers";
    case Coverage::partly: return "partly";
    case Coverage::related: return "related";
  }
  return "?";
}

const char* to_string(Recommendation r) {
  switch (r) {
    case Recommendation::reuse: return "reuse";
    case Recommendation::adapt: return "adapt";
    case Recommendation::build: return "build";
  }
  return "?";
}

Evidence evidence_of(const Entry& e) {
  Evidence ev;
  ev.checked = e.provenance == "checked";
  std::optional<double> validation, derivation;
  for (const Performance& p : e.performance) {
    bool in_validation = p.cohort == "validation";
    ev.validated = ev.validated || in_validation;
    if (p.metric != "c-statistic") continue;
    std::optional<double>& best = in_validation ? validation : derivation;
    if (!best || p.value > *best) best = p.value;
  }
  if (validation || derivation) {
    ev.c_statistic = validation ? validation : derivation;
    ev.c_cohort = validation ? "validation" : "derivation";
  }
  return ev;
}

std::string Evidence::str() const {
  std::string out = checked ? "checked against its publication" : "from memory (not checked against its publication)";
  out += validated ? "; validated" : "; no validation figure in the catalogue";
  if (c_statistic) {
    char c[32];
    std::snprintf(c, sizeof c, "%.2f", *c_statistic);
    out += std::string("; c-statistic ") + c + " (" + c_cohort + ")";
  }
  return out;
}

std::string Evidence::brief() const {
  std::string out = checked ? "checked" : "from memory";
  if (validated) out += ", validated";
  if (c_statistic) {
    char c[32];
    std::snprintf(c, sizeof c, ", c %.2f", *c_statistic);
    out += c;
  }
  return out;
}

ReuseReport match_proposal(const Proposal& proposal, const OutcomeResolver& resolver, const Vocabulary& vocabulary,
                           const std::vector<Entry>& entries, const RetrievalSignals& signals,
                           std::optional<size_t> searched) {
  ReuseReport report;
  report.outcome = proposal.outcome;
  report.resolution = resolver.resolve(proposal.outcome);
  if (!proposal.condition.empty()) report.condition = resolver.resolve(condition_before_exclusion(proposal.condition));
  report.searched = searched.value_or(entries.size());
  ConditionConcepts condition_concepts(resolver);
  for (const Entry& e : entries) {
    Candidate c;
    Criterion outcome = judge_outcome(report.resolution.concepts, e, vocabulary, &c.relation);
    auto text = signals.text.find(e.id);
    double text_coverage = text == signals.text.end() ? 0.0 : text->second;
    bool candidate = c.relation != ConceptRelation::unrelated || signals.condition_hits.count(e.id) > 0 ||
                     text_coverage >= kTextCandidate;
    if (!candidate) continue;
    c.entry = &e;
    c.in_house = e.local();
    Judgement age = judge_age(proposal, e);
    Judgement condition = judge_condition(proposal, report.condition.concepts, e, &condition_concepts, vocabulary);
    c.criteria = {outcome, judge_setting(proposal, e, vocabulary), population_criterion(age, condition),
                  judge_time_point(proposal, e, vocabulary), judge_horizon(proposal, e)};
    int total = 0;
    bool all_met = true;
    for (const Criterion& cr : c.criteria) {
      all_met = all_met && cr.level == 2;
      total += cr.level;
    }
    bool none_failed = std::all_of(c.criteria.begin(), c.criteria.end(), [](const Criterion& cr) { return cr.level >= 1; });
    c.coverage = all_met ? Coverage::covers : none_failed ? Coverage::partly : Coverage::related;
    c.relevance = 0.35 * outcome_weight(c.relation) + 0.3 * condition_weight(proposal, condition) +
                  0.15 * text_coverage + 0.2 * (total / 10.0);
    c.evidence = evidence_of(e);
    c.condition_rank = std::min(age.level, 1) * condition_rank(condition);
    report.candidates.push_back(std::move(c));
  }
  std::sort(report.candidates.begin(), report.candidates.end(), [](const Candidate& a, const Candidate& b) {
    // Evidence orders what can be reused; entries that only relate are
    // ordered by how well their population matches, then relevance.
    auto key = [](const Candidate& c) {
      bool usable = c.coverage != Coverage::related;
      return std::make_tuple(static_cast<int>(c.coverage), !c.in_house, usable && !c.evidence.checked,
                             usable && !c.evidence.validated, usable ? -c.evidence.c_statistic.value_or(-1.0) : 0.0,
                             usable ? 0 : -c.condition_rank, -c.relevance);
    };
    auto ka = key(a), kb = key(b);
    if (ka != kb) return ka < kb;
    // A newer publication first (a newer version usually supersedes an older one), then id.
    int year_a = a.entry->publication ? a.entry->publication->year : 0;
    int year_b = b.entry->publication ? b.entry->publication->year : 0;
    if (year_a != year_b) return year_a > year_b;
    return a.entry->id < b.entry->id;
  });
  for (size_t i = 0; i < report.candidates.size(); ++i) {
    Candidate& c = report.candidates[i];
    c.rank = static_cast<int>(i) + 1;
    if (c.in_house && c.coverage == Coverage::covers) report.in_house.push_back(c.entry->id);
  }
  size_t covers = 0, partly = 0;
  std::string covering = name_list(report.candidates, Coverage::covers, &covers);
  std::string partial = name_list(report.candidates, Coverage::partly, &partly);
  if (covers > 0) {
    report.recommendation = Recommendation::reuse;
    report.summary = "reuse: " + std::to_string(covers) + (covers == 1 ? " entry covers" : " entries cover") +
                     " this proposal (" + covering + "); validate the one chosen on local data before use";
    if (!report.in_house.empty()) report.summary += "; already built in-house: " + report.in_house.front();
  } else if (partly > 0) {
    report.recommendation = Recommendation::adapt;
    report.summary = "adapt: no entry covers this proposal fully; " + std::to_string(partly) +
                     (partly == 1 ? " partly covers it" : " partly cover it") + " (" + partial + ")";
  } else {
    report.recommendation = Recommendation::build;
    report.summary = build_summary(proposal, report, vocabulary);
  }
  return report;
}

const std::vector<std::string>& catalogue_cautions() {
  static const std::vector<std::string> kCautions = {
      "Catalogue entries summarise published literature and may be incomplete or out of date; check the primary "
      "publication before relying on an entry.",
      "An established score must be validated on local data before use.",
      "Decisions about clinical use belong to the organisation's model governance and licensed clinicians; readyby "
      "gives no clinical advice.",
  };
  return kCautions;
}

}  // namespace readyby
