# The installed package works from another project: install into a temporary prefix, build
# tests/package/consumer with find_package(renorm), run it (alpha for z = 2 to 20 digits,
# checked against OEIS A006891, see tests/reference_values.hpp: 2.50290787509589282228390...
# correctly rounded to 20 significant digits is 2.5029078750958928223).
add_test(NAME package.install_and_consume
    COMMAND "${CMAKE_COMMAND}" "-DBUILD_DIR=${PROJECT_BINARY_DIR}"
            "-DWORK_DIR=${CMAKE_CURRENT_BINARY_DIR}/package_check"
            "-DSOURCE_DIR=${PROJECT_SOURCE_DIR}" "-DGENERATOR=${CMAKE_GENERATOR}"
            "-DCXX_COMPILER=${CMAKE_CXX_COMPILER}"
            -P "${CMAKE_CURRENT_SOURCE_DIR}/package/check.cmake")
set_tests_properties(package.install_and_consume PROPERTIES
    PASS_REGULAR_EXPRESSION "alpha = 2\\.5029078750958928223\n"
    TIMEOUT 600)
