#include <catch2/catch.hpp>

#include "history/stats.h"

using namespace readyby;

TEST_CASE("percentile interpolates between order statistics (Hyndman & Fan definition 7)") {
  struct Case {
    const char* name;
    std::vector<double> values;
    double q;
    double expected;
  };
  const Case cases[] = {
      {"median of odd count", {5, 1, 3}, 0.5, 3},
      {"median of even count", {4, 1, 3, 2}, 0.5, 2.5},
      // h = (10-1)*0.9 = 8.1: x[8] + 0.1 (x[9] - x[8]) = 9 + 0.1 = 9.1
      {"p90 of 1..10", {1, 2, 3, 4, 5, 6, 7, 8, 9, 10}, 0.9, 9.1},
      {"minimum", {7, 3, 9}, 0, 3},
      {"maximum", {7, 3, 9}, 1, 9},
      {"single value", {42}, 0.9, 42},
  };
  for (const Case& c : cases) {
    INFO(c.name);
    REQUIRE(percentile(c.values, c.q));
    CHECK(*percentile(c.values, c.q) == Approx(c.expected));
  }
  CHECK_FALSE(percentile({}, 0.5));
}

TEST_CASE("Theil–Sen slope against published worked examples") {
  // Hollander, Wolfe & Chicken, Nonparametric Statistical Methods (3rd ed.),
  // Example 9.1 (the data as shipped in R package NSM3's theil(example=TRUE)):
  // x = 1..5, y = 1.26 1.27 1.12 1.16 1.03. The ten pairwise slopes sorted are
  // -.15 -.13 -.08 -.07 -.0575 -.055 -.045 -.0333 .01 .04; their median is
  // (-.0575 - .055) / 2 = -.05625 (computed by hand from the data; the book
  // reports the estimate rounded).
  CHECK(*theil_sen_slope({1, 2, 3, 4, 5}, {1.26, 1.27, 1.12, 1.16, 1.03}) == Approx(-0.05625));
  // R package statpsych, ci.theil documentation example (after Hollander &
  // Wolfe 1999): the estimate "should return 0.5".
  const std::vector<double> y = {21, 4, 9, 12, 35, 18, 10, 22, 24, 1, 6, 8, 13, 16, 19};
  const std::vector<double> x = {67, 28, 30, 28, 52, 40, 25, 37, 44, 10, 14, 20, 28, 40, 51};
  CHECK(*theil_sen_slope(x, y) == Approx(0.5));
}

TEST_CASE("Theil–Sen slope ignores outliers and pairs with equal x") {
  // y = 2x exactly, with one wild point: the slope stays 2.
  CHECK(*theil_sen_slope({0, 1, 2, 3, 4, 5, 6}, {0, 2, 4, 600, 8, 10, 12}) == Approx(2));
  CHECK(*theil_sen_slope({1, 1, 2}, {0, 5, 1}) == Approx((1.0 + -4.0) / 2));
  CHECK_FALSE(theil_sen_slope({3, 3, 3}, {1, 2, 3}));
  CHECK_FALSE(theil_sen_slope({1}, {1}));
}

TEST_CASE("Wilson score interval against Newcombe (1998)") {
  // Newcombe RG, Two-sided confidence intervals for the single proportion:
  // comparison of seven methods, Statistics in Medicine 1998;17:857-872,
  // method 3 (score, no continuity correction), the paper's worked examples.
  // The limits are quoted from memory, not checked against the paper; they
  // agree to 4 decimals with an independent evaluation of Wilson's formula.
  struct Case {
    int64_t successes, trials;
    double low, high;
  };
  const Case cases[] = {
      {81, 263, 0.2553, 0.3662},
      {15, 148, 0.0624, 0.1605},
      {0, 20, 0.0, 0.1611},
      {1, 29, 0.0061, 0.1718},
  };
  for (const Case& c : cases) {
    INFO(c.successes << "/" << c.trials);
    std::optional<ProportionInterval> ci = wilson_interval(c.successes, c.trials);
    REQUIRE(ci);
    CHECK(ci->low == Approx(c.low).margin(0.00005));
    CHECK(ci->high == Approx(c.high).margin(0.00005));
  }
  CHECK(wilson_interval(20, 20)->high == 1.0);
  CHECK_FALSE(wilson_interval(0, 0));
  CHECK_FALSE(wilson_interval(3, 2));
}
