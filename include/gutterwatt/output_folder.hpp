#pragma once
/// An output folder that only ever shows complete sets of files: a run's timeseries.csv,
/// events.csv and summary.json, a sweep's sweep.csv, skipped.csv and sweep.json, a report, a
/// storm or synthetic record.
///
/// The rules (README, "Reliability"):
/// - Files are written in a private staging folder made by mkdtemp inside the output folder
///   (`.gutterwatt-<pid>-XXXXXX`, mode 0700), each created with O_CREAT | O_EXCL | O_NOFOLLOW,
///   so no name can be guessed in advance and nothing is written through a symbolic link.
/// - commit() renames the whole set into place while holding an exclusive lock (flock) on the
///   output folder, with SIGINT, SIGTERM and SIGHUP held back: two writers into one folder
///   publish one after the other, and the folder shows one writer's set, never a mix. Readers
///   take the shared lock (FolderReadLock) to read one set whole.
/// - Without commit() (a failed or interrupted run) the staging folder goes, and so do the
///   folders the writer made; earlier results stay as they were.
/// - Staging folders of processes that no longer run (killed with SIGKILL, say) are removed by
///   the next writer into that folder. A writer holds its own staging folder locked (flock), so
///   one still in use is kept even when its process id names no process here.

#include <filesystem>
#include <memory>
#include <ostream>
#include <string>
#include <vector>

namespace gutterwatt {

/// Files in an output folder published together. Not thread-safe; one per writer.
///
///   OutputFolder folder("out/demo");
///   folder.open("summary.json") << text;
///   folder.commit();  // out/demo/summary.json appears whole, or not at all
class OutputFolder {
 public:
  /// Creates `dir` if needed, removes staging folders of dead processes and makes this writer's
  /// staging folder. Throws InputError naming the folder and `option` (the command-line option
  /// that gave the folder, e.g. `--out`; empty when it came as an argument) when it cannot be
  /// made or written.
  explicit OutputFolder(std::filesystem::path dir, std::string option = "--out");
  ~OutputFolder();
  OutputFolder(const OutputFolder&) = delete;
  OutputFolder& operator=(const OutputFolder&) = delete;

  /// A stream for `name` (a plain file name such as `timeseries.csv`) in the staging folder.
  std::ostream& open(const std::string& name);
  /// A file of the set that this writer does not write (a run's trace.csv with the trace off):
  /// an earlier writer's `name` is removed at commit, under the same lock, so that the folder
  /// never shows it beside this writer's set. A symbolic link of that name is removed, not
  /// followed; a folder of that name is left.
  void retire(const std::string& name);
  /// The retired names that commit() found and removed, in the order retired.
  const std::vector<std::string>& removed() const { return removed_; }
  /// Flushes and checks every file, then renames them all into the folder under its lock;
  /// throws Error on a write failure (earlier results kept).
  void commit();
  const std::filesystem::path& dir() const { return dir_; }

 private:
  struct File;
  void discard();

  std::filesystem::path dir_;
  std::string option_;
  int dir_fd_ = -1;
  std::filesystem::path stage_;
  int stage_fd_ = -1;
  std::vector<std::unique_ptr<File>> files_;
  std::vector<std::string> retired_;
  std::vector<std::string> removed_;
  std::vector<std::filesystem::path> created_;  ///< folders made here, deepest first
  bool committed_ = false;
};

/// A shared lock on an output folder while a reader reads one set from it: no writer publishes
/// until it is released. Does nothing for a folder that cannot be opened (the reader then
/// reports the missing files itself).
class FolderReadLock {
 public:
  explicit FolderReadLock(const std::filesystem::path& dir);
  ~FolderReadLock();
  FolderReadLock(const FolderReadLock&) = delete;
  FolderReadLock& operator=(const FolderReadLock&) = delete;

 private:
  int fd_ = -1;
};

/// The prefix of every staging folder's name, followed by `<pid>-` and six random characters.
inline constexpr std::string_view kStagingPrefix = ".gutterwatt-";

}  // namespace gutterwatt
