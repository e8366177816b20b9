// `readyby report PLAN [--from D] [--days N] [--db DB [--date D]] [--proposal FILE]
//                 [--registry DIR]... --out FILE.html`: the report page.
#include <fcntl.h>
#include <sys/stat.h>
#include <unistd.h>

#include <cstdio>
#include <filesystem>
#include <iostream>

#include "catalog/outcome_resolver.h"
#include "catalog/proposal.h"
#include "catalog/retrieval.h"
#include "catalog/reuse.h"
#include "cli/catalog_session.h"
#include "cli/commands.h"
#include "cli/options.h"
#include "engine/check.h"
#include "history/nightly.h"
#include "history/store.h"
#include "intake/intake.h"
#include "plan/plan_loader.h"
#include "report/html/page.h"
#include "report/html/page_facts.h"
#include "util/text.h"
#include "util/yaml_tree.h"

namespace readyby {

namespace {

/// The history window of the page: as `nightly`'s default.
constexpr int kHistoryWindow = 28;

struct ReportOptions {
  std::string plan_path;
  std::optional<LocalDays> from;
  int days = 28;
  std::string db_path;             // empty: no history
  std::optional<LocalDays> date;   // with --db; default today in the plan's zone
  std::string proposal_path;       // empty: no intake section
  std::vector<std::string> registries;
  std::string out_path;
};

std::string parse_report_args(const std::vector<std::string>& args, ReportOptions* o) {
  ArgTable table{window_rules(&o->from, &o->days), one_file("report", "PLAN", &o->plan_path)};
  table.options.push_back(path_rule("--db", "a FILE", &o->db_path));
  table.options.push_back(date_rule("--date", &o->date));
  table.options.push_back(path_rule("--proposal", "a FILE", &o->proposal_path));
  table.options.push_back(path_rule("--out", "a FILE", &o->out_path));
  table.options.push_back(registry_rule(&o->registries));
  if (std::string error = parse_args(args, table); !error.empty()) return error;
  if (o->plan_path.empty()) return "report needs a PLAN file";
  if (o->out_path.empty()) return "report needs --out FILE.html";
  if (o->date && o->db_path.empty()) return "--date goes with --db";
  return "";
}

// Writes `content` to `path` through a temporary file in the same folder,
// renamed into place: a reader never sees a half-written page.
bool write_atomically(const std::string& path, const std::string& content, std::string* error) {
  std::filesystem::path target(path);
  std::filesystem::path folder = target.has_parent_path() ? target.parent_path() : std::filesystem::path(".");
  std::string temp = (folder / ("." + target.filename().string() + ".XXXXXX")).string();
  int fd = mkstemp(temp.data());
  if (fd < 0) {
    *error = "cannot create a file in '" + folder.string() + "'";
    return false;
  }
  size_t written = 0;
  while (written < content.size()) {
    ssize_t n = ::write(fd, content.data() + written, content.size() - written);
    if (n <= 0) break;
    written += static_cast<size_t>(n);
  }
  bool ok = written == content.size() && fchmod(fd, 0644) == 0 && fsync(fd) == 0;
  ok = (::close(fd) == 0) && ok;
  if (!ok || std::rename(temp.c_str(), path.c_str()) != 0) {
    std::remove(temp.c_str());
    *error = "cannot write '" + path + "'";
    return false;
  }
  return true;
}

// Where a key's value is written in the proposal, for diagnostics.
SourcePos value_pos(const std::string& path, std::string_view key) {
  std::string text;
  read_file(path, &text);
  YamlNode root;
  Diagnostics scratch;
  parse_yaml(path, text, &root, &scratch);
  if (const YamlNode* v = root.find(key)) return v->pos;
  if (root.is_map() && !root.entries.empty()) return root.entries.front().first.pos;
  return {1, 1};
}

bool same_file(const std::string& a, const std::string& b) {
  std::error_code ec;
  return std::filesystem::equivalent(a, b, ec);
}

struct Screening {
  CatalogSession session;
  std::vector<Entry> entries;
  std::optional<Proposal> proposal;
  std::optional<IntakeReport> report;
};

// Screens the proposal against `plan` over the report's window. Prints the
// problems and returns kExitBadInput, or kExitOk.
int screen(const ReportOptions& o, const Plan& plan, Screening* s) {
  if (int rc = open_catalog(o.registries, true, &s->session); rc != kExitOk) return rc;
  Diagnostics diags;
  s->proposal = load_proposal_file(o.proposal_path, s->session.vocabulary, &diags);
  if (s->proposal) {
    const Proposal& p = *s->proposal;
    diags.add_source(p.path, [&] { std::string t; read_file(p.path, &t); return t; }());
    if (!p.plan.empty() && !same_file(p.plan, o.plan_path)) {
      diags.error(p.path, value_pos(p.path, "plan"),
                  "the proposal's plan '" + p.plan + "' is not the plan of the report ('" + o.plan_path + "')");
    }
    if (p.model.empty()) {
      diags.error(p.path, value_pos(p.path, "model"),
                  "the proposal names no 'model': the report needs the model of the plan that would make the "
                  "predictions (model: ID)");
    } else if (plan.find_model(p.model) < 0) {
      std::vector<std::string> ids;
      for (const Model& m : plan.models) ids.push_back(m.id);
      diags.error(p.path, value_pos(p.path, "model"),
                  "no model '" + p.model + "' in " + o.plan_path + did_you_mean(p.model, ids));
    }
  }
  if (!diags.empty()) {
    std::cerr << diags.render();
    return kExitBadInput;
  }
  const Proposal& p = *s->proposal;
  int model = plan.find_model(p.model);
  if (run_instants(plan, plan.models[static_cast<size_t>(model)], *o.from, o.days).empty()) {
    std::cerr << "readyby: model '" << p.model << "' has no runs in the report's window; widen --days\n";
    return kExitBadInput;
  }
  // The same retrieval and matching as `intake` and `reuse` (docs/reuse.md).
  OutcomeResolver resolver(s->session.vocabulary);
  std::string error;
  Retrieved retrieved = retrieve_candidates(*s->session.index, p, resolver, s->session.vocabulary, &error);
  if (!error.empty()) {
    std::cerr << "readyby: cannot read the catalogue index: " << error << "\n";
    return kExitBadInput;
  }
  s->entries = std::move(retrieved.entries);  // the report's candidates point into these
  ReuseReport reuse =
      match_proposal(p, resolver, s->session.vocabulary, s->entries, retrieved.signals, s->session.index->size());
  s->report = screen_intake(p, plan, model, *o.from, o.days, std::move(reuse), s->session.vocabulary);
  return kExitOk;
}

struct Monitoring {
  std::optional<History> history;
  std::optional<NightlyReport> nightly;
};

int read_history(const ReportOptions& o, const Plan& plan, Monitoring* m) {
  std::string error;
  std::unique_ptr<HistoryStore> store = HistoryStore::open(o.db_path, HistoryStore::Mode::existing, &error);
  if (!store) {
    std::cerr << "readyby: " << error << "\n";
    return kExitBadInput;
  }
  LocalDays date = o.date ? *o.date : today_in(*plan.zone);
  std::vector<std::optional<Instant>> first;
  m->history = store->read(plan, history_needed_since(plan, date, kHistoryWindow), &error, &first);
  if (!m->history) {
    std::cerr << "readyby: " << o.db_path << ": " << error << "\n";
    return kExitBadInput;
  }
  m->nightly = evaluate_nightly(plan, *m->history, first, date, kHistoryWindow);
  return kExitOk;
}

}  // namespace

int cmd_report(const std::vector<std::string>& args) {
  const Command& self = command_named("report");
  if (wants_help(args, self.usage)) return kExitOk;
  ReportOptions o;
  if (std::string problem = parse_report_args(args, &o); !problem.empty()) return usage_error(problem, self.usage);
  std::optional<Plan> loaded = load_plan_or_report(o.plan_path);
  if (!loaded) return kExitBadInput;
  const Plan& plan = *loaded;
  if (!o.from) o.from = today_in(*plan.zone);

  Monitoring monitoring;
  if (!o.db_path.empty()) {
    if (int rc = read_history(o, plan, &monitoring); rc != kExitOk) return rc;
  }
  Screening screening;
  if (!o.proposal_path.empty()) {
    if (int rc = screen(o, plan, &screening); rc != kExitOk) return rc;
  }

  Evaluation ev = evaluate(plan, *o.from, o.days);
  html::PageFacts facts = html::gather_page_facts(plan, ev);
  if (monitoring.nightly) facts.history = html::gather_history_facts(plan, *monitoring.nightly, *monitoring.history);
  if (screening.report) facts.intake = &*screening.report;
  std::string page = html::render_page(facts);
  std::string error;
  if (!write_atomically(o.out_path, page, &error)) {
    std::cerr << "readyby: " << error << "\n";
    return kExitBadInput;
  }
  std::printf("readyby: wrote the report of plan '%s' (%zu runs, %zu KiB) to %s\n", plan.id.c_str(), ev.runs.size(),
              (page.size() + 1023) / 1024, o.out_path.c_str());
  return ev.ok() ? kExitOk : kExitFindings;
}

}  // namespace readyby
