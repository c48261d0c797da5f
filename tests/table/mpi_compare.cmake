# renorm-mpi on 2 ranks writes the same bytes as renorm on one machine (same arguments, date fixed
# by SOURCE_DATE_EPOCH); with one rank made to fail it exits non-zero and writes no table.
# Usage: cmake -DCLI=renorm -DMPI=renorm-mpi -DMPIEXEC=mpirun -DDIR=scratch -P mpi_compare.cmake
file(REMOVE_RECURSE ${DIR})
file(MAKE_DIRECTORY ${DIR})
set(ENV{SOURCE_DATE_EPOCH} 1767225600)
set(ENV{OMPI_MCA_rmaps_base_oversubscribe} 1)
set(args table --orders 1.5:3:0.5,4 --digits 15 --eigenvalues 2 --format csv)
set(mpirun ${MPIEXEC} --allow-run-as-root --oversubscribe -np 2)
execute_process(COMMAND ${CLI} ${args} --out ${DIR}/one.csv RESULT_VARIABLE rc1 ERROR_VARIABLE e1)
execute_process(COMMAND ${mpirun} ${MPI} ${args} --threads 1 --out ${DIR}/mpi.csv
                RESULT_VARIABLE rc2 OUTPUT_VARIABLE o2 ERROR_VARIABLE e2)
if(NOT rc1 EQUAL 0 OR NOT rc2 EQUAL 0)
    message(FATAL_ERROR "exit codes ${rc1} / ${rc2}\n${e1}\n${o2}\n${e2}")
endif()
file(READ ${DIR}/one.csv one)
file(READ ${DIR}/mpi.csv mpi)
if(NOT one STREQUAL mpi)
    message(FATAL_ERROR "the tables differ\n--- renorm:\n${one}\n--- renorm-mpi:\n${mpi}")
endif()
if(NOT one MATCHES "\n2,estimated,2\\.50290787509589,15,4\\.66920160910299,15,")
    message(FATAL_ERROR "unexpected table:\n${one}")
endif()
# A rank that fails as a whole: no table, exit 1, one line from renorm-mpi naming the rank.
set(ENV{RENORM_TABLE_FAIL_RANK} 1)
execute_process(COMMAND ${mpirun} ${MPI} ${args} --out ${DIR}/failed.csv
                RESULT_VARIABLE rc3 OUTPUT_VARIABLE o3 ERROR_VARIABLE e3)
unset(ENV{RENORM_TABLE_FAIL_RANK})
if(rc3 EQUAL 0 OR EXISTS ${DIR}/failed.csv OR NOT e3 MATCHES "renorm-mpi: failed: rank 1 failed: [^\n]*no table written")
    message(FATAL_ERROR "failing rank: exit ${rc3}, file exists: ${DIR}/failed.csv\n${e3}")
endif()
message(STATUS "identical tables; a failing rank leaves none")
