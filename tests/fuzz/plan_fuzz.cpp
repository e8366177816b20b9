// libFuzzer target: the YAML layer (util/yaml_tree) and the plan loader.
// Input: the text of a plan file.

#include <cstddef>
#include <cstdint>
#include <string>

#include "fuzz_common.h"
#include "plan/plan_loader.h"
#include "util/yaml_tree.h"

using namespace readyby;

extern "C" int LLVMFuzzerTestOneInput(const uint8_t* data, size_t size) {
  const std::string text(reinterpret_cast<const char*>(data), size);

  // The YAML layer alone: a document that parses has no more nodes than the limit.
  {
    Diagnostics diags;
    YamlNode root;
    bool parsed = parse_yaml("fuzz.yaml", text, &root, &diags);
    fuzz::expect(parsed || !diags.empty(), "parse_yaml failed without an error");
    fuzz::check_diagnostics(diags);
  }

  PlanLoadResult r = load_plan_text(text, "fuzz.plan.yaml");
  fuzz::expect(r.plan.has_value() == r.errors.empty(), "a plan and errors, or neither");
  fuzz::expect(r.errors.empty() == r.rendered.empty(), "rendered errors disagree with the list");
  for (const Diagnostic& d : r.errors) fuzz::expect(d.path == "fuzz.plan.yaml" && !d.message.empty(), "a bad diagnostic");
  return 0;
}
