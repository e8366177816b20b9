#include <catch2/catch.hpp>
#include <yaml-cpp/yaml.h>

#include <random>
#include <sstream>

#include "engine/edit.h"
#include "plan/plan_loader.h"
#include "plan_fixture.h"
#include "random_plan.h"
#include "reference.h"

using namespace readyby;
using readyby::testing::plan_from_text;

namespace {

const char kPlan[] = R"(plan: edits
timezone: America/Chicago
sources:
  lab_batch:
    schedule: "30 2 * * *"
    lands_after: PT40M
    data_lag: PT2H30M
  adt_stream:
    schedule: stream
    lands_after: PT5M
  spare_feed:
    schedule: "0 1 * * *"
jobs:
  labs_clean:
    inputs: [lab_batch]
    run_time: PT15M
  adt_clean:
    inputs: [adt_stream]
    trigger: "0 * * * *"
    run_time: PT10M
features:
  creat_delta:
    inputs: [labs_clean]
    max_age: PT8H
  census:
    inputs: [adt_clean]
    max_age: PT2H
    optional: true
  other:
    inputs: [spare_feed]
    max_age: PT30H
models:
  ward_risk:
    features: [creat_delta, census]
    runs:
      - at: "0 6 * * *"
  other_model:
    features: [other]
    runs:
      - at: "0 5 * * *"
)";

}  // namespace

TEST_CASE("edits are read from their command-line text and written back the same way") {
  Plan plan = plan_from_text(kPlan);
  struct Case {
    EditKind kind;
    const char* value;
    const char* text;
  } cases[] = {
      {EditKind::delay, "lab_batch=PT30M", "delay lab_batch=PT30M"},
      {EditKind::delay, "lab_batch=-PT5M", "delay lab_batch=-PT5M"},
      {EditKind::delay, "labs_clean=P1D", "delay labs_clean=P1D"},
      {EditKind::delay, "lab_batch=PT90M", "delay lab_batch=PT1H30M"},
      {EditKind::fail, "adt_stream", "fail adt_stream"},
      {EditKind::schedule, "labs_clean=30 3 * * *", "schedule labs_clean=30 3 * * *"},
      {EditKind::schedule, "adt_clean=inputs", "schedule adt_clean=inputs"},
      {EditKind::schedule, "adt_stream=*/15 * * * *", "schedule adt_stream=*/15 * * * *"},
      {EditKind::runs, "ward_risk=0 7 * * mon-fri", "runs ward_risk=0 7 * * mon-fri"},
      {EditKind::max_age, "creat_delta=PT12H", "max_age creat_delta=PT12H"},
  };
  for (const Case& c : cases) {
    INFO(c.value);
    EditParse parsed = parse_edit_value(plan, c.kind, c.value);
    INFO(parsed.error);
    REQUIRE(parsed.value);
    CHECK(edit_text(plan, *parsed.value) == c.text);
    EditParse again = parse_edit(plan, c.text);
    REQUIRE(again.value);
    CHECK(*again.value == *parsed.value);
  }
}

