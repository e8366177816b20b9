#pragma once
// Helpers for the history tests: temporary directories and running the built
// readyby binary (READYBY_BINARY) as a child process. Tests write only inside
// the temporary directories made here.

#include <fcntl.h>
#include <signal.h>
#include <sys/wait.h>
#include <unistd.h>

#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>
#include <vector>

namespace readyby_test {

/// A fresh directory under the system temp dir, removed with its contents.
class TempDir {
 public:
  TempDir() {
    std::string pattern = (std::filesystem::temp_directory_path() / "readyby-test-XXXXXX").string();
    std::vector<char> buffer(pattern.begin(), pattern.end());
    buffer.push_back('\0');
    if (mkdtemp(buffer.data())) path_ = buffer.data();
  }
  ~TempDir() {
    std::error_code ec;
    if (!path_.empty()) std::filesystem::remove_all(path_, ec);
  }
  TempDir(const TempDir&) = delete;
  TempDir& operator=(const TempDir&) = delete;
  std::string file(const std::string& name) const { return path_ + "/" + name; }
  const std::string& path() const { return path_; }

 private:
  std::string path_;
};

inline void write_text(const std::string& path, const std::string& text) {
  std::ofstream out(path, std::ios::binary);
  out << text;
}

inline std::string read_text(const std::string& path) {
  std::ifstream in(path, std::ios::binary);
  std::ostringstream ss;
  ss << in.rdbuf();
  return ss.str();
}

/// Starts the readyby binary with `args`, stdout and stderr redirected to
/// files, and `env` (NAME=VALUE) added to the environment. Returns the pid.
inline pid_t spawn_readyby(const std::vector<std::string>& args, const std::string& out_path,
                           const std::string& err_path, const std::vector<std::string>& env = {}) {
  pid_t pid = fork();
  if (pid != 0) return pid;
  int out = open(out_path.c_str(), O_WRONLY | O_CREAT | O_TRUNC, 0644);
  int err = open(err_path.c_str(), O_WRONLY | O_CREAT | O_TRUNC, 0644);
  if (out < 0 || err < 0) _exit(127);
  dup2(out, STDOUT_FILENO);
  dup2(err, STDERR_FILENO);
  for (const std::string& e : env) putenv(const_cast<char*>(e.c_str()));
  std::vector<char*> argv;
  std::string binary = READYBY_BINARY;
  argv.push_back(binary.data());
  for (const std::string& a : args) argv.push_back(const_cast<char*>(a.c_str()));
  argv.push_back(nullptr);
  execv(binary.c_str(), argv.data());
  _exit(127);
}

/// Waits for `pid`; its exit status, or 128 + signal when it was killed.
inline int wait_for(pid_t pid) {
  int status = 0;
  while (waitpid(pid, &status, 0) < 0) {
  }
  if (WIFSIGNALED(status)) return 128 + WTERMSIG(status);
  return WEXITSTATUS(status);
}

struct RunResult {
  int status = -1;
  std::string out, err;
};

/// Runs the readyby binary to completion.
inline RunResult run_readyby(const TempDir& dir, const std::vector<std::string>& args,
                             const std::vector<std::string>& env = {}) {
  static int counter = 0;
  std::string tag = std::to_string(++counter);
  std::string out = dir.file("stdout-" + tag), err = dir.file("stderr-" + tag);
  RunResult r;
  r.status = wait_for(spawn_readyby(args, out, err, env));
  r.out = read_text(out);
  r.err = read_text(err);
  return r;
}

}  // namespace readyby_test
