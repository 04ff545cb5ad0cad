#include "gutterwatt/output_folder.hpp"

#include <fcntl.h>
#include <signal.h>
#include <sys/file.h>
#include <sys/stat.h>
#include <unistd.h>

#include <cerrno>
#include <cstring>
#include <streambuf>
#include <system_error>
#include <vector>

#include "gutterwatt/error.hpp"

namespace gutterwatt {
namespace {

namespace fs = std::filesystem;

constexpr std::size_t kBufferBytes = 1 << 16;

std::string errno_text(int error) { return std::generic_category().message(error); }

/// An output stream buffer over a file descriptor it owns; remembers the first write error.
class FdBuf : public std::streambuf {
 public:
  explicit FdBuf(int fd) : fd_(fd), buffer_(kBufferBytes) { reset(); }
  ~FdBuf() override { close(); }
  FdBuf(const FdBuf&) = delete;
  FdBuf& operator=(const FdBuf&) = delete;

  /// Writes what is buffered and closes; false (and error() set) when a write or close failed.
  bool close() {
    if (fd_ < 0) return error_ == 0;
    drain();
    if (::close(fd_) != 0 && error_ == 0) error_ = errno;
    fd_ = -1;
    return error_ == 0;
  }
  int error() const { return error_; }

 protected:
  int_type overflow(int_type ch) override {
    if (!drain()) return traits_type::eof();
    if (!traits_type::eq_int_type(ch, traits_type::eof())) {
      *pptr() = traits_type::to_char_type(ch);
      pbump(1);
    }
    return traits_type::not_eof(ch);
  }
  int sync() override { return drain() ? 0 : -1; }

 private:
  void reset() { setp(buffer_.data(), buffer_.data() + buffer_.size()); }

  bool drain() {
    const char* p = pbase();
    while (error_ == 0 && p < pptr()) {
      const ssize_t n = ::write(fd_, p, static_cast<std::size_t>(pptr() - p));
      if (n < 0 && errno == EINTR) continue;
      if (n < 0) error_ = errno;
      if (n > 0) p += n;
    }
    reset();
    return error_ == 0;
  }

  int fd_;
  std::vector<char> buffer_;
  int error_ = 0;
};

/// Holds SIGINT, SIGTERM and SIGHUP back for its lifetime, so a signal cannot end the process
/// half-way through publishing a set; they are delivered when it ends.
class SignalsHeld {
 public:
  SignalsHeld() {
    sigset_t held;
    sigemptyset(&held);
    sigaddset(&held, SIGINT);
    sigaddset(&held, SIGTERM);
    sigaddset(&held, SIGHUP);
    pthread_sigmask(SIG_BLOCK, &held, &before_);
  }
  ~SignalsHeld() { pthread_sigmask(SIG_SETMASK, &before_, nullptr); }
  SignalsHeld(const SignalsHeld&) = delete;
  SignalsHeld& operator=(const SignalsHeld&) = delete;

 private:
  sigset_t before_;
};

/// flock with EINTR retried.
bool lock(int fd, int operation) {
  while (::flock(fd, operation) != 0) {
    if (errno != EINTR) return false;
  }
  return true;
}

/// An flock on `fd` held for its lifetime.
class FlockHeld {
 public:
  FlockHeld(int fd, int operation) : fd_(fd) { lock(fd_, operation); }
  ~FlockHeld() { lock(fd_, LOCK_UN); }
  FlockHeld(const FlockHeld&) = delete;
  FlockHeld& operator=(const FlockHeld&) = delete;

