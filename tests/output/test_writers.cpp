// Tests for slicing/output/writers.cpp: checked, atomic, never-replacing output.
//
// The behaviour of the special files used here is the Linux kernel's, documented in its
// manual pages: null(4) — writes to /dev/null succeed and are discarded; full(4) — writes to
// /dev/full fail with ENOSPC ("No space left on device"); fifo(7) — opening a FIFO for writing
// with O_NONBLOCK fails with ENXIO while nobody has it open for reading; rename(2) — replaces
// the name atomically, so a reader holding the old file keeps the old content.
#include <catch2/catch.hpp>

#include <fcntl.h>
#include <sys/stat.h>
#include <unistd.h>

#include <cstdio>
#include <filesystem>
#include <fstream>
#include <iostream>
#include <sstream>
#include <thread>

#include "machcut/common/errors.h"
#include "machcut/output/writers.h"
#include "test_support.h"

using namespace machcut;
namespace fs = std::filesystem;

namespace {

// A fresh, empty folder for one test.
fs::path fresh_folder(const std::string& name) {
  const fs::path dir = test::temp_path(name);
  fs::remove_all(dir);
  fs::create_directories(dir);
  return dir;
}

std::string slurp(const fs::path& p) { return test::read_file(p.string()); }

void spit(const fs::path& p, const std::string& s) { std::ofstream(p, std::ios::binary) << s; }

// The InputError message of f() ("" when it does not throw).
template <class F>
std::string error_of(F f) {
  try {
    f();
  } catch (const InputError& e) {
    return e.what();
  }
  return "";
}

bool contains(const std::string& s, const std::string& part) {
  return s.find(part) != std::string::npos;
}

std::vector<std::string> names_in(const fs::path& dir) {
  std::vector<std::string> out;
  for (const auto& e : fs::directory_iterator(dir)) out.push_back(e.path().filename().string());
  std::sort(out.begin(), out.end());
  return out;
}

}  // namespace

TEST_CASE("a regular file is replaced atomically and keeps its permissions", "[writers]") {
  const fs::path dir = fresh_folder("w_atomic");
  const fs::path out = dir / "areas.csv";
  spit(out, "old content\n");
  fs::permissions(out, fs::perms::owner_read | fs::perms::owner_write | fs::perms::group_read);
  std::ifstream held(out);  // a reader that opened the file before the write (rename(2))
  write_output(out.string(), "x,area\n0,1\n");
  CHECK(slurp(out) == "x,area\n0,1\n");
  std::stringstream seen;
  seen << held.rdbuf();
  CHECK(seen.str() == "old content\n");  // replaced by rename, not truncated in place
  CHECK(fs::status(out).permissions() ==
        (fs::perms::owner_read | fs::perms::owner_write | fs::perms::group_read));
  CHECK(names_in(dir) == std::vector<std::string>{"areas.csv"});  // no temporary left
}

TEST_CASE("a new file is created, through a symbolic link the link stays", "[writers]") {
  const fs::path dir = fresh_folder("w_new");
  write_output((dir / "new.json").string(), "{}\n");
  CHECK(slurp(dir / "new.json") == "{}\n");
  spit(dir / "real.csv", "old\n");
  fs::create_symlink("real.csv", dir / "link.csv");
  write_output((dir / "link.csv").string(), "new\n");
  CHECK(fs::is_symlink(dir / "link.csv"));
  CHECK(slurp(dir / "real.csv") == "new\n");
  fs::create_symlink("missing.csv", dir / "dangling.csv");
  CHECK(contains(error_of([&] { write_output((dir / "dangling.csv").string(), "x"); }),
                 "does not exist"));
  CHECK_FALSE(fs::exists(dir / "missing.csv"));
}

TEST_CASE("an input is never overwritten, whatever the path spelling", "[writers]") {
  const fs::path dir = fresh_folder("w_input");
  const fs::path in = dir / "wing.stl";
  spit(in, "solid wing\nendsolid wing\n");
  fs::create_directories(dir / "sub");
  fs::create_symlink("wing.stl", dir / "alias.stl");
  fs::create_hard_link(in, dir / "hard.stl");
  for (const fs::path& target : {in, dir / "sub" / ".." / "wing.stl", dir / "alias.stl",
                                 dir / "hard.stl"}) {
    INFO(target);
    const std::string msg = error_of([&] { write_output(target.string(), "x", {in.string()}); });
    CHECK(contains(msg, "refusing to overwrite an input file"));
    CHECK(slurp(in) == "solid wing\nendsolid wing\n");
  }
}

