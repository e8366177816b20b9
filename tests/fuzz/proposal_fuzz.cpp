// libFuzzer target: the proposal loader, against the shipped vocabulary.
// Input: the text of a proposal file.

#include <cstddef>
#include <cstdint>
#include <cstdlib>
#include <string>

#include "catalog/catalog.h"
#include "catalog/proposal.h"
#include "fuzz_common.h"

using namespace readyby;

namespace {

const Vocabulary* shipped_vocabulary() {
  static const Vocabulary* vocabulary = [] {
    Diagnostics diags;
    RegistryFiles files;
    auto* v = new Vocabulary;
    if (!read_registries({fuzz::source_dir() + "/registries"}, &files, &diags) ||
        !load_vocabulary(files.vocabulary, v, &diags)) {
      std::fprintf(stderr, "cannot load the shipped vocabulary:\n%s", diags.render().c_str());
      std::abort();
    }
    return v;
  }();
  return vocabulary;
}

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const uint8_t* data, size_t size) {
  const std::string text(reinterpret_cast<const char*>(data), size);
  Diagnostics diags;
  std::optional<Proposal> p = load_proposal_text(text, "fuzz/p.proposal.yaml", *shipped_vocabulary(), &diags);
  fuzz::expect(p.has_value() == diags.empty(), "a proposal and errors, or neither");
  fuzz::check_diagnostics(diags);
  if (p) {
    fuzz::expect(!p->id.empty() && !p->outcome.empty(), "a proposal without its required keys");
    fuzz::expect(!p->age_min || !p->age_max || *p->age_min <= *p->age_max, "an inverted age range");
  }
  return 0;
}
