// Tests for engine/internal/lazy_element_rows.h: rows and slots built once.

#include "engine/internal/lazy_element_rows.h"

#include <array>
#include <atomic>
#include <thread>
#include <vector>

#include "gtest/gtest.h"

namespace shellwright::internal {
namespace {

TEST(OnceSlot, RunsItsWorkOnceAcrossThreads) {
  OnceSlot slot;
  std::atomic<int> runs{0};
  int value = 0;
  std::vector<std::thread> threads;
  std::array<int, 4> seen{};
  for (int t = 0; t < 4; ++t) {
    threads.emplace_back([&, t] {
      for (int k = 0; k < 100; ++k) {
        slot.Run([&] {
          ++runs;
          value = 42;
        });
      }
      // Run returns only once the work is done: its writes are visible.
      seen[t] = value;
    });
  }
  for (std::thread& t : threads) t.join();
  EXPECT_EQ(runs.load(), 1);
  for (const int v : seen) EXPECT_EQ(v, 42);
}

TEST(LazyElementRows, MakesEachElementsRowOnce) {
  LazyElementRows<std::array<int, 2>> rows;
  int made = 0;
  auto make = [&made] {
    ++made;
    return std::array<int, 2>{made, 7};
  };
  EXPECT_EQ(rows.Get(26, make)[0], 1);
  EXPECT_EQ(rows.Get(26, make)[0], 1);  // Not made again.
  EXPECT_EQ(rows.Get(8, make)[0], 2);
  EXPECT_EQ(made, 2);
}

}  // namespace
}  // namespace shellwright::internal
