#include <catch2/catch.hpp>

#include <cmath>
#include <map>
#include <random>
#include <set>
#include <sstream>
#include <string>
#include <vector>

#include "engine/check.h"
#include "forecast/forecast.h"
#include "forecast/random.h"
#include "plan_fixture.h"
#include "time/zone.h"

using namespace readyby;

namespace {

// History starts on Monday 2025-01-06 (UTC plans).
Instant history_day(int d, int hour = 0, int minute = 0) {
  return *parse_rfc3339("2025-01-06T00:00:00Z") + Seconds(d * kSecondsPerDay + hour * 3600 + minute * 60);
}

LocalDays local_day(int d) { return LocalDays(date::floor<date::days>(history_day(d).time_since_epoch())); }

// A daily source's history: on day d it lands `offset(d)` minutes after
// hour:minute (negative: missing), with data through midnight.
template <typename Offset>
std::vector<StoredLanding> daily_rows(int days, int hour, int minute, Offset offset) {
  std::vector<StoredLanding> rows;
  for (int d = 0; d < days; ++d) {
    const int off = offset(d);
    if (off < 0) continue;
    rows.push_back({history_day(d, hour, minute) + Seconds(off * 60), history_day(d), std::nullopt, LandingStatus::ok});
  }
  return rows;
}

ForecastOptions quick(int draws) {
  ForecastOptions o;
  o.draws = draws;
  o.replicates = 0;
  return o;
}

// The empirical CDF of the offsets {0, 1, ..., 60} minutes at t minutes.
double grid_cdf(int t) { return t < 0 ? 0.0 : (std::min(t, 60) + 1) / 61.0; }

// Days of history in which every weekday sees each offset 0..60 exactly once.
constexpr int kGridDays = 7 * 61;

}  // namespace

TEST_CASE("mt19937_64 and the uniform index are the fixed, portable sequence the forecast relies on") {
  // C++ standard [rand.predef]: the 10000th invocation of a default-constructed
  // mt19937_64 produces 9981545732273789042.
  std::mt19937_64 engine;
  for (int i = 1; i < 10000; ++i) engine();
  CHECK(engine() == 9981545732273789042ULL);
  // uniform_below covers [0, n) and nothing else; for n = 3 the counts over
  // 30,000 draws stay within 4 standard errors of 10,000 (binomial, p = 1/3).
  std::mt19937_64 rng(7);
  int counts[3] = {0, 0, 0};
  for (int i = 0; i < 30000; ++i) ++counts[uniform_below(rng, 3)];
  for (int c : counts) CHECK(std::abs(c - 10000) < 4 * std::sqrt(30000.0 / 3 * 2 / 3));
  CHECK(stream_seed(1, 1, 0) != stream_seed(1, 1, 1));
  CHECK(stream_seed(1, 1, 0) != stream_seed(2, 1, 0));
}

