#include <catch2/catch.hpp>

#include <unistd.h>

#include <array>
#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <map>
#include <memory>
#include <string>
#include <vector>

#include "run_binary.h"

// `readyby intake` as a user meets it: the two demo proposals, field by field
// in JSON, the text and Markdown reports, and bad proposals. Runs the binary;
// writes only to a temporary folder (the catalogue index included).

namespace {

namespace fs = std::filesystem;

// A tiny JSON reader, enough to check documents field by field.
struct Json {
  enum class Kind { null, boolean, number, string, array, object } kind = Kind::null;
  bool boolean = false;
  double number = 0;
  std::string text;
  std::vector<Json> items;
  std::vector<std::pair<std::string, Json>> members;

  // "timing.patterns[0].fix.node"; a missing path gives a null value.
  const Json& at(const std::string& path) const {
    static const Json kNull;
    const Json* v = this;
    size_t i = 0;
    while (i < path.size() && v) {
      if (path[i] == '.') ++i;
      if (path[i] == '[') {
        size_t end = path.find(']', i);
        size_t k = std::stoul(path.substr(i + 1, end - i - 1));
        v = v->kind == Kind::array && k < v->items.size() ? &v->items[k] : nullptr;
        i = end + 1;
        continue;
      }
      size_t end = path.find_first_of(".[", i);
      std::string key = path.substr(i, end == std::string::npos ? std::string::npos : end - i);
      const Json* next = nullptr;
      for (const auto& [name, value] : v->members) {
        if (name == key) next = &value;
      }
      v = next;
      i = end == std::string::npos ? path.size() : end;
    }
    return v ? *v : kNull;
  }
  std::string str(const std::string& path) const { return at(path).text; }
  double num(const std::string& path) const { return at(path).number; }
  size_t size(const std::string& path) const {
    const Json& v = at(path);
    return v.kind == Kind::array ? v.items.size() : v.members.size();
  }
  bool is_null(const std::string& path) const { return at(path).kind == Kind::null; }
};

class JsonParser {
 public:
  explicit JsonParser(const std::string& s) : s_(s) {}
  bool parse(Json* out) {
    bool ok = value(out);
    space();
    return ok && i_ == s_.size();
  }

