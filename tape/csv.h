// Private to tape/: splits CSV text into records of fields, with tape row numbers.
//
// Conventions (RFC 4180 with two lenient habits of real tapes):
// - Comma delimiter; records end at LF, a CR just before the LF is dropped (CRLF or LF files).
// - A field that starts with '"' is quoted: it may hold commas, newlines and doubled quotes ("").
//   Characters after its closing quote up to the next comma or line end are kept literally
//   ("ab"cd -> abcd), and a '"' inside a field that does not start with one is kept literally.
//   That leniency holds only for a quoted field on one line: one that spans a line end and has
//   text after its closing quote is a quote left open, whose "closing" quote opens a cell on a
//   later line (the rows between would be swallowed), and is an unterminated_quote error.
// - A UTF-8 byte-order mark at the start of the text is skipped.
// - Row numbers count records: the first record is row 1 and each record is the next row; a
//   newline inside a quoted field does not start a new row. A blank line (empty, only "\r", or
//   a record whose fields are all empty or spaces, like the ",,,," a spreadsheet leaves) is
//   skipped and counted, but uses up a row number, so row = line number in a file whose fields
//   hold no newlines (a blank line before the header makes the header row 2).
// Fields are views into the text, or into the scanner's scratch for the few quoted fields that
// need unescaping (doubled quotes, text after the closing quote); they stay valid until the next
// call. No allocation per field once the buffers have grown.
#pragma once

#include <cstddef>
#include <string>
#include <string_view>
#include <vector>

namespace poolbid::detail {

inline constexpr std::string_view kByteOrderMark = "\xEF\xBB\xBF";  // UTF-8

struct CsvRecord {
  std::size_t row = 0;                   // tape row number
  std::size_t offset = 0;                // byte offset of the record's first byte in the text
  std::string_view raw;                  // the record's bytes, without its line ending
  std::vector<std::string_view> fields;  // unquoted, untrimmed
};

// Where a field's bytes live while its record is being scanned (the scratch may grow).
struct CsvFieldSpan {
  std::size_t begin;
  std::size_t size;
  bool in_scratch;
};

struct CsvScanner {
  std::string_view text;
  std::string file;                  // for error messages
  std::size_t max_record_bytes = 0;  // a longer record makes the text unusable
  std::size_t pos = 0;               // next byte to read
  std::size_t next_row = 1;
  std::size_t blank_lines = 0;
  std::string scratch;  // unescaped quoted fields of the current record
  std::vector<CsvFieldSpan> spans;
};

// A scanner at the start of `text` (after its byte-order mark, if any).
CsvScanner start_csv(std::string_view text, std::string file, std::size_t max_record_bytes);

// A scanner that reads the one record starting at byte `offset` of `text`, numbered `row`
// (to fetch a record again once its row number and offset are known).
CsvScanner start_csv_at(std::string_view text, std::string file, std::size_t max_record_bytes,
                        std::size_t offset, std::size_t row);

// Reads the next record into `out`, skipping blank lines; false at the end of the text.
// Throws TapeError: record_too_long (a record over max_record_bytes, found without reading
// further than that), unterminated_quote (a quoted field still open at the end of the text, or
// one that spans a line end with text after its closing quote; the row is the record's).
bool next_record(CsvScanner& scanner, CsvRecord& out);

// Bytes equal to `ch` in `text` (lines in a file, to size arrays before reading it).
std::size_t count_byte(std::string_view text, char ch);

}  // namespace poolbid::detail
