#include "tests/testing/subprocess.h"

#include <cstdlib>

namespace shellwright::testing {

std::string BinPath(const std::string& relative) {
  const char* dir = std::getenv("SHELLWRIGHT_BIN_DIR");
  return std::string(dir != nullptr && *dir != '\0'
                         ? dir
                         : SHELLWRIGHT_DEFAULT_BIN_DIR) +
         "/" + relative;
}

std::string SourcePath(const std::string& relative) {
  const char* dir = std::getenv("SHELLWRIGHT_SOURCE_DIR");
  return std::string(dir != nullptr && *dir != '\0'
                         ? dir
                         : SHELLWRIGHT_DEFAULT_SOURCE_DIR) +
         "/" + relative;
}

}  // namespace shellwright::testing