 private:
  void space() {
    while (i_ < s_.size() && std::isspace(static_cast<unsigned char>(s_[i_]))) ++i_;
  }
  bool literal(const char* word) {
    std::string w(word);
    if (s_.compare(i_, w.size(), w) != 0) return false;
    i_ += w.size();
    return true;
  }
  bool string(std::string* out) {
    if (s_[i_] != '"') return false;
    for (++i_; i_ < s_.size() && s_[i_] != '"'; ++i_) {
      if (s_[i_] == '\\') {
        char e = s_[++i_];
        if (e == 'n') *out += '\n';
        else if (e == 't') *out += '\t';
        else if (e == 'u') *out += '?', i_ += 4;
        else *out += e;
      } else {
        *out += s_[i_];
      }
    }
    return i_++ < s_.size();
  }
  bool value(Json* v) {
    space();
    if (i_ >= s_.size()) return false;
    char c = s_[i_];
    if (c == '{') {
      v->kind = Json::Kind::object;
      ++i_;
      space();
      if (s_[i_] == '}') return ++i_, true;
      while (true) {
        space();
        std::string key;
        if (!string(&key)) return false;
        space();
        if (s_[i_++] != ':') return false;
        Json member;
        if (!value(&member)) return false;
        v->members.emplace_back(key, std::move(member));
        space();
        if (s_[i_] == ',') { ++i_; continue; }
        return s_[i_++] == '}';
      }
    }
    if (c == '[') {
      v->kind = Json::Kind::array;
      ++i_;
      space();
      if (s_[i_] == ']') return ++i_, true;
      while (true) {
        Json item;
        if (!value(&item)) return false;
        v->items.push_back(std::move(item));
        space();
        if (s_[i_] == ',') { ++i_; continue; }
        return s_[i_++] == ']';
      }
    }
    if (c == '"') {
      v->kind = Json::Kind::string;
      return string(&v->text);
    }
    if (literal("true")) return v->kind = Json::Kind::boolean, v->boolean = true, true;
    if (literal("false")) return v->kind = Json::Kind::boolean, true;
    if (literal("null")) return true;
    size_t used = 0;
    v->kind = Json::Kind::number;
    v->number = std::stod(s_.substr(i_, 32), &used);
    i_ += used;
    return used > 0;
  }
  const std::string& s_;
  size_t i_ = 0;
};

using readyby::testing::Outcome;

// A folder of this test process, removed when the tests end.
struct TempDir {
  fs::path path;
  TempDir() : path(fs::temp_directory_path() / ("readyby_intake_test_" + std::to_string(getpid()))) {
    fs::create_directories(path / "cache");
  }
  ~TempDir() {
    std::error_code ec;
    fs::remove_all(path, ec);
  }
};

const fs::path& temp_dir() {
  static const TempDir kDir;
  return kDir.path;
}

Outcome run(const std::string& args) {
  std::string cmd = "NO_COLOR=1 READYBY_CACHE_DIR='" + (temp_dir() / "cache").string() + "' READYBY_REGISTRY='" +
                    std::string(READYBY_SOURCE_DIR) + "/registries' " + READYBY_BINARY + " " + args + " 2>&1";
  return readyby::testing::run_shell(cmd);
}

const std::string kPipelines = std::string(READYBY_SOURCE_DIR) + "/pipelines/";
const std::string kWindow = " --from 2026-02-22 --days 28";

Json demo_json(const std::string& proposal, int* status) {
  Outcome o = run("intake " + kPipelines + proposal + kWindow + " --format json");
  *status = o.status;
  Json doc;
  INFO(o.out);
  REQUIRE(JsonParser(o.out).parse(&doc));
  return doc;
}

// The index of the feasibility entry with this id, or the size when absent.
size_t candidate_index(const Json& doc, const std::string& id) {
  size_t n = doc.size("feasibility");
  for (size_t i = 0; i < n; ++i) {
    if (doc.str("feasibility[" + std::to_string(i) + "].id") == id) return i;
  }
  return n;
}

std::string write_proposal(const std::string& name, const std::string& text) {
  fs::path p = temp_dir() / name;
  std::ofstream(p) << text;
  return p.string();
}

const std::string kDemoPlan = std::string(READYBY_SOURCE_DIR) + "/pipelines/larkspur.plan.yaml";

}  // namespace

