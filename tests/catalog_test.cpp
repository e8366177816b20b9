#include <catch2/catch.hpp>

#include <filesystem>
#include <fstream>

#include "catalog/catalog.h"
#include "catalog_fixture.h"

using namespace readyby;

namespace {

const char kVocabulary[] = R"(outcomes:
  - id: ischaemic-stroke
    label: Ischaemic stroke
settings:
  - id: specialty-clinic
    label: Clinic
  - id: primary-care
    label: Primary care
time_points:
  - id: outpatient-visit
    label: Clinic visit
elements:
  - id: dx.heart_failure
    label: Heart failure
    kind: diagnosis
    structured: true
  - id: demo.age
    label: Age
    kind: demographic
    structured: true
)";

const char kEntry[] = R"(id: demo-score
name: Demo score
kind: points
summary: A two-item example.
outcome:
  concept: ischaemic-stroke
  detail: stroke
horizon: P365D
population:
  age_min: 18
  age_max: 120
  condition: atrial fibrillation
settings: [specialty-clinic, primary-care]
time_point: outpatient-visit
inputs:
  - element: dx.heart_failure
    label: Heart failure
    points: 1
  - element: demo.age
    label: Age 75 or over
    points: 2
    when: ">= 75 years"
    recency: P30D
score_range: {min: 0, max: 3}
publication:
  authors: Example A
  year: 2010
  title: An example
  journal: Example Journal
provenance: from-memory
)";

// kEntry with lines first..last (1-based) replaced by `replacement`.
std::string with_lines(int first, int last, const std::string& replacement) {
  std::string text = kEntry;
  size_t start = 0;
  for (int i = 1; i < first; ++i) start = text.find('\n', start) + 1;
  size_t end = start;
  for (int i = first; i <= last; ++i) end = text.find('\n', end) + 1;
  return text.substr(0, start) + replacement + "\n" + text.substr(end);
}

std::string with_line(int line, const std::string& replacement) { return with_lines(line, line, replacement); }

RegistryFiles files_with(const std::string& entry_text, const std::string& path = "scores/demo-score.yaml",
                         const std::string& folder = "scores") {
  RegistryFiles files;
  files.vocabulary.push_back({"vocabulary/v.yaml", kVocabulary});
  files.entries.push_back({{path, entry_text}, 0, folder});
  return files;
}

std::vector<std::string> errors_of(const RegistryFiles& files) {
  Catalog catalog;
  Diagnostics diags;
  load_catalog(files, &catalog, &diags);
  std::vector<std::string> out;
  for (const Diagnostic& d : diags.sorted()) out.push_back(d.str());
  return out;
}

}  // namespace

TEST_CASE("every shipped entry validates and uses only defined terms") {
  const testing::Shipped& s = testing::shipped();
  INFO(s.errors);
  REQUIRE(s.errors.empty());
  const Catalog& c = s.catalog;
  size_t published = 0, local = 0;
  for (const Entry& e : c.entries) {
    INFO(e.path);
    (e.local() ? local : published) += 1;
    CHECK(c.vocabulary.outcome(e.outcome));
    CHECK(c.vocabulary.time_point(e.time_point));
    CHECK(!e.settings.empty());
    for (const std::string& setting : e.settings) CHECK(c.vocabulary.setting(setting));
    CHECK(!e.inputs.empty());
    for (const EntryInput& in : e.inputs) CHECK(c.vocabulary.element(in.element));
    CHECK(e.local() != e.publication.has_value());
    CHECK((e.provenance == "from-memory" || e.provenance == "checked"));
  }
  CHECK(published >= 120);
  CHECK(local == 0);   // the shipped catalogue holds published scores only
}

