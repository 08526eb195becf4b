// The cautions every attribution and composite-scan output carries (terminal,
// JSON, report): what topic evidence can and cannot say about who wrote a text.
#pragma once

#include <array>
#include <string_view>

namespace loupe {

// One sentence each, in plain words; print all three, in this order.
inline constexpr std::array<std::string_view, 3> kAttributionCautions{
    "Topic evidence reflects subject matter more than authorial style: texts on the same business look alike "
    "whoever wrote them.",
    "These results are statistical evidence, not proof.",
    "Any consequential conclusion (about a person's authorship, in a dispute or in a publication) needs expert "
    "review under the norms of the field and any legal process that applies.",
};

}  // namespace loupe
