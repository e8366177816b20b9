#include "report/advice_text.h"

#include <algorithm>
#include <map>

#include "time/duration.h"

namespace readyby {

namespace {

LocalDays local_day(Instant t, const Zone* zone) { return date::floor<date::days>(zone->to_local(t)); }

std::string date_of(Instant t, const Zone* zone) { return format_date(local_day(t, zone)); }

std::string quoted(const Plan& plan, int node) { return "'" + plan.nodes[static_cast<size_t>(node)].id + "'"; }

std::string what(const Plan& plan, int node) {
  const Node& n = plan.nodes[static_cast<size_t>(node)];
  return n.kind == NodeKind::source ? quoted(plan, node) : std::string(to_string(n.kind)) + " " + quoted(plan, node);
}

std::string plural(size_t n, const char* one, const char* many) {
  return std::to_string(n) + " " + (n == 1 ? one : many);
}

const char* status_verb(RunStatus s) { return s == RunStatus::degraded ? "is degraded" : "fails"; }

std::string weekday_list(const std::vector<int>& days) {
  // Consecutive weekdays as a range ("Monday to Friday"), else a list.
  bool consecutive = days.size() >= 3;
  for (size_t i = 1; i < days.size(); ++i) consecutive = consecutive && days[i] == days[i - 1] + 1;
  if (consecutive) return std::string(weekday_name(days.front())) + " to " + weekday_name(days.back());
  std::string out;
  for (size_t i = 0; i < days.size(); ++i) {
    out += (i == 0 ? "" : i + 1 == days.size() ? " and " : ", ") + std::string(weekday_name(days[i]));
  }
  return out;
}

std::string zone_names(const std::vector<const Zone*>& zones) {
  std::string out;
  for (size_t i = 0; i < zones.size(); ++i) {
    out += (i == 0 ? "" : i + 1 == zones.size() ? " and " : ", ") + zones[i]->name();
  }
  return out;
}

std::string steady_text(const std::vector<const Zone*>& zones) {
  if (zones.empty()) return "";
  return " while " + zone_names(zones) + (zones.size() == 1 ? " kept its clocks" : " kept their clocks");
}

}  // namespace

std::string clock_on(Instant t, const Zone* zone, LocalDays day) {
  const std::string full = format_local(zone->to_local(t));
  return local_day(t, zone) == day ? full.substr(11) : full;
}


std::string describe_changes(const std::vector<ZoneChange>& changes) {
  // Group the changes by (local date of the change, jump).
  struct Group {
    std::string date;
    int64_t jump;
    std::vector<const Zone*> zones;
  };
  std::vector<Group> groups;
  for (const ZoneChange& c : changes) {
    const std::string d = date_of(c.at, c.zone);
    const int64_t jump = c.offset_after - c.offset_before;
    auto it = std::find_if(groups.begin(), groups.end(), [&](const Group& g) { return g.date == d && g.jump == jump; });
    if (it == groups.end()) groups.push_back({d, jump, {c.zone}});
    else if (std::find(it->zones.begin(), it->zones.end(), c.zone) == it->zones.end()) it->zones.push_back(c.zone);
  }
  std::string out;
  for (size_t i = 0; i < groups.size(); ++i) {
    const Group& g = groups[i];
    out += i == 0 ? "" : " and ";
    out += (g.zones.size() == 1 ? "a daylight-saving change in " : "the daylight-saving changes in ") +
           zone_names(g.zones) + " (clocks " + (g.jump > 0 ? "forward " : "back ") +
           human_duration(g.jump > 0 ? g.jump : -g.jump) + " on " + g.date + ")";
  }
  return out;
}

std::string describe_pattern(const Plan& plan, const Pattern& p) {
  const Zone* zone = plan.models[static_cast<size_t>(p.model)].zone;
  const std::string verb = status_verb(p.status);
  switch (p.kind) {
    case PatternKind::every_run:
      return verb + " every run (" + std::to_string(p.runs.size()) + " of " + std::to_string(p.runs.size()) + ")";
    case PatternKind::weekday:
      return verb + " every " + weekday_name(p.weekday) + " (" + std::to_string(p.runs.size()) + " of " +
             std::to_string(p.weekday_runs) + " " + weekday_name(p.weekday) + " runs)";
    case PatternKind::span: {
      std::string out = verb + " ";
      const std::string range = "from " + date_of(p.runs.front(), zone) + " to " + date_of(p.runs.back(), zone);
      if (!p.span_weekdays.empty()) {
        out += "every " + weekday_list(p.span_weekdays) + " run " + range + " (" + std::to_string(p.runs.size()) +
               " runs)";
      } else if (p.runs.size() == p.runs_in_span) {
        out += "every run " + range + " (" + std::to_string(p.runs.size()) + " runs)";
      } else {
        out += std::to_string(p.runs.size()) + " of " + std::to_string(p.runs_in_span) + " runs " + range;
      }
      if (!p.starts_after.empty()) {
        out += ", starting after " + describe_changes(p.starts_after) + steady_text(p.steady_zones);
      } else if (p.from_window_start) {
        out += ", from the start of the window";
      }
      if (!p.ends_with.empty()) {
        out += "; it stops after " + describe_changes(p.ends_with) + (p.starts_after.empty() ? steady_text(p.steady_zones) : "");
      } else if (p.to_window_end) {
        out += "; still failing at the end of the window";
      }
      return out;
    }
    case PatternKind::daylight_saving:
      return verb + " on " + date_of(p.runs.front(), zone) + ", " + describe_changes(p.changes) +
             steady_text(p.steady_zones);
    case PatternKind::dates: {
      std::string days;
      std::string last;
      for (Instant t : p.runs) {
        const std::string d = date_of(t, zone);
        if (d != last) days += (days.empty() ? "" : ", ") + d;
        last = d;
      }
      return verb + " on " + days;
    }
  }
  return verb;
}

std::string describe_cause(const Plan& plan, const Blame& b, const Zone* zone) {
  if (b.cause < 0) return "";
  const BlameStep& s = b.steps[static_cast<size_t>(b.cause)];
  const Node& node = plan.nodes[static_cast<size_t>(s.node)];
  const LocalDays day = local_day(b.run_at, zone);
  auto at = [&](Instant t) { return clock_on(t, zone, day); };
  auto gap = [&](const char* thing) {
    return s.gap_nominal ? " (its " + format_local(*s.gap_nominal).substr(11) + " " + thing +
                               " falls in the daylight-saving gap that day)"
                         : std::string();
  };
  switch (b.kind) {
    case CauseKind::none: return "";
    case CauseKind::never:
      if (s.recorded) return what(plan, s.node) + " has not landed with data through " + at(b.needs_data_through);
      return what(plan, s.node) + " never lands with data through " + at(b.needs_data_through) +
             (node.kind == NodeKind::source ? " (no qualifying delivery within 1,462 days)"
                                            : " (no qualifying start within 1,462 days)");
    case CauseKind::late_delivery:
      return what(plan, s.node) + " lands at " + at(*s.ready) + gap("delivery") + ", " +
             human_duration(s.own_late_seconds) + " after the latest landing that keeps the run on time (" +
             at(*s.latest) + ")";
    case CauseKind::stale_start: {
      const BlameStep& input = b.steps[static_cast<size_t>(b.cause - 1)];
      return what(plan, s.node) + " starts at " + at(*s.stale_start) + " (\"" + node.trigger->text + "\") before " +
             quoted(plan, input.node) + " lands at " + at(*s.input_ready) +
             ", so that start reads old data and the new data waits for the next start at " + at(*s.start) +
             "; the latest start that keeps the run on time is " + at(*s.start_by);
    }
    case CauseKind::late_start: {
      std::string out = what(plan, s.node) + " starts at " + at(*s.start) + gap("start") +
                        ", after the latest start that keeps the run on time (" +
                        (s.start_by ? at(*s.start_by) : std::string("none")) + ")";
      if (b.cause > 0 && s.input_ready) {
        const std::string input = quoted(plan, b.steps[static_cast<size_t>(b.cause - 1)].node);
        if (s.start_by && *s.input_ready <= *s.start_by) {
          out += "; its input " + input + " was there at " + at(*s.input_ready);
        } else {
          out += "; it has no start between " + at(b.needs_data_through) + " (the data the run needs) and " +
                 (s.start_by ? at(*s.start_by) : std::string("the run")) + ", and its input " + input + " landed at " +
                 at(*s.input_ready);
        }
      }
      return out;
    }
    case CauseKind::slow_step:
      return what(plan, s.node) + " takes " + human_duration(node.run_time.seconds) + " and lands at " + at(*s.ready) +
             ", after the latest on-time landing (" + at(*s.latest) + "), even though its data was complete at " +
             at(b.needs_data_through);
  }
  return "";
}

std::string describe_fix(const Plan& plan, const Pattern& p, const Fix& fix) {
  const Model& model = plan.models[static_cast<size_t>(p.model)];
  const LocalDays day = local_day(p.worst_run, model.zone);
  auto at = [&](Instant t) { return clock_on(t, model.zone, day); };
  const std::string size = human_duration(fix.seconds);
  const std::string edit = " [" + edit_text(plan, fix.edit) + "]";
  const std::string on_worst = p.runs.size() > 1 ? " in the worst run, " + format_local(model.zone->to_local(p.worst_run)) : "";
  switch (fix.kind) {
    case FixKind::land_earlier: {
      const Node& n = plan.nodes[static_cast<size_t>(fix.node)];
      if (n.kind != NodeKind::source) {
        return what(plan, fix.node) + " would have to finish " + size + " sooner (run_time " +
               format_duration(n.run_time) + " -> " + format_duration(Duration{n.run_time.seconds - fix.seconds}) +
               "): by " + at(fix.after) + " instead of " + at(fix.before) + on_worst + edit;
      }
      std::string how;
      if (fix.edit.kind == EditKind::schedule) {
        how = ": deliver on \"" + fix.edit.cron->text + "\" instead of \"" + fix.from_cron + "\"";
      }
      return what(plan, fix.node) + " would have to land by " + at(fix.after) + " instead of " + at(fix.before) +
             " (" + size + " earlier)" + on_worst + how + edit;
    }
    case FixKind::move_start:
      return what(plan, fix.node) + " would have to start " + size + (fix.later ? " later" : " earlier") + " (\"" +
             fix.from_cron + "\" -> \"" + fix.edit.cron->text + "\"): at " + at(fix.after) + " instead of " +
             at(fix.before) + on_worst + edit;
    case FixKind::start_later:
      return "start the runs of '" + model.id + "' " + size + " later (\"" + fix.from_cron + "\" -> \"" +
             fix.edit.cron->text + "\")" + edit;
  }
  return "";
}

std::string describe_effect(const Plan& plan, const Fix& fix) {
  std::string out = "re-checked: " +
                    (fix.pattern_runs == 1 ? std::string("the run") : "all " + std::to_string(fix.pattern_runs) + " runs") +
                    " of this pattern ok";
  if (fix.other_changes.empty()) return out + "; no other run changes";
  // Group the changes by model and (before, after).
  std::map<std::tuple<int, int, int>, std::vector<Instant>> groups;
  for (const RunChange& c : fix.other_changes) {
    groups[{c.model, static_cast<int>(c.before), static_cast<int>(c.after)}].push_back(c.at);
  }
  std::string better, worse;
  for (const auto& [key, at] : groups) {
    const auto [m, before, after] = key;
    const Model& model = plan.models[static_cast<size_t>(m)];
    std::string text = plural(at.size(), "run", "runs") + " of " + model.id + " from " +
                       to_string(static_cast<RunStatus>(before)) + " to " + to_string(static_cast<RunStatus>(after)) +
                       " (" + (at.size() == 1 ? "" : "first ") + format_local(model.zone->to_local(at.front())) + ")";
    std::string& list = after > before ? worse : better;
    list += (list.empty() ? "" : ", ") + text;
  }
  if (!better.empty()) out += "; also turns " + better;
  if (!worse.empty()) out += "; but turns " + worse;
  return out;
}

std::string describe_no_fix(const Plan& plan, const Pattern& p, const FixSearch& search) {
  if (search.never) {
    return "no change of timing helps: " + describe_cause(plan, p.blame, plan.models[static_cast<size_t>(p.model)].zone);
  }
  if (search.causes_apart) {
    return "no single edit clears every run of this pattern: its features are late through different steps, "
           "so each needs its own change";
  }
  std::string out = "no single edit clears every run of this pattern";
  if (!search.tried_nodes.empty()) {
    out += " (tried changing ";
    for (size_t i = 0; i < search.tried_nodes.size(); ++i) out += (i ? ", " : "") + quoted(plan, search.tried_nodes[i]);
    out += ", and starting the runs later)";
  }
  return out;
}

}  // namespace readyby
