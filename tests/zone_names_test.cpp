#include <catch2/catch.hpp>

#include "plan/plan_loader.h"
#include "time/zone.h"
#include "time/zone_names.h"

using namespace readyby;

TEST_CASE("unknown zone names: the zone of the region, a close spelling, or nothing") {
  const std::vector<std::string> known = Zone::names();
  REQUIRE(known.size() > 300);
  struct Case {
    const char* name;
    const char* zone;  // "" when nothing should be suggested
    const char* city;
  };
  const Case cases[] = {
      // Cities that are not zone names: the zone of their region (common practice).
      {"America/San_Francisco", "America/Los_Angeles", "San_Francisco"},
      {"America/Seattle", "America/Los_Angeles", "Seattle"},
      {"America/San_Diego", "America/Los_Angeles", "San_Diego"},
      {"US/Houston", "America/Chicago", "Houston"},
      {"America/Boston", "America/New_York", "Boston"},
      {"Boston", "America/New_York", "Boston"},
      {"America/Salt Lake City", "America/Denver", "Salt Lake City"},
      {"America/Honolulu", "Pacific/Honolulu", "Honolulu"},
      {"Europe/Munich", "Europe/Berlin", "Munich"},
      {"Asia/Mumbai", "Asia/Kolkata", "Mumbai"},
      // Another case, or spaces for underscores.
      {"america/chicago", "America/Chicago", ""},
      {"America/New York", "America/New_York", ""},
      // A typo close to the name's length.
      {"America/Chigaco", "America/Chicago", ""},
      {"Amercia/Denver", "America/Denver", ""},
      {"Etc/UTX", "Etc/UTC", ""},
      {"ESTT", "", ""},  // one step from the legacy EST, which is not suggested for a typo
      {"est", "EST", ""},  // the name itself, in another case: loading it then warns
      // Far from every name relative to its length: nothing.
      {"America/Springfield", "", ""},
      {"Mars/Olympus_Mons", "", ""},
      {"", "", ""},
  };
  for (const Case& c : cases) {
    INFO(c.name);
    ZoneSuggestion s = suggest_zone(c.name, known);
    CHECK(s.zone == c.zone);
    CHECK(s.city == c.city);
  }
  // The nearest spelling alone would have been far off.
  CHECK(suggest_zone("America/San_Francisco", known).zone != "America/Rio_Branco");
  CHECK(zone_did_you_mean("America/San_Francisco", known) ==
        " (did you mean 'America/Los_Angeles', the zone of San_Francisco?)");
  CHECK(zone_did_you_mean("America/Chigaco", known) == " (did you mean 'America/Chicago'?)");
  CHECK(zone_did_you_mean("America/Springfield", known).empty());
  CHECK(zone_did_you_mean(std::string(100000, 'x'), known).empty());  // long names: no work, no suggestion
}

TEST_CASE("legacy zone names get advice naming a region zone") {
  struct Case {
    const char* name;
    const char* names_zone;  // a region zone the advice must name
  };
  // The tz database links them to these zones since release 2024b (NEWS).
  const Case cases[] = {
      {"EST", "America/Panama"},          {"EST", "America/New_York"},     {"MST", "America/Phoenix"},
      {"MST", "America/Denver"},          {"HST", "Pacific/Honolulu"},     {"EST5EDT", "America/New_York"},
      {"CST6CDT", "America/Chicago"},     {"MST7MDT", "America/Denver"},   {"PST8PDT", "America/Los_Angeles"},
      {"CET", "Europe/Brussels"},         {"EET", "Europe/Athens"},        {"WET", "Europe/Lisbon"},
  };
  for (const Case& c : cases) {
    INFO(c.name);
    std::string advice = legacy_zone_advice(c.name);
    CHECK(advice.starts_with("'" + std::string(c.name) + "' is a legacy time zone name"));
    CHECK(advice.find(c.names_zone) != std::string::npos);
    CHECK(Zone::find(c.names_zone) != nullptr);
  }
  for (const char* fine : {"America/Chicago", "Etc/UTC", "UTC", "Etc/GMT+5", "US/Eastern", "est"}) {
    INFO(fine);
    CHECK(legacy_zone_advice(fine).empty());
  }
}

TEST_CASE("plan loader: a legacy zone is a warning, an unknown city gets its region's zone") {
  const std::string plan =
      "plan: x\ntimezone: EST5EDT\nsources:\n  s:\n    schedule: \"0 1 * * *\"\n    timezone: HST\nfeatures:\n"
      "  f:\n    inputs: [s]\n    max_age: P1D\nmodels:\n  m:\n    timezone: America/San_Francisco\n"
      "    features: [f]\n    runs:\n      - at: \"0 6 * * *\"\n";
  PlanLoadResult r = load_plan_text(plan, "p.yaml");
  REQUIRE(r.errors.size() == 1);
  CHECK(r.errors[0].str() ==
        "p.yaml:13:15: error: unknown time zone 'America/San_Francisco' (did you mean 'America/Los_Angeles', the "
        "zone of San_Francisco?)");
  REQUIRE(r.warnings.size() == 2);
  CHECK(r.warnings[0].str("warning").starts_with("p.yaml:2:11: warning: 'EST5EDT' is a legacy time zone name"));
  CHECK(r.warnings[1].str("warning") ==
        "p.yaml:6:15: warning: 'HST' is a legacy time zone name kept only for compatibility: UTC-10:00 all year; "
        "for Hawaii use Pacific/Honolulu");
  // Rendered in position order, each with its line and caret.
  CHECK(r.rendered.find("p.yaml:6:15: warning: 'HST'") < r.rendered.find("p.yaml:13:15: error:"));
  CHECK(r.rendered.find("      timezone: HST\n                ^\n") != std::string::npos);

  // Without the unknown zone, the plan loads with its warnings.
  std::string valid = plan;
  valid.replace(valid.find("America/San_Francisco"), 21, "America/Los_Angeles");
  PlanLoadResult ok = load_plan_text(valid, "p.yaml");
  CHECK(ok.plan);
  CHECK(ok.errors.empty());
  CHECK(ok.warnings.size() == 2);
}