TEST_CASE("the demo hospital's in-house models live in the demo's own registry") {
  const testing::Shipped& s = testing::with_demo_registry();
  INFO(s.errors);
  REQUIRE(s.errors.empty());
  std::vector<std::string> local;
  for (const Entry& e : s.catalog.entries) {
    if (!e.local()) continue;
    local.push_back(e.id);
    CHECK(e.layer == 1);
    CHECK(e.summary.find("fictional") != std::string::npos);
  }
  CHECK(local == std::vector<std::string>{"lvmc-no-show", "lvmc-readmit-30d", "lvmc-ward-deterioration"});
  CHECK(s.catalog.entries.size() == testing::shipped().catalog.entries.size() + 3);
}

TEST_CASE("an entry loads into a plain struct") {
  Catalog catalog;
  Diagnostics diags;
  REQUIRE(load_catalog(files_with(kEntry), &catalog, &diags));
  REQUIRE(catalog.entries.size() == 1);
  const Entry& e = catalog.entries[0];
  CHECK(e.id == "demo-score");
  CHECK(e.kind == "points");
  CHECK(e.outcome == "ischaemic-stroke");
  CHECK(e.horizon->str() == "P365D");
  CHECK(*e.age_min == 18);
  CHECK(*e.age_max == 120);
  CHECK(e.settings == std::vector<std::string>{"specialty-clinic", "primary-care"});
  REQUIRE(e.inputs.size() == 2);
  CHECK(*e.inputs[1].points == 2);
  CHECK(e.inputs[1].when == ">= 75 years");
  CHECK(e.inputs[1].recency->seconds == 30 * 86400);
  CHECK(*e.score_range == ScoreRange{0, 3});
  CHECK(e.score_range->str() == "0 to 3");
  CHECK(e.publication->year == 2010);
  CHECK(e.reference() == "Example A. An example. Example Journal 2010.");
  CHECK(catalog.find("demo-score") == &e);
  CHECK(catalog.find("other") == nullptr);
}

