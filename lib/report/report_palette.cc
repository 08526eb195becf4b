#include "report/report_palette.h"

#include <algorithm>
#include <cmath>
#include <cstdio>

namespace loupe::report {

std::string ramp_colour(double t) {
  if (!std::isfinite(t)) t = 0;
  t = std::clamp(t, 0.0, 1.0);
  // From white (255, 255, 255) to Okabe–Ito blue #0072B2 (0, 114, 178).
  const auto channel = [t](double end) { return static_cast<int>(std::lround(255 + (end - 255) * t)); };
  char text[8];
  std::snprintf(text, sizeof text, "#%02X%02X%02X", channel(0), channel(114), channel(178));
  return text;
}

}  // namespace loupe::report