TEST_CASE("intake golden: readmit-30d — LACE covers and runs on time: reuse and validate") {
  int status = 0;
  Json doc = demo_json("readmit-30d.proposal.yaml", &status);
  CHECK(status == 1);   // the proposed model's own plan fails some runs
  CHECK(doc.str("proposal") == "readmit-30d");
  CHECK(doc.str("plan") == "larkspur");
  CHECK(doc.str("model") == "readmit_risk");
  CHECK(doc.str("from") == "2026-02-22");
  CHECK(doc.num("days") == 28);

  // Timing (the same runs as `check`): 20 weekday runs, 10 failing after the
  // daylight-saving change while the Phoenix reference lab keeps its clocks.
  CHECK(doc.str("timing.verdict") == "at-risk");
  CHECK(doc.num("timing.runs") == 20);
  CHECK(doc.num("timing.ok") == 10);
  CHECK(doc.num("timing.degraded") == 0);
  CHECK(doc.num("timing.failed") == 10);
  CHECK(doc.num("timing.tightest_slack_seconds") == -(20 * 3600 + 10 * 60));
  CHECK(doc.str("timing.tightest_at") == "2026-03-09T07:00:00-05:00");
  REQUIRE(doc.size("timing.patterns") == 1);
  CHECK(doc.num("timing.patterns[0].runs") == 10);
  CHECK(doc.str("timing.patterns[0].chain[1]") == "hie_merge");
  CHECK(doc.str("timing.patterns[0].cheapest.kind") == "move-start");
  CHECK(doc.str("timing.patterns[0].cheapest.node") == "hie_merge");
  CHECK(doc.num("timing.patterns[0].cheapest.seconds") == 1800);
  // Every fix is re-checked on the pattern's runs before it is shown.
  CHECK(doc.str("timing.patterns[0].cheapest.edit") == "schedule hie_merge=30 3 * * *");
  CHECK(doc.str("timing.patterns[0].cheapest.effect") == "re-checked: all 10 runs of this pattern ok; no other run changes");
  // A later start would be 20h 10m: past midnight, which a weekday-calendar
  // run time cannot move to as one cron expression, so none is offered.
  CHECK(doc.is_null("timing.patterns[0].start_later"));

  // Reuse: the `reuse` object, unchanged.
  CHECK(doc.str("reuse.recommendation") == "reuse");
  CHECK(doc.str("reuse.candidates[0].id") == "lvmc-readmit-30d");
  CHECK(doc.size("reuse.cautions") == 3);

  // Feasibility: the three covering entries, input by input.
  REQUIRE(doc.size("feasibility") == 3);
  size_t lace = candidate_index(doc, "lace-index");
  REQUIRE(lace < 3);
  std::string l = "feasibility[" + std::to_string(lace) + "]";
  CHECK(doc.str(l + ".computable") == "on-time");
  CHECK(doc.str(l + ".coverage") == "covers");
  REQUIRE(doc.size(l + ".inputs") == 4);   // banded items are one element each
  const std::vector<std::pair<std::string, std::string>> lace_inputs = {
      {"util.length_of_stay_days", "current_census"},
      {"util.emergency_admission", "admission_source"},
      {"dx.charlson_comorbidity_index", "comorbidity_index"},
      {"util.ed_visits_6m", "prior_ed_visits_12m"}};
  for (size_t i = 0; i < lace_inputs.size(); ++i) {
    std::string in = l + ".inputs[" + std::to_string(i) + "]";
    INFO(in);
    CHECK(doc.str(in + ".element") == lace_inputs[i].first);
    CHECK(doc.str(in + ".feature") == lace_inputs[i].second);
    CHECK(doc.str(in + ".status") == "on-time");
    CHECK(doc.num(in + ".runs") == 20);
    CHECK(doc.num(in + ".late_runs") == 0);
  }
  size_t hospital = candidate_index(doc, "hospital-score");
  REQUIRE(hospital < 3);
  std::string h = "feasibility[" + std::to_string(hospital) + "]";
  CHECK(doc.str(h + ".computable") == "gaps");
  CHECK(doc.str(h + ".missing[0]") == "util.discharge_from_oncology");
  CHECK(doc.str(h + ".missing[1]") == "proc.any_procedure_during_stay");
  CHECK(doc.str(h + ".inputs[1].element") == "util.discharge_from_oncology");
  CHECK(doc.is_null(h + ".inputs[1].feature"));
  CHECK(doc.str(h + ".inputs[1].status") == "missing");
  size_t lvmc = candidate_index(doc, "lvmc-readmit-30d");
  REQUIRE(lvmc < 3);
  std::string m = "feasibility[" + std::to_string(lvmc) + "]";
  CHECK(doc.str(m + ".computable") == "gaps");
  CHECK(doc.at(m + ".in_house").boolean);
  CHECK(doc.size(m + ".missing") == 1);
  CHECK(doc.str(m + ".missing[0]") == "demo.age");
  // lab.haemoglobin is wanted within 48 hours, stricter than nothing: the entry's recency is used.
  CHECK(doc.str(m + ".inputs[6].element") == "lab.haemoglobin");
  CHECK(doc.str(m + ".inputs[6].recency") == "P2D");
  CHECK(doc.str(m + ".inputs[6].allowed_age") == "P2D");

  // Recommendation.
  CHECK(doc.str("recommendation.decision") == "reuse-and-validate");
  CHECK(doc.str("recommendation.candidate") == "lace-index");
  CHECK(doc.is_null("recommendation.cheapest_fix"));
  REQUIRE(doc.size("recommendation.reasons") >= 3);
  CHECK(doc.str("recommendation.summary").find("validate and reuse LACE index") != std::string::npos);
  CHECK(doc.size("cautions") == 3);
  CHECK(doc.str("cautions[1]") == "An established score must be validated on local data before use.");
}

