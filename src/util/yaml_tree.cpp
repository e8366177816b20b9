#include "util/yaml_tree.h"

#include <yaml-cpp/eventhandler.h>
#include <yaml-cpp/exceptions.h>
#include <yaml-cpp/parser.h>

#include <algorithm>
#include <cstdio>
#include <map>
#include <sstream>

#include "util/text.h"

namespace readyby {
namespace {

SourcePos to_pos(const YAML::Mark& m) { return {m.line + 1, m.column + 1}; }

// Thrown from inside the event handler to stop yaml-cpp's parser at once.
struct StopParsing {
  SourcePos pos;
  std::string message;
};

class TreeBuilder : public YAML::EventHandler {
 public:
  TreeBuilder(const std::string& path, const std::string& text, Diagnostics* diags)
      : path_(path), text_(text), diags_(diags), node_limit_(yaml_node_limit(text.size())) {}

  void OnDocumentStart(const YAML::Mark&) override { ++documents_; }
  void OnDocumentEnd() override {}

  void OnNull(const YAML::Mark& mark, YAML::anchor_t anchor) override {
    YamlNode n;
    n.kind = YamlNode::Kind::null;
    n.pos = to_pos(mark);
    add(std::move(n), anchor);
  }
  void OnAlias(const YAML::Mark& mark, YAML::anchor_t anchor) override {
    auto it = anchors_.find(anchor);
    size_t size = it != anchors_.end() ? it->second.size : 1;
    // Check before copying: nested aliases can describe billions of nodes in
    // a few hundred bytes.
    if (nodes_ + size > node_limit_) {
      throw StopParsing{to_pos(mark), "this alias would expand the document to more than " +
                                          std::to_string(node_limit_) + " nodes (" + std::to_string(kYamlNodesPerByte) +
                                          " per byte of the file, at least " + std::to_string(kYamlMinNodeLimit) +
                                          "); write the repeated part out, or share less through aliases"};
    }
    nodes_ += size - 1;  // add() counts one more
    YamlNode n = it != anchors_.end() ? it->second.node : YamlNode{};
    n.pos = to_pos(mark);
    add(std::move(n), 0, size);
  }
  void OnScalar(const YAML::Mark& mark, const std::string& tag, YAML::anchor_t anchor,
                const std::string& value) override {
    if (tag != "?") check_closing_quote(mark);
    check_control_characters(mark, value);
    YamlNode n;
    n.kind = YamlNode::Kind::scalar;
    n.pos = to_pos(mark);
    n.value = value;
    n.plain = tag == "?";
    add(std::move(n), anchor);
  }
  void OnSequenceStart(const YAML::Mark& mark, const std::string&, YAML::anchor_t anchor,
                       YAML::EmitterStyle::value) override {
    open(YamlNode::Kind::sequence, mark, anchor);
  }
  void OnSequenceEnd() override { close(); }
  void OnMapStart(const YAML::Mark& mark, const std::string&, YAML::anchor_t anchor,
                  YAML::EmitterStyle::value) override {
    open(YamlNode::Kind::map, mark, anchor);
  }
  void OnMapEnd() override { close(); }

  YamlNode root;
  int documents_ = 0;

 private:
  struct Frame {
    YamlNode node;
    size_t size = 1;  // nodes in this subtree, aliases expanded
    YAML::anchor_t anchor = 0;
    bool have_key = false;
    YamlNode key;
    std::map<std::string, int> key_lines;  // scalar keys seen -> line
  };

  void open(YamlNode::Kind kind, const YAML::Mark& mark, YAML::anchor_t anchor) {
    ++nodes_;
    Frame f;
    f.node.kind = kind;
    f.node.pos = to_pos(mark);
    f.anchor = anchor;
    stack_.push_back(std::move(f));
  }
  void close() {
    Frame f = std::move(stack_.back());
    stack_.pop_back();
    --nodes_;  // counted when opened
    add(std::move(f.node), f.anchor, f.size);
  }
  // A quoted scalar must end with its closing quote. yaml-cpp accepts a
  // double- or single-quoted scalar left open at the end of the file; this
  // scans the raw text from the opening quote (escapes: backslash in double
  // quotes, a doubled quote in single quotes) and reports it.
  void check_closing_quote(const YAML::Mark& mark) {
    if (mark.pos < 0 || static_cast<size_t>(mark.pos) >= text_.size()) return;
    size_t i = static_cast<size_t>(mark.pos);
    char quote = text_[i];
    if (quote != '"' && quote != '\'') return;
    for (++i; i < text_.size(); ++i) {
      char c = text_[i];
      if (quote == '"' && c == '\\') {
        ++i;
        continue;
      }
      if (c == quote) {
        if (quote == '\'' && i + 1 < text_.size() && text_[i + 1] == '\'') {
          ++i;
          continue;
        }
        return;
      }
    }
    throw StopParsing{to_pos(mark), std::string("this quoted value has no closing ") + quote +
                                        " before the end of the file"};
  }
  // Text values are printed in reports: a control character (ESC, BEL ...)
  // written as a "\e"-style escape or a raw byte could drive the reader's
  // terminal. None has a use in a plan, a proposal or a catalogue entry.
  void check_control_characters(const YAML::Mark& mark, const std::string& value) {
    for (unsigned char c : value) {
      if ((c < 0x20 && c != '\t' && c != '\n' && c != '\r') || c == 0x7F) {
        char code[8];
        std::snprintf(code, sizeof code, "%04X", c);
        throw StopParsing{to_pos(mark), std::string("control character U+") + code +
                                            " in a text value; write plain text (use \\n only for line breaks)"};
      }
    }
  }
  void add(YamlNode n, YAML::anchor_t anchor, size_t size = 1) {
    ++nodes_;
    if (nodes_ > node_limit_) {
      throw StopParsing{n.pos, "the document has more than " + std::to_string(node_limit_) + " nodes"};
    }
    if (anchor) anchors_[anchor] = {n, size};
    if (stack_.empty()) {
      if (documents_ == 1) root = std::move(n);
      return;
    }
    Frame& top = stack_.back();
    top.size += size;
    if (top.node.kind == YamlNode::Kind::sequence) {
      top.node.items.push_back(std::move(n));
      return;
    }
    if (!top.have_key) {
      top.key = std::move(n);
      top.have_key = true;
      return;
    }
    if (top.key.is_scalar()) {
      auto [it, inserted] = top.key_lines.emplace(top.key.value, top.key.pos.line);
      if (!inserted) {
        diags_->error(path_, top.key.pos,
                      "duplicate key '" + top.key.value + "' (first defined at line " +
                          std::to_string(it->second) + ")");
      }
    }
    top.node.entries.emplace_back(std::move(top.key), std::move(n));
    top.have_key = false;
  }

