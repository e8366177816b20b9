#include <catch2/catch.hpp>

#include <cstdio>
#include <filesystem>
#include <string>

#include "plan_fixture.h"
#include "report/html/advice_adapter.h"
#include "report/html/lineage_svg.h"
#include "report/html/markup.h"
#include "report/html/page.h"
#include "report/html/page_facts.h"
#include "report/html/palette.h"
#include "report_fixture.h"

// The report page (src/report/html): its palette, what each picture holds
// against the engine's facts, and the file the command writes.

using namespace readyby;
using namespace readyby::html;
using readyby::testing::count_of;
using readyby::testing::Outcome;

namespace {

// A small plan around the US daylight-saving change of 2026-03-08 (a
// Sunday): model `m` fails that day (the 02:00 delivery and the fixed 02:30
// start both fall in the gap, RFC 5545 §3.3.5, and land after its 03:40 run)
// and is degraded on Sundays and Mondays (the weekday-only board has not
// delivered since Friday); model `w` runs on weekdays only.
const char kPlan[] = R"(plan: t
timezone: America/Chicago
calendars:
  weekdays: {skip_weekdays: [sat, sun]}
sources:
  nightly: {schedule: "0 2 * * *", lands_after: PT30M, data_lag: PT2H}
  board: {schedule: "0 7 * * *", calendar: weekdays, lands_after: PT20M}
jobs:
  snap: {inputs: [nightly], trigger: "30 2 * * *", run_time: PT15M}
features:
  f_nightly: {inputs: [snap], max_age: PT6H}
  f_board: {inputs: [board], max_age: PT24H, optional: true}
models:
  m:
    features: [f_nightly, f_board]
    runs: [{at: "40 3 * * *"}]
  w:
    features: [f_nightly]
    runs: [{at: "0 4 * * *", calendar: weekdays}]
)";

struct Rendered {
  Plan plan;
  Evaluation ev;
  PageFacts facts;
  std::string html;
};

// Evaluates `text` over `days` from 2026-03-02 and renders the page.
std::unique_ptr<Rendered> render(const std::string& text, int days = 14) {
  auto r = std::make_unique<Rendered>();
  r->plan = readyby::testing::plan_from_text(text);
  r->ev = evaluate(r->plan, *parse_date("2026-03-02"), days);
  r->facts = gather_page_facts(r->plan, r->ev);
  r->html = render_page(r->facts);
  return r;
}

}  // namespace

TEST_CASE("contrast ratio follows the WCAG 2.1 formula") {
  struct Case {
    const char* a;
    const char* b;
    double ratio;
  };
  // WCAG 2.1 definitions of relative luminance and contrast ratio; the
  // values are worked by hand from them: black on white (1.05 / 0.05), equal
  // colours, and #767676 on white (L = 0.1812, 1.05 / 0.2312).
  const Case cases[] = {
      {"#000000", "#ffffff", 21.0},
      {"#ffffff", "#000000", 21.0},
      {"#777777", "#777777", 1.0},
      {"#767676", "#ffffff", 4.54},
  };
  for (const Case& c : cases) {
    INFO(c.a << " on " << c.b);
    CHECK(contrast_ratio(c.a, c.b) == Approx(c.ratio).margin(0.01));
  }
}

TEST_CASE("every text colour of the palette reaches 4.5:1 on its background, light and dark") {
  REQUIRE(text_pairs().size() >= 20);
  for (const TextPair& p : text_pairs()) {
    const Swatch& text = swatch(p.text);
    const Swatch& background = swatch(p.background);
    INFO(p.text << " on " << p.background << " (light " << text.light << " on " << background.light << ", dark "
                << text.dark << " on " << background.dark << ")");
    CHECK(contrast_ratio(text.light, background.light) >= 4.5);
    CHECK(contrast_ratio(text.dark, background.dark) >= 4.5);
  }
}

TEST_CASE("the page's CSS defines every swatch for light, dark and print") {
  std::string css = page_css();
  for (const Swatch& s : palette()) {
    INFO(s.name);
    CHECK(count_of(css, std::string("--") + s.name + ":") == 3);
  }
  CHECK(css.find("prefers-color-scheme: dark") != std::string::npos);
  CHECK(css.find("size:A4") != std::string::npos);
  CHECK(css.find("section.model,section.history,section.intake{break-before:page}") != std::string::npos);
}