TEST_CASE("two parallel independent sources: P(max <= t) = F_A(t_A) F_B(t_B)") {
  // Order statistics of independent variables: the maximum of independent X
  // and Y is <= t exactly when both are, so P(max <= t) = F_X(t) F_Y(t)
  // (e.g. Grimmett and Stirzaker, Probability and Random Processes, on order
  // statistics — from memory). Each source's history is the evenly spaced
  // offsets 0..60 min (once per weekday group), whose empirical distribution —
  // the one the forecast samples — is uniform on those 61 values.
  struct Case {
    const char* run;  // cron of the model's run
    int t_a, t_b;     // minutes from each source's occurrence to the run
  };
  const Case cases[] = {
      {"30 1 * * *", 30, 0}, {"45 1 * * *", 45, 15}, {"0 2 * * *", 60, 30}, {"30 2 * * *", 90, 60},
      {"50 1 * * *", 50, 20},
  };
  for (const Case& c : cases) {
    INFO("run at " << c.run);
    Plan plan = readyby::testing::plan_from_text(std::string(R"(plan: parallel
title: Two independent feeds into one feature (fictional)
timezone: Etc/UTC
sources:
  feed_a: {schedule: "0 1 * * *", lands_after: PT30M, data_lag: PT1H}
  feed_b: {schedule: "30 1 * * *", lands_after: PT30M, data_lag: PT90M}
features:
  both: {inputs: [feed_a, feed_b], max_age: PT3H}
models:
  m:
    features: [both]
    runs: [{at: ")") + c.run + "\"}]\n");
    History history(plan.nodes.size());
    history[0] = daily_rows(kGridDays, 1, 0, [](int d) { return d / 7; });
    history[1] = daily_rows(kGridDays, 1, 30, [](int d) { return (17 * (d / 7)) % 61; });  // a permutation of 0..60
    const Instant start = window_start(plan, local_day(kGridDays));
    LandingModels models = fit_landing_models(plan, history, start, start);
    const int draws = 2000, days = 28;
    std::vector<TargetForecast> f =
        forecast_targets(plan, models, {model_target(plan, 0, local_day(kGridDays), days)}, quick(draws));
    const double exact = grid_cdf(c.t_a) * grid_cdf(c.t_b);
    // Runs on different days use different, independent occurrences, so the
    // estimate is a mean of draws * days independent Bernoulli(exact) outcomes.
    const double se = std::sqrt(exact * (1 - exact) / (draws * days));
    INFO("exact " << exact << ", forecast " << f[0].probability << ", standard error " << se);
    CHECK(std::abs(f[0].probability - exact) <= 4 * se);
    if (se > 0) CHECK(f[0].standard_error == Approx(se).epsilon(0.2));
    // feed_b has less time in every case, so it is late more often.
    if (exact < 1) CHECK(f[0].most_often_late == plan.find_node("feed_b"));
  }
}

TEST_CASE("a fixed-time job: on time exactly when the upstream lands before the job starts") {
  // The job starts at its cron time whatever happens upstream; a delivery
  // after the start waits a day (DESIGN §4). So the run is on time with the
  // probability that the offset is at most (start - occurrence), and never
  // when the job itself finishes after the run.
  struct Case {
    int start_minute;   // the job's 01:MM start; the feed's occurrence is 01:00
    int run_time;       // minutes
    double exact;
  };
  const Case cases[] = {
      {40, 10, grid_cdf(40)}, {20, 10, grid_cdf(20)}, {5, 0, grid_cdf(5)}, {59, 0, grid_cdf(59)},
      {55, 10, 0.0},  // 01:55 + 10 min finishes after the 02:00 run
  };
  for (const Case& c : cases) {
    INFO("start 01:" << c.start_minute << ", run time " << c.run_time << " min");
    Plan plan = readyby::testing::plan_from_text(
        "plan: chain\ntitle: A fixed-time job (fictional)\ntimezone: Etc/UTC\nsources:\n"
        "  feed: {schedule: \"0 1 * * *\", lands_after: PT30M, data_lag: PT1H}\n"
        "jobs:\n  merge: {inputs: [feed], trigger: \"" + std::to_string(c.start_minute) +
        " 1 * * *\", run_time: PT" + std::to_string(c.run_time) + "M}\n"
        "features:\n  merged: {inputs: [merge], max_age: PT3H}\n"
        "models:\n  m:\n    features: [merged]\n    runs: [{at: \"0 2 * * *\"}]\n");
    History history(plan.nodes.size());
    history[0] = daily_rows(kGridDays, 1, 0, [](int d) { return d / 7; });
    const Instant start = window_start(plan, local_day(kGridDays));
    LandingModels models = fit_landing_models(plan, history, start, start);
    const int draws = 2000, days = 28;
    std::vector<TargetForecast> f =
        forecast_targets(plan, models, {model_target(plan, 0, local_day(kGridDays), days)}, quick(draws));
    const double se = std::sqrt(c.exact * (1 - c.exact) / (draws * days));
    INFO("exact " << c.exact << ", forecast " << f[0].probability);
    CHECK(std::abs(f[0].probability - c.exact) <= 4 * se);
  }
}

TEST_CASE("a source missing 10% of its occurrences, otherwise on time, gives 0.90") {
  Plan plan = readyby::testing::plan_from_text(R"(plan: gaps
title: A feed that sometimes does not come (fictional)
timezone: Etc/UTC
sources:
  feed: {schedule: "0 1 * * *", lands_after: PT30M, data_lag: PT1H}
features:
  f: {inputs: [feed], max_age: PT12H}
models:
  m:
    features: [f]
    runs: [{at: "0 6 * * *"}]
)");
  History history(plan.nodes.size());
  history[0] = daily_rows(140, 1, 0, [](int d) { return d % 10 == 5 ? -1 : 30; });
  const Instant start = window_start(plan, local_day(140));
  LandingModels models = fit_landing_models(plan, history, start, start);
  REQUIRE(models.models[0].pooled.missing_rate == Approx(0.1));
  const int draws = 2000, days = 28;
  ForecastOptions options = quick(draws);
  options.replicates = 40;
  std::vector<TargetForecast> f = forecast_targets(plan, models, {model_target(plan, 0, local_day(140), days)}, options);
  const double se = std::sqrt(0.9 * 0.1 / (draws * days));
  INFO("forecast " << f[0].probability << ", 4 standard errors " << 4 * se);
  CHECK(std::abs(f[0].probability - 0.9) <= 4 * se);
  CHECK(f[0].most_often_late == 0);
  CHECK(f[0].most_often_late_share == 1.0);
  // The interval reflects 140 days of history: a binomial proportion from 140
  // occurrences has a standard error near 0.025, so the 95% interval is a few
  // points wide and holds the forecast.
  REQUIRE(f[0].interval);
  CHECK(f[0].interval->low <= f[0].probability);
  CHECK(f[0].interval->high >= f[0].probability);
  CHECK(f[0].interval->high - f[0].interval->low > 0.04);
  CHECK(f[0].interval->high - f[0].interval->low < 0.2);
}

namespace {

// A random plan for the engine comparison: cron and stream sources in zones
// with daylight saving, inputs-triggered and cron-triggered jobs, optional
// features, daily and six-hourly runs.
std::string random_forecast_plan(std::mt19937_64& rng, int index) {
  auto pick = [&](int n) { return static_cast<int>(rng() % static_cast<uint64_t>(n)); };
  const char* zones[] = {"America/Chicago", "Europe/London", "Etc/UTC"};
  const char* crons[] = {"0 1 * * *", "30 2 * * *", "15 */6 * * *", "0 3 * * mon-fri", "45 0 * * *", "10 * * * *"};
  std::ostringstream y;
  y << "plan: random-" << index << "\ntitle: random (fictional)\ntimezone: " << zones[pick(3)] << "\n";
  y << "calendars:\n  weekdays: {skip_weekdays: [sat, sun]}\nsources:\n";
  std::vector<std::string> ids;
  const int sources = 2 + pick(3);
  for (int i = 0; i < sources; ++i) {
    const std::string id = "s" + std::to_string(i);
    if (pick(5) == 0) {
      y << "  " << id << ": {schedule: stream, lands_after: PT" << pick(30) << "M}\n";
    } else {
      y << "  " << id << ": {schedule: \"" << crons[pick(6)] << "\", lands_after: PT" << pick(90)
        << "M, data_lag: PT" << pick(3) << "H, timezone: " << zones[pick(3)] << (pick(4) == 0 ? ", calendar: weekdays" : "")
        << "}\n";
    }
    ids.push_back(id);
  }
  auto derived = [&](const std::string& id) {
    y << "  " << id << ": {inputs: [";
    const int n = 1 + pick(3);
    for (int k = 0; k < n; ++k) y << (k ? ", " : "") << ids[static_cast<size_t>(pick(static_cast<int>(ids.size())))];
    y << "], run_time: PT" << pick(40) << "M";
    if (pick(3) == 0) y << ", trigger: \"" << pick(60) << " " << 1 + pick(5) << " * * *\"";
  };
  y << "jobs:\n";
  const int jobs = 1 + pick(3);
  std::vector<std::string> job_ids;
  for (int i = 0; i < jobs; ++i) {
    const std::string id = "j" + std::to_string(i);
    derived(id);
    y << "}\n";
    job_ids.push_back(id);
  }
  ids.insert(ids.end(), job_ids.begin(), job_ids.end());
  y << "features:\n";
  std::vector<std::string> features;
  for (int i = 0; i < 4; ++i) {
    const std::string id = "f" + std::to_string(i);
    derived(id);
    y << ", max_age: PT" << 2 + pick(30) << "H" << (pick(4) == 0 ? ", optional: true" : "") << "}\n";
    features.push_back(id);
  }
  y << "models:\n";
  for (int m = 0; m < 2; ++m) {
    y << "  m" << m << ":\n    features: [" << features[static_cast<size_t>(m)] << ", "
      << features[static_cast<size_t>(2 + pick(2))] << "]\n    runs: [{at: \""
      << (pick(2) ? "0 7 * * *" : "30 */6 * * *") << "\"}]\n";
  }
  return y.str();
}

// Random recorded rows for node n over [from, to): per occurrence of its own
// schedule (or per two-hour slot), a random offset up to three hours, some
// missing, some failed first.
std::vector<StoredLanding> random_rows(const Plan& plan, int n, Instant from, Instant to, std::mt19937_64& rng) {
  const Node& node = plan.nodes[static_cast<size_t>(n)];
  const Cron* cron = own_schedule(node);
  std::vector<StoredLanding> rows;
  std::vector<Instant> occurrences;
  if (cron) {
    for (Instant t = from;;) {
      std::optional<Instant> o = next_occurrence(*cron, *node.zone, plan.calendar(node.calendar), t);
      if (!o || *o >= to) break;
      occurrences.push_back(*o);
      t = *o + Seconds(1);
    }
  } else {
    for (Instant t = from; t < to; t += Seconds(7200)) occurrences.push_back(t);
  }
  const int64_t lag = cron ? static_cast<int64_t>(rng() % 4) * 3600 : 0;
  for (Instant o : occurrences) {
    if (rng() % 8 == 0) continue;  // missing
    const Instant through = o - Seconds(lag);
    const Instant landed = o + Seconds(static_cast<int64_t>(rng() % 180) * 60);
    if (rng() % 10 == 0) rows.push_back({landed - Seconds(60), through, std::nullopt, LandingStatus::failed});
    rows.push_back({landed, through, rng() % 2 ? std::optional<Instant>(o) : std::nullopt, LandingStatus::ok});
  }
  return rows;
}

}  // namespace

TEST_CASE("every draw agrees with the freshness engine given the same deliveries (random plans)") {
  std::mt19937_64 rng(2026);
  const LocalDays from = LocalDays(date::year(2026) / 3 / 1);  // the window spans the 2026-03-08 US change
  const int days = 14;
  int compared_runs = 0, late_runs = 0;
  size_t live = 0, doomed = 0;
  for (int index = 0; index < 40; ++index) {
    const std::string text = random_forecast_plan(rng, index);
    INFO(text);
    Plan plan = readyby::testing::plan_from_text(text);
    const Instant start = window_start(plan, from);
    History history(plan.nodes.size());
    for (size_t n = 0; n < plan.nodes.size(); ++n) {
      if (plan.nodes[n].kind == NodeKind::feature || rng() % 3 == 0) continue;
      history[n] = random_rows(plan, static_cast<int>(n), start - Seconds(40 * kSecondsPerDay), start, rng);
    }
    LandingModels models = fit_landing_models(plan, history, start, start);
    std::vector<ForecastTarget> targets;
    for (size_t m = 0; m < plan.models.size(); ++m) targets.push_back(model_target(plan, static_cast<int>(m), from, days));
    const DrawEngine engine(plan, models, targets);
    const OutcomeTables fitted = OutcomeTables::fitted(models);
    DrawEngine::ScratchPtr scratch = engine.make_scratch();
    for (int draw = 0; draw < 6; ++draw) {
      const DrawMode mode = draw % 2 ? DrawMode::whole_days : DrawMode::independent;
      const uint64_t seed = stream_seed(index, 9, static_cast<uint64_t>(draw));
      DrawResult result, partial;
      engine.run_draw(fitted, mode, seed, scratch.get(), &result);
      // A partial draw (live runs only) agrees with the full one; doomed runs
      // fail and settled ones are on time in the full draw.
      engine.run_draw(fitted, mode, seed, scratch.get(), &partial, false);
      for (size_t i = 0; i < result.ok.size(); ++i) {
        INFO("drawn run " << i << (engine.doomed(i) ? " (doomed)" : ""));
        REQUIRE(partial.ok[i] == result.ok[i]);
      }
      live += engine.live_count();
      doomed += engine.doomed_count();
      ObservedDeliveries observed = engine.deliveries(fitted, mode, seed);
      Evaluation ev = evaluate(plan, from, days, &observed);
      std::map<std::pair<int, int64_t>, const RunResult*> by_run;
      for (const RunResult& r : ev.runs) by_run[{r.model, to_unix(r.at)}] = &r;
      std::vector<int> drawn_position(engine.run_count(), -1);
      for (size_t i = 0; i < engine.drawn_runs().size(); ++i) drawn_position[engine.drawn_runs()[i]] = static_cast<int>(i);
      std::map<int, std::set<int>> origins;
      for (const auto& [i, node] : result.late_origins) origins[i].insert(node);
      for (size_t m = 0; m < targets.size(); ++m) {
        for (size_t k = 0; k < targets[m].runs.size(); ++k) {
          const size_t run = engine.first_run(m) + k;
          const RunResult& expected = *by_run.at({static_cast<int>(m), to_unix(targets[m].runs[k])});
          const bool ok = engine.fixed(run) ? engine.fixed_ok(run) : result.ok[static_cast<size_t>(drawn_position[run])];
          INFO("model m" << m << " run " << format_rfc3339(targets[m].runs[k], nullptr) << " draw " << draw);
          REQUIRE(ok == (expected.status == RunStatus::ok));
          ++compared_runs;
          if (ok) continue;
          ++late_runs;
          std::set<int> want;
          const bool fail = expected.status == RunStatus::fail;
          for (const FeatureResult& f : expected.features) {
            if (f.status != FeatureStatus::ok && f.optional != fail) want.insert(ev.chain(f).front());
          }
          std::set<int> got;
          if (engine.fixed(run)) got.insert(engine.fixed_origins(run).begin(), engine.fixed_origins(run).end());
          else got = origins[drawn_position[run]];
          CHECK(got == want);
        }
      }
    }
  }
  INFO(compared_runs << " runs compared, " << late_runs << " not on time; " << live << " live, " << doomed
                     << " doomed");
  CHECK(live > 0);
  CHECK(doomed > 0);
  CHECK(late_runs > compared_runs / 20);
  CHECK(late_runs < compared_runs);
}

TEST_CASE("results do not depend on the number of threads") {
  Plan plan = readyby::testing::plan_from_text(R"(plan: threads
title: Thread count (fictional)
timezone: Etc/UTC
sources:
  feed_a: {schedule: "0 1 * * *", lands_after: PT30M, data_lag: PT1H}
  feed_b: {schedule: "30 1 * * *", lands_after: PT30M, data_lag: PT90M}
features:
  both: {inputs: [feed_a, feed_b], max_age: PT3H}
models:
  m:
    features: [both]
    runs: [{at: "50 1 * * *"}]
)");
  History history(plan.nodes.size());
  history[0] = daily_rows(90, 1, 0, [](int d) { return (d * 37) % 61; });
  history[1] = daily_rows(90, 1, 30, [](int d) { return d % 9 == 0 ? -1 : (d * 11) % 45; });
  const Instant start = window_start(plan, local_day(90));
  LandingModels models = fit_landing_models(plan, history, start, start);
  ForecastOptions options;
  options.draws = 300;
  options.replicates = 20;
  std::vector<std::vector<TargetForecast>> results;
  for (int threads : {1, 2, 3}) {
    options.threads = threads;
    results.push_back(forecast_targets(plan, models, {model_target(plan, 0, local_day(90), 21)}, options));
  }
  for (size_t i = 1; i < results.size(); ++i) {
    INFO("threads " << i + 1);
    CHECK(results[i][0].probability == results[0][0].probability);
    CHECK(results[i][0].standard_error == results[0][0].standard_error);
    CHECK(results[i][0].interval->low == results[0][0].interval->low);
    CHECK(results[i][0].interval->high == results[0][0].interval->high);
    CHECK(results[i][0].run_probability == results[0][0].run_probability);
    CHECK(results[i][0].most_often_late == results[0][0].most_often_late);
  }
  options.seed = 99;
  std::vector<TargetForecast> other = forecast_targets(plan, models, {model_target(plan, 0, local_day(90), 21)}, options);
  CHECK(other[0].run_probability != results[0][0].run_probability);
}
