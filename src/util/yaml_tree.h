#pragma once
// A YAML document as a small tree with positions, built from yaml-cpp's
// event parser.
//
// yaml-cpp's own node API silently keeps duplicate map keys and forgets
// whether a scalar was quoted; loaders need both. This tree keeps every map
// entry in order, the 1-based position of every node, and whether a scalar
// was written plain (so `30` can be told apart from `"30"`). Duplicate keys
// are reported while building. Aliases are expanded; merge keys (`<<`) are
// ordinary keys (and so unknown to every schema).

#include <cstddef>
#include <memory>
#include <string>
#include <string_view>
#include <utility>
#include <vector>

#include "util/diagnostics.h"

namespace readyby {

struct YamlNode {
  enum class Kind { null, scalar, sequence, map };
  Kind kind = Kind::null;
  SourcePos pos;
  std::string value;      // scalars
  bool plain = true;      // scalar written without quotes or block style
  std::vector<YamlNode> items;                          // sequences
  std::vector<std::pair<YamlNode, YamlNode>> entries;   // maps, in file order

  // Declared here, defined (defaulted) in yaml_tree.cpp where YamlNode is
  // complete: clang with libstdc++ cannot instantiate them for a pair of the
  // type being defined (the fuzz build uses clang).
  YamlNode();
  YamlNode(const YamlNode&);
  YamlNode(YamlNode&&) noexcept;
  YamlNode& operator=(const YamlNode&);
  YamlNode& operator=(YamlNode&&) noexcept;
  ~YamlNode();

  bool is_map() const { return kind == Kind::map; }
  bool is_sequence() const { return kind == Kind::sequence; }
  bool is_scalar() const { return kind == Kind::scalar; }
  bool is_null() const { return kind == Kind::null; }
  /// The value of the first entry with scalar key `key`, or nullptr.
  const YamlNode* find(std::string_view key) const;
  /// "a map", "a list", "a text value", "a number", "nothing": for messages.
  std::string describe() const;
};

/// Limits on what one document may expand to. Aliases are expanded into
/// copies, so a few hundred bytes of nested aliases can describe billions of
/// nodes; a document may hold at most kYamlNodesPerByte nodes per byte of
/// its text (and at least kYamlMinNodeLimit), counted with every alias
/// expanded. Ordinary documents hold far fewer nodes than bytes.
inline constexpr size_t kYamlNodesPerByte = 4;
inline constexpr size_t kYamlMinNodeLimit = 10000;
/// The node limit for a document of `bytes` bytes.
size_t yaml_node_limit(size_t bytes);

/// Parses `text` (the contents of `path`). Returns the root node (null for an
/// empty document) and adds to `diags` any syntax errors and duplicate keys
/// (reported at the repeated key: "duplicate key 'x' (first defined at line N)").
/// Returns false when the text could not be parsed at all: a YAML syntax
/// error; text that is not UTF-8 (at the first bad byte); a quoted value with
/// no closing quote (at the opening quote); or a document over the node
/// limit (at the alias that would pass it).
bool parse_yaml(const std::string& path, const std::string& text, YamlNode* root, Diagnostics* diags);

/// Whether a plain scalar reads as a YAML number (int or float) or boolean.
bool looks_numeric(const YamlNode& node);

}  // namespace readyby
