// Checking TLS files at start, before anything listens: the certificate
// and the private key must be a pair, and a CA file must hold a
// certificate. Otherwise a server would print "listening on" and report
// SERVING while every handshake fails. Uses OpenSSL's parser (the library
// gRPC itself links on Debian). Pure functions; thread-safe.
#ifndef SLICEPLAN_RPC_PEM_CHECK_H_
#define SLICEPLAN_RPC_PEM_CHECK_H_

#include <string>

#include "absl/status/status.h"

namespace sliceplan {

// INVALID_ARGUMENT naming the flag: no certificate in `cert_pem`, no
// private key in `key_pem`, or a key that is not the certificate's.
absl::Status CheckKeyPair(const std::string& cert_pem, const std::string& key_pem);

// INVALID_ARGUMENT when `ca_pem` holds no certificate OpenSSL can read.
absl::Status CheckCaFile(const std::string& ca_pem);

}  // namespace sliceplan

#endif  // SLICEPLAN_RPC_PEM_CHECK_H_
