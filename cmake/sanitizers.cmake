# SLICEPLAN_SANITIZE=ON builds everything with AddressSanitizer and
# UndefinedBehaviorSanitizer (the `debug` preset). Undefined behaviour
# aborts (no recovery), so a finding fails its test instead of scrolling
# past in a passing test's output.
option(SLICEPLAN_SANITIZE "Build with ASan and UBSan" OFF)
if(SLICEPLAN_SANITIZE)
  add_compile_options(-fsanitize=address,undefined -fno-sanitize-recover=undefined
                      -fno-omit-frame-pointer)
  add_link_options(-fsanitize=address,undefined)
endif()

# SLICEPLAN_TSAN=ON builds everything with ThreadSanitizer (the `tsan`
# preset, CI: the threaded search, whose threads meet only through std::
# atomics and joins). Code locking absl::Mutex cannot be checked this way:
# Debian's Abseil is built without TSan's annotations, so TSan sees none
# of its locks and reports every guarded access as a race.
option(SLICEPLAN_TSAN "Build with ThreadSanitizer" OFF)
if(SLICEPLAN_TSAN)
  add_compile_options(-fsanitize=thread -fno-omit-frame-pointer)
  add_link_options(-fsanitize=thread)
endif()
