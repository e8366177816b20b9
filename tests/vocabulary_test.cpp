#include <catch2/catch.hpp>

#include "catalog/vocabulary.h"
#include "catalog_fixture.h"

using namespace readyby;

namespace {

std::vector<std::string> errors_of(const std::vector<SourceFile>& files) {
  Vocabulary v;
  Diagnostics diags;
  load_vocabulary(files, &v, &diags);
  std::vector<std::string> out;
  for (const Diagnostic& d : diags.sorted()) out.push_back(d.str());
  return out;
}

const char kGood[] = R"(outcomes:
  - id: mortality
    label: Death from any cause
    synonyms: [death]
  - id: in-hospital-mortality
    label: In-hospital death
    broader: [mortality]
settings:
  - id: ward
    label: General ward
time_points:
  - id: discharge
    label: Hospital discharge
elements:
  - id: lab.creatinine
    label: Serum creatinine
    kind: lab
    structured: true
    loinc: "2160-0"
)";

}  // namespace

TEST_CASE("every shipped vocabulary file validates") {
  const testing::Shipped& s = testing::shipped();
  INFO(s.errors);
  CHECK(s.errors.empty());
  CHECK(s.files.vocabulary.size() >= 4);
  const Vocabulary& v = s.catalog.vocabulary;
  CHECK(v.outcomes.size() >= 60);
  CHECK(v.elements.size() >= 150);
  CHECK(v.settings.size() >= 10);
  CHECK(v.time_points.size() >= 8);
  for (const Term& t : v.outcomes) {
    INFO(t.id);
    CHECK(!t.label.empty());
    for (const std::string& b : t.broader) CHECK(v.outcome(b) != nullptr);
  }
}

TEST_CASE("concepts relate through the broader DAG") {
  const Vocabulary& v = testing::shipped().catalog.vocabulary;
  struct Case {
    const char* a;
    const char* b;
    ConceptRelation relation;
  };
  const std::vector<Case> cases = {
      {"mortality", "mortality", ConceptRelation::same},
      {"mortality", "in-hospital-mortality", ConceptRelation::narrower},
      {"mortality", "icu-mortality", ConceptRelation::narrower},  // via in-hospital-mortality
      {"icu-mortality", "mortality", ConceptRelation::broader},
      {"30-day-mortality", "in-hospital-mortality", ConceptRelation::sibling},
      {"readmission-30d", "potentially-avoidable-readmission", ConceptRelation::narrower},
      {"mortality", "readmission-30d", ConceptRelation::unrelated},
  };
  for (const Case& c : cases) {
    INFO(c.a << " / " << c.b);
    CHECK(v.relate(c.a, c.b) == c.relation);
  }
  CHECK(v.ancestors("icu-mortality") == std::vector<std::string>{"in-hospital-mortality", "mortality"});
}

TEST_CASE("the shipped vocabulary's clinical relations") {
  // Each row is a correction made after clinical review of the vocabulary
  // (common practice: how the terms are used in the scores' publications).
  const Vocabulary& v = testing::shipped().catalog.vocabulary;
  struct Case {
    const char* a;
    const char* b;
    ConceptRelation relation;
    const char* why;
  };
  const std::vector<Case> cases = {
      {"major-bleeding", "subarachnoid-haemorrhage", ConceptRelation::sibling,
       "a spontaneous subarachnoid haemorrhage is bleeding, not the major bleeding of anticoagulation scores"},
      {"major-bleeding", "intracranial-bleeding-on-antithrombotics", ConceptRelation::narrower,
       "intracranial bleeding on anticoagulants is major bleeding"},
      {"upper-gi-bleeding", "upper-gi-bleeding-intervention", ConceptRelation::unrelated,
       "needing intervention while bleeding is not a kind of upper GI bleeding"},
      {"coronary-heart-disease", "coronary-revascularisation", ConceptRelation::sibling,
       "revascularisation is a treatment, not a kind of coronary heart disease"},
      {"major-adverse-cardiac-events", "coronary-revascularisation", ConceptRelation::narrower,
       "urgent revascularisation is a MACE component"},
      {"clinical-deterioration", "unplanned-icu-admission", ConceptRelation::narrower,
       "an unplanned ICU admission is clinical deterioration"},
      {"clinical-deterioration", "planned-icu-admission", ConceptRelation::unrelated, "a planned one is not"},
      {"icu-admission", "planned-icu-admission", ConceptRelation::narrower, "both are ICU admissions"},
      {"stroke", "thromboembolism", ConceptRelation::overlapping, "both include ischaemic stroke"},
      {"stroke-or-systemic-embolism", "ischaemic-stroke", ConceptRelation::narrower, "a component"},
      {"pneumonia", "community-acquired-pneumonia", ConceptRelation::narrower, "a kind of pneumonia"},
      {"community-acquired-pneumonia", "hospital-acquired-pneumonia", ConceptRelation::sibling, "two kinds"},
      {"renal-failure", "acute-kidney-injury", ConceptRelation::narrower, "acute renal failure"},
      {"renal-failure", "kidney-failure", ConceptRelation::narrower, "end-stage renal failure"},
      {"acute-kidney-injury", "kidney-failure", ConceptRelation::sibling, "acute is not end-stage"},
      {"shock", "intensive-respiratory-or-vasopressor-support", ConceptRelation::overlapping,
       "both include needing vasopressors"},
      {"emergency-admission", "hospital-admission-from-ed", ConceptRelation::narrower,
       "an admission from the ED is an emergency admission"},
  };
  for (const Case& c : cases) {
    INFO(c.a << " / " << c.b << ": " << c.why);
    CHECK(to_string(v.relate(c.a, c.b)) == std::string(to_string(c.relation)));
  }
  CHECK(v.shared_narrower("stroke", "thromboembolism") == "ischaemic-stroke");
  CHECK(v.shared_narrower("stroke", "readmission-30d").empty());
  // Synonyms that named another concept are gone.
  for (const auto& [id, phrase] : std::vector<std::pair<std::string, std::string>>{
           {"ischaemic-stroke", "stroke or systemic embolism"},
           {"pneumonia-mortality", "pneumonia severity"},
           {"pneumonia", "community-acquired pneumonia"},
           {"pneumonia", "hospital-acquired pneumonia"},
           {"kidney-failure", "renal failure"},
           {"icu-admission", "unplanned icu admission"},
           {"shock", "vasopressor requirement"}}) {
    INFO(id << ": " << phrase);
    const std::vector<std::string>& synonyms = v.outcome(id)->synonyms;
    CHECK(std::find(synonyms.begin(), synonyms.end(), phrase) == synonyms.end());
  }
}