TEST_CASE("a folder as the target says so", "[writers]") {
  const fs::path dir = fresh_folder("w_folder");
  const std::string msg = error_of([&] { write_output(dir.string(), "x"); });
  CHECK(msg == dir.string() + ": is a folder, not a file name");
  CHECK_FALSE(contains(msg, "Success"));
  CHECK(contains(error_of([&] { write_output((dir / "no" / "x.csv").string(), "x"); }),
                 "output folder does not exist"));
}

TEST_CASE("a device is written in place and stays a device", "[writers]") {
  REQUIRE(fs::is_character_file("/dev/null"));
  write_output("/dev/null", "discarded\n");  // null(4): the write succeeds
  CHECK(fs::is_character_file("/dev/null"));
  if (!fs::is_character_file("/dev/full")) {
    WARN("no /dev/full here: the failing-device check is skipped");
    return;
  }
  const std::string msg = error_of([] { write_output("/dev/full", "x,area\n"); });
  CHECK(msg == "/dev/full: write failed: No space left on device");  // full(4): ENOSPC
  CHECK(fs::is_character_file("/dev/full"));
  CHECK(msg.find('\n') == std::string::npos);
}

TEST_CASE("a block device is refused", "[writers]") {
  for (const auto& e : fs::directory_iterator("/dev")) {
    std::error_code ec;
    if (!fs::is_block_file(e.path(), ec)) continue;
    const std::string msg = error_of([&] { write_output(e.path().string(), "x"); });
    CHECK(contains(msg, "block device"));
    return;
  }
  WARN("no block device under /dev: nothing to check");
}

TEST_CASE("a FIFO is written in place, never replaced; without a reader it is refused",
          "[writers]") {
  const fs::path dir = fresh_folder("w_fifo");
  const fs::path fifo = dir / "pipe";
  REQUIRE(::mkfifo(fifo.c_str(), 0600) == 0);
  // fifo(7): no reader → ENXIO at once instead of blocking.
  CHECK(contains(error_of([&] { write_output(fifo.string(), "x"); }), "nobody reads"));
  CHECK(fs::is_fifo(fifo));
  std::string received;
  std::thread reader([&] {
    std::ifstream in(fifo);  // blocks until the writer opens it
    std::stringstream s;
    s << in.rdbuf();
    received = s.str();
  });
  // The reader may not have opened the FIFO yet: retry the refused write until it has.
  bool written = false;
  for (int attempt = 0; attempt < 2000 && !written; ++attempt) {
    try {
      write_output(fifo.string(), "0,1\n1,2\n");
      written = true;
    } catch (const InputError&) {
      std::this_thread::sleep_for(std::chrono::milliseconds(5));
    }
  }
  reader.join();
  CHECK(written);
  CHECK(received == "0,1\n1,2\n");
  CHECK(fs::is_fifo(fifo));
  CHECK(names_in(dir) == std::vector<std::string>{"pipe"});
}

TEST_CASE("standard output: a failed write is an error with the reason", "[writers]") {
  if (!fs::is_character_file("/dev/full")) {
    WARN("no /dev/full here: skipped");
    return;
  }
  std::cout.flush();
  std::fflush(stdout);
  const int saved = ::dup(STDOUT_FILENO);
  const int full = ::open("/dev/full", O_WRONLY);
  REQUIRE(saved >= 0);
  REQUIRE(full >= 0);
  ::dup2(full, STDOUT_FILENO);
  const std::string msg = error_of([] { write_output("-", "x,area\n0,1\n"); });
  std::printf("buffered, then lost\n");  // C stdio keeps the error until checked
  const std::string flushed = error_of([] { flush_stdout(); });
  ::dup2(saved, STDOUT_FILENO);
  ::close(saved);
  ::close(full);
  std::clearerr(stdout);
  std::cout.clear();  // both streams remember a failed write until cleared
  CHECK(msg == "standard output: write failed: No space left on device");
  CHECK(flushed == "standard output: write failed: No space left on device");
  CHECK(error_of([] { flush_stdout(); }).empty());
}