TEST_CASE("a bad edit is refused with a message that names the problem") {
  Plan plan = plan_from_text(kPlan);
  struct Case {
    EditKind kind;
    const char* value;
    const char* error;
  } cases[] = {
      {EditKind::delay, "lab_bach=PT30M", "no node 'lab_bach' in the plan (did you mean 'lab_batch'?)"},
      {EditKind::delay, "zzzz=PT30M", "no node 'zzzz' in the plan"},
      {EditKind::delay, "lab_batch", "expected NODE=DURATION, found 'lab_batch'"},
      {EditKind::delay, "=PT1H", "missing node id before '='"},
      {EditKind::delay, "lab_batch=-PT2H",
       "a delay of -PT2H would make the lands_after of source 'lab_batch' negative (it is PT40M)"},
      {EditKind::delay, "labs_clean=-PT16M",
       "a delay of -PT16M would make the run_time of job 'labs_clean' negative (it is PT15M)"},
      {EditKind::delay, "lab_batch=P1M",
       "bad duration 'P1M' for the delay of 'lab_batch': "},
      {EditKind::fail, "lab_batch=PT1H", "fail takes a node id only, found 'lab_batch=PT1H'"},
      {EditKind::schedule, "lab_batch=61 2 * * *", "bad cron '61 2 * * *' for the schedule of 'lab_batch': "},
      {EditKind::schedule, "lab_batch=inputs",
       "source 'lab_batch' has no inputs to be triggered by; give it a cron schedule"},
      {EditKind::schedule, "labs_clean=0 0 30 2 *",
       "the schedule '0 0 30 2 *' of job 'labs_clean' never fires (no occurrence within 1,462 days)"},
      {EditKind::runs, "ward_risc=0 6 * * *", "no model 'ward_risc' in the plan (did you mean 'ward_risk'?)"},
      {EditKind::runs, "ward_risk=0 0 31 4 *",
       "the runs '0 0 31 4 *' of model 'ward_risk' never fire (no occurrence within 1,462 days)"},
      {EditKind::max_age, "labs_clean=PT1H", "max_age applies to features; 'labs_clean' is a job"},
      {EditKind::max_age, "creat_dleta=PT1H", "no feature 'creat_dleta' in the plan (did you mean 'creat_delta'?)"},
  };
  for (const Case& c : cases) {
    INFO(c.value);
    EditParse parsed = parse_edit_value(plan, c.kind, c.value);
    CHECK_FALSE(parsed.value);
    // Cron and duration messages continue with their modules' own words.
    if (std::string(c.error).ends_with(": ")) CHECK(parsed.error.starts_with(c.error));
    else CHECK(parsed.error == c.error);
  }
  CHECK(parse_edit(plan, "dealy lab_batch=PT1H").error == "unknown edit 'dealy' (did you mean 'delay'?)");
  CHECK(parse_edit(plan, "delay").error == "delay needs a value");
}

TEST_CASE("edits change the copy of the plan as DESIGN §9 says, in order") {
  Plan plan = plan_from_text(kPlan);
  auto edit = [&](EditKind k, const char* v) { return *parse_edit_value(plan, k, v).value; };
  std::vector<Edit> edits = {edit(EditKind::delay, "lab_batch=PT20M"), edit(EditKind::delay, "lab_batch=-PT5M"),
                             edit(EditKind::delay, "labs_clean=PT1H"),  edit(EditKind::fail, "spare_feed"),
                             edit(EditKind::schedule, "adt_clean=inputs"), edit(EditKind::schedule, "adt_stream=15 * * * *"),
                             edit(EditKind::runs, "ward_risk=0 7 * * *"), edit(EditKind::max_age, "census=PT3H")};
  Plan edited = apply_edits(plan, edits);
  auto node = [&](const char* id) -> const Node& { return edited.nodes[static_cast<size_t>(edited.find_node(id))]; };
  CHECK(node("lab_batch").lands_after.seconds == 40 * 60 + 15 * 60);
  CHECK(node("labs_clean").run_time.seconds == 75 * 60);
  CHECK(node("spare_feed").fails);
  CHECK_FALSE(node("lab_batch").fails);
  CHECK_FALSE(node("adt_clean").trigger);
  CHECK_FALSE(node("adt_stream").stream);
  CHECK(node("adt_stream").schedule->text == "15 * * * *");
  CHECK(node("census").max_age.seconds == 3 * 3600);
  REQUIRE(edited.models[0].runs.size() == 1);
  CHECK(edited.models[0].runs[0].at.text == "0 7 * * *");
  // The original is untouched.
  CHECK(plan.nodes[static_cast<size_t>(plan.find_node("lab_batch"))].lands_after.seconds == 40 * 60);
  CHECK(edited_nodes(edits) == std::vector<int>{plan.find_node("lab_batch"), plan.find_node("adt_stream"),
                                                 plan.find_node("spare_feed"), plan.find_node("labs_clean"),
                                                 plan.find_node("adt_clean")});
}

