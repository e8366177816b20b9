#pragma once
// Runs a shell command line (usually the built readyby binary) and captures
// its combined output and exit status. For tests of the command line.

#include <sys/wait.h>

#include <array>
#include <cstdio>
#include <string>

namespace readyby::testing {

struct Outcome {
  int status = -1;   // exit status; -1 when it did not exit normally
  std::string out;   // stdout (and stderr when the command line redirects it)
};

inline Outcome run_shell(const std::string& command_line) {
  Outcome o;
  FILE* pipe = popen(command_line.c_str(), "r");
  if (!pipe) return o;
  std::array<char, 4096> buf;
  size_t n;
  while ((n = fread(buf.data(), 1, buf.size(), pipe)) > 0) o.out.append(buf.data(), n);
  int raw = pclose(pipe);
  o.status = WIFEXITED(raw) ? WEXITSTATUS(raw) : -1;
  return o;
}

}  // namespace readyby::testing
