#pragma once
// A plan from inline YAML, for tests whose subject is not the loader: the
// test fails (showing the diagnostics) if the text is not a valid plan.

#include <catch2/catch.hpp>

#include <string>

#include "plan/plan_loader.h"

namespace readyby::testing {

inline Plan plan_from_text(const std::string& text) {
  PlanLoadResult r = load_plan_text(text, "plan.yaml");
  INFO(r.rendered);
  REQUIRE(r.plan);
  return std::move(*r.plan);
}

}  // namespace readyby::testing
