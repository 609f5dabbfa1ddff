// Checked output: every write, flush and close tested; regular files replaced atomically;
// devices and FIFOs written in place (a rename over /dev/full would put a regular file where
// the device node was, issue 13).
#include "machcut/output/writers.h"

#include <fcntl.h>
#include <sys/stat.h>
#include <unistd.h>

#include <algorithm>
#include <cerrno>
#include <cstdio>
#include <cstring>
#include <filesystem>
#include <iostream>
#include <random>

#include "machcut/common/errors.h"

namespace machcut {

namespace fs = std::filesystem;

namespace {

const char* const kStdout = "standard output";

std::string reason(int err) { return std::strerror(err); }

// Writes all of `data` to `fd`; the errno of the failure, 0 on success.
int write_all(int fd, const char* data, std::size_t n) {
  while (n > 0) {
    const ssize_t k = ::write(fd, data, n);
    if (k < 0 && errno == EINTR) continue;
    if (k < 0) return errno;
    if (k == 0) return EIO;
    data += k;
    n -= static_cast<std::size_t>(k);
  }
  return 0;
}

enum class Kind {
  to_stdout,  // "-"
  replace,    // regular file or new name: temporary + rename
  in_place,   // character device, FIFO, link to an open descriptor
};

struct Target {
  std::string path;  // as given
  Kind kind = Kind::replace;
  fs::path real;     // replace: the file the rename lands on (links resolved)
  bool existed = false;
  fs::perms perms = fs::perms::none;
  bool append = false;  // in place onto a regular file (behind /dev/stdout and the like)
  bool fifo = false;
};

// /dev/stdout, /dev/fd/3, /proc/self/fd/1 …: names of open descriptors, whatever they are.
bool names_a_descriptor(const std::string& path) {
  return path.starts_with("/dev/fd/") || path == "/dev/stdout" || path == "/dev/stderr" ||
         path.starts_with("/proc/");
}

// What `path` is and how it will be written; throws the refusals (see write_output).
// `folder_may_be_missing`: write_outputs creates it later.
Target classify(const std::string& path, const std::vector<std::string>& inputs,
                bool folder_may_be_missing) {
  Target t;
  t.path = path;
  if (path == "-") {
    t.kind = Kind::to_stdout;
    return t;
  }
  if (path.empty()) throw InputError("", "an output file name is empty");
  std::error_code ec;
  const fs::file_status link = fs::symlink_status(path, ec);
  const fs::file_status st = fs::status(path, ec);
  if (fs::exists(st))
    for (const std::string& in : inputs) {
      std::error_code e2;
      if (fs::equivalent(path, in, e2)) throw InputError(path, "refusing to overwrite an input file");
    }
  if (fs::is_symlink(link) && !fs::exists(st))
    throw InputError(path, "is a symbolic link to a file that does not exist");
  switch (st.type()) {
    case fs::file_type::directory: throw InputError(path, "is a folder, not a file name");
    case fs::file_type::block:
      throw InputError(path, "is a block device; refusing to write onto it");
    case fs::file_type::socket: throw InputError(path, "is a socket; cannot write a file to it");
    case fs::file_type::character:
    case fs::file_type::fifo:
      t.kind = Kind::in_place;
      t.fifo = st.type() == fs::file_type::fifo;
      return t;
    case fs::file_type::regular:
      if (names_a_descriptor(path)) {
        t.kind = Kind::in_place;
        t.append = true;
        return t;
      }
      t.existed = true;
      t.perms = st.permissions();
      t.real = fs::is_symlink(link) ? fs::canonical(path, ec) : fs::path(path);
      if (ec) throw InputError(path, "cannot resolve the link: " + ec.message());
      if (::access(t.real.c_str(), W_OK) != 0)
        throw InputError(path, "is not writable (" + reason(errno) + ")");
      return t;
    case fs::file_type::not_found: {
      t.real = path;
      const fs::path dir = t.real.has_parent_path() ? t.real.parent_path() : fs::path(".");
      const fs::file_status ds = fs::status(dir, ec);
      if (fs::exists(ds) && !fs::is_directory(ds))
        throw InputError(path, "cannot be created: " + dir.string() + " is not a folder");
      if (!fs::exists(ds) && !folder_may_be_missing)
        throw InputError(path, "output folder does not exist");
      return t;
    }
    default:
      throw InputError(path, "cannot inspect the output: " + (ec ? ec.message() : "unknown file type"));
  }
}

// Flushes std::cout and stdout; the errno of a failure so far, 0 when all went out.
int flush_streams() {
  errno = 0;
  std::cout.flush();  // synchronised with stdio (the default): this flushes stdout itself
  int err = errno;
  const int rc = std::fflush(stdout);
  if (rc != 0 && errno != 0) err = errno;
  if (rc != 0 || std::ferror(stdout) || !std::cout) return err ? err : EIO;
  return 0;
}

void write_stdout(const std::string& content) {
  if (const int err = flush_streams()) throw InputError(kStdout, "write failed: " + reason(err));
  if (const int err = write_all(STDOUT_FILENO, content.data(), content.size()))
    throw InputError(kStdout, "write failed: " + reason(err));
}

void write_in_place(const Target& t, const std::string& content) {
  int flags = O_WRONLY | O_CLOEXEC | O_NOCTTY;
  if (t.fifo) flags |= O_NONBLOCK;  // no reader: ENXIO now instead of waiting forever
  if (t.append) flags |= O_APPEND;
  const int fd = ::open(t.path.c_str(), flags);
  if (fd < 0) {
    if (t.fifo && errno == ENXIO)
      throw InputError(t.path, "is a FIFO that nobody reads; refusing to wait for a reader");
    throw InputError(t.path, "cannot open for writing: " + reason(errno));
  }
  struct stat st {};
  int err = ::fstat(fd, &st) != 0 ? errno : 0;
  if (!err && S_ISBLK(st.st_mode)) {
    ::close(fd);
    throw InputError(t.path, "is a block device; refusing to write onto it");
  }
  if (!err && t.fifo) {
    const int fl = ::fcntl(fd, F_GETFL);
    if (fl < 0 || ::fcntl(fd, F_SETFL, fl & ~O_NONBLOCK) != 0) err = errno;
  }
  if (!err) err = write_all(fd, content.data(), content.size());
  if (::close(fd) != 0 && !err && errno != EINTR) err = errno;
  if (err) throw InputError(t.path, "write failed: " + reason(err));
}

std::string temp_suffix() {
  static std::mt19937_64 rng{std::random_device{}() ^ static_cast<std::uint64_t>(::getpid())};
  char buf[24];
  std::snprintf(buf, sizeof buf, "%012llx", static_cast<unsigned long long>(rng() & 0xFFFFFFFFFFFFull));
  return buf;
}

// Writes `content` into a new temporary file beside t.real; returns its path.
fs::path write_temp(const Target& t, const std::string& content) {
  const fs::path dir = t.real.has_parent_path() ? t.real.parent_path() : fs::path(".");
  fs::path tmp;
  int fd = -1;
  for (int attempt = 0; attempt < 100 && fd < 0; ++attempt) {
    tmp = dir / ("." + t.real.filename().string() + ".tmp" + temp_suffix());
    fd = ::open(tmp.c_str(), O_WRONLY | O_CREAT | O_EXCL | O_CLOEXEC, 0666);
    if (fd < 0 && errno != EEXIST)
      throw InputError(t.path, "cannot create a file in the output folder: " + reason(errno));
  }
  if (fd < 0) throw InputError(t.path, "cannot create a temporary file in the output folder");
  int err = write_all(fd, content.data(), content.size());
  if (!err && t.existed)  // the replaced file's permission bits, as an editor would keep them
    (void)::fchmod(fd, static_cast<mode_t>(t.perms & fs::perms::mask));
  if (::close(fd) != 0 && !err && errno != EINTR) err = errno;
  if (err) {
    ::unlink(tmp.c_str());
    throw InputError(t.path, "write failed: " + reason(err));
  }
  return tmp;
}

void commit(const Target& t, const fs::path& tmp) {
  if (::rename(tmp.c_str(), t.real.c_str()) != 0) {
    const int err = errno;
    ::unlink(tmp.c_str());
    throw InputError(t.path, "cannot move the output into place: " + reason(err));
  }
}

// Folders on the way to `file` that do not exist yet, outermost first.
std::vector<fs::path> missing_folders(const fs::path& file) {
  std::vector<fs::path> out;
  std::error_code ec;
  for (fs::path d = fs::absolute(file, ec).parent_path(); !d.empty() && !fs::exists(d, ec);
       d = d.parent_path()) {
    out.push_back(d);
    if (d == d.parent_path()) break;
  }
  std::reverse(out.begin(), out.end());
  return out;
}

// The key two outputs are compared by: absolute, links and ".." resolved as far as they exist.
std::string output_key(const std::string& path) {
  if (path == "-") return "-";
  std::error_code ec;
  fs::path p = fs::weakly_canonical(fs::absolute(path, ec), ec);
  if (ec) p = fs::absolute(path, ec).lexically_normal();
  return p.string();
}

}  // namespace

void write_output(const std::string& path, const std::string& content,
                  const std::vector<std::string>& inputs) {
  const Target t = classify(path, inputs, false);
  if (t.kind == Kind::to_stdout) return write_stdout(content);
  if (t.kind == Kind::in_place) return write_in_place(t, content);
  commit(t, write_temp(t, content));
}

void write_outputs(const std::vector<OutputFile>& outputs, const std::vector<std::string>& inputs,
                   bool create_folders) {
  std::vector<std::string> paths;
  for (const OutputFile& o : outputs) paths.push_back(o.path);
  check_distinct_outputs(paths);
  std::vector<Target> targets;
  for (const OutputFile& o : outputs) targets.push_back(classify(o.path, inputs, create_folders));
  std::vector<fs::path> created, temps;
  std::size_t renamed = 0;
  try {
    if (create_folders)
      for (const Target& t : targets)
        if (t.kind == Kind::replace)
          for (const fs::path& d : missing_folders(t.real)) {
            std::error_code ec;
            if (!fs::create_directory(d, ec) && ec)
              throw InputError(t.path, "cannot create the folder " + d.string() + ": " + ec.message());
            created.push_back(d);
          }
    temps.resize(targets.size());
    for (std::size_t i = 0; i < targets.size(); ++i)
      if (targets[i].kind == Kind::replace) temps[i] = write_temp(targets[i], outputs[i].content);
    for (std::size_t i = 0; i < targets.size(); ++i) {
      if (targets[i].kind == Kind::to_stdout) write_stdout(outputs[i].content);
      if (targets[i].kind == Kind::in_place) write_in_place(targets[i], outputs[i].content);
    }
    for (std::size_t i = 0; i < targets.size(); ++i, renamed = i)
      if (targets[i].kind == Kind::replace) commit(targets[i], temps[i]);
  } catch (...) {
    for (std::size_t i = renamed; i < temps.size(); ++i)
      if (!temps[i].empty()) ::unlink(temps[i].c_str());
    if (renamed == 0)
      for (auto d = created.rbegin(); d != created.rend(); ++d) ::rmdir(d->c_str());  // if empty
    throw;
  }
}

void check_distinct_outputs(const std::vector<std::string>& paths,
                            const std::vector<std::string>& labels) {
  std::vector<std::string> keys(paths.size());
  std::error_code ec;
  for (std::size_t i = 0; i < paths.size(); ++i) {
    if (paths[i].empty()) continue;
    if (paths[i] != "-" && fs::is_character_file(paths[i], ec)) continue;  // /dev/null twice is fine
    keys[i] = output_key(paths[i]);
    for (std::size_t j = 0; j < i; ++j) {
      if (keys[j].empty()) continue;
      const bool same = keys[i] == keys[j] ||
                        (paths[i] != "-" && paths[j] != "-" && fs::exists(paths[i], ec) &&
                         fs::equivalent(paths[i], paths[j], ec));
      if (!same) continue;
      const std::string name = paths[i] == "-" ? kStdout : paths[i];
      if (i < labels.size() && !labels[i].empty() && !labels[j].empty())
        throw InputError(name, labels[j] + " and " + labels[i] + " both write to it");
      throw InputError(name, "is named by two outputs; give each output a file of its own");
    }
  }
}

void flush_stdout() {
  if (const int err = flush_streams()) throw InputError(kStdout, "write failed: " + reason(err));
}

std::string format_number(double v) {
  char buf[40];
  std::snprintf(buf, sizeof buf, "%.15g", v);
  return buf;
}

}  // namespace machcut
