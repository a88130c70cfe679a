/* test_json.c - the strict JSON reader (compiler/back/json_read.c).
 * Takes: valid and malformed documents.  Gives: checks of every value
 * kind, exact 64-bit integers, escapes, and the exact FILE:LINE:COL
 * message for each kind of malformed input.  The grammar and the rules
 * checked are those of RFC 8259, "The JavaScript Object Notation (JSON)
 * Data Interchange Format" (IETF, December 2017); the section is named
 * beside each check. */
#include <stdint.h>
#include <stdlib.h>
#include <string.h>

#include "dwell/json.h"
#include "check.h"

static dw_json *parse(const char *text, dw_error *err)
{
	dw_json *v = NULL;
	memset(err, 0, sizeof *err);
	dw_json_parse_string(text, strlen(text), "t.json", &v, err);
	return v;
}

/* Parse text that must fail; the message must equal want exactly. */
static void expect_error(const char *text, size_t len, const char *want)
{
	dw_error err = {0};
	dw_json *v = NULL;
	int st = dw_json_parse_string(text, len, "t.json", &v, &err);
	CHECK(st == DW_EINPUT && v == NULL, "status %d for input %s", st, text);
	CHECK(!strcmp(err.msg, want), "message \"%s\", want \"%s\"", err.msg, want);
}

static void test_value_kinds(void)
{
	dw_error err;
	/* RFC 8259 sections 3-7: every kind of value, nested. */
	dw_json *v = parse(" {\"a\": [1, -2.5e1, true, false, null, \"s\"],\n"
		"  \"b\": {\"c\": {\"d\": []}, \"e\": {}}, \"z\": 0} ", &err);
	CHECK(v && err.status == DW_OK, "parse: %s", err.msg);
	if (!v)
		return;
	CHECK(v->kind == DW_JSON_OBJECT && v->n == 3, "root kind %d n %zu", v->kind, v->n);
	/* members keep document order */
	CHECK(!strcmp(v->item[0].key, "a") && !strcmp(v->item[1].key, "b")
		&& !strcmp(v->item[2].key, "z"), "order %s %s %s", v->item[0].key,
		v->item[1].key, v->item[2].key);
	const dw_json *a = dw_json_member(v, "a");
	CHECK(a && a->kind == DW_JSON_ARRAY && a->n == 6, "array");
	if (a && a->n == 6) {
		CHECK(a->item[0].kind == DW_JSON_NUMBER && a->item[0].is_int && a->item[0].mag == 1, "1");
		CHECK(a->item[1].kind == DW_JSON_NUMBER && !a->item[1].is_int
			&& a->item[1].num == -25.0 && !strcmp(a->item[1].str, "-2.5e1"), "-2.5e1 -> %g", a->item[1].num);
		CHECK(a->item[2].kind == DW_JSON_BOOL && a->item[2].boolean == 1, "true");
		CHECK(a->item[3].kind == DW_JSON_BOOL && a->item[3].boolean == 0, "false");
		CHECK(a->item[4].kind == DW_JSON_NULL, "null");
		CHECK(a->item[5].kind == DW_JSON_STRING && !strcmp(a->item[5].str, "s"), "string");
		CHECK(a->item[1].line == 1 && a->item[1].col == 12, "position %ld:%ld", a->item[1].line, a->item[1].col);
	}
	const dw_json *d = dw_json_path(v, "b.c.d");
	CHECK(d && d->kind == DW_JSON_ARRAY && d->n == 0, "empty array by path");
	const dw_json *e = dw_json_path(v, "b.e");
	CHECK(e && e->kind == DW_JSON_OBJECT && e->n == 0, "empty object by path");
	CHECK(dw_json_path(v, "a.5") == &a->item[5], "array index in a path");
	CHECK(dw_json_path(v, "a.6") == NULL && dw_json_path(v, "b.x") == NULL
		&& dw_json_path(v, "a..1") == NULL, "absent paths");
	CHECK(dw_json_path(v, "b")->line == 2 && dw_json_path(v, "b")->col == 3, "member position");
	dw_json_free(v);

	/* RFC 8259 section 2: any value may be the whole text (the RFC 7159
	 * change from RFC 4627); a string, a number and a literal here. */
	v = parse("\"Hello world!\"", &err);
	CHECK(v && v->kind == DW_JSON_STRING && !strcmp(v->str, "Hello world!"), "scalar text");
	dw_json_free(v);
	v = parse("\r\n\t 42 \n", &err);
	CHECK(v && v->kind == DW_JSON_NUMBER && v->mag == 42, "number text with ws");
	dw_json_free(v);
	v = parse("true", &err);
	CHECK(v && v->kind == DW_JSON_BOOL && v->boolean, "literal text");
	dw_json_free(v);
}

