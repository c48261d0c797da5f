# Install rules: headers, the library, the command and a CMake package (renormConfig.cmake,
# version file and exported targets) so that another project can call find_package(renorm)
# and link renorm::renorm. tests/package/ checks this with a consumer project.
include(GNUInstallDirs)
include(CMakePackageConfigHelpers)

set(RENORM_INSTALL_CMAKEDIR "${CMAKE_INSTALL_LIBDIR}/cmake/renorm"
    CACHE STRING "Where renormConfig.cmake is installed, relative to the prefix")

install(DIRECTORY "${PROJECT_SOURCE_DIR}/lib/renorm"
        DESTINATION "${CMAKE_INSTALL_INCLUDEDIR}"
        FILES_MATCHING PATTERN "*.hpp")
install(FILES "${PROJECT_BINARY_DIR}/lib/generated/renorm/version.hpp"
        DESTINATION "${CMAKE_INSTALL_INCLUDEDIR}/renorm")
install(TARGETS renorm EXPORT renormTargets
        ARCHIVE DESTINATION "${CMAKE_INSTALL_LIBDIR}"
        LIBRARY DESTINATION "${CMAKE_INSTALL_LIBDIR}"
        RUNTIME DESTINATION "${CMAKE_INSTALL_BINDIR}"
        INCLUDES DESTINATION "${CMAKE_INSTALL_INCLUDEDIR}")
if(TARGET renorm_cli)
    install(TARGETS renorm_cli RUNTIME DESTINATION "${CMAKE_INSTALL_BINDIR}")
endif()
install(EXPORT renormTargets NAMESPACE renorm:: DESTINATION "${RENORM_INSTALL_CMAKEDIR}")

configure_package_config_file("${PROJECT_SOURCE_DIR}/cmake/renormConfig.cmake.in"
    "${PROJECT_BINARY_DIR}/renormConfig.cmake"
    INSTALL_DESTINATION "${RENORM_INSTALL_CMAKEDIR}")
# 0.x releases may change the interface between minor versions.
write_basic_package_version_file("${PROJECT_BINARY_DIR}/renormConfigVersion.cmake"
    VERSION "${PROJECT_VERSION}" COMPATIBILITY SameMinorVersion)
install(FILES "${PROJECT_BINARY_DIR}/renormConfig.cmake"
              "${PROJECT_BINARY_DIR}/renormConfigVersion.cmake"
              "${PROJECT_SOURCE_DIR}/cmake/RenormArb.cmake"
        DESTINATION "${RENORM_INSTALL_CMAKEDIR}")
