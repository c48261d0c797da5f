# Tests of `renorm table` (included from tests/CMakeLists.txt after renorm_add_test(table ...)).
# The shipped-data test reads data/ of the source tree.
target_compile_definitions(renorm_tests_table PRIVATE RENORM_DATA_DIR="${PROJECT_SOURCE_DIR}/data")

# Every row of every shipped table recomputed at 30 digits (a few minutes on 2 cores): registered
# only on request, since CI runs every registered test.
option(RENORM_TABLE_RECHECK_ALL "Register table.shipped_data_all_rows (slow)" OFF)
if(RENORM_TABLE_RECHECK_ALL)
    add_test(NAME table.shipped_data_all_rows
             COMMAND renorm_tests_table --gtest_filter=ShippedData.RecomputationAgrees)
    set_tests_properties(table.shipped_data_all_rows PROPERTIES
        ENVIRONMENT "RENORM_TABLE_RECHECK_ALL=1" LABELS slow TIMEOUT 1800)
endif()

if(TARGET renorm_cli)
    set(_cli $<TARGET_FILE:renorm_cli>)
    set(_expect ${CMAKE_CURRENT_SOURCE_DIR}/cmake/expect_exit.cmake)
    set(_tmp ${CMAKE_CURRENT_BINARY_DIR}/table_cli)
    file(MAKE_DIRECTORY ${_tmp})

    # Smoke tests: small tables, output checked by regex.
    add_test(NAME table.cli_csv COMMAND ${_cli} table --orders 2,4 --digits 12 --eigenvalues 1)
    set_tests_properties(table.cli_csv PROPERTIES PASS_REGULAR_EXPRESSION
        "# command: renorm table --orders 2,4 --digits 12 --eigenvalues 1 --format csv\n.*\n2,estimated,2\\.50290787510,12,4\\.66920160910,12,0\\.159628440383,12,coordinate change alpha\\^\\(-z\\*1\\),,[0-9]+,[0-9]+,[0-9]+,taylor,\n4,estimated,1\\.69030297141,12,7\\.28468621707,12,")
    add_test(NAME table.cli_markdown COMMAND ${_cli} table --orders 1.5:2.5:0.5 --digits 8 --format markdown)
    set_tests_properties(table.cli_markdown PROPERTIES PASS_REGULAR_EXPRESSION
        "\n\\| z \\| alpha \\| digits \\| delta \\| digits \\| status \\| radius \\| N \\| bits \\| basis \\| note \\|\n\\| ---: \\|[- :|]+\n\\| 1\\.5 \\|[^\n]+\n\\| 2 \\| 2\\.5029079 \\| 8 \\| 4\\.6692016 \\| 8 \\| estimated \\|[^\n]+\n\\| 2\\.5 \\|")
    add_test(NAME table.cli_latex COMMAND ${_cli} table --orders 2 --digits 8 --format latex)
    set_tests_properties(table.cli_latex PROPERTIES PASS_REGULAR_EXPRESSION
        "% command: renorm table --orders 2 --digits 8 --format latex\n.*\\\\begin\\{tabular\\}\\{rlrlrllrrll\\}\n\\\\hline\n\\$z\\$ & \\$\\\\alpha\\$ & digits.*\n2 & 2\\.5029079 & 8 & 4\\.6692016 & 8 & estimated & - & [0-9]+/[0-9]+ & [0-9]+ & taylor & - \\\\\\\\\n\\\\hline\n\\\\end\\{tabular\\}")
    add_test(NAME table.cli_json COMMAND ${_cli} table --orders 2 --digits 8 --format json)
    set_tests_properties(table.cli_json PROPERTIES PASS_REGULAR_EXPRESSION
        "\"format\": \"renorm-table\".*\"alpha\": \\{[^}]*\"value\": \"2\\.5029079\"")

    # Writing a file, refusing to replace it without --force (exit 2, file unchanged), converting.
    add_test(NAME table.cli_out_force COMMAND ${CMAKE_COMMAND} -DCLI=${_cli} -DDIR=${_tmp}
             -P ${CMAKE_CURRENT_SOURCE_DIR}/table/out_force.cmake)

    # A one-order table continued from a `renorm solve` checkpoint.
    add_test(NAME table.cli_resume_from_solve COMMAND ${CMAKE_COMMAND} -DCLI=${_cli} -DDIR=${_tmp}
             -P ${CMAKE_CURRENT_SOURCE_DIR}/table/resume_from_solve.cmake)

    # --progress lines: one line per Newton step of the row, also when stderr is not a terminal.
    add_test(NAME table.cli_progress_lines COMMAND ${CMAKE_COMMAND}
             "-DCMD=${_cli};table;--orders;2;--digits;40;--progress;lines" -DEXPECT=0
             "-DSTDERR_REGEX=z=2 fixed-point@N step [0-9]+: N=[0-9]+, [0-9]+ bits, residual 1e-[0-9]+.*z=2 delta@1\\.2N step"
             -P ${_expect})

    # Bad input: exit 2 and a one-line message naming the problem and the accepted range.
    function(table_rejects name regex)
        set(args "table;${ARGN}")
        add_test(NAME table.cli_rejects_${name} COMMAND ${CMAKE_COMMAND}
                 "-DCMD=${_cli};${args}" -DEXPECT=2 "-DSTDERR_REGEX=${regex}" -DONE_LINE=1
                 -P ${_expect})
    endfunction()
    table_rejects(order_one "order 1 is not above 1.*accepted" --orders 2,1,4)
    table_rejects(order_above "order 65 is above 64.*accepted" --orders 65)
    table_rejects(empty_item "empty item in the list of orders.*accepted" --orders ,)
    table_rejects(reversed "range '4:2:1' is reversed.*accepted" --orders 4:2:1)
    table_rejects(step_zero "range '2:4:0' has a step of zero.*accepted" --orders 2:4:0)
    table_rejects(duplicate "order 2 appears twice" --orders 2,2.0)
    table_rejects(format "unknown table format 'xlsx' \\(accepted: csv, json, markdown, latex\\)"
                  --orders 2 --format xlsx)
    table_rejects(digits "--digits must be at least 1" --orders 2 --digits 0)
    table_rejects(checkpoint_orders "--checkpoint and --resume need a table of one order, got 2"
                  --orders 2,4 --checkpoint t.ckpt)
    table_rejects(json_needs_out "--json prints a summary and needs --out" --orders 2 --json)
    table_rejects(no_orders "--orders is required" --digits 5)
endif()

# The MPI variant: the same table byte for byte, and a failing rank leaves no table behind.
if(TARGET renorm_mpi)
    find_program(RENORM_MPIEXEC NAMES mpirun mpiexec REQUIRED)
    add_test(NAME table.mpi_identical COMMAND ${CMAKE_COMMAND} -DCLI=$<TARGET_FILE:renorm_cli>
             -DMPI=$<TARGET_FILE:renorm_mpi> -DMPIEXEC=${RENORM_MPIEXEC}
             -DDIR=${CMAKE_CURRENT_BINARY_DIR}/table_mpi
             -P ${CMAKE_CURRENT_SOURCE_DIR}/table/mpi_compare.cmake)
    set_tests_properties(table.mpi_identical PROPERTIES TIMEOUT 300)
endif()