TEST_CASE("intake golden: day-case return to theatre — nothing covers, timing fails: fix the data plan first") {
  int status = 0;
  Json doc = demo_json("day-case-return-to-theatre.proposal.yaml", &status);
  CHECK(status == 1);
  CHECK(doc.str("proposal") == "day-case-return-to-theatre");
  CHECK(doc.str("model") == "discharge_delay");
  CHECK(doc.str("timing.verdict") == "at-risk");
  CHECK(doc.num("timing.runs") == 28);
  CHECK(doc.num("timing.ok") == 23);
  CHECK(doc.num("timing.failed") == 5);
  CHECK(doc.num("timing.tightest_slack_seconds") == -3000);
  REQUIRE(doc.size("timing.patterns") == 2);
  CHECK(doc.str("timing.patterns[0].description") == "fails every Monday (4 of 4 Monday runs)");
  CHECK(doc.num("timing.patterns[0].runs") == 4);
  // A tie between landing earlier and starting later goes to the data plan.
  CHECK(doc.str("timing.patterns[0].cheapest.kind") == "land-earlier");
  CHECK(doc.num("timing.patterns[0].start_later.seconds") == 3000);
  CHECK(doc.str("timing.patterns[1].description").find("fails on 2026-03-08, a daylight-saving change") == 0);
  CHECK(doc.str("timing.patterns[1].cheapest.node") == "census_snapshot");
  CHECK(doc.num("timing.patterns[1].cheapest.seconds") == 900);

  CHECK(doc.str("reuse.recommendation") == "build");
  CHECK(doc.size("reuse.candidates") == 0);
  CHECK(doc.size("feasibility") == 0);

  CHECK(doc.str("recommendation.decision") == "fix-data-plan-first");
  CHECK(doc.is_null("recommendation.candidate"));
  CHECK(doc.str("recommendation.cheapest_fix.kind") == "land-earlier");
  CHECK(doc.str("recommendation.cheapest_fix.node") == "bed_board");
  CHECK(doc.num("recommendation.cheapest_fix.seconds") == 3000);
  CHECK(doc.str("recommendation.summary").find("(50m earlier)") != std::string::npos);
  CHECK(doc.size("recommendation.reasons") == 4);
  CHECK(doc.str("recommendation.reasons[3]").find("no established score or in-house model covers") == 0);
  CHECK(doc.size("cautions") == 3);
}

TEST_CASE("intake text and markdown carry the decision, its reasons and the cautions") {
  Outcome text = run("intake " + kPipelines + "readmit-30d.proposal.yaml" + kWindow);
  CHECK(text.status == 1);
  CHECK(text.out.find("recommendation: reuse-and-validate\n") != std::string::npos);
  CHECK(text.out.find("  LACE index [lace-index] covers — computable: on-time\n") != std::string::npos);
  CHECK(text.out.find("    proc.any_procedure_during_stay  —                     —      missing\n") !=
        std::string::npos);
  CHECK(text.out.find("An established score must be validated on local data before use.") != std::string::npos);

  Outcome md = run("intake " + kPipelines + "day-case-return-to-theatre.proposal.yaml" + kWindow + " --format markdown");
  CHECK(md.status == 1);
  CHECK(md.out.find("**Recommendation: fix-data-plan-first.**") != std::string::npos);
  CHECK(md.out.find("| runs | ok | degraded | failed | tightest slack |\n|---:|---:|---:|---:|---|\n| 28 | 23 | 0 | 5 | -50m") !=
        std::string::npos);
  CHECK(md.out.find("| fails every Monday (4 of 4 Monday runs) | 4 | `bed_board` → `planned_discharges` | 'bed_board' would have to land by 06:30 instead of 07:20 (50m earlier)") !=
        std::string::npos);
  CHECK(md.out.find("#### Cautions") != std::string::npos);
  CHECK(md.out.find("readyby gives no clinical advice") != std::string::npos);

  Outcome lace_md = run("intake " + kPipelines + "readmit-30d.proposal.yaml" + kWindow + " --format markdown");
  CHECK(lace_md.out.find("| LACE index | **on-time** |") != std::string::npos);
}

