#include "report/check_json.h"

#include <algorithm>
#include <climits>

#include "engine/fixes.h"
#include "engine/patterns.h"
#include "report/advice_text.h"
#include "util/text.h"

namespace readyby {

namespace {

// Buffers output in large blocks: a plan-wide check writes millions of small
// pieces, and going through the stream for each costs more than computing them.
class BlockWriter {
 public:
  explicit BlockWriter(std::ostream& out) : out_(out) { buffer_.reserve(kBlock + 4096); }
  ~BlockWriter() { flush(); }
  BlockWriter& operator<<(std::string_view s) {
    buffer_.append(s);
    if (buffer_.size() >= kBlock) flush();
    return *this;
  }
  BlockWriter& operator<<(const std::string& s) { return *this << std::string_view(s); }
  BlockWriter& operator<<(const char* s) { return *this << std::string_view(s); }
  BlockWriter& operator<<(char c) { return *this << std::string_view(&c, 1); }
  BlockWriter& operator<<(int64_t v) { return *this << std::string_view(std::to_string(v)); }
  BlockWriter& operator<<(int v) { return *this << static_cast<int64_t>(v); }
  void flush() {
    out_.write(buffer_.data(), static_cast<std::streamsize>(buffer_.size()));
    buffer_.clear();
  }

 private:
  static constexpr size_t kBlock = 1 << 20;
  std::ostream& out_;
  std::string buffer_;
};

// RFC 3339 with the zone's offset, as format_rfc3339 writes it, without
// printf: a year's check writes tens of millions of these.
void append_rfc3339(std::string* out, Instant t, const Zone* zone) {
  const int64_t off = zone->offset_at(t).count();
  const int64_t local = to_unix(t) + off;
  const int64_t days = local >= 0 ? local / kSecondsPerDay : -((-local + kSecondsPerDay - 1) / kSecondsPerDay);
  const int64_t secs = local - days * kSecondsPerDay;
  const date::year_month_day ymd{date::sys_days{date::days{days}}};
  char buf[32];
  auto two = [&](int at, int64_t v) {
    buf[at] = static_cast<char>('0' + v / 10);
    buf[at + 1] = static_cast<char>('0' + v % 10);
  };
  const int year = static_cast<int>(ymd.year());
  if (year < 0 || year > 9999) {
    *out += format_rfc3339(t, zone);
    return;
  }
  two(0, year / 100);
  two(2, year % 100);
  buf[4] = '-';
  two(5, static_cast<unsigned>(ymd.month()));
  buf[7] = '-';
  two(8, static_cast<unsigned>(ymd.day()));
  buf[10] = 'T';
  two(11, secs / 3600);
  buf[13] = ':';
  two(14, secs / 60 % 60);
  buf[16] = ':';
  two(17, secs % 60);
  const int64_t a = off < 0 ? -off : off;
  buf[19] = off < 0 ? '-' : '+';
  two(20, a / 3600);
  buf[22] = ':';
  two(23, a % 3600 / 60);
  out->append(buf, 25);
}

// The chain of each feature as JSON text, kept with the range of w over
// which every step's piece (hence every deciding input) stays the same:
// runs of a model come in time order, so consecutive runs mostly reuse it.
class ChainCache {
 public:
  ChainCache(const Plan& plan, const FreshnessEngine& engine, const std::vector<std::string>& quoted)
      : plan_(plan), engine_(engine), quoted_(quoted), cache_(plan.nodes.size()) {}

  const std::string& text(int feature, int64_t w) {
    Entry& e = cache_[static_cast<size_t>(feature)];
    if (w > e.lo && w <= e.hi) return e.text;
    e.lo = INT64_MIN;
    e.hi = INT64_MAX;
    nodes_.clear();
    int n = feature;
    while (true) {
      nodes_.push_back(n);
      const std::vector<ProfilePiece>& pieces = engine_.profile(n).pieces();
      auto it = std::lower_bound(pieces.begin(), pieces.end(), w,
                                 [](const ProfilePiece& p, int64_t x) { return p.upto < x; });
      if (it == pieces.end()) it = pieces.end() - 1;
      else e.hi = std::min(e.hi, it->upto);
      if (it != pieces.begin()) e.lo = std::max(e.lo, (it - 1)->upto);
      if (it->via < 0) break;
      n = plan_.nodes[static_cast<size_t>(n)].inputs[static_cast<size_t>(it->via)];
    }
    e.text.clear();
    for (size_t i = nodes_.size(); i-- > 0;) {
      e.text += quoted_[static_cast<size_t>(nodes_[i])];
      if (i) e.text += ", ";
    }
    return e.text;
  }

