#include <catch2/catch.hpp>

#include "plan/lineage.h"

using namespace readyby;

TEST_CASE("topological order puts every node after its inputs") {
  // 0 -> 2, 1 -> 2, 2 -> 3, 1 -> 3
  Lineage g({{}, {}, {0, 1}, {2, 1}});
  CHECK(g.topological_order() == std::vector<int>{0, 1, 2, 3});
  CHECK(g.cycles().empty());
  CHECK(g.upstream(3) == std::vector<int>{0, 1, 2});
  CHECK(g.upstream(0).empty());
  CHECK(g.consumers(1) == std::vector<int>{2, 3});
}

TEST_CASE("cycles are listed in data-flow order") {
  // a(0) <- c(2), b(1) <- a, c <- b : a -> b -> c -> a
  Lineage g({{2}, {0}, {1}, {}});
  CHECK(g.topological_order().empty());
  auto cycles = g.cycles();
  REQUIRE(cycles.size() == 1);
  CHECK(cycles[0] == std::vector<int>{0, 1, 2});
  // A node that is its own input.
  Lineage self(std::vector<std::vector<int>>{std::vector<int>{0}});
  REQUIRE(self.cycles().size() == 1);
  CHECK(self.cycles()[0] == std::vector<int>{0});
}

TEST_CASE("a repeated input does not break the order") {
  Lineage g({{}, {0, 0}});
  CHECK(g.topological_order() == std::vector<int>{0, 1});
}