TEST_CASE("a small valid vocabulary loads into plain structs") {
  Vocabulary v;
  Diagnostics diags;
  REQUIRE(load_vocabulary({{"vocabulary/a.yaml", kGood}}, &v, &diags));
  REQUIRE(v.outcome("in-hospital-mortality"));
  CHECK(v.outcome("in-hospital-mortality")->broader == std::vector<std::string>{"mortality"});
  CHECK(v.outcome("mortality")->synonyms == std::vector<std::string>{"death"});
  REQUIRE(v.element("lab.creatinine"));
  CHECK(v.element("lab.creatinine")->structured);
  CHECK(v.element("lab.creatinine")->loinc == "2160-0");
  CHECK(v.setting("ward")->label == "General ward");
  CHECK(v.time_point("discharge"));
}

TEST_CASE("bad vocabulary files get exact messages and positions") {
  struct Case {
    const char* name;
    std::vector<SourceFile> files;
    std::vector<std::string> errors;
  };
  const std::vector<Case> cases = {
      {"unknown section", {{"v.yaml", "outcome:\n  - id: x\n    label: X\n"}},
       {"v.yaml:1:1: error: unknown key 'outcome' in a vocabulary file (did you mean 'outcomes'?)"}},
      {"unknown key", {{"v.yaml", "outcomes:\n  - id: x\n    lable: X\n"}},
       {"v.yaml:2:9: error: missing required key 'label' in outcome 'x'",
        "v.yaml:3:5: error: unknown key 'lable' in outcome 'x' (did you mean 'label'?)"}},
      {"duplicate across files",
       {{"a.yaml", "settings:\n  - id: ward\n    label: Ward\n"}, {"b.yaml", "settings:\n  - id: ward\n    label: Ward\n"}},
       {"b.yaml:2:9: error: setting 'ward' is already defined at a.yaml:2"}},
      {"unknown broader", {{"v.yaml", "outcomes:\n  - id: icu-death\n    label: ICU death\n    broader: [mortalty]\n"}},
       {"v.yaml:4:15: error: unknown broader outcome 'mortalty'"}},
      {"cycle",
       {{"v.yaml",
         "outcomes:\n  - id: a\n    label: A\n    broader: [b]\n  - id: b\n    label: B\n    broader: [a]\n"}},
       {"v.yaml:2:9: error: broader links form a cycle: a -> b -> a"}},
      {"element prefix and kind",
       {{"v.yaml", "elements:\n  - id: labs.sodium\n    label: Sodium\n    kind: lab\n    structured: yes\n"}},
       {"v.yaml:2:9: error: element id 'labs.sodium' of kind lab must start with 'lab.'",
        "v.yaml:5:17: error: 'structured' of element 'labs.sodium' must be true or false, found the text 'yes'"}},
      {"bad element kind and loinc",
       {{"v.yaml", "elements:\n  - id: lab.x\n    label: X\n    kind: labs\n    structured: true\n    loinc: \"12\"\n"}},
       {"v.yaml:4:11: error: 'kind' of element 'lab.x' must be one of lab, vital, diagnosis, history, demographic, "
        "assessment, medication, procedure, imaging, utilisation, physiology, device, social, order, found 'labs' "
        "(did you mean 'lab'?)",
        "v.yaml:6:12: error: LOINC code '12' of element 'lab.x' must look like 2160-0"}},
      {"bad id", {{"v.yaml", "time_points:\n  - id: At Discharge\n    label: X\n"}},
       {"v.yaml:2:9: error: invalid time point id 'At Discharge' (use lower-case letters, digits and '-')"}},
      {"duplicate key", {{"v.yaml", "settings:\n  - id: ward\n    label: A\n    label: B\n"}},
       {"v.yaml:4:5: error: duplicate key 'label' (first defined at line 3)"}},
  };
  for (const Case& c : cases) {
    INFO(c.name);
    CHECK(errors_of(c.files) == c.errors);
  }
}
