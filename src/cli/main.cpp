// readyby: the command-line entry point. Everything else is in readyby_lib.
#include <string>
#include <vector>

#include "cli/commands.h"

int main(int argc, char** argv) {
  std::vector<std::string> args(argv + 1, argv + argc);
  return readyby::run_cli(args);
}
