// Tests for server/auth.cc: token comparison, the bearer-token check and
// credential assembly. (Token and PEM files: tests/util/small_file_test.cc.)

#include "server/auth.h"

#include <map>
#include <string>

#include "gtest/gtest.h"
#include "tests/server/server_test_util.h"

namespace shellwright {
namespace {

using Metadata = std::multimap<grpc::string_ref, grpc::string_ref>;

TEST(ConstantTimeEquals, ComparesWholeStrings) {
  EXPECT_TRUE(ConstantTimeEquals("", ""));
  EXPECT_TRUE(ConstantTimeEquals("s3cret", "s3cret"));
  EXPECT_FALSE(ConstantTimeEquals("s3cret", "s3creT"));
  EXPECT_FALSE(ConstantTimeEquals("s3cret", "s3cre"));
  EXPECT_FALSE(ConstantTimeEquals("s3cre", "s3cret"));
  EXPECT_FALSE(ConstantTimeEquals("", "x"));
  // A shorter string padded with NULs must not match.
  EXPECT_FALSE(ConstantTimeEquals("ab", std::string("ab\0", 3)));
}

TEST(BearerTokenVerifier, EmptyTokenAllowsEverything) {
  BearerTokenVerifier verifier("");
  EXPECT_FALSE(verifier.enabled());
  EXPECT_TRUE(verifier.Check(Metadata()).ok());
}

TEST(BearerTokenVerifier, RequiresTheExactBearerToken) {
  BearerTokenVerifier verifier("tok-123");
  ASSERT_TRUE(verifier.enabled());

  EXPECT_EQ(verifier.Check(Metadata()).error_code(),
            grpc::StatusCode::UNAUTHENTICATED);

  const std::string right = "Bearer tok-123";
  const std::string lower_scheme = "bearer tok-123";
  const std::string wrong = "Bearer tok-124";
  const std::string prefix = "Bearer tok-12";
  const std::string longer = "Bearer tok-1234";
  const std::string basic = "Basic tok-123";
  const std::string bare = "tok-123";
  auto check = [&](const std::string& value) {
    Metadata md;
    md.emplace("authorization", value);
    return verifier.Check(md);
  };
  EXPECT_TRUE(check(right).ok());
  EXPECT_TRUE(check(lower_scheme).ok());
  for (const std::string* bad : {&wrong, &prefix, &longer, &basic, &bare}) {
    grpc::Status s = check(*bad);
    EXPECT_EQ(s.error_code(), grpc::StatusCode::UNAUTHENTICATED) << *bad;
    EXPECT_EQ(s.error_message().find("tok-123"), std::string::npos)
        << "the expected token leaked into: " << s.error_message();
  }

  Metadata other_key;
  other_key.emplace("x-authorization", right);
  EXPECT_EQ(verifier.Check(other_key).error_code(),
            grpc::StatusCode::UNAUTHENTICATED);
}

TEST(MakeServerCredentials, PlaintextWhenNoFilesAreGiven) {
  absl::StatusOr<std::shared_ptr<grpc::ServerCredentials>> creds =
      MakeServerCredentials(TlsFiles());
  ASSERT_TRUE(creds.ok()) << creds.status();
  EXPECT_NE(*creds, nullptr);
}

TEST(MakeServerCredentials, RejectsIncompleteCombinations) {
  testing::TempDir dir;
  std::string pem = dir.Write("x.pem", "-----BEGIN CERTIFICATE-----\n");
  // The message starts with the field to fix, for the binary to rename.
  const struct {
    TlsFiles files;
    const char* field;
  } kCases[] = {{{pem, "", ""}, "key_file: "},
                {{"", pem, ""}, "cert_file: "},
                {{"", "", pem}, "cert_file: "}};
  for (const auto& c : kCases) {
    absl::Status s = MakeServerCredentials(c.files).status();
    EXPECT_EQ(s.code(), absl::StatusCode::kInvalidArgument);
    EXPECT_EQ(s.message().rfind(c.field, 0), 0u) << s.message();
  }
  absl::StatusOr<std::shared_ptr<grpc::ServerCredentials>> missing =
      MakeServerCredentials({pem, dir.File("missing.key"), ""});
  EXPECT_EQ(missing.status().code(), absl::StatusCode::kInvalidArgument);
  EXPECT_NE(missing.status().message().find("missing.key"), std::string::npos);
}

}  // namespace
}  // namespace shellwright
