// Tests for the CSV scanner (tape/csv.h): quoting, line endings, byte-order mark, row numbers,
// blank lines (and rows of only commas or spaces), and the two file-level errors it raises.
#include "tape/csv.h"

#include <gtest/gtest.h>

#include <string>
#include <vector>

#include "tape/tape.h"

namespace {

using poolbid::ErrorKind;
using poolbid::TapeError;
using namespace poolbid::detail;

struct Scanned {
  std::vector<std::size_t> rows;
  std::vector<std::vector<std::string>> fields;
  std::vector<std::string> raw;
  std::size_t blank_lines = 0;
};

Scanned scan(std::string_view text, std::size_t max_record_bytes = 1 << 20) {
  CsvScanner scanner = start_csv(text, "t.csv", max_record_bytes);
  CsvRecord record;
  Scanned out;
  while (next_record(scanner, record)) {
    out.rows.push_back(record.row);
    out.fields.emplace_back(record.fields.begin(), record.fields.end());
    out.raw.emplace_back(record.raw);
  }
  out.blank_lines = scanner.blank_lines;
  return out;
}

using Fields = std::vector<std::string>;

TEST(Csv, SplitsPlainLinesAtCommas) {
  const Scanned s = scan("a,b,c\n1,,3\n");
  ASSERT_EQ(s.fields.size(), 2u);
  EXPECT_EQ(s.fields[0], (Fields{"a", "b", "c"}));
  EXPECT_EQ(s.fields[1], (Fields{"1", "", "3"}));
  EXPECT_EQ(s.rows, (std::vector<std::size_t>{1, 2}));
}

TEST(Csv, LongPlainLineSplitsTheSameInEveryBlock) {
  // 40 fields of varied width: commas fall in every position of the 16-byte blocks.
  std::string line;
  Fields expected;
  for (int i = 0; i < 40; ++i) {
    expected.push_back(std::string(static_cast<std::size_t>(i % 7), 'x') + std::to_string(i));
    line += (i ? "," : "") + expected.back();
  }
  const Scanned s = scan(line + "\n");
  ASSERT_EQ(s.fields.size(), 1u);
  EXPECT_EQ(s.fields[0], expected);
}

TEST(Csv, TrailingCommaGivesAnEmptyLastField) {
  const Scanned s = scan("a,b,\n");
  EXPECT_EQ(s.fields[0], (Fields{"a", "b", ""}));
}

TEST(Csv, LastLineWithoutNewline) {
  const Scanned s = scan("a,b\n1,2");
  ASSERT_EQ(s.fields.size(), 2u);
  EXPECT_EQ(s.fields[1], (Fields{"1", "2"}));
}

TEST(Csv, QuotedFieldHoldsComma) {
  // source: RFC 4180 section 2, rule 6 (fields containing commas are enclosed in quotes)
  const Scanned s = scan("id,amount\n7,\"250,000.00\"\n");
  EXPECT_EQ(s.fields[1], (Fields{"7", "250,000.00"}));
}

TEST(Csv, DoubledQuoteIsOneQuote) {
  // source: RFC 4180 section 2, rule 7 (a quote inside a quoted field is written twice)
  const Scanned s = scan("a,b\n\"say \"\"hi\"\"\",x\n");
  EXPECT_EQ(s.fields[1], (Fields{"say \"hi\"", "x"}));
}

TEST(Csv, FieldOfOnlyAQuote) {
  const Scanned s = scan("\"\"\"\",\"\"\n");
  EXPECT_EQ(s.fields[0], (Fields{"\"", ""}));
}

TEST(Csv, QuotedNewlineStaysInTheFieldAndDoesNotStartARow) {
  // source: RFC 4180 section 2, rule 6 (fields containing line breaks are enclosed in quotes)
  const Scanned s = scan("a,b\n\"line one\nline two\",x\nnext,y\n");
  ASSERT_EQ(s.fields.size(), 3u);
  EXPECT_EQ(s.fields[1], (Fields{"line one\nline two", "x"}));
  EXPECT_EQ(s.rows, (std::vector<std::size_t>{1, 2, 3}));
  EXPECT_EQ(s.raw[1], "\"line one\nline two\",x");
}

TEST(Csv, CrlfLineEndings) {
  // source: RFC 4180 section 2, rule 1 (records end in CRLF)
  const Scanned s = scan("a,b\r\n1,2\r\n\"q\",\"r\"\r\n");
  ASSERT_EQ(s.fields.size(), 3u);
  EXPECT_EQ(s.fields[1], (Fields{"1", "2"}));
  EXPECT_EQ(s.fields[2], (Fields{"q", "r"}));
  EXPECT_EQ(s.raw[1], "1,2");
}

TEST(Csv, CrInsideAQuotedFieldIsKept) {
  const Scanned s = scan("\"a\r\nb\",c\r\n");
  EXPECT_EQ(s.fields[0], (Fields{"a\r\nb", "c"}));
}

TEST(Csv, ByteOrderMarkIsSkipped) {
  // source: RFC 3629 section 6 (U+FEFF at the start of UTF-8 text is the bytes EF BB BF)
  const Scanned s = scan("\xEF\xBB\xBFloan_id,x\n1,2\n");
  EXPECT_EQ(s.fields[0], (Fields{"loan_id", "x"}));
  EXPECT_EQ(s.rows[0], 1u);
}

TEST(Csv, QuoteInsideUnquotedFieldIsKeptLiterally) {
  const Scanned s = scan("a,5\" pipe,c\n");
  EXPECT_EQ(s.fields[0], (Fields{"a", "5\" pipe", "c"}));
}

TEST(Csv, TextAfterClosingQuoteIsAppended) {
  const Scanned s = scan("\"ab\"cd,\"x\"\"y\"z\n");
  EXPECT_EQ(s.fields[0], (Fields{"abcd", "x\"yz"}));
}

// A quoted field over several lines with text after its closing quote is a quote left open:
// its "closing" quote opens a cell rows later, and the loans between would vanish into it.
TEST(Csv, MultiLineQuotedFieldWithTextAfterItsCloseIsAnOpenQuote) {
  try {
    scan("id,notes\nA5,\"Smith, John\nA6,\"Doe Jane\"\nA7,ok\n");
    FAIL() << "expected unterminated_quote";
  } catch (const TapeError& e) {
    EXPECT_EQ(e.kind, ErrorKind::unterminated_quote);
    EXPECT_EQ(e.row, 2u);
    EXPECT_NE(std::string(e.what()).find("runs into the next row (missing closing quote?)"),
              std::string::npos)
        << e.what();
  }
  // The same after a CRLF: the CR before the line end is no text after the quote.
  const Scanned crlf = scan("id,notes\r\nA5,\"two\r\nlines\"\r\nA6,x\r\n");
  ASSERT_EQ(crlf.fields.size(), 3u);
  EXPECT_EQ(crlf.fields[1], (Fields{"A5", "two\r\nlines"}));
  // On one line the text after the closing quote is still appended.
  const Scanned one_line = scan("id,notes\nA5,\"Smith\" Jr\nA6,x\n");
  EXPECT_EQ(one_line.fields[1], (Fields{"A5", "Smith Jr"}));
}

TEST(Csv, SpacesAroundFieldsAreKept) {
  // source: RFC 4180 section 2, rule 4 (spaces are part of a field)
  const Scanned s = scan(" a , b \n");
  EXPECT_EQ(s.fields[0], (Fields{" a ", " b "}));
}

TEST(Csv, BlankLinesAreSkippedCountedAndNumbered) {
  const Scanned s = scan("h1,h2\n\n1,2\r\n\r\n\n3,4\n\n");
  ASSERT_EQ(s.fields.size(), 3u);
  EXPECT_EQ(s.rows, (std::vector<std::size_t>{1, 3, 6}));
  EXPECT_EQ(s.blank_lines, 4u);
}

TEST(Csv, RecordsOfOnlyCommasAndSpacesAreBlank) {
  // A spreadsheet's leftover rows: skipped and counted like blank lines, keeping row numbers.
  const Scanned s = scan(",,,\nh1,h2\n,\n  \n1,2\n , ,\"\" \r\n\" \",\n3,4\n,,,,,,,,\n");
  EXPECT_EQ(s.rows, (std::vector<std::size_t>{2, 5, 8}));
  EXPECT_EQ(s.blank_lines, 6u);
  // A record with any other text in it is a record.
  EXPECT_EQ(scan(",x,\n").fields[0], (Fields{"", "x", ""}));
  EXPECT_EQ(scan("\"\",\",\"\n").fields[0], (Fields{"", ","}));
}

TEST(Csv, RowsCountRecordsNotLines) {
  const Scanned s = scan("h\n\"a\nb\nc\"\nd\n");
  EXPECT_EQ(s.rows, (std::vector<std::size_t>{1, 2, 3}));
}

TEST(Csv, EmptyTextHasNoRecords) {
  EXPECT_TRUE(scan("").fields.empty());
  EXPECT_TRUE(scan("\xEF\xBB\xBF").fields.empty());
  const Scanned blanks = scan("\n\r\n\n");
  EXPECT_TRUE(blanks.fields.empty());
  EXPECT_EQ(blanks.blank_lines, 3u);
}

TEST(Csv, UnterminatedQuoteNamesTheRowWhereItOpened) {
  try {
    scan("a,b\n1,2\n3,\"open\n4,5\n6,7\n");
    FAIL() << "expected unterminated_quote";
  } catch (const TapeError& e) {
    EXPECT_EQ(e.kind, ErrorKind::unterminated_quote);
    EXPECT_EQ(e.row, 3u);
    EXPECT_EQ(e.file, "t.csv");
  }
}

TEST(Csv, RecordTooLongIsFoundWithoutReadingToItsEnd) {
  std::string text = "a,b\n1,2\n";
  text += std::string(5000, 'x') + ",y\n";
  try {
    scan(text, 1000);
    FAIL() << "expected record_too_long";
  } catch (const TapeError& e) {
    EXPECT_EQ(e.kind, ErrorKind::record_too_long);
    EXPECT_EQ(e.row, 3u);
  }
}

TEST(Csv, QuotedRecordTooLong) {
  std::string text = "a,b\n\"" + std::string(3000, 'x') + "\",y\n\"z\"\n";
  try {
    scan(text, 1000);
    FAIL() << "expected record_too_long";
  } catch (const TapeError& e) {
    EXPECT_EQ(e.kind, ErrorKind::record_too_long);
    EXPECT_EQ(e.row, 2u);
  }
}

TEST(Csv, OpenQuoteRunningPastTheLimitWithNoCloseIsUnterminated) {
  std::string text = "a,b\n\"" + std::string(3000, 'x') + "\n";
  try {
    scan(text, 1000);
    FAIL() << "expected unterminated_quote";
  } catch (const TapeError& e) {
    EXPECT_EQ(e.kind, ErrorKind::unterminated_quote);
    EXPECT_EQ(e.row, 2u);
  }
}

TEST(Csv, RecordExactlyAtTheLimitIsRead) {
  const std::string line(1000, 'x');
  const Scanned s = scan(line + "\r\n" + line, 1000);
  ASSERT_EQ(s.fields.size(), 2u);
  EXPECT_EQ(s.fields[0][0], line);
  EXPECT_THROW(scan(line + "x\n", 1000), TapeError);
}

TEST(Csv, ReadsOneRecordAgainFromItsOffset) {
  const std::string text = "h\n\"a,\"\"b\"\"\",c\nd,e\n";
  CsvScanner first = start_csv(text, "t.csv", 1 << 20);
  CsvRecord record;
  ASSERT_TRUE(next_record(first, record));
  ASSERT_TRUE(next_record(first, record));
  const std::size_t offset = record.offset;
  CsvScanner again = start_csv_at(text, "t.csv", 1 << 20, offset, 2);
  CsvRecord reread;
  ASSERT_TRUE(next_record(again, reread));
  EXPECT_EQ(reread.row, 2u);
  EXPECT_EQ(Fields(reread.fields.begin(), reread.fields.end()), (Fields{"a,\"b\"", "c"}));
}

}  // namespace
