# A one-order table finished from a `renorm solve` checkpoint is the table computed in one go,
# byte for byte (fixed date), and every stage is reused, not run again; the --timing column then
# counts all sittings. Values: alpha and delta for z = 2 to 60 digits, OEIS A006891 / A006890.
# Usage: cmake -DCLI=renorm -DDIR=scratch-dir -P resume_from_solve.cmake
set(ENV{SOURCE_DATE_EPOCH} 1700000000)
set(ck ${DIR}/resume_from_solve.ckpt)
file(REMOVE ${ck} ${DIR}/resume_direct.csv ${DIR}/resume_resumed.csv ${DIR}/resume_timed.csv)
execute_process(COMMAND ${CLI} solve --order 2 --digits 60 --eigenvalues 0 --checkpoint ${ck} --quiet
                RESULT_VARIABLE rc OUTPUT_VARIABLE out ERROR_VARIABLE err)
if(NOT rc EQUAL 0)
    message(FATAL_ERROR "solve: exit ${rc}\n${out}\n${err}")
endif()
execute_process(COMMAND ${CLI} table --orders 2 --digits 60 --out ${DIR}/resume_direct.csv
                RESULT_VARIABLE rc ERROR_VARIABLE err)
if(NOT rc EQUAL 0)
    message(FATAL_ERROR "table: exit ${rc}\n${err}")
endif()
file(SIZE ${ck} size_before)
execute_process(COMMAND ${CLI} table --orders 2 --digits 60 --resume ${ck} --out ${DIR}/resume_resumed.csv
                RESULT_VARIABLE rc ERROR_VARIABLE err)
if(NOT rc EQUAL 0)
    message(FATAL_ERROR "table --resume: exit ${rc}\n${err}")
endif()
file(READ ${DIR}/resume_direct.csv direct)
file(READ ${DIR}/resume_resumed.csv resumed)
if(NOT direct STREQUAL resumed)
    message(FATAL_ERROR "the resumed table differs:\n${direct}\n---\n${resumed}")
endif()
if(NOT resumed MATCHES "\n2,estimated,2\\.50290787509589282228390287321821578638127137672714997733619,60,4\\.66920160910299067185320382046620161725818557747576863274565,60,")
    message(FATAL_ERROR "unexpected values:\n${resumed}")
endif()
# --timing: the seconds of the solve sitting are in the checkpoint and count.
execute_process(COMMAND ${CLI} table --orders 2 --digits 60 --timing --resume ${ck} --out ${DIR}/resume_timed.csv
                RESULT_VARIABLE rc ERROR_VARIABLE err)
file(READ ${DIR}/resume_timed.csv timed)
if(NOT rc EQUAL 0 OR NOT timed MATCHES ",taylor,[0-9.]+,")
    message(FATAL_ERROR "table --timing --resume: exit ${rc}\n${timed}\n${err}")
endif()
# Another request than the checkpoint's is refused, naming the difference.
execute_process(COMMAND ${CLI} table --orders 2 --digits 61 --resume ${ck}
                RESULT_VARIABLE rc ERROR_VARIABLE err)
if(NOT rc EQUAL 2 OR NOT err MATCHES "digits")
    message(FATAL_ERROR "a mismatching --resume: exit ${rc} (expected 2)\n${err}")
endif()