static void test_numbers(void)
{
	dw_error err;
	/* RFC 8259 section 6: number = [ minus ] int [ frac ] [ exp ]; large
	 * integers kept exactly (the RFC warns IEEE doubles hold only 2^53). */
	dw_json *v = parse("[18446744073709551615, 18446744073709551616, 9007199254740993,"
		" -9223372036854775808, -0, 0, 1.5E+3, 1e-2, 0.5]", &err);
	CHECK(v && v->n == 9, "parse: %s", err.msg);
	if (!v || v->n != 9) {
		dw_json_free(v);
		return;
	}
	uint64_t u = 0;
	CHECK(v->item[0].is_int && v->item[0].mag == UINT64_MAX
		&& dw_json_get_u64(&v->item[0], &u) == DW_OK && u == 18446744073709551615u,
		"UINT64_MAX exactly");
	CHECK(!strcmp(v->item[0].str, "18446744073709551615"), "text kept: %s", v->item[0].str);
	CHECK(!v->item[1].is_int && v->item[1].num == 18446744073709551616.0
		&& dw_json_get_u64(&v->item[1], &u) == DW_EINPUT, "2^64 is only a double");
	/* 2^53 + 1 has no double; the exact magnitude must survive */
	CHECK(v->item[2].is_int && v->item[2].mag == 9007199254740993u
		&& v->item[2].num == 9007199254740992.0, "2^53+1 exact, double rounded");
	CHECK(v->item[3].is_int && v->item[3].negative && v->item[3].mag == 9223372036854775808u
		&& dw_json_get_u64(&v->item[3], &u) == DW_EINPUT, "-2^63");
	CHECK(v->item[4].is_int && !v->item[4].negative && v->item[4].mag == 0, "-0 is zero");
	CHECK(v->item[5].is_int && v->item[5].mag == 0, "0");
	CHECK(!v->item[6].is_int && v->item[6].num == 1500.0, "1.5E+3");
	CHECK(!v->item[7].is_int && v->item[7].num == 0.01, "1e-2");
	CHECK(!v->item[8].is_int && v->item[8].num == 0.5, "0.5");
	dw_json_free(v);
}

