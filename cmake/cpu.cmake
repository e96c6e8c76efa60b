# Processor features the engine's bit loops use. Relation sets are 64-bit
# masks and their sizes are popcounts, taken per set and per block pair in
# the hot loops; the x86-64 baseline has no popcount instruction, so
# without -mpopcnt each std::popcount is a call into libgcc. Every x86-64
# server processor since 2008 has POPCNT; turn this off to build for an
# older one.
option(SLICEPLAN_POPCNT "x86-64: compile with the POPCNT instruction (-mpopcnt)" ON)
if(SLICEPLAN_POPCNT AND CMAKE_SYSTEM_PROCESSOR MATCHES "^(x86_64|AMD64|amd64)$")
  include(CheckCXXCompilerFlag)
  check_cxx_compiler_flag(-mpopcnt SLICEPLAN_HAS_MPOPCNT)
  if(SLICEPLAN_HAS_MPOPCNT)
    add_compile_options(-mpopcnt)
  endif()
endif()
