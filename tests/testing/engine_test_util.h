// Shared helpers for the engine tests.
//
// Example:
//   shellwright::AtomDescriptionPtr fe =
//   shellwright::testing::Describe("Fe3+");
//   EXPECT_EQ(fe->configuration_notation, "[Ar] 3d5");

#ifndef SHELLWRIGHT_TESTS_TESTING_ENGINE_TEST_UTIL_H_
#define SHELLWRIGHT_TESTS_TESTING_ENGINE_TEST_UTIL_H_

#include <string>

#include "engine/atom.h"
#include "engine/configuration.h"
#include "gtest/gtest.h"

namespace shellwright::testing {

// Describes `spec` with the given geometry and spin state; fails the
// current test (and returns nullptr) if the engine rejects it.
inline AtomDescriptionPtr Describe(
    const std::string& spec, Geometry geometry = Geometry::kFree,
    SpinStatePreference spin = SpinStatePreference::kAuto) {
  absl::StatusOr<AtomQuery> q = ParseAtomQuery(spec, std::nullopt);
  EXPECT_TRUE(q.ok()) << spec << ": " << q.status();
  if (!q.ok()) return nullptr;
  q->geometry = geometry;
  q->spin_state = spin;
  absl::StatusOr<AtomDescriptionPtr> d = DescribeAtom(*q);
  EXPECT_TRUE(d.ok()) << spec << ": " << d.status();
  return d.ok() ? *d : nullptr;
}

// Parses a configuration string; fails the current test on error.
inline Configuration ParseOrFail(const std::string& text) {
  absl::StatusOr<Configuration> c = Configuration::Parse(text);
  EXPECT_TRUE(c.ok()) << text << ": " << c.status();
  return c.ok() ? *c : Configuration();
}

}  // namespace shellwright::testing

#endif  // SHELLWRIGHT_TESTS_TESTING_ENGINE_TEST_UTIL_H_
