// libFuzzer target: the landing-log reader (CSV and JSON Lines), validated
// against the demo plan (pipelines/larkspur.plan.yaml).
// Input: byte 0 picks the file name (and so the format: .csv, .jsonl, .ndjson,
// or .log, which leaves it to detection from the text) and whether a column map
// renames node, landed_at, data_through and status (as in
// pipelines/landing-logs/integration-server.jsonl); the rest is the log's text.

#include <cstddef>
#include <cstdint>
#include <cstdlib>
#include <string>
#include <string_view>

#include "fuzz_common.h"
#include "history/landing_log.h"
#include "plan/plan_loader.h"

using namespace readyby;

namespace {

const Plan* demo_plan() {
  static const Plan* plan = [] {
    PlanLoadResult r = load_plan_file(fuzz::source_dir() + "/pipelines/larkspur.plan.yaml");
    if (!r.plan) {
      std::fprintf(stderr, "cannot load the demo plan:\n%s", r.rendered.c_str());
      std::abort();
    }
    return new Plan(std::move(*r.plan));
  }();
  return plan;
}

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const uint8_t* data, size_t size) {
  if (size == 0) return 0;
  static const char* const kPaths[] = {"fuzz.csv", "fuzz.jsonl", "fuzz.log", "fuzz.ndjson"};
  const std::string path = kPaths[data[0] & 3];
  ColumnMap map;
  if (data[0] & 4) {
    std::string error;
    auto mapped = parse_column_map("node=task,landed_at=load_end_ts,data_through=watermark,status=state", &error);
    fuzz::expect(mapped.has_value(), "the fixed column map does not parse");
    map = *mapped;
  }
  std::string_view text(reinterpret_cast<const char*>(data + 1), size - 1);
  const Plan& plan = *demo_plan();
  LandingLog log = parse_landing_log(text, path, plan, map);
  fuzz::expect(log.errors.empty() || log.rows.empty(), "rows returned beside errors");
  int last_line = 0;
  for (const LandingRow& r : log.rows) {
    fuzz::expect(r.node >= 0 && static_cast<size_t>(r.node) < plan.nodes.size(), "a row with a bad node index");
    fuzz::expect(r.data_through <= r.landed_at, "data_through after landed_at");
    fuzz::expect(!r.rows || *r.rows >= 0, "negative rows");
    fuzz::expect(r.line > last_line, "rows out of line order");
    last_line = r.line;
  }
  for (const LogError& e : log.errors) {
    fuzz::expect(e.path == path && !e.message.empty() && e.line >= 0, "a bad error");
    fuzz::expect(!e.str().empty(), "an empty rendered error");
  }
  return 0;
}
