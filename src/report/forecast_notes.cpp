// Sentences shared by the forecast writers: notes, warnings, percentages.
#include <cmath>
#include <cstdio>

#include "report/forecast_report.h"
#include "time/zone.h"

namespace readyby {

namespace {

std::string whole_percent(double p) {
  char buffer[16];
  std::snprintf(buffer, sizeof buffer, "%.0f%%", p * 100);
  return buffer;
}

}  // namespace

std::string percent_with_interval(double p, const std::optional<ProportionInterval>& interval) {
  std::string out = "about " + whole_percent(p);
  if (interval && whole_percent(interval->low) != whole_percent(interval->high)) {
    char buffer[48];
    std::snprintf(buffer, sizeof buffer, " (%.0f–%.0f%%)", interval->low * 100, interval->high * 100);
    out += buffer;
  }
  return out;
}

std::vector<std::string> forecast_notes(const Plan& plan, const std::vector<int>& unmonitored) {
  std::vector<std::string> notes = {
      "Draws are independent across feeds and across each feed's deliveries: the forecast assumes that one "
      "feed's lateness says nothing about another's, nor about its own next delivery. Shared causes (an "
      "outage of a source system, a slow night on a shared server) and trends make real lateness more "
      "clustered than that; 'readyby forecast --backtest-from DATE' measures how much this matters on the "
      "recorded history.",
      "A run is on time when every input is fresh by its start; a degraded run (an optional input late) "
      "counts as not on time.",
      "Each feed's landings are resampled from its own recorded history (landings before the window); a "
      "change that history has not seen yet — a new upstream system, a moved schedule — is not in the "
      "forecast.",
  };
  if (!unmonitored.empty()) {
    std::string list;
    for (int n : unmonitored) list += (list.empty() ? "" : ", ") + plan.nodes[static_cast<size_t>(n)].id;
    notes.push_back("No landings recorded for " + list + ": " + (unmonitored.size() == 1 ? "it keeps its" : "they keep their") +
                    " declared timing in every draw.");
  }
  return notes;
}

std::vector<std::string> landing_warnings(const Plan& plan, const LandingModels& models) {
  std::vector<std::string> out;
  for (const LandingModel& m : models.models) {
    const Node& node = plan.nodes[static_cast<size_t>(m.node)];
    if (m.short_history) {
      out.push_back(node.id + ": only " + std::to_string(m.pooled.landings) + " landing" +
                    (m.pooled.landings == 1 ? "" : "s") + " recorded (fewer than " +
                    std::to_string(kShortHistoryLandings) + "); its part of the forecast rests on little history");
    }
    if (m.stale) {
      out.push_back(node.id + ": " +
                    (m.last_landing ? "no landing since " + format_local(plan.zone->to_local(*m.last_landing))
                                    : std::string("no successful landing recorded")) +
                    ", more than 7 days before the window; its recorded behaviour may be out of date");
    }
  }
  return out;
}

}  // namespace readyby
