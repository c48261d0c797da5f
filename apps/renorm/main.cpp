#include <CLI/CLI.hpp>
#include <renorm/version.hpp>
#include <iostream>
int main(int argc, char** argv)
{
    CLI::App app{"renorm"};
    CLI11_PARSE(app, argc, argv);
    std::cout << renorm::version << "\n";
}
