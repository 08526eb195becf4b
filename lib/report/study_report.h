// The study report: one self-contained HTML file (inline CSS, inline SVG figures, one small self-check script)
// drawn from the results JSON that `loupe analyze` writes, so a newcomer can read a whole study in a browser.
#pragma once

#include <string>

#include <nlohmann/json.hpp>

namespace loupe {

// The report as HTML text. `results` is one object with "provenance" and any of "corpus", "model", "topics",
// "compare", "attribution", "scan", "graph", "near_duplicates", "conclusions"; a missing key gives a short
// section saying what is absent and how to produce it. Throws loupe::Error when `results` is not an object.
std::string render_study_report(const nlohmann::json& results);

// Renders the report and writes it to `path` through write_file_atomically.
void write_study_report(const nlohmann::json& results, const std::string& path);

}  // namespace loupe