TEST_CASE("intake: bad proposals and usage are exit 2 with PATH:LINE:COL errors") {
  const std::string head = "proposal: bad\noutcome: unplanned readmission within 30 days\n";
  struct Case {
    const char* name;
    std::string text;
    std::string expected;   // after the proposal's path
  };
  const std::vector<Case> cases = {
      {"missing plan file", head + "plan: nowhere.plan.yaml\nmodel: readmit_risk\n",
       ":3:7: error: cannot read the plan file '" + (temp_dir() / "nowhere.plan.yaml").string() +
           "' (a relative path is read from the proposal's folder)\n  plan: nowhere.plan.yaml\n        ^\n"},
      {"model not in plan", head + "plan: " + kDemoPlan + "\nmodel: readmit_rsk\n",
       ":4:8: error: no model 'readmit_rsk' in " + kDemoPlan + " (did you mean 'readmit_risk'?)\n"},
      {"unknown outcome text", "proposal: bad\noutcome: readmision-30d\nplan: " + kDemoPlan + "\nmodel: readmit_risk\n",
       ":2:10: error: unknown outcome 'readmision-30d': not an outcome concept id, and no concept's label or synonym "
       "matches it (did you mean 'readmission-30d'?)\n"},
      {"no plan", head + "model: readmit_risk\n",
       ":1:1: error: the proposal names no 'plan': intake needs the data plan that would feed the model (plan: FILE)\n"},
      {"no model", head + "plan: " + kDemoPlan + "\n",
       ":1:1: error: the proposal names no 'model': intake needs the model of the plan that would make the "
       "predictions (model: ID)\n"},
      {"unknown key (the proposal loader)", head + "plan: " + kDemoPlan + "\nmodel: readmit_risk\nmodle: x\n",
       ":5:1: error: unknown key 'modle'"},
  };
  for (size_t i = 0; i < cases.size(); ++i) {
    const Case& c = cases[i];
    INFO(c.name);
    std::string path = write_proposal("bad" + std::to_string(i) + ".proposal.yaml", c.text);
    Outcome o = run("intake " + path + kWindow);
    INFO(o.out);
    CHECK(o.status == 2);
    CHECK(o.out.find(path + c.expected) != std::string::npos);
  }
  CHECK(run("intake").status == 2);
  CHECK(run("intake " + kPipelines + "readmit-30d.proposal.yaml --format yaml").out.find(
            "--format must be text, json or markdown") != std::string::npos);
  Outcome no_runs = run("intake " + kPipelines + "readmit-30d.proposal.yaml --from 2026-02-28 --days 2");
  CHECK(no_runs.status == 2);   // readmit_risk runs on weekdays only
  CHECK(no_runs.out.find("has no runs") != std::string::npos);
  CHECK(run("intake --help").status == 0);
  CHECK(run("help").out.find("intake") != std::string::npos);
}

TEST_CASE("intake: a plan that holds and nothing covers gives build, exit 0") {
  std::string plan = (temp_dir() / "calm.plan.yaml").string();
  std::ofstream(plan) << "plan: calm\ntimezone: America/Chicago\nsources:\n  feed:\n    schedule: stream\n"
                         "features:\n  f:\n    inputs: [feed]\n    max_age: PT1H\nmodels:\n  m:\n    features: [f]\n"
                         "    runs:\n      - at: \"0 6 * * *\"\n";
  std::string path = write_proposal("calm.proposal.yaml",
                                    "proposal: calm\noutcome: unplanned return to theatre after day-case surgery\n"
                                    "plan: calm.plan.yaml\nmodel: m\n");
  Outcome o = run("intake " + path + " --from 2026-03-01 --days 14 --format json");
  CHECK(o.status == 0);
  Json doc;
  REQUIRE(JsonParser(o.out).parse(&doc));
  CHECK(doc.str("timing.verdict") == "on-time");
  CHECK(doc.num("timing.runs") == 14);
  CHECK(doc.str("recommendation.decision") == "build");
}
