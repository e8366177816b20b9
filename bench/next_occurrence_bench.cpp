// Throughput of next_occurrence on mixed schedules (hourly, daily, weekday,
// weekly, monthly, stepped) in three zones, from instants spread over 2026.
// Usage: next_occurrence_bench [QUERIES]
#include <chrono>
#include <cstdio>
#include <cstdlib>
#include <random>
#include <vector>

#include "time/cron.h"

using namespace readyby;

int main(int argc, char** argv) {
  long queries = argc > 1 ? std::atol(argv[1]) : 3000000;
  const char* schedules[] = {"17 * * * *",  "30 2 * * *",   "0 7 * * mon-fri", "0 4 * * sun",
                             "0 0 1 * *",   "*/15 9-17 * * *", "45 1,13 * * *", "0 6 1,15 * 1"};
  const char* zones[] = {"America/Chicago", "Europe/London", "Australia/Sydney"};
  std::vector<Cron> crons;
  for (const char* s : schedules) crons.push_back(*parse_cron(s).value);
  std::vector<const Zone*> zs;
  for (const char* z : zones) zs.push_back(Zone::find(z));
  Calendar weekdays;
  weekdays.skip_weekdays = 0b1000001;
  std::mt19937_64 rng(1);
  std::vector<int64_t> starts(4096);
  for (auto& s : starts) s = 1767225600 + static_cast<int64_t>(rng() % (365 * 86400ULL));
  auto t0 = std::chrono::steady_clock::now();
  int64_t checksum = 0;
  for (long i = 0; i < queries; ++i) {
    const Cron& c = crons[static_cast<size_t>(i) % crons.size()];
    const Zone& z = *zs[static_cast<size_t>(i / 8) % zs.size()];
    const Calendar& cal = (i % 5 == 0) ? weekdays : Calendar{};
    auto r = next_occurrence(c, z, cal, from_unix(starts[static_cast<size_t>(i) % starts.size()]));
    if (r) checksum += to_unix(*r) & 0xFF;
  }
  double secs = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
  std::printf("next_occurrence: %ld queries in %.3f s = %.2f million/s (checksum %lld)\n", queries, secs,
              static_cast<double>(queries) / secs / 1e6, static_cast<long long>(checksum));
  return 0;
}