TEST_CASE("calendar: one cell per run, counted by status as the evaluation counts them") {
  auto r = render(kPlan);
  size_t seen[3] = {0, 0, 0};
  for (const ModelFacts& m : r->facts.models) {
    const std::string& id = r->plan.models[static_cast<size_t>(m.model)].id;
    size_t n[3] = {0, 0, 0};
    for (const RunResult& run : r->ev.runs) {
      if (run.model == m.model) n[static_cast<int>(run.status)]++;
    }
    size_t at = r->html.find("<svg class=\"calendar\" data-model=\"" + id + "\"");
    REQUIRE(at != std::string::npos);
    std::string calendar = r->html.substr(at, r->html.find("</svg>", at) - at);
    const RunStatus all[] = {RunStatus::ok, RunStatus::degraded, RunStatus::fail};
    for (RunStatus s : all) {
      INFO(id << " " << to_string(s));
      CHECK(count_of(calendar, "<g class=\"run\" data-status=\"" + std::string(to_string(s)) + "\"") ==
            n[static_cast<int>(s)]);
      seen[static_cast<int>(s)] += n[static_cast<int>(s)];
    }
  }
  // The plan is built to show every status.
  CHECK(seen[0] > 0);
  CHECK(seen[1] > 0);
  CHECK(seen[2] > 0);
}

TEST_CASE("calendar: the daylight-saving day, calendar-skipped days and feeds that do not deliver are marked") {
  auto r = render(kPlan);
  // Each model's calendar marks 2026-03-08 (America/Chicago springs forward) and no other day.
  CHECK(count_of(r->html, "data-date=\"2026-03-08\" data-clock-change=\"yes\"") == 2);
  CHECK(count_of(r->html, "data-clock-change=\"yes\"") == 2);
  // Model w's weekday calendar skips the two weekends of the window.
  const char* weekend[] = {"2026-03-07", "2026-03-08", "2026-03-14", "2026-03-15"};
  CHECK(count_of(r->html, "data-skipped=\"yes\"") == 4);
  for (const char* day : weekend) {
    INFO(day);
    CHECK(r->html.find(std::string("data-date=\"") + day + "\"") != std::string::npos);
  }
  const ModelFacts& m = r->facts.models[0];
  for (const DayFacts& d : m.days) {
    INFO(format_date(d.day));
    int wd = weekday_of(d.day);
    CHECK(d.feeds_off.size() == ((wd == 0 || wd == 6) ? 1u : 0u));
  }
  CHECK(r->html.find("off: board") != std::string::npos);
}

TEST_CASE("every failing and degraded pattern has a timeline with its chain, the step at fault and the fix") {
  auto r = render(kPlan);
  const AdviceFacts& advice = r->facts.advice;
  size_t failing = 0;
  for (const PatternFacts& p : advice.patterns) failing += p.status == RunStatus::fail;
  REQUIRE(failing >= 1);
  REQUIRE(advice.patterns.size() > failing);
  CHECK(count_of(r->html, "<figure class=\"timeline\"") == advice.patterns.size() + 1);  // + w's tightest run
  for (const PatternFacts& p : advice.patterns) {
    INFO(p.description);
    size_t at = r->html.find("data-pattern=\"" + esc(p.description) + "\"");
    REQUIRE(at != std::string::npos);
    size_t end = r->html.find("</figure>", at);
    std::string figure = r->html.substr(at, end - at);
    for (const TimelineStep& s : p.worst.steps) {
      CHECK(figure.find("data-node=\"" + r->plan.nodes[static_cast<size_t>(s.node)].id + "\"") != std::string::npos);
    }
    CHECK(count_of(figure, "class=\"line-due\"") == 1);
    CHECK(count_of(figure, "class=\"line-needs\"") == 1);
    if (p.fault_node >= 0) {
      CHECK(figure.find("<g class=\"step at-fault\" data-node=\"" + r->plan.nodes[static_cast<size_t>(p.fault_node)].id +
                        "\"") != std::string::npos);
    }
    if (p.fixes.empty()) {
      CHECK(figure.find(esc(p.no_fix)) != std::string::npos);
    } else {
      for (const FixFacts& fix : p.fixes) {
        CHECK(figure.find(esc(fix.text)) != std::string::npos);
        CHECK(figure.find(esc(fix.effect)) != std::string::npos);
      }
    }
    std::string verdict = p.worst.status == FeatureStatus::never ? "never fresh"
                                                                  : "late by " + human_duration(-*p.worst.slack_seconds);
    CHECK(figure.find(verdict) != std::string::npos);
  }
  // The failing pattern of the daylight-saving day names the step at fault and a verified fix.
  for (const PatternFacts& p : advice.patterns) {
    if (p.status != RunStatus::fail) continue;
    CHECK(p.fault_node >= 0);
    CHECK_FALSE(p.fixes.empty());
  }
}

