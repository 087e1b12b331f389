// Who may call shellwrightd: bearer-token checks on call metadata and the
// TLS (optionally mutual TLS) credentials the server listens with.
//
// A token is configured by file only (read with util/small_file.h's
// ReadTokenFile), never on the command line, so it does not show in `ps` or
// shell history. Clients send it as the metadata entry
// `authorization: Bearer <token>`; the comparison takes time independent of
// where a wrong token differs. Tokens are never logged.
//
// Example:
//
//   shellwright::BearerTokenVerifier verifier(token);
//   grpc::Status s = verifier.Check(context->client_metadata());
//   // s.error_code() == grpc::StatusCode::UNAUTHENTICATED unless the
//   // call carried "authorization: Bearer <token>".
//
//   shellwright::TlsFiles files{"server.pem", "server.key", "ca.pem"};
//   absl::StatusOr<std::shared_ptr<grpc::ServerCredentials>> creds =
//       shellwright::MakeServerCredentials(files);
//
// Thread safety: BearerTokenVerifier is immutable after construction and
// safe to use from many threads. The free functions are thread-safe.

#ifndef SHELLWRIGHT_SERVER_AUTH_H_
#define SHELLWRIGHT_SERVER_AUTH_H_

#include <map>
#include <memory>
#include <string>

#include "absl/status/statusor.h"
#include "absl/strings/string_view.h"
#include "grpcpp/security/server_credentials.h"
#include "grpcpp/support/status.h"
#include "grpcpp/support/string_ref.h"

namespace shellwright {

// Compares `a` and `b` in time that depends only on their lengths, never on
// their contents.
bool ConstantTimeEquals(absl::string_view a, absl::string_view b);

// Checks the `authorization` metadata of a call against one token.
class BearerTokenVerifier {
 public:
  // An empty token disables the check: every call is allowed.
  explicit BearerTokenVerifier(std::string token);

  BearerTokenVerifier(const BearerTokenVerifier&) = delete;
  BearerTokenVerifier& operator=(const BearerTokenVerifier&) = delete;

  // True when a token is required.
  bool enabled() const { return !token_.empty(); }

  // OK when disabled or when the first `authorization` entry is "Bearer "
  // (scheme case-insensitive) followed by the token. Otherwise
  // UNAUTHENTICATED with a message that says what was missing, never what
  // was expected.
  grpc::Status Check(
      const std::multimap<grpc::string_ref, grpc::string_ref>& metadata) const;

 private:
  const std::string token_;
};

// PEM files for TLS. All empty means plaintext.
struct TlsFiles {
  std::string cert_file;       // Server certificate chain.
  std::string key_file;        // Server private key.
  std::string client_ca_file;  // When set, clients must present a
                               // certificate signed by one of these roots.
};

// Insecure credentials when `files` is all empty; TLS credentials when
// cert_file and key_file are set; mutual TLS (client certificates required
// and verified) when client_ca_file is set too. INVALID_ARGUMENT for any
// other combination (the message starts with the TlsFiles field at fault,
// "key_file: ...") or an unreadable file (the message names the file).
absl::StatusOr<std::shared_ptr<grpc::ServerCredentials>> MakeServerCredentials(
    const TlsFiles& files);

}  // namespace shellwright

#endif  // SHELLWRIGHT_SERVER_AUTH_H_
