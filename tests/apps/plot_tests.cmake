# Smoke tests of `renorm plot` (needs gnuplot): each picture is drawn from a small real run as SVG
# and must contain its axis labels; bad requests exit with 2.
find_program(RENORM_GNUPLOT gnuplot)
if(RENORM_GNUPLOT)
    function(renorm_plot_test what args expect)
        add_test(NAME app.plot_${what}
            COMMAND "${CMAKE_COMMAND}" "-DRENORM=$<TARGET_FILE:renorm_cli>" "-DARGS=${what}|${args}"
                    "-DOUT=${CMAKE_CURRENT_BINARY_DIR}/plot_${what}.svg" "-DEXPECT=${expect}"
                    -P "${CMAKE_CURRENT_SOURCE_DIR}/apps/plot_check.cmake")
        set_tests_properties(app.plot_${what} PROPERTIES TIMEOUT 300)
    endfunction()
    renorm_plot_test(fixed-point "--digits|10" "x \\(dimensionless\\);;g\\(x\\) \\(dimensionless\\);;doubling construction")
    renorm_plot_test(coefficients "--digits|20" "index k of the coefficient;;c_k\\| \\(log scale\\);;digits per term")
    renorm_plot_test(spectrum "--digits|10|--eigenvalues|4" "Re λ;;Im λ;;rank k by modulus")
    renorm_plot_test(cascade "--levels|8" "level n \\(period 2;;distance \\(log scale\\);;quadratic family")
    renorm_plot_test(bifurcation "--levels|4|--family|logistic" "parameter μ;;x \\(orbit after transients\\);;logistic family;;data:image/png")
endif()
foreach(bad "nonsense|--out|x.svg" "fixed-point|--out|x.pdf" "spectrum|--out|x.svg|--eigenvalues|0"
            "cascade|--out|x.svg|--levels|40" "bifurcation|--out|x.svg|--family|none")
    string(REGEX REPLACE "[|.]" "_" name "${bad}")
    string(REPLACE "|" ";" badargs "${bad}")
    add_test(NAME app.plot_rejects_${name} COMMAND "${CMAKE_COMMAND}"
             "-DCMD=$<TARGET_FILE:renorm_cli>;plot;${badargs}" -DEXPECT=2
             "-DSTDERR_REGEX=renorm: error: " -DONE_LINE=1
             -P "${CMAKE_CURRENT_SOURCE_DIR}/cmake/expect_exit.cmake")
endforeach()
