#pragma once
// A random valid data plan in YAML, for property tests: several zones,
// calendars, cron sources (often in the hours a spring-forward gap removes),
// streams, cron-triggered jobs and features, optional features, per-node
// zones. Shared by the tests that judge the engine against tests/reference.h.

#include <random>
#include <sstream>
#include <string>
#include <vector>

namespace readyby::testing {

inline std::string random_plan(std::mt19937_64& rng, int index) {
  auto pick = [&](int n) { return static_cast<int>(rng() % static_cast<uint64_t>(n)); };
  const char* zones[] = {"America/Chicago", "Europe/London", "Australia/Sydney", "Australia/Lord_Howe",
                         "Asia/Kolkata", "America/New_York"};
  auto minutes = [&](int max) { return "PT" + std::to_string(pick(max + 1)) + "M"; };
  auto cron = [&]() {
    const char* hours[] = {"1", "2", "3", "0", "5", "*/4", "2,14", "23", "1-3"};
    const char* days[] = {"* * *", "* * *", "* * mon-fri", "* * 0", "1,15 * *", "* * 1"};
    int minute = pick(4) == 0 ? 0 : pick(60);
    return "\"" + std::to_string(minute) + " " + hours[pick(9)] + " " + days[pick(6)] + "\"";
  };
  std::ostringstream y;
  y << "plan: random-" << index << "\ntimezone: " << zones[pick(6)] << "\n";
  y << "calendars:\n  weekdays: {skip_weekdays: [sat, sun]}\n  no-sunday: {skip_weekdays: [sun]}\n"
    << "  holiday: {skip_dates: [2026-03-08, 2026-10-04, 2026-11-01]}\n";
  const char* calendars[] = {"weekdays", "no-sunday", "holiday"};
  std::vector<std::string> ids;
  int sources = 2 + pick(3);
  y << "sources:\n";
  for (int i = 0; i < sources; ++i) {
    std::string id = "s" + std::to_string(i);
    y << "  " << id << ":\n";
    if (pick(4) == 0) {
      y << "    schedule: stream\n    lands_after: " << minutes(90) << "\n";
    } else {
      y << "    schedule: " << cron() << "\n    lands_after: " << minutes(120) << "\n    data_lag: PT"
        << pick(27) << "H\n";
      if (pick(3) == 0) y << "    timezone: " << zones[pick(6)] << "\n";
      if (pick(3) == 0) y << "    calendar: " << calendars[pick(3)] << "\n";
    }
    ids.push_back(id);
  }
  auto derived = [&](const std::string& id, bool feature) {
    y << "  " << id << ":\n    inputs: [";
    int n = 1 + pick(3);
    for (int k = 0; k < n; ++k) y << (k ? ", " : "") << ids[static_cast<size_t>(pick(static_cast<int>(ids.size())))];
    y << "]\n    run_time: " << minutes(45) << "\n";
    if (pick(3) == 0) {
      y << "    trigger: " << cron() << "\n";
      if (pick(3) == 0) y << "    timezone: " << zones[pick(6)] << "\n";
      if (pick(4) == 0) y << "    calendar: " << calendars[pick(3)] << "\n";
    }
    if (feature) {
      y << "    max_age: PT" << (1 + pick(30)) << "H\n";
      if (pick(4) == 0) y << "    optional: true\n";
    }
  };
  int jobs = 1 + pick(4);
  y << "jobs:\n";
  for (int i = 0; i < jobs; ++i) {
    std::string id = "j" + std::to_string(i);
    derived(id, false);
    ids.push_back(id);
  }
  int features = 2 + pick(3);
  std::vector<std::string> feature_ids;
  y << "features:\n";
  for (int i = 0; i < features; ++i) {
    std::string id = "f" + std::to_string(i);
    derived(id, true);
    ids.push_back(id);
    feature_ids.push_back(id);
  }
  y << "models:\n";
  const char* runs[] = {"0 6 * * *", "30 2 * * *", "0 */6 * * *", "15 7 * * mon-fri", "45 1 * * *"};
  for (int m = 0; m < 1 + pick(2); ++m) {
    y << "  m" << m << ":\n";
    if (pick(3) == 0) y << "    timezone: " << zones[pick(6)] << "\n";
    y << "    features: [";
    for (size_t k = 0; k < feature_ids.size(); ++k) y << (k ? ", " : "") << feature_ids[k];
    y << "]\n    runs:\n";
    for (int r = 0; r < 1 + pick(2); ++r) {
      y << "      - at: \"" << runs[pick(5)] << "\"\n";
      if (pick(4) == 0) y << "        calendar: " << calendars[pick(3)] << "\n";
    }
  }
  return y.str();
}


}  // namespace readyby::testing