TEST_CASE("re-evaluation rebuilds only the downstream cone and reports the runs that change") {
  Plan plan = apply_edits(plan_from_text(kPlan), {});
  plan.models[0].runs[0].at = *parse_cron("30 3 * * *").value;
  Evaluation base = evaluate(plan, *parse_date("2026-03-02"), 3);
  // Runs at 03:30 (edited in below): creat_delta needs data through 19:30 the
  // day before; lab_batch's 02:30 delivery (data through 00:00) lands 03:10,
  // labs_clean finishes 03:25: 5 minutes of slack.
  REQUIRE(base.runs.size() == 6);
  for (const RunResult& r : base.runs) REQUIRE(r.status == RunStatus::ok);
  std::vector<Edit> edits = {*parse_edit_value(plan, EditKind::delay, "lab_batch=PT6M").value};
  Plan edited = apply_edits(plan, edits);
  Evaluation after = reevaluate(base, edited, edits);
  Evaluation full = evaluate(edited, base.from, base.days);
  // Only lab_batch, labs_clean and creat_delta were rebuilt.
  size_t cone_pieces = 0;
  for (const char* id : {"lab_batch", "labs_clean", "creat_delta"}) {
    cone_pieces += full.engine().profile(edited.find_node(id)).pieces().size();
  }
  CHECK(after.engine().piece_count() == cone_pieces);
  CHECK(after.engine().piece_count() < full.engine().piece_count());
  std::vector<StatusChange> changes = status_changes(base, after);
  REQUIRE(changes.size() == 3);
  for (const StatusChange& c : changes) {
    CHECK(edited.models[static_cast<size_t>(c.model)].id == "ward_risk");
    CHECK(c.before == RunStatus::ok);
    CHECK(c.after == RunStatus::fail);
  }
  std::vector<RunCounts> counts = run_counts(edited, after);
  CHECK(counts[0].fail == 3);
  CHECK(counts[1].ok == 3);
  CHECK_FALSE(after.ok());
  // Five minutes later is still on time.
  std::vector<Edit> small = {*parse_edit_value(plan, EditKind::delay, "lab_batch=PT5M").value};
  Plan edited_small = apply_edits(plan, small);
  CHECK(status_changes(base, reevaluate(base, edited_small, small)).empty());
}