 private:
  struct Entry {
    int64_t lo = 1, hi = 0;  // empty
    std::string text;
  };
  const Plan& plan_;
  const FreshnessEngine& engine_;
  const std::vector<std::string>& quoted_;
  std::vector<Entry> cache_;
  std::vector<int> nodes_;
};

std::string json_time(const std::optional<Instant>& t, const Zone* zone) {
  return t ? "\"" + format_rfc3339(*t, zone) + "\"" : std::string("null");
}

std::string json_bool(bool b) { return b ? "true" : "false"; }

std::string changes_json(const std::vector<ZoneChange>& changes, const char* role, const Zone* zone) {
  std::string out;
  for (const ZoneChange& c : changes) {
    out += std::string(out.empty() ? "" : ", ") + "{\"zone\": " + json_quote(c.zone->name()) +
           ", \"at\": " + json_time(c.at, zone) + ", \"offset_before_seconds\": " + std::to_string(c.offset_before) +
           ", \"offset_after_seconds\": " + std::to_string(c.offset_after) + ", \"bound\": \"" + role + "\"}";
  }
  return out;
}

std::string edit_json(const Plan& plan, const Edit& e) {
  std::string out = "{\"kind\": \"" + std::string(to_string(e.kind)) + "\"";
  if (e.kind == EditKind::runs) out += ", \"model\": " + json_quote(plan.models[static_cast<size_t>(e.target)].id);
  else out += ", \"node\": " + json_quote(plan.nodes[static_cast<size_t>(e.target)].id);
  if (e.kind == EditKind::delay) out += ", \"seconds\": " + std::to_string(e.seconds);
  else if (e.cron) out += ", \"cron\": " + json_quote(e.cron->text);
  return out + ", \"text\": " + json_quote(edit_text(plan, e)) + "}";
}

std::string fix_json(const Plan& plan, const Pattern& p, const Fix& fix) {
  const Zone* zone = plan.models[static_cast<size_t>(p.model)].zone;
  std::string changed;
  for (const RunChange& c : fix.other_changes) {
    const Model& m = plan.models[static_cast<size_t>(c.model)];
    changed += std::string(changed.empty() ? "" : ", ") + "{\"model\": " + json_quote(m.id) + ", \"at\": " +
               json_time(c.at, m.zone) + ", \"before\": \"" + to_string(c.before) + "\", \"after\": \"" +
               to_string(c.after) + "\"}";
  }
  return "{\"kind\": \"" + std::string(to_string(fix.kind)) + "\", \"node\": " +
         (fix.node < 0 ? std::string("null") : json_quote(plan.nodes[static_cast<size_t>(fix.node)].id)) +
         ", \"seconds\": " + std::to_string(fix.seconds) + ", \"edit\": " + edit_json(plan, fix.edit) +
         (fix.from_cron.empty() ? "" : ", \"from_cron\": " + json_quote(fix.from_cron)) +
         ", \"before\": " + json_time(fix.before, zone) + ", \"after\": " + json_time(fix.after, zone) +
         ", \"text\": " + json_quote(describe_fix(plan, p, fix)) + ",\n     \"effect\": {\"pattern_runs\": " +
         std::to_string(fix.pattern_runs) + ", \"pattern_runs_ok\": true, \"runs_rechecked\": " +
         std::to_string(fix.runs_rechecked) + ", \"breaks_others\": " + json_bool(fix.breaks_others()) +
         ", \"changed\": [" + changed + "], \"text\": " + json_quote(describe_effect(plan, fix)) + "}}";
}

}  // namespace

std::string blame_steps_json(const Plan& plan, const Blame& b, const Zone* zone) {
  std::string out = "[";
  for (size_t i = 0; i < b.steps.size(); ++i) {
    const BlameStep& s = b.steps[i];
    const Node& n = plan.nodes[static_cast<size_t>(s.node)];
    out += std::string(i ? ", " : "") + "{\"node\": " + json_quote(n.id) + ", \"kind\": \"" + to_string(n.kind) +
           "\", \"ready_at\": " + json_time(s.ready, zone) + ", \"latest\": " + json_time(s.latest, zone) +
           ", \"slack_seconds\": " + (s.ready && s.latest ? std::to_string((*s.latest - *s.ready).count()) : "null");
    if (s.stale_start) out += ", \"stale_start\": " + json_time(s.stale_start, zone);
    if (s.input_ready) out += ", \"input_ready_at\": " + json_time(s.input_ready, zone);
    if (s.start) out += ", \"start\": " + json_time(s.start, zone);
    if (s.start_by) out += ", \"start_by\": " + json_time(s.start_by, zone);
    if (s.gap_nominal) out += ", \"gap_nominal\": " + json_quote(format_local(*s.gap_nominal).substr(11));
    out += ", \"deadline_before_data\": " + std::string(s.deadline_before_data ? "true" : "false") +
           ", \"own_late_seconds\": " + std::to_string(s.own_late_seconds) +
           ", \"waited_seconds\": " + std::to_string(s.waited_seconds) +
           ", \"cause\": " + (static_cast<int>(i) == b.cause ? "true" : "false") + "}";
  }
  return out + "]";
}

std::string fix_keys_json(const Plan& plan, const Pattern& p, const FixSearch& search) {
  std::string out = "\"fixes\": [";
  for (size_t i = 0; i < search.fixes.size(); ++i) {
    out += std::string(i ? ",\n    " : "\n    ") + fix_json(plan, p, search.fixes[i]);
  }
  out += "], \"no_fix\": ";
  if (!search.fixes.empty()) return out + "null";
  const char* reason = search.never ? "never" : search.causes_apart ? "causes-apart" : "none-found";
  return out + "{\"reason\": \"" + reason + "\", \"text\": " + json_quote(describe_no_fix(plan, p, search)) + "}";
}

std::string pattern_json(const Plan& plan, const Pattern& p, const FixSearch& search) {
  const Model& model = plan.models[static_cast<size_t>(p.model)];
  const Zone* zone = model.zone;
  std::string runs, dates, last;
  for (Instant t : p.runs) {
    runs += std::string(runs.empty() ? "" : ", ") + json_time(t, zone);
    const std::string d = format_date(date::floor<date::days>(zone->to_local(t)));
    if (d != last) dates += std::string(dates.empty() ? "" : ", ") + json_quote(d);
    last = d;
  }
  std::string out = "{\"model\": " + json_quote(model.id) + ", \"status\": \"" + to_string(p.status) +
                    "\", \"kind\": \"" + to_string(p.kind) + "\", \"description\": " +
                    json_quote(describe_pattern(plan, p)) + ",\n   \"runs\": [" + runs + "], \"dates\": [" + dates + "]";
  out += ", \"weekday\": " + (p.kind == PatternKind::weekday ? json_quote(weekday_name(p.weekday)) : std::string("null"));
  if (p.kind == PatternKind::weekday) out += ", \"weekday_runs\": " + std::to_string(p.weekday_runs);
  out += ", \"span\": ";
  if (p.kind == PatternKind::span) {
    std::string weekdays;
    for (int d : p.span_weekdays) weekdays += std::string(weekdays.empty() ? "" : ", ") + json_quote(weekday_name(d));
    out += "{\"first\": " + json_quote(dates.substr(1, 10)) + ", \"last\": " +
           json_quote(format_date(date::floor<date::days>(zone->to_local(p.runs.back())))) +
           ", \"runs_in_span\": " + std::to_string(p.runs_in_span) + ", \"weekdays\": [" + weekdays +
           "], \"from_window_start\": " + json_bool(p.from_window_start) +
           ", \"to_window_end\": " + json_bool(p.to_window_end) + "}";
  } else {
    out += "null";
  }
  std::string changes = changes_json(p.starts_after, "start", zone);
  std::string ends = changes_json(p.ends_with, "end", zone);
  std::string day = changes_json(p.changes, "day", zone);
  for (const std::string* part : {&ends, &day}) {
    if (!part->empty()) changes += (changes.empty() ? "" : ", ") + *part;
  }
  std::string steady;
  for (const Zone* z : p.steady_zones) steady += std::string(steady.empty() ? "" : ", ") + json_quote(z->name());
  out += ",\n   \"daylight_saving_changes\": [" + changes + "], \"steady_zones\": [" + steady + "]";
  std::string features;
  for (const PatternFeature& f : p.features) {
    features += std::string(features.empty() ? "" : ", ") + "{\"feature\": " +
                json_quote(plan.nodes[static_cast<size_t>(f.feature)].id) + ", \"never\": " + json_bool(f.never) +
                ", \"worst_late_seconds\": " + std::to_string(f.worst_late_seconds) + "}";
  }
  out += ",\n   \"features\": [" + features + "], \"worst_run\": " + json_time(p.worst_run, zone);
  const Blame& b = p.blame;
  out += ",\n   \"cause\": ";
  if (b.cause < 0) {
    out += "null";
  } else {
    out += "{\"feature\": " + json_quote(plan.nodes[static_cast<size_t>(b.feature)].id) + ", \"node\": " +
           json_quote(plan.nodes[static_cast<size_t>(b.cause_node())].id) + ", \"kind\": \"" + to_string(b.kind) +
           "\", \"text\": " + json_quote(describe_cause(plan, b, zone)) + ",\n    \"chain\": " +
           blame_steps_json(plan, b, zone) + "}";
  }
  return out + ",\n   " + fix_keys_json(plan, p, search) + "}";
}

void write_check_json(std::ostream& stream, const Plan& plan, const Evaluation& ev) {
  BlockWriter out(stream);
  PatternCollector collector(plan, ev);
  // Node ids are quoted once, not once per mention.
  std::vector<std::string> quoted;
  quoted.reserve(plan.nodes.size());
  for (const Node& n : plan.nodes) quoted.push_back(json_quote(n.id));
  out << "{\"plan\": " << json_quote(plan.id) << ", \"timezone\": " << json_quote(plan.zone->name())
      << ", \"from\": " << json_quote(format_date(ev.from)) << ", \"days\": " << ev.days
      << ",\n \"ok\": " << (ev.ok() ? "true" : "false") << ",\n \"runs\": [";
  bool first_run = true;
  std::vector<std::string> model_ids;
  for (const Model& m : plan.models) model_ids.push_back(json_quote(m.id));
  ChainCache chains(plan, ev.engine(), quoted);
  std::string piece;  // one run's text
  // Stored runs, or (for a lazy evaluation) each run computed as it is written.
  const size_t run_count = ev.runs.empty() ? ev.pending_count() : ev.runs.size();
  for (size_t r = 0; r < run_count; ++r) {
    RunResult computed;
    if (ev.runs.empty()) computed = ev.pending_run(r);
    const RunResult& run = ev.runs.empty() ? computed : ev.runs[r];
    collector.add(run);
    const Model& model = plan.models[static_cast<size_t>(run.model)];
    piece.clear();
    piece += first_run ? "\n  " : ",\n  ";
    first_run = false;
    piece += "{\"model\": ";
    piece += model_ids[static_cast<size_t>(run.model)];
    piece += ", \"at\": \"";
    append_rfc3339(&piece, run.at, model.zone);
    piece += "\", \"status\": \"";
    piece += to_string(run.status);
    piece += "\",\n   \"features\": [";
    bool first_feature = true;
    for (const FeatureResult& f : run.features) {
      piece += first_feature ? "\n    " : ",\n    ";
      first_feature = false;
      piece += "{\"feature\": ";
      piece += quoted[static_cast<size_t>(f.feature)];
      piece += f.optional ? ", \"optional\": true" : ", \"optional\": false";
      piece += ", \"needs_data_through\": \"";
      append_rfc3339(&piece, f.needs_data_through, model.zone);
      piece += "\", \"ready_at\": ";
      if (f.ready_at) {
        piece += '"';
        append_rfc3339(&piece, *f.ready_at, model.zone);
        piece += "\", \"slack_seconds\": ";
        piece += std::to_string(f.slack_seconds);
      } else {
        piece += "null, \"slack_seconds\": null";
      }
      piece += ", \"status\": \"";
      piece += to_string(f.status);
      piece += "\", \"chain\": [";
      piece += chains.text(f.feature, to_unix(f.needs_data_through));
      piece += "]}";
    }
    piece += "]}";
    out << piece;
  }
  out << "],\n \"findings\": [";
  bool first_finding = true;
  for (const Finding& f : ev.findings) {
    out << (first_finding ? "\n  " : ",\n  ");
    first_finding = false;
    out << "{\"kind\": " << json_quote(f.kind);
    if (f.feature >= 0) out << ", \"feature\": " << json_quote(plan.nodes[static_cast<size_t>(f.feature)].id);
    if (f.source >= 0) out << ", \"source\": " << json_quote(plan.nodes[static_cast<size_t>(f.source)].id);
    if (f.node >= 0) {
      const Node& n = plan.nodes[static_cast<size_t>(f.node)];
      out << ", \"node\": " << json_quote(n.id) << ", \"node_kind\": \"" << to_string(n.kind) << '"';
    }
    out << ", \"message\": " << json_quote(f.message) << "}";
  }
  out << "],\n \"patterns\": [";
  const std::vector<Pattern> patterns = collector.patterns();
  FixFinder finder(collector);
  for (size_t i = 0; i < patterns.size(); ++i) {
    out << (i ? ",\n  " : "\n  ") << pattern_json(plan, patterns[i], finder.find(patterns[i]));
  }
  out << "]}\n";
}

}  // namespace readyby
