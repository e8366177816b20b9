// libFuzzer target: the ISO 8601 duration parser.
// Input: the duration text. A parsed duration must be non-negative and must
// survive format_duration -> parse_duration unchanged.

#include <cstddef>
#include <cstdint>
#include <string>
#include <string_view>

#include "fuzz_common.h"
#include "time/duration.h"

using namespace readyby;

extern "C" int LLVMFuzzerTestOneInput(const uint8_t* data, size_t size) {
  std::string_view text(reinterpret_cast<const char*>(data), size);
  DurationParse parsed = parse_duration(text);
  if (!parsed.value) {
    fuzz::expect(!parsed.error.empty(), "a failed parse without a message");
    fuzz::expect(parsed.offset <= text.size(), "an error offset past the end of the text");
    return 0;
  }
  Duration d = *parsed.value;
  fuzz::expect(d.seconds >= 0, "a negative duration");
  std::string formatted = format_duration(d);
  DurationParse again = parse_duration(formatted);
  fuzz::expect(again.value && *again.value == d, "format_duration does not round-trip");
  fuzz::expect(!human_duration(d.seconds).empty(), "an empty human rendering");
  return 0;
}
