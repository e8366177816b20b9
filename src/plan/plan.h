#pragma once
// The data plan: plain structs, no YAML past the loader.
//
// A plan has sources (data arriving from outside), jobs (transformations),
// features (what models consume) and models (with run times). Sources, jobs
// and features share one id namespace and are all "nodes"; nodes are stored
// in one vector and refer to each other by index. The loader guarantees every
// invariant stated here; engines rely on them without re-checking.

#include <optional>
#include <string>
#include <vector>

#include "time/calendar.h"
#include "time/cron.h"
#include "time/duration.h"
#include "time/zone.h"
#include "util/diagnostics.h"

namespace readyby {

enum class NodeKind { source, job, feature };
const char* to_string(NodeKind kind);

struct Node {
  std::string id;
  NodeKind kind = NodeKind::source;
  std::string description;
  SourcePos pos;            // where the node's id is written

  // Time: every node has a zone (its own, else the plan's) and a calendar
  // (empty when none). They matter for cron schedules and cron triggers only.
  const Zone* zone = nullptr;   // never null after loading
  int calendar = -1;            // index into Plan::calendars, -1 = none

  // Sources.
  bool stream = false;              // schedule "stream": data continuously
  std::optional<Cron> schedule;     // set for non-stream sources
  Duration lands_after;             // scheduled start -> data usable
  Duration data_lag;                // delivered data reaches (start - data_lag)
  std::optional<Duration> history;  // how far back its data reaches

  // Jobs and features.
  std::vector<int> inputs;          // node indices, in the order written; empty for sources
  std::optional<Cron> trigger;      // nullopt: triggered by inputs
  SourcePos schedule_pos;           // where the schedule or cron trigger value is written
  Duration run_time;

  // Features.
  Duration max_age;                 // required for features
  std::optional<Duration> lookback;
  bool optional = false;
  std::vector<std::string> elements;

  // Edits (DESIGN §9 `fail`): the node never lands, E is undefined for every
  // w. Never set by the loader; only engine/edit.h sets it on a copy.
  bool fails = false;
};

struct RunSpec {
  Cron at;
  int calendar = -1;
  SourcePos pos;
};

struct Model {
  std::string id;
  std::string description;
  SourcePos pos;
  const Zone* zone = nullptr;      // never null after loading
  std::vector<int> features;       // node indices (all features), in the order written
  std::vector<RunSpec> runs;
};

struct Plan {
  std::string path;                // the file it was read from
  std::string id;
  std::string title;
  const Zone* zone = nullptr;
  std::vector<Calendar> calendars;
  std::vector<Node> nodes;         // sources, then jobs, then features, each in file order
  std::vector<Model> models;

  /// Index of the node with this id, or -1.
  int find_node(std::string_view id) const;
  /// Index of the model with this id, or -1.
  int find_model(std::string_view id) const;
  /// The calendar at `index`, or an empty calendar for -1.
  const Calendar& calendar(int index) const;

  size_t count(NodeKind kind) const;
};

}  // namespace readyby