static void test_strings(void)
{
	dw_error err;
	/* RFC 8259 section 7: the two-character escapes, \u escapes, and the
	 * section's own example: G clef U+1D11E written "\uD834\uDD1E", whose
	 * UTF-8 form is F0 9D 84 9E (RFC 3629 encoding). */
	dw_json *v = parse("[\"q\\\"b\\\\s\\/b\\bf\\fn\\nr\\rt\\t\", \"\\u0041\\u00e9\\u20AC\","
		" \"\\uD834\\uDD1E\", \"a\\u0000b\", \"\xc3\xa9\xe2\x82\xac\", \"\\u005C\"]", &err);
	CHECK(v && v->n == 6, "parse: %s", err.msg);
	if (!v || v->n != 6) {
		dw_json_free(v);
		return;
	}
	CHECK(!strcmp(v->item[0].str, "q\"b\\s/b\bf\fn\nr\rt\t"), "simple escapes");
	CHECK(!strcmp(v->item[1].str, "A\xc3\xa9\xe2\x82\xac"), "\\u escapes to UTF-8");
	CHECK(v->item[2].len == 4 && !memcmp(v->item[2].str, "\xf0\x9d\x84\x9e", 4), "G clef");
	CHECK(v->item[3].len == 3 && !memcmp(v->item[3].str, "a\0b", 3), "escaped NUL kept, len 3");
	CHECK(!strcmp(v->item[4].str, "\xc3\xa9\xe2\x82\xac"), "raw UTF-8 kept");
	/* RFC 8259 section 7: "\u005C" is the reverse solidus */
	CHECK(!strcmp(v->item[5].str, "\\"), "\\u005C");
	dw_json_free(v);

	/* RFC 8259 section 8.1: a parser MAY ignore a leading byte order mark */
	v = parse("\xef\xbb\xbf[1]", &err);
	CHECK(v && v->kind == DW_JSON_ARRAY && v->n == 1, "BOM skipped: %s", err.msg);
	dw_json_free(v);

	/* RFC 8259 section 13 example (from memory), nested object and array */
	v = parse("{\"Image\": {\"Width\": 800, \"Height\": 600, \"Title\": \"View from 15th Floor\",\n"
		" \"Thumbnail\": {\"Url\": \"http://www.example.com/image/481989943\", \"Height\": 125,"
		" \"Width\": 100}, \"Animated\" : false, \"IDs\": [116, 943, 234, 38793]}}", &err);
	CHECK(v != NULL, "RFC example: %s", err.msg);
	const dw_json *w = dw_json_path(v, "Image.Thumbnail.Width"), *id = dw_json_path(v, "Image.IDs.3");
	CHECK(w && w->mag == 100 && id && id->mag == 38793, "RFC example paths");
	CHECK(dw_json_path(v, "Image.Animated")->kind == DW_JSON_BOOL, "RFC example bool");
	dw_json_free(v);
}

static void test_malformed(void)
{
	/* RFC 8259 section 4/5: no trailing comma after the last member */
	expect_error("{\"a\": 1,}", 9, "t.json:1:9: trailing comma before '}'");
	expect_error("[1,\n 2,\n]", 9, "t.json:3:1: trailing comma before ']'");
	/* section 5: values separated by commas */
	expect_error("[1 2]", 5, "t.json:1:4: ',' or ']' expected, found '2'");
	/* section 6: leading zeros are not allowed; digits required */
	expect_error("[01]", 4, "t.json:1:2: leading zeros are not allowed in a number");
	expect_error("-", 1, "t.json:1:2: digit expected in a number, found end of input");
	expect_error("1.e5", 4, "t.json:1:3: digit expected after the decimal point");
	expect_error("[2e+]", 5, "t.json:1:5: digit expected in the exponent");
	expect_error("+1", 2, "t.json:1:1: a value expected, found '+'");
	/* section 6: Infinity and NaN are not permitted */
	expect_error("[NaN]", 5, "t.json:1:2: a value expected, found 'N'");
	expect_error("1e400", 5, "t.json:1:1: number 1e400 is beyond the range of a double");
	/* section 3: literal names are lowercase and complete */
	expect_error("{\n  \"a\": tru\n}", 14, "t.json:2:8: a value expected, found 't'");
	expect_error("[True]", 6, "t.json:1:2: a value expected, found 'T'");
	/* section 4: names are strings; name separator ':' */
	expect_error("{a: 1}", 6, "t.json:1:2: member name (a string) expected, found 'a'");
	expect_error("{\"a\" 1}", 7, "t.json:1:6: ':' expected after the member name, found '1'");
	/* section 4 (names SHOULD be unique): refused, pointing at the second */
	expect_error("{\"k\":1,\"k\":2}", 13, "t.json:1:8: member \"k\" appears twice (first at line 1)");
	/* section 7: strings closed; control characters escaped; known escapes */
	expect_error("\"abc", 4, "t.json:1:1: string not closed before the end of input");
	expect_error("[\"a\tb\"]", 7, "t.json:1:4: control character 0x09 in a string (write it as an escape)");
	expect_error("[\"\\x41\"]", 8, "t.json:1:3: unknown escape '\\' followed by 'x'");
	expect_error("[\"\\u12G4\"]", 10, "t.json:1:3: \\u must be followed by four hex digits");
	/* section 8.2: unpaired surrogates are refused here */
	expect_error("[\"\\uD834\"]", 10, "t.json:1:3: high surrogate \\uD834 not followed by a low surrogate escape");
	expect_error("[\"\\uDD1E\"]", 10, "t.json:1:3: low surrogate \\uDD1E without a high surrogate before it");
	/* section 8.1: UTF-8 only (RFC 3629: C0 80 is an overlong form) */
	expect_error("[\"\xff\"]", 5, "t.json:1:3: invalid UTF-8 byte 0xff in a string");
	expect_error("[\"\xc0\x80\"]", 6, "t.json:1:3: invalid UTF-8 byte 0xc0 in a string");
	/* section 2: one value, only whitespace around it */
	expect_error("1 2", 3, "t.json:1:3: text after the end of the document ('2')");
	expect_error("", 0, "t.json:1:1: a value expected, found end of input");
	expect_error("  \n  ", 5, "t.json:2:3: a value expected, found end of input");
	expect_error("[1]\x0b", 4, "t.json:1:4: text after the end of the document (byte 0x0b)");
	expect_error("[1,\0]", 5, "t.json:1:4: a value expected, found byte 0x00");
	expect_error("{\"a\": [1, {\"b\": 2]}", 19, "t.json:1:18: ',' or '}' expected, found ']'");
}

