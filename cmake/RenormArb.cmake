# Provides the imported target renorm::arb (Arb ball arithmetic and FLINT).
# FLINT 3 ships Arb inside libflint with a CMake package; Debian 12 ships Arb 2.x
# as libflint-arb next to FLINT 2.x with no package config.
if(TARGET renorm::arb)
    return()
endif()
find_package(flint 3 CONFIG QUIET)
if(flint_FOUND)
    add_library(renorm::arb INTERFACE IMPORTED)
    target_link_libraries(renorm::arb INTERFACE flint::flint)
    return()
endif()
find_path(RENORM_ARB_INCLUDE_DIR arb.h PATH_SUFFIXES flint arb)
find_library(RENORM_ARB_LIBRARY NAMES flint-arb arb)
find_library(RENORM_FLINT_LIBRARY NAMES flint)
find_library(RENORM_MPFR_LIBRARY NAMES mpfr)
find_library(RENORM_GMP_LIBRARY NAMES gmp)
if(NOT RENORM_ARB_INCLUDE_DIR OR NOT RENORM_ARB_LIBRARY OR NOT RENORM_FLINT_LIBRARY)
    message(FATAL_ERROR "Arb/FLINT not found: install libflint-arb-dev and libflint-dev "
                        "(scripts/install-deps.sh does this)")
endif()
add_library(renorm::arb INTERFACE IMPORTED)
target_include_directories(renorm::arb INTERFACE "${RENORM_ARB_INCLUDE_DIR}" "${RENORM_ARB_INCLUDE_DIR}/flint")
target_link_libraries(renorm::arb INTERFACE "${RENORM_ARB_LIBRARY}" "${RENORM_FLINT_LIBRARY}"
                                            "${RENORM_MPFR_LIBRARY}" "${RENORM_GMP_LIBRARY}")
