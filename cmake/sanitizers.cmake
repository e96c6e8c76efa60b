# SLICEPLAN_SANITIZE=ON builds everything with AddressSanitizer and
# UndefinedBehaviorSanitizer (the `debug` preset).
option(SLICEPLAN_SANITIZE "Build with ASan and UBSan" OFF)
if(SLICEPLAN_SANITIZE)
  add_compile_options(-fsanitize=address,undefined -fno-omit-frame-pointer)
  add_link_options(-fsanitize=address,undefined)
endif()
