// Test-only: a fresh temporary directory, removed with everything in it when
// the object goes away.
#ifndef KINDRED_TESTS_TESTLIB_TEMP_DIR_H_
#define KINDRED_TESTS_TESTLIB_TEMP_DIR_H_

#include <string>
#include <string_view>
#include <vector>

namespace kindred::testing {

class TempDir {
 public:
  TempDir();
  ~TempDir();
  TempDir(const TempDir&) = delete;
  TempDir& operator=(const TempDir&) = delete;

  const std::string& path() const { return path_; }
  // path() + "/" + name.
  std::string File(std::string_view name) const;
  // Writes `contents` to File(name), creating parent directories; returns
  // the full path.
  std::string Write(std::string_view name, std::string_view contents) const;

 private:
  std::string path_;
};

// The whole contents of a file ("" when it cannot be read).
std::string ReadFile(const std::string& path);

// The names of the entries of directory `dir`, sorted.
std::vector<std::string> ListNames(const std::string& dir);

}  // namespace kindred::testing

#endif  // KINDRED_TESTS_TESTLIB_TEMP_DIR_H_
