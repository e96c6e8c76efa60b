# All dependencies come from Debian packages (deploy/install-deps lists them).
find_package(Threads REQUIRED)
find_package(absl REQUIRED CONFIG)
find_package(Protobuf REQUIRED)
find_package(gRPC REQUIRED CONFIG)
# OpenSSL: checking a TLS key against its certificate at start (rpc/pem_check.h).
find_package(OpenSSL REQUIRED)
find_package(spdlog REQUIRED CONFIG)
find_package(prometheus-cpp REQUIRED CONFIG)
# The coordinator's plan store (templates/plan_store.h).
find_package(SQLite3 REQUIRED)
# The command line of `sliceplan`: subcommands, generated help (cli/command_table.h).
find_package(CLI11 REQUIRED CONFIG)
find_package(GTest CONFIG)
find_package(benchmark CONFIG)