TEST_CASE("bad catalogue entries get exact messages and positions") {
  const std::string p = "scores/demo-score.yaml";
  struct Case {
    const char* name;
    std::string text;
    std::vector<std::string> errors;
  };
  const std::vector<Case> cases = {
      {"unknown concept", with_line(6, "  concept: ischemic-stroke"),
       {p + ":6:12: error: unknown outcome concept 'ischemic-stroke' (did you mean 'ischaemic-stroke'?)"}},
      {"unknown setting", with_line(13, "settings: [specialty-clinic, primary_care]"),
       {p + ":13:30: error: unknown setting 'primary_care' (did you mean 'primary-care'?)"}},
      {"unknown time point", with_line(14, "time_point: outpatient"),
       {p + ":14:13: error: unknown time point 'outpatient'"}},
      {"unknown element", with_line(16, "  - element: dx.heart_failur"),
       {p + ":16:14: error: unknown element 'dx.heart_failur' (did you mean 'dx.heart_failure'?)"}},
      {"id differs from the file name", with_line(1, "id: demo"),
       {p + ":1:5: error: id 'demo' does not match the file name 'demo-score.yaml' (expected id 'demo-score')"}},
      {"bad horizon", with_line(8, "horizon: P1Y"),
       {p + ":8:12: error: bad horizon 'P1Y' of entry 'demo-score': years (Y) and months (M) are not allowed in a "
            "duration: their length varies; use days (D) or weeks (W) (use an ISO 8601 duration such as P30D, or "
            "in-hospital)"}},
      {"horizon as a number", with_line(8, "horizon: 30"),
       {p + ":8:10: error: 'horizon' of entry 'demo-score' must be an ISO 8601 duration such as P30D, or in-hospital, "
            "found the number 30"}},
      {"in-hospital horizon is fine", with_line(8, "horizon: in-hospital"), {}},
      {"no horizon is fine", with_line(8, "# no horizon"), {}},
      {"inverted ages", with_lines(10, 11, "  age_min: 80\n  age_max: 18"),
       {p + ":10:12: error: age_min 80 of entry 'demo-score' is greater than age_max 18"}},
      {"inverted score range", with_line(24, "score_range: {min: 3, max: 0}"),
       {p + ":24:20: error: score_range of entry 'demo-score' is inverted: min 3 is greater than max 0"}},
      {"no score range is fine", with_line(24, "# no range"), {}},
      {"points per unit, open maximum", with_lines(22, 24, "    per: {amount: 5, unit: years}\n    recency: P30D\nscore_range: {min: 0}"), {}},
      {"open maximum needs points per unit", with_line(24, "score_range: {min: 0}"),
       {p + ":24:14: error: missing required key 'max' in the score_range of entry 'demo-score' (only a score with "
            "points per unit, 'per', may leave its maximum open)"}},
      {"per amount must be positive", with_line(22, "    per: {amount: 0, unit: years}"),
       {p + ":22:19: error: 'amount' of 'per' of input 2 of entry 'demo-score' must be greater than 0"}},
      {"per needs points", with_lines(21, 22, "    per: {amount: 5, unit: years}"),
       {p + ":19:5: error: missing required key 'points' in input 2 of entry 'demo-score' (a points score gives each "
            "item its points)",
        p + ":21:5: error: 'per' in input 2 of entry 'demo-score' needs 'points' (the points for every amount)"}},
      {"per is a map", with_line(22, "    per: year"),
       {p + ":22:10: error: 'per' of input 2 of entry 'demo-score' must be a map such as {amount: 1, unit: year}, "
            "found the text 'year'"}},
      {"missing publication", with_lines(25, 29, "# no publication"),
       {p + ":1:1: error: missing publication for entry 'demo-score': a published score needs its primary "
            "publication (authors, year, title, journal)"}},
      {"incomplete publication", with_line(29, "  jounal: Example Journal"),
       {p + ":25:1: error: missing required key 'journal' in the publication of entry 'demo-score'",
        p + ":29:3: error: unknown key 'jounal' in the publication of entry 'demo-score' (did you mean 'journal'?)"}},
      {"not a DOI", with_line(29, "  journal: Example Journal\n  doi: doi.org/10.1/x"),
       {p + ":30:8: error: 'doi.org/10.1/x' is not a DOI (expected 10.NNNN/...; leave 'doi' out when unsure)"}},
      {"missing required keys", with_lines(2, 4, "# no name, kind or summary"),
       {p + ":1:1: error: missing required key 'name' in an entry", p + ":1:1: error: missing required key 'kind' in an entry",
        p + ":1:1: error: missing required key 'summary' in an entry"}},
      {"bad kind", with_line(3, "kind: score"),
       {p + ":3:7: error: 'kind' of entry 'demo-score' must be one of points, equation, rule, found 'score'"}},
      {"points missing on a points score", with_line(18, "    # no points"),
       {p + ":16:5: error: missing required key 'points' in input 1 of entry 'demo-score' (a points score gives each "
            "item its points)"}},
      {"bad recency", with_line(23, "    recency: 30 days"),
       {p + ":23:14: error: bad duration '30 days' for 'recency' of input 2 of entry 'demo-score': a duration must "
            "start with 'P' (ISO 8601), e.g. PT30M or P1D"}},
      {"unknown key", with_line(30, "provenance: from-memory\nsource: memory"),
       {p + ":31:1: error: unknown key 'source' in an entry"}},
      {"bad provenance", with_line(30, "provenance: from-memroy"),
       {p + ":30:13: error: 'provenance' of entry 'demo-score' must be one of from-memory, checked, found "
            "'from-memroy' (did you mean 'from-memory'?)"}},
      {"local-only key on a published score", with_line(30, "provenance: from-memory\nstatus: live"),
       {p + ":31:1: error: 'status' applies only to local models (kind: local)"}},
  };
  for (const Case& c : cases) {
    INFO(c.name);
    CHECK(errors_of(files_with(c.text)) == c.errors);
  }
}

