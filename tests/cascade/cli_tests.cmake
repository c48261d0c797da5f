# Smoke tests of `renorm cascade` (STYLE.md §6): small arguments, output checked by regex;
# bad input must exit with code 2 and a one-line message, a failed level with code 1.
if(TARGET renorm_cli)
    set(_cli $<TARGET_FILE:renorm_cli>)
    set(_expect ${CMAKE_CURRENT_SOURCE_DIR}/cmake/expect_exit.cmake)
    add_test(NAME cascade_cli_table COMMAND ${_cli} cascade --family logistic --levels 9)
    set_tests_properties(cascade_cli_table PROPERTIES
        PASS_REGULAR_EXPRESSION "  9     512  3\\.5699441946[0-9]*.*All levels certified")
    add_test(NAME cascade_cli_json COMMAND ${_cli} cascade --family quadratic --levels 8 --json)
    set_tests_properties(cascade_cli_json PROPERTIES
        PASS_REGULAR_EXPRESSION "\"all_certified\": true")
    add_test(NAME cascade_cli_map COMMAND ${_cli} cascade --map "mu*sin(pi*x)" --interval 0 1
             --mu-range 0.3 1 --levels 8 --quiet)
    set_tests_properties(cascade_cli_map PROPERTIES
        PASS_REGULAR_EXPRESSION "delta ~ 4\\.66.*ESTIMATE|ESTIMATE.*delta ~ 4\\.66")
    add_test(NAME cascade_cli_unknown_family COMMAND ${CMAKE_COMMAND}
             "-DCMD=${_cli};cascade;--family;tent;--levels;5" -DEXPECT=2
             "-DSTDERR_REGEX=unknown family 'tent'" -DONE_LINE=1 -P ${_expect})
    add_test(NAME cascade_cli_syntax_error COMMAND ${CMAKE_COMMAND}
             "-DCMD=${_cli};cascade;--map;1 - mu*x^;--levels;5" -DEXPECT=2
             "-DSTDERR_REGEX=--map: column 10: expected" -DONE_LINE=1 -P ${_expect})
    add_test(NAME cascade_cli_bad_order COMMAND ${CMAKE_COMMAND}
             "-DCMD=${_cli};cascade;--family;power;--order;1;--levels;5" -DEXPECT=2
             "-DSTDERR_REGEX=order must be a number > 1" -DONE_LINE=1 -P ${_expect})
    add_test(NAME cascade_cli_levels_range COMMAND ${CMAKE_COMMAND}
             "-DCMD=${_cli};cascade;--family;quadratic;--levels;99" -DEXPECT=2
             "-DSTDERR_REGEX=--levels must be in" -DONE_LINE=1 -P ${_expect})
    add_test(NAME cascade_cli_too_long COMMAND ${CMAKE_COMMAND}
             "-DCMD=${_cli};cascade;--family;sine;--levels;34" -DEXPECT=2
             "-DSTDERR_REGEX=would take about" -DONE_LINE=1 -P ${_expect})
    add_test(NAME cascade_cli_level_failure COMMAND ${CMAKE_COMMAND}
             "-DCMD=${_cli};cascade;--map;1 - mu*x^2;--critical;0;--interval;-0.5;0.5;--levels;4"
             -DEXPECT=1 "-DSTDERR_REGEX=failed" -P ${_expect})
endif()
