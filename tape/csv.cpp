// CSV scanning for tapes: records and fields as views, row numbers, blank lines, file-level errors.
// Conventions in tape/csv.h. A line is split at commas comparing a block of bytes at a time (32
// with AVX2, 16 with SSE2, else one); a line with a quote goes through the quote-aware scan.
#include "tape/csv.h"

#include <fmt/core.h>

#include <algorithm>
#include <cstdint>
#include <cstring>
#if defined(__AVX2__)
#include <immintrin.h>
#elif defined(__SSE2__)
#include <emmintrin.h>
#endif

#include "tape/reader.h"

namespace poolbid::detail {
namespace {


// Comparing a block of bytes at once: bit i of the mask is set where byte i equals `ch`.
#if defined(__AVX2__)
constexpr std::size_t kBlockBytes = 32;
using Block = __m256i;
Block load_block(const char* p) { return _mm256_loadu_si256(reinterpret_cast<const __m256i*>(p)); }
std::uint32_t equal_mask(Block block, char ch) {
  return static_cast<std::uint32_t>(
      _mm256_movemask_epi8(_mm256_cmpeq_epi8(block, _mm256_set1_epi8(ch))));
}
#elif defined(__SSE2__)
constexpr std::size_t kBlockBytes = 16;
using Block = __m128i;
Block load_block(const char* p) { return _mm_loadu_si128(reinterpret_cast<const __m128i*>(p)); }
std::uint32_t equal_mask(Block block, char ch) {
  return static_cast<std::uint32_t>(_mm_movemask_epi8(_mm_cmpeq_epi8(block, _mm_set1_epi8(ch))));
}
#else
constexpr std::size_t kBlockBytes = 0;  // byte by byte only
#endif

// The furthest a record starting at `start` may reach: its bytes plus a "\r\n" line ending.
std::size_t record_limit(const CsvScanner& s, std::size_t start) {
  const std::size_t room = s.text.size() - start;
  const std::size_t most = s.max_record_bytes > room ? room : s.max_record_bytes + 2;
  return start + std::min(room, most);
}

const char* find(const CsvScanner& s, char ch, std::size_t from, std::size_t to) {
  if (from >= to) return nullptr;
  return static_cast<const char*>(std::memchr(s.text.data() + from, ch, to - from));
}

[[noreturn]] void throw_too_long(const CsvScanner& s, std::size_t row) {
  throw tape_error(ErrorKind::record_too_long, s.file, row, "", "",
                   fmt::format("row is longer than {} bytes", s.max_record_bytes));
}

[[noreturn]] void throw_unterminated(const CsvScanner& s, std::size_t row) {
  throw tape_error(ErrorKind::unterminated_quote, s.file, row, "", "",
                   "a quoted field opened on this row is never closed");
}

// Reached `limit` inside a quoted field: if no quote follows anywhere, the quote never closes;
// otherwise the record is simply too long.
[[noreturn]] void throw_open_quote_at_limit(const CsvScanner& s, std::size_t row,
                                            std::size_t limit) {
  if (limit >= s.text.size() || !find(s, '"', limit, s.text.size())) throw_unterminated(s, row);
  throw_too_long(s, row);
}

// End (exclusive) of an unquoted run starting at `from`: the next ',' or '\n', or `limit`.
std::size_t field_end(const CsvScanner& s, std::size_t from, std::size_t limit) {
  const char* base = s.text.data();
  std::size_t t = from;
  while (t < limit && base[t] != ',' && base[t] != '\n') ++t;
  return t;
}

// `to` less a CR that ends the line (before '\n' or at the end of the text).
std::size_t drop_line_cr(const CsvScanner& s, std::size_t from, std::size_t to) {
  const bool line_ends = to == s.text.size() || s.text[to] == '\n';
  return (line_ends && to > from && s.text[to - 1] == '\r') ? to - 1 : to;
}

// A record whose every field is empty or spaces (",,,,", "   ", "\"\",\"\""). Only a record that
// starts with ',', ' ' or '"' can be one, so other records cost one comparison of their first byte.
bool only_commas_and_spaces(char first, const CsvRecord& record) {
  if (first != ',' && first != ' ' && first != '"') return false;
  for (std::string_view field : record.fields)
    if (!trim_spaces(field).empty()) return false;
  return true;
}

void finish_record(CsvScanner& s, CsvRecord& out, std::size_t start, std::size_t raw_end) {
  out.row = s.next_row++;
  out.offset = start;
  out.raw = s.text.substr(start, raw_end - start);
}

// Fields of a record scanned with spans, as views.
void fields_from_spans(const CsvScanner& s, CsvRecord& out) {
  for (const CsvFieldSpan& span : s.spans) {
    const char* data = span.in_scratch ? s.scratch.data() : s.text.data();
    out.fields.emplace_back(data + span.begin, span.size);
  }
}

// Splits the line starting at `start` at commas, straight into `out`, until its '\n', its first
// '"' or `limit`. Returns where it stopped; when that is a line end (or the end of the text), the
// line's last field is added too.
std::size_t split_plain_line(const CsvScanner& s, std::size_t start, std::size_t limit,
                             CsvRecord& out) {
  const char* base = s.text.data();
  const char* field = base + start;
  std::size_t p = start;
  bool stopped = false;
#if defined(__AVX2__) || defined(__SSE2__)
  for (; p + kBlockBytes <= limit; p += kBlockBytes) {
    const Block block = load_block(base + p);
    std::uint32_t commas = equal_mask(block, ',');
    const std::uint32_t stops = equal_mask(block, '\n') | equal_mask(block, '"');
    if (stops != 0) commas &= (std::uint32_t{1} << __builtin_ctz(stops)) - 1;
    while (commas != 0) {
      const char* at = base + p + __builtin_ctz(commas);
      out.fields.emplace_back(field, static_cast<std::size_t>(at - field));
      field = at + 1;
      commas &= commas - 1;
    }
    if (stops != 0) {
      p += static_cast<std::size_t>(__builtin_ctz(stops));
      stopped = true;
      break;
    }
  }
#endif
  for (; !stopped && p < limit; ++p) {
    const char ch = base[p];
    if (ch == '\n' || ch == '"') break;
    if (ch != ',') continue;
    out.fields.emplace_back(field, static_cast<std::size_t>(base + p - field));
    field = base + p + 1;
  }
  if (p == s.text.size() || (p < limit && s.text[p] == '\n')) {
    const std::size_t field_begin = static_cast<std::size_t>(field - base);
    out.fields.emplace_back(field, drop_line_cr(s, field_begin, p) - field_begin);
  }
  return p;
}

// A quoted field whose opening quote is at `p`. Returns the position after the field's text
// (at the next ',' or '\n', or the end of the text).
std::size_t scan_quoted_field(CsvScanner& s, std::size_t p, std::size_t limit, std::size_t row) {
  const char* base = s.text.data();
  const std::size_t content_begin = ++p;
  std::size_t segment = p;
  bool unescaped = false;  // the field's text is being built in the scratch
  std::size_t scratch_begin = 0;
  std::size_t content_end = 0;
  for (;;) {
    const char* quote = find(s, '"', p, limit);
    if (!quote) throw_open_quote_at_limit(s, row, limit);
    const std::size_t q = static_cast<std::size_t>(quote - base);
    if (q + 1 < s.text.size() && base[q + 1] == '"') {  // doubled quote: one literal '"'
      if (!unescaped) {
        unescaped = true;
        scratch_begin = s.scratch.size();
      }
      s.scratch.append(base + segment, q + 1 - segment);
      p = segment = q + 2;
      continue;
    }
    content_end = q;
    if (unescaped) s.scratch.append(base + segment, q - segment);
    p = q + 1;
    break;
  }
  // Text between the closing quote and the next comma is kept, appended literally; but when the
  // quoted text ran over a line end, a quote was likely left open and its "closing" quote is
  // the opening quote of a cell on a later line: the loans in between would vanish into it.
  const std::size_t t = field_end(s, p, limit);
  if (t == limit && limit < s.text.size()) throw_too_long(s, row);
  const std::size_t tail_end = drop_line_cr(s, p, t);
  if (tail_end > p) {
    if (std::memchr(base + content_begin, '\n', content_end - content_begin))
      throw tape_error(ErrorKind::unterminated_quote, s.file, row, "", "",
                       "a quoted field opened on this row runs into the next row (missing "
                       "closing quote?)");
    if (!unescaped) {
      unescaped = true;
      scratch_begin = s.scratch.size();
      s.scratch.append(base + content_begin, content_end - content_begin);
    }
    s.scratch.append(base + p, tail_end - p);
  }
  if (unescaped)
    s.spans.push_back({scratch_begin, s.scratch.size() - scratch_begin, true});
  else
    s.spans.push_back({content_begin, content_end - content_begin, false});
  return t;
}

// A record with at least one quote on its first line. Returns the end of the record (the
// position of its '\n', or the end of the text).
std::size_t scan_quoted_record(CsvScanner& s, std::size_t start) {
  const std::size_t row = s.next_row;
  const std::size_t limit = record_limit(s, start);
  const std::size_t end = s.text.size();
  std::size_t p = start;
  for (;;) {
    if (p < end && s.text[p] == '"') {
      p = scan_quoted_field(s, p, limit, row);
    } else {
      const std::size_t t = field_end(s, p, limit);
      if (t == limit && limit < end) throw_too_long(s, row);
      s.spans.push_back({p, drop_line_cr(s, p, t) - p, false});
      p = t;
    }
    if (p >= end || s.text[p] == '\n') return p;
    ++p;  // past the comma
  }
}

}  // namespace

CsvScanner start_csv(std::string_view text, std::string file, std::size_t max_record_bytes) {
  CsvScanner s;
  s.text = text;
  s.file = std::move(file);
  s.max_record_bytes = max_record_bytes;
  if (text.substr(0, kByteOrderMark.size()) == kByteOrderMark) s.pos = kByteOrderMark.size();
  return s;
}

CsvScanner start_csv_at(std::string_view text, std::string file, std::size_t max_record_bytes,
                        std::size_t offset, std::size_t row) {
  CsvScanner s = start_csv(text, std::move(file), max_record_bytes);
  s.pos = offset;
  s.next_row = row;
  return s;
}

bool next_record(CsvScanner& s, CsvRecord& out) {
  const std::size_t end = s.text.size();
  for (;;) {
    if (s.pos >= end) return false;
    const std::size_t start = s.pos;
    const std::size_t limit = record_limit(s, start);
    out.fields.clear();
    std::size_t record_end = split_plain_line(s, start, limit, out);
    std::size_t raw_end = 0;
    if (record_end < end && s.text[record_end] == '"') {
      // A quote on the first line: the quote-aware scan reads the record again from its start
      // (and tells a record that is too long from a quote that never closes).
      out.fields.clear();
      s.spans.clear();
      s.scratch.clear();
      record_end = scan_quoted_record(s, start);
      raw_end = drop_line_cr(s, start, record_end);
      fields_from_spans(s, out);
    } else if (record_end == limit && limit < end) {
      throw_too_long(s, s.next_row);  // no line end within the limit
    } else {
      raw_end = drop_line_cr(s, start, record_end);
      if (raw_end == start) {  // blank line: skipped, but it is a row
        ++s.blank_lines;
        ++s.next_row;
        s.pos = record_end + 1;
        continue;
      }
    }
    if (raw_end - start > s.max_record_bytes) throw_too_long(s, s.next_row);
    if (only_commas_and_spaces(s.text[start], out)) {  // a spreadsheet's leftover row: blank
      ++s.blank_lines;
      ++s.next_row;
      s.pos = record_end + 1;
      continue;
    }
    finish_record(s, out, start, raw_end);
    s.pos = record_end + 1;
    return true;
  }
}

std::size_t count_byte(std::string_view text, char ch) {
  std::size_t count = 0, p = 0;
#if defined(__AVX2__) || defined(__SSE2__)
  for (; p + kBlockBytes <= text.size(); p += kBlockBytes)
    count +=
        static_cast<std::size_t>(__builtin_popcount(equal_mask(load_block(text.data() + p), ch)));
#endif
  for (; p < text.size(); ++p) count += text[p] == ch;
  return count;
}

}  // namespace poolbid::detail
