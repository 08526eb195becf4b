// A copy of the attribution cautions for reports whose attribution or scan results lack them. The source of
// truth is lib/analysis/attribution_cautions.h (kAttributionCautions); the report cannot include it (loupe_report
// depends on loupe_common only), so a test keeps this copy word for word equal to it.
#pragma once

#include <array>
#include <string_view>

namespace loupe::report {

inline constexpr std::array<std::string_view, 3> kAttributionCautionsCopy{
    "Topic evidence reflects subject matter more than authorial style: texts on the same business look alike "
    "whoever wrote them.",
    "These results are statistical evidence, not proof.",
    "Any consequential conclusion (about a person's authorship, in a dispute or in a publication) needs expert "
    "review under the norms of the field and any legal process that applies.",
};

}  // namespace loupe::report
