#include "zetabraid/io/input_file.hpp"

#include <fcntl.h>
#include <sys/stat.h>
#include <unistd.h>

#include <cerrno>
#include <cstring>

#include "zetabraid/error.hpp"

namespace zb {

namespace {

struct Fd {
  int fd;
  ~Fd() {
    if (fd >= 0) ::close(fd);
  }
};

}  // namespace

std::string read_input_file(const std::string& path, size_t max_bytes, const std::string& what) {
  const std::string name = what + " " + printable(path);
  if (path.empty()) throw InputError(what + ": empty file name");
  Fd f{::open(path.c_str(), O_RDONLY | O_NONBLOCK | O_NOCTTY | O_CLOEXEC)};
  if (f.fd < 0) throw InputError("cannot open " + name + ": " + std::strerror(errno));
  struct stat st {};
  if (::fstat(f.fd, &st) != 0) throw InputError("cannot read " + name + ": " + std::strerror(errno));
  if (S_ISDIR(st.st_mode)) throw InputError(name + " is a directory, not a file");
  if (!S_ISREG(st.st_mode)) throw InputError(name + " is not a regular file (device, FIFO or socket)");
  if (static_cast<unsigned long long>(st.st_size) > max_bytes)
    throw InputError(name + " is larger than the limit of " + std::to_string(max_bytes) + " bytes");
  // Back to blocking reads (a regular file never blocks, but keep the semantics plain).
  int flags = ::fcntl(f.fd, F_GETFL);
  if (flags >= 0) ::fcntl(f.fd, F_SETFL, flags & ~O_NONBLOCK);
  std::string out;
  out.reserve(static_cast<size_t>(st.st_size));
  char buf[1 << 16];
  for (;;) {
    ssize_t n = ::read(f.fd, buf, sizeof buf);
    if (n < 0) {
      if (errno == EINTR) continue;
      throw InputError("cannot read " + name + ": " + std::strerror(errno));
    }
    if (n == 0) break;
    out.append(buf, static_cast<size_t>(n));
    if (out.size() > max_bytes)  // the file grew while being read
      throw InputError(name + " is larger than the limit of " + std::to_string(max_bytes) + " bytes");
  }
  return out;
}

std::string printable(const std::string& s) {
  static const char* hex = "0123456789abcdef";
  std::string out;
  out.reserve(s.size());
  for (unsigned char c : s) {
    if (c == '\\') {
      out += "\\\\";
    } else if (c == '\n') {
      out += "\\n";
    } else if (c == '\t') {
      out += "\\t";
    } else if (c < 0x20 || c >= 0x7f) {
      out += "\\x";
      out += hex[c >> 4];
      out += hex[c & 15];
    } else {
      out += static_cast<char>(c);
    }
  }
  return out;
}

}  // namespace zb
