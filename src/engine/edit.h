#pragma once
// Edits of a plan and re-evaluation with them applied (DESIGN §9).
//
// An edit changes a plan before evaluation:
//   delay NODE=DUR      every landing of NODE happens DUR later: DUR is added
//                       to a source's lands_after, to a job's or feature's
//                       run_time. DUR may be negative, but not so negative
//                       that the result falls below zero.
//   fail NODE           NODE never lands: its E is undefined for every w (its
//                       chain is the node alone).
//   schedule NODE=CRON  a source's schedule replaced (a stream becomes a cron
//                       source with no data_lag), or a job's or feature's cron
//                       trigger set or replaced; `schedule NODE=inputs` makes
//                       a job or feature triggered by its inputs.
//   runs MODEL=CRON     a model's run times replaced by the one cron (no
//                       calendar).
//   max_age FEATURE=DUR a feature's max_age replaced.
// Edits apply in order to a copy of the plan; a later edit of the same field
// applies on top of (delay: adds to; others: replaces) an earlier one.
//
// Re-evaluating an edited plan gives exactly what `evaluate` gives on the
// edited copy (every run's status, features, ready_at, slack and chain), and
// what `check` gives on a plan file with the edit written in. It rebuilds only
// the freshness profiles of the edited nodes and of those downstream nodes
// whose inputs' profiles changed (a change absorbed on the way — an input that
// is never the latest, a fixed start time that still catches the data — stops
// there); every other profile, run and finding is reused from the evaluation
// before.
//
// Pure computation: no I/O. Errors are returned as values, never thrown.

#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "engine/check.h"
#include "plan/lineage.h"
#include "plan/plan.h"
#include "time/cron.h"
#include "util/parsed.h"

namespace readyby {

enum class EditKind { delay, fail, schedule, runs, max_age };

/// "delay", "fail", "schedule", "runs", "max_age".
const char* to_string(EditKind kind);
/// The kind named `name` (as to_string writes it), or nullopt.
std::optional<EditKind> parse_edit_kind(std::string_view name);

/// One edit. `target` is a node index (delay, fail, schedule, max_age) or a
/// model index (runs) of the plan it was made for.
struct Edit {
  EditKind kind = EditKind::delay;
  int target = -1;
  int64_t seconds = 0;       // delay: the shift (may be negative); max_age: the new max_age
  std::optional<Cron> cron;  // schedule, runs: the new schedule; schedule: nullopt = triggered by inputs

  static Edit delay(int node, int64_t seconds);
  static Edit fail(int node);
  static Edit schedule(int node, Cron cron);
  static Edit inputs_trigger(int node);
  static Edit runs(int model, Cron cron);
  static Edit max_age(int feature, int64_t seconds);

  friend bool operator==(const Edit& a, const Edit& b);
};

/// The command-line text of an edit: "delay lab_batch=PT30M",
/// "delay lab_batch=-PT5M", "fail lab_batch", "schedule labs_clean=30 3 * * *",
/// "schedule labs_clean=inputs", "runs ward_risk=0 6 * * *",
/// "max_age creat_delta=PT8H". parse_edit reads it back.
std::string edit_text(const Plan& plan, const Edit& edit);
/// The value part only (after the kind and a space): "lab_batch=PT30M", "lab_batch".
std::string edit_value_text(const Plan& plan, const Edit& edit);

/// An edit, or a message saying what is wrong with the text.
using EditParse = Parsed<Edit>;

/// Parses the value of one edit of kind `kind` for `plan`, as an option gives
/// it: "NODE=DUR" (delay: an ISO 8601 duration, optionally preceded by '-';
/// max_age: a duration), "NODE" (fail), "NODE=CRON" or "NODE=inputs"
/// (schedule), "MODEL=CRON" (runs). Errors name the problem the way the plan
/// loader does: an unknown node or model with the nearest id ("no node
/// 'lab_bach' in the plan (did you mean 'lab_batch'?)"), "bad duration ...",
/// "bad cron ...", an edit that does not fit the node (max_age of a job,
/// schedule of a source to inputs, a delay below zero, a schedule that never
/// fires).
EditParse parse_edit_value(const Plan& plan, EditKind kind, std::string_view value);
/// Parses the whole text form "KIND VALUE" (as edit_text writes it).
EditParse parse_edit(const Plan& plan, std::string_view text);

/// Whether `edit` can be applied to `plan`; the message when not (the same
/// checks as parse_edit_value, for edits made in code). "" when it can.
std::string edit_problem(const Plan& plan, const Edit& edit);

/// A copy of `plan` with `edits` applied in order. Every edit must be valid
/// for the plan as edited so far (edit_problem empty); an invalid one is
/// skipped.
Plan apply_edits(const Plan& plan, const std::vector<Edit>& edits);

/// Node indices whose own timing the edits change (delay, fail, schedule
/// targets), sorted, each once. runs and max_age edits change no node's E.
std::vector<int> edited_nodes(const std::vector<Edit>& edits);

/// `edited` (= apply_edits(base's plan, edits)) evaluated over the window of
/// `base`, which must come from evaluate() (runs stored) on the unedited plan.
/// Equal to evaluate(edited, base.from, base.days, observed) in every run,
/// feature, chain and finding, where `observed` are the recorded deliveries
/// `base` was evaluated with (a monitored node keeps them, shifted by a
/// delay; see FreshnessEngine). Only profiles in the downstream cone of
/// edited_nodes are rebuilt, and only runs of models with a feature whose
/// profile changed (or edited by runs/max_age) are recomputed; the rest is
/// reused. When runs or max_age edits move the queried range of w outside
/// `base`'s, everything is rebuilt. `base` and `edited` must outlive the result.
/// `cones` (of the plan's lineage), when given, spares preparing them again:
/// callers that re-evaluate many edits of one plan should pass one.
/// For many probes of a few runs, build a FreshnessEngine from
/// base.engine() and call evaluate_run directly instead (no runs copied).
Evaluation reevaluate(const Evaluation& base, const Plan& edited, const std::vector<Edit>& edits,
                      const DownstreamCones* cones = nullptr);

/// A run whose status an edit changed.
struct StatusChange {
  int model = -1;
  Instant at;
  RunStatus before = RunStatus::ok;
  RunStatus after = RunStatus::ok;
};

/// The runs whose status differs between `before` and `after` (both with
/// stored runs), by instant then model id; a run present in only one of them
/// (a `runs` edit) is not a change and is counted by run_counts instead.
std::vector<StatusChange> status_changes(const Evaluation& before, const Evaluation& after);

/// Runs per status of one model in an evaluation with stored runs.
struct RunCounts {
  int ok = 0, degraded = 0, fail = 0;
  int total() const { return ok + degraded + fail; }
};
std::vector<RunCounts> run_counts(const Plan& plan, const Evaluation& ev);  // indexed by model

}  // namespace readyby
