#pragma once
/// Helpers of the end-to-end tests: run the built gutterwatt executable as a user would, in the
/// foreground or in the background (to signal it), and read what it wrote.

#include <fcntl.h>
#include <gtest/gtest.h>
#include <signal.h>
#include <spawn.h>
#include <sys/stat.h>
#include <sys/sysmacros.h>
#include <sys/wait.h>
#include <unistd.h>

#include <chrono>
#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <optional>
#include <set>
#include <sstream>
#include <string>
#include <thread>
#include <vector>

#include "gutterwatt/output_folder.hpp"

extern char** environ;

namespace gutterwatt::cli_support {

namespace fs = std::filesystem;

/// Exit status (-1 when killed by a signal) and the text on stdout and stderr.
struct Outcome {
  int status;
  std::string out;
  std::string err;
};

inline std::string slurp(const fs::path& p) {
  std::ifstream in(p, std::ios::binary);
  std::ostringstream s;
  s << in.rdbuf();
  return s.str();
}

inline void write_file(const fs::path& p, const std::string& text) {
  std::ofstream(p, std::ios::binary) << text;
}

/// The folders scratch() made, removed when the test program ends (kept when the environment
/// sets GUTTERWATT_KEEP_SCRATCH, to look at after a failure).
class ScratchFolders {
 public:
  ScratchFolders() = default;
  ScratchFolders(const ScratchFolders&) = delete;
  ScratchFolders& operator=(const ScratchFolders&) = delete;
  ~ScratchFolders() {
    if (std::getenv("GUTTERWATT_KEEP_SCRATCH") != nullptr) return;
    for (const fs::path& dir : dirs_) {
      std::error_code ec;
      fs::remove_all(dir, ec);
    }
  }
  void add(const fs::path& dir) { dirs_.push_back(dir); }

