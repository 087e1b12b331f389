// Tests for util/stop_signals.h: SIGINT and SIGTERM as a stop request.

#include "util/stop_signals.h"

#include <poll.h>
#include <signal.h>

#include "gtest/gtest.h"

namespace shellwright {
namespace {

bool Readable(int fd) {
  pollfd p = {fd, POLLIN, 0};
  return poll(&p, 1, 0) == 1;
}

TEST(StopSignals, FirstSignalIsRecordedAndWakesThePollers) {
  std::unique_ptr<StopSignals> stop = StopSignals::Install();
  ASSERT_NE(stop, nullptr);
  EXPECT_EQ(StopSignals::Install(), nullptr) << "only one at a time";
  EXPECT_EQ(stop->signal(), 0);
  EXPECT_FALSE(Readable(stop->fd()));
  ASSERT_EQ(raise(SIGTERM), 0);  // Handled: the test goes on.
  EXPECT_EQ(stop->signal(), SIGTERM);
  EXPECT_TRUE(Readable(stop->fd()));
  EXPECT_TRUE(Readable(stop->fd())) << "stays readable";
  // The handler was reset by the first signal: the next SIGINT would end
  // the process. Check the disposition instead of raising it.
  struct sigaction now {};
  ASSERT_EQ(sigaction(SIGTERM, nullptr, &now), 0);
  EXPECT_EQ(now.sa_handler, SIG_DFL);
}

TEST(StopSignals, DestructionRestoresTheHandlers) {
  struct sigaction before {};
  ASSERT_EQ(sigaction(SIGINT, nullptr, &before), 0);
  {
    std::unique_ptr<StopSignals> stop = StopSignals::Install();
    ASSERT_NE(stop, nullptr);
    struct sigaction during {};
    ASSERT_EQ(sigaction(SIGINT, nullptr, &during), 0);
    EXPECT_NE(during.sa_handler, before.sa_handler);
  }
  struct sigaction after {};
  ASSERT_EQ(sigaction(SIGINT, nullptr, &after), 0);
  EXPECT_EQ(after.sa_handler, before.sa_handler);
  // A new one starts with no signal recorded.
  std::unique_ptr<StopSignals> again = StopSignals::Install();
  ASSERT_NE(again, nullptr);
  EXPECT_EQ(again->signal(), 0);
}

TEST(StopSignals, RequestWithoutHandlers) {
  std::unique_ptr<StopSignals> stop = StopSignals::WithoutHandlers();
  ASSERT_NE(stop, nullptr);
  EXPECT_EQ(stop->signal(), 0);
  stop->Request(SIGINT);
  stop->Request(SIGTERM);  // The first one stays.
  EXPECT_EQ(stop->signal(), SIGINT);
  EXPECT_TRUE(Readable(stop->fd()));
  EXPECT_STREQ(StopSignalName(SIGINT), "SIGINT");
  EXPECT_STREQ(StopSignalName(SIGTERM), "SIGTERM");
}

}  // namespace
}  // namespace shellwright
