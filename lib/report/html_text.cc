#include "report/html_text.h"
#include "common/markup_escape.h"
#include "common/number_text.h"

#include <cmath>
#include <cstdio>

namespace loupe::report {

std::string escape_html(std::string_view text) { return escape_markup(text); }

std::string format_number(double value, int significant) {
  if (!std::isfinite(value)) return "\u2013";
  if (value == 0) return "0";
  char text[48];
  const double magnitude = std::fabs(value);
  if (magnitude >= 1e-4 && magnitude < 1e7) {
    // Decimals enough for SIGNIFICANT digits, then trailing zeros trimmed.
    const int leading = static_cast<int>(std::floor(std::log10(magnitude)));
    const int decimals = std::max(0, significant - 1 - leading);
    std::snprintf(text, sizeof text, "%.*f", decimals, value);
    std::string out = text;
    if (out.find('.') != std::string::npos) {
      while (out.back() == '0') out.pop_back();
      if (out.back() == '.') out.pop_back();
    }
    return out;
  }
  std::snprintf(text, sizeof text, "%.*g", significant, value);
  return text;
}

std::string format_fixed(double value, int decimals) { return fixed_decimals(value, decimals, "\u2013"); }

std::string format_percent(double share) {
  if (!std::isfinite(share)) return "\u2013";
  return format_fixed(100 * share, 1) + "%";
}

std::string slug(std::string_view text) {
  std::string out;
  bool pending_dash = false;
  for (const char c : text) {
    const bool letter = (c >= 'a' && c <= 'z') || (c >= '0' && c <= '9');
    const bool upper = c >= 'A' && c <= 'Z';
    if (letter || upper) {
      if (pending_dash && !out.empty()) out += '-';
      pending_dash = false;
      out += upper ? static_cast<char>(c - 'A' + 'a') : c;
    } else {
      pending_dash = true;
    }
  }
  return out.empty() ? "x" : out;
}

}  // namespace loupe::report
