# sliceplan_target_warnings(TARGET): warnings for our own code only
# (generated proto code and third-party headers are not held to them).
# SLICEPLAN_WERROR turns them into errors: on in the presets and CI, off in
# a plain `cmake` build, so any supported compiler builds the binaries
# even where it warns falsely.
option(SLICEPLAN_WERROR "Treat warnings in our own targets as errors" OFF)
function(sliceplan_target_warnings target)
  target_compile_options(${target} PRIVATE
    -Wall -Wextra -Wpedantic -Wshadow -Wconversion -Wno-sign-conversion
    -Wno-missing-field-initializers
    -Wnon-virtual-dtor -Wold-style-cast -Wcast-align -Woverloaded-virtual)
  if(SLICEPLAN_WERROR)
    target_compile_options(${target} PRIVATE -Werror)
  endif()
  if(SLICEPLAN_THREAD_SAFETY AND CMAKE_CXX_COMPILER_ID MATCHES "Clang")
    target_compile_options(${target} PRIVATE -Wthread-safety)
  endif()
endfunction()