TEST_CASE("lineage: Graphviz lays out every node of a small cone; a large cone is summarised") {
  auto r = render(kPlan);
  const ModelFacts& m = r->facts.models[0];
  REQUIRE_FALSE(m.cone.summarised);
  LineageDrawer drawer;
  ConeLayout layout = drawer.layout(r->plan, m);
  REQUIRE(layout.error.empty());
  REQUIRE(layout.boxes.size() == m.cone.nodes.size() + 1);
  for (const ConeLayout::Box& b : layout.boxes) {
    CHECK(b.x - b.w / 2 >= 0);
    CHECK(b.x + b.w / 2 <= layout.width);
    CHECK(b.y - b.h / 2 >= 0);
    CHECK(b.y + b.h / 2 <= layout.height);
  }
  // Sources lie left of what they feed (rankdir LR).
  for (const auto& [from, to] : m.cone.edges) {
    CHECK(layout.boxes[static_cast<size_t>(from)].x < layout.boxes[static_cast<size_t>(to)].x);
  }
  CHECK(count_of(r->html, "<g class=\"lnode ") ==
        r->facts.models[0].cone.nodes.size() + r->facts.models[1].cone.nodes.size() + 2);

  // A chain of 70 jobs: more than kMaxDrawnCone nodes.
  std::string big = "plan: big\ntimezone: Etc/UTC\nsources:\n  s: {schedule: \"0 1 * * *\"}\njobs:\n";
  for (int i = 0; i < 70; ++i) big += "  j" + std::to_string(i) + ": {inputs: [" + (i ? "j" + std::to_string(i - 1) : "s") + "]}\n";
  big += "features:\n  f: {inputs: [j69], max_age: PT24H}\nmodels:\n  big_model:\n    features: [f]\n    runs: [{at: \"0 6 * * *\"}]\n";
  auto b = render(big, 3);
  REQUIRE(b->facts.models[0].cone.nodes.size() == 72);
  CHECK(b->facts.models[0].cone.summarised);
  CHECK(b->html.find("data-summarised=\"yes\"") != std::string::npos);
  CHECK(count_of(b->html, "<g class=\"lnode ") == 0);
  size_t table = b->html.find("Nodes most at risk");
  REQUIRE(table != std::string::npos);
  CHECK(count_of(b->html.substr(table, b->html.find("</table>", table) - table), "<tr>") == kSummaryRows + 1);
}

TEST_CASE("margins: how much later a node could land before an ok run suffers, with the run that binds it") {
  auto r = render(kPlan);
  int nightly = r->plan.find_node("nightly"), board = r->plan.find_node("board");
  const std::vector<NodeMargin>& margins = r->facts.advice.margins;
  // On an ordinary day nightly lands 02:30 and snap's 02:30 start reads it; a
  // minute later and snap waits a day: the headroom is 0, bound by a run.
  REQUIRE(margins[static_cast<size_t>(nightly)].margin_seconds);
  CHECK(*margins[static_cast<size_t>(nightly)].margin_seconds == 0);
  CHECK(margins[static_cast<size_t>(nightly)].binding_at);
  // board decides m's ok runs (Tuesday to Saturday): it lands 07:20 the day
  // before a 03:40 run that needs data through 03:40 the day before, so the
  // tightest headroom is the run after a delivery: 03:40 + 1 day - 07:20 =
  // 20h 20m.
  REQUIRE(margins[static_cast<size_t>(board)].margin_seconds);
  CHECK(*margins[static_cast<size_t>(board)].margin_seconds == 20 * 3600 + 20 * 60);
}

TEST_CASE("markup escapes what plan and catalogue files may hold") {
  CHECK(esc("a<b & \"c\" 'd'>") == "a&lt;b &amp; &quot;c&quot; &#39;d&#39;&gt;");
  CHECK(num(12.0) == "12");
  CHECK(num(12.46) == "12.5");
  CHECK(num(-0.01) == "0");
  CHECK(anchor("model-", "ward.risk v2") == "model-ward-risk-v2");
}

TEST_CASE("report command: bad input exits 2 and leaves no file") {
  readyby_test::TempDir dir;
  std::string out = dir.file("page.html");
  readyby_test::write_text(dir.file("broken.yaml"), "plan: x\ntimezone: Mars/Olympus\n");
  struct Case {
    const char* name;
    std::string args;
    const char* message;
  };
  const Case cases[] = {
      {"plan with errors", dir.file("broken.yaml") + " --out " + out, "broken.yaml:2:11: error:"},
      {"no --out", readyby::testing::kDemoPlan, "report needs --out FILE.html"},
      {"no plan", "--out " + out, "report needs a PLAN file"},
      {"--date without --db", readyby::testing::kDemoPlan + " --date 2026-03-03 --out " + out, "--date goes with --db"},
      {"missing database", readyby::testing::kDemoPlan + " --db " + dir.file("none.db") + " --out " + out, "none.db"},
      {"folder that does not exist", readyby::testing::kDemoPlan + " --out " + dir.file("no/such/page.html"),
       "cannot create a file in"},
      {"unknown option", readyby::testing::kDemoPlan + " --colour --out " + out, "unknown option '--colour'"},
  };
  for (const Case& c : cases) {
    INFO(c.name);
    Outcome o = readyby::testing::readyby("report " + c.args);
    INFO(o.out);
    CHECK(o.status == 2);
    CHECK(o.out.find(c.message) != std::string::npos);
    CHECK_FALSE(std::filesystem::exists(out));
  }
  // Nothing half-written is left behind: the folder holds the plan only.
  size_t files = 0;
  for (const auto& e : std::filesystem::directory_iterator(dir.path())) files += e.is_regular_file();
  CHECK(files == 1);
}

