#include "common/number_text.h"

#include <cmath>
#include <cstdio>

namespace loupe {

std::string fixed_decimals(double value, int decimals, const std::string& missing) {
  if (!std::isfinite(value)) return missing;
  char text[48];
  std::snprintf(text, sizeof text, "%.*f", decimals, value);
  return text;
}

}  // namespace loupe
