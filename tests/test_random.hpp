#pragma once
// Shared by the random tests (STYLE.md §6): the seed comes from RENORM_TEST_SEED (fixed by default,
// always printed) and the number of repetitions scales with RENORM_TEST_MULTIPLIER.
#include <algorithm>
#include <cstdlib>
#include <iostream>

namespace test_random {

inline unsigned long seed()
{
    const char* s = std::getenv("RENORM_TEST_SEED");
    const unsigned long value = s ? std::strtoul(s, nullptr, 10) : 20261202UL;
    std::cerr << "RENORM_TEST_SEED=" << value << "\n";
    return value;
}

inline int multiplier()
{
    const char* s = std::getenv("RENORM_TEST_MULTIPLIER");
    return s ? std::max(1, std::atoi(s)) : 1;
}

} // namespace test_random
