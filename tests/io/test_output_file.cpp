// write_file_atomic: never a partial file, never a replaced device, permissions kept, cleanup on signals.
// Expectations are POSIX file semantics (common practice for atomic replacement: write, fsync, rename).
#include <doctest/doctest.h>
#include <fcntl.h>
#include <signal.h>
#include <sys/stat.h>
#include <sys/wait.h>
#include <unistd.h>

#include <chrono>
#include <filesystem>
#include <thread>

#include "support/helpers.hpp"
#include "zetabraid/error.hpp"
#include "zetabraid/io/input_file.hpp"
#include "zetabraid/io/output_file.hpp"

namespace fs = std::filesystem;

namespace {
size_t temporaries(const std::string& dir) {
  size_t n = 0;
  for (auto& e : fs::directory_iterator(dir))
    if (e.path().filename().string().rfind(".zetabraid-tmp-", 0) == 0) ++n;
  return n;
}
}  // namespace

TEST_CASE("write_file_atomic keeps permission bits of an existing file") {
  std::string d = zbtest::tmpdir("zb_out_perm");
  std::string p = d + "/secret.json";
  zbtest::spit(p, "old");
  ::chmod(p.c_str(), 0600);
  zb::write_file_atomic(p, "new");
  struct stat st {};
  REQUIRE(::stat(p.c_str(), &st) == 0);
  CHECK((st.st_mode & 07777) == 0600);
  CHECK(zbtest::slurp(p) == "new");
  CHECK(temporaries(d) == 0);
}

TEST_CASE("write_file_atomic refuses FIFOs and directories without blocking, and empty names") {
  std::string d = zbtest::tmpdir("zb_out_fifo");
  std::string fifo = d + "/pipe";
  ::unlink(fifo.c_str());
  REQUIRE(::mkfifo(fifo.c_str(), 0600) == 0);
  CHECK_THROWS_AS(zb::write_file_atomic(fifo, "x"), zb::InputError);
  struct stat st {};
  REQUIRE(::lstat(fifo.c_str(), &st) == 0);
  CHECK(S_ISFIFO(st.st_mode));  // still the FIFO, not replaced
  CHECK_THROWS_AS(zb::write_file_atomic(d, "x"), zb::InputError);
  CHECK(fs::is_directory(d));
  CHECK_THROWS_AS(zb::write_file_atomic("", "x"), zb::InputError);
  CHECK(temporaries(d) == 0);
}

TEST_CASE("write_file_atomic discards output to /dev/null and leaves the device in place") {
  zb::write_file_atomic("/dev/null", "discarded");
  struct stat st {};
  REQUIRE(::stat("/dev/null", &st) == 0);
  CHECK(S_ISCHR(st.st_mode));
}

TEST_CASE("write_file_atomic follows a symbolic link and keeps the link") {
  std::string d = zbtest::tmpdir("zb_out_link");
  std::string real = d + "/real.txt", link = d + "/link.txt";
  zbtest::spit(real, "old");
  ::unlink(link.c_str());
  REQUIRE(::symlink(real.c_str(), link.c_str()) == 0);
  zb::write_file_atomic(link, "new");
  struct stat st {};
  REQUIRE(::lstat(link.c_str(), &st) == 0);
  CHECK(S_ISLNK(st.st_mode));
  CHECK(zbtest::slurp(real) == "new");
}

TEST_CASE("a signal during the write removes the temporary file") {
  std::string d = zbtest::tmpdir("zb_out_signal");
  for (auto& e : fs::directory_iterator(d)) fs::remove(e.path());
  pid_t child = ::fork();
  REQUIRE(child >= 0);
  if (child == 0) {
    std::string big(std::size_t(1) << 26, 'x');  // 64 MiB: the write takes long enough to be interrupted
    for (int i = 0; i < 20; ++i) zb::write_file_atomic(d + "/big.bin", big);
    ::_exit(0);
  }
  bool seen = false;
  auto start = std::chrono::steady_clock::now();
  while (std::chrono::steady_clock::now() - start < std::chrono::seconds(20)) {
    if (temporaries(d) > 0) {
      seen = true;
      break;
    }
    std::this_thread::sleep_for(std::chrono::microseconds(200));
  }
  ::kill(child, SIGTERM);
  int status = 0;
  ::waitpid(child, &status, 0);
  REQUIRE(seen);
  CHECK(WIFSIGNALED(status));
  CHECK(temporaries(d) == 0);
}

TEST_CASE("read_input_file refuses FIFOs, directories, devices and oversize files") {
  std::string d = zbtest::tmpdir("zb_in_kinds");
  std::string fifo = d + "/pipe";
  ::unlink(fifo.c_str());
  REQUIRE(::mkfifo(fifo.c_str(), 0600) == 0);
  CHECK_THROWS_AS(zb::read_input_file(fifo, 100, "model file"), zb::InputError);  // must not block
  CHECK_THROWS_AS(zb::read_input_file(d, 100, "model file"), zb::InputError);
  CHECK_THROWS_AS(zb::read_input_file("/dev/zero", 100, "model file"), zb::InputError);
  std::string f = d + "/ten.txt";
  zbtest::spit(f, "0123456789");
  CHECK(zb::read_input_file(f, 10, "x") == "0123456789");
  CHECK_THROWS_AS(zb::read_input_file(f, 9, "x"), zb::InputError);
  CHECK_THROWS_AS(zb::read_input_file(d + "/missing", 9, "x"), zb::InputError);
}

TEST_CASE("printable escapes control characters so names cannot drive a terminal") {
  CHECK(zb::printable("a\nb") == "a\\nb");
  CHECK(zb::printable("\x1b[2K\rVERIFIED") == "\\x1b[2K\\x0dVERIFIED");
  CHECK(zb::printable("back\\slash") == "back\\\\slash");
  CHECK(zb::printable("plain.toml") == "plain.toml");
}
