#pragma once
// Shared by the report page tests: the demo inputs (the fictional Larkspur
// plan, its landing logs and proposal), a history database recorded from the
// logs, the page written by the built binary, and small readers of the page.
// Everything is written inside a temporary directory.

#include <catch2/catch.hpp>

#include <set>
#include <sstream>
#include <string>
#include <vector>

#include "history_helpers.h"
#include "run_binary.h"

namespace readyby::testing {

inline const std::string kSource = READYBY_SOURCE_DIR;
inline const std::string kDemoPlan = kSource + "/pipelines/larkspur.plan.yaml";
inline const std::string kDemoProposal = kSource + "/pipelines/readmit-30d.proposal.yaml";
// Debian's interpreter, where python3-html5lib is installed (not whatever python3 is first on PATH).
inline const std::string kDomTool = "/usr/bin/python3 " + kSource + "/tests/report_dom.py";
/// The demo's window (four weeks around the US daylight-saving change) and nightly date.
inline const std::string kDemoWindow = "--from 2026-02-22 --days 28";
inline const std::string kDemoDate = "2026-03-03";

inline Outcome readyby(const std::string& args) {
  return run_shell(std::string("NO_COLOR=1 ") + READYBY_BINARY + " " + args + " 2>&1");
}

/// Records the demo's landing logs into `db` as scripts/demo.sh does.
inline void record_demo_history(const std::string& db) {
  const std::string logs = kSource + "/pipelines/landing-logs/";
  Outcome feeds = readyby("record " + logs + "feeds-2026-01.csv " + logs + "feeds-2026-02.csv " + logs +
                          "feeds-2026-03.csv --plan " + kDemoPlan + " --db " + db);
  INFO(feeds.out);
  REQUIRE(feeds.status == 0);
  Outcome server = readyby("record " + logs + "integration-server.jsonl --plan " + kDemoPlan + " --db " + db +
                           " --map node=task,landed_at=load_end_ts,data_through=watermark,status=state");
  INFO(server.out);
  REQUIRE(server.status == 0);
}

/// Writes the full demo report (history and proposal) into `dir`; returns its path.
inline std::string write_demo_report(const readyby_test::TempDir& dir) {
  std::string db = dir.file("history.db"), out = dir.file("report.html");
  record_demo_history(db);
  Outcome r = run_shell("READYBY_CACHE_DIR=" + dir.file("cache") + " NO_COLOR=1 " + READYBY_BINARY + " report " +
                        kDemoPlan + " " + kDemoWindow + " --db " + db + " --date " + kDemoDate + " --proposal " +
                        kDemoProposal + " --out " + out + " 2>&1");
  INFO(r.out);
  REQUIRE(r.status == 1);  // the demo plan has failing runs
  REQUIRE(r.out.find("wrote the report of plan 'larkspur'") != std::string::npos);
  return out;
}

/// The lines a command prints, as a sorted set.
inline std::set<std::string> lines_of(const std::string& text) {
  std::set<std::string> out;
  std::istringstream in(text);
  for (std::string line; std::getline(in, line);) {
    if (!line.empty()) out.insert(line);
  }
  return out;
}

/// The lines of `lines` that start with `prefix`.
inline std::set<std::string> starting_with(const std::set<std::string>& lines, const std::string& prefix) {
  std::set<std::string> out;
  for (const std::string& l : lines) {
    if (l.rfind(prefix, 0) == 0) out.insert(l);
  }
  return out;
}

/// Every <svg ...>...</svg> element of a page (the page never nests them).
inline std::vector<std::string> svg_elements(const std::string& html) {
  std::vector<std::string> out;
  for (size_t at = html.find("<svg"); at != std::string::npos; at = html.find("<svg", at + 1)) {
    size_t end = html.find("</svg>", at);
    if (end == std::string::npos) break;
    out.push_back(html.substr(at, end + 6 - at));
  }
  return out;
}

/// How often `needle` occurs in `haystack`.
inline size_t count_of(const std::string& haystack, const std::string& needle) {
  size_t n = 0;
  for (size_t at = haystack.find(needle); at != std::string::npos; at = haystack.find(needle, at + needle.size())) ++n;
  return n;
}

}  // namespace readyby::testing
