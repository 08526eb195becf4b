#include "corpus/text_tokenizer.h"

#include <unicode/brkiter.h>
#include <unicode/bytestream.h>
#include <unicode/locid.h>
#include <unicode/normalizer2.h>
#include <unicode/stringpiece.h>
#include <unicode/uchar.h>
#include <unicode/utext.h>

#include <cassert>
#include <cstdint>
#include <limits>
#include <stdexcept>

#include "common/utf8.h"

// Why segmentation happens before folding: UAX #29 boundaries and the
// capitalised flag are properties of the text as written. NFKC_Casefold
// changes what the segmenter would see: it deletes default-ignorable
// characters (soft hyphen, zero-width joiner), turns compatibility forms into
// punctuation or digits ("\u2024" one-dot leader -> ".", "\u00BD" -> "1\u20442"),
// and lower-cases the letters the capitalised flag is read from. Folding the
// whole text first would also need a second copy of it. So each kept segment
// is folded on its own, and only words pay for folding.

namespace loupe {
namespace {

constexpr std::size_t kDefaultMaxPieceBytes = std::size_t{1} << 30;  // ICU break offsets are int32_t

[[noreturn]] void throw_icu_failure(const char* what, UErrorCode status) {
  throw std::runtime_error(std::string("ICU ") + what + " failed: " + u_errorName(status));
}

const icu::Normalizer2& nfkc_casefold() {
  UErrorCode status = U_ZERO_ERROR;
  const icu::Normalizer2* normalizer = icu::Normalizer2::getNFKCCasefoldInstance(status);
  if (U_FAILURE(status) || normalizer == nullptr) throw_icu_failure("NFKC_Casefold data", status);
  return *normalizer;
}

std::unique_ptr<icu::BreakIterator> make_word_iterator() {
  UErrorCode status = U_ZERO_ERROR;
  std::unique_ptr<icu::BreakIterator> words(icu::BreakIterator::createWordInstance(icu::Locale::getRoot(), status));
  if (U_FAILURE(status) || !words) throw_icu_failure("word break iterator", status);
  return words;
}

// Decodes the code point at BYTES[i] (i < end), moving i past it. An
// ill-formed sequence gives U+FFFD and moves one byte (tokenize's input is
// meant to be valid already; this only has to be safe).
UChar32 next_code_point(const char* bytes, int32_t& i, int32_t end) {
  const auto lead = static_cast<unsigned char>(bytes[i++]);
  if (lead < 0x80) return lead;
  int32_t length;
  UChar32 c;
  if (lead >= 0xC2 && lead <= 0xDF) {
    length = 2;
    c = lead & 0x1F;
  } else if (lead >= 0xE0 && lead <= 0xEF) {
    length = 3;
    c = lead & 0x0F;
  } else if (lead >= 0xF0 && lead <= 0xF4) {
    length = 4;
    c = lead & 0x07;
  } else {
    return 0xFFFD;
  }
  if (end - i < length - 1) return 0xFFFD;
  for (int32_t k = 0; k < length - 1; ++k) {
    const auto byte = static_cast<unsigned char>(bytes[i + k]);
    if ((byte & 0xC0) != 0x80) return 0xFFFD;
    c = (c << 6) | (byte & 0x3F);
  }
  i += length - 1;
  return c;
}

std::size_t count_code_points(std::string_view utf8) {
  std::size_t count = 0;
  for (const char c : utf8) count += (static_cast<unsigned char>(c) & 0xC0) != 0x80;
  return count;
}

// Appends the NFKC_Casefold form of TEXT to OUT and returns its length in
// code points. ASCII NFKC_Casefold is ASCII lower case (UCD
// DerivedNormalizationProps.txt maps only A-Z below U+0080), so ASCII words
// are lower-cased in one pass and only other words go through ICU.
// Example: "Harbour" -> "harbour" (7); "Stra\u00DFe" -> "strasse" (7).
std::size_t append_folded(const icu::Normalizer2& normalizer, std::string_view text, std::string& out) {
  const std::size_t at = out.size();
  out.resize(at + text.size());
  char* folded = out.data() + at;
  std::size_t i = 0;
  for (; i < text.size(); ++i) {
    const auto c = static_cast<unsigned char>(text[i]);
    if (c >= 0x80) break;
    folded[i] = static_cast<char>(static_cast<unsigned>(c - 'A') < 26u ? c + ('a' - 'A') : c);
  }
  if (i == text.size()) return text.size();

  out.resize(at);
  icu::StringByteSink<std::string> sink(&out);
  UErrorCode status = U_ZERO_ERROR;
  normalizer.normalizeUTF8(0, icu::StringPiece(text.data(), static_cast<int32_t>(text.size())), sink, nullptr, status);
  if (U_FAILURE(status)) throw_icu_failure("NFKC_Casefold", status);
  return count_code_points(std::string_view(out).substr(at));
}

// True when the first letter (general category L*) of WORD is uppercase or
// titlecase. "Harbour" -> true, "o'Neill" -> false, "1887" -> false.
bool first_letter_is_capital(std::string_view word) {
  const char* bytes = word.data();
  const auto length = static_cast<int32_t>(word.size());
  int32_t i = 0;
  while (i < length) {
    const auto byte = static_cast<unsigned char>(bytes[i]);
    if (byte < 0x80) {
      if (byte >= 'A' && byte <= 'Z') return true;
      if (byte >= 'a' && byte <= 'z') return false;
      ++i;
      continue;
    }
    const UChar32 c = next_code_point(bytes, i, length);
    const std::uint32_t category = U_GET_GC_MASK(c);
    if ((category & U_GC_L_MASK) != 0) return (category & (U_GC_LU_MASK | U_GC_LT_MASK)) != 0;
  }
  return false;
}

// Where the reader is with respect to sentences and paragraphs, carried from
// one segment to the next (and from one piece of a long text to the next).
struct SentenceState {
  bool paragraph_start = true;  // nothing but white space or punctuation since the text or paragraph began
  bool after_terminal = false;  // a sentence terminal, then only white space, quotes and brackets
  int line_ends = 0;            // line ends since the last character that is not white space
};

void note_line_end(SentenceState& state) {
  if (++state.line_ends >= 2) state.paragraph_start = true;
}

void note_other(SentenceState& state) {
  state.after_terminal = false;
  state.line_ends = 0;
}

// Updates STATE for the characters of PIECE[begin, end), a segment that is
// not a word: white space, punctuation, symbols.
void scan_between_words(std::string_view piece, int32_t begin, int32_t end, SentenceState& state) {
  const char* bytes = piece.data();
  int32_t i = begin;
  while (i < end) {
    const auto byte = static_cast<unsigned char>(bytes[i]);
    if (byte < 0x80) {
      ++i;
      switch (byte) {
        case ' ':
        case '\t':
          break;
        case '\r':
          if (static_cast<std::size_t>(i) < piece.size() && bytes[i] == '\n') break;  // CRLF: the LF counts
          note_line_end(state);
          break;
        case '\n':
        case '\v':
        case '\f':
          note_line_end(state);
          break;
        case '.':
        case '!':
        case '?':
          state.after_terminal = true;
          state.line_ends = 0;
          break;
        case '"':
        case '\'':
        case '(':
        case ')':
        case '[':
        case ']':
        case '{':
        case '}':
          state.line_ends = 0;
          break;
        default:
          note_other(state);
          break;
      }
      continue;
    }
    const UChar32 c = next_code_point(bytes, i, end);
    if (c == 0x2029) {  // PARAGRAPH SEPARATOR
      state.paragraph_start = true;
      state.line_ends = 0;
      continue;
    }
    if (c == 0x0085 || c == 0x2028) {  // NEXT LINE, LINE SEPARATOR
      note_line_end(state);
      continue;
    }
    if (u_isUWhiteSpace(c)) continue;
    const std::uint32_t category = U_GET_GC_MASK(c);
    if ((category & U_GC_CF_MASK) != 0) continue;  // format characters (ZWJ, BOM) are neutral
    state.line_ends = 0;
    if (u_hasBinaryProperty(c, UCHAR_S_TERM)) {
      state.after_terminal = true;
    } else if (u_hasBinaryProperty(c, UCHAR_QUOTATION_MARK) ||
               (category & (U_GC_PS_MASK | U_GC_PE_MASK | U_GC_PI_MASK | U_GC_PF_MASK)) != 0) {
      // quotes and brackets keep after_terminal: 'He left." Then' or '(Stop!) Then'
    } else {
      state.after_terminal = false;
    }
  }
}

// Length of the first piece of TEXT to segment: all of it when short enough,
// else cut just after the last ASCII space or LF within LIMIT bytes (never
// between CR and LF), else at the last code point boundary within LIMIT.
std::size_t piece_length(std::string_view text, std::size_t limit) {
  if (text.size() <= limit) return text.size();
  for (std::size_t cut = limit; cut > limit / 2; --cut) {
    const char c = text[cut - 1];
    if (c == ' ' || c == '\n') return cut;
  }
  std::size_t cut = limit;
  while (cut > 1 && (static_cast<unsigned char>(text[cut]) & 0xC0) == 0x80) --cut;
  return cut;
}

// True for an ASCII byte that cannot start a word or number segment (see
// tokenize_piece). ' ' -> true, ',' -> true, 'a' -> false, '7' -> false, '_' -> false, '@' -> false.
bool starts_segment_without_words(char first) {
  const auto c = static_cast<unsigned char>(first);
  if (c >= 0x80) return false;
  const bool letter = static_cast<unsigned>((c | 0x20) - 'a') < 26u;
  const bool digit = static_cast<unsigned>(c - '0') < 10u;
  return !letter && !digit && c != '_' && c != '@';
}

}  // namespace

struct TextTokenizer::Impl {
  TokenizerOptions options;
  const icu::Normalizer2& normalizer = nfkc_casefold();
  std::unique_ptr<icu::BreakIterator> words = make_word_iterator();
  UText text = UTEXT_INITIALIZER;  // reopened over each text, never copied
  std::size_t max_piece_bytes = kDefaultMaxPieceBytes;

