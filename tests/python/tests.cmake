# Tests of the Python module (unittest, so that any interpreter can run them), one ctest test
# per test class, with PYTHONPATH pointing at the package in the build tree.
if(TARGET renorm_python)
    foreach(cls Solve SolveOtherOrders BadInput CertifyVerify Cascade Table)
        add_test(NAME python.${cls}
            COMMAND "${Python_EXECUTABLE}" -m unittest -v test_renorm.${cls}
            WORKING_DIRECTORY "${CMAKE_CURRENT_SOURCE_DIR}/python")
        set_tests_properties(python.${cls} PROPERTIES
            ENVIRONMENT "PYTHONPATH=${PROJECT_BINARY_DIR}/python;PYTHONDONTWRITEBYTECODE=1"
            TIMEOUT 600)
    endforeach()
endif()
