# `renorm solve --checkpoint / --resume` (issue: long runs): a killed run resumed from its
# checkpoint prints the uninterrupted output byte for byte; bad checkpoints and mismatching
# requests are refused with exit code 2 and a one-line message before any work.
if(TARGET renorm_cli)
    set(_cli $<TARGET_FILE:renorm_cli>)
    set(_expect ${CMAKE_CURRENT_SOURCE_DIR}/cmake/expect_exit.cmake)
    set(_dir ${CMAKE_CURRENT_BINARY_DIR})
    add_test(NAME app.solve_kill_resume COMMAND ${CMAKE_COMMAND} -DRENORM=${_cli} -DWORK=${_dir}
             -P ${CMAKE_CURRENT_SOURCE_DIR}/solve/kill_resume.cmake)
    set_tests_properties(app.solve_kill_resume PROPERTIES TIMEOUT 600)

    # A small finished checkpoint for the refusal tests.
    set(_small ${_dir}/solve_small.ckpt)
    add_test(NAME app.solve_checkpoint_small COMMAND ${_cli} solve -d 30 -k 0 --quiet --checkpoint ${_small})
    set_tests_properties(app.solve_checkpoint_small PROPERTIES FIXTURES_SETUP solve_ckpt
        PASS_REGULAR_EXPRESSION "delta = 4\\.66920160910299067185320382047\n")
    add_test(NAME app.solve_resume_mismatch COMMAND ${CMAKE_COMMAND}
             "-DCMD=${_cli};solve;--resume;${_small};--digits;31" -DEXPECT=2 -DONE_LINE=1
             "-DSTDERR_REGEX=checkpoint was written for --digits 30, this run asks for --digits 31"
             -P ${_expect})
    add_test(NAME app.solve_resume_mismatch_order COMMAND ${CMAKE_COMMAND}
             "-DCMD=${_cli};solve;--resume;${_small};-z;3" -DEXPECT=2 -DONE_LINE=1
             "-DSTDERR_REGEX=written for --order 2, this run asks for --order 3" -P ${_expect})
    set_tests_properties(app.solve_resume_mismatch app.solve_resume_mismatch_order PROPERTIES
        FIXTURES_REQUIRED solve_ckpt)
    # The same file resumed with no options: every stage is finished, the output is the run's.
    add_test(NAME app.solve_resume_finished COMMAND ${_cli} solve --resume ${_small} --quiet)
    set_tests_properties(app.solve_resume_finished PROPERTIES FIXTURES_REQUIRED solve_ckpt
        PASS_REGULAR_EXPRESSION "delta = 4\\.66920160910299067185320382047\n")
    # `renorm checkpoint FILE`: every stage of the finished small run, with alpha and delta to
    # 20 digits (the first 17 are OEIS A006891 / A006890's, see reference_values.hpp).
    add_test(NAME app.checkpoint_status COMMAND ${_cli} checkpoint ${_small})
    set_tests_properties(app.checkpoint_status PROPERTIES FIXTURES_REQUIRED solve_ckpt
        PASS_REGULAR_EXPRESSION "z = 2, 30 digits, 0 eigenvalues after delta, taylor basis\n.*stages \\(4 of 4 finished\\):\n  fixed-point@N: finished, N = [0-9]+, [0-9]+ bits, residual [1-9]\\.[0-9]e-[0-9]+, value 2\\.50290787509589282[0-9]*\\.\\.\\.\n.*  delta@1\\.2N: finished, N = [0-9]+, [0-9]+ bits, residual [1-9]\\.[0-9]e-[0-9]+, value 4\\.66920160910299067[0-9]*\\.\\.\\.\n.*ESTIMATES")
    add_test(NAME app.checkpoint_status_json COMMAND ${_cli} checkpoint ${_small} --json)
    set_tests_properties(app.checkpoint_status_json PROPERTIES FIXTURES_REQUIRED solve_ckpt
        PASS_REGULAR_EXPRESSION "\"name\": \"delta@N\",[^}]*\"state\": \"finished\",[^}]*\"value\": \"4\\.669201609102990671")
    add_test(NAME app.checkpoint_status_garbage COMMAND ${CMAKE_COMMAND}
             "-DCMD=${_cli};checkpoint;${CMAKE_CURRENT_SOURCE_DIR}/CMakeLists.txt" -DEXPECT=2 -DONE_LINE=1
             "-DSTDERR_REGEX=not a renorm checkpoint" -P ${_expect})
    # Truncated (the first 300 bytes of a valid file).
    set(_cut ${_dir}/solve_truncated.ckpt)
    add_test(NAME app.solve_resume_truncated COMMAND ${CMAKE_COMMAND}
             "-DPREPARE=sh;-c;head -c 300 '${_small}' > '${_cut}'"
             "-DCMD=${_cli};solve;--resume;${_cut}" -DEXPECT=2 -DONE_LINE=1
             "-DSTDERR_REGEX=renorm: error: checkpoint '.*solve_truncated.ckpt': truncated" -P ${_expect})
    set_tests_properties(app.solve_resume_truncated PROPERTIES FIXTURES_REQUIRED solve_ckpt)
    # Garbage: not a checkpoint at all; a missing file.
    add_test(NAME app.solve_resume_garbage COMMAND ${CMAKE_COMMAND}
             "-DCMD=${_cli};solve;--resume;${CMAKE_CURRENT_SOURCE_DIR}/CMakeLists.txt" -DEXPECT=2 -DONE_LINE=1
             "-DSTDERR_REGEX=not a renorm checkpoint" -P ${_expect})
    add_test(NAME app.solve_resume_missing COMMAND ${CMAKE_COMMAND}
             "-DCMD=${_cli};solve;--resume;${_dir}/no-such-file.ckpt" -DEXPECT=2 -DONE_LINE=1
             "-DSTDERR_REGEX=cannot read checkpoint" -P ${_expect})
    # Refused up front: an unwritable checkpoint path, the Chebyshev basis.
    add_test(NAME app.solve_checkpoint_unwritable COMMAND ${CMAKE_COMMAND}
             "-DCMD=${_cli};solve;-d;10;--checkpoint;/nonexistent-dir/x.ckpt" -DEXPECT=2 -DONE_LINE=1
             -P ${_expect})
    add_test(NAME app.solve_checkpoint_chebyshev COMMAND ${CMAKE_COMMAND}
             "-DCMD=${_cli};solve;-z;8;-d;10;--checkpoint;${_dir}/never.ckpt" -DEXPECT=2 -DONE_LINE=1
             "-DSTDERR_REGEX=Taylor basis only" -P ${_expect})
    # --progress lines: plain lines on stderr even into a file, each with the stage's name.
    add_test(NAME app.solve_progress_lines COMMAND ${CMAKE_COMMAND}
             "-DCMD=${_cli};solve;-d;60;-k;0;--progress;lines" -DEXPECT=0
             "-DSTDERR_REGEX=z=2 fixed-point@N step [0-9]+: N=[0-9]+, [0-9]+ bits, residual 1e-[0-9]+.*\n.*z=2 delta@1.2N step"
             -P ${_expect})
endif()
