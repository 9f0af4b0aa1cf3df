#include "zetabraid/io/output_file.hpp"

#include <fcntl.h>
#include <sys/stat.h>
#include <unistd.h>

#include <cerrno>
#include <csignal>
#include <cstdio>
#include <cstring>
#include <filesystem>
#include <iostream>
#include <mutex>
#include <vector>

#include "zetabraid/error.hpp"
#include "zetabraid/io/input_file.hpp"

namespace zb {

namespace {

// The temporary file that exists right now (at most one: writes are serialised), for the signal handler.
char g_tmp_path[4096];
volatile sig_atomic_t g_tmp_active = 0;
std::mutex g_write_mutex;

void remove_tmp_and_reraise(int sig) {
  if (g_tmp_active) ::unlink(g_tmp_path);
  ::signal(sig, SIG_DFL);
  ::raise(sig);
}

// Installs the cleanup handler for SIGINT/SIGTERM/SIGHUP while alive; restores the previous handlers after.
class SignalGuard {
 public:
  SignalGuard() {
    struct sigaction sa {};
    sa.sa_handler = remove_tmp_and_reraise;
    sigemptyset(&sa.sa_mask);
    for (size_t i = 0; i < kCount; ++i) ::sigaction(kSignals[i], &sa, &old_[i]);
  }
  ~SignalGuard() {
    for (size_t i = 0; i < kCount; ++i) ::sigaction(kSignals[i], &old_[i], nullptr);
  }
  SignalGuard(const SignalGuard&) = delete;
  SignalGuard& operator=(const SignalGuard&) = delete;

 private:
  static constexpr size_t kCount = 3;
  static constexpr int kSignals[kCount] = {SIGINT, SIGTERM, SIGHUP};
  struct sigaction old_[kCount];
};

bool same_device_as_dev_null(const struct stat& st) {
  struct stat dn {};
  return S_ISCHR(st.st_mode) && ::stat("/dev/null", &dn) == 0 && S_ISCHR(dn.st_mode) && dn.st_rdev == st.st_rdev;
}

bool write_all(int fd, const std::string& text) {
  size_t done = 0;
  while (done < text.size()) {
    ssize_t n = ::write(fd, text.data() + done, text.size() - done);
    if (n < 0) {
      if (errno == EINTR) continue;
      return false;
    }
    done += static_cast<size_t>(n);
  }
  return true;
}

}  // namespace

void write_file_atomic(const std::string& path, const std::string& text) {
  if (path == "-") {
    std::cout << text << std::flush;
    return;
  }
  if (path.empty()) throw InputError("empty output file name");
  namespace fs = std::filesystem;
  const std::string shown = printable(path);
  fs::path target(path);
  struct stat st {};
  bool exists = ::stat(path.c_str(), &st) == 0;  // follows symbolic links
  if (exists) {
    if (same_device_as_dev_null(st)) return;  // discard
    if (!S_ISREG(st.st_mode))
      throw InputError("refusing to write " + shown + ": it exists and is not a regular file");
    struct stat lst {};
    if (::lstat(path.c_str(), &lst) == 0 && S_ISLNK(lst.st_mode)) {
      std::error_code ec;
      target = fs::canonical(target, ec);
      if (ec) throw InputError("cannot resolve the link " + shown + ": " + ec.message());
    }
  } else if (errno != ENOENT) {
    throw InputError("cannot write " + shown + ": " + std::strerror(errno));
  }
  fs::path dir = target.parent_path().empty() ? fs::path(".") : target.parent_path();
  std::string tmpl = (dir / ".zetabraid-tmp-XXXXXX").string();
  if (tmpl.size() >= sizeof g_tmp_path) throw InputError("output path too long: " + shown);

  std::lock_guard<std::mutex> lock(g_write_mutex);
  SignalGuard guard;
  std::vector<char> buf(tmpl.begin(), tmpl.end());
  buf.push_back('\0');
  // Block the signals while the temporary name is registered, so the handler never sees a half-made state.
  sigset_t block, previous;
  sigemptyset(&block);
  sigaddset(&block, SIGINT);
  sigaddset(&block, SIGTERM);
  sigaddset(&block, SIGHUP);
  ::pthread_sigmask(SIG_BLOCK, &block, &previous);
  int fd = ::mkstemp(buf.data());
  if (fd >= 0) {
    std::memcpy(g_tmp_path, buf.data(), buf.size());
    g_tmp_active = 1;
  }
  ::pthread_sigmask(SIG_SETMASK, &previous, nullptr);
  if (fd < 0) throw InputError("cannot create a temporary file in " + printable(dir.string()) + ": " + std::strerror(errno));

  auto fail = [&](const std::string& why) {
    ::close(fd);
    ::unlink(buf.data());
    g_tmp_active = 0;
    throw InputError("cannot write " + shown + ": " + why);
  };
  if (exists) {
    if (::fchown(fd, st.st_uid, st.st_gid) != 0) { /* not allowed: keep our ownership */ }
    ::fchmod(fd, st.st_mode & 07777);
  } else {
    mode_t mask = ::umask(0);  // mkstemp creates 0600; give a new file the usual permissions
    ::umask(mask);
    ::fchmod(fd, 0666 & ~mask);
  }
  if (!write_all(fd, text)) fail(std::strerror(errno));
  if (::fsync(fd) != 0) fail(std::strerror(errno));
  if (::close(fd) != 0) {
    fd = -1;
    ::unlink(buf.data());
    g_tmp_active = 0;
    throw InputError("cannot write " + shown + ": " + std::strerror(errno));
  }
  if (::rename(buf.data(), target.c_str()) != 0) {
    int e = errno;
    ::unlink(buf.data());
    g_tmp_active = 0;
    throw InputError("cannot write " + shown + ": " + std::strerror(e));
  }
  g_tmp_active = 0;
  int dfd = ::open(dir.c_str(), O_RDONLY | O_DIRECTORY | O_CLOEXEC);
  if (dfd >= 0) {
    ::fsync(dfd);
    ::close(dfd);
  }
}

}  // namespace zb
