# Use ccache when it is installed: rebuilds on a 2-core machine are the
# common case, and most of them touch one file.
find_program(SLICEPLAN_CCACHE ccache)
if(SLICEPLAN_CCACHE)
  set(CMAKE_CXX_COMPILER_LAUNCHER "${SLICEPLAN_CCACHE}")
endif()
