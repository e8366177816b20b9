// readyby: the command-line entry point. Everything else is in readyby_lib.
#include <iostream>
#include <string>
#include <vector>

#include "cli/commands.h"

int main(int argc, char** argv) {
  std::ios_base::sync_with_stdio(false);  // reports can be hundreds of MB: buffer them
  std::vector<std::string> args(argv + 1, argv + argc);
  return readyby::run_cli(args);
}
