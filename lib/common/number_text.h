// Numbers as text for messages and terminal tables, one definition for every stage:
// a fixed number of decimals, with a stated placeholder for NaN and infinities.
#pragma once

#include <string>

namespace loupe {

// fixed_decimals(0.28743, 3) == "0.287"; fixed_decimals(NaN, 2) == "n/a"; fixed_decimals(NaN, 2, "-") == "-".
std::string fixed_decimals(double value, int decimals, const std::string& missing = "n/a");

}  // namespace loupe
