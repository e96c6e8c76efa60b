# All dependencies come from Debian packages (see .ci/run for the list).
find_package(Threads REQUIRED)
find_package(absl REQUIRED CONFIG)
find_package(Protobuf REQUIRED)
find_package(gRPC REQUIRED CONFIG)
find_package(spdlog REQUIRED CONFIG)
find_package(prometheus-cpp REQUIRED CONFIG)
find_package(GTest CONFIG)
find_package(benchmark CONFIG)
