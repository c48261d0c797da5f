# A killed `renorm solve` resumed from its checkpoint prints exactly what an uninterrupted run
# prints. Usage: cmake -DRENORM=<renorm> -DWORK=<dir> -P kill_resume.cmake
# 1. the uninterrupted run; 2. the same run with --checkpoint, killed with SIGKILL as soon as the
# checkpoint holds a finished stage and a running one; 3. --resume from that file (the request is
# taken from it); 4. --resume again from the now finished file. stdout of 3 and 4 must equal 1's
# byte for byte.
set(args solve --digits 400 --eigenvalues 1 --quiet)
set(ckpt "${WORK}/kill_resume.ckpt")
file(REMOVE "${ckpt}")

execute_process(COMMAND "${RENORM}" ${args} RESULT_VARIABLE rc OUTPUT_VARIABLE full ERROR_VARIABLE err)
if(NOT rc EQUAL 0)
    message(FATAL_ERROR "uninterrupted run failed (${rc}):\n${err}")
endif()

# The kill needs a background process, which cmake -P cannot start: a few lines of sh. It polls
# the checkpoint (written atomically, so never half a file) and exits 0 only when it killed the
# run while a stage was running.
set(killer [=[
"$RENORM" solve --digits 400 --eigenvalues 1 --quiet --checkpoint "$CKPT" >/dev/null 2>&1 &
pid=$!
while kill -0 $pid 2>/dev/null; do
    if [ -f "$CKPT" ] && grep -q '^fixed-point fixed-point@N$' "$CKPT" && grep -q '^running ' "$CKPT"; then
        kill -KILL $pid
        wait $pid
        echo "killed while running: $(grep '^running ' "$CKPT")"
        exit 0
    fi
    sleep 0.02
done
wait $pid
echo "the run ended (exit $?) before it could be killed"
exit 1
]=])
execute_process(COMMAND "${CMAKE_COMMAND}" -E env "RENORM=${RENORM}" "CKPT=${ckpt}" sh -c "${killer}"
                RESULT_VARIABLE rc OUTPUT_VARIABLE out ERROR_VARIABLE err)
if(NOT rc EQUAL 0)
    message(FATAL_ERROR "kill step: ${out}${err}")
endif()
message(STATUS "${out}")

foreach(round resumed finished)
    execute_process(COMMAND "${RENORM}" solve --resume "${ckpt}" --quiet
                    RESULT_VARIABLE rc OUTPUT_VARIABLE again ERROR_VARIABLE err)
    if(NOT rc EQUAL 0)
        message(FATAL_ERROR "${round} run failed (${rc}):\n${err}")
    endif()
    if(NOT again STREQUAL full)
        message(FATAL_ERROR "${round} run printed\n${again}\nbut the uninterrupted run printed\n${full}")
    endif()
    message(STATUS "${round} run: identical output")
endforeach()
file(GLOB leftovers "${ckpt}*")
file(REMOVE ${leftovers})
