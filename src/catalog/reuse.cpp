#include "catalog/reuse.h"

#include <algorithm>
#include <cctype>
#include <cmath>
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
    "stay"};
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

// The words of a condition that name something clinical. An exclusion clause
// ("..., excluding obstetric stays") does not restrict the population to a
// condition, so its words are left out.
std::set<std::string> specific_words(const std::string& condition) {
  std::set<std::string> out;
  for (const std::string& w : words_of(condition)) {
    if (w == "excluding" || w == "except" || w == "without") break;
    bool digits = std::all_of(w.begin(), w.end(), [](unsigned char c) { return std::isdigit(c); });
    if (w.size() >= 3 && !digits && !kGeneralWords.count(w) && !kChildWords.count(w)) out.insert(w);
  }
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
      return {"outcome", "narrower", "the score predicts " + theirs + detail + ", a kind of " + quoted_outcome(v, proposed), 2};
    case ConceptRelation::broader:
      return {"outcome", "broader", "the score predicts " + theirs + detail + ", broader than " + quoted_outcome(v, proposed), 1};
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
  return {"outcome", "differs", "the score predicts " + theirs, 0};
}

Criterion judge_setting(const Proposal& p, const Entry& e, const Vocabulary& v) {
  auto labels = [&](const std::vector<std::string>& ids) {
    std::string out;
    for (const std::string& id : ids) out += (out.empty() ? "" : ", ") + label_of(v.settings, id);
    return out;
  };
  if (p.settings.empty()) return {"setting", "any", "the proposal names no setting; the score is used in: " + labels(e.settings), 2};
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

Criterion judge_population(const Proposal& p, const Entry& e) {
  AgeRange theirs = age_range(e.age_min, e.age_max, e.condition);
  AgeRange ours = age_range(p.age_min, p.age_max, p.condition);
  long our_lo = ours.min.value_or(0), our_hi = ours.max.value_or(kOldest);
  long their_lo = theirs.min.value_or(0), their_hi = theirs.max.value_or(kOldest);
  int age_level;
  std::string age;
  if (!theirs.known()) {
    age_level = 1;
    age = "the score states no age range";
  } else if (our_hi < their_lo || their_hi < our_lo) {
    age_level = 0;
    age = "the score is for ages " + theirs.str() + ", the proposal for " + ours.str();
  } else if (their_lo <= our_lo && our_hi <= their_hi) {
    age_level = 2;
    age = "ages " + ours.str() + " lie within the score's " + theirs.str();
  } else {
    age_level = 1;
    age = "the score covers ages " + theirs.str() + ", only part of the proposal's " + ours.str();
  }
  std::set<std::string> their_words = specific_words(e.condition);
  std::set<std::string> our_words = specific_words(p.condition);
  int condition_level;
  std::string condition;
  if (their_words.empty()) {
    condition_level = 2;
    condition = e.condition.empty() ? "no condition restricts the score"
                                    : "the score's population is general (" + e.condition + ")";
  } else if (our_words.empty()) {
    condition_level = 1;
    condition = "the score was developed for " + e.condition + " only";
  } else {
    std::vector<std::string> shared;
    std::set_intersection(our_words.begin(), our_words.end(), their_words.begin(), their_words.end(),
                          std::back_inserter(shared));
    condition_level = shared.empty() ? 0 : 2;
    condition = (shared.empty() ? "condition differs: the score is for " : "condition matches: the score is for ") +
                e.condition;
  }
  int level = std::min(age_level, condition_level);
  const char* result = level == 2 ? "matches" : level == 1 ? "partly" : "excludes";
  return {"population", result, age + "; " + condition, level};
}

Criterion judge_time_point(const Proposal& p, const Entry& e, const Vocabulary& v) {
  std::string theirs = label_of(v.time_points, e.time_point);
  if (p.time_point.empty()) return {"time_point", "any", "the proposal names no time point; the score is made at: " + theirs, 2};
  if (p.time_point == e.time_point) return {"time_point", "same", "both predict at: " + theirs, 2};
  return {"time_point", "differs",
          "the score is made at: " + theirs + "; the proposal at: " + label_of(v.time_points, p.time_point), 1};
}

// Also returns the ratio of the durations (1 = equal; large = far apart).
Criterion judge_horizon(const Proposal& p, const Entry& e, double* ratio) {
  *ratio = 1;
  if (!p.horizon) {
    return {"horizon", "any", "the proposal states no horizon" + (e.horizon ? "; the score's is " + e.horizon->str() : std::string()), 2};
  }
  std::string ours = p.horizon->str();
  if (!e.horizon) {
    *ratio = 8;
    return {"horizon", "differs", "the score states no horizon; the proposal's is " + ours, 1};
  }
  std::string theirs = e.horizon->str();
  if (p.horizon->in_hospital || e.horizon->in_hospital) {
    if (p.horizon->in_hospital && e.horizon->in_hospital) return {"horizon", "same", "both in-hospital", 2};
    *ratio = 4;
    return {"horizon", "differs", "not comparable: the score's horizon is " + theirs + ", the proposal's " + ours, 1};
  }
  double a = static_cast<double>(std::max<int64_t>(1, p.horizon->duration.seconds));
  double b = static_cast<double>(std::max<int64_t>(1, e.horizon->duration.seconds));
  *ratio = std::max(a, b) / std::min(a, b);
  char factor[32];
  std::snprintf(factor, sizeof factor, "%.1f", *ratio);
  if (*ratio == 1) return {"horizon", "same", "both " + ours, 2};
  std::string detail = "the score's horizon is " + theirs + ", the proposal's " + ours + " (a factor " + factor + ")";
  if (*ratio <= 1.5) return {"horizon", "close", detail, 2};
  if (*ratio <= 4) return {"horizon", "differs", detail, 1};
  return {"horizon", "far", detail, 0};
}

struct Judged {
  Candidate candidate;
  ConceptRelation relation;
  int total = 0;
  double horizon_ratio = 1;
};

std::string list_ids(const std::vector<Candidate>& cs, Coverage level, size_t* count) {
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

}  // namespace

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

ReuseReport match_proposal(const Proposal& proposal, const OutcomeResolution& resolution,
                           const Vocabulary& vocabulary, const std::vector<Entry>& entries,
                           std::optional<size_t> searched) {
  ReuseReport report;
  report.resolution = resolution;
  report.searched = searched.value_or(entries.size());
  std::vector<Judged> judged;
  for (const Entry& e : entries) {
    Judged j;
    Criterion outcome = judge_outcome(resolution.concepts, e, vocabulary, &j.relation);
    if (j.relation == ConceptRelation::unrelated) continue;
    j.candidate.entry = &e;
    j.candidate.in_house = e.local();
    j.candidate.criteria = {outcome, judge_setting(proposal, e, vocabulary), judge_population(proposal, e),
                            judge_time_point(proposal, e, vocabulary), judge_horizon(proposal, e, &j.horizon_ratio)};
    bool all_met = true;
    for (const Criterion& c : j.candidate.criteria) {
      all_met = all_met && c.level == 2;
      j.total += c.level;
    }
    const std::vector<Criterion>& cs = j.candidate.criteria;
    j.candidate.coverage = all_met                               ? Coverage::covers
                           : cs[0].level >= 1 && cs[2].level >= 1 ? Coverage::partly
                                                                  : Coverage::related;
    judged.push_back(std::move(j));
  }
  std::sort(judged.begin(), judged.end(), [](const Judged& a, const Judged& b) {
    auto key = [](const Judged& j) {
      return std::make_tuple(static_cast<int>(j.candidate.coverage), !j.candidate.in_house, static_cast<int>(j.relation),
                             -j.total, j.horizon_ratio);
    };
    auto ka = key(a), kb = key(b);
    if (ka != kb) return ka < kb;
    return a.candidate.entry->id < b.candidate.entry->id;
  });
  for (size_t i = 0; i < judged.size(); ++i) {
    judged[i].candidate.rank = static_cast<int>(i) + 1;
    report.candidates.push_back(std::move(judged[i].candidate));
  }
  for (const Candidate& c : report.candidates) {
    if (c.in_house && c.coverage == Coverage::covers) report.in_house.push_back(c.entry->id);
  }
  size_t covers = 0, partly = 0;
  std::string covering = list_ids(report.candidates, Coverage::covers, &covers);
  std::string partial = list_ids(report.candidates, Coverage::partly, &partly);
  if (covers > 0) {
    report.recommendation = Recommendation::reuse;
    report.summary = "reuse: " + std::to_string(covers) + (covers == 1 ? " entry covers" : " entries cover") +
                     " this proposal (" + covering + ")";
    if (!report.in_house.empty()) report.summary += "; already built in-house: " + report.in_house.front();
  } else if (partly > 0) {
    report.recommendation = Recommendation::adapt;
    report.summary = "adapt: no entry covers this proposal fully; " + std::to_string(partly) +
                     (partly == 1 ? " partly covers it" : " partly cover it") + " (" + partial + ")";
  } else {
    report.recommendation = Recommendation::build;
    report.summary = "build: no established score found; searched " + std::to_string(report.searched) +
                     (report.searched == 1 ? " entry" : " entries");
    if (!report.candidates.empty()) report.summary += " (" + std::to_string(report.candidates.size()) + " only related)";
    if (resolution.concepts.empty()) report.summary += "; the outcome matched no concept of the vocabulary";
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
