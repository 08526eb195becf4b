// Prints what `loupe ingest` kept and dropped, as a short table for people.
#pragma once

#include <ostream>

#include "corpus/corpus_builder.h"

namespace loupe::cli {

void print_ingest_summary(const IngestReport& report, double seconds, std::ostream& out);

}  // namespace loupe::cli
