// libFuzzer target: the catalogue entry loader (parse_entry, then
// load_catalog's reference checks against a small vocabulary).
// Input: byte 0 picks the folder (scores, local, or entry files directly in
// the registry folder); the rest is the text of the entry file fuzz-entry.yaml.

#include <cstddef>
#include <cstdint>
#include <cstdlib>
#include <string>

#include "catalog/catalog.h"
#include "fuzz_common.h"

using namespace readyby;

namespace {

// A small vocabulary, so that each input is checked in well under a
// millisecond (the shipped one is over 100 KB of YAML, re-read by every
// load_catalog). Its terms are copied from registries/vocabulary/ and cover
// the seed entries of tests/fuzz/corpus/catalog_entry/ (curb-65,
// lvmc-no-show); other seeds exercise the unknown-id paths.
const char kVocabulary[] = R"(outcomes:
  - id: mortality
    label: Death from any cause
    synonyms: [death, all-cause mortality]
  - id: 30-day-mortality
    label: Death within 30 days
    synonyms: [30-day mortality, short-term mortality]
    broader: [mortality]
  - id: missed-appointment
    label: Missed outpatient appointment
    synonyms: [no-show, did not attend]
settings:
  - id: emergency-department
    label: Emergency department
    synonyms: [ed, emergency room]
  - id: ward
    label: General inpatient ward
  - id: specialty-clinic
    label: Specialty outpatient clinic
time_points:
  - id: presentation
    label: Presentation or triage
  - id: before-appointment
    label: Before a scheduled appointment
elements:
  - id: lab.urea
    label: Urea or blood urea nitrogen (BUN)
    kind: lab
    structured: true
  - id: vital.respiratory_rate
    label: Respiratory rate
    kind: vital
    structured: true
    loinc: "9279-1"
  - id: vital.systolic_bp
    label: Systolic blood pressure
    kind: vital
    structured: true
  - id: demo.age
    label: Age
    kind: demographic
    structured: true
  - id: assessment.confusion
    label: New confusion or disorientation
    kind: assessment
    structured: false
  - id: util.prior_missed_appointments
    label: Number of previously missed outpatient appointments
    kind: utilisation
    structured: true
  - id: util.appointment_lead_time_days
    label: Days between booking and appointment
    kind: utilisation
    structured: true
  - id: social.deprivation_index
    label: Area deprivation index (from postcode)
    kind: social
    structured: true
)";

const RegistryFiles* base_files() {
  static const RegistryFiles* files = [] {
    auto* f = new RegistryFiles;
    f->vocabulary.push_back({"fuzz/vocabulary/terms.yaml", kVocabulary, -1, -1});
    Diagnostics diags;
    Vocabulary v;
    if (!load_vocabulary(f->vocabulary, &v, &diags)) {
      std::fprintf(stderr, "the fuzz vocabulary does not load:\n%s", diags.render().c_str());
      std::abort();
    }
    return f;
  }();
  return files;
}

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const uint8_t* data, size_t size) {
  if (size == 0) return 0;
  static const char* const kFolders[] = {"scores", "local", "", "scores"};
  const std::string folder = kFolders[data[0] & 3];
  SourceFile file;
  file.path = (folder.empty() ? std::string("fuzz/") : "fuzz/" + folder + "/") + "fuzz-entry.yaml";
  file.text.assign(reinterpret_cast<const char*>(data + 1), size - 1);

  {
    Diagnostics diags;
    Entry e = parse_entry(file, folder, &diags);
    fuzz::check_diagnostics(diags);
    if (diags.empty()) fuzz::expect(e.id == "fuzz-entry", "an entry accepted whose id is not its file name");
  }

  RegistryFiles files = *base_files();
  files.entries.push_back({file, 0, folder});
  Diagnostics diags;
  Catalog catalog;
  bool ok = load_catalog(files, &catalog, &diags);
  fuzz::expect(ok == diags.empty(), "load_catalog's result disagrees with its errors");
  fuzz::check_diagnostics(diags);
  if (ok) fuzz::expect(catalog.entries.size() == 1 && catalog.find("fuzz-entry"), "an accepted entry is missing");
  return 0;
}