namespace {

// Writes edits into the plan's YAML text directly (not through apply_edits):
// the text a user would get by editing the file by hand. `fail` has no
// spelling in a plan file; those nodes are returned for the caller to mark on
// the loaded plan.
std::string write_in(const std::string& text, const Plan& plan, const std::vector<Edit>& edits,
                     std::vector<std::string>* failing) {
  YAML::Node root = YAML::Load(text);
  auto node_map = [&](int n) {
    const Node& node = plan.nodes[static_cast<size_t>(n)];
    const char* section = node.kind == NodeKind::source ? "sources" : node.kind == NodeKind::job ? "jobs" : "features";
    return root[section][node.id];
  };
  auto seconds_of = [](const YAML::Node& v) -> int64_t {
    return v ? parse_duration(v.as<std::string>()).value->seconds : 0;
  };
  for (const Edit& e : edits) {
    if (e.kind == EditKind::runs) {
      YAML::Node runs(YAML::NodeType::Sequence), run;
      run["at"] = e.cron->text;
      runs.push_back(run);
      root["models"][plan.models[static_cast<size_t>(e.target)].id]["runs"] = runs;
      continue;
    }
    YAML::Node n = node_map(e.target);
    const bool source = plan.nodes[static_cast<size_t>(e.target)].kind == NodeKind::source;
    switch (e.kind) {
      case EditKind::delay: {
        const char* key = source ? "lands_after" : "run_time";
        n[key] = "PT" + std::to_string(seconds_of(n[key]) + e.seconds) + "S";
        break;
      }
      case EditKind::fail: failing->push_back(plan.nodes[static_cast<size_t>(e.target)].id); break;
      case EditKind::schedule:
        if (source) {
          n["schedule"] = e.cron->text;
        } else if (e.cron) {
          n["trigger"] = e.cron->text;
        } else {
          n.remove("trigger");
          n.remove("timezone");
          n.remove("calendar");
        }
        break;
      case EditKind::max_age: n["max_age"] = "PT" + std::to_string(e.seconds) + "S"; break;
      case EditKind::runs: break;
    }
  }
  YAML::Emitter out;
  out << root;
  return out.c_str();
}

// A random edit in its text form, for `plan`.
std::string random_edit(std::mt19937_64& rng, const Plan& plan) {
  auto pick = [&](size_t n) { return static_cast<size_t>(rng() % n); };
  const Node& node = plan.nodes[pick(plan.nodes.size())];
  const char* crons[] = {"0 3 * * *", "45 1 * * *", "30 2 * * mon-fri", "0 */4 * * *", "15 5 * * 0", "0 6,18 * * *"};
  switch (pick(8)) {
    case 0:
    case 1:
    case 2: {
      int minutes = static_cast<int>(pick(241)) - 60;
      return "delay " + node.id + "=" + (minutes < 0 ? "-" : "") + "PT" + std::to_string(std::abs(minutes)) + "M";
    }
    case 3: return "fail " + node.id;
    case 4: return "schedule " + node.id + "=" + (node.kind != NodeKind::source && pick(3) == 0 ? "inputs" : crons[pick(6)]);
    case 5: return "runs " + plan.models[pick(plan.models.size())].id + "=" + crons[pick(6)];
    default: {
      std::vector<const Node*> features;
      for (const Node& n : plan.nodes) {
        if (n.kind == NodeKind::feature) features.push_back(&n);
      }
      return "max_age " + features[pick(features.size())]->id + "=PT" + std::to_string(1 + pick(36)) + "H";
    }
  }
}

}  // namespace

