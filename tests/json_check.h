#pragma once
// Checks that a text is one valid JSON document, with a real parser: Python's
// json module (python3 is a build dependency, scripts/setup.sh), made strict
// where RFC 8259 is: the bytes must be UTF-8 (§8.1), NaN and Infinity are not
// JSON numbers (§6), control characters must be escaped in strings (§7).
// Beyond the RFC, which only says names SHOULD be unique (§4), a repeated
// name in one object is refused too: readyby never writes one on purpose.

#include <cstdio>
#include <cstdlib>
#include <fstream>
#include <string>

#include <unistd.h>

#include "run_binary.h"

namespace readyby::testing {

struct JsonCheck {
  bool ok = false;
  std::string error;   // the parser's message when not ok
};

inline JsonCheck check_json(const std::string& text) {
  const char* tmp = std::getenv("TMPDIR");
  std::string path = std::string(tmp && *tmp ? tmp : "/tmp") + "/readyby_json_XXXXXX";
  int fd = mkstemp(path.data());
  if (fd < 0) return {false, "cannot create a temporary file"};
  close(fd);
  std::ofstream(path, std::ios::binary) << text;
  static const char kScript[] =
      "import json, sys\n"
      "def pairs(ps):\n"
      "    keys = [k for k, _ in ps]\n"
      "    dup = [k for k in keys if keys.count(k) > 1]\n"
      "    if dup: raise ValueError('repeated name ' + repr(dup[0]))\n"
      "    return dict(ps)\n"
      "def constant(c): raise ValueError('not a JSON number: ' + c)\n"
      "try:\n"
      "    json.loads(sys.stdin.buffer.read().decode('utf-8'), object_pairs_hook=pairs, parse_constant=constant)\n"
      "except Exception as e:\n"
      "    print(type(e).__name__ + ': ' + str(e)); sys.exit(1)\n";
  std::string script_path = path + ".py";
  std::ofstream(script_path) << kScript;
  Outcome o = run_shell("python3 " + script_path + " < " + path + " 2>&1");
  std::remove(path.c_str());
  std::remove(script_path.c_str());
  if (o.status == 0) return {true, ""};
  return {false, o.out.empty() ? "python3 failed with status " + std::to_string(o.status) : o.out};
}

}  // namespace readyby::testing