TEST_CASE("points per unit load and print") {
  Catalog catalog;
  Diagnostics diags;
  REQUIRE(load_catalog(files_with(with_lines(22, 24, "    per: {amount: 5, unit: year}\nscore_range: {min: 0}")), &catalog,
                       &diags));
  const Entry& e = catalog.entries[0];
  REQUIRE(e.inputs[1].per);
  CHECK(e.inputs[1].per->amount == 5);
  CHECK(e.inputs[1].per->str() == "per 5 years");
  CHECK(PointsPer{1, "NIHSS point"}.str() == "per NIHSS point");
  CHECK_FALSE(e.score_range->max);
  CHECK(e.score_range->str() == "0 upwards");
  // PESI, PSI and ASTRAL count points per unit and have no fixed maximum.
  for (const char* id : {"pesi", "psi-port", "astral"}) {
    INFO(id);
    const Entry* shipped = testing::shipped().catalog.find(id);
    REQUIRE(shipped);
    CHECK(std::any_of(shipped->inputs.begin(), shipped->inputs.end(), [](const EntryInput& in) { return in.per.has_value(); }));
    REQUIRE(shipped->score_range);
    CHECK_FALSE(shipped->score_range->max);
  }
}

TEST_CASE("local models follow their own rules") {
  std::string local = with_lines(25, 30, "owner: Analytics team\ngo_live: 2024-02-30\nstatus: paused\nprovenance: from-memory");
  local = "id: demo-score\nname: Demo\nkind: local\n" + local.substr(local.find("summary:"));
  std::string p = "local/demo-score.yaml";
  CHECK(errors_of(files_with(local, p, "local")) ==
        std::vector<std::string>{
            p + ":26:10: error: 'go_live' of entry 'demo-score' must be a date YYYY-MM-DD, found '2024-02-30'",
            p + ":27:9: error: 'status' of entry 'demo-score' must be one of live, pilot, retired, found 'paused'"});
  // A published score may not sit in local/.
  CHECK(errors_of(files_with(kEntry, p, "local")) ==
        std::vector<std::string>{p + ":3:7: error: 'kind' of entry 'demo-score' must be one of local, found 'points'"});
}

TEST_CASE("registries are layered: a later registry replaces an entry, duplicates within one are errors") {
  RegistryFiles files = files_with(kEntry);
  std::string replacement = with_line(2, "name: Demo score, in-house copy");
  files.entries.push_back({{"mine/demo-score.yaml", replacement}, 1, ""});
  Catalog catalog;
  Diagnostics diags;
  REQUIRE(load_catalog(files, &catalog, &diags));
  REQUIRE(catalog.entries.size() == 1);
  CHECK(catalog.entries[0].name == "Demo score, in-house copy");
  CHECK(catalog.entries[0].layer == 1);

  files.entries.back().layer = 0;
  files.entries.back().file.path = "local/demo-score.yaml";
  CHECK(errors_of(files) == std::vector<std::string>{"local/demo-score.yaml:1:1: error: duplicate entry id 'demo-score' "
                                                     "(also defined in scores/demo-score.yaml)"});
}

TEST_CASE("reading registries from disk and the content hash") {
  namespace fs = std::filesystem;
  fs::path dir = fs::temp_directory_path() / ("readyby-catalog-test-" + std::to_string(::getpid()));
  fs::remove_all(dir);
  fs::create_directories(dir / "vocabulary");
  fs::create_directories(dir / "scores");
  std::ofstream(dir / "vocabulary" / "v.yaml") << kVocabulary;
  std::ofstream(dir / "scores" / "demo-score.yaml") << kEntry;
  std::ofstream(dir / "scores" / "notes.txt") << "ignored";
  RegistryFiles files;
  Diagnostics diags;
  REQUIRE(read_registries({dir.string()}, &files, &diags));
  CHECK(files.vocabulary.size() == 1);
  REQUIRE(files.entries.size() == 1);
  CHECK(files.entries[0].folder == "scores");
  std::string before = content_hash(files);
  CHECK(before.size() == 16);
  CHECK(content_hash(files) == before);
  files.entries[0].file.text += "\n";
  CHECK(content_hash(files) != before);
  RegistryFiles missing;
  CHECK_FALSE(read_registries({(dir / "nope").string()}, &missing, &diags));
  fs::remove_all(dir);
}
