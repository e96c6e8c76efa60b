// The servers' flags are spelled with dashes on the command line
// (--tls-cert, --token-file, as docs/interfaces.md fixes them) while
// Abseil names flags as identifiers (tls_cert). Before parsing, each
// "--name-with-dashes[=value]" argument is rewritten to underscores, so
// both spellings work. Values are left alone. Pure function.
#ifndef SLICEPLAN_RPC_FLAG_NAMES_H_
#define SLICEPLAN_RPC_FLAG_NAMES_H_

#include <string>
#include <vector>

namespace sliceplan {

// argv with flag names' dashes turned into underscores; `storage` owns the
// strings the returned pointers point into (argv[0] and non-flags as they
// are; a bare "--" ends the flags).
std::vector<char*> UnderscoreFlagNames(int argc, char** argv, std::vector<std::string>& storage);

}  // namespace sliceplan

#endif  // SLICEPLAN_RPC_FLAG_NAMES_H_
