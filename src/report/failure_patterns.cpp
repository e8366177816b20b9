#include "report/failure_patterns.h"

#include <algorithm>
#include <map>
#include <set>

namespace readyby {

namespace {

// Last occurrence of `cron` at or before `t` (searching up to ~400 days back).
std::optional<Instant> previous_occurrence(const Cron& cron, const Zone& zone, const Calendar& calendar, Instant t) {
  for (int64_t window : {int64_t{2}, int64_t{9}, int64_t{40}, int64_t{400}}) {
    Instant from = t - Seconds(window * kSecondsPerDay);
    std::optional<Instant> last;
    std::optional<Instant> o = next_occurrence(cron, zone, calendar, from);
    while (o && *o <= t) {
      last = o;
      o = next_occurrence(cron, zone, calendar, *o + Seconds(1));
    }
    if (last) return last;
  }
  return std::nullopt;
}

}  // namespace

std::vector<ChainStep> explain_chain(const Plan& plan, const Evaluation& ev, const FeatureResult& feature,
                                     Instant run_at) {
  std::vector<int> chain = ev.chain(feature);
  std::vector<ChainStep> steps(chain.size());
  const Instant w = feature.needs_data_through;
  for (size_t i = 0; i < chain.size(); ++i) {
    steps[i].node = chain[i];
    steps[i].ready = ev.ready(chain[i], w);
  }
  std::optional<Instant> latest = run_at;
  for (size_t i = chain.size(); i-- > 0;) {
    steps[i].latest = latest;
    const Node& node = plan.nodes[static_cast<size_t>(chain[i])];
    if (!latest || node.kind == NodeKind::source) continue;
    Instant start_by = *latest - Seconds(node.run_time.seconds);
    if (node.trigger) {
      latest = previous_occurrence(*node.trigger, *node.zone, plan.calendar(node.calendar), start_by);
      // The trigger start just before the data was complete read stale data.
      if (i > 0 && steps[i - 1].ready) {
        auto stale = previous_occurrence(*node.trigger, *node.zone, plan.calendar(node.calendar),
                                         *steps[i - 1].ready - Seconds(1));
        if (stale && *stale >= w) steps[i].stale_start = stale;
      }
    } else {
      latest = start_by;
    }
  }
  return steps;
}

std::optional<int64_t> later_start_needed(const Plan& plan, const Evaluation& ev, const RunResult& run) {
  const Model& model = plan.models[static_cast<size_t>(run.model)];
  int64_t delay = 0;
  for (int iteration = 0; iteration < 200 && delay <= kLaterStartSearch; ++iteration) {
    Instant at = run.at + Seconds(delay);
    int64_t needed = 0;
    bool never = false;
    for (int f : model.features) {
      const Node& feature = plan.nodes[static_cast<size_t>(f)];
      if (feature.optional) continue;
      std::optional<Instant> ready = ev.ready(f, at - Seconds(feature.max_age.seconds));
      if (!ready) {
        never = true;
        break;
      }
      needed = std::max(needed, (*ready - at).count());
    }
    if (never) return std::nullopt;
    if (needed <= 0) return delay;
    delay += (needed + 59) / 60 * 60;  // run times are whole minutes
  }
  return std::nullopt;
}

namespace {

struct RunInfo {
  size_t index;
  std::string signature;
  std::vector<int> failing;
  int worst_feature_pos = -1;  // position in run.features
};

bool near_daylight_saving(const Plan& plan, const Evaluation& ev, const RunResult& run, const RunInfo& info,
                          std::string* detail) {
  std::set<const Zone*> zones = {plan.models[static_cast<size_t>(run.model)].zone};
  for (int f : info.failing) {
    for (const FeatureResult& fr : run.features) {
      if (fr.feature != f) continue;
      for (int n : ev.chain(fr)) zones.insert(plan.nodes[static_cast<size_t>(n)].zone);
    }
  }
  // A change of offset within the 36 hours before the run can shift a
  // delivery or a trigger relative to the run.
  for (const Zone* z : zones) {
    auto changes = z->transitions_in(run.at - Seconds(36 * 3600), run.at);
    if (!changes.empty()) {
      int64_t before = z->offset_at(changes[0] - Seconds(1)).count();
      int64_t after = z->offset_at(changes[0]).count();
      *detail = "a daylight-saving change in " + z->name() + " (clocks " +
                (after > before ? "forward " : "back ") + human_duration(after > before ? after - before : before - after) +
                " on " + format_local(z->to_local(changes[0])).substr(0, 10) + ")";
      return true;
    }
  }
  return false;
}

}  // namespace

std::vector<FailurePattern> failure_patterns(const Plan& plan, const Evaluation& ev) {
  std::vector<FailurePattern> out;
  for (size_t m = 0; m < plan.models.size(); ++m) {
    const Model& model = plan.models[m];
    std::vector<size_t> model_runs;
    std::vector<RunInfo> failing;
    for (size_t i = 0; i < ev.runs.size(); ++i) {
      const RunResult& run = ev.runs[i];
      if (run.model != static_cast<int>(m)) continue;
      model_runs.push_back(i);
      if (run.status != RunStatus::fail) continue;
      RunInfo info{i, "", {}, -1};
      int64_t worst = INT64_MAX;
      for (size_t k = 0; k < run.features.size(); ++k) {
        const FeatureResult& f = run.features[k];
        if (f.optional || f.status == FeatureStatus::ok) continue;
        info.failing.push_back(f.feature);
        std::vector<int> chain = ev.chain(f);
        info.signature += std::to_string(f.feature) + "<" + std::to_string(chain.front()) + ";";
        int64_t slack = f.status == FeatureStatus::never ? INT64_MIN : f.slack_seconds;
        if (slack < worst) worst = slack, info.worst_feature_pos = static_cast<int>(k);
      }
      failing.push_back(std::move(info));
    }
    if (failing.empty()) continue;

    auto finish = [&](FailurePattern p, const std::vector<const RunInfo*>& infos) {
      p.model = static_cast<int>(m);
      // The fix: the worst run decides how much earlier the delivery must land.
      int64_t earlier = 0;
      bool earlier_known = true;
      std::optional<int64_t> later = 0;
      std::set<int> stale;
      for (const RunInfo* info : infos) {
        const RunResult& run = ev.runs[info->index];
        p.runs.push_back(info->index);
        const FeatureResult& worst = run.features[static_cast<size_t>(info->worst_feature_pos)];
        std::vector<ChainStep> steps = explain_chain(plan, ev, worst, run.at);
        int64_t run_earlier = 0;
        if (steps.front().ready && steps.front().latest) {
          run_earlier = (*steps.front().ready - *steps.front().latest).count();
        } else {
          earlier_known = false;
        }
        if (p.critical_chain.empty() || run_earlier > earlier) {
          p.critical_chain.clear();
          for (const ChainStep& s : steps) p.critical_chain.push_back(s.node);
          p.critical_source = steps.front().node;
          p.failing_features = info->failing;
        }
        earlier = std::max(earlier, run_earlier);
        for (const ChainStep& s : steps) {
          if (s.stale_start) stale.insert(s.node);
        }
        std::optional<int64_t> l = later_start_needed(plan, ev, run);
        if (!l || !later) later.reset();
        else later = std::max(*later, *l);
      }
      if (earlier_known && earlier > 0) p.land_earlier_seconds = earlier;
      p.start_later_seconds = later;
      p.stale_jobs.assign(stale.begin(), stale.end());
      out.push_back(std::move(p));
    };

    if (failing.size() == model_runs.size() && model_runs.size() > 1) {
      FailurePattern p;
      p.when = FailurePattern::When::every_run;
      p.description = "fails every run (" + std::to_string(model_runs.size()) + " of " +
                      std::to_string(model_runs.size()) + ")";
      std::vector<const RunInfo*> infos;
      for (const RunInfo& info : failing) infos.push_back(&info);
      finish(std::move(p), infos);
      continue;
    }
    // Group by signature, in order of first occurrence.
    std::vector<std::string> order;
    std::map<std::string, std::vector<const RunInfo*>> groups;
    for (const RunInfo& info : failing) {
      if (!groups.count(info.signature)) order.push_back(info.signature);
      groups[info.signature].push_back(&info);
    }
    for (const std::string& sig : order) {
      std::vector<const RunInfo*> rest = groups[sig];
      // Weekdays on which every run of the model failed with this signature.
      std::map<int, std::pair<int, int>> per_weekday;  // weekday -> (runs of model, failing in group)
      auto weekday_of_run = [&](size_t i) {
        return weekday_of(date::floor<date::days>(model.zone->to_local(ev.runs[i].at)));
      };
      for (size_t i : model_runs) per_weekday[weekday_of_run(i)].first++;
      for (const RunInfo* info : rest) per_weekday[weekday_of_run(info->index)].second++;
      for (auto& [weekday, counts] : per_weekday) {
        if (counts.second < 2 || counts.first != counts.second) continue;
        FailurePattern p;
        p.when = FailurePattern::When::weekday;
        p.weekday = weekday;
        p.description = std::string("fails every ") + weekday_name(weekday) + " (" + std::to_string(counts.second) +
                        " of " + std::to_string(counts.first) + " " + weekday_name(weekday) + " runs)";
        std::vector<const RunInfo*> mine, others;
        for (const RunInfo* info : rest) (weekday_of_run(info->index) == weekday ? mine : others).push_back(info);
        finish(std::move(p), mine);
        rest = others;
      }
      // Daylight-saving dates, one pattern per date.
      std::vector<const RunInfo*> plain;
      std::map<std::string, std::pair<std::string, std::vector<const RunInfo*>>> dst;
      std::vector<std::string> dst_order;
      for (const RunInfo* info : rest) {
        std::string detail;
        if (near_daylight_saving(plan, ev, ev.runs[info->index], *info, &detail)) {
          std::string day = format_local(model.zone->to_local(ev.runs[info->index].at)).substr(0, 10);
          if (!dst.count(day)) dst_order.push_back(day);
          dst[day].first = detail;
          dst[day].second.push_back(info);
        } else {
          plain.push_back(info);
        }
      }
      for (const std::string& day : dst_order) {
        FailurePattern p;
        p.when = FailurePattern::When::daylight_saving;
        p.description = "fails on " + day + ", " + dst[day].first;
        finish(std::move(p), dst[day].second);
      }
      if (!plain.empty()) {
        FailurePattern p;
        p.when = FailurePattern::When::dates;
        std::string days;
        std::set<std::string> seen;
        for (const RunInfo* info : plain) {
          std::string d = format_local(model.zone->to_local(ev.runs[info->index].at)).substr(0, 10);
          if (seen.insert(d).second) days += (days.empty() ? "" : ", ") + d;
        }
        p.description = "fails on " + days;
        finish(std::move(p), plain);
      }
    }
  }
  return out;
}

}  // namespace readyby
