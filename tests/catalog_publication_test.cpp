// Entries checked against their primary publications. The rows live in
// publication_checks_{a,b,c}.inc; each row's comment names the publication
// and says which facts were checked and which are from memory.
#include <catch2/catch.hpp>

#include <cctype>

#include "catalog_fixture.h"

using namespace readyby;

namespace {

struct PublicationCheck {
  const char* id;
  int year;
  const char* journal;
  std::vector<const char*> elements;   // input elements in catalogue order
  int min;                             // score_range; -1, -1: no range
  int max;                             // kOpen: no fixed maximum (points per unit)
};

constexpr int kOpen = 1 << 30;

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
      CHECK(e->score_range->min == c.min);
      CHECK(e->score_range->max == (c.max == kOpen ? std::nullopt : std::optional<long>(c.max)));
    }
  }
}

// registries/SCHEMA.md: a `checked` entry carries, directly above its
// `provenance:` line, a comment that dates the check ("# checked YYYY-MM-DD")
// and names what was compared with which source ("against ...").
TEST_CASE("every checked entry carries a dated note of what was checked against which source") {
  const testing::Shipped& s = testing::shipped();
  size_t checked = 0;
  for (const RegistryFiles::EntryFile& f : s.files.entries) {
    const std::string& text = f.file.text;
    size_t at = text.find("\nprovenance: checked");
    if (at == std::string::npos) continue;
    ++checked;
    INFO(f.file.path);
    size_t line_start = text.rfind('\n', at - 1);
    std::string note = text.substr(line_start + 1, at - line_start - 1);
    bool dated = note.size() > 20 && note.starts_with("# checked ") && std::isdigit(static_cast<unsigned char>(note[10])) &&
                 note[14] == '-' && note[17] == '-';
    CHECK(dated);
    CHECK(note.find(" against ") != std::string::npos);
  }
  CHECK(checked >= 20);
}
