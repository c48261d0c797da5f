# RENORM_BUILD_FUZZ: libFuzzer targets for the inputs renorm reads (tests/fuzz/). Needs clang
# (Debian: clang, libclang-rt-14-dev); scripts/fuzz.sh configures a separate build for them.
option(RENORM_BUILD_FUZZ "Build the libFuzzer targets (clang only)" OFF)
if(RENORM_BUILD_FUZZ)
    if(NOT CMAKE_CXX_COMPILER_ID MATCHES "Clang")
        message(FATAL_ERROR "RENORM_BUILD_FUZZ needs clang (e.g. CXX=clang++ cmake ...)")
    endif()
    add_subdirectory(tests/fuzz)
endif()
