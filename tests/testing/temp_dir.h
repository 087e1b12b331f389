// Temporary directories and whole-file reads and writes for tests.
//
// Example:
//
//   shellwright::testing::TempDir dir;
//   const std::string in = dir.Write("in.csv", "id,formula\na,NaCl\n");
//   ... run something that writes dir.File("out.jsonl") ...
//   EXPECT_EQ(shellwright::testing::ReadFile(dir.File("out.jsonl")), "...");
//   // The directory and its files go when `dir` does.
//
// Thread safety: none.

#ifndef SHELLWRIGHT_TESTS_TESTING_TEMP_DIR_H_
#define SHELLWRIGHT_TESTS_TESTING_TEMP_DIR_H_

#include <sys/types.h>

#include <string>

namespace shellwright::testing {

// A fresh directory under $TMPDIR (or /tmp), removed with everything in it
// on destruction. path() is empty if it could not be made.
class TempDir {
 public:
  TempDir();
  ~TempDir();
  TempDir(const TempDir&) = delete;
  TempDir& operator=(const TempDir&) = delete;

  const std::string& path() const { return path_; }

  // path()/name.
  std::string File(const std::string& name) const;

  // Writes `contents` to File(name) with `mode` and returns its path.
  std::string Write(const std::string& name, const std::string& contents,
                    mode_t mode = 0600) const;

 private:
  std::string path_;
};

// The whole file, or "" when it cannot be read.
std::string ReadFile(const std::string& path);

}  // namespace shellwright::testing

#endif  // SHELLWRIGHT_TESTS_TESTING_TEMP_DIR_H_
