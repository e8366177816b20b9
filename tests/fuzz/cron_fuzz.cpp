// libFuzzer target: the cron parser and the occurrence search.
// Input: line 1 is the cron expression; optional line 2 an RFC 3339 instant
// to search from (default 2026-03-08T00:00:00Z); optional line 3 a time zone
// name (default America/Chicago).

#include <cstddef>
#include <cstdint>
#include <string>
#include <string_view>

#include "fuzz_common.h"
#include "time/calendar.h"
#include "time/cron.h"
#include "time/zone.h"

using namespace readyby;

namespace {

std::string_view next_line(std::string_view* rest) {
  size_t nl = rest->find('\n');
  std::string_view line = rest->substr(0, nl);
  *rest = nl == std::string_view::npos ? std::string_view{} : rest->substr(nl + 1);
  return line;
}

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const uint8_t* data, size_t size) {
  std::string_view rest(reinterpret_cast<const char*>(data), size);
  std::string_view expr = next_line(&rest);
  std::string_view from_text = next_line(&rest);
  std::string_view zone_text = next_line(&rest);

  CronParse parsed = parse_cron(expr);
  if (!parsed.value) {
    fuzz::expect(!parsed.error.empty(), "a failed parse without a message");
    fuzz::expect(parsed.offset <= expr.size(), "an error offset past the end of the text");
    return 0;
  }
  fuzz::expect(parsed.error.empty(), "a parsed schedule with an error");
  const Cron& cron = *parsed.value;
  fuzz::expect(cron.text == expr, "the schedule's text differs from the input");
  fuzz::expect((cron.minutes >> 60) == 0 && (cron.hours >> 24) == 0 && (cron.days & 1u) == 0 &&
                   (cron.months & 1u) == 0 && (cron.months >> 13) == 0 && (cron.weekdays >> 7) == 0,
               "a bit outside a field's range");

  std::optional<Instant> from = from_text.empty() ? parse_rfc3339("2026-03-08T00:00:00Z") : parse_rfc3339(from_text);
  if (!from) return 0;
  const Zone* zone = Zone::find(zone_text.empty() ? std::string_view("America/Chicago") : zone_text);
  if (!zone) return 0;
  Calendar calendar;
  std::optional<Instant> next = next_occurrence(cron, *zone, calendar, *from);
  if (next) {
    fuzz::expect(*next >= *from, "next occurrence before the start");
    fuzz::expect((*next - *from).count() <= kSearchHorizonSeconds, "next occurrence past the horizon");
    std::optional<Instant> again = next_occurrence(cron, *zone, calendar, *next);
    fuzz::expect(again && *again == *next, "an occurrence is not its own next occurrence");
    std::optional<Instant> prev = previous_occurrence(cron, *zone, calendar, *next);
    fuzz::expect(prev && *prev == *next, "an occurrence is not its own previous occurrence");
  }
  return 0;
}
