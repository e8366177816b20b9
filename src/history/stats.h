#pragma once
// Small robust statistics for landing history: percentiles, the Theil–Sen
// slope, and the Wilson score interval for a proportion. Pure functions; no
// I/O. Inputs are taken by value or const reference and never modified.

#include <cstdint>
#include <optional>
#include <vector>

namespace readyby {

/// The q-quantile (0 <= q <= 1) of `values` by linear interpolation between
/// order statistics: with the values sorted as x[0..n-1], h = (n-1)q and the
/// result is x[floor h] + (h - floor h)(x[floor h + 1] - x[floor h])
/// (Hyndman & Fan 1996, definition 7 — the default of R and NumPy).
/// Nullopt when `values` is empty.
std::optional<double> percentile(std::vector<double> values, double q);

/// The Theil–Sen slope of y against x: the median of the slopes
/// (y_j - y_i) / (x_j - x_i) over all pairs i < j with x_i != x_j (Theil 1950;
/// Sen 1968). Nullopt when there are fewer than two distinct x values.
/// `x` and `y` must have the same length. Cost: O(n^2) time and memory in the
/// number of points; callers keep n modest (see kMaxTrendPoints).
std::optional<double> theil_sen_slope(const std::vector<double>& x, const std::vector<double>& y);

/// Callers thin their series to at most this many points before asking for a
/// slope (n(n-1)/2 pairs: about two million).
inline constexpr size_t kMaxTrendPoints = 2000;

/// A two-sided confidence interval for a proportion.
struct ProportionInterval {
  double low = 0;
  double high = 0;
};

/// The 95% normal quantile used by wilson_interval by default.
inline constexpr double kZ95 = 1.959963984540054;

/// Wilson's score interval (Wilson 1927; Newcombe 1998, method 3) for
/// `successes` out of `trials`, without continuity correction:
///   (2np + z^2 ± z sqrt(z^2 + 4np(1-p))) / (2(n + z^2)).
/// Always within [0, 1]. Nullopt when trials == 0 or successes > trials.
std::optional<ProportionInterval> wilson_interval(int64_t successes, int64_t trials, double z = kZ95);

}  // namespace readyby
