# renorm-mpi: the `table` command with its rows spread over MPI ranks (RENORM_WITH_MPI, OFF by
# default). Uses the MPI found by CMake's FindMPI (OpenMPI from Debian: libopenmpi-dev).
if(RENORM_WITH_MPI)
    find_package(MPI REQUIRED COMPONENTS CXX)
    add_executable(renorm_mpi renorm/main_mpi.cpp renorm/cmd_table.cpp)
    set_target_properties(renorm_mpi PROPERTIES OUTPUT_NAME renorm-mpi)
    target_link_libraries(renorm_mpi PRIVATE renorm::renorm CLI11::CLI11 MPI::MPI_CXX)
    renorm_set_warnings(renorm_mpi)
endif()
