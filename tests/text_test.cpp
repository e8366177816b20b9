#include <catch2/catch.hpp>

#include <string>

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
