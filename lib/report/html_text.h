// Text for the study report's HTML and SVG: escaping, numbers as a reader wants them, and the names
// (slugs) that identify figures and sections.
#pragma once

#include <string>
#include <string_view>

namespace loupe::report {

// Escapes & < > " ' so TEXT is safe in element content and in quoted attribute values:
// `<b>&"x'` -> `&lt;b&gt;&amp;&quot;x&#39;`.
std::string escape_html(std::string_view text);

// A number with SIGNIFICANT digits and no exponent for everyday magnitudes: 0.52812 -> "0.528",
// 339.67 -> "340" with 3 digits, 1e-5 -> "1e-05"; NaN and infinities -> "–" (an en dash).
std::string format_number(double value, int significant = 3);

// A fixed number of DECIMALS: format_fixed(0.28743, 3) -> "0.287".
std::string format_fixed(double value, int decimals);

// A share as a percentage with one decimal: 0.0549 -> "5.5%".
std::string format_percent(double share);

// Lower-case letters and digits, other runs turned into one '-': "pairwise PERMANOVA: a vs b" ->
// "pairwise-permanova-a-vs-b". Empty input gives "x".
std::string slug(std::string_view text);

}  // namespace loupe::report
