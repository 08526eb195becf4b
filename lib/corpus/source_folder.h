// Folder sources: one sub-folder per group holding that group's *.txt files,
// plus an optional sub-folder of disputed documents. Example: letters/alice/
// a1.txt -> id "alice/a1", group "alice"; letters/disputed/x.txt -> disputed.
#pragma once

#include <string>

#include "corpus/source_listing.h"

namespace loupe {

// Lists the folder SOURCE (see list_sources). Hidden entries (names starting
// with '.') and files that do not end in .txt (any case) are ignored and
// counted in ignored_files; sub-folders inside a group folder are ignored and
// named in notes. Throws loupe::Error when there is no group sub-folder, when
// group folders hold no .txt file (all such folders named), when two files
// give the same id, or when a name is not valid UTF-8.
SourceListing list_folder(const std::string& source, const SourceOptions& options);

}  // namespace loupe
