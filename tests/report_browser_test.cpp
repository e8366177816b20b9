#include <catch2/catch.hpp>

#include <cstdlib>
#include <filesystem>
#include <string>

#include "report_fixture.h"

// The demo report rendered by a real browser (Debian's chromium, headless):
// what the browser's DOM holds is checked against what `check --format json`
// and `nightly --format json` print for the same inputs, and a screenshot must show a page.
// Set READYBY_SCREENSHOT_OUT=PATH to keep the screenshot (scripts/report-screenshot.sh
// uses it to refresh docs/report-demo.png).

using readyby::testing::kDemoDate;
using readyby::testing::kDemoPlan;
using readyby::testing::kDemoWindow;
using readyby::testing::kDomTool;
using readyby::testing::lines_of;
using readyby::testing::Outcome;
using readyby::testing::run_shell;
using readyby::testing::starting_with;

namespace {

const char kChromium[] = "/usr/bin/chromium";

// The flags of a quiet, offline headless run.
std::string chromium(const readyby_test::TempDir& dir, const std::string& what) {
  return std::string(kChromium) +
         " --headless --no-sandbox --disable-gpu --disable-quic --no-first-run --disable-background-networking"
         " --disable-component-update --disable-sync --hide-scrollbars --user-data-dir=" +
         dir.file("chromium-profile") + " " + what;
}

bool have_chromium() { return std::filesystem::exists(kChromium); }

// Runs a chromium command line until `made` exists and is not empty, at most
// twice: on a busy machine a headless start now and then exits without output.
Outcome run_chromium(const std::string& command_line, const std::string& made) {
  Outcome o;
  for (int attempt = 0; attempt < 2; ++attempt) {
    o = run_shell(command_line);
    std::error_code ec;
    if (o.status == 0 && std::filesystem::file_size(made, ec) > 0 && !ec) break;
  }
  return o;
}

}  // namespace

TEST_CASE("browser: the demo page's DOM matches check, its patterns and the monitored sources") {
  if (!have_chromium()) {
    WARN("SKIPPED: " << kChromium << " is not installed (scripts/setup.sh installs Debian's chromium)");
    return;
  }
  readyby_test::TempDir dir;
  std::string page = readyby::testing::write_demo_report(dir);
  std::string dom = dir.file("dom.html");
  Outcome dumped =
      run_chromium(chromium(dir, "--dump-dom file://" + page) + " > " + dom + " 2>" + dir.file("chromium.err"), dom);
  INFO(readyby_test::read_text(dir.file("chromium.err")));
  REQUIRE(dumped.status == 0);
  REQUIRE(std::filesystem::file_size(dom) > 10000);
  Outcome facts = run_shell(kDomTool + " dom " + dom + " 2>&1");
  INFO(facts.out);
  REQUIRE(facts.status == 0);
  std::set<std::string> seen = lines_of(facts.out);

  std::string json = dir.file("check.json");
  run_shell(std::string(READYBY_BINARY) + " check " + kDemoPlan + " " + kDemoWindow + " --format json > " + json);
  Outcome expected = run_shell(kDomTool + " check-json " + json + " 2>&1");
  INFO(expected.out);
  REQUIRE(expected.status == 0);
  std::set<std::string> want = lines_of(expected.out);

  SECTION("run cells per model and status equal check --format json's counts") {
    REQUIRE(starting_with(want, "cell ").size() >= 3);
    CHECK(starting_with(seen, "cell ") == starting_with(want, "cell "));
  }

  SECTION("every pattern of check --format json has a timeline") {
    REQUIRE(starting_with(want, "timeline fail ").size() >= 3);
    CHECK(starting_with(seen, "timeline ") == starting_with(want, "timeline "));
  }

  SECTION("every monitored source has its chart") {
    std::string json = dir.file("nightly.json");
    run_shell(std::string(READYBY_BINARY) + " nightly " + kDemoPlan + " --db " + dir.file("history.db") + " --date " +
              kDemoDate + " --format json > " + json);
    Outcome expected = run_shell(kDomTool + " nightly-json " + json + " 2>&1");
    REQUIRE(expected.status == 0);
    std::set<std::string> want = lines_of(expected.out);
    REQUIRE(want.size() >= 3);
    CHECK(starting_with(seen, "chart ") == want);
  }
}

TEST_CASE("browser: a screenshot of the demo page shows a page, not a blank") {
  if (!have_chromium()) {
    WARN("SKIPPED: " << kChromium << " is not installed (scripts/setup.sh installs Debian's chromium)");
    return;
  }
  readyby_test::TempDir dir;
  std::string page = readyby::testing::write_demo_report(dir);
  std::string png = dir.file("report.png");
  Outcome shot = run_chromium(chromium(dir, "--window-size=1100,1500 --screenshot=" + png + " file://" + page) + " > " +
                                  dir.file("chromium.out") + " 2>&1",
                              png);
  INFO(readyby_test::read_text(dir.file("chromium.out")));
  REQUIRE(shot.status == 0);
  REQUIRE(std::filesystem::exists(png));
  Outcome facts = run_shell(kDomTool + " png " + png + " 2>&1");
  INFO(facts.out);
  REQUIRE(facts.status == 0);
  std::set<std::string> lines = lines_of(facts.out);
  CHECK(lines.count("size 1100 1500") == 1);
  int colours = 0, permille = 0;
  for (const std::string& l : lines) {
    if (l.rfind("colours ", 0) == 0) colours = std::stoi(l.substr(8));
    if (l.rfind("non-background ", 0) == 0) permille = std::stoi(l.substr(15));
  }
  // Text, marks and tinted panels: many colours and a good share of ink.
  CHECK(colours >= 50);
  CHECK(permille >= 50);
  CHECK(std::filesystem::file_size(png) < 300 * 1024);
  if (const char* keep = std::getenv("READYBY_SCREENSHOT_OUT")) {
    std::filesystem::copy_file(png, keep, std::filesystem::copy_options::overwrite_existing);
  }
}
