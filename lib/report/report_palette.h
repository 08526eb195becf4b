// The study report's colours: the Okabe–Ito palette (Okabe & Ito, "Color Universal Design", 2002/2008),
// distinguishable under the common colour-vision deficiencies, and a one-hue ramp for heat maps.
#pragma once

#include <array>
#include <cstddef>
#include <string>

namespace loupe::report {

// Okabe–Ito, reordered so the first colours are the strongest on white (yellow and black come last).
inline constexpr std::array<const char*, 8> kOkabeIto{
    "#0072B2",  // blue
    "#E69F00",  // orange
    "#009E73",  // bluish green
    "#CC79A7",  // reddish purple
    "#D55E00",  // vermillion
    "#56B4E9",  // sky blue
    "#F0E442",  // yellow
    "#000000",  // black
};

// Documents without a group and verdicts of "none of the candidates": a neutral grey, not a palette colour.
inline constexpr const char* kNoGroupColour = "#999999";

// Marker shapes that repeat the group's colour for readers (and printers) who cannot tell colours apart.
inline constexpr std::array<const char*, 4> kShapeNames{"circle", "square", "triangle", "diamond"};

inline std::string group_colour(std::size_t index) { return kOkabeIto[index % kOkabeIto.size()]; }

// A heat-map fill for T in [0, 1]: white to the palette's blue (one hue, so order survives any
// colour-vision deficiency and greyscale printing).
std::string ramp_colour(double t);

// Black or white text, whichever reads better on ramp_colour(t).
inline const char* ramp_text_colour(double t) { return t > 0.55 ? "#ffffff" : "#000000"; }

}  // namespace loupe::report
