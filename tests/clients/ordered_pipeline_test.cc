// Tests for clients/cli/ordered_pipeline.h: order, back-pressure,
// cancellation and errors, and prompt hand-offs (no polling).

#include "clients/cli/ordered_pipeline.h"

#include <atomic>
#include <chrono>
#include <random>
#include <string>
#include <thread>
#include <vector>

#include "gmock/gmock.h"
#include "gtest/gtest.h"

namespace shellwright::cli {
namespace {

struct Item {
  int64_t seq = -1;
  int64_t value = 0;
};

using Pipeline = OrderedPipeline<Item>;

Pipeline::Options Options(int workers, int max_in_flight) {
  Pipeline::Options options;
  options.workers = workers;
  options.max_in_flight = max_in_flight;
  return options;
}

// A source of `n` items numbered 0..n-1.
Pipeline::Source CountTo(int64_t n, std::atomic<int64_t>* read) {
  return [n, read](Item* next) -> absl::StatusOr<bool> {
    const int64_t seq = read->load();
    if (seq == n) return false;
    next->seq = seq;
    read->store(seq + 1);
    return true;
  };
}

TEST(OrderedPipeline, SinkSeesEveryBatchOnceInSourceOrder) {
  constexpr int64_t kItems = 3000;
  std::atomic<int64_t> read{0};
  std::vector<int64_t> sunk;
  std::atomic<int> max_worker{-1};
  Pipeline pipeline(Options(4, 16));
  absl::Status status = pipeline.Run(
      CountTo(kItems, &read),
      [&](int worker, Item& item) {
        // Uneven work, so that workers finish out of order.
        thread_local std::mt19937 rng(
            std::hash<std::thread::id>()(std::this_thread::get_id()));
        if (rng() % 8 == 0) {
          std::this_thread::sleep_for(std::chrono::microseconds(rng() % 500));
        }
        item.value = item.seq * 2;
        int seen = max_worker.load();
        while (worker > seen &&
               !max_worker.compare_exchange_weak(seen, worker)) {
        }
        return absl::OkStatus();
      },
      [&](Item& item) {
        EXPECT_EQ(item.value, item.seq * 2);
        sunk.push_back(item.seq);
        return absl::OkStatus();
      });
  ASSERT_TRUE(status.ok()) << status;
  ASSERT_EQ(sunk.size(), static_cast<size_t>(kItems));
  for (int64_t i = 0; i < kItems; ++i) ASSERT_EQ(sunk[i], i);
  EXPECT_LE(max_worker.load(), 3);  // Worker numbers are 0..workers-1.
}

TEST(OrderedPipeline, AnEmptySourceEndsAtOnce) {
  std::atomic<int64_t> read{0};
  int sunk = 0;
  Pipeline pipeline(Options(3, 4));
  EXPECT_TRUE(pipeline
                  .Run(
                      CountTo(0, &read),
                      [](int, Item&) { return absl::OkStatus(); },
                      [&](Item&) {
                        ++sunk;
                        return absl::OkStatus();
                      })
                  .ok());
  EXPECT_EQ(sunk, 0);
}

TEST(OrderedPipeline, TheSourceWaitsWhileTheSinkLagsBehind) {
  // A fast source and a slow sink: the source may never be more than
  // max_in_flight batches ahead of the sink.
  constexpr int kMaxInFlight = 5;
  std::atomic<int64_t> read{0};
  std::atomic<int64_t> sunk{0};
  std::atomic<int64_t> most_ahead{0};
  Pipeline::Source source = CountTo(200, &read);
  Pipeline pipeline(Options(2, kMaxInFlight));
  absl::Status status = pipeline.Run(
      [&](Item* next) {
        absl::StatusOr<bool> more = source(next);
        const int64_t ahead = read.load() - sunk.load();
        if (ahead > most_ahead.load()) most_ahead.store(ahead);
        return more;
      },
      [](int, Item&) { return absl::OkStatus(); },
      [&](Item&) {
        std::this_thread::sleep_for(std::chrono::microseconds(200));
        sunk.fetch_add(1);
        return absl::OkStatus();
      });
  ASSERT_TRUE(status.ok()) << status;
  EXPECT_EQ(sunk.load(), 200);
  EXPECT_LE(most_ahead.load(), kMaxInFlight);
  EXPECT_GE(most_ahead.load(), 2);  // It did run ahead when it could.
}

TEST(OrderedPipeline, CancelStopsTheSourceAndEveryStage) {
  std::atomic<int64_t> read{0};
  int sunk = 0;
  Pipeline pipeline(Options(2, 4));
  absl::Status status = pipeline.Run(
      CountTo(1000000, &read), [](int, Item&) { return absl::OkStatus(); },
      [&](Item&) {
        if (++sunk == 10) pipeline.Cancel();
        return absl::OkStatus();
      });
  EXPECT_EQ(status.code(), absl::StatusCode::kCancelled);
  EXPECT_EQ(sunk, 10);
  // The source stopped within the in-flight bound, not at the end.
  EXPECT_LE(read.load(), 10 + 4 + 1);
}

TEST(OrderedPipeline, CancelFromAnotherThreadWhileTheSourceWaits) {
  // The source has nothing more for now; Cancel must still end Run.
  std::atomic<bool> release{false};
  std::atomic<int> produced{0};
  Pipeline pipeline(Options(1, 2));
  std::thread canceller([&] {
    while (produced.load() < 1) std::this_thread::yield();
    pipeline.Cancel();
    release.store(true);
  });
  absl::Status status = pipeline.Run(
      [&](Item* next) -> absl::StatusOr<bool> {
        if (produced.load() == 0) {
          produced.store(1);
          return true;
        }
        while (!release.load()) std::this_thread::yield();
        return true;
      },
      [](int, Item&) { return absl::OkStatus(); },
      [](Item&) { return absl::OkStatus(); });
  canceller.join();
  EXPECT_EQ(status.code(), absl::StatusCode::kCancelled);
}

TEST(OrderedPipeline, TheFirstErrorOfAnyStageIsReturned) {
  for (int failing = 0; failing < 3; ++failing) {
    SCOPED_TRACE(failing);
    std::atomic<int64_t> read{0};
    Pipeline::Source source = CountTo(100000, &read);
    std::atomic<int> sunk{0};
    Pipeline pipeline(Options(3, 6));
    absl::Status status = pipeline.Run(
        [&](Item* next) -> absl::StatusOr<bool> {
          if (failing == 0 && read.load() == 50) {
            return absl::DataLossError("source broke");
          }
          return source(next);
        },
        [&](int, Item& item) {
          if (failing == 1 && item.seq == 50) {
            return absl::UnavailableError("worker broke");
          }
          return absl::OkStatus();
        },
        [&](Item& item) {
          if (failing == 2 && item.seq == 50) {
            return absl::PermissionDeniedError("sink broke");
          }
          sunk.fetch_add(1);
          return absl::OkStatus();
        });
    const absl::StatusCode kCodes[] = {absl::StatusCode::kDataLoss,
                                       absl::StatusCode::kUnavailable,
                                       absl::StatusCode::kPermissionDenied};
    EXPECT_EQ(status.code(), kCodes[failing]) << status;
    // Nothing at or after the failed batch reached the sink.
    EXPECT_LE(sunk.load(), 50);
  }
}

TEST(OrderedPipeline, EachHandOffIsPrompt) {
  // One batch in flight at a time: every batch waits for the previous one
  // to be sunk, so 20,000 batches take 60,000 hand-offs. Waking on a timer
  // instead of on the change would make this take many minutes and fail
  // by the test's timeout; hand-offs on a condition take well under a
  // second.
  constexpr int64_t kItems = 20000;
  std::atomic<int64_t> read{0};
  int64_t sunk = 0;
  Pipeline pipeline(Options(2, 1));
  absl::Status status = pipeline.Run(
      CountTo(kItems, &read), [](int, Item&) { return absl::OkStatus(); },
      [&](Item& item) {
        EXPECT_EQ(item.seq, sunk);
        ++sunk;
        return absl::OkStatus();
      });
  ASSERT_TRUE(status.ok()) << status;
  EXPECT_EQ(sunk, kItems);
}

}  // namespace
}  // namespace shellwright::cli