  struct Anchored {
    YamlNode node;
    size_t size = 1;
  };
  const std::string& path_;
  const std::string& text_;
  Diagnostics* diags_;
  std::vector<Frame> stack_;
  std::map<YAML::anchor_t, Anchored> anchors_;
  size_t nodes_ = 0;  // nodes built so far (open collections included), aliases expanded
  const size_t node_limit_;
};

}  // namespace

YamlNode::YamlNode() = default;
YamlNode::YamlNode(const YamlNode&) = default;
YamlNode::YamlNode(YamlNode&&) noexcept = default;
YamlNode& YamlNode::operator=(const YamlNode&) = default;
YamlNode& YamlNode::operator=(YamlNode&&) noexcept = default;
YamlNode::~YamlNode() = default;

const YamlNode* YamlNode::find(std::string_view key) const {
  for (const auto& [k, v] : entries) {
    if (k.is_scalar() && k.value == key) return &v;
  }
  return nullptr;
}

bool looks_numeric(const YamlNode& node) {
  if (!node.is_scalar() || !node.plain || node.value.empty()) return false;
  const std::string& v = node.value;
  if (v == "true" || v == "false" || v == "True" || v == "False" || v == ".inf" || v == "-.inf" || v == ".nan") {
    return true;
  }
  size_t i = (v[0] == '-' || v[0] == '+') ? 1 : 0;
  bool digit = false, dot = false;
  for (; i < v.size(); ++i) {
    if (v[i] >= '0' && v[i] <= '9') digit = true;
    else if (v[i] == '.' && !dot) dot = true;
    else if (v[i] == '_') continue;
    else return false;
  }
  return digit;
}

std::string YamlNode::describe() const {
  switch (kind) {
    case Kind::null: return "nothing";
    case Kind::map: return "a map";
    case Kind::sequence: return "a list";
    case Kind::scalar:
      if (looks_numeric(*this)) {
        return (value == "true" || value == "false") ? "the boolean " + value : "the number " + value;
      }
      return "the text '" + value + "'";
  }
  return "?";
}

size_t yaml_node_limit(size_t bytes) {
  return std::max(kYamlMinNodeLimit, bytes > SIZE_MAX / kYamlNodesPerByte ? SIZE_MAX : bytes * kYamlNodesPerByte);
}

bool parse_yaml(const std::string& path, const std::string& text, YamlNode* root, Diagnostics* diags) {
  size_t bad = invalid_utf8_offset(text);
  if (bad != std::string::npos) {
    size_t line_start = bad == 0 ? std::string::npos : text.rfind('\n', bad - 1);
    int line = 1 + static_cast<int>(std::count(text.begin(), text.begin() + static_cast<std::ptrdiff_t>(bad), '\n'));
    int col = static_cast<int>(line_start == std::string::npos ? bad : bad - line_start - 1) + 1;
    diags->error(path, {line, col}, "the file is not valid UTF-8 (bad byte at this position); save it as UTF-8");
    return false;
  }
  std::istringstream in(text);
  TreeBuilder builder(path, text, diags);
  try {
    YAML::Parser parser(in);
    while (parser.HandleNextDocument(builder)) {
      if (builder.documents_ > 1) {
        diags->error(path, {0, 0}, "more than one YAML document in the file; a plan is one document");
        break;
      }
    }
  } catch (const YAML::Exception& e) {
    SourcePos pos = e.mark.is_null() ? SourcePos{} : to_pos(e.mark);
    diags->error(path, pos, "YAML syntax error: " + e.msg);
    return false;
  } catch (const StopParsing& stop) {
    diags->error(path, stop.pos, stop.message);
    return false;
  }
  *root = std::move(builder.root);
  return true;
}

}  // namespace readyby