TEST_CASE("several outputs: all or nothing", "[writers]") {
  const fs::path dir = fresh_folder("w_many");
  spit(dir / "b.json", "old b\n");
  SECTION("all written") {
    write_outputs({{(dir / "a.csv").string(), "a\n"}, {(dir / "b.json").string(), "b\n"}});
    CHECK(slurp(dir / "a.csv") == "a\n");
    CHECK(slurp(dir / "b.json") == "b\n");
    CHECK(names_in(dir) == std::vector<std::string>{"a.csv", "b.json"});
  }
  SECTION("one refused before writing: nothing written") {
    const std::string msg = error_of([&] {
      write_outputs({{(dir / "a.csv").string(), "a\n"}, {dir.string(), "folder\n"}});
    });
    CHECK(contains(msg, "is a folder"));
    CHECK(names_in(dir) == std::vector<std::string>{"b.json"});
    CHECK(slurp(dir / "b.json") == "old b\n");
  }
  SECTION("one fails while writing: the others are not created or changed") {
    if (!fs::is_character_file("/dev/full")) return;
    const std::string msg = error_of([&] {
      write_outputs({{(dir / "a.csv").string(), "a\n"},
                     {(dir / "b.json").string(), "b\n"},
                     {"/dev/full", "c\n"}});
    });
    CHECK(contains(msg, "No space left on device"));
    CHECK(names_in(dir) == std::vector<std::string>{"b.json"});  // no a.csv, no temporaries
    CHECK(slurp(dir / "b.json") == "old b\n");
  }
  SECTION("a folder of outputs appears only complete") {
    const fs::path report = dir / "report" / "assets";
    write_outputs({{(report / "index.html").string(), "<html>\n"},
                   {(report / "areas.csv").string(), "x\n"}},
                  {}, true);
    CHECK(slurp(report / "index.html") == "<html>\n");
    const fs::path failed = dir / "failed_report";
    if (!fs::is_character_file("/dev/full")) return;
    const std::string msg = error_of([&] {
      write_outputs({{(failed / "index.html").string(), "<html>\n"}, {"/dev/full", "x\n"}}, {},
                    true);
    });
    CHECK(contains(msg, "No space left on device"));
    CHECK_FALSE(fs::exists(failed));
  }
  SECTION("two outputs onto one file are refused before writing") {
    const std::string msg = error_of([&] {
      write_outputs({{(dir / "a.csv").string(), "a\n"}, {(dir / "." / "a.csv").string(), "b\n"}});
    });
    CHECK(contains(msg, "two outputs"));
    CHECK(names_in(dir) == std::vector<std::string>{"b.json"});
  }
}

TEST_CASE("two outputs naming one file are found under any spelling", "[writers]") {
  const fs::path dir = fresh_folder("w_distinct");
  fs::create_directories(dir / "sub");
  spit(dir / "x.csv", "x\n");
  fs::create_hard_link(dir / "x.csv", dir / "y.csv");
  const std::string a = (dir / "x.csv").string();
  CHECK(error_of([&] { check_distinct_outputs({a, a}, {"--csv", "--json"}); }) ==
        a + ": --csv and --json both write to it");
  CHECK_FALSE(error_of([&] { check_distinct_outputs({a, (dir / "sub" / ".." / "x.csv").string()}); }).empty());
  CHECK_FALSE(error_of([&] { check_distinct_outputs({a, (dir / "y.csv").string()}); }).empty());
  CHECK_FALSE(error_of([&] {
    check_distinct_outputs({(dir / "new.csv").string(), (dir / "sub/../new.csv").string()});
  }).empty());
  CHECK(contains(error_of([] { check_distinct_outputs({"-", "-"}); }), "standard output"));
  CHECK(error_of([&] { check_distinct_outputs({a, (dir / "z.csv").string(), "-", ""}); }).empty());
  CHECK(error_of([] { check_distinct_outputs({"/dev/null", "/dev/null", "", ""}); }).empty());
}
