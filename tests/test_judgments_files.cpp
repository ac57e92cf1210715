// Judgments files read and written by kith (solver/io/judgment_io.h, solver/io/text_fields.h):
// byte order marks, line ends, exact ids, time ranges, formula-looking fields, and a round trip
// of every field through kith's own export.
#include <doctest/doctest.h>

#include <string>
#include <vector>

#include "solver/io/judgment_io.h"
#include "solver/io/text_fields.h"

namespace {

using kith::Judgment;
using kith::parse_judgments_csv;

const std::vector<std::string> kIds = {"a", "b", "c", "\xEF\xBD\x81", "x y", " padded ", "=SUM(A1)", "-3", "'=quoted"};

}  // namespace

TEST_CASE("judgments files: a byte order mark is exactly EF BB BF, and a full-width id keeps its first byte") {
  auto r = parse_judgments_csv("\xEF\xBB\xBF" "anchor,nearer,farther\na,b,c\n", "j.csv", kIds);
  REQUIRE(r.ok());
  REQUIRE(r.judgments.size() == 1);
  // U+FF41 (full-width a) starts with the byte EF too, but is not a byte order mark.
  r = parse_judgments_csv("\xEF\xBD\x81,b,c\n", "j.csv", kIds);
  REQUIRE(r.ok());
  REQUIRE(r.judgments.size() == 1);
  CHECK(r.judgments[0].anchor == 3);
  // A lone EF is an id like any other: unknown here, reported by line, never an internal error.
  r = parse_judgments_csv("\xEF,b,c\n", "j.csv", kIds);
  REQUIRE(r.problems.size() == 1);
  CHECK(r.problems[0].line == 1);
  CHECK(r.problems[0].message.find("is not an item") != std::string::npos);
}

TEST_CASE("judgments files: LF, CRLF and lone CR line ends give the same rows") {
  for (const std::string end : {"\n", "\r\n", "\r"}) {
    const auto r = parse_judgments_csv("a,b,c" + end + "b,c,a" + end + "c,a,b" + end, "j.csv", kIds);
    INFO("line end ", int(end.back()));
    REQUIRE(r.ok());
    CHECK(r.judgments.size() == 3);
  }
  const auto r = parse_judgments_csv("a,b,c\rb,b,a\r", "j.csv", kIds);
  REQUIRE(r.problems.size() == 1);
  CHECK(r.problems[0].line == 2);  // a lone CR counts as a line
}

TEST_CASE("judgments files: ids are compared exactly as the collection holds them") {
  auto r = parse_judgments_csv("\" padded \",a,b\n", "j.csv", kIds);
  REQUIRE(r.ok());
  CHECK(r.judgments[0].anchor == 5);
  // Unquoted spaces are part of the id too: "a " is not "a", and the message says why.
  r = parse_judgments_csv("a ,b,c\n", "j.csv", kIds);
  REQUIRE(r.problems.size() == 1);
  CHECK(r.problems[0].column == 1);
  CHECK(r.problems[0].message.find("compared exactly") != std::string::npos);
}

TEST_CASE("judgments files: times outside 1970-01-01 .. 9999-12-31 and weights out of range are refused by line") {
  const auto r = parse_judgments_csv(
      "anchor,nearer,farther,time,weight\n"
      "a,b,c,2026-12-01T21:54:23Z,1\n"
      "a,b,c,0,1\n"
      "a,b,c,-5,1\n"
      "a,b,c,1e18,1\n"
      "a,b,c,,1e300\n"
      "a,b,c,,0\n"
      "a,b,c,,1000\n",
      "j.csv", kIds);
  REQUIRE(r.problems.size() == 5);
  CHECK(r.problems[0].line == 3);
  CHECK(r.problems[0].message.find("outside 1970-01-01") != std::string::npos);
  CHECK(r.problems[1].line == 4);
  CHECK(r.problems[2].line == 5);
  CHECK(r.problems[3].line == 6);
  CHECK(r.problems[3].message.find("at most 1000") != std::string::npos);
  CHECK(r.problems[4].line == 7);
  CHECK(r.bad_rows == 5);
}

TEST_CASE("judgments files: formula-looking fields are written neutralized, numbers stay numbers") {
  CHECK(kith::csv_field("=HYPERLINK(\"x\")") == "\"'=HYPERLINK(\"\"x\"\")\"");
  CHECK(kith::csv_field("+cmd|' /C calc'!A0") == "'+cmd|' /C calc'!A0");
  CHECK(kith::csv_field("@SUM(A1)") == "'@SUM(A1)");
  CHECK(kith::csv_field("-2+3") == "'-2+3");
  CHECK(kith::csv_field("\tx") == "'\tx");
  CHECK(kith::csv_field("-3.5") == "-3.5");
  CHECK(kith::csv_field("+2e-3") == "+2e-3");
  CHECK(kith::csv_field("=x", /*raw=*/true) == "=x");
  CHECK(kith::csv_field("plain") == "plain");
  // An apostrophe already there before a formula character gets one more, so reading gives it back.
  CHECK(kith::csv_field("'=x") == "''=x");
  for (const std::string s : {"=x", "'=x", "''@y", "-1", "plain", "'plain"})
    CHECK(kith::unneutralized(kith::csv_field(s)) == s);
}

TEST_CASE("judgments files: kith's own export re-imports identically, field by field") {
  // Odd ids and names: quotes, commas, line breaks, spaces, formula starts, non-ASCII.
  std::vector<Judgment> in;
  const std::vector<std::string> people = {"Ana", "O'Brien, \"Bo\"", "line\nbreak", "=HYPERLINK(\"evil\")",
                                           "+cmd|x", "@SUM(A1)", "Zoë", " spaced "};
  for (int k = 0; k < 40; ++k) {
    Judgment j;
    j.anchor = k % 9;
    j.nearer = (k + 1 + k / 9) % 9;
    j.farther = (k + 3) % 9;
    if (j.nearer == j.anchor) j.nearer = (j.nearer + 1) % 9;
    if (j.farther == j.anchor || j.farther == j.nearer) j.farther = (j.farther + 2) % 9;
    if (j.farther == j.anchor || j.farther == j.nearer) j.farther = (j.farther + 2) % 9;
    j.person = people[size_t(k) % people.size()];
    j.time = 1700000000.0 + 1234.5 * k + 0.125;
    j.kind = kith::JudgmentKind(k % 5);
    j.weight = 0.25 + 0.5 * (k % 4);
    in.push_back(j);
  }
  const std::string text = kith::format_judgments_csv(in, kIds);
  const auto r = parse_judgments_csv(text, "export.csv", kIds);
  INFO(text);
  REQUIRE(r.ok());
  REQUIRE(r.judgments.size() == in.size());
  for (size_t k = 0; k < in.size(); ++k) {
    const Judgment& a = in[k];
    const Judgment& b = r.judgments[k];
    CHECK(b.anchor == a.anchor);
    CHECK(b.nearer == a.nearer);
    CHECK(b.farther == a.farther);
    CHECK(b.person == a.person);
    CHECK(b.time == doctest::Approx(a.time).epsilon(1e-12));  // written to the millisecond
    CHECK(b.kind == a.kind);
    CHECK(b.weight == a.weight);
  }
}
