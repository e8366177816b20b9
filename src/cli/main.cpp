// readyby: the command-line entry point. Everything else is in readyby_lib.
#include <cerrno>
#include <cstdio>
#include <cstring>
#include <exception>
#include <iostream>
#include <new>
#include <string>
#include <vector>

#include "cli/commands.h"

namespace {

// A report that could not be written completely (a full disk, a closed
// pipe, /dev/full) must not look like success: a scheduler would publish
// an empty or truncated file. Both stdio and iostreams are flushed and checked.
bool output_written() {
  std::cout.flush();
  bool ok = static_cast<bool>(std::cout);
  if (std::fflush(stdout) != 0 || std::ferror(stdout)) ok = false;
  return ok;
}

}  // namespace

int main(int argc, char** argv) {
  std::ios_base::sync_with_stdio(false);  // reports can be hundreds of MB: buffer them
  std::vector<std::string> args(argv + 1, argv + argc);
  int status = readyby::kExitBadInput;
  // Last resort: nothing is meant to throw out of a command (modules return
  // diagnostics), but if something does, say so in one line and exit 2
  // rather than abort with a core dump.
  try {
    status = readyby::run_cli(args);
  } catch (const std::bad_alloc&) {
    std::cerr << "readyby: out of memory\n";
    return readyby::kExitBadInput;
  } catch (const std::exception& e) {
    std::cerr << "readyby: unexpected error: " << e.what() << "\n";
    return readyby::kExitBadInput;
  } catch (...) {
    std::cerr << "readyby: unexpected error\n";
    return readyby::kExitBadInput;
  }
  errno = 0;
  if (!output_written()) {
    int err = errno;
    std::cerr << "readyby: cannot write output" << (err ? std::string(": ") + std::strerror(err) : std::string()) << "\n";
    return readyby::kExitBadInput;
  }
  return status;
}