TEST_CASE("report command: a proposal for a model the plan lacks is reported at its position") {
  readyby_test::TempDir dir;
  std::string proposal = dir.file("p.proposal.yaml");
  readyby_test::write_text(proposal,
                           "proposal: p\ntitle: t (fictional)\noutcome: unplanned readmission within 30 days\n"
                           "horizon: P30D\nsettings: [ward]\ntime_point: discharge\nmodel: readmit_risk_v9\n");
  Outcome o = readyby::testing::run_shell("READYBY_CACHE_DIR=" + dir.file("cache") + " " + READYBY_BINARY + " report " +
                                          readyby::testing::kDemoPlan + " --proposal " + proposal + " --out " +
                                          dir.file("page.html") + " 2>&1");
  INFO(o.out);
  CHECK(o.status == 2);
  CHECK(o.out.find(proposal + ":7:8: error: no model 'readmit_risk_v9' in") != std::string::npos);
  CHECK(o.out.find("did you mean 'readmit_risk'?") != std::string::npos);
  CHECK_FALSE(std::filesystem::exists(dir.file("page.html")));
}

TEST_CASE("the demo page is self-contained, parses as HTML5, its SVG is well-formed XML, and it carries the cautions") {
  readyby_test::TempDir dir;
  std::string page_path = readyby::testing::write_demo_report(dir);
  std::string page = readyby_test::read_text(page_path);
  REQUIRE(page.size() > 10000);

  SECTION("nothing external: no http:, https: or // in src or href, no @import, no script, no link") {
    for (const char* attr : {"src=", "href=", "xlink:href="}) {
      for (size_t at = page.find(attr); at != std::string::npos; at = page.find(attr, at + 1)) {
        char quote = page[at + std::string(attr).size()];
        size_t end = page.find(quote, at + std::string(attr).size() + 1);
        std::string value = page.substr(at + std::string(attr).size() + 1, end - at - std::string(attr).size() - 1);
        INFO(attr << value);
        CHECK(value.find("http:") == std::string::npos);
        CHECK(value.find("https:") == std::string::npos);
        CHECK(value.find("//") == std::string::npos);
      }
    }
    CHECK(page.find("@import") == std::string::npos);
    CHECK(page.find("<script") == std::string::npos);
    CHECK(page.find("<link") == std::string::npos);
    CHECK(page.find("<img") == std::string::npos);
    for (size_t at = page.find("url("); at != std::string::npos; at = page.find("url(", at + 1)) {
      INFO(page.substr(at, 20));
      CHECK(page[at + 4] == '#');  // fragments of this page only
    }
  }

  SECTION("HTML5 parser: no errors") {
    Outcome o = readyby::testing::run_shell(readyby::testing::kDomTool + " html5 " + page_path + " 2>&1");
    INFO(o.out);
    CHECK(o.status == 0);
  }

  SECTION("every SVG element is well-formed XML") {
    std::vector<std::string> svgs = readyby::testing::svg_elements(page);
    REQUIRE(svgs.size() > 20);
    std::string files;
    for (size_t i = 0; i < svgs.size(); ++i) {
      std::string f = dir.file("svg-" + std::to_string(i) + ".xml");
      readyby_test::write_text(f, svgs[i]);
      files += " " + f;
    }
    Outcome o = readyby::testing::run_shell("xmllint --noout" + files + " 2>&1");
    INFO(o.out);
    CHECK(o.status == 0);
    CHECK(o.out.empty());
  }

  SECTION("the intake section carries the cautions of DESIGN §8 in full") {
    size_t intake = page.find("<section class=\"intake\"");
    REQUIRE(intake != std::string::npos);
    std::string section = page.substr(intake);
    for (const std::string& caution : catalogue_cautions()) {
      INFO(caution);
      CHECK(section.find(esc(caution)) != std::string::npos);
    }
    CHECK(section.find("data-decision=\"reuse-and-validate\"") != std::string::npos);
  }
}

TEST_CASE("docs/report.md shows every swatch of the palette with its values") {
  std::string doc = readyby_test::read_text(readyby::testing::kSource + "/docs/report.md");
  REQUIRE_FALSE(doc.empty());
  for (const Swatch& s : palette()) {
    INFO(s.name);
    CHECK(doc.find(std::string("| ") + s.name + " | " + s.light + " | " + s.dark + " |") != std::string::npos);
  }
}
