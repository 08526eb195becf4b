// The study report in a real browser: headless Chromium opens the report written from the demo's results,
// its self-check script lists every figure with its rendered size and any script or console error, and the
// test reads those from the dumped DOM. Also writes a screenshot (build dir: tests/report-browser/).
// Run alone with `ctest -R Browser`. Needs /usr/bin/chromium (Debian package chromium, scripts/install-deps.sh).
#include <gmock/gmock.h>
#include <gtest/gtest.h>

#include <sys/wait.h>
#include <algorithm>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <iostream>
#include <optional>
#include <regex>
#include <string>

#include "cli/run_command.h"
#include "report/report_test_support.h"
#include "report/study_report.h"
#include "support/temp_folder.h"

namespace loupe {
namespace {

using nlohmann::json;
using ::testing::HasSubstr;
using ::testing::Not;
using testing::quote;

const std::string kChromium = "/usr/bin/chromium";
const std::string kOutputFolder = std::string(LOUPE_BINARY_DIR) + "/tests/report-browser";

struct BrowserRun {
  int exit_code = -1;
  std::string output;  // stdout
  std::string log;     // stderr
};

// Runs headless Chromium with a fresh profile on FILE with the EXTRA flags, at most two minutes.
BrowserRun run_chromium(const std::string& extra, const std::string& file) {
  testing::TempFolder profile("chromium-profile");
  const std::string log = profile.file("stderr.txt");
  const std::string command = "timeout 120 " + quote(kChromium) +
                              " --headless --no-sandbox --disable-gpu --disable-background-networking "
                              "--disable-component-update --disable-sync --no-first-run --user-data-dir=" +
                              quote(profile.file("profile")) + " " + extra + " " + quote("file://" + file) + " 2>" +
                              quote(log);
  BrowserRun run;
  FILE* pipe = ::popen(command.c_str(), "r");
  if (!pipe) return run;
  char buffer[8192];
  std::size_t n;
  while ((n = std::fread(buffer, 1, sizeof buffer, pipe)) > 0) run.output.append(buffer, n);
  const int status = ::pclose(pipe);
  run.exit_code = WIFEXITED(status) ? WEXITSTATUS(status) : -1;
  std::ifstream in(log);
  run.log.assign(std::istreambuf_iterator<char>(in), std::istreambuf_iterator<char>());
  if (run.log.size() > 4000) run.log = "..." + run.log.substr(run.log.size() - 4000);
  return run;
}

// The value of ATTRIBUTE on the dumped DOM's <body>, unescaped; nullopt when the body lacks it.
std::optional<std::string> body_attribute(const std::string& dom, const std::string& attribute) {
  const auto begin = dom.find("<body");
  if (begin == std::string::npos) return std::nullopt;
  const std::string tag = dom.substr(begin, dom.find('>', begin) - begin);
  std::smatch m;
  if (!std::regex_search(tag, m, std::regex(" " + attribute + "=\"([^\"]*)\""))) return std::nullopt;
  return testing::unescape_html(m[1]);
}

std::uint32_t big_endian(const std::string& bytes, std::size_t at) {
  std::uint32_t value = 0;
  for (std::size_t i = 0; i < 4; ++i) value = value << 8 | static_cast<unsigned char>(bytes[at + i]);
  return value;
}

class ReportBrowserTest : public ::testing::Test {
 protected:
  void SetUp() override {
    ASSERT_TRUE(std::filesystem::exists(kChromium))
        << kChromium << " is missing: the browser test needs headless Chromium. Run ./scripts/install-deps.sh "
        << "(it installs the Debian package chromium listed in scripts/debian-packages.txt).";
    std::filesystem::create_directories(kOutputFolder);
  }
};

TEST_F(ReportBrowserTest, DemoReportRendersEveryFigureWithoutErrors) {
  const json results = testing::demo_results_with_null_distributions();
  const std::string html_path = kOutputFolder + "/demo-report.html";
  write_study_report(results, html_path);
  std::ifstream in(html_path);
  const std::string html((std::istreambuf_iterator<char>(in)), std::istreambuf_iterator<char>());
  const auto expected = testing::figure_names(html);

  const BrowserRun dump = run_chromium("--dump-dom", html_path);
  ASSERT_EQ(dump.exit_code, 0) << dump.log;
  const auto errors = body_attribute(dump.output, "data-errors");
  ASSERT_TRUE(errors) << "no data-errors on <body>; the DOM begins: " << dump.output.substr(0, 600) << "\n" << dump.log;
  EXPECT_EQ(json::parse(*errors), json::array()) << *errors;
  const auto figures_text = body_attribute(dump.output, "data-figures-ok");
  ASSERT_TRUE(figures_text) << "the self-check script did not run (no data-figures-ok on <body>)\n" << dump.log;
  const json figures = json::parse(*figures_text);

  std::vector<std::string> rendered;
  for (const auto& f : figures) {
    rendered.push_back(f["figure"]);
    EXPECT_TRUE(f["ok"].get<bool>()) << f.dump();
    EXPECT_GT(f["width"].get<double>(), 100) << f.dump();
    EXPECT_GT(f["height"].get<double>(), 50) << f.dump();
    EXPECT_GT(f["content_width"].get<double>(), 0) << f.dump();
    EXPECT_GT(f["content_height"].get<double>(), 0) << f.dump();
  }
  EXPECT_EQ(rendered, expected);
  std::size_t histograms = 0;
  for (const auto& name : rendered) histograms += name.rfind("null-", 0) == 0;
  // PERMANOVA, PERMDISP, ANOSIM and the graph's two group tests carry null distributions in this study.
  EXPECT_EQ(histograms, 5u);
  for (const char* name : {"topics", "profiles", "attribution", "scan", "graph"}) {
    EXPECT_NE(std::find(rendered.begin(), rendered.end(), name), rendered.end()) << name;
  }

  const std::string screenshot = kOutputFolder + "/demo-report.png";
  std::filesystem::remove(screenshot);
  const BrowserRun shot =
      run_chromium("--hide-scrollbars --screenshot=" + quote(screenshot) + " --window-size=1280,4000", html_path);
  ASSERT_EQ(shot.exit_code, 0) << shot.log;
  std::ifstream png_file(screenshot, std::ios::binary);
  const std::string png((std::istreambuf_iterator<char>(png_file)), std::istreambuf_iterator<char>());
  ASSERT_GT(png.size(), 24u) << "no screenshot at " << screenshot << "\n" << shot.log;
  // PNG signature, then the IHDR chunk's width and height (PNG specification, ISO/IEC 15948, section 11.2.2).
  EXPECT_EQ(png.substr(0, 8), std::string("\x89PNG\r\n\x1a\n", 8));
  EXPECT_EQ(png.substr(12, 4), "IHDR");
  EXPECT_EQ(big_endian(png, 16), 1280u);
  EXPECT_EQ(big_endian(png, 20), 4000u);
  std::cout << "report: " << html_path << "\nscreenshot: " << screenshot << "\n";
  RecordProperty("screenshot", screenshot);
}

TEST_F(ReportBrowserTest, MarkupInNamesStaysTextInTheBrowser) {
  // Escaped badly, the <img> would be an element: its load is refused by the report's content security policy
  // and its onerror handler writes to the console; both land in data-errors.
  const std::string markup = "<img src=x onerror=\"console.error('escaped badly')\"><b>&\"x'";
  json results = {{"provenance", testing::minimal_provenance()}};
  results["provenance"]["command"] = markup;
  results["conclusions"] = json::array({{{"text", markup}, {"agreement", markup}}});
  results["corpus"] = {{"source", markup}, {"groups", json::array({{{"group", markup}, {"documents", 2}}})}};
  testing::TempFolder folder("report-browser");
  const std::string html_path = folder.file("markup.html");
  write_study_report(results, html_path);

  const BrowserRun dump = run_chromium("--dump-dom", html_path);
  ASSERT_EQ(dump.exit_code, 0) << dump.log;
  const auto errors = body_attribute(dump.output, "data-errors");
  ASSERT_TRUE(errors) << dump.log;
  EXPECT_EQ(json::parse(*errors), json::array()) << *errors;
  EXPECT_TRUE(body_attribute(dump.output, "data-figures-ok"));
  EXPECT_THAT(dump.output, Not(HasSubstr("<img")));
  EXPECT_THAT(dump.output, Not(HasSubstr("<b>")));
  EXPECT_THAT(dump.output, HasSubstr("&lt;img src=x"));
}

}  // namespace
}  // namespace loupe