  explicit Impl(TokenizerOptions opts) : options(opts) {}
  ~Impl() { utext_close(&text); }
  Impl(const Impl&) = delete;
  Impl& operator=(const Impl&) = delete;

  void tokenize_piece(std::string_view piece, SentenceState& state, std::vector<WordToken>& out);
};

void TextTokenizer::Impl::tokenize_piece(std::string_view piece, SentenceState& state, std::vector<WordToken>& out) {
  UErrorCode status = U_ZERO_ERROR;
  utext_openUTF8(&text, piece.data(), static_cast<int64_t>(piece.size()), &status);
  if (U_FAILURE(status)) throw_icu_failure("UTF-8 text", status);
  words->setText(&text, status);
  if (U_FAILURE(status)) throw_icu_failure("word segmentation", status);

  int32_t start = words->first();
  for (int32_t end = words->next(); end != icu::BreakIterator::DONE; start = end, end = words->next()) {
    // Skip asking ICU for the rule status of segments that start with ASCII
    // other than a letter, digit, '_' or '@': under UAX #29 (rules WB5-WB13b)
    // only ALetter, Hebrew_Letter, Numeric, Katakana, Hiragana, Ideographic
    // and ExtendNumLet characters start a letter/number/kana/ideo segment; in
    // ASCII those are [A-Za-z0-9_], and ICU 72 also gives '@' letter status
    // (so "ann@example.org" stays one word). Spaces and punctuation are half
    // the segments of prose. The debug build checks the claim on every
    // segment, and text_tokenizer_test checks it against ICU for every byte.
    if (starts_segment_without_words(piece[static_cast<std::size_t>(start)])) {
      assert(words->getRuleStatus() < UBRK_WORD_NONE_LIMIT);
      scan_between_words(piece, start, end, state);
      continue;
    }
    const int32_t rule = words->getRuleStatus();
    const bool is_word = rule >= UBRK_WORD_LETTER && rule < UBRK_WORD_IDEO_LIMIT;
    const bool is_number = rule >= UBRK_WORD_NUMBER && rule < UBRK_WORD_NUMBER_LIMIT;
    if (!is_word && !is_number) {
      scan_between_words(piece, start, end, state);
      continue;
    }
    // A word or number ends the sentence start even when it is filtered out:
    // in "In 1887 the ..." the word "the" is not sentence-initial.
    const bool sentence_initial = state.paragraph_start || state.after_terminal;
    state = SentenceState{false, false, 0};
    if (is_number && !options.keep_numbers) continue;

    const std::string_view word = piece.substr(static_cast<std::size_t>(start), static_cast<std::size_t>(end - start));
    // Fold straight into the new token: no scratch copy, and short words stay
    // in the std::string's small buffer (no heap allocation).
    WordToken& token = out.emplace_back();
    if (append_folded(normalizer, word, token.text) < options.min_length) {
      out.pop_back();
      continue;
    }
    token.capitalised = first_letter_is_capital(word);
    token.sentence_initial = sentence_initial;
  }
}

TextTokenizer::TextTokenizer(TokenizerOptions options) : impl_(std::make_unique<Impl>(options)) {}
TextTokenizer::~TextTokenizer() = default;
TextTokenizer::TextTokenizer(TextTokenizer&&) noexcept = default;
TextTokenizer& TextTokenizer::operator=(TextTokenizer&&) noexcept = default;

void TextTokenizer::set_max_piece_bytes(std::size_t bytes) {
  impl_->max_piece_bytes = bytes < 16 ? 16 : (bytes > kDefaultMaxPieceBytes ? kDefaultMaxPieceBytes : bytes);
}

void TextTokenizer::tokenize(std::string_view utf8, std::vector<WordToken>& out) {
  std::string_view rest = strip_utf8_bom(utf8);
  SentenceState state;
  while (!rest.empty()) {
    const std::size_t length = piece_length(rest, impl_->max_piece_bytes);
    impl_->tokenize_piece(rest.substr(0, length), state, out);
    rest.remove_prefix(length);
  }
}

std::string fold_case(std::string_view utf8) {
  std::string out;
  append_folded(nfkc_casefold(), utf8, out);
  return out;
}

std::vector<std::size_t> word_boundaries(std::string_view utf8) {
  if (utf8.size() > static_cast<std::size_t>(std::numeric_limits<int32_t>::max())) {
    throw std::length_error("word_boundaries: text longer than 2 GiB");
  }
  thread_local std::unique_ptr<icu::BreakIterator> words = make_word_iterator();
  UErrorCode status = U_ZERO_ERROR;
  UText text = UTEXT_INITIALIZER;
  utext_openUTF8(&text, utf8.data(), static_cast<int64_t>(utf8.size()), &status);
  words->setText(&text, status);
  if (U_FAILURE(status)) {
    utext_close(&text);
    throw_icu_failure("word segmentation", status);
  }
  std::vector<std::size_t> boundaries;
  for (int32_t at = words->first(); at != icu::BreakIterator::DONE; at = words->next()) {
    boundaries.push_back(static_cast<std::size_t>(at));
  }
  utext_close(&text);
  return boundaries;
}

}  // namespace loupe
