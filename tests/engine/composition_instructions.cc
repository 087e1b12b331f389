// Steady-state instructions per record of AnalyzeComposition, for
// callgrind (docs/performance.md, "Instructions per record, steady
// state"). Analyses the first --count formulas of the composition
// benchmark's DistinctFormulas(20000) (or the lines of --formulas FILE)
// once to warm the caches, then again with callgrind collecting only that
// second pass. Run it through tests/perf/instructions_per_record.sh, which
// starts valgrind with --collect-atstart=no and divides the count by the
// records printed here. Outside valgrind the toggles do nothing.
//
//   composition_instructions [--count N] [--alternatives N]
//                            [--formulas FILE] [--print]
//
// --print writes the formulas, one a line, and analyses nothing (for
// splitting them by family and feeding parts back with --formulas).

#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <fstream>
#include <string>
#include <vector>

#include "engine/composition.h"
#include "tests/engine/benchmark_formulas.h"
#include "valgrind/callgrind.h"

namespace shellwright {
namespace {

int Usage() {
  std::fprintf(stderr,
               "usage: composition_instructions [--count N] "
               "[--alternatives N] [--formulas FILE] [--print]\n");
  return 2;
}

// Kept out of line so that an LTO build cannot fold the two passes into
// one loop around the toggles.
__attribute__((noinline)) size_t AnalyzeAll(
    const std::vector<std::string>& formulas, int alternatives) {
  CompositionInput in;
  in.max_alternatives = alternatives;
  size_t valid = 0;
  for (const std::string& formula : formulas) {
    in.formula = formula;
    const CompositionReport r = AnalyzeComposition(in);
    valid += r.valid ? 1 : 0;
  }
  return valid;
}

int Run(int argc, char** argv) {
  long count = 5000;
  int alternatives = 0;
  const char* file = nullptr;
  bool print = false;
  for (int i = 1; i < argc; ++i) {
    if (std::strcmp(argv[i], "--print") == 0) {
      print = true;
      continue;
    }
    if (i + 1 >= argc) return Usage();
    if (std::strcmp(argv[i], "--count") == 0) {
      count = std::atol(argv[++i]);
    } else if (std::strcmp(argv[i], "--alternatives") == 0) {
      alternatives = std::atoi(argv[++i]);
    } else if (std::strcmp(argv[i], "--formulas") == 0) {
      file = argv[++i];
    } else {
      return Usage();
    }
  }
  std::vector<std::string> formulas;
  if (file != nullptr) {
    std::ifstream in(file);
    if (!in) {
      std::fprintf(stderr, "cannot read %s\n", file);
      return 1;
    }
    for (std::string line; std::getline(in, line);) {
      if (!line.empty()) formulas.push_back(line);
    }
  } else {
    formulas = testing::DistinctFormulas(20000);
  }
  if (count > 0 && static_cast<size_t>(count) < formulas.size()) {
    formulas.resize(static_cast<size_t>(count));
  }
  if (formulas.empty()) return Usage();
  if (print) {
    for (const std::string& formula : formulas) {
      std::printf("%s\n", formula.c_str());
    }
    return 0;
  }

  AnalyzeAll(formulas, alternatives);  // Warm: first-use tables and caches.
  CALLGRIND_TOGGLE_COLLECT;
  const size_t valid = AnalyzeAll(formulas, alternatives);
  CALLGRIND_TOGGLE_COLLECT;
  std::printf("records %zu\nvalid %zu\n", formulas.size(), valid);
  return 0;
}

}  // namespace
}  // namespace shellwright

int main(int argc, char** argv) { return shellwright::Run(argc, argv); }