 private:
  int fd_;
};

/// The process id a staging folder's name records, or 0 when the name is not one.
pid_t staging_pid(const std::string& name) {
  if (name.compare(0, kStagingPrefix.size(), kStagingPrefix) != 0) return 0;
  pid_t pid = 0;
  std::size_t i = kStagingPrefix.size();
  for (; i < name.size() && name[i] >= '0' && name[i] <= '9' && pid < 1 << 24; ++i) {
    pid = pid * 10 + (name[i] - '0');
  }
  return i < name.size() && name[i] == '-' ? pid : 0;
}

/// Removes the staging folders in `dir` (held open as `dir_fd`) of this user's processes that
/// no longer run and that no writer holds locked. Anything else by that prefix (a link, a file,
/// another user's folder) stays.
void remove_dead_staging(const fs::path& dir, int dir_fd) {
  std::error_code ec;
  for (fs::directory_iterator it(dir, ec), end; !ec && it != end; it.increment(ec)) {
    const std::string name = it->path().filename().string();
    const pid_t pid = staging_pid(name);
    if (pid <= 0) continue;
    struct stat st {};
    if (::fstatat(dir_fd, name.c_str(), &st, AT_SYMLINK_NOFOLLOW) != 0 || !S_ISDIR(st.st_mode) ||
        st.st_uid != ::geteuid()) {
      continue;
    }
    if (::kill(pid, 0) == 0 || errno != ESRCH) continue;
    // A live writer holds its staging folder locked, even one whose process id means nothing
    // here (another PID namespace sharing the folder): only an unlocked one goes.
    const int fd = ::openat(dir_fd, name.c_str(), O_RDONLY | O_DIRECTORY | O_NOFOLLOW | O_CLOEXEC);
    if (fd < 0) continue;
    if (::flock(fd, LOCK_EX | LOCK_NB) == 0) {
      std::error_code ignored;
      fs::remove_all(it->path(), ignored);
    }
    ::close(fd);
  }
}

}  // namespace

struct OutputFolder::File {
  std::string name;
  FdBuf buf;
  std::ostream stream;
  File(std::string n, int fd) : name(std::move(n)), buf(fd), stream(&buf) {}
};

OutputFolder::OutputFolder(fs::path dir, std::string option)
    : dir_(std::move(dir)), option_(std::move(option)) {
  try {
    std::error_code ec;
    // The folders this writer makes, deepest first: an uncommitted one takes them away again.
    for (fs::path p = dir_; !p.empty() && !fs::exists(p, ec); p = p.parent_path()) {
      created_.push_back(p);
      if (p == p.parent_path()) break;
    }
    fs::create_directories(dir_, ec);
    if (ec || !fs::is_directory(dir_)) {
      throw InputError(
          dir_.string(), 0, option_,
          "cannot create the output folder (" + (ec ? ec.message() : "not a folder") + ")");
    }
    dir_fd_ = ::open(dir_.c_str(), O_RDONLY | O_DIRECTORY | O_CLOEXEC);
    if (dir_fd_ < 0 || ::access(dir_.c_str(), W_OK) != 0) {
      throw InputError(dir_.string(), 0, option_, "the output folder is not writable");
    }
    remove_dead_staging(dir_, dir_fd_);
    std::string stage =
        (dir_ / (std::string(kStagingPrefix) + std::to_string(::getpid()) + "-XXXXXX")).string();
    if (::mkdtemp(stage.data()) == nullptr) {
      throw InputError(
          dir_.string(), 0, option_,
          "cannot make a staging folder in the output folder (" + errno_text(errno) + ")");
    }
    stage_ = stage;
    stage_fd_ = ::open(stage_.c_str(), O_RDONLY | O_DIRECTORY | O_NOFOLLOW | O_CLOEXEC);
    if (stage_fd_ < 0) {
      throw InputError(dir_.string(), 0, option_,
                       "cannot open the staging folder (" + errno_text(errno) + ")");
    }
    lock(stage_fd_, LOCK_EX);  // held while this writer lives: see remove_dead_staging
  } catch (...) {
    discard();
    throw;
  }
}

OutputFolder::~OutputFolder() {
  if (!committed_) discard();
  if (dir_fd_ >= 0) ::close(dir_fd_);
}

std::ostream& OutputFolder::open(const std::string& name) {
  const int fd =
      ::openat(stage_fd_, name.c_str(), O_WRONLY | O_CREAT | O_EXCL | O_NOFOLLOW | O_CLOEXEC, 0666);
  if (fd < 0) {
    throw InputError((dir_ / name).string(), 0, option_,
                     "cannot write this file (" + errno_text(errno) + ")");
  }
  files_.push_back(std::make_unique<File>(name, fd));
  return files_.back()->stream;
}

void OutputFolder::retire(const std::string& name) { retired_.push_back(name); }

void OutputFolder::commit() {
  for (const auto& f : files_) {
    f->stream.flush();
    const bool ok = static_cast<bool>(f->stream);
    if (!f->buf.close() || !ok) {
      const std::string name = f->name;
      discard();
      throw Error((dir_ / name).string() + ": write failed (disk full?); earlier results kept");
    }
  }
  {
    // The lock is taken before the signals are held back: a writer waiting for a reader can
    // still be ended by a second signal (its staging folder goes at the next write).
    const FlockHeld locked(dir_fd_, LOCK_EX);
    const SignalsHeld held;
    // A folder in the way would stop its rename half-way through the set: look first.
    for (const auto& f : files_) {
      struct stat st {};
      if (::fstatat(dir_fd_, f->name.c_str(), &st, AT_SYMLINK_NOFOLLOW) == 0 &&
          S_ISDIR(st.st_mode)) {
        const std::string name = f->name;
        discard();
        throw Error((dir_ / name).string() + ": is a folder; earlier results kept");
      }
    }
    // unlinkat without AT_REMOVEDIR removes a file or a link, never what a link points to, and
    // refuses a folder (EISDIR), which is left.
    for (const std::string& name : retired_) {
      if (::unlinkat(dir_fd_, name.c_str(), 0) == 0) {
        removed_.push_back(name);
      } else if (errno != ENOENT && errno != EISDIR) {
        const int error = errno;
        discard();
        throw Error((dir_ / name).string() + ": cannot remove this earlier file (" +
                    errno_text(error) + "); earlier results kept");
      }
    }
    for (const auto& f : files_) {
      if (::renameat(stage_fd_, f->name.c_str(), dir_fd_, f->name.c_str()) != 0) {
        const int error = errno;
        const std::string name = f->name;
        discard();
        throw Error((dir_ / name).string() + ": cannot rename into place (" + errno_text(error) +
                    ")");
      }
    }
  }
  files_.clear();
  ::close(stage_fd_);
  stage_fd_ = -1;
  ::unlinkat(dir_fd_, stage_.filename().c_str(), AT_REMOVEDIR);
  committed_ = true;
}

void OutputFolder::discard() {
  for (const auto& f : files_) {
    f->buf.close();
    ::unlinkat(stage_fd_, f->name.c_str(), 0);
  }
  files_.clear();
  if (stage_fd_ >= 0) {
    ::close(stage_fd_);
    stage_fd_ = -1;
  }
  if (!stage_.empty() && dir_fd_ >= 0) {
    ::unlinkat(dir_fd_, stage_.filename().c_str(), AT_REMOVEDIR);
  }
  stage_.clear();
  for (const fs::path& p : created_) {
    std::error_code ec;
    if (!fs::is_empty(p, ec) || ec) break;
    fs::remove(p, ec);
  }
  created_.clear();
}

FolderReadLock::FolderReadLock(const fs::path& dir)
    : fd_(::open(dir.c_str(), O_RDONLY | O_DIRECTORY | O_CLOEXEC)) {
  if (fd_ >= 0) lock(fd_, LOCK_SH);
}

FolderReadLock::~FolderReadLock() {
  if (fd_ >= 0) ::close(fd_);
}

}  // namespace gutterwatt
