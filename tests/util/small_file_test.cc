// Tests for util/small_file.h: bounded whole-file reads, tokens and PEM
// files.

#include "util/small_file.h"

#include <string>

#include "gmock/gmock.h"
#include "gtest/gtest.h"
#include "tests/testing/temp_dir.h"

namespace shellwright {
namespace {

using ::testing::HasSubstr;
using ::testing::Not;

TEST(ReadSmallFile, ReadsTheWholeFileUpToTheBound) {
  testing::TempDir dir;
  const std::string text(100, 'x');
  absl::StatusOr<std::string> read =
      ReadSmallFile(dir.Write("f", text), "test", 100);
  ASSERT_TRUE(read.ok()) << read.status();
  EXPECT_EQ(*read, text);
  absl::StatusOr<std::string> big =
      ReadSmallFile(dir.Write("g", text + "y"), "test", 100);
  EXPECT_EQ(big.status().code(), absl::StatusCode::kInvalidArgument);
  EXPECT_THAT(std::string(big.status().message()),
              HasSubstr("larger than 100 bytes"));
  absl::StatusOr<std::string> missing =
      ReadSmallFile(dir.File("absent"), "test");
  EXPECT_EQ(missing.status().code(), absl::StatusCode::kInvalidArgument);
  EXPECT_THAT(std::string(missing.status().message()),
              HasSubstr("cannot read test file"));
}

TEST(ReadTokenFile, StripsTrailingWhitespace) {
  testing::TempDir dir;
  absl::StatusOr<std::string> token =
      ReadTokenFile(dir.Write("token", "tok-123\r\n \n"));
  ASSERT_TRUE(token.ok()) << token.status();
  EXPECT_EQ(*token, "tok-123");
}

TEST(ReadTokenFile, RejectsMissingEmptyAndUnprintableFiles) {
  testing::TempDir dir;
  absl::StatusOr<std::string> missing = ReadTokenFile(dir.File("absent"));
  EXPECT_EQ(missing.status().code(), absl::StatusCode::kInvalidArgument);
  EXPECT_THAT(std::string(missing.status().message()), HasSubstr("absent"));

  EXPECT_EQ(ReadTokenFile(dir.Write("empty", "\n")).status().code(),
            absl::StatusCode::kInvalidArgument);
  absl::StatusOr<std::string> spaced =
      ReadTokenFile(dir.Write("spaced", "two words"));
  EXPECT_EQ(spaced.status().code(), absl::StatusCode::kInvalidArgument);
  // The error names the file, never the contents.
  EXPECT_THAT(std::string(spaced.status().message()),
              Not(HasSubstr("two words")));
  EXPECT_EQ(ReadTokenFile(dir.Write("binary", "ab\x01")).status().code(),
            absl::StatusCode::kInvalidArgument);
}

TEST(ReadTokenFile, RejectsFilesOverOneMebibyte) {
  testing::TempDir dir;
  std::string big(kMaxCredentialFileBytes + 1, 'a');
  EXPECT_EQ(ReadTokenFile(dir.Write("big", big)).status().code(),
            absl::StatusCode::kInvalidArgument);
}

TEST(ReadPemFile, RequiresAPemBlock) {
  testing::TempDir dir;
  EXPECT_EQ(
      ReadPemFile(dir.Write("junk.pem", "not a certificate")).status().code(),
      absl::StatusCode::kInvalidArgument);
  EXPECT_TRUE(
      ReadPemFile(dir.Write("ok.pem", "-----BEGIN CERTIFICATE-----\n")).ok());
}

}  // namespace
}  // namespace shellwright
