# RENORM_BUILD_PYTHON: the Python module (python/). ON by default when renorm is the top-level
# project and pybind11 is installed (Debian: pybind11-dev, python3-dev). Choose the interpreter
# with -DPython_EXECUTABLE=...; scripts/build.sh passes the `python3` found on PATH.
include(GNUInstallDirs)
set(_renorm_python_default OFF)
if(RENORM_TOP_LEVEL AND NOT RENORM_SANITIZE)
    # FindPython first, so that pybind11 uses it rather than its older interpreter lookup.
    find_package(Python 3 COMPONENTS Interpreter Development.Module QUIET)
    find_package(pybind11 2.6 CONFIG QUIET)
    if(Python_FOUND AND pybind11_FOUND)
        set(_renorm_python_default ON)
    endif()
endif()
option(RENORM_BUILD_PYTHON "Build the Python module" ${_renorm_python_default})
if(RENORM_BUILD_PYTHON)
    add_subdirectory(python)
endif()
