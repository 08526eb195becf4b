// Loose texts as a corpus: every .txt file of one folder read as a disputed
// document, with words found and folded exactly as ingestion does, and no
// vocabulary filter (matching to a fitted model's vocabulary filters them later).
#pragma once

#include <string>

#include "corpus/corpus.h"
#include "corpus/text_tokenizer.h"

namespace loupe {

// Reads the *.txt files (any case of the extension) directly inside FOLDER, in
// byte order of their names; hidden files and sub-folders are ignored. Each
// becomes a disputed document without a group whose id is "LABEL/STEM"
// (label: the folder's own name), e.g. "new-letters/dsp-09". The vocabulary
// holds every word seen, most frequent first (ties in byte order); a leading
// BOM is skipped. Throws loupe::Error for a missing folder, a folder without
// .txt files, unreadable files, and bytes that are not UTF-8 (naming the file
// and the byte offset).
Corpus read_text_folder(const std::string& folder, const TokenizerOptions& tokenizer = {});

}  // namespace loupe