TEST_CASE("what-if equals check on the plan with the edits written in, on random plans") {
  std::mt19937_64 rng(20260309);
  const char* windows[] = {"2026-03-07", "2026-10-31", "2026-03-28", "2026-10-24", "2026-04-04", "2026-10-03"};
  int plans = 0, edits_applied = 0, compared_runs = 0, changed_runs = 0, partial_rebuilds = 0;
  for (int i = 0; i < 360; ++i) {
    std::string text = readyby::testing::random_plan(rng, i);
    PlanLoadResult loaded = load_plan_text(text, "random.yaml");
    if (!loaded.plan) continue;  // a random schedule that never fires under its calendar
    const Plan& plan = *loaded.plan;
    std::vector<Edit> edits;
    std::vector<std::string> texts;
    for (int k = 0, n = 1 + static_cast<int>(rng() % 3); k < n; ++k) {
      std::string t = random_edit(rng, plan);
      EditParse p = parse_edit(plan, t);
      if (!p.value) continue;  // e.g. a negative delay below zero
      // Later edits are checked against the plan as edited so far.
      if (!edit_problem(apply_edits(plan, edits), *p.value).empty()) continue;
      edits.push_back(*p.value);
      texts.push_back(t);
    }
    std::vector<std::string> failing;
    std::string written = write_in(text, plan, edits, &failing);
    PlanLoadResult reloaded = load_plan_text(written, "written.yaml");
    INFO(text << "\nedits:\n" << [&] { std::string s; for (auto& t : texts) s += "  " + t + "\n"; return s; }()
              << "written:\n" << written << reloaded.rendered);
    REQUIRE(reloaded.plan);
    Plan by_hand = std::move(*reloaded.plan);
    for (const std::string& id : failing) by_hand.nodes[static_cast<size_t>(by_hand.find_node(id))].fails = true;

    LocalDays from = *parse_date(windows[i % 6]);
    Evaluation base = evaluate(plan, from, 5);
    Plan edited = apply_edits(plan, edits);
    // Half the time with cones prepared by the caller.
    DownstreamCones cones(Lineage::of(plan));
    Evaluation after = reevaluate(base, edited, edits, i % 2 ? &cones : nullptr);
    Evaluation expected = evaluate(by_hand, from, 5);
    reference::Freshness ref(by_hand);
    if (after.engine().piece_count() < expected.engine().piece_count()) ++partial_rebuilds;
    REQUIRE(after.runs.size() == expected.runs.size());
    CHECK(after.ok() == expected.ok());
    for (size_t r = 0; r < after.runs.size(); ++r) {
      const RunResult& got = after.runs[r];
      const RunResult& want = expected.runs[r];
      INFO("run " << r << " at " << format_rfc3339(want.at, nullptr));
      REQUIRE(got.model == want.model);
      REQUIRE(got.at == want.at);
      REQUIRE(got.status == want.status);
      REQUIRE(got.features.size() == want.features.size());
      for (size_t f = 0; f < got.features.size(); ++f) {
        const FeatureResult& g = got.features[f];
        const FeatureResult& w = want.features[f];
        INFO("feature " << by_hand.nodes[static_cast<size_t>(w.feature)].id);
        REQUIRE(g.needs_data_through == w.needs_data_through);
        REQUIRE(g.ready_at == w.ready_at);
        REQUIRE(g.slack_seconds == w.slack_seconds);
        REQUIRE(g.status == w.status);
        REQUIRE(after.chain(g) == expected.chain(w));
        // And the literal recursion on the hand-edited plan agrees.
        reference::Freshness::Result lit = ref.at(w.feature, w.needs_data_through);
        REQUIRE(g.ready_at == lit.ready);
        REQUIRE(after.chain(g) == lit.chain);
      }
      ++compared_runs;
    }
    changed_runs += static_cast<int>(status_changes(base, after).size());
    edits_applied += static_cast<int>(edits.size());
    ++plans;
  }
  CHECK(plans >= 300);
  CHECK(edits_applied > 400);
  CHECK(compared_runs > 3000);
  CHECK(changed_runs >= 40);      // the edits do change outcomes
  CHECK(partial_rebuilds > 100);  // and most re-evaluations rebuild a part only
}

TEST_CASE("a schedule edit is refused exactly when the loader would refuse the plan with it written in") {
  // A yearly job on a calendar that skips five new years in a row: it fires
  // in 2026 and again only in 2032, a silence longer than the 1,462-day
  // horizon. The loader refuses such a schedule whatever today is; an edit to
  // it must be refused too (once, it was checked from one fixed date only).
  const std::string plan_text = R"(plan: silent
timezone: Europe/Berlin
calendars:
  closures:
    skip_dates: [2027-01-01, 2028-01-01, 2029-01-01, 2030-01-01, 2031-01-01]
sources:
  feed:
    schedule: "0 5 * * *"
    calendar: closures
features:
  f:
    inputs: [feed]
    max_age: P2D
models:
  m:
    features: [f]
    runs:
      - at: "0 8 * * *"
)";
  Plan plan = plan_from_text(plan_text.c_str());
  EditParse yearly = parse_edit_value(plan, EditKind::schedule, "feed=0 5 1 1 *");
  CHECK_FALSE(yearly.value);
  CHECK(yearly.error.starts_with("the schedule '0 5 1 1 *' of source 'feed' never fires under calendar 'closures': "
                                 "no occurrence within 1,462 days after 2026-01-01T"));
  // The same schedule written into the plan: the loader says the same.
  std::string written = plan_text;
  written.replace(written.find("\"0 5 * * *\""), 11, "\"0 5 1 1 *\"");
  PlanLoadResult loaded = load_plan_text(written, "silent.yaml");
  CHECK_FALSE(loaded.plan);
  CHECK(loaded.rendered.find("never fires under calendar 'closures'") != std::string::npos);
  // A monthly schedule fires around the skipped dates: accepted by both.
  CHECK(parse_edit_value(plan, EditKind::schedule, "feed=0 5 1 * *").value);
}
