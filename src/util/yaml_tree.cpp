#include "util/yaml_tree.h"

#include <yaml-cpp/eventhandler.h>
#include <yaml-cpp/exceptions.h>
#include <yaml-cpp/parser.h>

#include <map>
#include <sstream>

namespace readyby {
namespace {

SourcePos to_pos(const YAML::Mark& m) { return {m.line + 1, m.column + 1}; }

class TreeBuilder : public YAML::EventHandler {
 public:
  TreeBuilder(const std::string& path, Diagnostics* diags) : path_(path), diags_(diags) {}

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
    YamlNode n = it != anchors_.end() ? it->second : YamlNode{};
    n.pos = to_pos(mark);
    add(std::move(n), 0);
  }
  void OnScalar(const YAML::Mark& mark, const std::string& tag, YAML::anchor_t anchor,
                const std::string& value) override {
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
    YAML::anchor_t anchor = 0;
    bool have_key = false;
    YamlNode key;
    std::map<std::string, int> key_lines;  // scalar keys seen -> line
  };

  void open(YamlNode::Kind kind, const YAML::Mark& mark, YAML::anchor_t anchor) {
    Frame f;
    f.node.kind = kind;
    f.node.pos = to_pos(mark);
    f.anchor = anchor;
    stack_.push_back(std::move(f));
  }
  void close() {
    Frame f = std::move(stack_.back());
    stack_.pop_back();
    add(std::move(f.node), f.anchor);
  }
  void add(YamlNode n, YAML::anchor_t anchor) {
    if (anchor) anchors_[anchor] = n;
    if (stack_.empty()) {
      if (documents_ == 1) root = std::move(n);
      return;
    }
    Frame& top = stack_.back();
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

  const std::string& path_;
  Diagnostics* diags_;
  std::vector<Frame> stack_;
  std::map<YAML::anchor_t, YamlNode> anchors_;
};

}  // namespace

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

bool parse_yaml(const std::string& path, const std::string& text, YamlNode* root, Diagnostics* diags) {
  std::istringstream in(text);
  TreeBuilder builder(path, diags);
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
  }
  *root = std::move(builder.root);
  return true;
}

}  // namespace readyby
