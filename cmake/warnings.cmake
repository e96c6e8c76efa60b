# sliceplan_target_warnings(TARGET): warnings as errors for our own code only
# (generated proto code and third-party headers are not held to them).
function(sliceplan_target_warnings target)
  target_compile_options(${target} PRIVATE
    -Wall -Wextra -Wpedantic -Wshadow -Wconversion -Wno-sign-conversion
    -Wno-missing-field-initializers
    -Wnon-virtual-dtor -Wold-style-cast -Wcast-align -Woverloaded-virtual
    -Werror)
endfunction()
