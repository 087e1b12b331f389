// Tests for clients/cli/backend.h: the server address a user types and the
// words a failed connection gets.

#include "clients/cli/backend.h"

#include "absl/status/status.h"
#include "gmock/gmock.h"
#include "gtest/gtest.h"

namespace shellwright::cli {
namespace {

using ::testing::HasSubstr;

TEST(Backend, RegressionServerWithoutPortUsesTheDefaultPort) {
  // Issue 16: `--server localhost` tried port 443.
  EXPECT_EQ(ServerTarget("localhost"), "localhost:50051");
  EXPECT_EQ(ServerTarget("127.0.0.1"), "127.0.0.1:50051");
  EXPECT_EQ(ServerTarget("[::1]"), "[::1]:50051");
  EXPECT_EQ(ServerTarget("::1"), "[::1]:50051");
  // A port or a scheme is kept.
  EXPECT_EQ(ServerTarget("localhost:6000"), "localhost:6000");
  EXPECT_EQ(ServerTarget("[::1]:6000"), "[::1]:6000");
  EXPECT_EQ(ServerTarget("unix:/run/shellwrightd.sock"),
            "unix:/run/shellwrightd.sock");
  EXPECT_EQ(ServerTarget("dns:///example.test:6000"),
            "dns:///example.test:6000");
}

TEST(Backend, RegressionUnreachableServerIsExplained) {
  // Issue 16: a refused connection printed only the transport's text.
  absl::Status explained = ExplainRemoteFailure(
      absl::UnavailableError("failed to connect to all addresses"),
      "localhost:50051");
  EXPECT_EQ(explained.code(), absl::StatusCode::kUnavailable);
  EXPECT_THAT(std::string(explained.message()),
              HasSubstr("cannot reach shellwrightd at localhost:50051"));
  EXPECT_THAT(std::string(explained.message()), HasSubstr("--tls-ca"));
  absl::Status late = ExplainRemoteFailure(
      absl::DeadlineExceededError("Deadline Exceeded"), "h:1");
  EXPECT_THAT(std::string(late.message()), HasSubstr("--timeout"));
  // Other failures are the server's own words.
  absl::Status denied = absl::UnauthenticatedError("bad token");
  EXPECT_EQ(ExplainRemoteFailure(denied, "h:1"), denied);
}

}  // namespace
}  // namespace shellwright::cli