static void test_depth(void)
{
	/* Nesting limit (RFC 8259 section 9 lets a parser limit depth). */
	char doc[2 * (DW_JSON_MAX_DEPTH + 1) + 1];
	dw_error err;
	for (int depth = DW_JSON_MAX_DEPTH; depth <= DW_JSON_MAX_DEPTH + 1; depth++) {
		memset(doc, '[', (size_t)depth);
		memset(doc + depth, ']', (size_t)depth);
		doc[2 * depth] = '\0';
		dw_json *v = parse(doc, &err);
		if (depth == DW_JSON_MAX_DEPTH) {
			CHECK(v && err.status == DW_OK, "depth %d accepted: %s", depth, err.msg);
		} else {
			char want[100];
			snprintf(want, sizeof want, "t.json:1:%d: nesting deeper than %d levels",
				depth, DW_JSON_MAX_DEPTH);
			CHECK(!v && !strcmp(err.msg, want), "depth %d: %s", depth, err.msg);
		}
		dw_json_free(v);
	}
}

static void test_files(void)
{
	dw_error err = {0};
	dw_json *v = NULL;
	CHECK(dw_json_parse_file("tests/cases/ledger/bad-trailing-comma.json", &v, &err) == DW_EINPUT,
		"bad file");
	CHECK(!strcmp(err.msg, "tests/cases/ledger/bad-trailing-comma.json:5:1: trailing comma before '}'"),
		"file message: %s", err.msg);
	memset(&err, 0, sizeof err);
	CHECK(dw_json_parse_file("tests/cases/ledger/no-such-file.json", &v, &err) == DW_EINPUT
		&& strstr(err.msg, "no-such-file.json: cannot open"), "missing file: %s", err.msg);
	memset(&err, 0, sizeof err);
	CHECK(dw_json_parse_file("tests/cases/ledger/base.json", &v, &err) == DW_OK, "base: %s", err.msg);
	uint64_t u = 0;
	CHECK(dw_json_get_u64(dw_json_path(v, "t_depth"), &u) == DW_OK && u == UINT64_MAX, "t_depth");
	CHECK(dw_json_get_u64(dw_json_path(v, "stages.2.t_count"), &u) == DW_OK
		&& u == 9007199254736993u, "stage t_count exact");
	dw_json_free(v);
}

static void test_writer(void)
{
	/* Round trip: what dw_json_write_string writes parses back the same. */
	const char s[] = "tab\there \"q\" back\\slash nl\n ctl\x01 nul\0end \xe2\x82\xac";
	char *buf = NULL;
	size_t len = 0;
	FILE *f = open_memstream(&buf, &len);
	dw_json_write_string(f, s, sizeof s - 1);
	fclose(f);
	dw_error err;
	dw_json *v = parse(buf, &err);
	CHECK(v && v->len == sizeof s - 1 && !memcmp(v->str, s, sizeof s - 1), "round trip: %s", buf);
	dw_json_free(v);
	free(buf);
}

int main(void)
{
	test_value_kinds();
	test_numbers();
	test_strings();
	test_malformed();
	test_depth();
	test_files();
	test_writer();
	return check_done();
}
