# Installs the build tree BUILD_DIR into a temporary prefix WORK_DIR/prefix, configures and
# builds tests/package/consumer against it with find_package(renorm), and runs the consumer.
# Run as: cmake -DBUILD_DIR=... -DWORK_DIR=... -DSOURCE_DIR=... [-DGENERATOR=...] -P check.cmake
file(REMOVE_RECURSE "${WORK_DIR}")
file(MAKE_DIRECTORY "${WORK_DIR}")
function(run_step)
    execute_process(COMMAND ${ARGN} RESULT_VARIABLE rc)
    if(NOT rc EQUAL 0)
        message(FATAL_ERROR "step failed (${rc}): ${ARGN}")
    endif()
endfunction()
run_step("${CMAKE_COMMAND}" --install "${BUILD_DIR}" --prefix "${WORK_DIR}/prefix")
if(NOT EXISTS "${WORK_DIR}/prefix/include/renorm/version.hpp")
    message(FATAL_ERROR "the generated version.hpp was not installed")
endif()
run_step("${CMAKE_COMMAND}" -S "${SOURCE_DIR}/tests/package/consumer" -B "${WORK_DIR}/build"
         -G "${GENERATOR}" -DCMAKE_BUILD_TYPE=Release "-DCMAKE_PREFIX_PATH=${WORK_DIR}/prefix"
         "-DCMAKE_CXX_COMPILER=${CXX_COMPILER}")
run_step("${CMAKE_COMMAND}" --build "${WORK_DIR}/build")
run_step("${WORK_DIR}/build/consumer")
