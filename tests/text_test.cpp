#include <catch2/catch.hpp>

#include <random>
#include <string>
#include <vector>

#include "json_check.h"
#include "util/text.h"

using namespace readyby;

TEST_CASE("json_quote escapes what RFC 8259 requires") {
  // RFC 8259 §7: quotation mark, reverse solidus and the control characters
  // U+0000 to U+001F must be escaped; everything else may appear as is.
  struct Case {
    std::string in;
    std::string out;
  };
  const Case cases[] = {
      {"", R"("")"},
      {"plain", R"("plain")"},
      {"say \"hi\"", R"("say \"hi\"")"},
      {"a\\b", R"("a\\b")"},
      {"line\nnext\r\ttab", R"("line\nnext\r\ttab")"},
      {std::string("nul\0end", 7), R"("nul\u0000end")"},
      {"\x01\x07\x08\x0b\x0c\x1b\x1f", R"("\u0001\u0007\u0008\u000b\u000c\u001b\u001f")"},
      {"\x7f del stays", "\"\x7f del stays\""},
      {"caf\xc3\xa9 \xe2\x86\x92 \xf0\x9f\x98\x80", "\"caf\xc3\xa9 \xe2\x86\x92 \xf0\x9f\x98\x80\""},
      {"</script>", R"("</script>")"},
  };
  for (const Case& c : cases) {
    INFO(c.out);
    CHECK(json_quote(c.in) == c.out);
  }
}

TEST_CASE("json_quote: every byte below 0x20 gives valid JSON") {
  std::string all;
  for (int c = 0; c < 0x20; ++c) all += static_cast<char>(c);
  all += "\"\\/";
  std::string doc = "{\"all\": " + json_quote(all) + ", \"list\": " + json_list({"a\x1b[31m", "b\x07"}) + "}";
  testing::JsonCheck check = testing::check_json(doc);
  INFO(doc << "\n" << check.error);
  CHECK(check.ok);
}

TEST_CASE("the JSON checker refuses what is not JSON") {
  // The helper of the CLI tests must itself be able to fail.
  struct Case {
    const char* what;
    std::string text;
  };
  const Case cases[] = {
      {"raw control character in a string", "{\"a\": \"x\x1by\"}"},
      {"invalid UTF-8", "{\"a\": \"\xff\"}"},
      {"NaN", "{\"a\": NaN}"},
      {"trailing comma", "{\"a\": 1,}"},
      {"two documents", "{} {}"},
      {"repeated name", "{\"a\": 1, \"a\": 2}"},
      {"nothing", ""},
  };
  for (const Case& c : cases) {
    INFO(c.what);
    CHECK_FALSE(testing::check_json(c.text).ok);
  }
  CHECK(testing::check_json("{\"a\": [1, 2.5e3, true, null, \"\\u00e9\"]}\n").ok);
}

namespace {

// The plain rule of nearest(): smallest full edit distance within the limit,
// first candidate on ties.
std::string nearest_reference(const std::string& word, const std::vector<std::string>& candidates) {
  size_t limit = std::max<size_t>(2, word.size() / 3);
  size_t best = limit + 1;
  std::string found;
  for (const std::string& c : candidates) {
    size_t d = edit_distance(word, c);
    if (d < best) best = d, found = c;
  }
  return found;
}

}  // namespace

// The banded, cut-off distance behind nearest() must pick exactly what the
// full Levenshtein table picks.
TEST_CASE("nearest agrees with the full edit distance on random words") {
  std::mt19937 rng(7);
  auto word = [&](size_t max_len) {
    std::string w(1 + rng() % max_len, 'a');
    for (char& c : w) c = static_cast<char>('a' + rng() % 4);
    return w;
  };
  for (int i = 0; i < 3000; ++i) {
    std::vector<std::string> candidates;
    for (int k = 0; k < 8; ++k) candidates.push_back(word(14));
    std::string w = word(14);
    INFO(w);
    CHECK(nearest(w, candidates) == nearest_reference(w, candidates));
  }
}

// Regression: a did-you-mean on a 1 MB unknown name took 18 s.
TEST_CASE("very long words get no suggestion") {
  std::vector<std::string> zones = {"America/Chicago", "Europe/London"};
  CHECK(nearest(std::string(kMaxSuggestedLength, 'x'), zones).empty());
  CHECK(nearest(std::string(1 << 20, 'A'), zones).empty());
  CHECK(did_you_mean("America/Chicgo", zones) == " (did you mean 'America/Chicago'?)");
}

TEST_CASE("printable escapes control characters and nothing else") {
  CHECK(printable("plain text, tab\there") == "plain text, tab\there");
  CHECK(printable("red \x1b[31m bell \a del \x7f") == "red \\x1b[31m bell \\x07 del \\x7f");
  CHECK(printable("line\nbreak") == "line\\x0abreak");
  CHECK(printable("caf\xc3\xa9") == "caf\xc3\xa9");  // UTF-8 untouched
}

// RFC 8259 §7: control characters U+0000-U+001F must be escaped in strings.
TEST_CASE("JSON strings escape quotes, backslashes and every control character") {
  CHECK(json_quote("a\"b\\c") == "\"a\\\"b\\\\c\"");
  CHECK(json_quote("\n\r\t") == "\"\\n\\r\\t\"");
  CHECK(json_quote(std::string("\x00\x01\x1b\x1f", 4)) == "\"\\u0000\\u0001\\u001b\\u001f\"");
  CHECK(json_quote("\x7f") == "\"\x7f\"");  // DEL is not a control character in JSON
}

TEST_CASE("split keeps empty pieces and never drops the last") {
  using V = std::vector<std::string_view>;
  CHECK(split("a,b", ',') == V{"a", "b"});
  CHECK(split("a,,b", ',') == V{"a", "", "b"});
  CHECK(split("a,", ',') == V{"a", ""});
  CHECK(split(",a", ',') == V{"", "a"});
  CHECK(split("", ',') == V{""});
  CHECK(split("no separator", ',') == V{"no separator"});
}
