// Escaping text for XML and HTML: the five characters with meaning in markup
// become character references, so names and words stay text in GraphML and reports.
#pragma once

#include <string>
#include <string_view>

namespace loupe {

// & < > " ' -> &amp; &lt; &gt; &quot; &#39; (the numeric apostrophe is valid in XML and HTML alike).
inline std::string escape_markup(std::string_view text) {
  std::string out;
  out.reserve(text.size());
  for (const char c : text) {
    switch (c) {
      case '&':
        out += "&amp;";
        break;
      case '<':
        out += "&lt;";
        break;
      case '>':
        out += "&gt;";
        break;
      case '"':
        out += "&quot;";
        break;
      case '\'':
        out += "&#39;";
        break;
      default:
        out += c;
    }
  }
  return out;
}

}  // namespace loupe
