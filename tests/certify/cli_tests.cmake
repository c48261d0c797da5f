# Smoke tests of `renorm certify` and `renorm verify` (STYLE.md §6): small arguments, output
# checked by regex, exit codes checked for bad input (2) and rejected certificates (3).
if(TARGET renorm_cli)
    set(_cli $<TARGET_FILE:renorm_cli>)
    set(_expect ${CMAKE_CURRENT_SOURCE_DIR}/cmake/expect_exit.cmake)
    set(_cert ${CMAKE_CURRENT_BINARY_DIR}/certify_smoke.cert.json)
    add_test(NAME certify_cli_z2 COMMAND ${_cli} certify --order 2 --digits 30 --out ${_cert})
    set_tests_properties(certify_cli_z2 PROPERTIES
        FIXTURES_SETUP certify_cert
        PASS_REGULAR_EXPRESSION "alpha = 2\\.502907875095892822283902873218[0-9]*  \\[certified, radius [0-9.]+e-[0-9]+\\].*delta = 4\\.669201609102990671853203820466[0-9]*  \\[certified.*certificate written")
    add_test(NAME certify_cli_verify COMMAND ${_cli} verify ${_cert})
    set_tests_properties(certify_cli_verify PROPERTIES
        FIXTURES_REQUIRED certify_cert
        PASS_REGULAR_EXPRESSION "ACCEPTED.*alpha = -1/G\\*\\(1\\) lies in \\[2\\.5029078750958928222839")
    # An altered copy (one character of the alpha claim changed) is rejected with exit code 3.
    set(_bad ${CMAKE_CURRENT_BINARY_DIR}/certify_smoke_altered.cert.json)
    add_test(NAME certify_cli_verify_altered COMMAND ${CMAKE_COMMAND}
             "-DPREPARE=${CMAKE_COMMAND};-DIN=${_cert};-DOUT=${_bad};-P;${CMAKE_CURRENT_SOURCE_DIR}/certify/alter.cmake"
             "-DCMD=${_cli};verify;${_bad}" -DEXPECT=3 "-DSTDERR_REGEX=REJECTED: checksum mismatch"
             -P ${_expect})
    set_tests_properties(certify_cli_verify_altered PROPERTIES FIXTURES_REQUIRED certify_cert)
    # Not a certificate: exit code 2.
    add_test(NAME certify_cli_verify_garbage COMMAND ${CMAKE_COMMAND}
             "-DCMD=${_cli};verify;${CMAKE_CURRENT_SOURCE_DIR}/CMakeLists.txt" -DEXPECT=2
             "-DSTDERR_REGEX=REJECTED: not valid JSON" -P ${_expect})
    add_test(NAME certify_cli_bad_order COMMAND ${CMAKE_COMMAND}
             "-DCMD=${_cli};certify;--order;0.5" -DEXPECT=2 "-DSTDERR_REGEX=greater than 1"
             -P ${_expect})
endif()