 private:
  std::vector<fs::path> dirs_;
};

inline ScratchFolders& scratch_folders() {
  static ScratchFolders folders;
  return folders;
}

/// A fresh, empty folder for one test, unique to this process so that concurrent test runs in
/// several build folders do not share it.
inline fs::path scratch(const std::string& name) {
  const fs::path dir =
      fs::temp_directory_path() / ("gutterwatt-" + name + "-" + std::to_string(::getpid()));
  fs::remove_all(dir);
  fs::create_directories(dir);
  scratch_folders().add(dir);
  return dir;
}

/// The names of the entries of `dir` (hidden ones too).
inline std::set<std::string> names_in(const fs::path& dir) {
  std::set<std::string> names;
  for (const auto& entry : fs::directory_iterator(dir)) {
    names.insert(entry.path().filename().string());
  }
  return names;
}

/// The one staging folder of an OutputFolder in `dir`, or an empty path when there is not
/// exactly one.
inline fs::path staging_folder(const fs::path& dir) {
  fs::path found;
  int count = 0;
  for (const auto& entry : fs::directory_iterator(dir)) {
    if (entry.path().filename().string().starts_with(kStagingPrefix)) {
      found = entry.path();
      ++count;
    }
  }
  return count == 1 ? found : fs::path();
}

/// Waits up to 30 s until `done()`; true once it is.
template <class Done>
bool wait_until(Done done) {
  const auto deadline = std::chrono::steady_clock::now() + std::chrono::seconds(30);
  while (!done()) {
    if (std::chrono::steady_clock::now() >= deadline) return false;
    std::this_thread::sleep_for(std::chrono::milliseconds(5));
  }
  return true;
}

/// Waits up to 30 s until a writer into `dir` has staged `name` in its staging folder; true once
/// it has. A test holding the folder's read lock (FolderReadLock) keeps the writer there, its
/// set staged and not yet published.
inline bool wait_until_staged(const fs::path& dir, const std::string& name) {
  return wait_until([&] {
    const fs::path stage = staging_folder(dir);
    return !stage.empty() && fs::exists(stage / name);
  });
}

/// Whether a process is blocked waiting for an flock on `dir`: /proc/locks lists each waiting
/// request as `-> FLOCK ...` with the file's device and inode as `MAJOR:MINOR:INODE` (hex, hex,
/// decimal; proc(5)).
inline bool flock_awaited(const fs::path& dir) {
  struct stat st {};
  if (::stat(dir.c_str(), &st) != 0) return false;
  char id[64];
  std::snprintf(id, sizeof id, " %02x:%02x:%lu ", major(st.st_dev), minor(st.st_dev),
                static_cast<unsigned long>(st.st_ino));
  std::ifstream locks("/proc/locks");
  for (std::string line; std::getline(locks, line);) {
    if (line.find("-> FLOCK") != std::string::npos && line.find(id) != std::string::npos) {
      return true;
    }
  }
  return false;
}

/// A scratch folder holding a copy of the sweep fixtures (tests/data/sweep: shed.yaml, an
/// invented system, and rain-10min.csv, three invented days of rain).
inline fs::path fixture_site(const std::string& name) {
  const fs::path dir = scratch(name);
  for (const char* file : {"shed.yaml", "rain-10min.csv"}) {
    fs::copy_file(fs::path(GUTTERWATT_SOURCE_DIR) / "tests" / "data" / "sweep" / file, dir / file);
  }
  return dir;
}

/// Runs `command` in a shell with stdin from /dev/null, keeping its output in files in `dir`.
inline Outcome shell(const std::string& command, const fs::path& dir) {
  const fs::path out = dir / "stdout.txt";
  const fs::path err = dir / "stderr.txt";
  const std::string cmd =
      "(" + command + ") >" + out.string() + " 2>" + err.string() + " </dev/null";
  const int raw = std::system(cmd.c_str());
  return {WIFEXITED(raw) ? WEXITSTATUS(raw) : -1, slurp(out), slurp(err)};
}

/// Runs gutterwatt with `args` (a shell command line after the program name).
inline Outcome run(const std::string& args, const fs::path& dir) {
  return shell(std::string(GUTTERWATT_EXE) + " " + args, dir);
}

/// The same, run from `dir` (so file names in `args` are relative to it).
inline Outcome run_in(const fs::path& dir, const std::string& args) {
  return shell("cd " + dir.string() + " && " + GUTTERWATT_EXE + " " + args, dir);
}

/// A file of the source tree, by its path relative to the top.
inline std::string source(const std::string& rel) {
  return std::string(GUTTERWATT_SOURCE_DIR) + "/" + rel;
}

/// Bad input: exit status 2, nothing on stdout and exactly this one line on stderr.
inline void expect_bad(const Outcome& r, const std::string& message) {
  EXPECT_EQ(r.status, 2) << r.err;
  EXPECT_EQ(r.out, "");
  EXPECT_EQ(r.err, "gutterwatt: error: " + message + "\n");
}

inline int lines(const std::string& s) {
  int n = 0;
  for (char c : s) n += c == '\n';
  return n;
}

/// gutterwatt started in the background, stdout and stderr going to files in `dir`, with
/// SIGINT and SIGTERM at their defaults and unblocked whatever the test runner set.
class Child {
 public:
  Child(const std::vector<std::string>& args, const fs::path& dir)
      : out_(dir / "stdout.txt"), err_(dir / "stderr.txt") {
    std::vector<std::string> all{GUTTERWATT_EXE};
    all.insert(all.end(), args.begin(), args.end());
    std::vector<char*> argv;
    for (std::string& a : all) argv.push_back(a.data());
    argv.push_back(nullptr);
    posix_spawn_file_actions_t files;
    posix_spawn_file_actions_init(&files);
    posix_spawn_file_actions_addopen(&files, 0, "/dev/null", O_RDONLY, 0);
    posix_spawn_file_actions_addopen(&files, 1, out_.c_str(), O_WRONLY | O_CREAT | O_TRUNC, 0644);
    posix_spawn_file_actions_addopen(&files, 2, err_.c_str(), O_WRONLY | O_CREAT | O_TRUNC, 0644);
    posix_spawnattr_t attr;
    posix_spawnattr_init(&attr);
    sigset_t none;
    sigemptyset(&none);
    sigset_t defaults;
    sigemptyset(&defaults);
    sigaddset(&defaults, SIGINT);
    sigaddset(&defaults, SIGTERM);
    posix_spawnattr_setsigmask(&attr, &none);
    posix_spawnattr_setsigdefault(&attr, &defaults);
    posix_spawnattr_setflags(&attr, POSIX_SPAWN_SETSIGMASK | POSIX_SPAWN_SETSIGDEF);
    if (posix_spawn(&pid_, argv[0], &files, &attr, argv.data(), environ) != 0) pid_ = -1;
    posix_spawnattr_destroy(&attr);
    posix_spawn_file_actions_destroy(&files);
  }

  Child(const Child&) = delete;
  Child& operator=(const Child&) = delete;

  /// Kills a child still running when the test ends (a failed test must not leave it behind).
  ~Child() {
    if (pid_ > 0 && !status_) {
      ::kill(pid_, SIGKILL);
      ::waitpid(pid_, nullptr, 0);
    }
  }

  bool started() const { return pid_ > 0; }
  void signal(int sig) const { ::kill(pid_, sig); }

  /// The exit status once the child has ended (-1 when killed by a signal), or nullopt when it
  /// is still running after `timeout`.
  std::optional<int> wait_for(std::chrono::milliseconds timeout) {
    const auto until = std::chrono::steady_clock::now() + timeout;
    while (!status_) {
      int raw = 0;
      if (::waitpid(pid_, &raw, WNOHANG) == pid_) {
        status_ = WIFEXITED(raw) ? WEXITSTATUS(raw) : -1;
        break;
      }
      if (std::chrono::steady_clock::now() >= until) break;
      std::this_thread::sleep_for(std::chrono::milliseconds(5));
    }
    return status_;
  }

  Outcome outcome() const { return {status_.value_or(-1), slurp(out_), slurp(err_)}; }

 private:
  fs::path out_;
  fs::path err_;
  pid_t pid_ = -1;
  std::optional<int> status_;
};

}  // namespace gutterwatt::cli_support
