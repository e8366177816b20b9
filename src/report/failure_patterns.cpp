#include "report/failure_patterns.h"

#include <algorithm>
#include <map>
#include <set>

namespace readyby {

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


namespace {

std::string hhmm(Instant t, const Zone* zone) { return format_local(zone->to_local(t)).substr(11); }

// When occurrence `c` of `cron` is a local time in a spring-forward gap read
// with the earlier offset, the nominal "HH:MM" it was written for; else "".
std::string gap_nominal(const Cron& cron, const Zone& zone, Instant c) {
  LocalTime actual = zone.to_local(c);
  for (int back = 1; back <= 180; ++back) {
    LocalTime l = actual - Seconds(back * 60);
    auto day = date::floor<date::days>(l);
    int minute_of_day = static_cast<int>((l - day).count() / 60);
    if (!((cron.hours >> (minute_of_day / 60)) & 1) || !((cron.minutes >> (minute_of_day % 60)) & 1)) continue;
    if (zone.from_local(l) == c) return format_local(l).substr(11);
  }
  return "";
}

}  // namespace

std::optional<Fix> fix_for(const Plan& plan, const Evaluation& ev, const RunResult& run, const FeatureResult& feature) {
  if (feature.status != FeatureStatus::late) return std::nullopt;
  const Zone* zone = plan.models[static_cast<size_t>(run.model)].zone;
  std::vector<ChainStep> steps = explain_chain(plan, ev, feature, run.at);
  auto id = [&](size_t i) { return "'" + plan.nodes[static_cast<size_t>(steps[i].node)].id + "'"; };
  // The step closest to the feature that is late on its own account: a
  // cron-triggered node (its fixed start quantises everything upstream), or
  // else the delivery at the head of the chain.
  size_t target = 0;
  for (size_t i = steps.size(); i-- > 1;) {
    const Node& n = plan.nodes[static_cast<size_t>(steps[i].node)];
    if (n.trigger && steps[i].ready && steps[i].latest && *steps[i].ready > *steps[i].latest) {
      target = i;
      break;
    }
  }
  Fix fix;
  if (target > 0) {
    const Node& job = plan.nodes[static_cast<size_t>(steps[target].node)];
    const Seconds run_time(job.run_time.seconds);
    Instant started = *steps[target].ready - run_time;
    Instant start_by = *steps[target].latest - run_time;
    Instant input_landed = *steps[target - 1].ready;
    std::string what = std::string(to_string(job.kind)) + " " + id(target);
    if (input_landed > start_by) {
      // Even a start at the last moment would find its input missing.
      fix.node = steps[target - 1].node;
      fix.seconds = (input_landed - start_by).count();
      fix.text = id(target - 1) + " lands at " + hhmm(input_landed, zone) + ", after the last start of " + what +
                 " that could still be on time (" + hhmm(start_by, zone) + "); it would have to land " +
                 human_duration(fix.seconds) + " earlier";
      return fix;
    }
    fix.node = steps[target].node;
    fix.move_start = true;
    if (steps[target].stale_start) {
      Instant stale = *steps[target].stale_start;
      fix.seconds = (input_landed - stale).count();
      fix.text = what + " starts at " + hhmm(stale, zone) + " (\"" + job.trigger->text + "\") before " +
                 id(target - 1) + " lands at " + hhmm(input_landed, zone) +
                 ", so that start reads old data and the new data waits for the next start at " +
                 format_local(zone->to_local(started)) + "; start it between " + hhmm(input_landed, zone) + " and " +
                 hhmm(start_by, zone) + ", or have " + id(target - 1) + " land " + human_duration(fix.seconds) +
                 " earlier";
      return fix;
    }
    fix.seconds = (started - start_by).count();
    std::string nominal = gap_nominal(*job.trigger, *job.zone, started);
    fix.text = what + " starts at " + hhmm(started, zone) +
               (nominal.empty() ? "" : " (its " + nominal + " start falls in the daylight-saving gap that day)") +
               "; to be on time it would have to start by " + hhmm(start_by, zone) + " (" +
               human_duration(fix.seconds) + " earlier)";
    return fix;
  }
  fix.node = steps[0].node;
  if (!steps[0].ready || !steps[0].latest) return std::nullopt;
  fix.seconds = (*steps[0].ready - *steps[0].latest).count();
  const Node& source = plan.nodes[static_cast<size_t>(steps[0].node)];
  fix.text = id(0) + " lands at " + format_local(zone->to_local(*steps[0].ready)) + "; it would have to land by " +
             format_local(zone->to_local(*steps[0].latest)) + " (" + human_duration(fix.seconds) + " earlier)";
  if (source.kind == NodeKind::source && source.schedule) {
    std::string nominal = gap_nominal(*source.schedule, *source.zone, *steps[0].ready - Seconds(source.lands_after.seconds));
    if (!nominal.empty()) fix.text += "; its " + nominal + " delivery falls in the daylight-saving gap that day";
  }
  return fix;
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

// The zones that matter to a failing run: the model's and those on the
// chains of its failing features.
std::set<const Zone*> zones_of(const Plan& plan, const Evaluation& ev, const RunResult& run, const RunInfo& info) {
  std::set<const Zone*> zones = {plan.models[static_cast<size_t>(run.model)].zone};
  for (int f : info.failing) {
    for (const FeatureResult& fr : run.features) {
      if (fr.feature != f) continue;
      for (int n : ev.chain(fr)) zones.insert(plan.nodes[static_cast<size_t>(n)].zone);
    }
  }
  return zones;
}

// A change of offset in one of `zones` within (from, to]: describes it
// ("a daylight-saving change in Z (clocks forward 1h 00m on D) while Y kept
// its clocks") and returns true.
bool daylight_saving_between(const std::set<const Zone*>& zones, Instant from, Instant to, std::string* detail) {
  for (const Zone* z : zones) {
    auto changes = z->transitions_in(from, to);
    if (changes.empty()) continue;
    int64_t before = z->offset_at(changes[0] - Seconds(1)).count();
    int64_t after = z->offset_at(changes[0]).count();
    *detail = "a daylight-saving change in " + z->name() + " (clocks " + (after > before ? "forward " : "back ") +
              human_duration(after > before ? after - before : before - after) + " on " +
              format_local(z->to_local(changes[0])).substr(0, 10) + ")";
    // Zones on the chain that did not change keep their clocks: their
    // deliveries move by the difference, as seen from the changed zone.
    std::string steady;
    for (const Zone* other : zones) {
      if (other == z || !other->transitions_in(changes[0] - Seconds(36 * 3600), changes[0] + Seconds(36 * 3600)).empty()) continue;
      steady += (steady.empty() ? "" : ", ") + other->name();
    }
    if (!steady.empty()) *detail += " while " + steady + " kept its clocks";
    return true;
  }
  return false;
}

// A change of offset within the 36 hours before the run can shift a
// delivery or a trigger relative to the run.
bool near_daylight_saving(const Plan& plan, const Evaluation& ev, const RunResult& run, const RunInfo& info,
                          std::string* detail) {
  return daylight_saving_between(zones_of(plan, ev, run, info), run.at - Seconds(36 * 3600), run.at, detail);
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
      // The worst run (most negative slack) of the group decides the fix.
      int64_t worst_slack = INT64_MAX;
      std::optional<int64_t> later = 0;
      std::set<int> stale;
      for (const RunInfo* info : infos) {
        const RunResult& run = ev.runs[info->index];
        p.runs.push_back(info->index);
        const FeatureResult& worst = run.features[static_cast<size_t>(info->worst_feature_pos)];
        int64_t slack = worst.status == FeatureStatus::never ? INT64_MIN : worst.slack_seconds;
        std::vector<ChainStep> steps = explain_chain(plan, ev, worst, run.at);
        for (const ChainStep& s : steps) {
          if (s.stale_start) stale.insert(s.node);
        }
        if (p.critical_chain.empty() || slack < worst_slack) {
          worst_slack = slack;
          p.worst_run = info->index;
          p.critical_chain.clear();
          for (const ChainStep& s : steps) p.critical_chain.push_back(s.node);
          p.critical_source = steps.front().node;
          p.failing_features = info->failing;
          p.fix = fix_for(plan, ev, run, worst);
        }
        std::optional<int64_t> l = later_start_needed(plan, ev, run);
        if (!l || !later) later.reset();
        else later = std::max(*later, *l);
      }
      if (p.fix && !p.fix->move_start && p.fix->seconds > 0) p.land_earlier_seconds = p.fix->seconds;
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
      // A block of consecutive runs, all failing: "fails every run from A to B",
      // with the daylight-saving change that started it when there is one.
      if (rest.size() >= 3) {
        std::vector<size_t> positions;
        for (const RunInfo* info : rest) {
          positions.push_back(static_cast<size_t>(
              std::find(model_runs.begin(), model_runs.end(), info->index) - model_runs.begin()));
        }
        if (positions.back() - positions.front() + 1 == positions.size()) {
          const RunResult& first = ev.runs[rest.front()->index];
          const RunResult& last = ev.runs[rest.back()->index];
          FailurePattern p;
          p.when = FailurePattern::When::span;
          p.description = "fails every run from " + format_local(model.zone->to_local(first.at)).substr(0, 10) +
                          " to " + format_local(model.zone->to_local(last.at)).substr(0, 10) + " (" +
                          std::to_string(rest.size()) + " runs)";
          std::string detail;
          if (positions.front() == 0) {
            p.description += ", from the start of the window";
          } else if (near_daylight_saving(plan, ev, first, *rest.front(), &detail)) {
            p.description += ", starting after " + detail;
          }
          if (positions.back() + 1 == model_runs.size()) {
            p.description += "; still failing at the end of the window";
          } else {
            // What ended it: a change of clocks before the next run that passes.
            const RunResult& next = ev.runs[model_runs[positions.back() + 1]];
            if (daylight_saving_between(zones_of(plan, ev, last, *rest.back()), last.at, next.at, &detail)) {
              p.description += "; it stops after " + detail;
            }
          }
          finish(std::move(p), rest);
          continue;
        }
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
