#include <catch2/catch.hpp>

#include <string>

#include "history_helpers.h"
#include "util/files.h"

using namespace readyby;
using readyby_test::TempDir;

TEST_CASE("read_file returns every byte as written, and false for what cannot be read") {
  TempDir dir;
  REQUIRE_FALSE(dir.path().empty());
  // NUL, CR LF and bytes above 0x7f pass through unchanged (binary mode).
  const std::string bytes = std::string("a\0b\r\n\xff\xfe end", 11);
  readyby_test::write_text(dir.file("f.bin"), bytes);
  std::string got = "left over";
  REQUIRE(read_file(dir.file("f.bin"), &got));
  CHECK(got == bytes);
  readyby_test::write_text(dir.file("empty"), "");
  REQUIRE(read_file(dir.file("empty"), &got));
  CHECK(got.empty());
  got = "kept";
  CHECK_FALSE(read_file(dir.file("missing"), &got));
  CHECK(got == "kept");
  // A folder opens as a stream on Linux but cannot be read.
  CHECK_FALSE(read_file(dir.path(), &got));
}

TEST_CASE("valid_id accepts letters, digits, '_', '.' and '-' only") {
  for (const char* ok : {"a", "lab_results", "adt-events.v2", "X9", "0"}) {
    INFO(ok);
    CHECK(valid_id(ok));
  }
  for (const char* bad : {"", "has space", "slash/in", "colon:", "caf\xc3\xa9", "tab\t", "at@"}) {
    INFO(bad);
    CHECK_FALSE(valid_id(bad));
  }
}
