// Entries checked against their primary publications. The rows live in
// publication_checks_{a,b,c}.inc; each row's comment names the publication
// and says which facts were checked and which are from memory.
#include <catch2/catch.hpp>

#include "catalog_fixture.h"

using namespace readyby;

namespace {

struct PublicationCheck {
  const char* id;
  int year;
  const char* journal;
  std::vector<const char*> elements;   // input elements in catalogue order
  int min;                             // score_range; -1, -1: no range
  int max;
};

const std::vector<PublicationCheck> kChecks = {
#include "publication_checks_a.inc"
#include "publication_checks_b.inc"
#include "publication_checks_c.inc"
};

}  // namespace

TEST_CASE("well-known entries match their primary publications") {
  const testing::Shipped& s = testing::shipped();
  REQUIRE(s.errors.empty());
  CHECK(kChecks.size() >= 20);
  for (const PublicationCheck& c : kChecks) {
    INFO(c.id);
    const Entry* e = s.catalog.find(c.id);
    REQUIRE(e != nullptr);
    REQUIRE(e->publication);
    CHECK(e->publication->year == c.year);
    CHECK(e->publication->journal == c.journal);
    std::vector<std::string> elements;
    for (const EntryInput& in : e->inputs) elements.push_back(in.element);
    CHECK(elements == std::vector<std::string>(c.elements.begin(), c.elements.end()));
    if (c.min == -1 && c.max == -1) {
      CHECK_FALSE(e->score_range);
    } else {
      REQUIRE(e->score_range);
      CHECK(e->score_range->first == c.min);
      CHECK(e->score_range->second == c.max);
    }
  }
}
