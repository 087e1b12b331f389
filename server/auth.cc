#include "server/auth.h"

#include <algorithm>
#include <utility>

#include "absl/strings/ascii.h"
#include "absl/strings/match.h"
#include "absl/strings/str_cat.h"
#include "grpcpp/security/server_credentials.h"
#include "util/small_file.h"

namespace shellwright {
namespace {

constexpr absl::string_view kBearerPrefix = "Bearer ";

}  // namespace

bool ConstantTimeEquals(absl::string_view a, absl::string_view b) {
  // Branches depend only on the lengths; the bytes are folded into `diff`
  // without early exit. volatile keeps the compiler from short-circuiting.
  const size_t n = std::max(a.size(), b.size());
  volatile unsigned char diff = a.size() == b.size() ? 0 : 1;
  for (size_t i = 0; i < n; ++i) {
    const unsigned char x = i < a.size() ? static_cast<unsigned char>(a[i]) : 0;
    const unsigned char y = i < b.size() ? static_cast<unsigned char>(b[i]) : 0;
    diff = diff | static_cast<unsigned char>(x ^ y);
  }
  return diff == 0;
}

BearerTokenVerifier::BearerTokenVerifier(std::string token)
    : token_(std::move(token)) {}

grpc::Status BearerTokenVerifier::Check(
    const std::multimap<grpc::string_ref, grpc::string_ref>& metadata) const {
  if (!enabled()) return grpc::Status::OK;
  auto it = metadata.find("authorization");
  if (it == metadata.end()) {
    return grpc::Status(grpc::StatusCode::UNAUTHENTICATED,
                        "missing authorization metadata (Bearer token)");
  }
  absl::string_view value(it->second.data(), it->second.size());
  if (value.size() < kBearerPrefix.size() ||
      !absl::EqualsIgnoreCase(value.substr(0, kBearerPrefix.size()),
                              kBearerPrefix)) {
    return grpc::Status(grpc::StatusCode::UNAUTHENTICATED,
                        "authorization metadata is not a Bearer token");
  }
  if (!ConstantTimeEquals(value.substr(kBearerPrefix.size()), token_)) {
    return grpc::Status(grpc::StatusCode::UNAUTHENTICATED,
                        "invalid bearer token");
  }
  return grpc::Status::OK;
}

absl::StatusOr<std::shared_ptr<grpc::ServerCredentials>> MakeServerCredentials(
    const TlsFiles& files) {
  if (files.cert_file.empty() && files.key_file.empty()) {
    if (!files.client_ca_file.empty()) {
      return absl::InvalidArgumentError(
          "cert_file: missing; client_ca_file needs cert_file and key_file");
    }
    return grpc::InsecureServerCredentials();
  }
  if (files.cert_file.empty() || files.key_file.empty()) {
    return absl::InvalidArgumentError(
        absl::StrCat(files.cert_file.empty() ? "cert_file" : "key_file",
                     ": missing; cert_file and key_file go together"));
  }
  absl::StatusOr<std::string> cert = ReadPemFile(files.cert_file);
  if (!cert.ok()) return cert.status();
  absl::StatusOr<std::string> key = ReadPemFile(files.key_file);
  if (!key.ok()) return key.status();

  grpc::SslServerCredentialsOptions options(
      files.client_ca_file.empty()
          ? GRPC_SSL_DONT_REQUEST_CLIENT_CERTIFICATE
          : GRPC_SSL_REQUEST_AND_REQUIRE_CLIENT_CERTIFICATE_AND_VERIFY);
  if (!files.client_ca_file.empty()) {
    absl::StatusOr<std::string> ca = ReadPemFile(files.client_ca_file);
    if (!ca.ok()) return ca.status();
    options.pem_root_certs = std::move(*ca);
  }
  options.pem_key_cert_pairs.push_back({std::move(*key), std::move(*cert)});
  return grpc::SslServerCredentials(options);
}

}  // namespace shellwright
