#include <catch2/catch.hpp>

#include <chrono>
#include <string>

#include "catalog/proposal.h"
#include "catalog/vocabulary.h"
#include "plan/plan_loader.h"
#include "util/yaml_tree.h"

using namespace readyby;

namespace {

// Nested aliases: every level refers nine times to the one before, so the
// last level describes 9^depth nodes in a few hundred bytes.
std::string alias_bomb(int depth) {
  std::string text = "a0: &a0 [x, x, x, x, x, x, x, x, x]\n";
  for (int level = 1; level <= depth; ++level) {
    std::string prev = "*a" + std::to_string(level - 1);
    text += "a" + std::to_string(level) + ": &a" + std::to_string(level) + " [";
    for (int i = 0; i < 9; ++i) text += (i ? ", " : "") + prev;
    text += "]\n";
  }
  return text;
}

}  // namespace

// Regression: a 525-byte plan of nested aliases expanded to billions of
// nodes (std::bad_alloc, or 20 s and 6 GB). Expansion now stops at the alias
// that would pass the limit, which is reported at its position.
TEST_CASE("alias expansion is limited and reported at the alias") {
  std::string bomb = alias_bomb(9);
  REQUIRE(bomb.size() < 600);
  YamlNode root;
  Diagnostics diags;
  auto started = std::chrono::steady_clock::now();
  CHECK_FALSE(parse_yaml("bomb.yaml", bomb, &root, &diags));
  // Not a speed target: a guard that the parse stopped instead of expanding
  // (the unbounded expansion took tens of seconds).
  CHECK(std::chrono::steady_clock::now() - started < std::chrono::seconds(5));
  REQUIRE(diags.size() == 1);
  // Levels 0-3 hold about 8,200 nodes; the first alias of level 4 (a copy of
  // level 3, about 7,400 nodes) would pass the 10,000-node floor.
  CHECK(diags.render().find("bomb.yaml:5:10: error: this alias would expand the document to more than 10000 nodes") == 0);

  // The same through the plan loader and the proposal loader.
  PlanLoadResult plan = load_plan_text(bomb, "plan.yaml");
  REQUIRE(plan.errors.size() == 1);
  CHECK(plan.errors[0].str().find("plan.yaml:5:10: error: this alias would expand") == 0);
  Diagnostics proposal_diags;
  CHECK_FALSE(load_proposal_text(bomb, "p.proposal.yaml", Vocabulary{}, &proposal_diags));
  CHECK(proposal_diags.render().find("p.proposal.yaml:5:10: error: this alias") == 0);

  // Ordinary sharing through aliases stays well within the limit.
  YamlNode shared;
  Diagnostics ok;
  CHECK(parse_yaml("ok.yaml", "days: &d [sat, sun]\na: *d\nb: *d\nc: *d\n", &shared, &ok));
  CHECK(ok.empty());
  CHECK(shared.find("c")->items.size() == 2);
}

TEST_CASE("the node limit grows with the document and has a floor") {
  CHECK(yaml_node_limit(0) == kYamlMinNodeLimit);
  CHECK(yaml_node_limit(100) == kYamlMinNodeLimit);
  CHECK(yaml_node_limit(1'000'000) == 4'000'000);
}

// Regression: `- at: "0 6 * * *` with no closing quote at the end of the file
// was accepted as a valid plan.
TEST_CASE("a quoted value left open at the end of the file is an error at its opening quote") {
  struct Case {
    const char* name;
    const char* text;
    const char* error;  // "" when valid
  };
  const Case cases[] = {
      {"double, at end", "a: 1\nb: \"0 6 * * *\n", "f.yaml:2:4: error: this quoted value has no closing \" before the end of the file"},
      {"single, at end", "a: '0 6 * * *\n", "f.yaml:1:4: error: this quoted value has no closing ' before the end of the file"},
      {"escaped quote inside", "a: \"say \\\"hi\\\"\"\n", ""},
      {"doubled single quote inside", "a: 'it''s'\n", ""},
      {"closed on the next line", "a: \"one\n  two\"\n", ""},
  };
  for (const Case& c : cases) {
    INFO(c.name);
    YamlNode root;
    Diagnostics diags;
    bool parsed = parse_yaml("f.yaml", c.text, &root, &diags);
    if (*c.error) {
      CHECK_FALSE(parsed);
      CHECK(diags.render().find(c.error) == 0);
    } else {
      CHECK(parsed);
      CHECK(diags.empty());
    }
  }
}

// Every file kind goes through parse_yaml, which checks UTF-8 once.
TEST_CASE("text that is not UTF-8 is reported at the first bad byte for every file kind") {
  const std::string text = "proposal: p\ntitle: caf\xe9 menu\n";
  YamlNode root;
  Diagnostics diags;
  CHECK_FALSE(parse_yaml("x.yaml", text, &root, &diags));
  CHECK(diags.render().find("x.yaml:2:11: error: the file is not valid UTF-8") == 0);
  Diagnostics proposal_diags;
  CHECK_FALSE(load_proposal_text(text, "p.proposal.yaml", Vocabulary{}, &proposal_diags));
  CHECK(proposal_diags.render().find("p.proposal.yaml:2:11: error: the file is not valid UTF-8") == 0);
}

// Regression: control characters in a plan title (ESC, BEL) were printed raw
// to the terminal. Every file kind goes through the YAML layer, which now
// refuses them in text values, written raw or as an escape.
TEST_CASE("control characters in a text value are an error at the value") {
  const char* cases[] = {"title: \"red \\e[31m text\"\n", "title: \"bell \\a\"\n", "title: del \x7f here\n"};
  for (const char* text : cases) {
    INFO(text);
    YamlNode root;
    Diagnostics diags;
    CHECK_FALSE(parse_yaml("f.yaml", text, &root, &diags));
    CHECK(diags.render().find("f.yaml:1:8: error: control character U+00") == 0);
    // The source line shown under the error is escaped too.
    CHECK(diags.render().find('\x1b') == std::string::npos);
    CHECK(diags.render().find('\x7f') == std::string::npos);
  }
  YamlNode root;
  Diagnostics ok;
  CHECK(parse_yaml("f.yaml", "title: \"two\\nlines\\twith a tab\"\n", &root, &ok));
}
