#include <catch2/catch.hpp>

#include "catalog/outcome_resolver.h"
#include "catalog_fixture.h"

using namespace readyby;

TEST_CASE("outcome text resolves through labels and synonyms") {
  const Vocabulary& v = testing::shipped().catalog.vocabulary;
  OutcomeResolver resolver(v);
  struct Case {
    const char* text;
    std::vector<std::string> concepts;
    std::vector<std::string> unresolved;
  };
  const std::vector<Case> cases = {
      // the label of readmission-30d, longer than the synonym "readmission" inside it
      {"unplanned readmission within 30 days", {"readmission-30d"}, {}},
      {"Unplanned Readmission Within 30 Days", {"readmission-30d"}, {}},
      {"30 day readmissions", {"readmission-30d"}, {}},                  // plural, hyphen/space
      {"30-day mortality", {"30-day-mortality"}, {}},
      {"deaths in hospital", {"in-hospital-mortality"}, {}},             // plural of "death in hospital"
      {"major bleeds", {"major-bleeding"}, {}},                          // synonym "major bleed", plural
      {"readmission-30d", {"readmission-30d"}, {}},                      // a concept id resolves as itself
      {"rehospitalizations", {"unplanned-readmission"}, {}},             // synonym, plural
      {"readmission or death", {"unplanned-readmission", "mortality"}, {}},
      {"frobnication of the widget", {}, {"frobnication", "widget"}},
      {"unplanned return to theatre after day-case surgery", {}, {"unplanned", "return", "theatre", "day-case", "surgery"}},
      {"deathly", {}, {"deathly"}},                                      // word boundaries: no partial words
  };
  for (const Case& c : cases) {
    INFO(c.text);
    OutcomeResolution r = resolver.resolve(c.text);
    CHECK(r.concepts == c.concepts);
    CHECK(r.unresolved == c.unresolved);
  }
}

TEST_CASE("plural forms: s, es, y to ies") {
  Vocabulary v;
  v.outcomes = {{"injury", "Injury", {"fall injury"}, {}, "", {}},
                {"abscess", "Abscess", {}, {}, "", {}},
                {"delay", "Delay", {}, {}, "", {}}};
  v.reindex();
  OutcomeResolver resolver(v);
  struct Case {
    const char* text;
    std::vector<std::string> concepts;
  };
  const std::vector<Case> cases = {
      {"injuries", {"injury"}},   {"fall injuries", {"injury"}}, {"abscesses", {"abscess"}},
      {"delays", {"delay"}},      {"injurys", {}},               {"abscesss", {}},
  };
  for (const Case& c : cases) {
    INFO(c.text);
    CHECK(resolver.resolve(c.text).concepts == c.concepts);
  }
  CHECK(phrase_pattern("fall injury") == " (fall(?:s|es)? +injur(?:y|ies)) ");
}

TEST_CASE("the longest match wins and positions are kept") {
  const Vocabulary& v = testing::shipped().catalog.vocabulary;
  OutcomeResolution r = OutcomeResolver(v).resolve("risk of in-hospital death");
  REQUIRE(r.matches.size() == 1);
  CHECK(r.matches[0].concept_id == "in-hospital-mortality");
  CHECK(r.matches[0].offset == 8);
  CHECK(r.matches[0].length == 17);
}
