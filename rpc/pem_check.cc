#include "rpc/pem_check.h"

#include <openssl/bio.h>
#include <openssl/err.h>
#include <openssl/evp.h>
#include <openssl/pem.h>
#include <openssl/x509.h>

#include <memory>

namespace sliceplan {
namespace {

struct Free {
  void operator()(BIO* b) const { BIO_free(b); }
  void operator()(X509* x) const { X509_free(x); }
  void operator()(EVP_PKEY* k) const { EVP_PKEY_free(k); }
};
template <class T>
using Owned = std::unique_ptr<T, Free>;

Owned<BIO> Memory(const std::string& pem) {
  return Owned<BIO>(BIO_new_mem_buf(pem.data(), static_cast<int>(pem.size())));
}

Owned<X509> FirstCertificate(const std::string& pem) {
  const Owned<BIO> bio = Memory(pem);
  return Owned<X509>(bio ? PEM_read_bio_X509(bio.get(), nullptr, nullptr, nullptr) : nullptr);
}

}  // namespace

absl::Status CheckKeyPair(const std::string& cert_pem, const std::string& key_pem) {
  const Owned<X509> cert = FirstCertificate(cert_pem);
  if (!cert) {
    ERR_clear_error();
    return absl::InvalidArgumentError("--tls-cert: holds no certificate OpenSSL can read");
  }
  const Owned<BIO> bio = Memory(key_pem);
  const Owned<EVP_PKEY> key(bio ? PEM_read_bio_PrivateKey(bio.get(), nullptr, nullptr, nullptr)
                                : nullptr);
  if (!key) {
    ERR_clear_error();
    return absl::InvalidArgumentError(
        "--tls-key: holds no private key OpenSSL can read (an encrypted key is not supported)");
  }
  if (X509_check_private_key(cert.get(), key.get()) != 1) {
    ERR_clear_error();
    return absl::InvalidArgumentError(
        "--tls-cert and --tls-key: the key is not the certificate's private key");
  }
  return absl::OkStatus();
}

absl::Status CheckCaFile(const std::string& ca_pem) {
  if (!FirstCertificate(ca_pem)) {
    ERR_clear_error();
    return absl::InvalidArgumentError("--tls-ca: holds no certificate OpenSSL can read");
  }
  return absl::OkStatus();
}

}  // namespace sliceplan
