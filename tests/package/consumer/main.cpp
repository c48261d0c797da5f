// Source: none needed - it checks that the installed package builds, links and runs (exit code);
// it asserts no value.
// Uses the installed renorm package: alpha for z = 2 to 20 digits.
#include <renorm/solve/solve.hpp>
#include <renorm/version.hpp>

#include <iostream>

int main()
{
    renorm::solve::Request request;
    request.order = "2";
    request.digits = 20;
    request.eigenvalues = 0;
    const renorm::solve::Result r = renorm::solve::solve_constants(request);
    if (!r.converged) {
        std::cerr << "consumer: no result: " << r.message << "\n";
        return 1;
    }
    std::cout << "renorm " << renorm::version << "\nalpha = " << r.alpha.text << "\n";
    return 0;
}
