#include "history/stats.h"

#include <algorithm>
#include <cmath>

namespace readyby {

std::optional<double> percentile(std::vector<double> values, double q) {
  if (values.empty()) return std::nullopt;
  q = std::clamp(q, 0.0, 1.0);
  std::sort(values.begin(), values.end());
  const double h = static_cast<double>(values.size() - 1) * q;
  const size_t lo = static_cast<size_t>(std::floor(h));
  if (lo + 1 >= values.size()) return values.back();
  return values[lo] + (h - static_cast<double>(lo)) * (values[lo + 1] - values[lo]);
}

std::optional<double> theil_sen_slope(const std::vector<double>& x, const std::vector<double>& y) {
  const size_t n = std::min(x.size(), y.size());
  std::vector<double> slopes;
  slopes.reserve(n < 2 ? 0 : n * (n - 1) / 2);
  for (size_t i = 0; i < n; ++i) {
    for (size_t j = i + 1; j < n; ++j) {
      if (x[j] == x[i]) continue;
      slopes.push_back((y[j] - y[i]) / (x[j] - x[i]));
    }
  }
  if (slopes.empty()) return std::nullopt;
  // The median: the middle order statistic, or the mean of the two middle ones.
  const size_t mid = slopes.size() / 2;
  std::nth_element(slopes.begin(), slopes.begin() + static_cast<std::ptrdiff_t>(mid), slopes.end());
  const double upper = slopes[mid];
  if (slopes.size() % 2 == 1) return upper;
  const double lower = *std::max_element(slopes.begin(), slopes.begin() + static_cast<std::ptrdiff_t>(mid));
  return (lower + upper) / 2;
}

std::optional<ProportionInterval> wilson_interval(int64_t successes, int64_t trials, double z) {
  if (trials <= 0 || successes < 0 || successes > trials) return std::nullopt;
  const double n = static_cast<double>(trials);
  const double p = static_cast<double>(successes) / n;
  const double z2 = z * z;
  const double centre = 2 * n * p + z2;
  const double spread = z * std::sqrt(z2 + 4 * n * p * (1 - p));
  const double denominator = 2 * (n + z2);
  ProportionInterval out;
  out.low = std::clamp((centre - spread) / denominator, 0.0, 1.0);
  out.high = std::clamp((centre + spread) / denominator, 0.0, 1.0);
  if (successes == 0) out.low = 0;
  if (successes == trials) out.high = 1;
  return out;
}

}  // namespace readyby
